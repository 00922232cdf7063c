package problems

import _ "embed"

// starter is the demo problem, shipped as the starting point of plica init.
//
//go:embed examples/boom-search.toml
var starter []byte

// Starter returns the text of a commented starter problem file.
func Starter() []byte { return append([]byte(nil), starter...) }
