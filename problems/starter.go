package problems

import _ "embed"

// starter is the commented starter problem that plica init writes: every
// table of a problem file explained, with sensible ranges.
//
//go:embed starter.toml
var starter []byte

// Starter returns the text of a commented starter problem file.
func Starter() []byte { return append([]byte(nil), starter...) }
