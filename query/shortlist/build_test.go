package shortlist

import (
	"context"
	"errors"
	"math"
	"os"
	"partsieve/internal/seedstore"
	"strings"
	"testing"

	"partsieve/catalog"
	"partsieve/query/spec"
	"partsieve/query/topology"
	"partsieve/seeddata"
)

var (
	seed seedstore.Shared
)

func TestMain(m *testing.M) {
	code := m.Run()
	seed.Close()
	os.Exit(code)
}

// seedCatalog returns a store holding the seed catalog, imported once per
// test binary through the real importer.
func seedCatalog(t testing.TB) *catalog.Store { return seed.Get(t) }

func exampleSpec(t testing.TB, name string) (*spec.Spec, string) {
	t.Helper()
	data, path, ok := seeddata.Spec(name)
	if !ok {
		t.Fatalf("no example spec %q", name)
	}
	s, err := spec.Parse(path, data)
	if err != nil {
		t.Fatal(err)
	}
	return s, string(data)
}

var examples = []string{"vehicle-12v-accessory", "sensor-24v-industrial", "handheld-2s-liion"}

func near(a, b float64) bool {
	return math.Abs(a-b) <= 1e-9*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// The shortlist of each example spec: the designs of the pick, one line
// per role, quantities with spares and minimums, costs that add up, and
// alternates that are other parts and not in the sums.
func TestBuildExamples(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	for _, name := range examples {
		t.Run(name, func(t *testing.T) {
			s, text := exampleSpec(t, name)
			opt := Options{Top: 2, Alternates: 2, SparesPct: 5, SpecText: text}
			sl, err := Build(ctx, st, s, opt)
			if err != nil {
				t.Fatal(err)
			}
			pick, err := topology.Pick(ctx, st, s, topology.Options{Top: 2})
			if err != nil {
				t.Fatal(err)
			}
			var want []string
			for _, tr := range pick.Topologies {
				for _, c := range tr.Candidates {
					var mpns []string
					for _, p := range c.Parts {
						mpns = append(mpns, p.MPN)
					}
					want = append(want, string(tr.Topology)+": "+strings.Join(mpns, " + "))
				}
			}
			var got []string
			total := 0.0
			for _, d := range sl.Designs {
				var mpns []string
				ext, uncosted := 0.0, 0
				roles := map[string]string{}
				for _, l := range d.Lines {
					if l.Kind == KindPart {
						mpns = append(mpns, l.MPN)
						roles[l.Role] = l.MPN
						if l.Order.Costed {
							ext += l.Order.Extended
						} else {
							uncosted++
						}
					}
					checkLine(t, s, &l, opt.SparesPct)
				}
				for _, l := range d.Lines {
					if l.Kind == KindAlternate && roles[l.Role] == l.MPN {
						t.Errorf("%s: alternate %s is the design's own %s", d.Label, l.MPN, l.Role)
					}
				}
				got = append(got, string(d.Topology)+": "+strings.Join(mpns, " + "))
				if !near(d.Cost.Extended, ext) || d.Cost.Uncosted != uncosted || !near(d.Cost.PerBoard, ext/float64(s.Build.Quantity)) {
					t.Errorf("%s: cost %+v, lines sum to %g with %d uncosted", d.Label, d.Cost, ext, uncosted)
				}
				total += d.Cost.Extended
				fet := d.Topology == topology.PFETHigh || d.Topology == topology.NFETLow
				generic := 0
				for _, l := range d.Lines {
					if l.Kind == KindGeneric {
						generic++
						if l.Role != "gate-resistor" || !strings.Contains(l.Ratings, "kΩ ±1 %, 0.125 W, 0805 or larger") || l.Order.Costed {
							t.Errorf("%s: generic line %+v", d.Label, l)
						}
					}
				}
				if fet && generic != 1 || !fet && generic != 0 {
					t.Errorf("%s: %d generic lines", d.Label, generic)
				}
				if len(d.Checks) == 0 {
					t.Errorf("%s: no checks", d.Label)
				}
				for _, c := range d.Checks {
					if !c.Check.Pass {
						t.Errorf("%s: check %s/%s of %s fails in the shortlist", d.Label, c.Check.Role, c.Check.Name, c.Part)
					}
				}
			}
			if strings.Join(got, "\n") != strings.Join(want, "\n") {
				t.Errorf("designs:\n%s\nwant the pick's:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
			}
			if !near(sl.Total.Extended, total) || !near(sl.Total.PerBoard, total/float64(s.Build.Quantity)) {
				t.Errorf("total %+v, designs sum to %g", sl.Total, total)
			}
			rows := sl.Lines()
			n := 0
			for _, d := range sl.Designs {
				n += len(d.Lines) + 1
			}
			if len(rows) != n+1 || rows[len(rows)-1].Kind != KindTotal {
				t.Errorf("%d rows, want %d lines and design totals plus the total", len(rows), n+1)
			}
			if len(sl.Cautions) == 0 || !strings.Contains(strings.Join(sl.Cautions, " "), "hundreds of amps") {
				t.Errorf("cautions %v", sl.Cautions)
			}
		})
	}
}

// checkLine verifies one line's arithmetic against the rules.
func checkLine(t *testing.T, s *spec.Spec, l *Line, spares float64) {
	t.Helper()
	o := &l.Order
	if l.Kind == KindSubtotal || l.Kind == KindTotal {
		return
	}
	if o.Needed != s.Build.Quantity*l.PerBoard {
		t.Errorf("%s %s: needed %d, want %d", l.Design, l.MPN, o.Needed, s.Build.Quantity)
	}
	want := int64(math.Ceil(float64(o.Needed)*(1+spares/100) - 1e-9))
	if o.WithSpares != want {
		t.Errorf("%s %s: with spares %d, want %d", l.Design, l.MPN, o.WithSpares, want)
	}
	if o.Qty < o.WithSpares || o.Qty < o.MOQ {
		t.Errorf("%s %s: order %d below %d or MOQ %d", l.Design, l.MPN, o.Qty, o.WithSpares, o.MOQ)
	}
	if l.Kind == KindGeneric {
		return
	}
	if o.Costed {
		if !near(o.Extended, float64(o.Qty)*o.Unit) || !near(o.Unit, o.OfferPrice*o.Rate) || !near(l.PerBoardCost, o.Extended/float64(s.Build.Quantity)) {
			t.Errorf("%s %s: order %+v", l.Design, l.MPN, o)
		}
	}
	switch {
	case o.Stock == nil && o.StockStatus != StockUnknown,
		o.Stock != nil && *o.Stock >= o.Qty && o.StockStatus != StockOK,
		o.Stock != nil && *o.Stock < o.Qty && o.StockStatus != StockShort:
		t.Errorf("%s %s: stock status %q for stock %v and order %d", l.Design, l.MPN, o.StockStatus, o.Stock, o.Qty)
	}
	if math.IsNaN(l.Margin) || l.Margin < 0 || l.MarginCheck == "" {
		t.Errorf("%s %s: margin %g %q", l.Design, l.MPN, l.Margin, l.MarginCheck)
	}
}

// With no spares and no supplier minimum above the build, a line's unit
// price is the pick's (topology.UnitPrice).
func TestUnitPriceAgreesWithThePick(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s, _ := exampleSpec(t, "sensor-24v-industrial")
	cat, err := topology.LoadCatalog(ctx, st, s, topology.Options{})
	if err != nil {
		t.Fatal(err)
	}
	sl, err := FromCatalog(s, cat, Options{Top: 3, Alternates: 3})
	if err != nil {
		t.Fatal(err)
	}
	compared := 0
	for _, d := range sl.Designs {
		for _, l := range d.Lines {
			if l.Kind != KindPart && l.Kind != KindAlternate || l.Order.Qty != l.Order.WithSpares || !l.Order.Costed {
				continue
			}
			p := cat.Part(l.Mfr, l.MPN)
			u, _, _, ok := topology.UnitPrice(p, s.Build.Quantity, s.Build.Currency, s.Build.Rates)
			if !ok || !near(u, l.Order.Unit) {
				t.Errorf("%s %s: unit %g, pick says %g", d.Label, l.MPN, l.Order.Unit, u)
			}
			compared++
		}
	}
	if compared < 10 {
		t.Errorf("only %d lines compared", compared)
	}
}

func TestBuildParts(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s, _ := exampleSpec(t, "sensor-24v-industrial")
	sl, err := Build(ctx, st, s, Options{Parts: []string{"QPS30-40C", " lkz13j s2 ", "TMV4-5U", "qps30 40c", ""}, SparesPct: 10})
	if err != nil {
		t.Fatal(err)
	}
	if len(sl.Designs) != 1 || sl.Designs[0].Label != "parts list" {
		t.Fatalf("designs %+v", sl.Designs)
	}
	d := sl.Designs[0]
	if len(d.Lines) != 3 {
		t.Fatalf("%d lines, want 3", len(d.Lines))
	}
	for i, want := range []struct{ mpn, role, topo, note string }{
		{"QPS30-40C", "diode", "series-diode", "passes as series-diode diode"},
		{"LKZ13J-S2", "zener", "pfet-high", "passes as pfet-high zener"},
		{"TMV4-5U", "tvs", "", "passes in no role"},
	} {
		l := d.Lines[i]
		if l.MPN != want.mpn || l.Role != want.role || string(l.Topology) != want.topo || !strings.Contains(l.Note, want.note) {
			t.Errorf("line %d = %s %s %s %q; want %+v", i, l.MPN, l.Role, l.Topology, l.Note, want)
		}
		if l.Order.WithSpares != 550 {
			t.Errorf("%s: with spares %d, want 550", l.MPN, l.Order.WithSpares)
		}
	}
	evals := map[string]int{}
	for _, c := range d.Checks {
		evals[c.Part+" / "+c.Evaluation]++
	}
	if evals["QPS30-40C / series-diode diode"] < 5 || evals["QPS30-40C / shunt-fuse shunt-diode"] == 0 {
		t.Errorf("checks by part and evaluation: %v", evals)
	}
	_, err = Build(ctx, st, s, Options{Parts: []string{"QPS30-40C", "NO-SUCH-PART-9"}})
	if !errors.Is(err, ErrNoPart) || !strings.Contains(err.Error(), "NO-SUCH-PART-9") {
		t.Errorf("unknown part: err = %v, want ErrNoPart naming it", err)
	}
}

// A spec for which nothing qualifies gives ErrNothing with the reasons.
func TestBuildNothing(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s, _ := exampleSpec(t, "handheld-2s-liion")
	_, err := Build(ctx, st, s, Options{Topologies: []topology.Topology{topology.PFETHigh, topology.SeriesDiode}})
	if !errors.Is(err, ErrNothing) || !strings.Contains(err.Error(), "pfet-high ranked out") || !strings.Contains(err.Error(), "series-diode: no part qualifies") {
		t.Errorf("err = %v, want ErrNothing with the reasons", err)
	}
	if _, err := Build(ctx, st, s, Options{SparesPct: -1}); err == nil {
		t.Error("negative spares: want an error")
	}
	if _, err := Build(ctx, st, s, Options{Alternates: -1}); err == nil {
		t.Error("negative alternates: want an error")
	}
}

func TestGateResistorText(t *testing.T) {
	for _, c := range []struct {
		r, rating, v float64
		want         string
	}{
		{10e3, 0.125, 35, "10 kΩ ±1 %, 0.125 W, 0805 or larger, ≥ 35 V working"},
		{15e3, 0.125, 24, "15 kΩ ±1 %, 0.125 W, 0805 or larger, ≥ 24 V working"},
		{4.7e3, 0.25, 60, "4.7 kΩ ±1 %, 0.25 W, 0805 or larger, ≥ 60 V working"},
	} {
		if got := GateResistorText(c.r, c.rating, c.v); got != c.want {
			t.Errorf("GateResistorText(%g, %g, %g) = %q, want %q", c.r, c.rating, c.v, got, c.want)
		}
	}
}
