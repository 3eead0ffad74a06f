package topology

import (
	"context"
	"math"
	"testing"

	"partsieve/catalog"
)

// TestSweepReproducesPick: at the spec's own (i_max, t_max) the sweep
// gives back every example candidate's loss, drop and junction
// temperature, and its checks pass; the loss rises with the current and
// the junction temperature with the ambient; at zero current only the gate clamp
// dissipates; far past i_max a check fails.
func TestSweepReproducesPick(t *testing.T) {
	st := seedCatalog(t)
	ctx := context.Background()
	for _, name := range exampleNames {
		t.Run(name, func(t *testing.T) {
			s := exampleSpec(t, name)
			r, err := Pick(ctx, st, s, Options{Top: 3})
			if err != nil {
				t.Fatal(err)
			}
			parts, err := CandidateParts(ctx, st, r)
			if err != nil {
				t.Fatal(err)
			}
			cat := NewCatalog(parts)
			n := 0
			for _, tr := range r.Topologies {
				list := append(append([]Candidate(nil), tr.Candidates...), tr.RankedOut...)
				for k := range list {
					c := &list[k]
					n++
					i, ta := s.Load.IMax, s.Ambient.TMax
					at := []Point{{i, ta}, {0.5 * i, ta}, {i, s.Ambient.TMin}, {1.5 * i, ta}, {0, ta}, {200 * i, ta}}
					ops, err := Sweep(s, cat, tr.Topology, c, at)
					if err != nil {
						t.Fatal(err)
					}
					op := ops[0]
					label := string(tr.Topology) + " " + c.Parts[0].MPN
					if op.Loss != c.Loss || op.Drop != c.Drop || op.TjHot != c.TjHot {
						t.Errorf("%s at (i_max, t_max): loss %g drop %g T_j %g, candidate %g %g %g", label, op.Loss, op.Drop, op.TjHot, c.Loss, c.Drop, c.TjHot)
					}
					if op.Pass != !c.Unsafe {
						t.Errorf("%s at (i_max, t_max): pass %v (first fail %q), candidate unsafe %v", label, op.Pass, op.FirstFail, c.Unsafe)
					}
					if !c.Unsafe && float64(op.MinMargin) > float64(c.MinMargin)+1e-12 {
						t.Errorf("%s: min margin %g over all checks above the candidate's %g", label, op.MinMargin, c.MinMargin)
					}
					tj := findCheck(t, c.Checks, map[Topology]string{SeriesDiode: "diode", ShuntFuse: "shunt-diode", PFETHigh: "mosfet", NFETLow: "mosfet"}[tr.Topology],
						map[Topology]string{SeriesDiode: "junction temperature", ShuntFuse: "junction temperature in operation", PFETHigh: "junction temperature", NFETLow: "junction temperature"}[tr.Topology])
					if op.TjLimit != tj.Limit {
						t.Errorf("%s: T_j limit %g, check says %g", label, op.TjLimit, tj.Limit)
					}
					if !(ops[1].Loss < op.Loss && op.Loss < ops[3].Loss) {
						t.Errorf("%s: loss not rising with current: %g, %g, %g", label, ops[1].Loss, op.Loss, ops[3].Loss)
					}
					// at zero current only the gate clamp dissipates
					switch g := c.GateResistor; {
					case tr.Topology == ShuntFuse:
					case g == nil && ops[4].Loss != 0:
						t.Errorf("%s: loss %g at zero current", label, ops[4].Loss)
					case g != nil && !(ops[4].Loss > g.PowerSteady && ops[4].Loss < c.Loss):
						t.Errorf("%s: loss %g at zero current, want the clamp's (R_G %g W + Zener) below %g", label, ops[4].Loss, g.PowerSteady, c.Loss)
					}
					if !(ops[2].TjHot < op.TjHot) {
						t.Errorf("%s: T_j not rising with ambient: %g at t_min, %g at t_max", label, ops[2].TjHot, op.TjHot)
					}
					if ops[5].Pass || ops[5].FirstFail == "" {
						t.Errorf("%s passes at 200 × i_max", label)
					}
				}
			}
			if n == 0 {
				t.Fatal("no candidates")
			}
		})
	}
}

func TestSweepErrors(t *testing.T) {
	s := exampleSpec(t, "vehicle-12v-accessory")
	d := mk("diode", "schottky", "SD-1", "vrrm", 60, "ifav", 5)
	cat := NewCatalog(nil)
	c := &Candidate{Parts: []PartRef{{Role: "diode", Mfr: "Testworks", MPN: "SD-1"}}}
	if _, err := Sweep(s, cat, SeriesDiode, c, []Point{{1, 25}}); err == nil {
		t.Error("sweep with a part missing from the catalog: no error")
	}
	full := NewCatalog([]catalog.Part{d})
	if _, err := Sweep(s, full, ShuntFuse, c, []Point{{1, 25}}); err == nil {
		t.Error("shunt-fuse sweep of a single diode: no error")
	}
	if _, err := Sweep(s, full, SeriesDiode, c, []Point{{math.NaN(), 25}}); err == nil {
		t.Error("NaN current: no error")
	}
	if _, err := Sweep(s, full, SeriesDiode, c, []Point{{-1, 25}}); err == nil {
		t.Error("negative current: no error")
	}
	// a part without forward data: every check recorded, none passes past the data
	ops, err := Sweep(s, full, SeriesDiode, c, []Point{{1, 25}})
	if err != nil {
		t.Fatal(err)
	}
	if ops[0].Pass || ops[0].FirstFail == "" {
		t.Errorf("part without data passes: %+v", ops[0])
	}
}
