// Package where parses the parametric conditions of `partsieve find
// --where`: a canonical field name, an operator and a value, such as
// "vds>=40V", "rdson<=20m", "type=schottky", "package~SOD" or
// "lifecycle!=obsolete". Several conditions may be joined with "and" (or
// "&&"); all must hold.
//
// Values of numeric fields are read with the field's dimension, so a unit
// of the wrong kind is refused ("vds>=3A": vds is a voltage). A value with
// only an SI prefix takes the field's unit: "rdson<=20m" means 20 mΩ.
package where

import (
	"errors"
	"fmt"
	"partsieve/internal/suggest"
	"sort"
	"strings"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// operators, longest first so that ">=" wins over ">".
var operators = []string{">=", "<=", "!=", "==", "=~", "~", ">", "<", "="}

// Error explains why a condition was refused.
type Error struct {
	Expr   string
	Reason string
}

func (e *Error) Error() string { return fmt.Sprintf("--where %q: %s", e.Expr, e.Reason) }

// Parse reads one --where expression, which may join several conditions
// with "and" or "&&".
func Parse(expr string) ([]catalog.Cond, error) {
	parts := splitAnd(expr)
	var out []catalog.Cond
	for _, p := range parts {
		c, err := parseOne(p)
		if err != nil {
			var we *Error
			if errors.As(err, &we) {
				we.Expr = expr
				return nil, we
			}
			return nil, &Error{Expr: expr, Reason: err.Error()}
		}
		out = append(out, c)
	}
	return out, nil
}

// ParseAll reads every --where flag value.
func ParseAll(exprs []string) ([]catalog.Cond, error) {
	var out []catalog.Cond
	for _, e := range exprs {
		cs, err := Parse(e)
		if err != nil {
			return nil, err
		}
		out = append(out, cs...)
	}
	return out, nil
}

func splitAnd(expr string) []string {
	var out []string
	rest := expr
	if t := strings.TrimSpace(rest); len(t) >= 4 && strings.EqualFold(t[len(t)-4:], " and") {
		rest = t[:len(t)-4] + " and "
	}
	for {
		// ASCII-only lowering keeps byte offsets: strings.ToLower changes
		// the length of invalid UTF-8 and of some letters (İ), and the
		// offsets found in lower cut rest.
		lower := asciiLower(rest)
		i, n := -1, 0
		if j := strings.Index(lower, " and "); j >= 0 {
			i, n = j, 5
		}
		if j := strings.Index(lower, "&&"); j >= 0 && (i < 0 || j < i) {
			i, n = j, 2
		}
		if i < 0 {
			out = append(out, rest)
			return out
		}
		out = append(out, rest[:i])
		rest = rest[i+n:]
	}
}

// asciiLower lowers A-Z only, so that the result has the byte offsets of s.
func asciiLower(s string) string {
	b := []byte(s)
	for i, c := range b {
		if 'A' <= c && c <= 'Z' {
			b[i] = c + 'a' - 'A'
		}
	}
	return string(b)
}

func parseOne(s string) (catalog.Cond, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return catalog.Cond{}, &Error{Reason: "empty condition; write FIELD OP VALUE, e.g. vds>=40V"}
	}
	pos, op := -1, ""
	for i := 0; i < len(s) && pos < 0; i++ {
		for _, o := range operators {
			if strings.HasPrefix(s[i:], o) {
				pos, op = i, o
				break
			}
		}
	}
	if pos < 0 {
		return catalog.Cond{}, &Error{Reason: "no operator; use one of = != < <= > >= ~ (e.g. vds>=40V, package~SOD)"}
	}
	name := strings.ToLower(strings.TrimSpace(s[:pos]))
	val := strings.TrimSpace(s[pos+len(op):])
	switch op {
	case "==":
		op = "="
	case "=~":
		op = "~"
	}
	if name == "" {
		return catalog.Cond{}, &Error{Reason: "missing field name before " + op}
	}
	f, ok := catalog.FieldByName(name)
	if !ok {
		return catalog.Cond{}, &Error{Reason: "unknown field " + quote(name) + didYouMean(name)}
	}
	if val == "" {
		return catalog.Cond{}, &Error{Reason: "missing value after " + quote(name+op)}
	}
	c := catalog.Cond{Field: f.Name, Op: op}
	switch f.Type {
	case catalog.Number:
		if op == "~" {
			return c, &Error{Reason: f.Name + " is a number; ~ works on text fields (mfr, mpn, desc, package)"}
		}
		v, err := parseNumber(val, f)
		if err != nil {
			return c, &Error{Reason: err.Error()}
		}
		c.Num = v
	case catalog.Bool:
		if op != "=" && op != "!=" {
			return c, &Error{Reason: f.Name + " is yes/no; use = or !="}
		}
		b, ok := parseBool(val)
		if !ok {
			return c, &Error{Reason: fmt.Sprintf("%s is yes/no, got %q", f.Name, val)}
		}
		c.Text = val
		if b {
			c.Num = 1
		}
	case catalog.Enum:
		if op != "=" && op != "!=" {
			return c, &Error{Reason: f.Name + " is one of " + strings.Join(f.Enum, ", ") + "; use = or !="}
		}
		w, ok := matchEnum(f, val)
		if !ok {
			return c, &Error{Reason: fmt.Sprintf("%s must be one of %s, got %q", f.Name, strings.Join(f.Enum, ", "), val)}
		}
		c.Text = w
	case catalog.Text:
		if op != "=" && op != "!=" && op != "~" {
			return c, &Error{Reason: f.Name + " is text; use =, != or ~ (contains)"}
		}
		c.Text = val
	}
	return c, nil
}

// parseNumber reads v with the field's dimension. A bare SI prefix
// ("20m", "4.7k") takes the field's unit (units.Parse does that).
func parseNumber(v string, f catalog.Field) (float64, error) {
	x, err := units.Parse(v, f.Dim, units.Signed)
	if errors.Is(err, units.ErrEmpty) {
		return 0, fmt.Errorf("%s needs a number", f.Name)
	}
	if err != nil {
		return 0, fmt.Errorf("%s is a %s in %s: %v", f.Name, f.Dim, f.Dim.Symbol(), err)
	}
	return x, nil
}

func parseBool(s string) (bool, bool) {
	switch strings.ToLower(s) {
	case "yes", "y", "true", "1", "on":
		return true, true
	case "no", "n", "false", "0", "off":
		return false, true
	}
	return false, false
}

func matchEnum(f catalog.Field, v string) (string, bool) {
	for _, e := range f.Enum {
		if strings.EqualFold(e, v) {
			return e, true
		}
	}
	// common synonyms for the type field
	if f.Name == "type" {
		switch strings.ToLower(v) {
		case "pmos", "p-channel", "pch", "p-ch":
			return "p", true
		case "nmos", "n-channel", "nch", "n-ch":
			return "n", true
		}
	}
	return "", false
}

func quote(s string) string { return fmt.Sprintf("%q", s) }

// didYouMean names the closest canonical fields by edit distance.
func didYouMean(name string) string {
	type cand struct {
		n string
		d int
	}
	var cs []cand
	for _, f := range catalog.Fields {
		d := suggest.Distance(name, f.Name)
		if d <= 2 || strings.HasPrefix(f.Name, name) {
			cs = append(cs, cand{f.Name, d})
		}
	}
	if len(cs) == 0 {
		return "; `partsieve fields` lists the field names"
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].d < cs[j].d || cs[i].d == cs[j].d && cs[i].n < cs[j].n })
	if len(cs) > 3 {
		cs = cs[:3]
	}
	names := make([]string, len(cs))
	for i, c := range cs {
		names[i] = c.n
	}
	return "; did you mean " + strings.Join(names, " or ") + "?"
}
