package objective

// SetStageHook lets the external tests force a panic inside a stage; it
// returns the function that removes the hook.
func SetStageHook(f func(stage string)) (restore func()) {
	stageHook = f
	return func() { stageHook = nil }
}
