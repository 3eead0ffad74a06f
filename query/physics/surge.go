package physics

import "math"

// Surge pulse lengths of I_FSM ratings (REFERENCE §2.1) [V].
const (
	// JEDECSurgeTime is one half cycle of 60 Hz, 1/120 s ≈ 8.33 ms
	// ("JEDEC method" on US-style rectifier datasheets).
	JEDECSurgeTime = 1.0 / 120
	// IECSurgeTime is one half cycle of 50 Hz, 10 ms (IEC/European style).
	IECSurgeTime = 0.010
)

// HalfSineI2t returns the I²t (A²s) of a half-sine pulse of peak ipk (A) and
// duration tp (s): I²t = I_FSM²·t_p/2 (REFERENCE §2.1, from the Littelfuse
// waveshape chart) [D]. Example: 50 A for 8.333 ms gives 10.42 A²s (the
// datasheet of E4 prints "I²t for fusing" = 10 A²s; check value 7).
func HalfSineI2t(ipk, tp float64) float64 { return ipk * ipk * tp / 2 }

// PulseShape is a single-pulse current shape for I²t.
type PulseShape int

// Pulse shapes of the Littelfuse "pulse energy / waveshapes" chart.
const (
	PulseRectangle   PulseShape = iota // i_p for t
	PulseHalfSine                      // half sine of peak i_p, duration t
	PulseTriangle                      // 0 → i_p → 0 or a ramp, duration t
	PulseTrapezoid                     // linear from i_p to i_b over t
	PulseParabolic                     // i = k·t², peak i_p at t
	PulseExponential                   // i_p·e^(−t/τ), with t taken as τ
)

// PulseI2t returns the I²t (A²s) of a single pulse (REFERENCE §2.1,
// Littelfuse waveshape chart) [V]:
//
//	rectangle    i_p²·t
//	half sine    i_p²·t/2
//	triangle     i_p²·t/3
//	trapezoid    (i_p² + i_p·i_b + i_b²)·t/3
//	parabolic    i_p²·t/5
//	exponential  i_p²·τ/2   (t is the time constant τ)
//
// ipk and ib in A, t in s; ib is used only by the trapezoid.
func PulseI2t(shape PulseShape, ipk, ib, t float64) float64 {
	switch shape {
	case PulseRectangle:
		return ipk * ipk * t
	case PulseHalfSine:
		return ipk * ipk * t / 2
	case PulseTriangle:
		return ipk * ipk * t / 3
	case PulseTrapezoid:
		return (ipk*ipk + ipk*ib + ib*ib) * t / 3
	case PulseParabolic:
		return ipk * ipk * t / 5
	case PulseExponential:
		return ipk * ipk * t / 2
	}
	return math.NaN()
}

// SurgeConversion is the result of ConvertIFSM.
type SurgeConversion struct {
	// FactorI2t is I_to/I_from under constant I²t: √(t_from/t_to) [D].
	FactorI2t float64
	// FactorI2SqrtT is I_to/I_from under constant I²√t (thermal-diffusion
	// limited; onsemi thyristor handbook HBD855 concept [V]):
	// (t_from/t_to)^¼ [D].
	FactorI2SqrtT float64
	// Factor is the one applied: the smaller of the two (lower capability
	// in the target direction).
	Factor float64
	// IFSM is the converted surge current (A) at the target duration.
	IFSM float64
	// Model names the model chosen: "constant I²t" or "constant I²√t".
	Model string
}

// ConvertIFSM converts a half-sine surge rating ifsm (A) of duration from
// (s) to duration to (s) (REFERENCE §2.1). No standard formula exists and
// two published models disagree, so the tool rule is to apply whichever
// gives the lower capability in the target direction [D]:
//
//	8.33 ms → 10 ms: ×0.9129 (constant I²t) vs ×0.9554 (constant I²√t) → 0.9129
//	10 ms → 8.33 ms: ×1.0954 vs ×1.0466 → 1.0466
//
// Durations must be positive; equal durations give factor 1.
func ConvertIFSM(ifsm, from, to float64) SurgeConversion {
	r := from / to
	c := SurgeConversion{FactorI2t: math.Sqrt(r), FactorI2SqrtT: math.Sqrt(math.Sqrt(r))}
	if c.FactorI2t <= c.FactorI2SqrtT {
		c.Factor, c.Model = c.FactorI2t, "constant I²t"
	} else {
		c.Factor, c.Model = c.FactorI2SqrtT, "constant I²√t"
	}
	c.IFSM = ifsm * c.Factor
	return c
}
