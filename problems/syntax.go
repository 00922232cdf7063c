package problems

import (
	"regexp"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// syntaxRules add what was expected to the TOML decoder's messages that do
// not say it; the first rule whose pattern matches applies. A message that
// already says what was expected is kept.
var syntaxRules = []struct {
	re  *regexp.Regexp
	msg string // $1… are the pattern's groups
}{
	{regexp.MustCompile(`^Key '(.*)' has already been defined\.?$`), "key $1 is defined twice (expected each key once in a table)"},
	{regexp.MustCompile(`^Key '(.*)' was already created as a hash\.?$`), "key $1 is already a table (expected each key or table defined once)"},
	{regexp.MustCompile(`^Key '(.*)' was already created and cannot be used as an array\.?$`), "key $1 is already defined (expected an array of tables [[$1]] to be declared only with [[$1]] headers)"},
	{regexp.MustCompile(`^(".*") is not a table$`), "$1 is not a table (expected a key that names a table)"},
	{regexp.MustCompile(`^strings cannot contain newlines$`), "a string runs to the end of the line (expected the closing quote on the same line, or a \"\"\" multi-line string)"},
	{regexp.MustCompile(`^newlines not allowed within inline tables$`), "newline inside an inline table (expected { ... } on one line, or a [table])"},
	{regexp.MustCompile(`^invalid datetime: (.*)$`), "invalid date $1 (expected a date such as 2025-01-31 or a date and time such as 2025-01-31T14:30:00Z)"},
	{regexp.MustCompile(`^invalid duration: (.*)$`), "invalid duration $1 (expected a duration such as \"90s\" or \"8h\")"},
	{regexp.MustCompile(`^invalid escape in string (.*)$`), "invalid escape $1 in a string (expected one of \\b \\t \\n \\f \\r \\\" \\\\ \\uXXXX, or a 'literal string' without escapes)"},
	{regexp.MustCompile(`^TOML files cannot contain control characters: (.*)$`), "control character $1 (expected printable text; write tabs and newlines inside strings as \\t and \\n)"},
	{regexp.MustCompile(`^invalid UTF-8 byte: (.*)$`), "invalid UTF-8 byte $1 (expected UTF-8 text)"},
	{regexp.MustCompile(`^.*(is out of range for|is out of the safe) .*$`), "$0 (expected a number that fits in 64 bits)"},
	{regexp.MustCompile(`(?i)^(invalid float|invalid integer|floats must start|not a binary number|not an octal number|not a hexadecimal number|cannot use sign).*$`), "$0 (expected a number such as 12, -0.5 or 1e-3)"},
	{regexp.MustCompile(`^unexpected comma.*$`), "$0 (expected a value or key between commas)"},
	{regexp.MustCompile(`^.*key name appears blank.*$`), "$0 (expected a key before '=')"},
}

var arrayIndex = regexp.MustCompile(`\[[0-9]+\]`)

// syntaxKey gives the decoder's key path of a syntax error at line the
// index of each array table ("bellows.wall_mm" becomes "bellows[2].wall_mm"
// in the second [[bellows]]): the decoder names array tables without their
// element, the locator counts them in the text before the error line.
func syntaxKey(text string, line int, key string) string {
	lines := strings.SplitAfter(text, "\n")
	if key == "" || line < 1 || line > len(lines) {
		return key
	}
	table := newLocator(strings.Join(lines[:line-1], "")).prefix
	plain := arrayIndex.ReplaceAllString(table, "")
	if table == plain {
		return key
	}
	if key == plain || strings.HasPrefix(key, plain+".") {
		return table + key[len(plain):]
	}
	return key
}

// controlCharacter is the 1-based line and column of the first control
// character TOML forbids (any but tab, newline and a carriage return
// before a newline), or 0, 0.
func controlCharacter(text string) (line, col int) {
	line, col = 1, 1
	for i, r := range text {
		switch {
		case r == '\n':
			line, col = line+1, 1
			continue
		case r == '\t', r == '\r' && strings.HasPrefix(text[i+1:], "\n"):
		case r < 0x20 || r == 0x7f:
			return line, col
		}
		col++
	}
	return 0, 0
}

var saysExpected = regexp.MustCompile(`\bexpected\b`)

// syntaxMessage is the decoder's message on one line, starting in lower
// case, saying what was expected.
func syntaxMessage(msg string) string {
	msg = oneLine(strings.TrimSpace(msg))
	if !saysExpected.MatchString(msg) {
		matched := false
		for _, r := range syntaxRules {
			if m := r.re.FindStringSubmatchIndex(msg); m != nil {
				msg = string(r.re.ExpandString(nil, r.msg, msg, m))
				matched = true
				break
			}
		}
		if !matched {
			msg += " (expected TOML: key = value lines, [table] and [[array of tables]] headers, # comments)"
		}
	}
	if r, n := utf8.DecodeRuneInString(msg); unicode.IsUpper(r) && !unicode.IsUpper(firstRuneAfter(msg, n)) {
		msg = string(unicode.ToLower(r)) + msg[n:]
	}
	return msg
}

func firstRuneAfter(s string, n int) rune {
	r, _ := utf8.DecodeRuneInString(s[n:])
	return r
}

// oneLine writes control characters (a newline the decoder quotes, say)
// as Go escapes, so that a message stays on one line.
func oneLine(s string) string {
	if !strings.ContainsFunc(s, unicode.IsControl) {
		return s
	}
	var b strings.Builder
	for _, r := range s {
		if unicode.IsControl(r) {
			q := strconv.QuoteRune(r)
			b.WriteString(q[1 : len(q)-1])
			continue
		}
		b.WriteRune(r)
	}
	return b.String()
}
