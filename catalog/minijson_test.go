package catalog

import (
	"encoding/json"
	"reflect"
	"testing"
	"unicode/utf8"
)

func TestParseJSON(t *testing.T) {
	cases := []struct {
		in   string
		want any
	}{
		{`[]`, []any{}},
		{`[null,1,-2.5e-3,"a\"b\u00e9",[1,"x"],true,false]`, []any{nil, 1.0, -0.0025, "a\"bé", []any{1.0, "x"}, true, false}},
		{` [ 0.30000000000000004 , 1.0e+20 ] `, []any{0.30000000000000004, 1e20}},
		{`"plain"`, "plain"},
	}
	for _, c := range cases {
		got, err := parseJSON(c.in)
		if err != nil || !reflect.DeepEqual(got, c.want) {
			t.Errorf("parseJSON(%s) = %#v, %v", c.in, got, err)
		}
	}
	for _, bad := range []string{``, `[`, `[1,]`, `[1 2]`, `"open`, `nul`, `[1]x`, `{}`, `-`, `[1e]`} {
		if v, err := parseJSON(bad); err == nil {
			t.Errorf("parseJSON(%q) = %#v, want an error", bad, v)
		}
	}
}

// FuzzParseJSON checks parseJSON against encoding/json on the JSON
// subset SQLite writes (arrays, strings, numbers, null, booleans): where
// encoding/json accepts an input of that subset, parseJSON gives the same
// value; it never panics.
func FuzzParseJSON(f *testing.F) {
	for _, s := range []string{`[]`, `[null,1,"a"]`, `[[1,"NW-7",null,0,"EUR","[[1,0.5]]",3]]`, `"x\\y"`, `[1.0e-300,-0]`, `[1,`, `"\ud800"`} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got, err := parseJSON(s)
		var want any
		// encoding/json replaces invalid UTF-8; parseJSON keeps the bytes
		// SQLite stored, which is what the import compares against
		if !utf8.ValidString(s) || json.Unmarshal([]byte(s), &want) != nil || hasObject(want) {
			return
		}
		if err != nil {
			t.Fatalf("parseJSON(%q): %v; encoding/json gives %#v", s, err, want)
		}
		if !reflect.DeepEqual(got, want) {
			t.Fatalf("parseJSON(%q) = %#v, encoding/json %#v", s, got, want)
		}
	})
}

func hasObject(v any) bool {
	switch x := v.(type) {
	case map[string]any:
		return true
	case []any:
		for _, e := range x {
			if hasObject(e) {
				return true
			}
		}
	}
	return false
}
