package problems

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
	"unicode/utf8"
)

// Input bounds, checked before any decoding: a file plica reads (design,
// problem, calibration or bench CSV) is at most MaxFileSize bytes, and the
// tables and arrays of a TOML file nest at most MaxDepth deep. The TOML
// decoder's time and memory grow much faster than the text with nesting
// (a 300 kB file of nested inline tables took minutes and gigabytes), and
// nothing plica reads nests deeper than four levels.
const (
	MaxFileSize = 8 << 20
	MaxDepth    = 32
)

// readInput reads a regular file of at most MaxFileSize bytes; kind names
// it in messages ("design file", "bench CSV"). A missing, special or too
// large file is an *Error naming the file.
func readInput(path, kind string) ([]byte, error) {
	data, err := readBounded(path, kind)
	var se *sizeError
	switch {
	case errors.As(err, &se):
		return nil, &Error{File: path, Msg: se.Error()}
	case err != nil:
		return nil, &Error{File: path, Msg: "cannot read: " + err.Error()}
	}
	return data, nil
}

// readBounded reads a regular file of at most MaxFileSize bytes; its errors
// name neither the file nor the failed read (a *sizeError for a file that
// is too large).
func readBounded(path, kind string) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, unwrapPath(err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, unwrapPath(err)
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("not a regular file (expected a %s)", kind)
	}
	if fi.Size() > MaxFileSize {
		return nil, &sizeError{fi.Size(), kind}
	}
	// The size may change between Stat and the read: read one byte more
	// than the limit to notice.
	data, err := io.ReadAll(io.LimitReader(f, MaxFileSize+1))
	if err != nil {
		return nil, unwrapPath(err)
	}
	if len(data) > MaxFileSize {
		return nil, &sizeError{int64(len(data)), kind}
	}
	return data, nil
}

func unwrapPath(err error) error {
	if u := errors.Unwrap(err); u != nil {
		return u
	}
	return err
}

// sizeError is a file larger than MaxFileSize.
type sizeError struct {
	n    int64
	kind string
}

func (e *sizeError) Error() string {
	return fmt.Sprintf("%d bytes is too large (expected a %s of at most %d bytes, 8 MB)", e.n, e.kind, MaxFileSize)
}

// checkSize refuses text longer than MaxFileSize, for parsers given bytes.
func checkSize(data []byte, file, kind string) error {
	if len(data) > MaxFileSize {
		return &Error{File: file, Msg: (&sizeError{int64(len(data)), kind}).Error()}
	}
	return nil
}

// checkTOMLBounds refuses, before decoding, TOML text that is too large,
// is UTF-16 encoded, or nests tables and arrays deeper than MaxDepth. The
// depth counts every level a value sits at: the components of a table
// header or dotted key, and each inline table or array it is inside. The
// error is positioned at the bracket or key that goes one level too deep.
func checkTOMLBounds(data []byte, file, kind string) error {
	if err := checkSize(data, file, kind); err != nil {
		return err
	}
	if enc := utf16Name(data); enc != "" {
		return &Error{File: file, Line: 1, Col: 1, Msg: fmt.Sprintf("the file is %s encoded (expected UTF-8 text; save the %s as UTF-8)", enc, kind)}
	}
	if line, col, key, ok := tooDeep(data); !ok {
		return &Error{File: file, Line: line, Col: col, Key: key,
			Msg: fmt.Sprintf("nested deeper than %d levels (expected tables and arrays nested at most %d deep)", MaxDepth, MaxDepth)}
	}
	return nil
}

// utf16Name returns "UTF-16LE" or "UTF-16BE" for text with a UTF-16
// byte-order mark or, without one, with NUL bytes in every other place of
// its first characters; "" otherwise.
func utf16Name(data []byte) string {
	switch {
	case bytes.HasPrefix(data, []byte{0xFF, 0xFE}):
		return "UTF-16LE"
	case bytes.HasPrefix(data, []byte{0xFE, 0xFF}):
		return "UTF-16BE"
	}
	n := min(len(data), 64) &^ 1
	if n < 4 {
		return ""
	}
	var even, odd int
	for i := 0; i < n; i += 2 {
		if data[i] == 0 {
			even++
		}
		if data[i+1] == 0 {
			odd++
		}
	}
	switch half := n / 2; {
	case odd == half && even == 0:
		return "UTF-16LE"
	case even == half && odd == 0:
		return "UTF-16BE"
	}
	return ""
}

// tooDeep scans TOML text for its nesting depth without decoding it. It
// returns ok = false with the 1-based line and column (in characters) of
// the first place deeper than MaxDepth, and the statement's key as
// written. Strings and comments are skipped; text that is not valid TOML
// is left for the decoder to report.
func tooDeep(data []byte) (line, col int, key string, ok bool) {
	type level struct {
		inline bool // an inline table: its entries start with a key
		depth  int  // of the table itself; of the elements of an array
	}
	var stack []level
	line, col = 1, 0
	base := 0       // depth of the current table header
	keyMode := true // at a key (line start, or after '{' or ',' in an inline table)
	keyDots := 0    // dotted-key components beyond the first, of the pending key
	keyStart := -1  // offset of the top-level statement's first character
	stmtKey := ""
	depth := func() int {
		if len(stack) == 0 {
			return base
		}
		return stack[len(stack)-1].depth
	}
	i := 0
	advance := func() {
		c := data[i]
		if c == '\n' {
			line, col = line+1, 0
		} else if c < utf8.RuneSelf || utf8.RuneStart(c) {
			col++
		}
		i++
	}
	skipString := func() {
		q := data[i]
		triple := i+2 < len(data) && data[i+1] == q && data[i+2] == q
		if triple {
			advance()
			advance()
		}
		advance()
		for i < len(data) {
			c := data[i]
			if c == '\\' && q == '"' {
				advance()
				if i < len(data) {
					advance()
				}
				continue
			}
			if c == q {
				if !triple {
					advance()
					return
				}
				if i+2 < len(data) && data[i+1] == q && data[i+2] == q {
					advance()
					advance()
					advance()
					for i < len(data) && data[i] == q { // up to two quotes of content before the close
						advance()
					}
					return
				}
			}
			if c == '\n' && !triple {
				return
			}
			advance()
		}
	}
	for i < len(data) {
		c := data[i]
		switch {
		case c == '"' || c == '\'':
			skipString()
			continue
		case c == '#':
			for i < len(data) && data[i] != '\n' {
				advance()
			}
			continue
		case c == '\n' && len(stack) == 0:
			keyMode, keyDots, keyStart = true, 0, -1
		case c == '[' && len(stack) == 0 && keyMode && keyStart < 0:
			// A table header: its depth is the number of its components.
			keyStart = i
			hl, hc := line, col+1
			j := i
			for j < len(data) && data[j] != '\n' && data[j] != ']' {
				j++
			}
			name := strings.Trim(string(data[i:j]), "[ \t")
			advance()
			n := 1
			for i < len(data) && data[i] != '\n' && data[i] != ']' {
				switch data[i] {
				case '"', '\'':
					skipString()
					continue
				case '.':
					n++
				}
				advance()
			}
			if n > MaxDepth {
				return hl, hc, name, false
			}
			base = n
			for i < len(data) && data[i] != '\n' {
				if data[i] == '#' {
					break
				}
				advance()
			}
			continue
		case keyMode && c == '.':
			keyDots++
		case keyMode && c == '=':
			keyMode = false
			if len(stack) == 0 && keyStart >= 0 {
				stmtKey = strings.TrimSpace(string(data[keyStart:i]))
			}
			if d := depth() + 1 + keyDots; d > MaxDepth {
				return line, col + 1, stmtKey, false
			}
		case !keyMode && (c == '{' || c == '['):
			var d int // the level of this table or array
			switch {
			case len(stack) == 0:
				d = base + 1 + keyDots
			case stack[len(stack)-1].inline:
				d = depth() + 1 + keyDots
			default:
				d = depth() // an element of an array
			}
			if c == '[' {
				d++ // the level of its elements
			}
			if d > MaxDepth {
				return line, col + 1, stmtKey, false
			}
			stack = append(stack, level{inline: c == '{', depth: d})
			keyDots = 0
			keyMode = c == '{'
		case !keyMode && (c == '}' || c == ']') && len(stack) > 0:
			stack = stack[:len(stack)-1]
		case !keyMode && c == ',' && len(stack) > 0 && stack[len(stack)-1].inline:
			keyMode, keyDots = true, 0
		case keyMode && c == '}' && len(stack) > 0: // an empty inline table
			stack = stack[:len(stack)-1]
			keyMode = false
		}
		if keyStart < 0 && len(stack) == 0 && c != ' ' && c != '\t' && c != '\r' && c != '\n' {
			keyStart = i
		}
		advance()
	}
	return 0, 0, "", true
}
