package topology

import (
	"context"
	"sort"
	"strings"
	"testing"

	"partsieve/catalog"
	"partsieve/query/derate"
	"partsieve/query/spec"
)

var exampleNames = []string{"vehicle-12v-accessory", "sensor-24v-industrial", "handheld-2s-liion"}

// seedParts returns every part of the seed catalog with offers.
func seedParts(t testing.TB) []catalog.Part {
	t.Helper()
	parts, err := seedCatalog(t).Find(context.Background(), catalog.Query{Offers: true})
	if err != nil {
		t.Fatal(err)
	}
	return parts
}

// allOpt lists every qualifying design: all candidates, every valid pair.
var allOpt = Options{Top: 1 << 20, PairsPerFuse: 1 << 10}

// designs returns the qualifying designs per topology as sets of part
// numbers (candidates and, for unsafe stages, the ranked-out designs);
// a MOSFET stage is identified by its MOSFET.
func designs(r *Result) map[Topology]map[string]bool {
	out := map[Topology]map[string]bool{}
	for _, tr := range r.Topologies {
		set := map[string]bool{}
		for _, list := range [][]Candidate{tr.Candidates, tr.RankedOut} {
			for _, c := range list {
				var ks []string
				for _, p := range c.Parts {
					ks = append(ks, p.MPN)
				}
				if tr.Topology == PFETHigh || tr.Topology == NFETLow {
					// the Zener is an accessory chosen per window: the
					// design is the MOSFET
					ks = ks[:1]
				}
				set[strings.Join(ks, "+")] = true
			}
		}
		out[tr.Topology] = set
	}
	return out
}

// subset reports designs of b that are not in a.
func added(a, b map[Topology]map[string]bool) []string {
	var out []string
	for tp, set := range b {
		for k := range set {
			if !a[tp][k] {
				out = append(out, string(tp)+": "+k)
			}
		}
	}
	sort.Strings(out)
	return out
}

func count(d map[Topology]map[string]bool) int {
	n := 0
	for _, s := range d {
		n += len(s)
	}
	return n
}

// TestPropertiesNeverAdd checks, on the seed catalog and the example
// specs, that raising i_max or t_max and choosing a stricter policy never
// add a qualifying design.
func TestPropertiesNeverAdd(t *testing.T) {
	cat := NewCatalog(seedParts(t))
	profiles := derate.Builtin()
	for _, name := range exampleNames {
		base := exampleSpec(t, name)
		run := func(f func(s *spec.Spec)) map[Topology]map[string]bool {
			s := *base
			f(&s)
			return designs(Evaluate(&s, cat, allOpt))
		}
		t.Run(name, func(t *testing.T) {
			prev := run(func(*spec.Spec) {})
			if count(prev) == 0 {
				t.Fatalf("no design qualifies at all; the property would be empty")
			}
			for _, k := range []float64{1.25, 1.6, 2.5} {
				cur := run(func(s *spec.Spec) { s.Load.IMax *= k })
				if a := added(prev, cur); len(a) > 0 {
					t.Errorf("i_max ×%g added %v", k, a)
				}
				prev = cur
			}
			prev = run(func(*spec.Spec) {})
			for _, dt := range []float64{10, 20, 35} {
				cur := run(func(s *spec.Spec) { s.Ambient.TMax += dt })
				if a := added(prev, cur); len(a) > 0 {
					t.Errorf("t_max +%g K added %v", dt, a)
				}
				prev = cur
			}
			prev = nil
			for _, p := range profiles {
				cur := run(func(s *spec.Spec) { s.Policy.Profile = p })
				if prev != nil {
					if a := added(prev, cur); len(a) > 0 {
						t.Errorf("%s added %v", p.Name, a)
					}
				}
				prev = cur
			}
		})
	}
}

// TestLossGrowsWithCurrent sweeps the load current for one design of each
// topology and checks that the stage loss rises strictly.
func TestLossGrowsWithCurrent(t *testing.T) {
	src := `[supply]
kind = "bench"
v_min = 11
v_nom = 12
v_max = 13
v_reverse = 13
reverse_time = "continuous"
r_source = 0.5
[load]
i_max = 0.1
v_min = 8
v_reverse_max = 3
[ambient]
t_min = 0
t_max = 40
[policy]
derating = "commercial"
`
	parts := append(crowbarParts(),
		mk(catalog.Diode, "rectifier", "LG-R5", "vrrm", 100, "ifav", 5, "ifsm", 150, "vf", 1.1, "vf_if", 5, "vf2", 0.9, "vf2_if", 5, "vf2_tj", 125,
			"rthja", 20, "tjmax", 150, "ir", 1e-5, "ir_vr", 100, "ir_tj", 25, "ir2", 1e-4, "ir2_tj", 100),
		mk(catalog.Fuse, "F", "LG-F5", "in", 5, "un_dc", 63, "breaking", 300, "i2t", 6, "rcold", 0.022, "fuse_std", "ul"),
		mk(catalog.MOSFET, "p", "LG-P", "vds", 40, "id", 50, "vgs_max", 20, "rdson", 0.01, "rdson_vgs", 10, "rdson2", 0.015, "rdson2_vgs", 4.5, "rthja", 40, "tjmax", 175),
		mk(catalog.MOSFET, "n", "LG-N", "vds", 40, "id", 50, "vgs_max", 20, "rdson", 0.005, "rdson_vgs", 10, "rdson2", 0.007, "rdson2_vgs", 4.5, "rthja", 40, "tjmax", 175),
	)
	cat := NewCatalog(parts)
	want := map[Topology]string{SeriesDiode: "LG-R5", ShuntFuse: "LG-F5+CB-SK", PFETHigh: "LG-P", NFETLow: "LG-N"}
	last := map[Topology]float64{}
	for _, i := range []float64{0.1, 0.3, 0.6, 1, 1.5, 2, 2.5, 3} {
		s := mustSpec(t, src)
		s.Load.IMax = i
		r := Evaluate(s, cat, Options{Top: 10})
		for tp, mpn := range want {
			var found *Candidate
			for k, c := range topo(t, r, tp).Candidates {
				var ks []string
				for _, p := range c.Parts {
					ks = append(ks, p.MPN)
				}
				if strings.Join(ks, "+") == mpn {
					found = &topo(t, r, tp).Candidates[k]
				}
			}
			if found == nil {
				t.Fatalf("%s: %s does not qualify at %g A", tp, mpn, i)
			}
			if l := float64(found.Loss); !(l > last[tp]) {
				t.Errorf("%s: loss %g W at %g A is not above %g W", tp, l, i, last[tp])
			} else {
				last[tp] = l
			}
		}
	}
}

// TestPairingMatchesCrossProduct checks that the indexed pairing finds
// exactly the fuses that a naive cross product of the surviving fuses and
// diodes would pair, on the seed catalog and every example spec and
// ranking.
func TestPairingMatchesCrossProduct(t *testing.T) {
	cat := NewCatalog(seedParts(t))
	for _, name := range exampleNames {
		for _, rank := range []RankBy{RankLoss, RankMargin, RankCost} {
			s := exampleSpec(t, name)
			// relaxed so that many fuses and diodes survive and pair
			s.Ambient.TMax -= 15
			s.Load.VReverseMax = 3
			s.Supply.RSource = max(s.Supply.RSource, 0.5)
			opt := Options{Rank: rank, Top: 1 << 20, PairsPerFuse: 1, Topologies: []Topology{ShuntFuse}}
			r := Evaluate(s, cat, opt)
			got := map[string]bool{}
			for _, c := range topo(t, r, ShuntFuse).Candidates {
				got[c.Parts[0].MPN] = true
			}
			e := newEngine(s, cat, opt)
			want := map[string]bool{}
			var c checker
			for i := range cat.fuses {
				f := &cat.fuses[i]
				c.reset(false, s.Ambient.TMax)
				fm := e.fuse(f, &c)
				if c.failed {
					continue
				}
				for j := range cat.diodes {
					d := &cat.diodes[j]
					c.reset(false, s.Ambient.TMax)
					dm := e.shuntDiode(d, &c)
					model, ok := e.forward(d)
					if c.failed || !ok {
						continue
					}
					c.reset(false, s.Ambient.TMin)
					e.pair(f, fm, d, dm, &model, &c)
					if !c.failed {
						want[f.p.MPN] = true
						break
					}
				}
			}
			if len(want) == 0 {
				t.Fatalf("%s: no pair at all; the comparison would be empty", name)
			}
			if a, b := keys(got), keys(want); a != b {
				t.Errorf("%s rank %s: indexed pairing %v, cross product %v", name, rank, a, b)
			}
		}
	}
}

func keys(m map[string]bool) string {
	var ks []string
	for k := range m {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return strings.Join(ks, ",")
}
