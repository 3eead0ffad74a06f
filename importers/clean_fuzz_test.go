package importers

import (
	"strings"
	"testing"
)

// cleanSpacesSlow is cleanSpaces without its fast path.
func cleanSpacesSlow(s string) string {
	return strings.Join(strings.FieldsFunc(s, isCleanedSpace), " ")
}

var cleanSeeds = []string{
	"", " ", "a", "a b", "a  b", " a", "a ", "a\tb", "a\nb", "a\u00a0b", "a\u202fb", "a\u2003b", "a\u0085b",
	"Schottky rectifier 40 V, 1 A", "µs", "5 × 20 mm", "\xff\xfe", "a \xff b", "N/A", " n/a ", "—", "NONE", "-",
	"tbd.", "#N/A", "0", "nul", "n.v.",
}

// FuzzCleanSpaces checks the fast paths of cleanSpaces and isAbsent
// against their plain definitions.
func FuzzCleanSpaces(f *testing.F) {
	for _, s := range cleanSeeds {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if got, want := cleanSpaces(s), cleanSpacesSlow(s); got != want {
			t.Errorf("cleanSpaces(%q) = %q, want %q", s, got, want)
		}
		if got, want := isAbsent(s), absentWords[strings.ToLower(strings.TrimSpace(s))]; got != want {
			t.Errorf("isAbsent(%q) = %v, want %v", s, got, want)
		}
	})
}

func TestCleanSpaces(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"a  b", "a b"}, {" a\tb\n", "a b"}, {"a\u00a0b", "a b"}, {"plain text", "plain text"}, {"", ""},
		{"µs pulse", "µs pulse"}, {"x\u202f y", "x y"},
	} {
		if got := cleanSpaces(c.in); got != c.want {
			t.Errorf("cleanSpaces(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	for _, c := range []struct {
		in   string
		want bool
	}{{"N/A", true}, {" -- ", true}, {"n.v.", true}, {"None", true}, {"0", false}, {"none yet", false}, {"40 V", false}} {
		if got := isAbsent(c.in); got != c.want {
			t.Errorf("isAbsent(%q) = %v, want %v", c.in, got, c.want)
		}
	}
}
