package physics

import (
	"fmt"
	"math"
	"strings"
)

// FuseStd is a fuse's rating convention (catalog field fuse_std).
type FuseStd int

// Fuse rating conventions.
const (
	// FuseIEC: IEC 60127-style, may carry 100 % of I_n continuously
	// (its gate is "no melt at 1.5·I_n for 1 h") [V Schurter].
	FuseIEC FuseStd = iota
	// FuseUL: UL 248-14-style, 75 % of the rating at 25 °C (its gate is
	// "melt at 1.35·I_n within 1 h") [V Littelfuse Fuseology].
	FuseUL
	// FuseBlade: ISO 8820 automotive blade fuse.
	FuseBlade
)

// String returns the catalog word: "iec", "ul" or "blade".
func (s FuseStd) String() string {
	switch s {
	case FuseUL:
		return "ul"
	case FuseBlade:
		return "blade"
	}
	return "iec"
}

// ParseFuseStd reads a catalog fuse_std word ("iec", "ul", "blade").
func ParseFuseStd(s string) (FuseStd, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "iec":
		return FuseIEC, nil
	case "ul":
		return FuseUL, nil
	case "blade":
		return FuseBlade, nil
	}
	return FuseIEC, fmt.Errorf("unknown fuse rating convention %q (want iec, ul or blade)", s)
}

// Continuous-current factors of the rating conventions (REFERENCE §4.3),
// the makers' own rules; derating profiles may ask for less.
const (
	// ULContinuousFactor: UL-style fuses carry ≤ 75 % of rating at 25 °C
	// [V Littelfuse Fuseology; EDN 1996].
	ULContinuousFactor = 0.75
	// IECContinuousFactor: IEC 60127-style fuses may carry 100 % of I_n
	// [V Schurter]; many makers still advise ≤ 80 % [M].
	IECContinuousFactor = 1.0
	// BladeContinuousFactor: blade fuses treated like the UL rule [M, from
	// memory; not in REFERENCE §4.3].
	BladeContinuousFactor = 0.75
)

// ContinuousFactor returns the convention's continuous-current factor
// K_std with its confidence tag and source.
func ContinuousFactor(std FuseStd) (k float64, tag Tag, source string) {
	switch std {
	case FuseUL:
		return ULContinuousFactor, Verified, "Littelfuse Fuseology: UL-style fuses ≤ 75 % of rating"
	case FuseBlade:
		return BladeContinuousFactor, Memory, "from memory: blade fuses treated like the UL 75 % rule"
	}
	return IECContinuousFactor, Verified, "Schurter Guide to Fuse Selection: IEC 60127 fuses may carry 100 % of I_n"
}

// RequiredFuseRating returns the smallest rated current I_n (A) that may
// carry the operating current iop (A) continuously (REFERENCE §4.3, AEM
// thin-film fuse selection rule) [V]:
//
//	I_n ≥ I_op / (K_std·K_T)
//
// K_std the continuous-current factor of the rating convention (0.75 UL-
// style, 1.0 IEC-style, or the derating profile's value), K_T the
// temperature rerating factor at the fuse's ambient. Example (check 15):
// 4 A, K_T = 0.90, UL 0.75 → 5.93 A.
func RequiredFuseRating(iop, kStd, kT float64) float64 { return iop / (kStd * kT) }

// R10 is the R10 preferred-number series used for fuse current ratings
// (1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 × 10^k A).
var R10 = [...]float64{1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8}

// NextR10 returns the smallest R10 value ≥ x (x > 0), e.g. 5.93 → 6.3 and
// 1.205 → 1.25 (checks 15, 16). Values within 1 ppm below a series value
// round to it. NaN for x ≤ 0.
func NextR10(x float64) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return math.NaN()
	}
	dec := math.Floor(math.Log10(x))
	scale := math.Pow(10, dec)
	m := x / scale
	for _, v := range R10 {
		if v >= m*(1-1e-6) {
			return v * scale
		}
	}
	return 10 * scale
}

// BladeRatings are the common blade-fuse (ISO 8820-3 medium/ATO size)
// current ratings in A [V hobby reference page; M that ISO 8820-3 lists
// exactly these]. Miniature blades span 2–30 A.
var BladeRatings = [...]float64{1, 2, 3, 4, 5, 7.5, 10, 15, 20, 25, 30, 35, 40}

// NextBlade returns the smallest blade rating ≥ x (A) and false when x is
// above the largest one.
func NextBlade(x float64) (float64, bool) {
	for _, v := range BladeRatings {
		if v >= x*(1-1e-6) {
			return v, true
		}
	}
	return math.NaN(), false
}

// NextFuseRating returns the next standard rating for the convention:
// blade series for blade fuses, R10 otherwise.
func NextFuseRating(std FuseStd, x float64) (float64, bool) {
	if std == FuseBlade {
		return NextBlade(x)
	}
	v := NextR10(x)
	return v, !math.IsNaN(v)
}

// PulsePoint is one row of a pulse-factor table: N pulses in the product's
// life allow a pulse I²t of F × the fuse's nominal melting I²t.
type PulsePoint struct{ N, F float64 }

// PulseTable is a pulse (inrush) derating table of melting I²t
// (REFERENCE §4.4). Points are in increasing N.
type PulseTable struct {
	Name   string
	Source string
	Tag    Tag
	Points []PulsePoint
}

// LittelfusePulseTable is the Littelfuse pulse-factor table [V]: the more
// conservative of the two published tables and the recommended default.
// Pulses must be ≥ 10 s apart so the element cools.
var LittelfusePulseTable = PulseTable{
	Name:   "littelfuse",
	Source: "Littelfuse pulse-cycle derating (REFERENCE §4.4)",
	Tag:    Verified,
	Points: []PulsePoint{{1e2, 0.48}, {1e3, 0.38}, {1e4, 0.29}, {1e5, 0.22}},
}

// AlternatePulseTable is the second published table (a Chinese fuse maker)
// [V]; it is one decade of N less conservative than Littelfuse's.
var AlternatePulseTable = PulseTable{
	Name:   "alternate",
	Source: "fuse maker pulse table, one decade less conservative (REFERENCE §4.4)",
	Tag:    Verified,
	Points: []PulsePoint{{1e3, 0.48}, {1e4, 0.38}, {1e5, 0.30}},
}

// PulseFactorFloor is the smallest factor returned when extrapolating a
// pulse table beyond its last row (a tool choice, not from a source).
const PulseFactorFloor = 0.05

// Factor returns the pulse factor P_f for n pulses and whether n lies
// outside the table. Between rows it interpolates linearly in log10 N (the
// tables are printed per decade). Below the first row it returns the first
// factor (clamped; fewer pulses would allow more, so this is
// conservative). Above the last row it continues the last segment's slope
// per decade (e.g. −0.07/decade for Littelfuse: 0.15 at 10⁶ pulses),
// floored at PulseFactorFloor, which is conservative as long as the real
// curve flattens. n < 1 counts as one pulse. An empty table gives NaN.
func (t PulseTable) Factor(n float64) (f float64, outside bool) {
	p := t.Points
	if len(p) == 0 || math.IsNaN(n) {
		return math.NaN(), true
	}
	if n < 1 {
		n = 1
	}
	if n <= p[0].N {
		return p[0].F, n < p[0].N
	}
	x := math.Log10(n)
	for k := 1; k < len(p); k++ {
		if n <= p[k].N {
			x0, x1 := math.Log10(p[k-1].N), math.Log10(p[k].N)
			return p[k-1].F + (p[k].F-p[k-1].F)*(x-x0)/(x1-x0), false
		}
	}
	last := p[len(p)-1]
	if len(p) == 1 {
		return last.F, true
	}
	prev := p[len(p)-2]
	slope := (last.F - prev.F) / (math.Log10(last.N) - math.Log10(prev.N))
	if slope > 0 {
		slope = 0
	}
	f = last.F + slope*(x-math.Log10(last.N))
	if f < PulseFactorFloor {
		f = PulseFactorFloor
	}
	return f, true
}

// RequiredMeltingI2t returns the nominal melting I²t (A²s) a fuse needs to
// survive a repeated pulse of I²t pulseI2t (A²s) with pulse factor pf
// (REFERENCE §4.4) [V]: I²t_melt ≥ I²t_pulse / P_f. Example (Matsuo
// datasheet, check 18): 60 A²s at a load ratio of 0.35 → 171.4 A²s; with the
// Littelfuse factor 0.22 at 10⁵ pulses → 273 A²s. Compare at the pulse's own
// duration on the fuse's I²t-versus-time curve where available.
func RequiredMeltingI2t(pulseI2t, pf float64) float64 { return pulseI2t / pf }

// BoltedFaultCurrent returns the prospective fault current (A) of a source
// of voltage v (V, magnitude used) behind resistance rsrc (Ω) into a short:
// I = |V|/R_source. It is the worst case for a fuse's breaking capacity
// (REFERENCE §4.5; DESIGN "fault current"). +Inf when rsrc ≤ 0.
func BoltedFaultCurrent(v, rsrc float64) float64 {
	if !(rsrc > 0) {
		return math.Inf(1)
	}
	return math.Abs(v) / rsrc
}

// CrowbarCurrent returns the reverse current (A) through a shunt diode
// behind a series fuse when the supply is reversed (REFERENCE §2.2 step 1)
// [D]:
//
//	I_pk = (|V_rev| − V_T0) / (R_source + R_fuse,cold + r_d)
//
// vrev reversed supply (V), vt0 and rd the diode's threshold (V) and slope
// (Ω) at the fault current, rsrc source plus wiring resistance (Ω), rfuse
// fuse cold resistance (Ω). Use a small R_source for the worst diode
// stress, a large one for the worst fuse opening. 0 when |V_rev| ≤ V_T0;
// +Inf when the resistances sum to 0.
func CrowbarCurrent(vrev, vt0, rd, rsrc, rfuse float64) float64 {
	v := math.Abs(vrev) - vt0
	if v <= 0 {
		return 0
	}
	r := rsrc + rfuse + rd
	if !(r > 0) {
		return math.Inf(1)
	}
	return v / r
}

// ClampVoltage returns the reverse voltage the load sees while the shunt
// diode carries current i (A): V_T0 + r_d·I (V), the diode's forward drop.
func ClampVoltage(vt0, rd, i float64) float64 { return vt0 + rd*i }

// BreakingRatio returns breaking capacity / prospective fault current; the
// fuse is adequate when it is ≥ 1 (REFERENCE §4.5) [V Lawson; Littelfuse].
func BreakingRatio(breaking, ifault float64) float64 { return breaking / ifault }

// FuseDrop returns the voltage drop (V) and loss (W) of a fuse with cold
// resistance rcold (Ω) carrying i (A): V = I·R_cold, P = I²·R_cold. The
// element warms at load, so the hot resistance is higher than the cold
// value; where the maker prints a voltage drop at rated current, prefer it.
func FuseDrop(i, rcold float64) (v, p float64) { return i * rcold, i * i * rcold }

// ClearingFactor is the ratio total-clearing I²t / melting I²t assumed when
// the maker gives no clearing value: 2.0 [M], common practice (from
// memory): at the low DC voltages of reverse-polarity faults the arcing
// I²t is usually a fraction of the melting I²t, so doubling is a
// conservative allowance. The maker's clearing data always win.
const ClearingFactor = 2.0

// ClearingI2t is the fuse total-clearing I²t used for coordination.
type ClearingI2t struct {
	Value     float64 // A²s
	Estimated bool    // true when derived from melting I²t × Factor
	Factor    float64 // the factor used (1 when the maker's value is used)
	Note      string  // what to tell the user
}

// FuseClearingI2t returns the clearing I²t: the maker's value clear (A²s)
// when positive, else melting I²t melt (A²s) × ClearingFactor, marked as
// estimated (REFERENCE §2.2 step 3 needs the clearing value).
func FuseClearingI2t(melt, clear float64) ClearingI2t {
	if clear > 0 {
		return ClearingI2t{Value: clear, Factor: 1, Note: "maker's total clearing I²t"}
	}
	return ClearingI2t{Value: melt * ClearingFactor, Estimated: true, Factor: ClearingFactor,
		Note: "clearing I²t estimated as 2 × melting I²t [M]; use the maker's clearing data where given"}
}

// CrowbarPoint returns the fault current i (A) through a shunt diode of
// model m at junction temperature tj (°C) when a reversed supply vrev (V,
// magnitude used) drives it through rExt (Ω: source, wiring and fuse cold
// resistance), and the diode's forward drop vclamp (V) at that current,
// which is the reverse voltage the load sees (REFERENCE §2.2 steps 1 and
// 4; DESIGN "fault current"). It solves
//
//	I = (|V_rev| − V_F(I, T_j)) / R_ext
//
// by bisection on the full forward model (V_F rises with I, so the root is
// unique); with the two-point line this equals CrowbarCurrent with the
// diode's r_d. Returns 0, V_F(0⁺) when the supply is below the threshold
// and (+Inf, NaN) when rExt ≤ 0. It does not allocate.
func CrowbarPoint(m *ForwardModel, vrev, rExt, tj float64) (i, vclamp float64) {
	v := math.Abs(vrev)
	if !(rExt > 0) {
		return math.Inf(1), math.NaN()
	}
	f := func(i float64) float64 { return v - m.VF(i, tj) - rExt*i }
	lo, hi := 0.0, v/rExt
	if f(1e-12*hi+1e-15) <= 0 {
		return 0, m.VF(1e-15, tj)
	}
	for k := 0; k < 200 && hi-lo > 1e-12*hi; k++ {
		mid := 0.5 * (lo + hi)
		if f(mid) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	i = 0.5 * (lo + hi)
	return i, m.VF(i, tj)
}
