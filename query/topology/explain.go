package topology

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"partsieve/catalog"
	"partsieve/query/spec"
)

// RoleReport is every check of one part in one role of one topology.
type RoleReport struct {
	Topology Topology `json:"topology"`
	Role     string   `json:"role"`
	Pass     bool     `json:"pass"`
	// FirstFail names the first failing check (the one that eliminated
	// the part); empty when it passes.
	FirstFail string `json:"first_fail,omitempty"`
	// Partners are the parts it was checked with (the fuse of a shunt
	// diode, the diode of a fuse, the MOSFET stage of a Zener).
	Partners []PartRef `json:"partners,omitempty"`
	Checks   []Check   `json:"checks"`
	Note     string    `json:"note,omitempty"`
}

// ExplainedPart is one catalog part with its reports.
type ExplainedPart struct {
	Kind    string       `json:"kind"`
	Type    string       `json:"type,omitempty"`
	Mfr     string       `json:"mfr"`
	MPN     string       `json:"mpn"`
	Package string       `json:"package,omitempty"`
	Roles   []RoleReport `json:"roles"`
}

// Explanation is the output of `partsieve pick --explain MPN`.
type Explanation struct {
	MPN      string          `json:"mpn"`
	Spec     string          `json:"spec"`
	Policy   string          `json:"policy"`
	Parts    []ExplainedPart `json:"parts"`
	Cautions []string        `json:"cautions"`
}

// Explain reads the catalog like Pick, adds every part whose MPN matches
// mpn (compared as catalog.NormKey does), and reports every check of
// those parts in every role they can take. It fails when no part has
// that MPN.
func Explain(ctx context.Context, src Source, s *spec.Spec, mpn string, opt Options) (*Explanation, error) {
	ld, err := load(ctx, src, s, opt)
	if err != nil {
		return nil, err
	}
	own, err := src.Find(ctx, catalog.Query{Conds: []catalog.Cond{{Field: "mpn", Op: "=", Text: mpn}}, Offers: true})
	if err != nil {
		return nil, fmt.Errorf("explain %s: %w", mpn, err)
	}
	parts := ld.parts
	for _, p := range own {
		dup := false
		for i := range parts {
			if parts[i].Kind == p.Kind && catalog.NormKey(parts[i].Mfr) == catalog.NormKey(p.Mfr) && catalog.NormKey(parts[i].MPN) == catalog.NormKey(p.MPN) {
				dup = true
				break
			}
		}
		if !dup {
			parts = append(parts, p)
		}
	}
	return ExplainCatalog(s, NewCatalog(parts), mpn, opt)
}

// ExplainCatalog is Explain over a prepared catalog.
func ExplainCatalog(s *spec.Spec, cat *Catalog, mpn string, opt Options) (*Explanation, error) {
	e := newEngine(s, cat, opt)
	key := catalog.NormKey(mpn)
	ex := &Explanation{MPN: mpn, Spec: s.File, Policy: e.pr.Name, Cautions: Cautions}
	for i := range cat.parts {
		p := &cat.parts[i]
		if catalog.NormKey(p.MPN) != key {
			continue
		}
		ep := ExplainedPart{Kind: string(p.Kind), Type: p.Type, Mfr: p.Mfr, MPN: p.MPN, Package: p.Package}
		ep.Roles = e.explainPart(p)
		ex.Parts = append(ex.Parts, ep)
	}
	if len(ex.Parts) == 0 {
		return nil, fmt.Errorf("explain: no part with MPN %q in the catalog", mpn)
	}
	return ex, nil
}

func report(t Topology, role string, c *checker) RoleReport {
	r := RoleReport{Topology: t, Role: role, Pass: !c.failed, Checks: append([]Check{}, c.checks...)}
	if c.failed {
		r.FirstFail = defs[c.first].role + ": " + defs[c.first].name
	}
	return r
}

func (e *engine) explainPart(p *catalog.Part) []RoleReport {
	var out []RoleReport
	var c checker
	tmax := e.s.Ambient.TMax
	for i := range e.cat.diodes {
		d := &e.cat.diodes[i]
		if d.p != p {
			continue
		}
		if e.opt.wants(SeriesDiode) {
			c.reset(true, tmax)
			e.seriesDiode(d, &c)
			out = append(out, report(SeriesDiode, "diode", &c))
		}
		if e.opt.wants(ShuntFuse) {
			out = append(out, e.explainShuntDiode(d))
		}
	}
	for i := range e.cat.fuses {
		if f := &e.cat.fuses[i]; f.p == p && e.opt.wants(ShuntFuse) {
			out = append(out, e.explainFuse(f))
		}
	}
	for _, nfet := range []bool{false, true} {
		fets, topo := e.cat.pfets, PFETHigh
		if nfet {
			fets, topo = e.cat.nfets, NFETLow
		}
		for i := range fets {
			if t := &fets[i]; t.p == p && e.opt.wants(topo) {
				c.reset(true, tmax)
				_, z := e.fet(t, nfet, &c)
				r := report(topo, "mosfet", &c)
				if z != nil {
					r.Partners = append(r.Partners, e.partRef("zener", z.z.p))
				}
				if e.backfeed != "" {
					r.Note = "unsafe here: " + e.backfeed
				}
				out = append(out, r)
			}
		}
	}
	for i := range e.cat.zeners {
		if z := &e.cat.zeners[i]; z.p == p {
			out = append(out, e.explainZener(z)...)
		}
	}
	if len(out) == 0 {
		out = append(out, RoleReport{Role: string(p.Kind), Checks: []Check{},
			Note: fmt.Sprintf("no topology uses a %s %s (diodes: rectifier, Schottky, Zener; MOSFETs: n, p; fuses)", p.Type, p.Kind)})
	}
	return out
}

// fuseSurvivors returns the fuses that pass their own checks.
func (e *engine) fuseSurvivors() []fuseS {
	var c checker
	var fs []fuseS
	for i := range e.cat.fuses {
		c.reset(false, e.s.Ambient.TMax)
		m := e.fuse(&e.cat.fuses[i], &c)
		if !c.failed {
			fs = append(fs, fuseS{idx: i, m: m, margin: c.minMargin, marginID: c.minID})
		}
	}
	return fs
}

// explainShuntDiode reports d's own checks as a shunt diode and the pair
// checks with the best fuse it pairs with (or, when none does, with the
// surviving fuse of smallest clearing I²t, the likeliest partner).
func (e *engine) explainShuntDiode(d *diodeRec) RoleReport {
	var c checker
	c.reset(false, e.s.Ambient.TMax)
	dm := e.shuntDiode(d, &c)
	fm, fok := e.forward(d)
	ownOK := !c.failed && fok
	var bestF *fuseS
	var bestC cand
	if ownOK {
		for _, f := range e.fuseSurvivors() {
			f := f
			fr := &e.cat.fuses[f.idx]
			c.reset(false, e.s.Ambient.TMin)
			pm := e.pair(fr, f.m, d, dm, &fm, &c)
			x := cand{a: f.idx, b: -1, pa: fr.p, m: pm, margin: c.minMargin}
			if e.opt.Rank == RankCost {
				e.costOf(&x)
			}
			if !c.failed && (bestF == nil || e.less(&x, &bestC)) {
				bestF, bestC = &f, x
			}
		}
	}
	note := ""
	if bestF == nil && ownOK {
		fs := e.fuseSurvivors()
		sort.Slice(fs, func(i, j int) bool {
			return e.cat.fuses[fs[i].idx].clearing().Value < e.cat.fuses[fs[j].idx].clearing().Value
		})
		if len(fs) > 0 {
			bestF = &fs[0]
			note = "no fuse pairs with this diode; shown with the qualifying fuse of smallest clearing I²t"
		} else {
			note = "no fuse passes its own checks, so the pair checks cannot be shown"
		}
	} else if bestF != nil {
		note = "paired with the best fuse for it by the ranking"
	} else {
		note = "fails its own checks; the pair checks are not shown"
	}
	c.reset(true, e.s.Ambient.TMax)
	dm = e.shuntDiode(d, &c)
	var partners []PartRef
	if bestF != nil && fok {
		fr := &e.cat.fuses[bestF.idx]
		e.pair(fr, bestF.m, d, dm, &fm, &c)
		partners = append(partners, e.partRef("fuse", fr.p))
	}
	r := report(ShuntFuse, "shunt-diode", &c)
	r.Partners, r.Note = partners, note
	return r
}

// explainFuse reports f's own checks and the pair checks with the best
// diode for it (or the diode of largest surge capability when none pairs).
func (e *engine) explainFuse(f *fuseRec) RoleReport {
	var c checker
	c.reset(false, e.s.Ambient.TMax)
	fmet := e.fuse(f, &c)
	ownOK := !c.failed
	var best, biggest *diodeRec
	var bestC cand
	bestCap := math.Inf(-1)
	if ownOK {
		for i := range e.cat.diodes {
			d := &e.cat.diodes[i]
			c.reset(false, e.s.Ambient.TMax)
			dm := e.shuntDiode(d, &c)
			fm, ok := e.forward(d)
			if c.failed || !ok {
				continue
			}
			if dm.cap > bestCap {
				bestCap, biggest = dm.cap, d
			}
			c.reset(false, e.s.Ambient.TMin)
			pm := e.pair(f, fmet, d, dm, &fm, &c)
			x := cand{a: i, b: -1, pa: d.p, m: pm, margin: c.minMargin}
			if e.opt.Rank == RankCost {
				e.costOf(&x)
			}
			if !c.failed && (best == nil || e.less(&x, &bestC)) {
				best, bestC = d, x
			}
		}
	}
	note := ""
	switch {
	case best != nil:
		note = "paired with the best shunt diode for it by the ranking"
	case biggest != nil:
		best = biggest
		note = "no shunt diode pairs with this fuse; shown with the qualifying diode of largest surge capability"
	case ownOK:
		note = "no shunt diode passes its own checks, so the pair checks cannot be shown"
	default:
		note = "fails its own checks; the pair checks are not shown"
	}
	c.reset(true, e.s.Ambient.TMax)
	fmet = e.fuse(f, &c)
	var partners []PartRef
	if best != nil {
		var dc checker
		dc.reset(false, e.s.Ambient.TMax)
		dm := e.shuntDiode(best, &dc)
		fm, _ := e.forward(best)
		e.pair(f, fmet, best, dm, &fm, &c)
		partners = append(partners, e.partRef("shunt-diode", best.p))
	}
	r := report(ShuntFuse, "fuse", &c)
	r.Partners, r.Note = partners, note
	return r
}

// explainZener reports Zener z against every clamp window the catalog's
// MOSFETs need for this spec.
func (e *engine) explainZener(z *diodeRec) []RoleReport {
	var out []RoleReport
	for _, nfet := range []bool{false, true} {
		topo := PFETHigh
		if nfet {
			topo = NFETLow
		}
		if !e.opt.wants(topo) {
			continue
		}
		e.runFET(nfet) // fills the window cache with the windows the MOSFETs need
		var keys []zkey
		for k := range e.zcache {
			if k.nfet == nfet {
				keys = append(keys, k)
			}
		}
		sort.Slice(keys, func(i, j int) bool {
			if keys[i].lo != keys[j].lo {
				return keys[i].lo < keys[j].lo
			}
			return keys[i].hi < keys[j].hi
		})
		if len(keys) == 0 {
			out = append(out, RoleReport{Topology: topo, Role: "zener", Pass: true, Checks: []Check{},
				Note: "no MOSFET of this stage needs a Zener clamp here"})
			continue
		}
		for _, k := range keys {
			var c checker
			c.reset(true, e.s.Ambient.TMax)
			ch, ok := e.zenerEval(z, k)
			if !ok {
				c.missing(feZener, "V_Z, its tolerance or the power rating")
			} else {
				c.add(feZener, ch.vzMax, k.hi)
				c.note(fmt.Sprintf("V_Z = %s ± %.0f %%: %s…%s", fmtV(z.vz), 100*z.vzTol, fmtV(ch.vzMin), fmtV(ch.vzMax)))
				c.add(feZenerDrive, ch.vzMin, k.lo)
				c.add(feZenerPower, ch.pz, ch.pzLimit)
				c.note(fmt.Sprintf("R_G = %s, I_Z = %s at %s", fmtR(ch.rg), fmtA(ch.izMax), fmtV(ch.vinZ)))
				c.add(feRGPower, ch.prg, GateResistorMaxPower)
			}
			r := report(topo, "zener", &c)
			chosen := e.zcache[k]
			r.Note = fmt.Sprintf("window for MOSFETs rated at V_GS = %s with k_vgs·V_GS,max = %s", fmtV(k.lo), fmtV(k.hi))
			if chosen.ok {
				if chosen.z == z {
					r.Note += "; this Zener is the one chosen for the window"
				} else {
					r.Note += "; the chosen Zener is " + chosen.z.mpn
				}
			}
			out = append(out, r)
		}
	}
	return out
}

// String summarises a report in one line, for logs and tests.
func (r RoleReport) String() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s/%s pass=%v", r.Topology, r.Role, r.Pass)
	if r.FirstFail != "" {
		fmt.Fprintf(&b, " first-fail=%q", r.FirstFail)
	}
	return b.String()
}
