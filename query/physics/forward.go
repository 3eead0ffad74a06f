package physics

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// DiodeClass selects class defaults (temperature coefficient, SPICE
// temperature exponents) for a diode without enough datasheet points.
type DiodeClass int

// Diode classes.
const (
	// SiliconPN covers PN rectifiers (standard, fast, ultrafast), Zener
	// and TVS diodes.
	SiliconPN DiodeClass = iota
	// Schottky covers Schottky barrier rectifiers.
	Schottky
)

// String names the class.
func (c DiodeClass) String() string {
	if c == Schottky {
		return "schottky"
	}
	return "silicon-pn"
}

// DiodeClassOf maps a catalog diode type (rectifier, schottky, zener, tvs)
// to a class: "schottky" is Schottky, anything else silicon PN.
func DiodeClassOf(typ string) DiodeClass {
	if strings.EqualFold(strings.TrimSpace(typ), "schottky") {
		return Schottky
	}
	return SiliconPN
}

// Class default temperature coefficients of V_F at constant current, in V/K
// (REFERENCE §1.3). Both are typical values; callers may override them.
const (
	// TCSiliconPN is −2 mV/K for silicon PN junctions at low to moderate
	// current density [V textbook statement, Sedra & Smith diode chapter;
	// the −1.8…−2.2 mV/K range is M].
	TCSiliconPN = -2.0e-3
	// TCSchottky is −0.8 mV/K for Schottky rectifiers at rated current,
	// within the −0.6…−0.9 mV/K derived from datasheet maximum-V_F pairs
	// [D]; as a class default it is [M].
	TCSchottky = -0.8e-3
)

// DefaultTC returns the class default dV_F/dT in V/K.
func DefaultTC(c DiodeClass) float64 {
	if c == Schottky {
		return TCSchottky
	}
	return TCSiliconPN
}

// SinglePointOhmicShare is the share of V_F that the single-point model
// assigns to the slope resistance at the test current: r_d·I_1 = 0.2·V_1.
// The four ST loss equations of REFERENCE §1.2(b) put that share between
// 21 % and 42 % [D]; the low end keeps the model conservative below the
// test current (a higher threshold). It is a tool choice, tagged [M].
const SinglePointOhmicShare = 0.2

// FitKind says how a ForwardModel was built from the datasheet points.
type FitKind int

// Fit kinds.
const (
	// TwoPointLine is the threshold-plus-slope line of ST AN604 through two
	// (I, V_F) points at one junction temperature.
	TwoPointLine FitKind = iota
	// SinglePointBound is the conservative bound used when only one current
	// is known; see NewForwardModel.
	SinglePointBound
)

// String names the fit.
func (k FitKind) String() string {
	if k == SinglePointBound {
		return "single-point bound"
	}
	return "two-point line (ST AN604)"
}

// TCSource says where a model's temperature coefficient came from.
type TCSource int

// Temperature-coefficient sources.
const (
	TCFromData     TCSource = iota // two datasheet points at one current, different T_j
	TCClassDefault                 // class default (or the profile's value) [M]
	TCOverride                     // set by the user
)

// String names the source.
func (s TCSource) String() string {
	switch s {
	case TCFromData:
		return "from two datasheet temperatures"
	case TCOverride:
		return "user override"
	}
	return "class default [M]"
}

// ForwardData are the datasheet points of a diode, as the catalog holds
// them (fields vf, vf_if, vf_tj, vf2, vf2_if, vf2_tj).
type ForwardData struct {
	Class DiodeClass
	// VF is the maximum forward voltage (V) at current IF (A) and junction
	// temperature TJ (°C; pass 25 when the datasheet gives none).
	VF, IF, TJ float64
	// Has2 says whether a second point VF2 at IF2, TJ2 exists.
	Has2          bool
	TCOverride    bool // see TC
	VF2, IF2, TJ2 float64
	// TC is the temperature coefficient (V/K) used when the data do not give
	// one; 0 means the class default (DefaultTC). With TCOverride it is used
	// even when the data give a coefficient (a user override; 0 is allowed).
	TC float64
}

// ForwardModel gives the forward voltage V_F(I, T_j) of a diode and its
// conduction loss, built from datasheet points by NewForwardModel.
//
//	V_F(I, T_j) = V_ref(I) + TC·(T_j − TRef)
//	TwoPointLine:      V_ref(I) = V_T0 + r_d·I                       (ST AN604)
//	SinglePointBound:  V_ref(I) = V_T0 + r_d·I   for I ≤ I_1
//	                   V_ref(I) = V_1·I/I_1      for I > I_1
//
// with the threshold V_T0 + TC·(T_j − TRef) floored at 0 V. Units: V, A, Ω,
// V/K, °C. The zero value is not usable; build one with NewForwardModel.
type ForwardModel struct {
	Class  DiodeClass
	Fit    FitKind
	TCFrom TCSource
	// VT0 (V) and RD (Ω) are the threshold and slope at TRef: the AN604
	// line, or the lower segment of the single-point bound.
	VT0, RD float64
	// TRef is the junction temperature (°C) of VT0 and RD.
	TRef float64
	// TC is dV_F/dT_j at constant current, V/K.
	TC float64
	// I1, V1 are the test point of a SinglePointBound (A, V); G = V1/I1 (Ω)
	// is the all-ohmic slope used above I1.
	I1, V1, G float64
	// Translated is set when the second point was at a different current
	// and temperature and was moved to TRef with the coefficient TC before
	// the line was fitted.
	Translated bool
	// Note explains a fallback taken while fitting ("" when none).
	Note string
}

// errors of NewForwardModel, for errors.Is.
var (
	ErrBadPoint      = errors.New("invalid datasheet point")
	ErrInconsistentF = errors.New("inconsistent forward-voltage points")
)

func checkPoint(name string, v, i, tj float64) error {
	switch {
	case !finite(v) || v <= 0 || v > 20:
		return fmt.Errorf("%w: %s = %g V (want 0 < V_F ≤ 20 V)", ErrBadPoint, name, v)
	case !finite(i) || i <= 0:
		return fmt.Errorf("%w: test current of %s = %g A (want > 0)", ErrBadPoint, name, i)
	case !finite(tj) || tj < -273.15 || tj > 500:
		return fmt.Errorf("%w: junction temperature of %s = %g °C (want −273.15…500 °C)", ErrBadPoint, name, tj)
	}
	return nil
}

// NewForwardModel builds a ForwardModel from the datasheet points d. The
// rules, in order:
//
//  1. Temperature coefficient: a user override (d.TCOverride) wins; else
//     two points at the same current and different temperatures give
//     TC = (V_2 − V_1)/(T_2 − T_1), linear in T_j (REFERENCE §1.3 "practical
//     method"); else d.TC, else the class default (−2 mV/K PN, −0.8 mV/K
//     Schottky), flagged [M].
//  2. Two points at one temperature (|ΔT| < 0.5 K), different currents:
//     the AN604 line r_d = (V_2 − V_1)/(I_2 − I_1), V_T0 = V_1 − r_d·I_1 [V ST
//     AN604]. The real curve V = a + b·ln I + R_S·I is concave in I, so the
//     line over-estimates V_F outside [I_1, I_2] (conservative) and slightly
//     under-estimates it between the points. A falling V_F with rising
//     current is refused (ErrInconsistentF).
//  3. Two points at different currents and different temperatures: the
//     second point is moved to the first point's temperature with the
//     coefficient of rule 1 (which then cannot come from the data),
//     V_2' = V_2 − TC·(T_2 − T_1), and rule 2 is applied; Translated is
//     set. If the moved point gives a negative slope, the model falls back
//     to the single-point bound through point 1 and says so in Note.
//  4. One current only (one point, two temperatures at one current, or a
//     duplicated point, of which the higher V_F is kept): the single-point
//     bound. Below the test current I_1 it is a line through (I_1, V_1)
//     with r_d·I_1 = 0.2·V_1 (SinglePointOhmicShare, [M]); it stays above
//     the true concave curve there as long as the real ohmic share at I_1
//     is at least 20 %. Above I_1 it is V_1·I/I_1, as if the whole drop
//     were ohmic, which bounds the concave curve from above. The result is
//     conservative everywhere except just below I_1 for diodes whose
//     ohmic share is under 20 %.
//
// Domain: currents from a few percent of the test current up to a few
// times it; junction temperatures −55…175 °C. Outside, the linear
// temperature law and the straight lines are extrapolations.
func NewForwardModel(d ForwardData) (ForwardModel, error) {
	m := ForwardModel{Class: d.Class}
	if err := checkPoint("vf", d.VF, d.IF, d.TJ); err != nil {
		return m, err
	}
	if d.TCOverride && (!finite(d.TC) || math.Abs(d.TC) > 0.02) {
		return m, fmt.Errorf("%w: temperature coefficient override %g V/K (want |TC| ≤ 20 mV/K)", ErrBadPoint, d.TC)
	}
	fallback := d.TC
	m.TCFrom = TCClassDefault
	if d.TCOverride {
		m.TCFrom = TCOverride
	} else if fallback == 0 || !finite(fallback) {
		fallback = DefaultTC(d.Class)
	}
	m.TC = fallback
	m.TRef = d.TJ

	if !d.Has2 {
		m.setSinglePoint(d.IF, d.VF)
		return m, nil
	}
	if err := checkPoint("vf2", d.VF2, d.IF2, d.TJ2); err != nil {
		return m, err
	}
	sameT := math.Abs(d.TJ2-d.TJ) < 0.5
	sameI := math.Abs(d.IF2-d.IF) <= 1e-6*math.Max(d.IF, d.IF2)
	switch {
	case sameT && sameI:
		m.setSinglePoint(d.IF, math.Max(d.VF, d.VF2))
		m.Note = "the two forward points coincide; the higher V_F is used"
		return m, nil
	case sameI:
		if !d.TCOverride {
			m.TC = (d.VF2 - d.VF) / (d.TJ2 - d.TJ)
			m.TCFrom = TCFromData
		}
		m.setSinglePoint(d.IF, d.VF)
		return m, nil
	}
	v2 := d.VF2
	if !sameT {
		v2 = d.VF2 - m.TC*(d.TJ2-d.TJ)
		m.Translated = true
	}
	i1, v1, i2 := d.IF, d.VF, d.IF2
	if i2 < i1 {
		i1, v1, i2, v2 = i2, v2, i1, v1
	}
	rd := (v2 - v1) / (i2 - i1)
	if rd < 0 {
		if !m.Translated {
			return m, fmt.Errorf("%w: V_F falls from %g V to %g V while the current rises from %g A to %g A at %g °C",
				ErrInconsistentF, v1, v2, i1, i2, d.TJ)
		}
		m.Translated = false
		m.setSinglePoint(d.IF, d.VF)
		m.Note = "second forward point at another current and temperature gives a negative slope with the assumed temperature coefficient; single-point bound used"
		return m, nil
	}
	m.Fit = TwoPointLine
	m.RD = rd
	m.VT0 = v1 - rd*i1
	if m.Translated {
		m.Note = "second forward point moved to the first point's temperature with the assumed coefficient before fitting"
	}
	return m, nil
}

func (m *ForwardModel) setSinglePoint(i, v float64) {
	m.Fit = SinglePointBound
	m.I1, m.V1 = i, v
	m.G = v / i
	m.RD = SinglePointOhmicShare * v / i
	m.VT0 = (1 - SinglePointOhmicShare) * v
}

// VF returns the forward voltage in V at current i (A) and junction
// temperature tj (°C); 0 for i ≤ 0. It does not allocate.
func (m *ForwardModel) VF(i, tj float64) float64 {
	if !(i > 0) {
		return 0
	}
	s := m.TC * (tj - m.TRef)
	if m.Fit == SinglePointBound && i > m.I1 {
		v := m.G*i + s
		if v < 0 {
			return 0
		}
		return v
	}
	vt0 := m.VT0 + s
	if vt0 < 0 {
		vt0 = 0
	}
	return vt0 + m.RD*i
}

// Linear returns the AN604 constants V_T0 (V) and r_d (Ω) at junction
// temperature tj (°C) that bound the model over currents 0…ipk (A). For
// the two-point line they are the line itself. For the single-point bound
// with ipk above the test current they are the chord from (0, V_F(0)) to
// (ipk, V_F(ipk)), which lies above the convex bound on [0, ipk], so the
// loss computed with them stays an upper bound of the model's loss.
func (m *ForwardModel) Linear(tj, ipk float64) (vt0, rd float64) {
	s := m.TC * (tj - m.TRef)
	vt0 = m.VT0 + s
	if vt0 < 0 {
		vt0 = 0
	}
	if m.Fit == SinglePointBound && ipk > m.I1 {
		vpk := m.G*ipk + s
		if vpk < vt0 {
			vpk = vt0
		}
		return vt0, (vpk - vt0) / ipk
	}
	return vt0, m.RD
}

// Loss returns the conduction loss in W for waveform w at junction
// temperature tj (°C): P = V_T0·I_F(AV) + r_d·I_F(RMS)² (ST AN604) with
// the constants of Linear at the waveform's peak. For DC it equals
// V_F(I, T_j)·I. The straight-line model is meant for waveforms with peak
// below about 3× the average (Waveform.FormFactorOK).
func (m *ForwardModel) Loss(w Waveform, tj float64) float64 {
	vt0, rd := m.Linear(tj, w.Peak)
	return ConductionLoss(vt0, rd, w.Average(), w.RMS2())
}

// DCLoss returns V_F(i, tj)·i in W for a DC current i (A); it does not
// allocate. For a reverse-protection diode in a DC supply I_AV = I_RMS =
// I_load (REFERENCE §1.6).
func (m *ForwardModel) DCLoss(i, tj float64) float64 { return m.VF(i, tj) * i }

// String describes the model with its numbers, for explanations.
func (m *ForwardModel) String() string {
	var b strings.Builder
	switch m.Fit {
	case TwoPointLine:
		fmt.Fprintf(&b, "V_F = %.4g V + %.4g Ω·I", m.VT0, m.RD)
	default:
		fmt.Fprintf(&b, "V_F = %.4g V + %.4g Ω·I up to %.4g A, %.4g Ω·I above", m.VT0, m.RD, m.I1, m.G)
	}
	fmt.Fprintf(&b, " at %.4g °C, %+.3g mV/K (%v); %v", m.TRef, m.TC*1e3, m.TCFrom, m.Fit)
	if m.Note != "" {
		b.WriteString("; ")
		b.WriteString(m.Note)
	}
	return b.String()
}
