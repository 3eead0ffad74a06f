package physics

import "math"

// Heater is a heat source whose dissipation depends on its own junction
// temperature: Power returns P(T_j) in W for T_j in °C.
type Heater interface {
	Power(tj float64) float64
}

// PowerFunc adapts a function to Heater.
type PowerFunc func(tj float64) float64

// Power calls f.
func (f PowerFunc) Power(tj float64) float64 { return f(tj) }

// Status is the outcome of a junction-temperature solve.
type Status int

// Solve outcomes.
const (
	// Stable: a fixed point was found and the loop gain there is below 1.
	Stable Status = iota
	// RunawayCap: the iteration passed the temperature cap, so there is no
	// fixed point below it: thermal runaway (or at least a junction far
	// beyond any rating).
	RunawayCap
	// RunawayGain: a fixed point was found but the loop gain
	// R_th·dP/dT_j there is 1 or more, so it is not a stable operating point.
	RunawayGain
	// NoConvergence: the iteration neither settled nor passed the cap within
	// the iteration budget (loop gain very close to 1); treat as runaway.
	NoConvergence
	// BadInput: non-finite or negative inputs, or a heater that returned NaN.
	BadInput
)

var statusReason = [...]string{
	Stable:        "stable operating point",
	RunawayCap:    "thermal runaway: no fixed point below the temperature cap",
	RunawayGain:   "thermal runaway: loop gain R_th·dP/dT_j ≥ 1 at the fixed point",
	NoConvergence: "no convergence (loop gain near 1): treated as thermal runaway",
	BadInput:      "invalid input to the junction-temperature solve",
}

// String returns the reason text of the status.
func (s Status) String() string {
	if s < 0 || int(s) >= len(statusReason) {
		return "unknown status"
	}
	return statusReason[s]
}

// SolveOptions tune SolveTj. Zero fields take the defaults.
type SolveOptions struct {
	// Tol is the convergence tolerance on T_j in K (default 0.01 K; REFERENCE
	// §1.5 asks for 0.1 K or tighter).
	Tol float64
	// MaxIter bounds the iterations (default 2000).
	MaxIter int
	// Cap is the temperature (°C) above which the solve declares runaway
	// (default 400 °C, far above any silicon rating; the caller compares
	// T_j with the part's limit separately).
	Cap float64
}

// Solver defaults.
const (
	DefaultTjTol   = 0.01
	DefaultMaxIter = 2000
	DefaultTjCap   = 400.0
	gainStep       = 0.01 // K, step of the forward difference for dP/dT_j
)

// JunctionResult is the outcome of SolveTj.
type JunctionResult struct {
	// Tj is the junction temperature (°C): the fixed point; the cap for
	// RunawayCap; the last iterate for NoConvergence.
	Tj float64
	// P is the dissipation (W) at Tj; for RunawayCap the loss at the last
	// iterate below the cap.
	P          float64
	Iterations int
	Stable     bool
	// LoopGain is R_th·dP/dT_j at Tj (dimensionless): below 1 the point is
	// stable; negative for heaters whose loss falls with temperature.
	LoopGain float64
	Status   Status
	// Reason is Status.String(), kept for output.
	Reason string
}

// SolveTj finds the steady junction temperature of a part with
// junction-to-ambient thermal resistance rth (K/W) at ambient ta (°C)
// whose loss depends on its own temperature (REFERENCE §1.5, JEDEC JESD51
// steady state):
//
//	T_j = T_a + R_thJA·P(T_j)
//
// by fixed-point iteration T_j(k+1) = T_a + R_th·P(T_j(k)) from T_j(0) = T_a
// until the estimated remaining error is below Tol. The error estimate is
// |ΔT|·max(1, 1/(1 − g)) with g the ratio of the last two steps, so slow
// convergence near loop gain 1 is not mistaken for a solution. When the
// steps alternate in sign (a loss that falls with temperature and a loop
// gain below −1) the step is relaxed by 1/(1 − g), which keeps the
// iteration convergent.
//
// Runaway is reported when an iterate passes Cap (no fixed point below the
// cap), when the loop gain R_th·dP/dT_j at the fixed point is ≥ 1 (dP/dT_j
// by forward difference over 0.01 K; REFERENCE §1.4/§1.5 stability test),
// or when the iteration budget runs out. Starting from T_a and with P
// rising in T_j, the iteration climbs to the lowest fixed point, which is
// the physical one.
//
// SolveTj does not allocate when h is a non-escaping value (the heaters of
// this package, or a PowerFunc closure).
func SolveTj[H Heater](ta, rth float64, h H, opt SolveOptions) JunctionResult {
	return solveTj(ta, rth, h, opt, true)
}

// solveTj is SolveTj; with numericGain false the loop gain is left at 0
// for the caller to fill in analytically (and the stability verdict to it).
func solveTj[H Heater](ta, rth float64, h H, opt SolveOptions, numericGain bool) JunctionResult {
	tol, maxIter, tcap := opt.Tol, opt.MaxIter, opt.Cap
	if !(tol > 0) {
		tol = DefaultTjTol
	}
	if maxIter <= 0 {
		maxIter = DefaultMaxIter
	}
	if tcap == 0 || math.IsNaN(tcap) {
		tcap = DefaultTjCap
	}
	bad := JunctionResult{Tj: ta, Status: BadInput, Reason: BadInput.String()}
	if !finite(ta) || !finite(rth) || rth < 0 || ta > tcap {
		return bad
	}
	t := ta
	p := h.Power(t)
	if math.IsNaN(p) {
		return bad
	}
	prev := 0.0
	for k := 1; k <= maxIter; k++ {
		next := ta + rth*p
		if math.IsNaN(next) {
			bad.Iterations = k
			return bad
		}
		step := next - t
		g := 0.0
		if prev != 0 {
			g = step / prev
		}
		if g < -0.5 {
			// oscillation: relax (exact for a linear loss)
			step /= 1 - g
			next = t + step
			g = 0
		}
		if next > tcap {
			return JunctionResult{Tj: tcap, P: p, Iterations: k, LoopGain: math.Inf(1),
				Status: RunawayCap, Reason: RunawayCap.String()}
		}
		t = next
		p = h.Power(t)
		if math.IsNaN(p) {
			bad.Iterations = k
			return bad
		}
		prev = step
		errEst := math.Abs(step)
		if g >= 1 {
			continue // steps growing: not converging here
		}
		if g > 0 {
			errEst /= 1 - g
		}
		if errEst >= tol {
			continue
		}
		gain := 0.0
		if numericGain {
			gain = rth * (h.Power(t+gainStep) - p) / gainStep
		}
		if math.IsNaN(gain) {
			bad.Iterations = k
			return bad
		}
		if gain > 0 && gain < 1 && math.Abs(step)/(1-gain) >= tol {
			continue // the local gain says the remaining error is still too large
		}
		r := JunctionResult{Tj: t, P: p, Iterations: k, LoopGain: gain, Stable: true,
			Status: Stable, Reason: Stable.String()}
		if !(gain < 1) {
			r.Stable = false
			r.Status = RunawayGain
			r.Reason = RunawayGain.String()
		}
		return r
	}
	return JunctionResult{Tj: t, P: p, Iterations: maxIter, LoopGain: math.NaN(),
		Status: NoConvergence, Reason: NoConvergence.String()}
}

// DiodeConduction is the Heater of a diode carrying a DC forward current I
// (A): P(T_j) = V_F(I, T_j)·I.
type DiodeConduction struct {
	M *ForwardModel
	I float64
	// Extra is a temperature-independent loss (W) in the same package
	// (e.g. a second diode of a dual part); usually 0.
	Extra float64
}

// Power returns V_F(I, T_j)·I + Extra in W.
func (d DiodeConduction) Power(tj float64) float64 { return d.M.VF(d.I, tj)*d.I + d.Extra }

// DiodeTj solves the junction temperature of a diode carrying DC current i
// (A) at ambient ta (°C) with thermal resistance rth (K/W). Because V_F
// falls with temperature, the loop gain is usually negative and the
// solution stable.
func DiodeTj(m *ForwardModel, i, ta, rth float64, opt SolveOptions) JunctionResult {
	return SolveTj(ta, rth, DiodeConduction{M: m, I: i}, opt)
}
