package topology

import (
	"fmt"
	"math"

	"partsieve/catalog"
	"partsieve/catalog/units"
	"partsieve/query/derate"
	"partsieve/query/physics"
	"partsieve/query/spec"
)

// Gate resistor defaults of the MOSFET stages (tool choices, not from a
// source): R_G starts at 10 kΩ, the value of the derived example
// REFERENCE E8, and is raised to the next E12 value when the resistor or
// the Zener would dissipate too much; the resistor is assumed to be an
// 0805 part rated 0.125 W (common practice for that size) and used to
// 50 %.
const (
	GateResistorDefault  = 10e3
	GateResistorRating   = 0.125
	GateResistorMaxPower = 0.0625
)

// engine holds one spec's derived numbers and evaluates parts against it.
type engine struct {
	s   *spec.Spec
	pr  *derate.Profile
	opt Options
	cat *Catalog

	vinMax   float64 // highest input in normal operation
	vrSeries float64 // reverse voltage a series diode blocks
	vFuse    float64 // voltage a fuse must be rated for
	vShunt   float64 // reverse voltage a shunt diode sees in operation
	vDS      float64 // V_DS a MOSFET must withstand
	dropLim  float64
	dropBy   string
	iBolted  float64
	pulseF   float64
	pulseOut bool
	alpha    float64
	backfeed string
	tj       physics.SolveOptions

	fmBuf physics.ForwardModel

	zcache map[zkey]*zchoice
	zwin   []zchoice // zenerFor's list of the Zeners of a window
	costs  map[*catalog.Part]*partCost
}

func newEngine(s *spec.Spec, cat *Catalog, opt Options) *engine {
	pr := s.Policy.Profile
	if pr.Name == "" {
		pr, _ = derate.Lookup("commercial")
	}
	e := &engine{s: s, pr: &pr, opt: opt.withDefaults(), cat: cat,
		zcache: map[zkey]*zchoice{}, costs: map[*catalog.Part]*partCost{}}
	e.vinMax = s.Supply.VInMax()
	e.vrSeries = s.Supply.VReverse + s.Load.VHoldup
	e.vFuse = math.Max(e.vinMax, s.Supply.VReverse)
	e.vShunt = e.vinMax
	e.vDS = math.Max(e.vinMax, e.vrSeries)
	e.dropLim, e.dropBy = s.DropLimit()
	e.iBolted = physics.BoltedFaultCurrent(s.Supply.VReverse, s.Supply.RSource)
	if s.Load.HasInrush {
		e.pulseF, e.pulseOut = pr.PulseFactor(s.Load.InrushPulses)
	}
	e.alpha = pr.RdsonAlpha.Value
	e.backfeed = s.BackfeedReason()
	return e
}

// metrics are the figures a candidate is ranked and shown by.
type metrics struct {
	loss, drop, tj float64
	dropCold       bool    // the drop is worst at the cold corner
	extra          float64 // shunt diode: leakage loss in operation
	cap            float64 // shunt diode: derated I²t capability at its rating pulse
	iFault, vClamp float64
}

func (e *engine) forward(d *diodeRec) (physics.ForwardModel, bool) {
	if !d.fwdOK {
		return physics.ForwardModel{}, false
	}
	fd := d.fwd
	fd.TC, fd.TCOverride = e.pr.ForwardTC(d.class)
	m, err := physics.NewForwardModel(fd)
	return m, err == nil
}

func (e *engine) leakage(d *diodeRec) (physics.Leakage, bool) {
	if !d.leakOK {
		return physics.Leakage{}, false
	}
	ld := d.leak
	ld.DoublingK, ld.Override = e.pr.LeakageDoubling()
	l, err := physics.NewLeakage(ld)
	return l, err == nil
}

func stable(r physics.JunctionResult) bool { return r.Status == physics.Stable }

// tjValue is the junction temperature to show: +Inf (null in JSON) when
// the solve found no stable point.
func tjValue(r physics.JunctionResult) float64 {
	if r.Status == physics.Stable {
		return r.Tj
	}
	return math.Inf(1)
}

func fmtV(v float64) string  { return units.Format(v, units.Voltage) }
func fmtA(v float64) string  { return units.Format(v, units.Current) }
func fmtW(v float64) string  { return units.Format(v, units.Power) }
func fmtR(v float64) string  { return units.Format(v, units.Resistance) }
func fmtT(v float64) string  { return units.Format(v, units.Temperature) }
func fmtS(v float64) string  { return units.Format(v, units.Time) }
func fmtI2(v float64) string { return units.Format(v, units.I2t) }

func factorNote(f derate.Factor) string {
	return fmt.Sprintf("%s = %g (%s)", f.Name, f.Value, f.Confidence())
}

// seriesDiode evaluates diode d as the series diode of the series-diode
// topology (REFERENCE T1).
func (e *engine) seriesDiode(d *diodeRec, c *checker) (m metrics) {
	s, pr := e.s, e.pr
	i := s.Load.IMax
	// reverse voltage while the input is reversed
	if !has(d.vrrm) {
		if !c.missing(sdVRRM, "V_RRM") {
			return
		}
	} else if !c.add(sdVRRM, e.vrSeries, pr.KVRRM.Value*d.vrrm) {
		return
	} else if c.rec {
		c.note(fmt.Sprintf("V_RRM = %s; %s", fmtV(d.vrrm), factorNote(pr.KVRRM)))
		c.source(pr.KVRRM.Source)
	}
	// average forward current
	if !has(d.ifav) {
		if !c.missing(sdIFAV, "I_F(AV)") {
			return
		}
	} else if !c.add(sdIFAV, i, pr.KIFAV.Value*d.ifav) {
		return
	} else if c.rec {
		c.note(fmt.Sprintf("I_F(AV) = %s; %s", fmtA(d.ifav), factorNote(pr.KIFAV)))
		c.source(pr.KIFAV.Source)
	}
	// surge against the inrush pulse
	if s.Load.HasInrush {
		capI2t := d.surgeI2tAt(pr.KIFSM.Value, s.Load.InrushTime)
		if !has(capI2t) {
			if !c.missing(sdSurge, "I_FSM") {
				return
			}
		} else if !c.add(sdSurge, s.Load.InrushI2t, capI2t) {
			return
		}
		if c.rec && has(capI2t) {
			c.note(fmt.Sprintf("I_FSM = %s at %s, converted to %s; %s; I_FSM is a non-repetitive rating, the inrush repeats %g times",
				fmtA(d.ifsm), fmtS(d.ifsmT), fmtS(s.Load.InrushTime), factorNote(pr.KIFSM), s.Load.InrushPulses))
		}
	}
	// the model lives in the engine so that the scan does not allocate it
	fm := &e.fmBuf
	var ok bool
	*fm, ok = e.forward(d)
	if !ok || !has(d.rth) {
		what := "forward voltage data (vf at vf_if)"
		if ok {
			what = "R_thJA"
		}
		c.missing(sdTjHot, what)
		return
	}
	// hot corner: junction temperature and loss
	hot := physics.DiodeTj(fm, i, s.Ambient.TMax, d.rth, e.tj)
	lim := pr.TjLimitDiode(d.tjmax)
	c.ambient = s.Ambient.TMax
	if !c.addPass(sdTjHot, tjValue(hot), lim, stable(hot)) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("P = %s, loop gain %.3f (%s); model %s", fmtW(hot.P), hot.LoopGain, hot.Reason, fm.String()))
		if !has(d.tjmax) {
			c.note("T_jmax not given: only tj_limit applies")
		}
	}
	// cold corner with self-heating; drop and loss are the worse of both
	// corners (V_F falls with temperature, so usually the cold one)
	cold := physics.DiodeTj(fm, i, s.Ambient.TMin, d.rth, e.tj)
	vfc, vfh := fm.VF(i, cold.Tj), fm.VF(i, hot.Tj)
	m.tj, m.loss = hot.Tj, math.Max(vfh*i, vfc*i)
	m.drop, m.dropCold = vfh, false
	if vfc >= vfh {
		m.drop, m.dropCold = vfc, true
	}
	if s.Budget.HasLoss && !c.add(sdLoss, m.loss, s.Budget.LossMax) {
		return
	}
	if !c.add(sdVout, s.Supply.VMin-m.drop, s.Load.VMin) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("V_F = %s cold (T_j %s), %s hot (T_j %s)", fmtV(vfc), fmtT(cold.Tj), fmtV(vfh), fmtT(hot.Tj)))
	}
	if s.Budget.HasDrop && !c.add(sdDrop, m.drop, s.Budget.DropMax) {
		return
	}
	// reversed supply at t_max for reverse_time
	l, ok := e.leakage(d)
	if !ok {
		c.missing(sdReverse, "reverse leakage (ir)")
		return
	}
	rev := physics.ReverseBiasTj(l, e.vrSeries, s.Ambient.TMax, d.rth, 0, e.tj)
	rl := l.Runaway(e.vrSeries, d.rth, 0)
	c.span = s.Ambient.TMax - s.Ambient.TMin
	if !c.addPass(sdRunaway, s.Ambient.TMax, rl.TaMax, stable(rev)) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("I_R = %s at %s and %s (slope %s, doubling every %.1f K); P_R,crit = %s, T_j,crit = %s",
			fmtA(l.IR(s.Ambient.TMax, e.vrSeries)), fmtV(e.vrSeries), fmtT(s.Ambient.TMax), l.ASource, physics.DoublingInterval(l.A),
			fmtW(rl.PCrit), fmtT(rl.TjCrit)))
		if !s.Supply.SteadyReverse() {
			c.note(fmt.Sprintf("the reversal lasts %s, less than %g s: judged on the steady state (conservative; the catalog has no thermal time constant)",
				fmtS(s.Supply.ReverseTime), spec.SteadyReverseTime))
		}
	}
	tjAbs := d.tjmax
	if !has(tjAbs) {
		tjAbs = pr.TjLimit.Value
	}
	if !c.addPass(sdReverse, tjValue(rev), tjAbs, stable(rev)) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("P_R = %s, loop gain %.3f; a fault condition: judged against T_jmax itself, not the derated limit", fmtW(rev.P), rev.LoopGain))
	}
	return m
}

// fuse evaluates fuse f on its own as the series fuse of the shunt-fuse
// topology (REFERENCE T2, §4).
func (e *engine) fuse(f *fuseRec, c *checker) (m metrics) {
	s, pr := e.s, e.pr
	i := s.Load.IMax
	if !has(f.undc) {
		if !c.missing(fuVoltage, "DC voltage rating") {
			return
		}
		if c.rec && has(f.unac) {
			c.note(fmt.Sprintf("only an AC rating (%s) is given; AC ratings are not valid for DC", fmtV(f.unac)))
		}
	} else if !c.add(fuVoltage, f.undc, e.vFuse) {
		return
	}
	if !has(f.in) {
		c.missing(fuCurrent, "rated current I_n")
		return
	}
	k := pr.FuseContinuousFactor(f.std, f.in)
	kt, fromDef, outside := pr.RerateFactor(f.rerateCurve(), s.Ambient.TMax)
	if !c.add(fuCurrent, i, k*kt*f.in) {
		return
	}
	if c.rec {
		std := f.std.String()
		if !f.stdKnown {
			std = "unknown convention, UL 75 % rule assumed"
		}
		from := "the part's curve"
		if fromDef {
			from = fmt.Sprintf("the profile default (fuse_tc %g %%/K above %g °C)", pr.FuseTC.Value, pr.FuseTCKnee.Value)
		}
		c.note(fmt.Sprintf("I_n = %s (%s), k_std = %g, K_T(%s) = %.3f from %s", fmtA(f.in), std, k, fmtT(s.Ambient.TMax), kt, from))
		if outside {
			c.note("t_max lies outside the rerating curve: extrapolated")
		}
		if f.rerateBad {
			c.note("the part's rerate text could not be read; profile default used")
		}
	}
	b := f.breaking
	fromStd := false
	if !has(b) && f.stdKnown && f.std == physics.FuseBlade {
		b, fromStd = physics.ISO8820Blade.BreakingMin, true
	}
	if !has(b) {
		if !c.missing(fuBreaking, "breaking capacity") {
			return
		}
	} else if !c.add(fuBreaking, b, e.iBolted) {
		return
	}
	if c.rec && fromStd {
		c.note("breaking capacity not given: the ISO 8820-3 blade minimum of 1000 A is assumed")
	}
	if c.rec {
		c.note(fmt.Sprintf("bolted fault %s / %s", fmtV(s.Supply.VReverse), fmtR(s.Supply.RSource)))
	}
	if s.Load.HasInrush {
		if !has(f.i2t) {
			if !c.missing(fuInrush, "melting I²t") {
				return
			}
		} else if !c.add(fuInrush, s.Load.InrushI2t, e.pulseF*f.i2t) {
			return
		}
		if c.rec {
			c.note(fmt.Sprintf("P_f(%g pulses) = %.3f (%s)", s.Load.InrushPulses, e.pulseF, pr.Pulse.Name))
			if e.pulseOut {
				c.note("pulse count outside the table: extrapolated")
			}
		}
	}
	rc := f.rcold
	if !has(rc) {
		rc = 0
	}
	iub := s.Supply.VReverse / (s.Supply.RSource + rc)
	if !c.add(fuOpensBound, iub, pr.KFuseOpen.Value*f.in) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("%s; without the diode's drop, refined per pair", factorNote(pr.KFuseOpen)))
	}
	if !has(f.rcold) {
		c.missing(fuVout, "cold resistance R_cold")
		return
	}
	v, p := physics.FuseDrop(i, f.rcold)
	m.drop, m.loss, m.dropCold = v, p, true
	if !c.add(fuVout, s.Supply.VMin-v, s.Load.VMin) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("R_cold = %s; the element is hotter at load, so its drop is somewhat higher", fmtR(f.rcold)))
	}
	if s.Budget.HasDrop && !c.add(fuDrop, v, s.Budget.DropMax) {
		return
	}
	if s.Budget.HasLoss && !c.add(fuLoss, p, s.Budget.LossMax) {
		return
	}
	return m
}

// shuntDiode evaluates diode d on its own as the shunt diode behind the
// fuse (REFERENCE §2.2 step 5): it blocks the input in normal operation.
func (e *engine) shuntDiode(d *diodeRec, c *checker) (m metrics) {
	s, pr := e.s, e.pr
	if !has(d.vrrm) {
		if !c.missing(shVRRM, "V_RRM") {
			return
		}
	} else if !c.add(shVRRM, e.vShunt, pr.KVRRM.Value*d.vrrm) {
		return
	} else if c.rec {
		c.note(fmt.Sprintf("V_RRM = %s; %s", fmtV(d.vrrm), factorNote(pr.KVRRM)))
		c.source(pr.KVRRM.Source)
	}
	if !has(d.ifsm) {
		if !c.missing(shSurgeData, "I_FSM") {
			return
		}
	} else if !d.fwdOK {
		if !c.missing(shSurgeData, "forward voltage data (vf at vf_if)") {
			return
		}
	}
	m.cap = d.surgeI2t(pr.KIFSM.Value)
	l, ok := e.leakage(d)
	if !ok || !has(d.rth) {
		what := "reverse leakage (ir)"
		if ok {
			what = "R_thJA"
		}
		c.missing(shRunaway, what)
		return
	}
	c.ambient = s.Ambient.TMax
	rev := physics.ReverseBiasTj(l, s.Supply.VMax, s.Ambient.TMax, d.rth, 0, e.tj)
	rl := l.Runaway(s.Supply.VMax, d.rth, 0)
	c.span = s.Ambient.TMax - s.Ambient.TMin
	if !c.addPass(shRunaway, s.Ambient.TMax, rl.TaMax, stable(rev)) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("I_R = %s at %s (slope %s); P_R,crit = %s, T_j,crit = %s; v_transient is short and not used here",
			fmtA(l.IR(s.Ambient.TMax, s.Supply.VMax)), fmtV(s.Supply.VMax), l.ASource, fmtW(rl.PCrit), fmtT(rl.TjCrit)))
	}
	lim := pr.TjLimitDiode(d.tjmax)
	if !c.addPass(shLeakTj, tjValue(rev), lim, stable(rev)) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("P_R = %s, loop gain %.3f", fmtW(rev.P), rev.LoopGain))
	}
	m.extra, m.tj = rev.P, rev.Tj
	return m
}

// pair evaluates the combination of fuse f and shunt diode d (with its
// forward model fm): the fault the reversed supply drives through them.
func (e *engine) pair(f *fuseRec, fmet metrics, d *diodeRec, dmet metrics, fm *physics.ForwardModel, c *checker) (m metrics) {
	s, pr := e.s, e.pr
	rc := f.rcold
	if !has(rc) {
		rc = 0
	}
	// fault point with the diode cold (highest V_F: highest clamp, lowest current)
	iF, vcl := physics.CrowbarPoint(fm, s.Supply.VReverse, s.Supply.RSource+rc, s.Ambient.TMin)
	m.iFault, m.vClamp = iF, vcl
	clr := f.clearing()
	tc := clr.Value / (iF * iF)
	capI2t := dmet.cap
	if tc < d.ifsmT {
		capI2t = d.surgeI2tAt(pr.KIFSM.Value, tc)
	}
	if !c.add(prI2t, clr.Value, capI2t) {
		return
	}
	if c.rec {
		if clr.Estimated {
			c.note(fmt.Sprintf("clearing I²t estimated from melting I²t %s × %g", fmtI2(f.i2t), clr.Factor))
		}
		c.note(fmt.Sprintf("I_FSM = %s at %s, %s; clearing takes about %s at %s", fmtA(d.ifsm), fmtS(d.ifsmT), factorNote(pr.KIFSM), fmtS(tc), fmtA(iF)))
		if tc > d.ifsmT {
			c.note("clearing takes longer than the surge rating's pulse: check the diode's multi-cycle surge curve against the fuse's time-current curve")
		}
	}
	if !c.add(prOpens, iF, pr.KFuseOpen.Value*f.in) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("R_ext = r_source %s + R_cold %s; diode at %s; %s", fmtR(s.Supply.RSource), fmtR(rc), fmtT(s.Ambient.TMin), factorNote(pr.KFuseOpen)))
	}
	if !c.add(prClamp, vcl, s.Load.VReverseMax) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("the diode's forward drop at %s; it falls as the diode heats", fmtA(iF)))
	}
	m.loss = fmet.loss + dmet.extra
	m.drop, m.dropCold = fmet.drop, true
	m.tj = dmet.tj
	if s.Budget.HasLoss && !c.add(prLoss, m.loss, s.Budget.LossMax) {
		return
	}
	return m
}

// zkey identifies a Zener window: the drive the gate must reach, the
// largest allowed V_Z,max, and whether the stage is the low-side one (its
// resistor also carries the reversed supply).
type zkey struct {
	lo, hi float64
	nfet   bool
}

// zchoice is the Zener and gate resistor chosen for one window.
type zchoice struct {
	ok                  bool
	z                   *diodeRec
	vzMin, vzMax        float64
	rg                  float64
	vinZ                float64
	izMax, prg, pz      float64 // at vinZ (transient or reversal)
	prgSteady, pzSteady float64 // at v_max, for the loss budget
	iq                  float64 // quiescent current at v_nom
	pzLimit             float64
}

// zenerFor returns the best catalog Zener for the window (cached): V_Z,min
// ≥ lo (the rated V_GS the stage must reach), V_Z,max ≤ hi (k_vgs·V_GS,max),
// with the gate resistor sized so that resistor and Zener stay within
// their ratings at the highest input (REFERENCE §3.4).
func (e *engine) zenerFor(k zkey) *zchoice {
	if z, ok := e.zcache[k]; ok {
		return z
	}
	costOf := func(z *diodeRec) float64 {
		var c float64
		if z.p == nil && e.cat.units {
			c = z.unit
		} else {
			c = e.cost(e.cat.part(z.p, z.cid)).unit
		}
		if math.IsNaN(c) {
			return math.Inf(1)
		}
		return c
	}
	// the Zeners that fit the window, then the lowest key by the ranking;
	// ties go to the lower loss (or cost when ranking by cost), then the
	// lower part number, then the first in catalog order. Costs are
	// computed only where needed, after the parts are fetched in one batch.
	if cap(e.zwin) < len(e.cat.zeners) {
		// one list for every window (most Zeners can fit a wide one):
		// grown by appends it would be copied over and over
		e.zwin = hugeMake[zchoice](len(e.cat.zeners))
	}
	win := e.zwin[:0] // reused: a window's list is dropped once chosen
	for i := range e.cat.zeners {
		z := &e.cat.zeners[i]
		ch, ok := e.zenerEval(z, k)
		if !ok || ch.vzMin < k.lo || ch.vzMax > k.hi {
			continue
		}
		win = append(win, ch)
	}
	fetch := func(list []zchoice) {
		ids := make([]int64, len(list))
		for i := range list {
			ids[i] = list[i].z.cid
		}
		e.cat.needOffers(ids)
	}
	if e.opt.Rank == RankCost && !e.cat.units {
		fetch(win)
	}
	keys := make([]float64, len(win))
	bestKey := math.Inf(1)
	for i := range win {
		ch := &win[i]
		var key float64
		switch e.opt.Rank {
		case RankCost:
			key = costOf(ch.z)
		case RankMargin:
			key = -math.Min(math.Min((k.hi-ch.vzMax)/k.hi, (ch.vzMin-k.lo)/k.lo),
				math.Min((ch.pzLimit-ch.pz)/ch.pzLimit, (GateResistorMaxPower-ch.prg)/GateResistorMaxPower))
		default:
			key = ch.prgSteady + ch.pzSteady
		}
		if math.IsNaN(key) {
			key = math.Inf(1)
		}
		keys[i] = key
		bestKey = math.Min(bestKey, key)
	}
	var tied []zchoice
	for i := range win {
		if keys[i] == bestKey {
			tied = append(tied, win[i])
		}
	}
	best := &zchoice{}
	if len(tied) == 1 {
		best = &tied[0]
	} else if len(tied) > 1 {
		if e.opt.Rank != RankCost {
			fetch(tied)
		}
		tieOf := func(ch *zchoice) float64 {
			if e.opt.Rank == RankCost {
				return ch.prgSteady + ch.pzSteady
			}
			return costOf(ch.z)
		}
		best = &tied[0]
		bestTie := tieOf(best)
		for i := 1; i < len(tied); i++ {
			ch := &tied[i]
			t := tieOf(ch)
			if t < bestTie || t == bestTie && ch.z.mpn < best.z.mpn {
				best, bestTie = ch, t
			}
		}
	}
	e.zwin = win
	e.zcache[k] = best
	return best
}

// zenerEval sizes the clamp with Zener z for window k: the gate resistor
// from GateResistorDefault up (E12) so that the resistor and the Zener
// stay within their ratings at the highest input, and the dissipations.
// ok is false when the Zener lacks V_Z, its tolerance or its power rating.
func (e *engine) zenerEval(z *diodeRec, k zkey) (zchoice, bool) {
	s := e.s
	if !has(z.vz) || !has(z.vzTol) || !has(z.pd) || z.vz <= 0 || z.vzTol < 0 || z.vzTol >= 1 || z.pd <= 0 {
		return zchoice{}, false
	}
	vzMin, vzMax := z.vz*(1-z.vzTol), z.vz*(1+z.vzTol)
	vinZ := e.vinMax
	if k.nfet {
		vinZ = math.Max(vinZ, s.Supply.VReverse+vzMin)
	}
	pzLim := e.pr.KPZ.Value * z.pd
	rmin := physics.MinGateResistor(vinZ, vzMin, vzMax, GateResistorMaxPower, pzLim)
	rg := GateResistorDefault
	if rmin > rg {
		rg = physics.NextE12(rmin)
	}
	dv := math.Max(0, vinZ-vzMin)
	dvs := math.Max(0, s.Supply.VMax-vzMin)
	return zchoice{ok: true, z: z, vzMin: vzMin, vzMax: vzMax, rg: rg, vinZ: vinZ,
		izMax: dv / rg, prg: dv * dv / rg, pz: vzMax * dv / rg,
		prgSteady: dvs * dvs / rg, pzSteady: vzMax * dvs / rg,
		iq: math.Max(0, s.Supply.VNom-vzMin) / rg, pzLimit: pzLim}, true
}

// fet evaluates MOSFET t in the pfet-high or nfet-low stage (REFERENCE
// T3/T4, §3), choosing a Zener clamp when the gate needs one.
func (e *engine) fet(t *fetRec, nfet bool, c *checker) (m metrics, zc *zchoice) {
	s, pr := e.s, e.pr
	i := s.Load.IMax
	if !has(t.vds) {
		if !c.missing(feVDS, "V_DS") {
			return
		}
	} else if !c.add(feVDS, e.vDS, pr.KVDS.Value*t.vds) {
		return
	} else if c.rec {
		c.note(fmt.Sprintf("V_DS = %s; the body diode blocks the reversed supply; %s", fmtV(t.vds), factorNote(pr.KVDS)))
		c.source(pr.KVDS.Source)
	}
	if !has(t.id) {
		if !c.missing(feID, "I_D") {
			return
		}
	} else if !c.add(feID, i, pr.KID.Value*t.id) {
		return
	} else if c.rec {
		c.note(fmt.Sprintf("I_D = %s; %s", fmtA(t.id), factorNote(pr.KID)))
		c.source(pr.KID.Source)
	}
	if !t.gateOK {
		c.missing(feDrive, "R_DS(on) with its V_GS")
		return
	}
	// gate-source stress without a clamp
	stress := e.vinMax
	if nfet {
		stress = math.Max(stress, s.Supply.VReverse)
	}
	vgsLim := math.NaN()
	if has(t.vgsMax) {
		vgsLim = pr.KVGS.Value * t.vgsMax
	}
	needZ := has(vgsLim) && stress > vgsLim
	drive := s.Supply.VMin
	if needZ {
		var buf [2]float64
		for _, r := range t.ratingsDesc(&buf) {
			if r > s.Supply.VMin+1e-3 {
				continue
			}
			z := e.zenerFor(zkey{lo: r, hi: vgsLim, nfet: nfet})
			if z.ok {
				zc = z
				break
			}
		}
		if zc != nil {
			drive = math.Min(drive, zc.vzMin)
		}
	}
	// gate drive at the lowest input
	lowest := t.gate.MinRatedDrive()
	r25, vRated, err := t.gate.RdsonAt(drive)
	if err != nil {
		c.add(feDrive, drive, lowest)
		if c.rec {
			c.note(fmt.Sprintf("R_DS(on) is rated only at V_GS ≥ %s; V_GS(th) = %s only marks where conduction starts", fmtV(lowest), fmtV(t.vgsTh)))
		}
		if !c.rec {
			return
		}
		r25, vRated = t.gate.R1, t.gate.V1 // shown for the record only
	} else if !c.add(feDrive, drive, vRated) {
		return
	} else if c.rec {
		c.note(fmt.Sprintf("R_DS(on) = %s at V_GS = %s is used", fmtR(r25), fmtV(vRated)))
	}
	// gate-source stress, with the clamp when needed
	switch {
	case !has(vgsLim):
		if !c.missing(feVGS, "V_GS,max") {
			return
		}
	case !needZ:
		if !c.add(feVGS, stress, vgsLim) {
			return
		}
		if c.rec {
			c.note(fmt.Sprintf("no Zener needed: the gate sees at most %s; %s", fmtV(stress), factorNote(pr.KVGS)))
		}
	case zc == nil:
		c.add(feVGS, stress, vgsLim)
		if c.rec {
			c.note(fmt.Sprintf("needs a Zener clamp: no catalog Zener fits V_Z,min ≥ the rated V_GS and V_Z,max ≤ %s", fmtV(vgsLim)))
		}
		if !c.rec {
			return
		}
	default:
		if !c.add(feVGS, zc.vzMax, vgsLim) {
			return
		}
		if c.rec {
			c.note(fmt.Sprintf("the input reaches %s > %s: Zener %s clamps the gate; %s", fmtV(stress), fmtV(vgsLim), zc.z.mpn, factorNote(pr.KVGS)))
			c.add(feZener, zc.vzMax, vgsLim)
			c.note(fmt.Sprintf("V_Z = %s ± %.0f %%: %s…%s", fmtV(zc.z.vz), 100*zc.z.vzTol, fmtV(zc.vzMin), fmtV(zc.vzMax)))
			c.add(feZenerDrive, zc.vzMin, vRated)
			c.add(feZenerPower, zc.pz, zc.pzLimit)
			c.note(fmt.Sprintf("R_G = %s, I_Z = %s at %s; P_Z rated %s; %s", fmtR(zc.rg), fmtA(zc.izMax), fmtV(zc.vinZ), fmtW(zc.z.pd), factorNote(pr.KPZ)))
			c.add(feRGPower, zc.prg, GateResistorMaxPower)
			c.note(fmt.Sprintf("quiescent current %s at v_nom", fmtA(zc.iq)))
			if nfet {
				c.note("while reversed, R_G carries the reversed supply through the forward-biased Zener")
			}
		}
	}
	if !has(t.rth) {
		c.missing(feTjHot, "R_thJA")
		return
	}
	// hot corner
	c.ambient = s.Ambient.TMax
	hot := physics.FETTj(r25, e.alpha, i, s.Ambient.TMax, t.rth, e.tj)
	lim := pr.TjLimitFET(t.tjmax)
	if !c.addPass(feTjHot, tjValue(hot.JunctionResult), lim, stable(hot.JunctionResult)) {
		return
	}
	if c.rec {
		c.note(fmt.Sprintf("R_DS(on) = %s × %.3f = %s at T_j (max at 25 °C × typical factor, α = %g %%/K), P = %s, loop gain %.3f",
			fmtR(r25), hot.Rds/r25, fmtR(hot.Rds), e.alpha, fmtW(hot.P), hot.LoopGain))
	}
	m.tj = hot.Tj
	if has(t.pd) {
		if !c.add(fePower, hot.P, pr.KPD.Value*t.pd) {
			return
		}
	}
	cold := physics.FETTj(r25, e.alpha, i, s.Ambient.TMin, t.rth, e.tj)
	dh, dc := i*hot.Rds, i*cold.Rds
	m.drop, m.dropCold = dh, false
	if dc > dh {
		m.drop, m.dropCold = dc, true
	}
	if !c.add(feVout, s.Supply.VMin-m.drop, s.Load.VMin) {
		return
	}
	if s.Budget.HasDrop && !c.add(feDrop, m.drop, s.Budget.DropMax) {
		return
	}
	m.loss = hot.P
	if zc != nil {
		m.loss += zc.prgSteady + zc.pzSteady
	}
	if s.Budget.HasLoss && !c.add(feLoss, m.loss, s.Budget.LossMax) {
		return
	}
	if e.backfeed != "" {
		c.addPass(feBackfeed, math.NaN(), math.NaN(), false)
		if c.rec {
			c.note("unsafe: " + e.backfeed + "; an enhanced channel conducts both ways, so current flows back into the source or the other loads")
		}
	}
	return m, zc
}
