package synth

import (
	"bytes"
	"context"
	"math"
	"path/filepath"
	"testing"

	"partsieve/catalog"
	"partsieve/importers"
)

func TestDeterministic(t *testing.T) {
	for _, s := range Styles() {
		var a, b, c bytes.Buffer
		if err := WriteCSV(&a, New(7), s, 200); err != nil {
			t.Fatal(err)
		}
		if err := WriteCSV(&b, New(7), s, 200); err != nil {
			t.Fatal(err)
		}
		if err := WriteCSV(&c, New(8), s, 200); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("%s: same seed gave different bytes", s)
		}
		if bytes.Equal(a.Bytes(), c.Bytes()) {
			t.Errorf("%s: seeds 7 and 8 gave the same bytes", s)
		}
	}
	// Row i does not depend on how many rows are written.
	var short, long bytes.Buffer
	if err := WriteCSV(&short, New(7), Canonical, 10); err != nil {
		t.Fatal(err)
	}
	if err := WriteCSV(&long, New(7), Canonical, 20); err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(long.Bytes(), short.Bytes()) {
		t.Error("the first 10 rows change when 20 are written")
	}
}

func TestDistribution(t *testing.T) {
	g := New(1)
	kinds := map[catalog.Kind]int{}
	mfrs := map[string]bool{}
	sups := map[string]bool{}
	mpns := map[string]bool{}
	const n = 5000
	for i := 0; i < n; i++ {
		p := g.Part(i)
		kinds[p.Kind]++
		mfrs[p.Mfr] = true
		sups[p.Offers[0].Supplier] = true
		if mpns[p.MPN] {
			t.Fatalf("row %d: part number %s repeated", i, p.MPN)
		}
		mpns[p.MPN] = true
		if len(p.Offers[0].Breaks) == 0 {
			t.Fatalf("row %d: no price break", i)
		}
	}
	for _, k := range []catalog.Kind{catalog.Diode, catalog.MOSFET, catalog.Fuse} {
		if kinds[k] < n/20 {
			t.Errorf("kind %s: %d of %d rows", k, kinds[k], n)
		}
	}
	if len(mfrs) != len(makers) || len(sups) != len(suppliers) {
		t.Errorf("makers %d of %d, suppliers %d of %d", len(mfrs), len(makers), len(sups), len(suppliers))
	}
}

// TestImportRoundTrip imports a few hundred rows of each style, as CSV and
// as XLSX, and requires zero rejects and the generated values back within
// 1e-9 relative.
func TestImportRoundTrip(t *testing.T) {
	const n = 300
	ctx := context.Background()
	g := New(42)
	for _, s := range Styles() {
		for _, format := range []string{"csv", "xlsx"} {
			t.Run(s.String()+"/"+format, func(t *testing.T) {
				var buf bytes.Buffer
				var err error
				if format == "csv" {
					err = WriteCSV(&buf, g, s, n)
				} else {
					err = WriteXLSX(&buf, g, s, n)
				}
				if err != nil {
					t.Fatal(err)
				}
				st, err := catalog.Open(ctx, filepath.Join(t.TempDir(), "c.db"))
				if err != nil {
					t.Fatal(err)
				}
				defer st.Close()
				sum, err := importers.ImportData(ctx, st, "synth."+format, buf.Bytes(), importers.Options{})
				if err != nil {
					t.Fatal(err)
				}
				if sum.Read != n || sum.Added != n || sum.Rejected != 0 {
					for _, r := range sum.Rejects[:min(3, len(sum.Rejects))] {
						t.Logf("reject: %+v", r)
					}
					t.Fatalf("read %d added %d rejected %d, want %d/%d/0", sum.Read, sum.Added, sum.Rejected, n, n)
				}
				if len(sum.Unknown) != 0 {
					t.Errorf("unknown columns %v", sum.Unknown)
				}
				for _, i := range []int{0, 1, 17, 150, n - 1} {
					want := g.Part(i)
					got, err := st.ByMPN(ctx, want.MPN)
					if err != nil || len(got) != 1 {
						t.Fatalf("row %d %s: %d parts, %v", i, want.MPN, len(got), err)
					}
					comparePart(t, i, got[0], want)
				}
			})
		}
	}
}

func comparePart(t *testing.T, i int, got, want catalog.Part) {
	t.Helper()
	if got.Kind != want.Kind || got.Type != want.Type || got.Mfr != want.Mfr || got.Package != want.Package || got.Lifecycle != want.Lifecycle {
		t.Errorf("row %d: got %s/%s/%s/%s/%s, want %s/%s/%s/%s/%s", i,
			got.Kind, got.Type, got.Mfr, got.Package, got.Lifecycle,
			want.Kind, want.Type, want.Mfr, want.Package, want.Lifecycle)
	}
	for k, w := range want.Num {
		g, ok := got.Num[k]
		if !ok || math.Abs(g-w) > 1e-9*math.Abs(w) {
			t.Errorf("row %d %s: %s = %v (present %v), want %v", i, want.MPN, k, g, ok, w)
		}
	}
	if len(got.Offers) != 1 {
		t.Fatalf("row %d: %d offers", i, len(got.Offers))
	}
	go_, wo := got.Offers[0], want.Offers[0]
	if go_.Supplier != wo.Supplier || go_.SKU != wo.SKU || go_.Currency != wo.Currency || len(go_.Breaks) != len(wo.Breaks) {
		t.Fatalf("row %d: offer %+v, want %+v", i, go_, wo)
	}
	for j := range wo.Breaks {
		if go_.Breaks[j].Qty != wo.Breaks[j].Qty || math.Abs(go_.Breaks[j].Price-wo.Breaks[j].Price) > 1e-9 {
			t.Errorf("row %d: break %d = %+v, want %+v", i, j, go_.Breaks[j], wo.Breaks[j])
		}
	}
}

// TestPhysicallyConsistent checks relations every row must keep: a
// rectifier's surge current above its average current, V_F at its test
// current positive and below V_RRM, a Zener's V_Z within its tolerance band,
// a fuse's clearing I²t (when given) at or above its melting I²t.
func TestPhysicallyConsistent(t *testing.T) {
	g := New(3)
	for i := 0; i < 3000; i++ {
		p := g.Part(i)
		n := p.Num
		if v, ok := n["ifsm"]; ok {
			if a, ok := n["ifav"]; ok && v <= a {
				t.Errorf("%s: I_FSM %v ≤ I_F(AV) %v", p.MPN, v, a)
			}
		}
		if vf, ok := n["vf"]; ok {
			if vr, ok := n["vrrm"]; ok && (vf <= 0 || vf >= vr) {
				t.Errorf("%s: V_F %v outside (0, V_RRM %v)", p.MPN, vf, vr)
			}
		}
		if it, ok := n["i2t_clear"]; ok && it < n["i2t"] {
			t.Errorf("%s: clearing I²t %v below melting %v", p.MPN, it, n["i2t"])
		}
		if rd, ok := n["rdson"]; ok {
			if rd2, ok := n["rdson2"]; ok && n["rdson2_vgs"] < n["rdson_vgs"] && rd2 < rd {
				t.Errorf("%s: R_DS(on) at lower gate drive %v below %v", p.MPN, rd2, rd)
			}
		}
		for k, v := range n {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Errorf("%s: %s = %v", p.MPN, k, v)
			}
		}
	}
}
