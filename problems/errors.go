package problems

import (
	"errors"
	"fmt"
	"sort"
	"strings"
)

// Error is one problem with an input file: where it is, which key, and what
// was expected. Its message is a single line.
type Error struct {
	File      string // as given on the command line
	Line, Col int    // 1-based; 0 if unknown
	Key       string // full key path, e.g. "bellows[2].pitch_mm" (tables counted from 1)
	Msg       string // what is wrong and what was expected
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d:%d", e.Line, e.Col)
	}
	b.WriteString(": ")
	if e.Key != "" {
		b.WriteString(e.Key)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// Errors is every problem found in one file, in file order. Its message has
// one line per problem.
type Errors []*Error

func (es Errors) Error() string {
	lines := make([]string, len(es))
	for i, e := range es {
		lines[i] = e.Error()
	}
	return strings.Join(lines, "\n")
}

// Unwrap lets errors.As find each *Error.
func (es Errors) Unwrap() []error {
	out := make([]error, len(es))
	for i, e := range es {
		out[i] = e
	}
	return out
}

func (es Errors) sorted() Errors {
	sort.SliceStable(es, func(i, j int) bool {
		if es[i].Line != es[j].Line {
			// unknown positions last
			if es[i].Line == 0 || es[j].Line == 0 {
				return es[j].Line == 0 && es[i].Line != 0
			}
			return es[i].Line < es[j].Line
		}
		return es[i].Col < es[j].Col
	})
	return es
}

// ErrInput is what every input error matches with errors.Is: a problem
// with a file or an argument the user gave, as opposed to a failure while
// running. *Error and Errors match it; so do the input errors of results
// and cmd/plica, through their Is methods. Command-line tools exit with
// status 2 on it.
var ErrInput = errors.New("input error")

// Is makes an *Error match ErrInput.
func (e *Error) Is(target error) bool { return target == ErrInput }

// Is makes Errors match ErrInput.
func (es Errors) Is(target error) bool { return target == ErrInput }

// IsInputError reports whether err is (or wraps) an input error:
// errors.Is(err, ErrInput).
func IsInputError(err error) bool { return errors.Is(err, ErrInput) }
