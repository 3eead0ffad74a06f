package topology

import (
	"fmt"
	"math"
	"sort"

	"partsieve/catalog"
	"partsieve/query/physics"
)

// maxFallbackScan bounds the pair evaluations per fuse when none of the
// pre-selected diodes pairs with it (a tool choice that keeps the pick
// fast on large catalogs; the diodes scanned are those whose surge rating
// covers the fuse).
const maxFallbackScan = 4096

// shuntD is a shunt diode that passed its own checks.
type shuntD struct {
	idx      int
	fm       physics.ForwardModel
	m        metrics
	margin   float64
	marginID checkID
	key      float64
}

// fuseS is a fuse that passed its own checks.
type fuseS struct {
	idx      int
	m        metrics
	margin   float64
	marginID checkID
}

// runShunt evaluates the shunt-fuse topology. Fuses and diodes are first
// checked on their own; only survivors are paired. Diodes are sorted by
// their derated I²t capability, so for each fuse a binary search finds
// the diodes whose surge rating can cover the fuse's clearing I²t; among
// those the best few by the ranking are tried first (a table of the best
// diodes of every suffix, built once), and the rest are scanned only when
// none of them pairs. The cost is O((F + D)·log D + F·K) pair
// evaluations instead of F·D.
func (e *engine) runShunt() TopologyResult {
	s := e.s
	tr := TopologyResult{Topology: ShuntFuse, Title: ShuntFuse.Title(),
		Evaluated: map[string]int{"fuse": len(e.cat.fuses), "shunt-diode": len(e.cat.diodes)}}
	var counts [numChecks]int
	var c checker

	var fs []fuseS
	for i := range e.cat.fuses {
		c.reset(false, s.Ambient.TMax)
		m := e.fuse(&e.cat.fuses[i], &c)
		if c.failed {
			counts[c.first]++
			continue
		}
		fs = append(fs, fuseS{idx: i, m: m, margin: c.minMargin, marginID: c.minID})
	}
	var ds []shuntD
	for i := range e.cat.diodes {
		d := &e.cat.diodes[i]
		c.reset(false, s.Ambient.TMax)
		m := e.shuntDiode(d, &c)
		if c.failed {
			counts[c.first]++
			continue
		}
		fm, ok := e.forward(d)
		if !ok || !has(m.cap) {
			counts[shSurgeData]++
			continue
		}
		x := shuntD{idx: i, fm: fm, m: m, margin: c.minMargin, marginID: c.minID}
		switch e.opt.Rank {
		case RankMargin:
			x.key = -x.margin
		case RankCost:
			x.key = e.cost(d.p).unit
			if math.IsNaN(x.key) {
				x.key = math.Inf(1)
			}
		default:
			x.key = m.extra
		}
		ds = append(ds, x)
	}
	sort.Slice(ds, func(i, j int) bool {
		if ds[i].m.cap != ds[j].m.cap {
			return ds[i].m.cap < ds[j].m.cap
		}
		return ds[i].idx < ds[j].idx
	})

	// best K diodes (by key) of every suffix ds[s:]
	n, K := len(ds), e.opt.PairsPerFuse+2
	top := make([]int32, n*K)
	for i := range top {
		top[i] = -1
	}
	for i := n - 1; i >= 0; i-- {
		row := top[i*K : (i+1)*K]
		if i+1 < n {
			copy(row, top[(i+1)*K:(i+2)*K])
		}
		// insert i by key
		pos := K
		for k := 0; k < K; k++ {
			if row[k] < 0 || ds[i].key < ds[row[k]].key || ds[i].key == ds[row[k]].key && ds[i].idx < ds[row[k]].idx {
				pos = k
				break
			}
		}
		if pos < K {
			copy(row[pos+1:], row[pos:K-1])
			row[pos] = int32(i)
		}
	}

	var pairs []cand
	paired := 0
	var tmp []cand
	for _, f := range fs {
		fr := &e.cat.fuses[f.idx]
		need := fr.clearing().Value
		if !has(need) {
			counts[prI2t]++
			continue
		}
		start := sort.Search(n, func(i int) bool { return ds[i].m.cap >= need })
		if start == n {
			counts[prI2t]++
			continue
		}
		firstFail, failedAny := checkID(0), false
		tmp = tmp[:0]
		try := func(j int) {
			dd := &ds[j]
			c.reset(false, s.Ambient.TMin)
			pm := e.pair(fr, f.m, &e.cat.diodes[dd.idx], dd.m, &dd.fm, &c)
			if c.failed {
				if !failedAny {
					firstFail, failedAny = c.first, true
				}
				return
			}
			x := cand{a: f.idx, b: dd.idx, m: pm, margin: c.minMargin, marginID: c.minID, mpn: fr.p.MPN + "+" + e.cat.diodes[dd.idx].p.MPN}
			if f.margin < x.margin {
				x.margin, x.marginID = f.margin, f.marginID
			}
			if dd.margin < x.margin {
				x.margin, x.marginID = dd.margin, dd.marginID
			}
			tmp = append(tmp, x)
		}
		for _, j := range top[start*K : (start+1)*K] {
			if j < 0 || len(tmp) >= e.opt.PairsPerFuse {
				break
			}
			try(int(j))
		}
		if len(tmp) == 0 && n-start > K {
			tried := top[start*K : (start+1)*K]
			scanned := 0
			for j := start; j < n && scanned < maxFallbackScan; j++ {
				if contains(tried, int32(j)) {
					continue
				}
				scanned++
				try(j)
			}
			if len(tmp) > 0 {
				e.rankCosts(tmp, e.pairParts)
				tmp = tmp[:min(len(tmp), e.opt.PairsPerFuse)]
			}
		}
		if len(tmp) == 0 {
			counts[firstFail]++
			continue
		}
		paired++
		pairs = append(pairs, tmp...)
	}
	e.rankCosts(pairs, e.pairParts)
	tr.Qualified = len(pairs)
	for k := range pairs[:min(len(pairs), e.opt.Top)] {
		x := &pairs[k]
		fr, d := &e.cat.fuses[x.a], &e.cat.diodes[x.b]
		c.reset(true, s.Ambient.TMax)
		fmet := e.fuse(fr, &c)
		dmet := e.shuntDiode(d, &c)
		fm, _ := e.forward(d)
		e.pair(fr, fmet, d, dmet, &fm, &c)
		e.costOf(x, fr.p, d.p)
		cd := e.candidate(k+1, x, []PartRef{e.partRef("fuse", fr.p), e.partRef("shunt-diode", d.p)}, append([]Check(nil), c.checks...))
		cd.FaultCurrent, cd.ClampVoltage = Num(x.m.iFault), Num(x.m.vClamp)
		if fr.clearing().Estimated {
			cd.Hazards = append(cd.Hazards, "fuse clearing I²t estimated from its melting I²t")
		}
		if x.m.iFault > 0 && fr.clearing().Value/(x.m.iFault*x.m.iFault) > d.ifsmT {
			cd.Hazards = append(cd.Hazards, "fuse clears slower than the diode's surge pulse: check the multi-cycle surge curve")
		}
		tr.Candidates = append(tr.Candidates, cd)
	}
	tr.Eliminated = eliminations(&counts)
	tr.Hazards = append(tr.Hazards, "after a reversal the fuse has opened and must be replaced")
	if s.Supply.HighFaultCurrent() {
		tr.Hazards = append(tr.Hazards, fmt.Sprintf("a short of this %s draws up to %s (bolted): wiring and contacts must carry it until the fuse clears",
			s.Supply.Kind, fmtA(e.iBolted)))
	}
	tr.Notes = append(tr.Notes, fmt.Sprintf("%d of %d fuses that pass on their own pair with a shunt diode (%d diodes pass on their own); up to %d diodes are kept per fuse",
		paired, len(fs), len(ds), e.opt.PairsPerFuse))
	e.finish(&tr)
	return tr
}

func (e *engine) pairParts(x *cand) []*catalog.Part {
	return []*catalog.Part{e.cat.fuses[x.a].p, e.cat.diodes[x.b].p}
}

func contains(s []int32, v int32) bool {
	for _, x := range s {
		if x == v {
			return true
		}
	}
	return false
}
