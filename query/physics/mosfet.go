package physics

import (
	"errors"
	"fmt"
	"math"
)

// DefaultRdsonAlpha is the class default temperature coefficient α of
// R_DS(on) for low-voltage silicon trench MOSFETs, 0.4 %/K: with the
// exponential model it gives ×1.49 at 125 °C, ×1.65 at 150 °C and ×1.82 at
// 175 °C, inside the typical curve ranges ≈1.4–1.6, 1.5–1.9 and 1.8–2.1
// (REFERENCE §3.1) [D]. Overridable (profile factor rdson_alpha).
const DefaultRdsonAlpha = 0.4

// RdsFactor returns R_DS(on)(T_j)/R_DS(on)(25 °C) by the exponential model
// of Infineon AN (Graovac et al. 2006) §2.1.1 [V]:
//
//	R(T_j) = R(25 °C)·(1 + α/100)^(T_j − 25)
//
// α in %/K, T_j in °C. Example: α = 0.4 gives 1.4906 at 125 °C and 1.6471
// at 150 °C (check value 11). Domain: −55…175 °C; below 25 °C the factor
// drops under 1, as device curves do. The result is the typical factor;
// multiply the guaranteed R_DS(on),max at 25 °C by it ("max × typical TC").
func RdsFactor(tj, alpha float64) float64 { return math.Pow(1+alpha/100, tj-TRoom) }

// AlphaFromFactor returns α (%/K) from a normalised curve reading F at
// T_j (°C): α = 100·(F^(1/(T_j − 25)) − 1) (REFERENCE §3.1) [D]. Example:
// F = 1.7 at 150 °C gives α = 0.4254 %/K (check value 12). T_j must differ
// from 25 °C and F must be positive.
func AlphaFromFactor(factor, tj float64) float64 {
	return 100 * (math.Pow(factor, 1/(tj-TRoom)) - 1)
}

// RdsFactorPowerLaw returns R(T)/R(T0) = (T/T0)^m with temperatures in °C
// converted to kelvin (mobility model, REFERENCE §3.1) [M]: m ≈ 2–2.5 for
// drift-dominated higher-voltage parts, ≈1.5 for low-voltage trench parts.
func RdsFactorPowerLaw(tj, t0, m float64) float64 {
	return math.Pow(Kelvin(tj)/Kelvin(t0), m)
}

// ErrDriveTooLow is returned when the available gate drive is below every
// V_GS at which the part's R_DS(on) is specified: the on-resistance is then
// not specified at this drive (REFERENCE §3.2: never design on V_GS(th)).
var ErrDriveTooLow = errors.New("R_DS(on) not specified at this gate drive")

// GateRatings are a MOSFET's R_DS(on),max ratings at 25 °C (catalog fields
// rdson@rdson_vgs and optional rdson2@rdson2_vgs): R in Ω, V the gate drive
// magnitude in V.
type GateRatings struct {
	R1, V1 float64
	Has2   bool
	R2, V2 float64
}

// RdsonAt returns the guaranteed R_DS(on),max at 25 °C (Ω) usable at gate
// drive magnitude vgs (V), and the rated V_GS it comes from. Rule
// (REFERENCE §3.2) [V TI SNOSDF5 / D]: R_DS(on) is only guaranteed at the
// printed V_GS values and rises sharply below them, so the rating with the
// highest V_GS not above the drive is used. It is never interpolated, not
// even between two ratings (the value at the lower rated drive bounds the
// resistance at any higher drive), and below the lowest rated V_GS the
// result is ErrDriveTooLow. A drive within 1 mV below a rating counts as
// that rating. It does not allocate.
func (g GateRatings) RdsonAt(vgs float64) (r, vRated float64, err error) {
	const slack = 1e-3
	ok1 := g.R1 > 0 && vgs >= g.V1-slack
	ok2 := g.Has2 && g.R2 > 0 && vgs >= g.V2-slack
	switch {
	case ok1 && ok2:
		if g.V2 > g.V1 {
			return g.R2, g.V2, nil
		}
		return g.R1, g.V1, nil
	case ok1:
		return g.R1, g.V1, nil
	case ok2:
		return g.R2, g.V2, nil
	}
	return 0, 0, ErrDriveTooLow
}

// MinRatedDrive returns the lowest V_GS (V) at which R_DS(on) is specified.
func (g GateRatings) MinRatedDrive() float64 {
	v := g.V1
	if g.Has2 && g.R2 > 0 && (g.V2 < v || !(g.R1 > 0)) {
		v = g.V2
	}
	return v
}

// Validate reports ratings that cannot be used.
func (g GateRatings) Validate() error {
	if !finite(g.R1) || g.R1 <= 0 || !finite(g.V1) || g.V1 <= 0 {
		return fmt.Errorf("%w: R_DS(on) %g Ω at V_GS %g V (want both > 0)", ErrBadPoint, g.R1, g.V1)
	}
	if g.Has2 && (!finite(g.R2) || g.R2 <= 0 || !finite(g.V2) || g.V2 <= 0) {
		return fmt.Errorf("%w: second R_DS(on) %g Ω at V_GS %g V (want both > 0)", ErrBadPoint, g.R2, g.V2)
	}
	return nil
}

// FETConduction is the Heater of a MOSFET channel carrying I_RMS² = I2 (A²)
// with R_DS(on)(T_j) = R25·(1 + α/100)^(T_j − 25) (REFERENCE §3.5):
// P(T_j) = I_RMS²·R_DS(on)(T_j).
type FETConduction struct {
	R25 float64 // Ω, R_DS(on),max at 25 °C at the available drive
	LnK float64 // ln(1 + α/100), 1/K
	I2  float64 // A²
}

// NewFETConduction builds the heater for R_DS(on) r25 (Ω) at 25 °C,
// coefficient alpha (%/K) and RMS current irms (A).
func NewFETConduction(r25, alpha, irms float64) FETConduction {
	return FETConduction{R25: r25, LnK: math.Log1p(alpha / 100), I2: irms * irms}
}

// Power returns I_RMS²·R_DS(on)(T_j) in W.
func (f FETConduction) Power(tj float64) float64 {
	return f.I2 * f.R25 * math.Exp(f.LnK*(tj-TRoom))
}

// Rds returns R_DS(on)(T_j) in Ω.
func (f FETConduction) Rds(tj float64) float64 { return f.R25 * math.Exp(f.LnK*(tj-TRoom)) }

// FETLoopGain returns the loop gain of the MOSFET loss/temperature loop,
// R_th·P·ln(1 + α/100) (REFERENCE §3.5) [D]; the operating point is stable
// only when it is below 1. rth in K/W, p in W, alpha in %/K.
func FETLoopGain(rth, p, alpha float64) float64 { return rth * p * math.Log1p(alpha/100) }

// FETResult is a MOSFET on-state operating point.
type FETResult struct {
	JunctionResult
	// Rds is R_DS(on) at Tj (Ω), "max at 25 °C × typical temperature factor".
	Rds float64
}

// FETTj solves the MOSFET on-state loop P = I_RMS²·R_DS(on)(T_j),
// T_j = T_a + R_thJA·P (REFERENCE §3.5) for R_DS(on),max r25 (Ω) at 25 °C at
// the drive in use, coefficient alpha (%/K), RMS current irms (A), ambient
// ta (°C) and thermal resistance rth (K/W). The loop gain is the exact
// R_th·P·ln(1 + α/100). Example (REFERENCE E8, check 14): 5 A, 10 mΩ,
// 0.4 %/K, 50 K/W, 85 °C give T_j ≈ 102.0 °C, R = 13.6 mΩ, P = 0.340 W,
// loop gain 0.068.
func FETTj(r25, alpha, irms, ta, rth float64, opt SolveOptions) FETResult {
	h := NewFETConduction(r25, alpha, irms)
	r := solveTj(ta, rth, h, opt, false)
	out := FETResult{JunctionResult: r}
	if r.Status == Stable || r.Status == RunawayGain {
		out.LoopGain = rth * r.P * h.LnK
		out.Stable = out.LoopGain < 1
		out.Status = Stable
		if !out.Stable {
			out.Status = RunawayGain
		}
		out.Reason = out.Status.String()
	}
	out.Rds = h.Rds(r.Tj)
	return out
}
