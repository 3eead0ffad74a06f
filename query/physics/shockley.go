package physics

import (
	"fmt"
	"math"
)

// Point is one (current, voltage) pair of a datasheet curve: I in A, V in V.
type Point struct{ I, V float64 }

// Shockley is the textbook diode law with ideality factor and series
// resistance (SPICE level-1 diode), REFERENCE §1.2(a) [V textbook]:
//
//	I = I_S·(exp((V − I·R_S)/(n·V_T)) − 1)   ⇒   V_F = n·V_T·ln(I/I_S + 1) + I·R_S
//
// N ideality (emission coefficient, dimensionless; ≈1.0–1.1 Schottky,
// ≈1–2 silicon PN [M textbook range]), IS saturation current (A) at TRef
// (°C), RS series resistance (Ω). XTI and EG (eV) scale I_S with
// temperature by the SPICE law [V MathWorks "SPICE Diode"]:
//
//	I_S(T) = I_S(T0)·(T/T0)^(XTI/n)·exp((T/T0 − 1)·E_G/(n·V_T(T)))     (T in kelvin)
//
// SPICE defaults for silicon PN are XTI = 3, E_G = 1.11 eV [V]; for
// Schottky XTI = 2, E_G ≈ 0.69 eV [M Berkeley SPICE convention]. With
// XTI = E_G = 0 the model has no temperature dependence besides V_T.
type Shockley struct {
	N, IS, RS float64
	TRef      float64
	XTI, EG   float64
}

// SPICETemperatureParams returns the SPICE XTI and E_G (eV) class defaults.
func SPICETemperatureParams(c DiodeClass) (xti, eg float64) {
	if c == Schottky {
		return 2, 0.69 // [M] Berkeley SPICE convention
	}
	return 3, 1.11 // [V] SPICE/PLECS model tables
}

// FitShockley2 fits n and I_S through two points at one junction
// temperature tj (°C) with R_S = 0 (REFERENCE §1.2(a)) [V textbook]:
//
//	n·V_T = (V_2 − V_1)/ln(I_2/I_1);   I_S = I_1/exp(V_1/(n·V_T))
//
// Use it for low-current points, where series resistance is negligible;
// near rated current the AN604 line fits better. The temperature exponents
// are the class defaults.
func FitShockley2(p1, p2 Point, tj float64, c DiodeClass) (Shockley, error) {
	if err := checkFitPoints([]Point{p1, p2}); err != nil {
		return Shockley{}, err
	}
	if p1.I == p2.I {
		return Shockley{}, fmt.Errorf("%w: the two points have the same current %g A", ErrBadPoint, p1.I)
	}
	nvt := (p2.V - p1.V) / math.Log(p2.I/p1.I)
	if !(nvt > 0) {
		return Shockley{}, fmt.Errorf("%w: V_F must rise with current (got n·V_T = %g V)", ErrInconsistentF, nvt)
	}
	s := Shockley{N: nvt / ThermalVoltageC(tj), IS: p1.I / math.Exp(p1.V/nvt), TRef: tj}
	s.XTI, s.EG = SPICETemperatureParams(c)
	return s, nil
}

// FitShockley3 fits V = a + b·ln I + R_S·I by least squares through three or
// more points at one junction temperature tj (°C), REFERENCE §1.2(a):
// b = n·V_T, a = −n·V_T·ln I_S. The points should span at least a decade of
// current. If the best fit has R_S < 0 (points without visible ohmic
// bend) the fit is repeated with R_S = 0.
func FitShockley3(pts []Point, tj float64, c DiodeClass) (Shockley, error) {
	if len(pts) < 3 {
		return Shockley{}, fmt.Errorf("%w: need at least 3 points, got %d", ErrBadPoint, len(pts))
	}
	if err := checkFitPoints(pts); err != nil {
		return Shockley{}, err
	}
	// Normal equations for the columns (1, ln I, I).
	var s [3][3]float64
	var r [3]float64
	for _, p := range pts {
		x := [3]float64{1, math.Log(p.I), p.I}
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				s[i][j] += x[i] * x[j]
			}
			r[i] += x[i] * p.V
		}
	}
	a, b, rs, ok := solve3(s, r)
	if !ok || rs < 0 {
		// two-parameter fit a + b·ln I
		var n, sx, sy, sxx, sxy float64
		for _, p := range pts {
			x := math.Log(p.I)
			n++
			sx += x
			sy += p.V
			sxx += x * x
			sxy += x * p.V
		}
		den := n*sxx - sx*sx
		if den == 0 {
			return Shockley{}, fmt.Errorf("%w: all points have the same current", ErrBadPoint)
		}
		b = (n*sxy - sx*sy) / den
		a = (sy - b*sx) / n
		rs = 0
	}
	if !(b > 0) {
		return Shockley{}, fmt.Errorf("%w: V_F must rise with current (got n·V_T = %g V)", ErrInconsistentF, b)
	}
	sh := Shockley{N: b / ThermalVoltageC(tj), IS: math.Exp(-a / b), RS: rs, TRef: tj}
	sh.XTI, sh.EG = SPICETemperatureParams(c)
	return sh, nil
}

func checkFitPoints(pts []Point) error {
	for k, p := range pts {
		if !finite(p.I) || p.I <= 0 || !finite(p.V) || p.V <= 0 || p.V > 20 {
			return fmt.Errorf("%w: point %d (%g A, %g V): want I > 0 and 0 < V ≤ 20 V", ErrBadPoint, k+1, p.I, p.V)
		}
	}
	return nil
}

// solve3 solves the 3×3 system m·x = r by Gaussian elimination with partial
// pivoting.
func solve3(m [3][3]float64, r [3]float64) (x0, x1, x2 float64, ok bool) {
	for c := 0; c < 3; c++ {
		p := c
		for k := c + 1; k < 3; k++ {
			if math.Abs(m[k][c]) > math.Abs(m[p][c]) {
				p = k
			}
		}
		if math.Abs(m[p][c]) < 1e-300 {
			return 0, 0, 0, false
		}
		m[c], m[p] = m[p], m[c]
		r[c], r[p] = r[p], r[c]
		for k := c + 1; k < 3; k++ {
			f := m[k][c] / m[c][c]
			for j := c; j < 3; j++ {
				m[k][j] -= f * m[c][j]
			}
			r[k] -= f * r[c]
		}
	}
	var x [3]float64
	for c := 2; c >= 0; c-- {
		v := r[c]
		for j := c + 1; j < 3; j++ {
			v -= m[c][j] * x[j]
		}
		x[c] = v / m[c][c]
	}
	if !finite(x[0]) || !finite(x[1]) || !finite(x[2]) {
		return 0, 0, 0, false
	}
	return x[0], x[1], x[2], true
}

// ISAt returns the saturation current (A) at junction temperature tj (°C)
// by the SPICE law in the type's documentation.
func (s Shockley) ISAt(tj float64) float64 {
	t0, t := Kelvin(s.TRef), Kelvin(tj)
	if s.XTI == 0 && s.EG == 0 {
		return s.IS
	}
	r := t / t0
	return s.IS * math.Pow(r, s.XTI/s.N) * math.Exp((r-1)*s.EG/(s.N*ThermalVoltage(t)))
}

// VF returns the forward voltage (V) at current i (A) and junction
// temperature tj (°C): n·V_T(T)·ln(i/I_S(T) + 1) + i·R_S; 0 for i ≤ 0.
func (s Shockley) VF(i, tj float64) float64 {
	if !(i > 0) {
		return 0
	}
	return s.N*ThermalVoltageC(tj)*math.Log1p(i/s.ISAt(tj)) + i*s.RS
}
