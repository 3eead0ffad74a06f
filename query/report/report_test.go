package report

import (
	"context"
	"math"
	"os"
	"partsieve/internal/seedstore"
	"path/filepath"
	"strings"
	"testing"

	"partsieve/catalog"
	"partsieve/catalog/units"
	"partsieve/query/spec"
	"partsieve/query/topology"
	"partsieve/seeddata"
)

var (
	seed seedstore.Shared
)

// seedCatalog returns a store holding the seed catalog, imported once per
// test binary through the real importer.
func seedCatalog(t testing.TB) *catalog.Store { return seed.Get(t) }

func TestMain(m *testing.M) {
	code := m.Run()
	seed.Close()
	os.Exit(code)
}

// exampleInput picks the example spec name against the seed catalog.
func exampleInput(t testing.TB, name string, opt topology.Options) Input {
	t.Helper()
	data, path, ok := seeddata.Spec(name)
	if !ok {
		t.Fatalf("no example spec %q", name)
	}
	s, err := spec.Parse(path, data)
	if err != nil {
		t.Fatal(err)
	}
	st := seedCatalog(t)
	ctx := context.Background()
	r, err := topology.Pick(ctx, st, s, opt)
	if err != nil {
		t.Fatal(err)
	}
	parts, err := topology.CandidateParts(ctx, st, r)
	if err != nil {
		t.Fatal(err)
	}
	return Input{Spec: s, SpecText: data, Result: r, Parts: parts}
}

// expectedSeries returns, per topology with designs, the legend names of
// the designs the plots draw.
func expectedSeries(r *topology.Result) (svgs int, names []string) {
	for _, tr := range r.Topologies {
		list := tr.Candidates
		if len(list) == 0 {
			list = tr.RankedOut
		}
		if len(list) == 0 {
			continue
		}
		svgs += 3 // loss, junction temperature, margins
		for k := range list {
			if k == MaxSeries {
				break
			}
			names = append(names, designName(&list[k]))
		}
	}
	return svgs, names
}

// TestExampleReports renders the report of every example spec against
// the seed catalog and checks the page: it parses, holds one loss, one
// temperature and one margin plot per topology with designs, names every
// drawn design in the SVG legends, shows the spec as written, the policy
// and the cautions, and refers to nothing outside the file.
func TestExampleReports(t *testing.T) {
	for _, name := range seeddata.SpecNames() {
		t.Run(name, func(t *testing.T) {
			in := exampleInput(t, name, topology.Options{})
			b, err := Render(in)
			if err != nil {
				t.Fatal(err)
			}
			if dir := os.Getenv("REPORT_OUT"); dir != "" { // for looking at the pages
				if err := os.WriteFile(filepath.Join(dir, name+".html"), b, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			pg := checkPage(t, b)
			for _, p := range pg.problems {
				t.Error(p)
			}
			wantSVG, series := expectedSeries(in.Result)
			if wantSVG == 0 {
				t.Fatal("no topology has designs: the example no longer exercises the plots")
			}
			if pg.svgs != wantSVG {
				t.Errorf("%d svg plots, want %d", pg.svgs, wantSVG)
			}
			svgText := strings.Join(pg.svgText, "\n")
			for _, s := range series {
				// loss and temperature legends each name the design
				if n := strings.Count(svgText, s); n < 2 {
					t.Errorf("series %q appears %d times in the SVG text, want ≥ 2", s, n)
				}
			}
			for _, want := range []string{"load current (", "stage loss (", "junction temperature (°C)", "margin (%)", "policy limit tj_limit = "} {
				if !strings.Contains(svgText, want) {
					t.Errorf("SVG text lacks %q", want)
				}
			}
			for _, c := range topology.Cautions {
				if !strings.Contains(pg.text, c) {
					t.Errorf("page lacks the caution %q", c)
				}
			}
			if len(pg.pre) != 1 || pg.pre[0] != string(in.SpecText) {
				t.Errorf("the spec as written is not shown verbatim in one <pre>")
			}
			pr := in.Spec.Policy.Profile
			for _, f := range pr.Factors() {
				if !strings.Contains(pg.text, f.Name) {
					t.Errorf("policy factor %s not listed", f.Name)
				}
			}
			if len(pr.Unverified()) > 0 && !strings.Contains(pg.text, "unverified default") {
				t.Error(`no factor marked "unverified default"`)
			}
			for _, c := range in.Result.Comparison {
				if c.Parts != "" && !strings.Contains(pg.text, c.Parts) {
					t.Errorf("comparison row %s: parts %q not shown", c.Topology, c.Parts)
				}
			}
			// the numbers of the tables are the result's
			for _, tr := range in.Result.Topologies {
				for _, c := range tr.Candidates {
					if l := num(c.Loss, "W"); !strings.Contains(pg.text, l) {
						t.Errorf("%s #%d: loss %s not shown", tr.Topology, c.Rank, l)
					}
				}
			}
			raw := string(b)
			if !strings.Contains(raw, `font-family:Liberation Sans`) || !strings.Contains(raw, `src:url(data:font/ttf;base64,`) {
				t.Error("the plot font is not used and embedded")
			}
			if strings.Count(raw, "@font-face") != 1 {
				t.Errorf("%d @font-face rules, want the one embedded font", strings.Count(raw, "@font-face"))
			}
		})
	}
}

// TestReportWithoutParts: without the catalog parts the curves are left
// out with a note, and the margin plots remain.
func TestReportWithoutParts(t *testing.T) {
	in := exampleInput(t, "vehicle-12v-accessory", topology.Options{Top: 2})
	in.Parts = nil
	b, err := Render(in)
	if err != nil {
		t.Fatal(err)
	}
	pg := checkPage(t, b)
	want, _ := expectedSeries(in.Result)
	if pg.svgs != want/3 {
		t.Errorf("%d svg plots, want %d margin plots", pg.svgs, want/3)
	}
	if !strings.Contains(pg.text, "loss and temperature curves left out") {
		t.Error("no note that the curves are left out")
	}
	if _, err := Render(Input{Spec: in.Spec}); err == nil {
		t.Error("render without a result: no error")
	}
}

// TestPlotNotes: a design whose checks fail past i_max is drawn dashed
// from there and the page says from which current and which check.
func TestPlotNotes(t *testing.T) {
	in := exampleInput(t, "vehicle-12v-accessory", topology.Options{})
	var tr *topology.TopologyResult
	for i := range in.Result.Topologies {
		if in.Result.Topologies[i].Topology == topology.PFETHigh {
			tr = &in.Result.Topologies[i]
		}
	}
	if tr == nil || len(tr.Candidates) < 2 {
		t.Fatal("pfet-high has fewer than 2 candidates")
	}
	s := in.Spec
	ds := []design{{designName(&tr.Candidates[1]), &tr.Candidates[1]}}
	fig, notes, err := lossFigure(s, topology.NewCatalog(in.Parts), tr.Topology, ds)
	if err != nil {
		t.Fatal(err)
	}
	// find where the sweep first fails, and check the note says so
	at := []topology.Point{}
	for k := 0; k <= currentSteps; k++ {
		at = append(at, topology.Point{Current: s.Load.IMax * float64(k) / 40, Ambient: s.Ambient.TMax})
	}
	ops, err := topology.Sweep(s, topology.NewCatalog(in.Parts), tr.Topology, &tr.Candidates[1], at)
	if err != nil {
		t.Fatal(err)
	}
	k := firstFail(ops, false)
	if k < 0 {
		t.Skip("the second pfet-high design passes up to 1.5 × i_max")
	}
	if k <= 40 {
		t.Fatalf("design fails at or below i_max (point %d)", k)
	}
	want := ds[0].name + ": from " + units.Format(ops[k].Current, units.Current) + ", " + ops[k].FirstFail + " fails"
	if len(notes) != 1 || notes[0] != want {
		t.Errorf("notes = %q, want %q", notes, want)
	}
	if !strings.Contains(string(fig.SVG), "stroke-dasharray") {
		t.Error("no dashed segment in the loss plot")
	}
}

func TestNiceTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		want   string
	}{
		{0, 4.5, "0 1 2 3 4"},
		{-40, 85, "-25 0 25 50 75"},
		{-45, 85, "-25 0 25 50 75"},
		{0, 13.5, "0.0 2.5 5.0 7.5 10.0 12.5"},
		{0, 0.45, "0.0 0.1 0.2 0.3 0.4"},
		{0, 0.3, "0.00 0.05 0.10 0.15 0.20 0.25 0.30"},
		{0, 0.15, "0.000 0.025 0.050 0.075 0.100 0.125 0.150"},
		{0, 540, "0 100 200 300 400 500"},
		{-26, 72, "-20 0 20 40 60"},
	} {
		var got []string
		for _, tk := range (niceTicks{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != c.want {
			t.Errorf("ticks(%g, %g) = %q, want %q", c.lo, c.hi, strings.Join(got, " "), c.want)
		}
	}
}

func TestFormatting(t *testing.T) {
	for _, c := range []struct {
		got, want string
	}{
		{cost(0.7578, "EUR"), "0.7578 EUR"},
		{cost(1.5, "USD"), "1.50 USD"},
		{cost(2, "USD"), "2.00 USD"},
		{cost(topology.Num(math.NaN()), "USD"), "not costed"},
		{num(0.306, "W"), "306 mW"},
		{num(97, "°C"), "97 °C"},
		{num(topology.Num(math.Inf(1)), "°C"), "?"},
		{num(0.2, "A²s"), "0.2 A²s"},
		{marginText(0.02), "+2 %"},
		{marginText(-0.5), "-50 %"},
		{marginText(topology.Num(math.Inf(-1))), "fails (no stable point)"},
		{marginText(topology.Num(math.NaN())), "?"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
}
