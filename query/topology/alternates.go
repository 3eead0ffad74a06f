package topology

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"

	"partsieve/catalog"
	"partsieve/query/spec"
)

// LoadCatalog reads the parts the spec's topologies need through the same
// SQL pre-filters as Pick and prepares them for evaluation. Parts whose MPN
// is in extra (compared as catalog.NormKey does) are added whatever their
// values, as Explain does, so that ExplainCatalog can report on them.
//
// With the prepared catalog, Evaluate gives the same candidates as Pick
// (without the pre-filter elimination counts), and Alternates and
// ExplainCatalog work on the same parts.
func LoadCatalog(ctx context.Context, src Source, s *spec.Spec, opt Options, extra ...string) (*Catalog, error) {
	ld, err := load(ctx, src, s, opt)
	if err != nil {
		return nil, err
	}
	parts := ld.parts
	seen := make(map[string]bool, len(parts))
	for i := range parts {
		seen[partKey(&parts[i])] = true
	}
	for _, mpn := range extra {
		own, err := src.Find(ctx, catalog.Query{Conds: []catalog.Cond{{Field: "mpn", Op: "=", Text: mpn}}, Offers: true})
		if err != nil {
			return nil, fmt.Errorf("reading part %s: %w", mpn, err)
		}
		for _, p := range own {
			if k := partKey(&p); !seen[k] {
				seen[k] = true
				parts = append(parts, p)
			}
		}
	}
	return NewCatalog(parts), nil
}

func partKey(p *catalog.Part) string {
	return string(p.Kind) + "\x00" + catalog.NormKey(p.Mfr) + "\x00" + catalog.NormKey(p.MPN)
}

// Part returns the catalog part made by mfr with part number mpn (both
// compared as catalog.NormKey does), or nil when the catalog has none.
func (c *Catalog) Part(mfr, mpn string) *catalog.Part {
	m, n := catalog.NormKey(mfr), catalog.NormKey(mpn)
	for i := range c.parts {
		p := &c.parts[i]
		if catalog.NormKey(p.MPN) == n && catalog.NormKey(p.Mfr) == m {
			return p
		}
	}
	return nil
}

// Alternate is a second source for one role of a design: a catalog part
// that can take the role with the rest of the design unchanged.
type Alternate struct {
	// Part is the catalog part, with its offers.
	Part *catalog.Part `json:"-"`
	// Ref is the part in the role, with its best offer at the build
	// quantity (as in a candidate).
	Ref PartRef `json:"part"`
	// OtherMaker is true when the alternate's maker differs from the
	// maker of the design's part in that role.
	OtherMaker bool `json:"other_maker"`
	// Design is the design re-evaluated with the alternate in place:
	// every check recorded, with its loss, drop, junction temperature,
	// smallest margin and gate resistor. Its Rank is 0.
	Design Candidate `json:"design"`
}

// Alternates returns up to n second sources for role in design d of
// topology t: catalog parts, other than the design's own, with which the
// design passes every check once the part is put in the role and the rest
// of the design is kept. They are ordered by
//
//  1. another maker than the design part's, one part per maker first (a
//     second maker is what makes a second source), then the rest;
//  2. the lower unit price at the build quantity (UnitPrice; uncosted
//     last);
//  3. the lower stage loss, then the part number.
//
// What "the rest of the design is kept" means per topology:
//
//   - series-diode, role diode: every check of the diode.
//   - shunt-fuse, role fuse or shunt-diode: the part's own checks and the
//     pair checks with the design's partner (clearing I²t against the
//     diode's surge capability, the fuse opening, the clamp voltage, the
//     loss budget).
//   - pfet-high and nfet-low, role mosfet: every check of the stage with
//     the design's Zener clamp (or with none, when the design has none).
//     A MOSFET that would need no clamp while the design has one is not
//     an alternate: its drive would be set by the Zener it does not need,
//     and the circuit would change.
//   - pfet-high and nfet-low, role zener: every check of the stage with
//     the design's MOSFET and the alternate Zener clamping its gate, with
//     the same gate resistor value (one whose sizing needs another R_G
//     changes the resistor line and is not listed).
//
// The gate resistor is generic and has no alternates. d must be a
// candidate of Evaluate (or Pick) over the same catalog and spec.
func Alternates(s *spec.Spec, cat *Catalog, opt Options, t Topology, d *Candidate, role string, n int) ([]Alternate, error) {
	if n <= 0 {
		return nil, nil
	}
	e := newEngine(s, cat, opt)
	part := func(r string) *catalog.Part {
		for _, p := range d.Parts {
			if p.Role == r {
				return cat.Part(p.Mfr, p.MPN)
			}
		}
		return nil
	}
	own := part(role)
	if own == nil {
		return nil, fmt.Errorf("alternates: the %s design has no catalog part in role %q", t, role)
	}
	var found []altFound
	switch {
	case t == SeriesDiode && role == "diode":
		found = e.altSeries(own)
	case t == ShuntFuse && (role == "fuse" || role == "shunt-diode"):
		partner := "shunt-diode"
		if role == "shunt-diode" {
			partner = "fuse"
		}
		other := part(partner)
		if other == nil {
			return nil, fmt.Errorf("alternates: the %s design has no catalog part in role %q", t, partner)
		}
		found = e.altShunt(own, other, role == "fuse")
	case (t == PFETHigh || t == NFETLow) && (role == "mosfet" || role == "zener"):
		nfet := t == NFETLow
		if role == "mosfet" {
			found = altFETs(s, cat, opt, own, part("zener"), nfet)
		} else {
			fet := part("mosfet")
			if fet == nil {
				return nil, fmt.Errorf("alternates: the %s design has no catalog part in role %q", t, "mosfet")
			}
			rg := math.NaN()
			if d.GateResistor != nil {
				rg = float64(d.GateResistor.Value)
			}
			found = altZeners(s, cat, opt, fet, own, rg, nfet)
		}
	default:
		return nil, fmt.Errorf("alternates: no role %q in topology %s", role, t)
	}
	maker := catalog.NormKey(own.Mfr)
	for i := range found {
		f := &found[i]
		f.other = catalog.NormKey(f.p.Mfr) != maker
		f.cost = e.cost(f.p).unit
		if math.IsNaN(f.cost) {
			f.cost = math.Inf(1)
		}
	}
	slices.SortFunc(found, func(a, b altFound) int {
		if a.other != b.other {
			if a.other {
				return -1
			}
			return 1
		}
		if c := cmp.Compare(a.cost, b.cost); c != 0 {
			return c
		}
		if c := cmp.Compare(a.cand.Loss, b.cand.Loss); c != 0 {
			return c
		}
		if c := cmp.Compare(a.p.MPN, b.p.MPN); c != 0 {
			return c
		}
		return cmp.Compare(a.p.Mfr, b.p.Mfr)
	})
	// one part per other maker first, then the rest in order
	var out []Alternate
	taken := make([]bool, len(found))
	makers := map[string]bool{}
	for pass := 0; pass < 2 && len(out) < n; pass++ {
		for i := range found {
			if len(out) == n {
				break
			}
			f := &found[i]
			mk := catalog.NormKey(f.p.Mfr)
			if taken[i] || pass == 0 && (!f.other || makers[mk]) {
				continue
			}
			taken[i], makers[mk] = true, true
			out = append(out, Alternate{Part: f.p, Ref: e.partRef(role, f.p), OtherMaker: f.other, Design: f.cand})
		}
	}
	return out, nil
}

// altFound is a part that passes in the role, with the design as
// re-evaluated with it.
type altFound struct {
	p     *catalog.Part
	cand  Candidate
	other bool
	cost  float64
}

// altSeries returns every series diode but own that passes every check.
func (e *engine) altSeries(own *catalog.Part) []altFound {
	var out []altFound
	var c checker
	for i := range e.cat.diodes {
		d := &e.cat.diodes[i]
		if d.p == own {
			continue
		}
		c.reset(false, e.s.Ambient.TMax)
		e.seriesDiode(d, &c)
		if c.failed {
			continue
		}
		c.reset(true, e.s.Ambient.TMax)
		m := e.seriesDiode(d, &c)
		x := cand{a: i, b: -1, pa: d.p, m: m, margin: c.minMargin, marginID: c.minID}
		e.costOf(&x)
		out = append(out, altFound{p: d.p, cand: e.candidate(0, &x, []PartRef{e.partRef("diode", d.p)}, append([]Check(nil), c.checks...))})
	}
	return out
}

// altShunt returns the fuses (fuse true) or shunt diodes other than own
// that pass their own checks and the pair checks with partner.
func (e *engine) altShunt(own, partner *catalog.Part, fuse bool) []altFound {
	var out []altFound
	var fuses []*fuseRec
	var diodes []*diodeRec
	for i := range e.cat.fuses {
		if f := &e.cat.fuses[i]; fuse && f.p != own || !fuse && f.p == partner {
			fuses = append(fuses, f)
		}
	}
	for i := range e.cat.diodes {
		if d := &e.cat.diodes[i]; !fuse && d.p != own || fuse && d.p == partner {
			diodes = append(diodes, d)
		}
	}
	var c checker
	for _, f := range fuses {
		for _, d := range diodes {
			c.reset(false, e.s.Ambient.TMax)
			fmet := e.fuse(f, &c)
			if c.failed {
				break // the fuse fails on its own
			}
			dmet := e.shuntDiode(d, &c)
			fm, ok := e.forward(d)
			if c.failed || !ok || !has(dmet.cap) {
				continue
			}
			e.pair(f, fmet, d, dmet, &fm, &c)
			if c.failed {
				continue
			}
			// record every check, as a candidate of runShunt
			c.reset(true, e.s.Ambient.TMax)
			fmet = e.fuse(f, &c)
			dmet = e.shuntDiode(d, &c)
			pm := e.pair(f, fmet, d, dmet, &fm, &c)
			x := cand{a: -1, b: -1, pa: f.p, pb: d.p, m: pm, margin: c.minMargin, marginID: c.minID}
			e.costOf(&x)
			cd := e.candidate(0, &x, []PartRef{e.partRef("fuse", f.p), e.partRef("shunt-diode", d.p)}, append([]Check(nil), c.checks...))
			cd.FaultCurrent, cd.ClampVoltage = Num(pm.iFault), Num(pm.vClamp)
			p := d.p
			if fuse {
				p = f.p
			}
			out = append(out, altFound{p: p, cand: cd})
		}
	}
	return out
}

// withZeners returns a view of cat whose only Zeners are zs, so that the
// engine's clamp choice can only take one of them (or none).
func withZeners(cat *Catalog, zs []diodeRec) *Catalog {
	v := *cat
	v.zeners = zs
	return &v
}

func (c *Catalog) zenerRec(p *catalog.Part) (diodeRec, bool) {
	for i := range c.zeners {
		if c.zeners[i].p == p {
			return c.zeners[i], true
		}
	}
	return diodeRec{}, false
}

// fetCandidate evaluates t in the stage, recording every check, and
// returns the design with the Zener the engine chose (nil when none).
func (e *engine) fetCandidate(t *fetRec, nfet bool) (Candidate, *zchoice, bool) {
	var c checker
	c.reset(false, e.s.Ambient.TMax)
	e.fet(t, nfet, &c)
	if c.failed {
		return Candidate{}, nil, false
	}
	c.reset(true, e.s.Ambient.TMax)
	m, z := e.fet(t, nfet, &c)
	x := cand{a: -1, b: -1, pa: t.p, z: z, m: m, margin: c.minMargin, marginID: c.minID}
	refs := []PartRef{e.partRef("mosfet", t.p)}
	if z != nil {
		x.pb = z.z.p
		refs = append(refs, e.partRef("zener", z.z.p))
	}
	e.costOf(&x)
	cd := e.candidate(0, &x, refs, append([]Check(nil), c.checks...))
	if z != nil {
		cd.GateResistor = &GateResistor{Value: Num(z.rg), Power: Num(z.prg), PowerSteady: Num(z.prgSteady),
			Rating: GateResistorRating, Quiescent: Num(z.iq)}
	}
	return cd, z, true
}

// altFETs returns the MOSFETs of the stage other than own that pass every
// check with the design's Zener zener (nil: no clamp).
func altFETs(s *spec.Spec, cat *Catalog, opt Options, own, zener *catalog.Part, nfet bool) []altFound {
	var zs []diodeRec
	if zener != nil {
		z, ok := cat.zenerRec(zener)
		if !ok {
			return nil
		}
		zs = []diodeRec{z}
	}
	e := newEngine(s, withZeners(cat, zs), opt)
	fets := e.cat.pfets
	if nfet {
		fets = e.cat.nfets
	}
	var out []altFound
	for i := range fets {
		t := &fets[i]
		if t.p == own {
			continue
		}
		cd, z, ok := e.fetCandidate(t, nfet)
		if !ok || (z == nil) != (zener == nil) {
			continue
		}
		out = append(out, altFound{p: t.p, cand: cd})
	}
	return out
}

// altZeners returns the Zeners other than own that clamp the gate of the
// design's MOSFET fet with every check passing and the gate resistor rg.
func altZeners(s *spec.Spec, cat *Catalog, opt Options, fet, own *catalog.Part, rg float64, nfet bool) []altFound {
	fets := cat.pfets
	if nfet {
		fets = cat.nfets
	}
	var t *fetRec
	for i := range fets {
		if fets[i].p == fet {
			t = &fets[i]
		}
	}
	if t == nil {
		return nil
	}
	var out []altFound
	for _, z := range cat.zeners {
		if z.p == own {
			continue
		}
		// a fresh engine per Zener: the clamp cache is keyed by window only
		e := newEngine(s, withZeners(cat, []diodeRec{z}), opt)
		cd, zc, ok := e.fetCandidate(t, nfet)
		if !ok || zc == nil || zc.z.p != z.p || !sameValue(zc.rg, rg) {
			continue
		}
		out = append(out, altFound{p: z.p, cand: cd})
	}
	return out
}

func sameValue(a, b float64) bool {
	return math.Abs(a-b) <= 1e-9*math.Max(math.Abs(a), math.Abs(b))
}
