package physics

import (
	"fmt"
	"math"
)

// Shape is a periodic current waveform used for conduction-loss work.
type Shape int

// Waveform shapes of ST AN604 (REFERENCE §1.6).
const (
	DC          Shape = iota // constant current I (Peak)
	Rectangular              // pulse of height Peak for a fraction Duty of the period
	Trapezoid                // linear ramp between Min and Peak during a fraction Duty
	HalfSine                 // half sine of peak Peak, conducting for a fraction Duty
	Triangle                 // ramp from 0 to Peak during a fraction Duty
)

var shapeNames = [...]string{"dc", "rectangular", "trapezoid", "half-sine", "triangle"}

// String names the shape.
func (s Shape) String() string {
	if s < 0 || int(s) >= len(shapeNames) {
		return fmt.Sprintf("shape(%d)", int(s))
	}
	return shapeNames[s]
}

// Waveform is a periodic current through a diode or MOSFET.
//
//	Peak  peak current I_M (A); for DC the current itself
//	Min   lower current I_min of a trapezoid (A); ignored by the other shapes
//	Duty  conduction fraction δ of the period, 0 < δ ≤ 1; ignored for DC
type Waveform struct {
	Shape Shape
	Peak  float64
	Min   float64
	Duty  float64
}

// DCCurrent is a DC waveform of current i (A).
func DCCurrent(i float64) Waveform { return Waveform{Shape: DC, Peak: i, Duty: 1} }

// Validate reports a waveform that the loss formulas cannot use.
func (w Waveform) Validate() error {
	if !finite(w.Peak) || w.Peak < 0 {
		return fmt.Errorf("waveform peak current %g A: must be a finite value ≥ 0", w.Peak)
	}
	if w.Shape == DC {
		return nil
	}
	if w.Shape < DC || w.Shape > Triangle {
		return fmt.Errorf("unknown waveform shape %d", int(w.Shape))
	}
	if !finite(w.Duty) || w.Duty <= 0 || w.Duty > 1 {
		return fmt.Errorf("%v waveform duty %g: must be in (0, 1]", w.Shape, w.Duty)
	}
	if w.Shape == Trapezoid && (!finite(w.Min) || w.Min < 0 || w.Min > w.Peak) {
		return fmt.Errorf("trapezoid minimum current %g A: must be in [0, peak %g A]", w.Min, w.Peak)
	}
	return nil
}

// Average returns I_F(AV) in A (ST AN604, REFERENCE §1.6) [V]:
//
//	DC          I
//	rectangular δ·I_M
//	trapezoid   δ·(I_max + I_min)/2
//	half-sine   2·δ·I_M/π
//	triangle    δ·I_M/2
func (w Waveform) Average() float64 {
	switch w.Shape {
	case DC:
		return w.Peak
	case Rectangular:
		return w.Duty * w.Peak
	case Trapezoid:
		return w.Duty * (w.Peak + w.Min) / 2
	case HalfSine:
		return 2 * w.Duty * w.Peak / math.Pi
	case Triangle:
		return w.Duty * w.Peak / 2
	}
	return math.NaN()
}

// RMS2 returns the mean square current I_F(RMS)² in A² (ST AN604 rev 3,
// REFERENCE §1.6) [V]:
//
//	DC          I²
//	rectangular δ·I_M²
//	trapezoid   δ·(I_max² + I_min² + I_max·I_min)/3
//	half-sine   δ·I_M²/2
//	triangle    δ·I_M²/3
func (w Waveform) RMS2() float64 {
	p := w.Peak
	switch w.Shape {
	case DC:
		return p * p
	case Rectangular:
		return w.Duty * p * p
	case Trapezoid:
		return w.Duty * (p*p + w.Min*w.Min + p*w.Min) / 3
	case HalfSine:
		return w.Duty * p * p / 2
	case Triangle:
		return w.Duty * p * p / 3
	}
	return math.NaN()
}

// RMS returns I_F(RMS) in A.
func (w Waveform) RMS() float64 { return math.Sqrt(w.RMS2()) }

// FormFactorOK reports whether the straight-line loss model of ST AN604
// may be used for this waveform: the older AN604 revision limits it to
// waveforms whose peak is below about 3× the average current; above that
// the threshold-plus-slope model over-estimates the loss [V ST AN604].
func (w Waveform) FormFactorOK() bool {
	avg := w.Average()
	return avg > 0 && w.Peak <= 3*avg
}

// ConductionLoss returns the conduction loss in W of the threshold-plus-
// slope model (ST AN604, REFERENCE §1.6) [V]:
//
//	P = V_T0·I_F(AV) + r_d·I_F(RMS)²
//
// vt0 threshold voltage (V), rd slope resistance (Ω), iav average current
// (A), irms2 mean square current (A²). Example (AN604): V_T0 = 1.15 V,
// r_d = 0.029 Ω, 20 A rectangular at δ = 0.5 gives 11.5 + 5.8 = 17.3 W.
func ConductionLoss(vt0, rd, iav, irms2 float64) float64 { return vt0*iav + rd*irms2 }

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
