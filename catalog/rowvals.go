package catalog

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"partsieve/catalog/units"
)

// A row is the value of every field of a part, in dictionary order: nil
// (absent), float64 (Number), string (Text, Enum) or int64 0/1 (Bool).
type row []any

func setText(p *Part, name, v string) {
	switch name {
	case "kind":
		p.Kind = Kind(v)
	case "type":
		p.Type = v
	case "mfr":
		p.Mfr = v
	case "mpn":
		p.MPN = v
	case "desc":
		p.Desc = v
	case "package":
		p.Package = v
	case "datasheet":
		p.Datasheet = v
	case "lifecycle":
		p.Lifecycle = v
	case "fuse_std":
		p.FuseStd = v
	case "rerate":
		p.Rerate = v
	}
}

func boolOf(p *Part, name string) *bool {
	switch name {
	case "rohs":
		return p.RoHS
	case "aecq":
		return p.AECQ
	}
	return nil
}

func setBool(p *Part, name string, v *bool) {
	switch name {
	case "rohs":
		p.RoHS = v
	case "aecq":
		p.AECQ = v
	}
}

// hasAccessor reports whether a non-Number field has a Part struct field;
// the tests check it for the whole dictionary.
func hasAccessor(name string) bool {
	switch name {
	case "kind", "type", "mfr", "mpn", "desc", "package", "datasheet", "lifecycle", "fuse_std", "rerate", "rohs", "aecq":
		return true
	}
	return false
}

// canonEnum returns the dictionary spelling of an Enum value, matched case
// insensitively.
func canonEnum(f *Field, v string) (string, bool) {
	for _, e := range f.Enum {
		if strings.EqualFold(e, v) {
			return e, true
		}
	}
	return "", false
}

// partRowInto validates p and returns its row. Text is trimmed; Enum values
// take their dictionary spelling; the type must belong to the kind; Number
// fields must exist, be finite and apply to the kind. mk and pk are
// NormKey of p.Mfr and p.MPN.
// It writes into r when r has room (the import reuses one row).
//
// The numbers are taken from p.Num directly (a part fills a few of the
// dictionary's many Number fields); when one of them is wrong, the fields
// are checked again in dictionary order, so that the error reported is
// always the first one in that order.
func partRowInto(p *Part, r row, mk, pk string) (row, error) {
	who := func() string { return strings.TrimSpace(p.Mfr) + " " + strings.TrimSpace(p.MPN) }
	if mk == "" {
		return nil, fmt.Errorf("part %q: manufacturer is empty", strings.TrimSpace(p.MPN))
	}
	if pk == "" {
		return nil, fmt.Errorf("part of %q: part number is empty", strings.TrimSpace(p.Mfr))
	}
	kindF := &Fields[fieldIndex["kind"]]
	k, ok := canonEnum(kindF, strings.TrimSpace(string(p.Kind)))
	if !ok {
		return nil, fmt.Errorf("part %s: kind %q is not one of %s", who(), p.Kind, strings.Join(kindF.Enum, ", "))
	}
	kind := Kind(k)
	if cap(r) < len(Fields) {
		r = make(row, len(Fields))
	}
	r = r[:len(Fields)]
	clear(r)
	for name, v := range p.Num {
		i, ok := fieldIndex[name]
		if !ok || Fields[i].Type != Number || math.IsNaN(v) || math.IsInf(v, 0) || !Fields[i].AppliesTo(kind) {
			clear(r)
			return partRowOrdered(p, r, kind, who)
		}
		r[i] = v
	}
	for _, i := range nonNumberFields {
		v, err := fieldValue(p, &Fields[i], kind, who)
		if err != nil {
			return nil, err
		}
		r[i] = v
	}
	return r, checkType(r, kind, who)
}

// nonNumberFields are the indexes of the dictionary's Text, Enum and Bool
// fields.
var nonNumberFields = func() []int {
	var out []int
	for i, f := range Fields {
		if f.Type != Number {
			out = append(out, i)
		}
	}
	return out
}()

// partRowOrdered is partRowInto checking every field in dictionary order.
func partRowOrdered(p *Part, r row, kind Kind, who func() string) (row, error) {
	for i := range Fields {
		v, err := fieldValue(p, &Fields[i], kind, who)
		if err != nil {
			return nil, err
		}
		r[i] = v
	}
	if err := checkType(r, kind, who); err != nil {
		return nil, err
	}
	if n := numCount(r); n != len(p.Num) {
		bad, found := "", false // the first in name order, whatever the map's order
		for name := range p.Num {
			if i, ok := fieldIndex[name]; (!ok || Fields[i].Type != Number) && (!found || name < bad) {
				bad, found = name, true
			}
		}
		if found {
			return nil, fmt.Errorf("part %s: %q is not a numeric field", who(), bad)
		}
	}
	return r, nil
}

// fieldValue is the row value of field f of p (nil when absent), checked.
func fieldValue(p *Part, f *Field, kind Kind, who func() string) (any, error) {
	switch f.Type {
	case Number:
		v, ok := p.Num[f.Name]
		if !ok {
			return nil, nil
		}
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("part %s: %s is not a finite number", who(), f.Name)
		}
		if !f.AppliesTo(kind) {
			return nil, fmt.Errorf("part %s: field %s does not apply to a %s", who(), f.Name, kind)
		}
		return v, nil
	case Bool:
		if b := boolOf(p, f.Name); b != nil {
			return b2i(*b), nil
		}
	case Text, Enum:
		v := strings.TrimSpace(p.TextField(f.Name))
		if v == "" {
			return nil, nil
		}
		if f.Type == Enum {
			c, ok := canonEnum(f, v)
			if !ok {
				return nil, fmt.Errorf("part %s: %s %q is not one of %s", who(), f.Name, v, strings.Join(f.Enum, ", "))
			}
			v = c
		}
		if !f.AppliesTo(kind) {
			return nil, fmt.Errorf("part %s: field %s does not apply to a %s", who(), f.Name, kind)
		}
		return v, nil
	}
	return nil, nil
}

// checkType checks that the type in r belongs to kind.
func checkType(r row, kind Kind, who func() string) error {
	if t, ok := r[fieldIndex["type"]].(string); ok {
		if _, ok := canonEnum(&Field{Enum: Types[kind]}, t); !ok {
			return fmt.Errorf("part %s: type %q is not a %s type (one of %s)", who(), t, kind, strings.Join(Types[kind], ", "))
		}
	}
	return nil
}

// normKey is NormKey, without its rune-by-rune work for the usual ASCII
// text: ASCII white space, '-' and '_' dropped, letters upper-cased.
func normKey(s string) string {
	change := false
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= utf8.RuneSelf:
			return NormKey(s)
		case c == ' ' || c == '-' || c == '_' || c >= '\t' && c <= '\r' || c >= 'a' && c <= 'z':
			change = true
		}
	}
	if !change {
		return s
	}
	b := make([]byte, 0, len(s))
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c == ' ' || c == '-' || c == '_' || c >= '\t' && c <= '\r':
		case c >= 'a' && c <= 'z':
			b = append(b, c-'a'+'A')
		default:
			b = append(b, c)
		}
	}
	return string(b)
}

// numCount counts the Number values of r.
func numCount(r row) int {
	n := 0
	for _, v := range r {
		if _, ok := v.(float64); ok {
			n++
		}
	}
	return n
}

func b2i(b bool) int64 {
	if b {
		return 1
	}
	return 0
}

// toPart fills a Part from a row (offers not included).
func toPart(r row) Part {
	var p Part
	for i := range Fields {
		f := &Fields[i]
		switch v := r[i].(type) {
		case float64:
			p.Set(f.Name, v)
		case string:
			setText(&p, f.Name, v)
		case int64:
			b := v != 0
			setBool(&p, f.Name, &b)
		}
	}
	return p
}

// jsonRow reads a row written by SQLite's json_array over fieldColumns.
func jsonRow(js string) (row, error) {
	v, err := parseJSON(js)
	if err != nil {
		return nil, err
	}
	vals, ok := v.([]any)
	if !ok {
		return nil, errors.New("row is not a JSON array")
	}
	if len(vals) != len(Fields) {
		return nil, fmt.Errorf("row has %d values for %d fields", len(vals), len(Fields))
	}
	r := make(row, len(Fields))
	for i, v := range vals {
		switch x := v.(type) {
		case float64:
			switch Fields[i].Type {
			case Bool:
				r[i] = int64(x)
			case Number:
				r[i] = x
			default:
				r[i] = strconv.FormatFloat(x, 'g', -1, 64)
			}
		case string:
			if x == "" {
				continue
			}
			if Fields[i].Type == Number {
				f, err := strconv.ParseFloat(x, 64)
				if err != nil {
					return nil, fmt.Errorf("field %s holds %q", Fields[i].Name, x)
				}
				r[i] = f
				continue
			}
			r[i] = x
		}
	}
	return r, nil
}

// fieldColumns is the comma-separated list of the parts field columns in
// dictionary order, qualified by the table.
var fieldColumns = fieldColumnList()

func fieldColumnList() string {
	var b strings.Builder
	for i, f := range Fields {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(qcol(f.Name))
	}
	return b.String()
}

// partJSON is the SELECT expression of all field columns as one JSON
// array (see jsonRow): database/sql's per-column cost dominates a row of
// many columns, and SQLite writes REALs in JSON with enough digits to read
// back the same float64.
func partJSON() string { return "json_array(" + fieldColumns + ")" }

// sameValue compares two row values; numbers are equal within a relative
// 1e-9 (parse noise such as 45e-3 vs 0.045).
func sameValue(a, b any) bool {
	switch x := a.(type) {
	case nil:
		return b == nil
	case float64:
		y, ok := b.(float64)
		return ok && closeEnough(x, y)
	}
	return a == b
}

const relTol = 1e-9

func closeEnough(x, y float64) bool {
	if x == y {
		return true
	}
	return math.Abs(x-y) <= relTol*math.Max(math.Abs(x), math.Abs(y))
}

// formatValue is the display text of a row value of f ("" when absent).
func formatValue(f *Field, v any) string {
	switch x := v.(type) {
	case nil:
		return ""
	case float64:
		if s := units.Format(x, f.Dim); s != "" {
			return s
		}
		if f.Dim == units.Fraction {
			return strconv.FormatFloat(x*100, 'g', 6, 64) + " %"
		}
		s := strconv.FormatFloat(x, 'g', -1, 64)
		if sym := f.Dim.Symbol(); sym != "" {
			s += " " + sym
		}
		return s
	case int64:
		if x != 0 {
			return "yes"
		}
		return "no"
	case string:
		return x
	}
	return fmt.Sprint(v)
}
