package catalog

import (
	"fmt"
	"math"
	"testing"
)

// FuzzNormKey checks normKey's ASCII path against NormKey.
func FuzzNormKey(f *testing.F) {
	for _, s := range []string{"", "ab-12 34", "AB1234", " x_y\t", "Ünïcode – dash", "a\u00a0b", "GWTMV6-0", "\xff", "a\u0085b", "lower case"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if got, want := normKey(s), NormKey(s); got != want {
			t.Errorf("normKey(%q) = %q, NormKey %q", s, got, want)
		}
	})
}

// FuzzPartRow checks that partRowInto, which takes the numbers from the
// part's map, gives the row or the first error in dictionary order, as
// checking every field in that order does.
func FuzzPartRow(f *testing.F) {
	f.Add("diode", "schottky", "vrrm", 40.0, "ifav", 1.0, "package", "SMA")
	f.Add("mosfet", "n", "vds", 30.0, "vrrm", 40.0, "desc", "x")
	f.Add("fuse", "T", "in", math.NaN(), "bogus", 1.0, "fuse_std", "ul")
	f.Add("diode", "t", "vf", math.Inf(1), "rdson", 0.01, "lifecycle", "dead")
	f.Add("Fuse", "TT", "i2t", 0.5, "un_dc", 32.0, "rerate", "25:1")
	f.Fuzz(func(t *testing.T, kind, typ, n1 string, v1 float64, n2 string, v2 float64, text, tv string) {
		p := &Part{Kind: Kind(kind), Type: typ, Mfr: "Maker", MPN: "P-1", Num: map[string]float64{n1: v1, n2: v2}}
		setText(p, text, tv)
		who := func() string { return "Maker P-1" }
		got, err1 := partRowInto(p, nil, "MAKER", "P1")
		var want row
		var err2 error
		k, ok := canonEnum(&Fields[fieldIndex["kind"]], kind)
		if !ok {
			if err1 == nil {
				t.Fatalf("kind %q accepted", kind)
			}
			return
		}
		want, err2 = partRowOrdered(p, make(row, len(Fields)), Kind(k), who)
		if fmt.Sprint(err1) != fmt.Sprint(err2) {
			t.Fatalf("errors differ: %v / %v", err1, err2)
		}
		if err1 == nil && fmt.Sprint(got) != fmt.Sprint(want) {
			t.Fatalf("rows differ:\n%v\n%v", got, want)
		}
	})
}
