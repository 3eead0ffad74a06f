package physics

import (
	"fmt"
	"math"
)

// ZenerClampInput describes the gate clamp of a high-side P-MOSFET stage
// (T3; the low-side N-MOSFET stage T4 is its mirror image): a Zener from
// gate to source and a resistor R_G from gate to ground (REFERENCE §3.4).
// Voltages are magnitudes in V, R_G in Ω.
type ZenerClampInput struct {
	VZ  float64 // nominal Zener voltage
	Tol float64 // Zener tolerance as a fraction (0.05 for ±5 %)
	// Drift is an extra symmetric window (V) for temperature and current
	// (Zener TC × ΔT plus the slope-resistance shift); 0 when not modelled.
	Drift float64
	RG    float64
	// Supply envelope: lowest, nominal and highest input (the highest
	// includes jump start or a clamped load dump).
	VinMin, VinNom, VinMax float64
	// VGSRated is the V_GS at which the MOSFET's R_DS(on) is specified (the
	// drive the stage must reach); VGSMax the absolute maximum V_GS;
	// KVGS the derating factor on VGSMax from the profile (k_vgs).
	VGSRated, VGSMax, KVGS float64
}

// ZenerClamp is the sizing result of a Zener gate clamp (REFERENCE §3.4)
// [D from circuit analysis]:
//
//	V_Z,min = V_Z·(1 − tol) − drift;   V_Z,max = V_Z·(1 + tol) + drift
//	V_Z,max ≤ k_VGS·V_GS,max                               (gate stress)
//	|V_GS| at V_in,min = min(V_in,min, V_Z,min) ≥ V_GS,rated (drive)
//	I_Z,max = (V_in,max − V_Z,min)/R_G
//	P_RG,max = (V_in,max − V_Z,min)²/R_G
//	P_Z,max = V_Z,max·I_Z,max
//	I_q(V_in) = max(0, V_in − V_Z,min)/R_G                   (quiescent drain)
//
// Below V_Z the Zener is off and the gate sees the whole input; no current
// flows then (the gate is insulated), apart from Zener leakage. Example
// (REFERENCE E8): 12 V ±5 %, 10 kΩ, 35 V clamped load dump: window
// 11.4–12.6 V ≤ 0.8·20 V = 16 V, I_Z = 2.36 mA, P_RG = 55.7 mW,
// P_Z = 29.7 mW; at 16 V I_Z = 0.46 mA.
type ZenerClamp struct {
	VZMin, VZMax float64 // V
	// VZLimit = k_VGS·V_GS,max (V); WindowOK when VZMax ≤ VZLimit.
	VZLimit  float64
	WindowOK bool
	// DriveMin = min(V_in,min, V_Z,min) (V), the gate drive at the lowest
	// input; DriveOK when it reaches VGSRated.
	DriveMin float64
	DriveOK  bool
	IZMax    float64 // A, at VinMax
	PRG      float64 // W, resistor dissipation at VinMax
	PZ       float64 // W, Zener dissipation at VinMax
	IQNom    float64 // A, quiescent current at VinNom
	IZMin    float64 // A, Zener current at VinMin (compare with the knee current)
}

// Validate reports input the sizing cannot use.
func (in ZenerClampInput) Validate() error {
	switch {
	case !finite(in.VZ) || in.VZ <= 0:
		return fmt.Errorf("zener voltage %g V: want > 0", in.VZ)
	case !finite(in.Tol) || in.Tol < 0 || in.Tol >= 1:
		return fmt.Errorf("zener tolerance %g: want a fraction in [0, 1)", in.Tol)
	case !finite(in.Drift) || in.Drift < 0:
		return fmt.Errorf("zener drift %g V: want ≥ 0", in.Drift)
	case !finite(in.RG) || in.RG <= 0:
		return fmt.Errorf("gate resistor %g Ω: want > 0", in.RG)
	case !finite(in.VinMin) || !finite(in.VinNom) || !finite(in.VinMax) || in.VinMin < 0 || in.VinMin > in.VinNom || in.VinNom > in.VinMax:
		return fmt.Errorf("input voltages min %g V, nominal %g V, max %g V: want 0 ≤ min ≤ nominal ≤ max", in.VinMin, in.VinNom, in.VinMax)
	case !finite(in.VGSMax) || in.VGSMax <= 0 || !finite(in.KVGS) || in.KVGS <= 0 || in.KVGS > 1:
		return fmt.Errorf("V_GS rating %g V with factor %g: want a rating > 0 and a factor in (0, 1]", in.VGSMax, in.KVGS)
	}
	return nil
}

// Size computes the clamp; see ZenerClamp for the formulas.
func (in ZenerClampInput) Size() (ZenerClamp, error) {
	if err := in.Validate(); err != nil {
		return ZenerClamp{}, err
	}
	var z ZenerClamp
	z.VZMin = in.VZ*(1-in.Tol) - in.Drift
	z.VZMax = in.VZ*(1+in.Tol) + in.Drift
	z.VZLimit = in.KVGS * in.VGSMax
	z.WindowOK = z.VZMax <= z.VZLimit*(1+1e-12)
	z.DriveMin = math.Min(in.VinMin, z.VZMin)
	z.DriveOK = z.DriveMin >= in.VGSRated-1e-3
	z.IZMax = z.ZenerCurrent(in.VinMax, in.RG)
	dv := in.VinMax - z.VZMin
	if dv > 0 {
		z.PRG = dv * dv / in.RG
	}
	z.PZ = z.VZMax * z.IZMax
	z.IQNom = z.ZenerCurrent(in.VinNom, in.RG)
	z.IZMin = z.ZenerCurrent(in.VinMin, in.RG)
	return z, nil
}

// ZenerCurrent returns the worst-case (largest) Zener current (A) at input
// vin (V) through rg (Ω): max(0, V_in − V_Z,min)/R_G.
func (z ZenerClamp) ZenerCurrent(vin, rg float64) float64 {
	if vin <= z.VZMin {
		return 0
	}
	return (vin - z.VZMin) / rg
}

// MinGateResistor returns the smallest R_G (Ω) that keeps the resistor and
// Zener dissipation at input vinMax (V) within prgMax and pzMax (W, already
// derated), for a Zener window vzMin…vzMax (V):
//
//	R_G ≥ max( (V_in,max − V_Z,min)²/P_RG,max ,  V_Z,max·(V_in,max − V_Z,min)/P_Z,max )
//
// 0 when vinMax ≤ vzMin (no Zener current). Round the result up with NextE12.
func MinGateResistor(vinMax, vzMin, vzMax, prgMax, pzMax float64) float64 {
	dv := vinMax - vzMin
	if dv <= 0 {
		return 0
	}
	return math.Max(dv*dv/prgMax, vzMax*dv/pzMax)
}

// E12 is the E12 resistor series (IEC 60063; from memory).
var E12 = [...]float64{1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2}

// NextE12 returns the smallest E12 value ≥ r (Ω); NaN for r ≤ 0.
func NextE12(r float64) float64 {
	if !(r > 0) || math.IsInf(r, 0) {
		return math.NaN()
	}
	dec := math.Floor(math.Log10(r))
	scale := math.Pow(10, dec)
	m := r / scale
	for _, v := range E12 {
		if v >= m*(1-1e-6) {
			return v * scale
		}
	}
	return 10 * scale
}
