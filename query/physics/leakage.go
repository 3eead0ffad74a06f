package physics

import (
	"fmt"
	"math"
)

// DefaultLeakageDoubling is the leakage doubling interval ΔT_2 in K used when
// a diode has only one leakage point: 10 K, the generic silicon rule of
// thumb [V commonly stated]; datasheet pairs give 8–11 K [D]; as a default
// for an individual part it is [M] (REFERENCE §1.4).
const DefaultLeakageDoubling = 10.0

// ASource says where a leakage temperature slope came from.
type ASource int

// Leakage slope sources.
const (
	AFromData        ASource = iota // two datasheet leakage points
	ADefaultDoubling                // DefaultLeakageDoubling or the profile's ir_doubling [M]
	AOverride                       // user override of the doubling interval
)

// String names the source.
func (s ASource) String() string {
	switch s {
	case AFromData:
		return "from two datasheet temperatures"
	case AOverride:
		return "user override"
	}
	return "default doubling interval [M]"
}

// LeakageData are the catalog's reverse-leakage points (fields ir, ir_vr,
// ir_tj, ir2, ir2_tj).
type LeakageData struct {
	// IR (A) is the maximum reverse leakage at test voltage VR (V; 0 when
	// unknown) and junction temperature TJ (°C; pass 25 when absent).
	IR, VR, TJ float64
	// Has2 says whether a second point IR2 at TJ2 (same test voltage) exists.
	Has2     bool
	Override bool // see DoublingK
	IR2, TJ2 float64
	// DoublingK is the doubling interval (K) used without a second point;
	// 0 means DefaultLeakageDoubling. With Override it wins over the data.
	DoublingK float64
}

// Leakage is the reverse-leakage model (REFERENCE §1.4) [V form; slope D/M]:
//
//	I_R(T_j, V_R) = I_R0·exp(a·(T_j − T0))·s(V_R),   ΔT_2 = ln 2 / a
//
// I_R0 (A) at T0 (°C) and test voltage VR0 (V), a in 1/K. Voltage rule
// s(V_R), a tool choice [M]: leakage rises with reverse voltage (Schottky
// barrier lowering), so
//
//	s = 1             for V_R ≤ VR0   (never reduced below the test value)
//	s = V_R / VR0     for V_R > VR0   (proportional above it)
//
// which is conservative below the test voltage and roughly right up to
// V_RRM for Schottky parts; beyond V_RRM the part is out of rating anyway.
// With VR0 unknown (0) no scaling is applied.
type Leakage struct {
	IR0, T0, VR0 float64
	A            float64
	ASource      ASource
}

// NewLeakage builds a Leakage from catalog data. A second point gives
// a = ln(I_R2/I_R1)/(T_2 − T_1) (e.g. 0.1 mA at 25 °C and 10 mA at 85 °C give
// a = 0.07675 /K, ΔT_2 = 9.03 K, Tremaine 2008); otherwise
// a = ln 2/ΔT_2 with the given or default doubling interval.
func NewLeakage(d LeakageData) (Leakage, error) {
	l := Leakage{IR0: d.IR, T0: d.TJ, VR0: d.VR}
	if !finite(d.IR) || d.IR <= 0 {
		return l, fmt.Errorf("%w: reverse leakage ir = %g A (want > 0)", ErrBadPoint, d.IR)
	}
	if !finite(d.TJ) || d.TJ < -273.15 || d.TJ > 500 {
		return l, fmt.Errorf("%w: leakage temperature ir_tj = %g °C", ErrBadPoint, d.TJ)
	}
	if !finite(d.VR) || d.VR < 0 {
		return l, fmt.Errorf("%w: leakage test voltage ir_vr = %g V (want ≥ 0)", ErrBadPoint, d.VR)
	}
	dbl := d.DoublingK
	if dbl == 0 && !d.Override {
		dbl = DefaultLeakageDoubling
	}
	if !finite(dbl) || dbl <= 0 {
		return l, fmt.Errorf("%w: leakage doubling interval %g K (want > 0)", ErrBadPoint, dbl)
	}
	l.A, l.ASource = math.Ln2/dbl, ADefaultDoubling
	if d.Override {
		l.ASource = AOverride
		return l, nil
	}
	if !d.Has2 {
		return l, nil
	}
	if !finite(d.IR2) || d.IR2 <= 0 || !finite(d.TJ2) {
		return l, fmt.Errorf("%w: second leakage point ir2 = %g A at %g °C", ErrBadPoint, d.IR2, d.TJ2)
	}
	if math.Abs(d.TJ2-d.TJ) < 1 {
		return l, fmt.Errorf("%w: leakage points at %g °C and %g °C are too close in temperature", ErrBadPoint, d.TJ, d.TJ2)
	}
	a := LeakageSlope(d.IR, d.TJ, d.IR2, d.TJ2)
	if !(a > 0) {
		return l, fmt.Errorf("%w: leakage does not rise with temperature (%g A at %g °C, %g A at %g °C)",
			ErrInconsistentF, d.IR, d.TJ, d.IR2, d.TJ2)
	}
	l.A, l.ASource = a, AFromData
	return l, nil
}

// LeakageSlope returns a = ln(I_2/I_1)/(T_2 − T_1) in 1/K.
func LeakageSlope(i1, t1, i2, t2 float64) float64 { return math.Log(i2/i1) / (t2 - t1) }

// DoublingInterval returns ΔT_2 = ln 2/a in K.
func DoublingInterval(a float64) float64 { return math.Ln2 / a }

// VoltageScale returns s(V_R) of the type's voltage rule.
func (l Leakage) VoltageScale(vr float64) float64 {
	if l.VR0 > 0 && vr > l.VR0 {
		return vr / l.VR0
	}
	return 1
}

// IR returns the reverse leakage (A) at junction temperature tj (°C) and
// reverse voltage vr (V).
func (l Leakage) IR(tj, vr float64) float64 {
	return l.IR0 * math.Exp(l.A*(tj-l.T0)) * l.VoltageScale(vr)
}

// ReversePower returns V_R·I_R(T_j, V_R) in W.
func (l Leakage) ReversePower(tj, vr float64) float64 { return vr * l.IR(tj, vr) }

// ReverseBias is the Heater of a diode blocking a reverse voltage VR (V):
// P(T_j) = V_R·I_R(T_j, V_R) + Extra, Extra (W) being any other loss in the
// same package that does not depend on T_j.
type ReverseBias struct {
	L     Leakage
	VR    float64
	Extra float64
}

// Power returns the dissipation in W at junction temperature tj (°C).
func (r ReverseBias) Power(tj float64) float64 { return r.L.ReversePower(tj, r.VR) + r.Extra }

// ReverseBiasTj solves the steady junction temperature of a diode that
// blocks vr (V) at ambient ta (°C) with thermal resistance rth (K/W), plus a
// constant extra loss (W): a stable point, or runaway (REFERENCE §1.4,
// Tremaine 2008). Example: 0.1 mA at 25 °C, a = 0.07675 /K, 11 V, 25 K/W,
// 60 °C ambient gives a stable T_j of 60.42 °C.
func ReverseBiasTj(l Leakage, vr, ta, rth, extra float64, opt SolveOptions) JunctionResult {
	return SolveTj(ta, rth, ReverseBias{L: l, VR: vr, Extra: extra}, opt)
}

// RunawayLimits are the critical values of a diode under sustained reverse
// bias (REFERENCE §1.4).
type RunawayLimits struct {
	// PCrit (W) is the reverse dissipation at which the loop gain reaches 1:
	// P_R,crit = 1/(a·R_th).
	PCrit float64
	// TjCrit (°C) is the junction temperature at which P_R reaches PCrit.
	TjCrit float64
	// TaMax (°C) is the largest ambient with a stable solution:
	// T_a,max = T_j,crit − R_th·(P_R,crit + P_other).
	TaMax float64
}

// Runaway returns the runaway limits for a diode whose leakage at the
// applied reverse voltage is ir0 (A) at t0 (°C), with slope a (1/K),
// applied voltage vr (V), thermal resistance rth (K/W) and a constant
// other loss pOther (W) (REFERENCE §1.4; loop-gain form Tremaine 2008 [V]):
//
//	stable only if R_th·dP_R/dT_j = a·R_th·P_R(T_j) < 1
//	P_R,crit = 1/(a·R_th)
//	T_j,crit = T0 + ln(1/(a·R_th·V_R·I_R(T0)))/a
//	T_a,max  = T_j,crit − R_th·(P_R,crit + P_other)
//
// Example (Tremaine 2008 inputs, check value 10): a = 0.07675 /K, 11 V,
// 25 K/W, 0.1 mA at 25 °C: P_crit = 0.521 W, T_j,crit = 105.3 °C,
// T_a,max = 92.2 °C. All inputs must be positive.
func Runaway(a, ir0, t0, vr, rth, pOther float64) RunawayLimits {
	pc := 1 / (a * rth)
	tjc := t0 + math.Log(1/(a*rth*vr*ir0))/a
	return RunawayLimits{PCrit: pc, TjCrit: tjc, TaMax: tjc - rth*(pc+pOther)}
}

// Runaway returns the runaway limits of l at reverse voltage vr (V), using
// the leakage at vr (voltage rule applied).
func (l Leakage) Runaway(vr, rth, pOther float64) RunawayLimits {
	return Runaway(l.A, l.IR0*l.VoltageScale(vr), l.T0, vr, rth, pOther)
}
