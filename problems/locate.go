package problems

import (
	"strconv"
	"strings"
)

// position is a 1-based line and column in a file.
type position struct{ Line, Col int }

// locator maps key paths such as "bellows[2].wall_mm" (array tables counted
// from 1) to the position of the key in the file text, and table paths such
// as "bellows[2]" to the position of their header. The decoder of the TOML
// library keeps no per-element positions for arrays of tables, so plica
// scans the (already syntax-checked) text itself.
type locator struct {
	keys   map[string]position
	prefix string // the table open at the end of the text, indexed
}

func newLocator(text string) *locator {
	l := &locator{keys: map[string]position{}}
	arrays := map[string]int{} // array-table path (unindexed) → count
	prefix := ""
	lines := strings.Split(text, "\n")
	inMulti := ""
	for i, raw := range lines {
		line := raw
		if inMulti != "" {
			if strings.Contains(line, inMulti) {
				inMulti = ""
			}
			continue
		}
		trim := strings.TrimLeft(line, " \t")
		indent := len(line) - len(trim)
		if trim == "" || trim[0] == '#' {
			continue
		}
		if strings.HasPrefix(trim, "[[") {
			end := strings.Index(trim, "]]")
			if end < 0 {
				continue
			}
			name := normaliseKey(trim[2:end])
			arrays[name]++
			prefix = resolveTable(name, arrays, true)
			l.keys[prefix] = position{i + 1, indent + 1}
			continue
		}
		if trim[0] == '[' {
			end := strings.Index(trim, "]")
			if end < 0 {
				continue
			}
			name := normaliseKey(trim[1:end])
			prefix = resolveTable(name, arrays, false)
			l.keys[prefix] = position{i + 1, indent + 1}
			continue
		}
		eq := keyEnd(trim)
		if eq < 0 {
			continue
		}
		key := normaliseKey(trim[:eq])
		full := join(prefix, key)
		l.keys[full] = position{i + 1, indent + 1}
		rest := trim[eq+1:]
		valOff := indent + eq + 1 + (len(rest) - len(strings.TrimLeft(rest, " \t")))
		rest = strings.TrimLeft(rest, " \t")
		for _, q := range []string{`"""`, `'''`} {
			if strings.HasPrefix(rest, q) && !strings.Contains(rest[3:], q) {
				inMulti = q
			}
		}
		if strings.HasPrefix(rest, "{") {
			l.inline(full, rest, i+1, valOff+1)
		}
	}
	l.prefix = prefix
	return l
}

// inline records the keys of a one-line inline table.
func (l *locator) inline(prefix, s string, line, col int) {
	depth := 0
	start := 1
	for j := 0; j < len(s); j++ {
		switch s[j] {
		case '{', '[':
			depth++
		case '}', ']':
			depth--
		case '"':
			if k := strings.IndexByte(s[j+1:], '"'); k >= 0 {
				j += k + 1
			}
		}
		if (s[j] == ',' && depth == 1) || (depth == 0 && s[j] == '}') {
			part := s[start:j]
			trimmed := strings.TrimLeft(part, " \t")
			if eq := keyEnd(trimmed); eq >= 0 {
				off := start + len(part) - len(trimmed)
				l.keys[join(prefix, normaliseKey(trimmed[:eq]))] = position{line, col + off}
			}
			start = j + 1
			if depth == 0 {
				return
			}
		}
	}
}

// keyEnd returns the index of the '=' that ends a key, or -1.
func keyEnd(s string) int {
	inQuote := byte(0)
	for j := 0; j < len(s); j++ {
		c := s[j]
		switch {
		case inQuote != 0:
			if c == inQuote {
				inQuote = 0
			}
		case c == '"' || c == '\'':
			inQuote = c
		case c == '=':
			return j
		case c == '#' || c == '{' || c == '[':
			return -1
		}
	}
	return -1
}

func normaliseKey(k string) string {
	parts := strings.Split(k, ".")
	for i, p := range parts {
		p = strings.TrimSpace(p)
		p = strings.Trim(p, `"'`)
		parts[i] = p
	}
	return strings.Join(parts, ".")
}

// resolveTable turns a header name into an indexed path: "bellows" declared
// as an array table becomes "bellows[N]" (the latest element).
func resolveTable(name string, arrays map[string]int, isArray bool) string {
	parts := strings.Split(name, ".")
	out := ""
	plain := ""
	for i, p := range parts {
		plain = join(plain, p)
		out = join(out, p)
		if n, ok := arrays[plain]; ok && (i < len(parts)-1 || isArray) {
			out += "[" + strconv.Itoa(n) + "]"
		}
	}
	return out
}

func join(prefix, key string) string {
	if prefix == "" {
		return key
	}
	return prefix + "." + key
}

// find returns the position of a key path, falling back to its closest
// enclosing table.
func (l *locator) find(path string) position {
	if pos, ok := l.keys[path+"[1]"]; ok { // an array of tables: its first header
		if _, exact := l.keys[path]; !exact {
			return pos
		}
	}
	for p := path; p != ""; {
		if pos, ok := l.keys[p]; ok {
			return pos
		}
		i := strings.LastIndexAny(p, ".[")
		if i < 0 {
			break
		}
		p = p[:i]
	}
	return position{}
}
