package topology

import (
	"fmt"
	"math"
	"sort"
	"strings"
	"sync"

	"partsieve/catalog"
	"partsieve/query/spec"
)

// cand is a qualifying design during ranking: indices into the role
// slices, the parts (for names and costs) and the figures it is ranked by.
type cand struct {
	a, b      int           // part indices (diode, fuse, FET); b: shunt diode of a pair, else -1
	pa, pb    *catalog.Part // nil in column catalogs until the candidate is shown
	ma, mb    string        // part numbers of a and b (mb "" when none)
	z         *zchoice
	m         metrics
	margin    float64
	marginID  checkID
	cost      float64
	costKnown bool
	// ua, ub: unit prices of a and b from their records, used when ra, rb
	// (parts not in memory in a column catalog ranked by cost)
	ua, ub float64
	ra, rb bool
}

// topN keeps the n best candidates by engine.less in a heap whose root is
// the worst kept one, and counts every candidate offered: the ranking
// never sorts (or holds) the whole list of qualifying designs.
type topN struct {
	e     *engine
	n     int
	h     []cand
	count int
}

func (t *topN) worse(i, j int) bool { return t.e.less(&t.h[j], &t.h[i]) }

func (t *topN) push(x cand) {
	t.count++
	if t.e.opt.Rank == RankCost {
		t.e.costOf(&x)
	}
	if len(t.h) < t.n {
		t.h = append(t.h, x)
		for i := len(t.h) - 1; i > 0; {
			p := (i - 1) / 2
			if !t.worse(i, p) {
				break
			}
			t.h[i], t.h[p] = t.h[p], t.h[i]
			i = p
		}
		return
	}
	if !t.e.less(&x, &t.h[0]) {
		return
	}
	t.h[0] = x
	for i := 0; ; {
		l, r, w := 2*i+1, 2*i+2, i
		if l < len(t.h) && t.worse(l, w) {
			w = l
		}
		if r < len(t.h) && t.worse(r, w) {
			w = r
		}
		if w == i {
			break
		}
		t.h[i], t.h[w] = t.h[w], t.h[i]
		i = w
	}
}

// sorted returns the kept candidates, best first.
func (t *topN) sorted() []cand {
	sort.Slice(t.h, func(i, j int) bool { return t.e.less(&t.h[i], &t.h[j]) })
	return t.h
}

// Evaluate picks candidates for spec s from the prepared catalog cat.
// It is the core of `partsieve pick`; Pick adds the catalog access.
func Evaluate(s *spec.Spec, cat *Catalog, opt Options) *Result {
	e := newEngine(s, cat, opt)
	r := &Result{
		Spec: s.File, Policy: e.pr.Name, Rank: e.opt.Rank, Top: e.opt.Top,
		Quantity: s.Build.Quantity, Currency: s.Build.Currency,
		Notes: append([]string(nil), s.Notes...), Cautions: Cautions,
	}
	// the topologies are independent: each runs on its own engine (the
	// engine's caches are not shared), concurrently
	var known []Topology
	for _, t := range e.opt.Topologies {
		switch t {
		case SeriesDiode, ShuntFuse, PFETHigh, NFETLow:
			known = append(known, t)
		}
	}
	r.Topologies = make([]TopologyResult, len(known))
	var wg sync.WaitGroup
	for k, t := range known {
		wg.Add(1)
		go func() {
			defer wg.Done()
			te := newEngine(s, cat, opt)
			switch t {
			case SeriesDiode:
				r.Topologies[k] = te.runSeries()
			case ShuntFuse:
				r.Topologies[k] = te.runShunt()
			case PFETHigh:
				r.Topologies[k] = te.runFET(false)
			case NFETLow:
				r.Topologies[k] = te.runFET(true)
			}
		}()
	}
	wg.Wait()
	for _, tr := range r.Topologies {
		r.Comparison = append(r.Comparison, compareRow(&tr, s.Build.Currency))
	}
	return r
}

func compareRow(tr *TopologyResult, cur string) CompareRow {
	row := CompareRow{Topology: tr.Topology, Currency: cur, Status: "none",
		Loss: Num(math.NaN()), Drop: Num(math.NaN()), Cost: Num(math.NaN()), MinMargin: Num(math.NaN())}
	var best *Candidate
	switch {
	case len(tr.Candidates) > 0:
		best, row.Status = &tr.Candidates[0], "ok"
	case len(tr.RankedOut) > 0:
		best, row.Status = &tr.RankedOut[0], "unsafe"
	}
	row.Hazards = append(row.Hazards, tr.Hazards...)
	if best == nil {
		if tr.NoneReason != "" {
			row.Hazards = append(row.Hazards, tr.NoneReason)
		}
		return row
	}
	var mpns []string
	for _, p := range best.Parts {
		mpns = append(mpns, p.MPN)
	}
	row.Parts = strings.Join(mpns, " + ")
	row.Loss, row.Drop, row.Cost, row.MinMargin = best.Loss, best.Drop, best.Cost, best.MinMargin
	row.Hazards = append(row.Hazards, best.Hazards...)
	return row
}

// less orders candidates by the ranking, then by MPN for stable output.
func (e *engine) less(x, y *cand) bool {
	switch e.opt.Rank {
	case RankMargin:
		if x.margin != y.margin {
			return x.margin > y.margin
		}
	case RankCost:
		xc, yc := x.cost, y.cost
		if !x.costKnown {
			xc = math.Inf(1)
		}
		if !y.costKnown {
			yc = math.Inf(1)
		}
		if xc != yc {
			return xc < yc
		}
	}
	if x.m.loss != y.m.loss {
		return x.m.loss < y.m.loss
	}
	if x.margin != y.margin {
		return x.margin > y.margin
	}
	if x.ma != y.ma {
		return x.ma < y.ma
	}
	if x.mb != "" && y.mb != "" && x.mb != y.mb {
		return x.mb < y.mb
	}
	return x.a < y.a
}

// costOf fills the candidate's cost from its parts (the gate resistor is
// not in the catalog and not costed).
func (e *engine) costOf(x *cand) {
	sum, known := 0.0, true
	for k, p := range [2]*catalog.Part{x.pa, x.pb} {
		var u float64
		switch {
		case p != nil:
			u = e.cost(p).unit
		case k == 0 && x.ra:
			u = x.ua
		case k == 1 && x.rb:
			u = x.ub
		default:
			continue
		}
		if math.IsNaN(u) {
			known = false
			continue
		}
		sum += u
	}
	x.cost, x.costKnown = sum, known
}

func (e *engine) partRef(role string, p *catalog.Part) PartRef {
	pc := e.cost(p)
	return PartRef{Role: role, Mfr: p.Mfr, MPN: p.MPN, Type: p.Type, Package: p.Package,
		UnitPrice: Num(pc.unit), Supplier: pc.supplier, Stock: pc.stock, PriceNote: pc.note}
}

// candidate builds the output form of x from its parts and recorded checks.
func (e *engine) candidate(rank int, x *cand, refs []PartRef, checks []Check) Candidate {
	c := Candidate{Rank: rank, Parts: refs, Loss: Num(x.m.loss), Drop: Num(x.m.drop), TjHot: Num(x.m.tj),
		DropCorner: "hot", MinMargin: Num(x.margin), Currency: e.s.Build.Currency, Checks: checks}
	if x.m.dropCold {
		c.DropCorner = "cold"
	}
	if math.IsInf(x.margin, 1) {
		c.MinMargin = Num(math.NaN())
	} else {
		c.MinMarginCheck = defs[x.marginID].role + ": " + defs[x.marginID].name
	}
	c.Cost = Num(math.NaN())
	if x.costKnown {
		c.Cost = Num(x.cost)
	}
	for _, r := range refs {
		if r.Stock != nil && (c.Stock == nil || *r.Stock < *c.Stock) {
			v := *r.Stock
			c.Stock = &v
		}
	}
	return c
}

func eliminations(counts *[numChecks]int) []Elimination {
	var out []Elimination
	for id, n := range counts {
		if n > 0 {
			out = append(out, Elimination{Check: defs[id].name, Role: defs[id].role, Count: n})
		}
	}
	sortElims(out)
	return out
}

func sortElims(out []Elimination) {
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].Count != out[j].Count {
			return out[i].Count > out[j].Count
		}
		return out[i].Role+out[i].Check < out[j].Role+out[j].Check
	})
}

// noneReason names the check that eliminated most parts.
func noneReason(tr *TopologyResult) string {
	if len(tr.Eliminated) == 0 {
		total := 0
		for _, n := range tr.Evaluated {
			total += n
		}
		if total == 0 {
			return "no part qualifies: the catalog holds no part for this topology"
		}
		return "no part qualifies"
	}
	e := tr.Eliminated[0]
	return fmt.Sprintf("no part qualifies: %q (%s) eliminated most parts (%d)", e.Check, e.Role, e.Count)
}

func (e *engine) finish(tr *TopologyResult) {
	if tr.Qualified == 0 && len(tr.RankedOut) == 0 {
		tr.NoneReason = noneReason(tr)
	}
	if tr.Candidates == nil {
		tr.Candidates = []Candidate{}
	}
	if tr.Eliminated == nil {
		tr.Eliminated = []Elimination{}
	}
}

// runSeries evaluates every diode as a series diode.
func (e *engine) runSeries() TopologyResult {
	tr := TopologyResult{Topology: SeriesDiode, Title: SeriesDiode.Title(), Evaluated: map[string]int{"diode": len(e.cat.diodes)}}
	var counts [numChecks]int
	var c checker
	top := topN{e: e, n: e.opt.Top}
	for i := range e.cat.diodes {
		d := &e.cat.diodes[i]
		c.reset(false, e.s.Ambient.TMax)
		m := e.seriesDiode(d, &c)
		if c.failed {
			counts[c.first]++
			continue
		}
		top.push(cand{a: i, b: -1, pa: d.p, ma: d.mpn, m: m, margin: c.minMargin, marginID: c.minID,
			ua: d.unit, ra: e.cat.units && d.p == nil})
	}
	cs := top.sorted()
	tr.Qualified = top.count
	var ids []int64
	for k := range cs {
		ids = append(ids, e.cat.diodes[cs[k].a].cid)
	}
	e.cat.need(ids)
	for k := range cs {
		x := &cs[k]
		d := &e.cat.diodes[x.a]
		c.reset(true, e.s.Ambient.TMax)
		e.seriesDiode(d, &c)
		x.pa = e.cat.part(d.p, d.cid)
		e.costOf(x)
		cd := e.candidate(k+1, x, []PartRef{e.partRef("diode", x.pa)}, append([]Check(nil), c.checks...))
		if d.schottky {
			cd.Hazards = append(cd.Hazards, "Schottky: leakage rises steeply with temperature; see the reverse-bias check")
		}
		tr.Candidates = append(tr.Candidates, cd)
	}
	tr.Eliminated = eliminations(&counts)
	if e.s.Load.VHoldup > 0 {
		tr.Notes = append(tr.Notes, fmt.Sprintf("the diode blocks v_reverse + v_holdup = %s while the input is reversed", fmtV(e.vrSeries)))
	}
	e.finish(&tr)
	return tr
}

// runFET evaluates every MOSFET of the channel type as the stage's switch.
func (e *engine) runFET(nfet bool) TopologyResult {
	topo, fets, role := PFETHigh, e.cat.pfets, "mosfet"
	if nfet {
		topo, fets = NFETLow, e.cat.nfets
	}
	tr := TopologyResult{Topology: topo, Title: topo.Title(), Evaluated: map[string]int{role: len(fets)}}
	var counts [numChecks]int
	var c checker
	top, out := topN{e: e, n: e.opt.Top}, topN{e: e, n: e.opt.Top}
	for i := range fets {
		t := &fets[i]
		c.reset(false, e.s.Ambient.TMax)
		m, z := e.fet(t, nfet, &c)
		x := cand{a: i, b: -1, pa: t.p, ma: t.mpn, z: z, m: m, margin: c.minMargin, marginID: c.minID,
			ua: t.unit, ra: e.cat.units && t.p == nil}
		if z != nil {
			x.pb, x.mb = z.z.p, z.z.mpn
			x.ub, x.rb = z.z.unit, e.cat.units && z.z.p == nil
		}
		if c.failed {
			counts[c.first]++
			if c.first == feBackfeed {
				out.push(x)
			}
			continue
		}
		top.push(x)
	}
	tr.Qualified = top.count
	build := func(list []cand) []Candidate {
		var res []Candidate
		var ids []int64
		for k := range list {
			ids = append(ids, fets[list[k].a].cid)
			if z := list[k].z; z != nil {
				ids = append(ids, z.z.cid)
			}
		}
		e.cat.need(ids)
		for k := range list {
			x := &list[k]
			t := &fets[x.a]
			c.reset(true, e.s.Ambient.TMax)
			_, z := e.fet(t, nfet, &c)
			x.pa = e.cat.part(t.p, t.cid)
			if z != nil {
				x.pb = e.cat.part(z.z.p, z.z.cid)
			}
			e.costOf(x)
			refs := []PartRef{e.partRef("mosfet", x.pa)}
			var gr *GateResistor
			if z != nil {
				refs = append(refs, e.partRef("zener", x.pb))
				gr = &GateResistor{Value: Num(z.rg), Power: Num(z.prg), PowerSteady: Num(z.prgSteady),
					Rating: GateResistorRating, Quiescent: Num(z.iq)}
			}
			cd := e.candidate(k+1, x, refs, append([]Check(nil), c.checks...))
			cd.GateResistor = gr
			if nfet {
				cd.Hazards = append(cd.Hazards, fmt.Sprintf("load ground lifted by %s at i_max", fmtV(x.m.drop)))
			}
			if e.backfeed != "" {
				cd.Unsafe = true
				cd.Hazards = append(cd.Hazards, "back-feed: "+e.backfeed)
			}
			res = append(res, cd)
		}
		return res
	}
	tr.Candidates = build(top.sorted())
	if e.backfeed != "" {
		tr.Unsafe = true
		tr.UnsafeReason = e.backfeed + ": a single MOSFET's channel conducts both ways, so it cannot block current flowing back"
		tr.RankedOut = build(out.sorted())
	} else {
		tr.Hazards = append(tr.Hazards, "blocks reverse polarity, not reverse current: if the input collapses while the gate is biased, the load side discharges back into the source")
	}
	if nfet {
		tr.Hazards = append(tr.Hazards, "the load's ground is lifted by i_max·R_DS(on), and any other ground path (signal lines, chassis, shield) bypasses the protection")
	}
	tr.Eliminated = eliminations(&counts)
	e.finish(&tr)
	return tr
}
