package spec

import (
	"strconv"
	"strings"
)

// keyLines returns the 1-based line of every key and table header of a
// TOML document, by dotted path as toml.Key.String writes it. The TOML
// library reports positions only in its own errors, so the document is
// scanned here once: table headers, key/value lines and dotted keys;
// multi-line strings and arrays are skipped. Keys defined inside inline
// tables are not listed (callers fall back to the enclosing key's line).
// Anything the scanner does not understand is skipped: it never fails.
func keyLines(src string) map[string]int {
	out := map[string]int{}
	var table []string
	inML := "" // closing delimiter of an open multi-line string
	depth := 0 // open brackets/braces of a multi-line value
	for n, line := range strings.Split(src, "\n") {
		ln := n + 1
		if inML != "" {
			if strings.Contains(line, inML) {
				inML = ""
			}
			continue
		}
		s := strings.TrimSpace(line)
		if depth > 0 {
			depth += bracketDelta(s)
			if depth < 0 {
				depth = 0
			}
			continue
		}
		if s == "" || s[0] == '#' {
			continue
		}
		if strings.HasPrefix(s, "[") {
			inner := strings.TrimPrefix(s, "[")
			inner = strings.TrimPrefix(inner, "[")
			parts, rest, ok := parseKey(inner)
			if !ok || !strings.HasPrefix(strings.TrimSpace(rest), "]") {
				continue
			}
			table = parts
			record(out, parts, ln)
			continue
		}
		parts, rest, ok := parseKey(s)
		if !ok {
			continue
		}
		rest = strings.TrimSpace(rest)
		if !strings.HasPrefix(rest, "=") {
			continue
		}
		full := append(append([]string{}, table...), parts...)
		record(out, full, ln)
		val := strings.TrimSpace(rest[1:])
		for _, d := range []string{`"""`, `'''`} {
			if strings.HasPrefix(val, d) && !strings.Contains(val[3:], d) {
				inML = d
			}
		}
		if inML == "" {
			depth = bracketDelta(val)
			if depth < 0 {
				depth = 0
			}
		}
	}
	return out
}

// record stores the line of a key, and of each parent not seen yet (the
// implicit tables of a dotted key).
func record(m map[string]int, parts []string, ln int) {
	for i := 1; i < len(parts); i++ {
		if k := joinKey(parts[:i]); m[k] == 0 {
			m[k] = ln
		}
	}
	m[joinKey(parts)] = ln
}

// joinKey writes a key path: bare parts as they are, others quoted.
func joinKey(parts []string) string {
	var b strings.Builder
	for i, p := range parts {
		if i > 0 {
			b.WriteByte('.')
		}
		if p != "" && isBare(p) {
			b.WriteString(p)
		} else {
			b.WriteString(strconv.Quote(p))
		}
	}
	return b.String()
}

func isBare(s string) bool {
	for _, r := range s {
		if !(r >= 'A' && r <= 'Z' || r >= 'a' && r <= 'z' || r >= '0' && r <= '9' || r == '_' || r == '-') {
			return false
		}
	}
	return true
}

// parseKey reads a dotted key (bare, "basic" or 'literal' parts) from the
// start of s and returns the parts and the text after it.
func parseKey(s string) (parts []string, rest string, ok bool) {
	for {
		s = strings.TrimLeft(s, " \t")
		if s == "" {
			return nil, "", false
		}
		switch s[0] {
		case '"':
			end := -1
			for i := 1; i < len(s); i++ {
				if s[i] == '\\' {
					i++
					continue
				}
				if s[i] == '"' {
					end = i
					break
				}
			}
			if end < 0 {
				return nil, "", false
			}
			p, err := strconv.Unquote(s[:end+1])
			if err != nil {
				p = s[1:end]
			}
			parts = append(parts, p)
			s = s[end+1:]
		case '\'':
			end := strings.IndexByte(s[1:], '\'')
			if end < 0 {
				return nil, "", false
			}
			parts = append(parts, s[1:end+1])
			s = s[end+2:]
		default:
			i := 0
			for i < len(s) && isBareByte(s[i]) {
				i++
			}
			if i == 0 {
				return nil, "", false
			}
			parts = append(parts, s[:i])
			s = s[i:]
		}
		t := strings.TrimLeft(s, " \t")
		if strings.HasPrefix(t, ".") {
			s = t[1:]
			continue
		}
		return parts, t, true
	}
}

func isBareByte(c byte) bool {
	return c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '_' || c == '-'
}

// bracketDelta counts opening minus closing brackets and braces of s
// outside strings and comments.
func bracketDelta(s string) int {
	d := 0
	var q byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case q != 0:
			if c == '\\' && q == '"' {
				i++
			} else if c == q {
				q = 0
			}
		case c == '"' || c == '\'':
			q = c
		case c == '#':
			return d
		case c == '[' || c == '{':
			d++
		case c == ']' || c == '}':
			d--
		}
	}
	return d
}
