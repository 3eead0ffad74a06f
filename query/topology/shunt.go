package topology

import (
	"fmt"
	"math"
	"sort"

	"partsieve/query/physics"
)

// maxPairTries bounds the pair evaluations per fuse (a tool choice that
// keeps the pick fast on large catalogs). The index already excludes the
// diodes that cannot pass the clamp and surge checks with the fuse, so
// the first diodes tried nearly always pair; the bound is reached only in
// contrived catalogs.
const maxPairTries = 256

// shuntD is a shunt diode that passed its own checks.
type shuntD struct {
	idx      int
	fm       physics.ForwardModel
	m        metrics
	margin   float64
	marginID checkID
	key      float64
	rstar    float64 // smallest R_ext at which the clamp check passes
}

// fuseS is a fuse that passed its own checks.
type fuseS struct {
	idx      int
	m        metrics
	margin   float64
	marginID checkID
}

// runShunt evaluates the shunt-fuse topology. Fuses and diodes are first
// checked on their own; only survivors are paired, never as a cross
// product:
//
//   - the clamp check passes exactly when the fuse's external resistance
//     R_ext = r_source + R_cold is at least the diode's threshold
//     R* = (v_reverse − v_reverse_max)/I*, with V_F(I*, t_min) =
//     v_reverse_max (the fault current falls as R_ext rises); fuses are
//     visited in rising R_ext and diodes become active as R* is reached;
//   - the surge check needs I²t_cap ≥ max(I²t_clear, I_lo·√(I²t_clear·t_p))
//     with I_lo = (v_reverse − v_reverse_max)/R_ext (the lowest fault
//     current of a pair that passes the clamp; the second term is the
//     I²√t conversion to the clearing time); diodes are sorted by I²t_cap,
//     so a binary search gives the suffix of diodes strong enough;
//   - a segment tree over that order returns the best active diodes of the
//     suffix by the ranking; they are evaluated exactly, best first.
//
// The cost is O((F + D)·log D) plus a few exact pair evaluations per fuse.
func (e *engine) runShunt() TopologyResult {
	s := e.s
	tr := TopologyResult{Topology: ShuntFuse, Title: ShuntFuse.Title(),
		Evaluated: map[string]int{"fuse": len(e.cat.fuses), "shunt-diode": len(e.cat.diodes)}}
	var counts [numChecks]int

	// fuses and diodes are checked on their own in parallel chunks (each
	// with its own engine: the engines' caches are not shared), each
	// chunk compacting its survivors at its start; the chunks are then
	// joined in order, so the result does not depend on the split
	fs := hugeMake[fuseS](len(e.cat.fuses))[:len(e.cat.fuses)]
	fcnt := e.chunks(len(fs), func(we *engine, lo, hi int, counts *[numChecks]int) int {
		var c checker
		k := lo
		for i := lo; i < hi; i++ {
			c.reset(false, s.Ambient.TMax)
			m := we.fuse(&we.cat.fuses[i], &c)
			if c.failed {
				counts[c.first]++
				continue
			}
			fs[k] = fuseS{idx: i, m: m, margin: c.minMargin, marginID: c.minID}
			k++
		}
		return k - lo
	}, &counts)
	fs = joinChunks(fs, fcnt)
	vrev, vrm := s.Supply.VReverse, s.Load.VReverseMax
	ds := hugeMake[shuntD](len(e.cat.diodes))[:len(e.cat.diodes)]
	dcnt := e.chunks(len(ds), func(we *engine, lo, hi int, counts *[numChecks]int) int {
		var c checker
		k := lo
		for i := lo; i < hi; i++ {
			d := &we.cat.diodes[i]
			c.reset(false, s.Ambient.TMax)
			m := we.shuntDiode(d, &c)
			if c.failed {
				counts[c.first]++
				continue
			}
			fm, ok := we.forward(d)
			if !ok || !has(m.cap) {
				counts[shSurgeData]++
				continue
			}
			x := shuntD{idx: i, fm: fm, m: m, margin: c.minMargin, marginID: c.minID, rstar: clampThreshold(&fm, vrev, vrm, s.Ambient.TMin)}
			switch we.opt.Rank {
			case RankMargin:
				x.key = -x.margin
			case RankCost:
				x.key = we.unitOf(d.p, d.unit)
				if math.IsNaN(x.key) {
					x.key = math.Inf(1)
				}
			default:
				x.key = m.extra
			}
			ds[k] = x
			k++
		}
		return k - lo
	}, &counts)
	ds = joinChunks(ds, dcnt)
	tpMin := math.Inf(1)
	for i := range ds {
		tpMin = math.Min(tpMin, e.cat.diodes[ds[i].idx].ifsmT)
	}
	var c checker
	// fuses by rising external resistance, sorted beside the diodes
	byRext := make([]keyed, len(fs))
	fuseSorted := make(chan struct{})
	go func() {
		defer close(fuseSorted)
		for k := range fs {
			rc := e.cat.fuses[fs[k].idx].rcold
			if !has(rc) {
				rc = 0
			}
			byRext[k] = keyed{s.Supply.RSource + rc, fs[k].idx, int32(k)}
		}
		sortKeyed(byRext)
	}()
	// positions: diodes by rising capability (ds itself is not moved);
	// sorting small (value, tie, index) records keeps the sorts cheap
	n := len(ds)
	byCap := make([]keyed, n)
	for i := range ds {
		byCap[i] = keyed{ds[i].m.cap, ds[i].idx, int32(i)}
	}
	sortKeyed(byCap)
	perm := make([]int32, n)
	caps := make([]float64, n)
	keys, ties := make([]float64, n), make([]int, n)
	byR := make([]keyed, n) // positions by rising R*
	for p, r := range byCap {
		i := r.i
		perm[p], caps[p], keys[p], ties[p] = i, ds[i].m.cap, ds[i].key, ds[i].idx
		byR[p] = keyed{ds[i].rstar, p, int32(p)}
	}
	sortKeyed(byR)
	tree := newBestK(n, e.opt.PairsPerFuse, keys, ties)
	<-fuseSorted

	pairs := topN{e: e, n: e.opt.Top}
	var tmp []cand
	var got, removed []int32
	paired, active := 0, 0
	for _, fo := range byRext {
		f := &fs[fo.i]
		fr := &e.cat.fuses[f.idx]
		re := fo.v
		for active < n && byR[active].v <= re {
			tree.set(int(byR[active].i), true)
			active++
		}
		need := fr.clearing().Value
		if !has(need) {
			counts[prI2t]++
			continue
		}
		ilo := math.Max(0, vrev-vrm) / re
		thr := math.Max(need, ilo*math.Sqrt(need*tpMin))
		start := sort.Search(n, func(i int) bool { return caps[i] >= thr })
		if start == n {
			counts[prI2t]++
			continue
		}
		firstFail, failedAny := checkID(0), false
		tmp, removed = tmp[:0], removed[:0]
		tries := 0
		for len(tmp) < e.opt.PairsPerFuse && tries < maxPairTries {
			got = tree.query(start, got[:0])
			if len(got) == 0 {
				break
			}
			for _, j := range got {
				if len(tmp) >= e.opt.PairsPerFuse || tries >= maxPairTries {
					break
				}
				tries++
				tree.set(int(j), false)
				removed = append(removed, j)
				dd := &ds[perm[j]]
				c.reset(false, s.Ambient.TMin)
				pm := e.pair(fr, f.m, &e.cat.diodes[dd.idx], dd.m, &dd.fm, &c)
				if c.failed {
					if !failedAny {
						firstFail, failedAny = c.first, true
					}
					continue
				}
				dr := &e.cat.diodes[dd.idx]
				x := cand{a: f.idx, b: dd.idx, pa: fr.p, pb: dr.p, ma: fr.mpn, mb: dr.mpn, m: pm, margin: c.minMargin, marginID: c.minID,
					ua: fr.unit, ra: e.cat.units && fr.p == nil, ub: dr.unit, rb: e.cat.units && dr.p == nil}
				if f.margin < x.margin {
					x.margin, x.marginID = f.margin, f.marginID
				}
				if dd.margin < x.margin {
					x.margin, x.marginID = dd.margin, dd.marginID
				}
				tmp = append(tmp, x)
			}
		}
		for _, j := range removed {
			tree.set(int(j), true)
		}
		if len(tmp) == 0 {
			if !failedAny {
				firstFail = prClamp // strong enough diodes exist, none clamps low enough
			}
			counts[firstFail]++
			continue
		}
		paired++
		for _, x := range tmp {
			pairs.push(x)
		}
	}
	tr.Qualified = pairs.count
	ps := pairs.sorted()
	var ids []int64
	for k := range ps {
		ids = append(ids, e.cat.fuses[ps[k].a].cid, e.cat.diodes[ps[k].b].cid)
	}
	e.cat.need(ids)
	for k := range ps {
		x := &ps[k]
		fr, d := &e.cat.fuses[x.a], &e.cat.diodes[x.b]
		c.reset(true, s.Ambient.TMax)
		fmet := e.fuse(fr, &c)
		dmet := e.shuntDiode(d, &c)
		fm, _ := e.forward(d)
		e.pair(fr, fmet, d, dmet, &fm, &c)
		x.pa, x.pb = e.cat.part(fr.p, fr.cid), e.cat.part(d.p, d.cid)
		e.costOf(x)
		cd := e.candidate(k+1, x, []PartRef{e.partRef("fuse", x.pa), e.partRef("shunt-diode", x.pb)}, append([]Check(nil), c.checks...))
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

// clampThreshold returns the smallest external resistance R* (Ω) at which
// a diode of model fm clamps a reversed supply vrev (V) to at most vrm (V)
// at junction temperature tj (°C): R* = (vrev − vrm)/I* with V_F(I*, tj)
// = vrm, found by bisection (V_F rises with I). 0 when vrev ≤ vrm (any
// resistance will do); +Inf when the diode drops more than vrm at any
// current. The result is lowered by one part in 10⁶ so that the exact
// pair check, not this index, decides at the boundary.
func clampThreshold(fm *physics.ForwardModel, vrev, vrm, tj float64) float64 {
	if vrev <= vrm {
		return 0
	}
	if fm.VF(1e-9, tj) >= vrm {
		return math.Inf(1)
	}
	lo, hi := 0.0, 1.0
	for fm.VF(hi, tj) < vrm {
		hi *= 2
		if hi > 1e9 {
			return 0
		}
	}
	for k := 0; k < 80 && hi-lo > 1e-12*hi; k++ {
		mid := (lo + hi) / 2
		if fm.VF(mid, tj) < vrm {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (vrev - vrm) / hi * (1 - 1e-6)
}
