package topology

import (
	"context"
	"fmt"
	"math"

	"partsieve/catalog"
	"partsieve/query/spec"
)

// Point is an operating point of a sweep: the load current (A) that
// replaces load.i_max and the ambient temperature (°C) that replaces
// ambient.t_max, the hot corner.
type Point struct {
	Current float64 `json:"current"`
	Ambient float64 `json:"ambient"`
}

// OperatingPoint is a design evaluated again at one Point, with every
// check of its topology. The figures mean what they mean in Candidate:
// at the Point (i_max, t_max) of the spec they are the candidate's own.
type OperatingPoint struct {
	Point
	// Loss is the stage's dissipation at its worse corner (W).
	Loss Num `json:"loss"`
	// Drop is the stage's voltage drop at its worse corner (V).
	Drop Num `json:"drop"`
	// TjHot is the hottest junction at the hot corner (°C); +Inf (null in
	// JSON) when the junction has no stable operating point (runaway).
	TjHot Num `json:"tj_hot"`
	// TjLimit is the limit the junction-temperature check applies:
	// min(tj_limit, T_jmax − margin) of the policy (°C).
	TjLimit Num `json:"tj_limit"`
	// MinMargin is the smallest margin over all checks.
	MinMargin Num `json:"min_margin"`
	// Pass is true when every check passes; FirstFail names the first
	// check that fails ("role: name"), in evaluation order.
	Pass      bool   `json:"pass"`
	FirstFail string `json:"first_fail,omitempty"`
}

// roleKind is the catalog kind of the part that takes a candidate role.
func roleKind(role string) (catalog.Kind, bool) {
	switch role {
	case "diode", "shunt-diode", "zener":
		return catalog.Diode, true
	case "fuse":
		return catalog.Fuse, true
	case "mosfet":
		return catalog.MOSFET, true
	}
	return "", false
}

// findPart returns the part of cat that matches ref (kind, maker and part
// number compared as catalog.NormKey does).
func (c *Catalog) findPart(ref PartRef) (catalog.Part, error) {
	kind, ok := roleKind(ref.Role)
	if !ok {
		return catalog.Part{}, fmt.Errorf("part %s: unknown role %q", ref.MPN, ref.Role)
	}
	mfr, mpn := catalog.NormKey(ref.Mfr), catalog.NormKey(ref.MPN)
	for i := range c.parts {
		p := &c.parts[i]
		if p.Kind == kind && catalog.NormKey(p.MPN) == mpn && catalog.NormKey(p.Mfr) == mfr {
			return *p, nil
		}
	}
	return catalog.Part{}, fmt.Errorf("part %s (%s, %s) is not in the catalog given", ref.MPN, ref.Mfr, ref.Role)
}

// Sweep evaluates design c of topology t again for spec s at each point
// of at: a copy of s with load.i_max and ambient.t_max replaced by the
// point's current and ambient, everything else (t_min for the cold
// corner, the supply, the budgets, the policy) as in s. The parts of c are
// taken from cat by role, maker and part number; the MOSFET stages keep
// the candidate's own Zener, and with it the same gate resistor (both
// depend on the supply alone). Every check is evaluated at every point,
// so a point past a rating reports the check that fails there.
//
// It serves the plots of the visual report: loss against load current
// and junction temperature against ambient.
func Sweep(s *spec.Spec, cat *Catalog, t Topology, c *Candidate, at []Point) ([]OperatingPoint, error) {
	if s == nil || cat == nil || c == nil {
		return nil, fmt.Errorf("sweep: spec, catalog and candidate are required")
	}
	parts := make([]catalog.Part, 0, len(c.Parts))
	roles := map[string]int{}
	for _, ref := range c.Parts {
		p, err := cat.findPart(ref)
		if err != nil {
			return nil, fmt.Errorf("sweep %s: %w", t, err)
		}
		roles[ref.Role] = len(parts)
		parts = append(parts, p)
	}
	// a catalog of the design's parts alone: the MOSFET stages then find
	// the candidate's own Zener
	sub := NewCatalog(parts)
	need := map[Topology][]string{
		SeriesDiode: {"diode"},
		ShuntFuse:   {"fuse", "shunt-diode"},
		PFETHigh:    {"mosfet"},
		NFETLow:     {"mosfet"},
	}[t]
	if need == nil {
		return nil, fmt.Errorf("sweep: unknown topology %q", t)
	}
	for _, r := range need {
		if _, ok := roles[r]; !ok {
			return nil, fmt.Errorf("sweep %s: the candidate has no %s", t, r)
		}
	}
	out := make([]OperatingPoint, 0, len(at))
	var chk checker
	for _, pt := range at {
		if math.IsNaN(pt.Current) || math.IsNaN(pt.Ambient) || pt.Current < 0 {
			return nil, fmt.Errorf("sweep %s: invalid point %g A, %g °C", t, pt.Current, pt.Ambient)
		}
		s2 := *s
		s2.Load.IMax, s2.Ambient.TMax = pt.Current, pt.Ambient
		e := newEngine(&s2, sub, Options{})
		chk.reset(true, pt.Ambient)
		var m metrics
		tjID := sdTjHot
		switch t {
		case SeriesDiode:
			if len(sub.diodes) != 1 {
				return nil, fmt.Errorf("sweep %s: %s is not a rectifier or Schottky diode", t, c.Parts[roles["diode"]].MPN)
			}
			m = e.seriesDiode(&sub.diodes[0], &chk)
		case ShuntFuse:
			if len(sub.fuses) != 1 || len(sub.diodes) != 1 {
				return nil, fmt.Errorf("sweep %s: the candidate needs one fuse and one rectifier or Schottky diode", t)
			}
			f, d := &sub.fuses[0], &sub.diodes[0]
			fm := e.fuse(f, &chk)
			dm := e.shuntDiode(d, &chk)
			model, _ := e.forward(d)
			m = e.pair(f, fm, d, dm, &model, &chk)
			tjID = shLeakTj
		case PFETHigh, NFETLow:
			nfet := t == NFETLow
			fets := sub.pfets
			if nfet {
				fets = sub.nfets
			}
			if len(fets) != 1 {
				return nil, fmt.Errorf("sweep %s: %s is not a MOSFET of the stage's channel type", t, c.Parts[roles["mosfet"]].MPN)
			}
			m, _ = e.fet(&fets[0], nfet, &chk)
			tjID = feTjHot
		}
		op := OperatingPoint{Point: pt, Loss: Num(m.loss), Drop: Num(m.drop), TjHot: Num(m.tj),
			TjLimit: Num(math.NaN()), MinMargin: Num(chk.minMargin), Pass: !chk.failed}
		if math.IsInf(chk.minMargin, 1) {
			op.MinMargin = Num(math.NaN())
		}
		if chk.failed {
			op.FirstFail = defs[chk.first].role + ": " + defs[chk.first].name
		}
		for _, k := range chk.checks {
			if k.Name == defs[tjID].name && k.Role == defs[tjID].role {
				op.TjLimit = k.Limit
				if math.IsInf(float64(k.Value), 1) {
					op.TjHot = k.Value // no stable point
				}
				break
			}
		}
		out = append(out, op)
	}
	return out, nil
}

// CandidateParts reads from src the catalog parts of every design listed
// in r (candidates and ranked-out designs), once each, so that Sweep can
// evaluate them again: NewCatalog(parts) prepares them.
func CandidateParts(ctx context.Context, src Source, r *Result) ([]catalog.Part, error) {
	type key struct {
		kind     catalog.Kind
		mfr, mpn string
	}
	seen := map[key]bool{}
	fetched := map[string][]catalog.Part{}
	var out []catalog.Part
	for _, tr := range r.Topologies {
		for _, list := range [][]Candidate{tr.Candidates, tr.RankedOut} {
			for _, c := range list {
				for _, ref := range c.Parts {
					kind, ok := roleKind(ref.Role)
					if !ok {
						continue
					}
					k := key{kind, catalog.NormKey(ref.Mfr), catalog.NormKey(ref.MPN)}
					if seen[k] {
						continue
					}
					seen[k] = true
					ps, ok := fetched[k.mpn]
					if !ok {
						var err error
						ps, err = src.Find(ctx, catalog.Query{Conds: []catalog.Cond{{Field: "mpn", Op: "=", Text: ref.MPN}}})
						if err != nil {
							return nil, fmt.Errorf("reading part %s: %w", ref.MPN, err)
						}
						fetched[k.mpn] = ps
					}
					found := false
					for _, p := range ps {
						if p.Kind == kind && catalog.NormKey(p.Mfr) == k.mfr && catalog.NormKey(p.MPN) == k.mpn {
							out = append(out, p)
							found = true
							break
						}
					}
					if !found {
						return nil, fmt.Errorf("part %s (%s) is no longer in the catalog", ref.MPN, ref.Mfr)
					}
				}
			}
		}
	}
	return out, nil
}
