package topology

import (
	"context"
	"math"
	"sort"
	"testing"

	"partsieve/catalog"
)

// Every alternate passes every check of its design, keeps the design's
// other parts, and the list puts other makers first.
func TestAlternatesPassAndKeepTheDesign(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	total := 0
	for _, name := range []string{"vehicle-12v-accessory", "sensor-24v-industrial", "handheld-2s-liion"} {
		s := exampleSpec(t, name)
		cat, err := LoadCatalog(ctx, st, s, Options{})
		if err != nil {
			t.Fatal(err)
		}
		r := Evaluate(s, cat, Options{Top: 2})
		for _, tr := range r.Topologies {
			for ci := range tr.Candidates {
				d := &tr.Candidates[ci]
				for _, ref := range d.Parts {
					alts, err := Alternates(s, cat, Options{}, tr.Topology, d, ref.Role, 3)
					if err != nil {
						t.Fatalf("%s %s %s: %v", name, tr.Topology, ref.Role, err)
					}
					if len(alts) > 3 {
						t.Errorf("%s %s %s: %d alternates, want ≤ 3", name, tr.Topology, ref.Role, len(alts))
					}
					seenSame := false
					for _, a := range alts {
						total++
						if a.Part == nil || a.Part.MPN == ref.MPN && a.Part.Mfr == ref.Mfr {
							t.Errorf("%s %s %s: alternate is the design's own part", name, tr.Topology, ref.Role)
							continue
						}
						if a.Ref.Role != ref.Role || a.Ref.MPN != a.Part.MPN {
							t.Errorf("alternate ref %+v for part %s", a.Ref, a.Part.MPN)
						}
						if a.OtherMaker != (catalog.NormKey(a.Part.Mfr) != catalog.NormKey(ref.Mfr)) {
							t.Errorf("%s: OtherMaker = %v for %s vs %s", name, a.OtherMaker, a.Part.Mfr, ref.Mfr)
						}
						if !a.OtherMaker {
							seenSame = true
						} else if seenSame {
							t.Errorf("%s %s %s: another maker's part listed after a same-maker part", name, tr.Topology, ref.Role)
						}
						if len(a.Design.Checks) == 0 {
							t.Errorf("%s %s: alternate %s has no checks", name, ref.Role, a.Part.MPN)
						}
						for _, c := range a.Design.Checks {
							if !c.Pass {
								t.Errorf("%s %s: alternate %s fails %s: %s", name, tr.Topology, a.Part.MPN, c.Role, c.Name)
							}
						}
						if len(a.Design.Parts) != len(d.Parts) {
							t.Errorf("%s: alternate design has %d parts, want %d", name, len(a.Design.Parts), len(d.Parts))
							continue
						}
						for i, p := range a.Design.Parts {
							want := d.Parts[i]
							if p.Role != want.Role {
								t.Errorf("role %d = %s, want %s", i, p.Role, want.Role)
							}
							if p.Role == ref.Role {
								if p.MPN != a.Part.MPN {
									t.Errorf("alternate design holds %s in role %s, want %s", p.MPN, p.Role, a.Part.MPN)
								}
							} else if p.MPN != want.MPN {
								t.Errorf("%s %s: alternate for %s changed %s from %s to %s", name, tr.Topology, ref.Role, p.Role, want.MPN, p.MPN)
							}
						}
						if d.GateResistor != nil {
							if a.Design.GateResistor == nil || a.Design.GateResistor.Value != d.GateResistor.Value {
								t.Errorf("%s: alternate %s changes the gate resistor", name, a.Part.MPN)
							}
						}
					}
				}
			}
		}
	}
	if total < 10 {
		t.Errorf("only %d alternates over the example specs; the seed catalog should give more", total)
	}
}

// The alternates of a series diode are exactly the other qualifying
// diodes of the pick, and the fuse alternates of a shunt-fuse design are
// exactly the fuses the pick pairs with its diode.
func TestAlternatesMatchThePick(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s := exampleSpec(t, "sensor-24v-industrial")
	cat, err := LoadCatalog(ctx, st, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	all := Evaluate(s, cat, Options{Top: 100000, PairsPerFuse: 100000, Topologies: []Topology{SeriesDiode, ShuntFuse}})
	series, shunt := all.Topologies[0], all.Topologies[1]
	if len(series.Candidates) < 3 || len(shunt.Candidates) < 3 {
		t.Fatalf("sensor spec: %d series, %d shunt candidates; want several", len(series.Candidates), len(shunt.Candidates))
	}
	d := &series.Candidates[0]
	alts, err := Alternates(s, cat, Options{}, SeriesDiode, d, "diode", 100000)
	if err != nil {
		t.Fatal(err)
	}
	var want, got []string
	for _, c := range series.Candidates[1:] {
		want = append(want, c.Parts[0].Mfr+"/"+c.Parts[0].MPN)
	}
	for _, a := range alts {
		got = append(got, a.Part.Mfr+"/"+a.Part.MPN)
		// the re-evaluated design has the figures of the pick's candidate
		for _, c := range series.Candidates {
			if c.Parts[0].MPN == a.Part.MPN && c.Parts[0].Mfr == a.Part.Mfr {
				if math.Abs(float64(c.Loss-a.Design.Loss)) > 1e-12 || math.Abs(float64(c.MinMargin-a.Design.MinMargin)) > 1e-12 {
					t.Errorf("%s: loss %g margin %g, pick says %g %g", a.Part.MPN, a.Design.Loss, a.Design.MinMargin, c.Loss, c.MinMargin)
				}
			}
		}
	}
	sort.Strings(want)
	sort.Strings(got)
	if !equalStrings(got, want) {
		t.Errorf("series alternates:\n got %v\nwant %v", got, want)
	}

	pd := &shunt.Candidates[0]
	fuse, diode := pd.Parts[0], pd.Parts[1]
	alts, err = Alternates(s, cat, Options{}, ShuntFuse, pd, "fuse", 100000)
	if err != nil {
		t.Fatal(err)
	}
	want, got = nil, nil
	for _, c := range shunt.Candidates {
		if c.Parts[1].MPN == diode.MPN && c.Parts[0].MPN != fuse.MPN {
			want = append(want, c.Parts[0].MPN)
		}
	}
	for _, a := range alts {
		got = append(got, a.Part.MPN)
	}
	sort.Strings(want)
	sort.Strings(got)
	if !equalStrings(got, want) {
		t.Errorf("fuse alternates with %s:\n got %v\nwant %v", diode.MPN, got, want)
	}
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// Zener alternates keep the MOSFET and the gate resistor; MOSFET
// alternates keep the Zener. A Zener outside the window is refused.
func TestAlternatesClamp(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s := exampleSpec(t, "vehicle-12v-accessory")
	cat, err := LoadCatalog(ctx, st, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	r := Evaluate(s, cat, Options{Top: 1, Topologies: []Topology{PFETHigh}})
	if len(r.Topologies[0].Candidates) == 0 {
		t.Fatal("vehicle spec: no pfet-high design")
	}
	d := &r.Topologies[0].Candidates[0]
	if d.GateResistor == nil || len(d.Parts) != 2 {
		t.Fatalf("vehicle pfet-high design %+v: want a MOSFET with a Zener clamp", d.Parts)
	}
	zs, err := Alternates(s, cat, Options{}, PFETHigh, d, "zener", 50)
	if err != nil {
		t.Fatal(err)
	}
	if len(zs) == 0 {
		t.Fatal("no Zener alternates for the vehicle pfet-high design")
	}
	for _, a := range zs {
		vz, tol := a.Part.Num["vz"], a.Part.Num["vz_tol"]
		if !(vz*(1+tol) > 0) {
			t.Errorf("Zener alternate %s without V_Z", a.Part.MPN)
		}
	}
	// the design's own Zener with the MOSFET passes; so the engine's choice
	// is among the Zeners that fit the same window
	ms, err := Alternates(s, cat, Options{}, PFETHigh, d, "mosfet", 50)
	if err != nil {
		t.Fatal(err)
	}
	for _, a := range ms {
		if a.Design.Parts[1].MPN != d.Parts[1].MPN {
			t.Errorf("MOSFET alternate %s uses Zener %s, want the design's %s", a.Part.MPN, a.Design.Parts[1].MPN, d.Parts[1].MPN)
		}
	}
	if _, err := Alternates(s, cat, Options{}, PFETHigh, d, "gate-resistor", 2); err == nil {
		t.Error("alternates of the generic gate resistor: want an error")
	}
	if _, err := Alternates(s, cat, Options{}, SeriesDiode, d, "diode", 2); err == nil {
		t.Error("alternates for a role the design lacks: want an error")
	}
	if a, err := Alternates(s, cat, Options{}, PFETHigh, d, "mosfet", 0); err != nil || a != nil {
		t.Errorf("n = 0: %v, %v; want nothing", a, err)
	}
}

// LoadCatalog adds the extra part numbers even when the pre-filters would
// leave them out, and Part finds parts by normalised maker and number.
func TestLoadCatalogExtra(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s := exampleSpec(t, "vehicle-12v-accessory")
	base, err := LoadCatalog(ctx, st, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	// no topology uses a TVS diode: no pre-filter reads it
	if base.Part("Tamsin Devices", "TMV4-5U") != nil {
		t.Fatal("TMV4-5U passed the pre-filter; pick another part for this test")
	}
	cat, err := LoadCatalog(ctx, st, s, Options{}, "tmv4 5u")
	if err != nil {
		t.Fatal(err)
	}
	p := cat.Part("tamsin devices", "TMV45U")
	if p == nil || p.MPN != "TMV4-5U" || len(p.Offers) == 0 {
		t.Fatalf("Part after extra = %+v, want TMV4-5U with offers", p)
	}
	if cat.Len() != base.Len()+1 {
		t.Errorf("extra added %d parts, want 1", cat.Len()-base.Len())
	}
}
