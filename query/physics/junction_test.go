package physics_test

import (
	"errors"
	"math"
	"testing"

	"partsieve/query/physics"
)

// The solution satisfies T_j = T_a + R_th·P(T_j) within the tolerance.
func TestSolveTjConsistency(t *testing.T) {
	st := mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.40, IF: 8, TJ: 125, Has2: true, VF2: 0.57, IF2: 16, TJ2: 125})
	for _, ta := range []float64{-40, 25, 85} {
		for _, rth := range []float64{1, 20, 60, 200} {
			r := physics.DiodeTj(&st, 5, ta, rth, physics.SolveOptions{})
			if r.Status == physics.BadInput || r.Status == physics.NoConvergence {
				t.Fatalf("ta %g rth %g: %v", ta, rth, r.Reason)
			}
			if !r.Stable {
				continue // rth 200 K/W drives this diode past the cap: fine, checked elsewhere
			}
			if d := math.Abs(r.Tj - (ta + rth*st.DCLoss(5, r.Tj))); d > 0.02 {
				t.Errorf("ta %g rth %g: residual %g K (Tj %g)", ta, rth, d, r.Tj)
			}
			if r.LoopGain >= 0 {
				t.Errorf("ta %g rth %g: diode loss falls with T_j, loop gain %g should be negative", ta, rth, r.LoopGain)
			}
		}
	}
}

// Property: T_j grows with ambient (diode, MOSFET, reverse-biased Schottky).
func TestTjGrowsWithAmbient(t *testing.T) {
	st := mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.40, IF: 8, TJ: 125, Has2: true, VF2: 0.57, IF2: 16, TJ2: 125})
	leak := physics.Leakage{IR0: 0.1e-3, T0: 25, A: 0.07675}
	prev := [3]float64{-1e9, -1e9, -1e9}
	for ta := -40.0; ta <= 90; ta += 5 {
		got := [3]float64{
			physics.DiodeTj(&st, 3, ta, 40, physics.SolveOptions{}).Tj,
			physics.FETTj(0.010, 0.4, 5, ta, 50, physics.SolveOptions{}).Tj,
			physics.ReverseBiasTj(leak, 11, ta, 25, 0, physics.SolveOptions{}).Tj,
		}
		for k := range got {
			if !(got[k] > prev[k]) {
				t.Fatalf("heater %d: T_j(%g °C) = %g not above %g", k, ta, got[k], prev[k])
			}
		}
		prev = got
	}
}

// E5 (Tremaine 2008 inputs [D]): stable below T_a,max = 92.2 °C, runaway above.
func TestE5Runaway(t *testing.T) {
	leak := physics.Leakage{IR0: 0.1e-3, T0: 25, VR0: 11, A: 0.07675}
	lim := leak.Runaway(11, 25, 0)
	cases := []struct {
		ta     float64
		stable bool
	}{
		{60, true}, {85, true}, {lim.TaMax - 0.3, true}, {lim.TaMax + 0.3, false}, {100, false},
	}
	for _, c := range cases {
		r := physics.ReverseBiasTj(leak, 11, c.ta, 25, 0, physics.SolveOptions{})
		if r.Stable != c.stable {
			t.Errorf("T_a %.2f °C: stable %v (%v, T_j %.2f, gain %.3f, %d iterations), want %v", c.ta, r.Stable, r.Reason, r.Tj, r.LoopGain, r.Iterations, c.stable)
		}
		if r.Stable && (r.LoopGain <= 0 || r.LoopGain >= 1 || r.Tj > lim.TjCrit) {
			t.Errorf("T_a %g: stable point %g °C with gain %g should lie below T_j,crit %g with 0 < gain < 1", c.ta, r.Tj, r.LoopGain, lim.TjCrit)
		}
		if !r.Stable && r.Status != physics.RunawayCap {
			t.Errorf("T_a %g: status %v, want RunawayCap", c.ta, r.Status)
		}
	}
	// At T_j,crit the loop gain a·R_th·P_R is 1 by definition (tolerance 1e-9).
	if g := leak.A * 25 * leak.ReversePower(lim.TjCrit, 11); math.Abs(g-1) > 1e-9 {
		t.Errorf("gain at T_j,crit = %g, want 1", g)
	}
	// Another loss in the package lowers T_a,max by R_th·P_other: 0.2 W × 25 K/W = 5 K
	if d := lim.TaMax - leak.Runaway(11, 25, 0.2).TaMax; math.Abs(d-5) > 1e-9 {
		t.Errorf("T_a,max shift %g K, want 5 K", d)
	}
	// Leakage given at 10 V but applied at 11 V: the voltage rule [M] scales it ×1.1,
	// which lowers T_j,crit from 105.3 to 104.0 °C (tolerance 0.05 K).
	at10 := physics.Leakage{IR0: 0.1e-3, T0: 25, VR0: 10, A: 0.07675}
	checkApprox(t, []approxCase{{"T_j,crit with 10 V leakage", at10.Runaway(11, 25, 0).TjCrit, 104.0, 0.05}})
}

// Runaway is detected when R_th is huge.
func TestRunawayHugeRth(t *testing.T) {
	st := mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.40, IF: 8, TJ: 125, Has2: true, VF2: 0.57, IF2: 16, TJ2: 125})
	leak := physics.Leakage{IR0: 20e-6, T0: 25, VR0: 40, A: 0.0864}
	cases := map[string]physics.JunctionResult{
		"mosfet":  physics.FETTj(0.010, 0.4, 5, 25, 1e4, physics.SolveOptions{}).JunctionResult,
		"reverse": physics.ReverseBiasTj(leak, 40, 25, 1e4, 0, physics.SolveOptions{}),
		"diode":   physics.DiodeTj(&st, 5, 25, 1e4, physics.SolveOptions{}),
	}
	for name, r := range cases {
		if r.Stable || r.Status != physics.RunawayCap {
			t.Errorf("%s: %v (T_j %g), want runaway past the cap", name, r.Reason, r.Tj)
		}
	}
	// a user cap below the natural solution is honoured
	r := physics.FETTj(0.010, 0.4, 5, 85, 50, physics.SolveOptions{Cap: 100})
	if r.Stable || r.Status != physics.RunawayCap {
		t.Errorf("cap 100 °C with T_j 102 °C: %v", r.Reason)
	}
}

// The MOSFET loop's stability edge, R_th·P·ln(1 + α/100) = 1 (REFERENCE §3.5 [D]).
func TestFETStabilityEdge(t *testing.T) {
	// At the edge T* − T_a = 1/k and P* = 1/(R_th·k), k = ln(1+α/100); with
	// P* = I²·R25·e^{k(T*−25)} the largest stable ambient is
	// T_a,max = 25 + ln(1/(R_th·k·I²·R25))/k − 1/k.
	const r25, alpha, i, rth = 0.010, 0.4, 5.0, 200.0
	k := math.Log1p(alpha / 100)
	taMax := 25 + math.Log(1/(rth*k*i*i*r25))/k - 1/k
	below := physics.FETTj(r25, alpha, i, taMax-2, rth, physics.SolveOptions{})
	above := physics.FETTj(r25, alpha, i, taMax+2, rth, physics.SolveOptions{})
	if !below.Stable || below.LoopGain >= 1 {
		t.Errorf("2 K below the edge: %v gain %g", below.Reason, below.LoopGain)
	}
	if above.Stable {
		t.Errorf("2 K above the edge: %v T_j %g", above.Reason, above.Tj)
	}
	if g := physics.FETLoopGain(rth, below.P, alpha); math.Abs(g-below.LoopGain) > 1e-12 {
		t.Errorf("FETLoopGain %g vs result %g", g, below.LoopGain)
	}
}

func TestSolveTjEdgeCases(t *testing.T) {
	// strong negative feedback (gain −4): plain iteration would oscillate;
	// P = 10 − 0.2·(T − 25), R_th 20 → T − 25 = 200 − 4·(T − 25) → T = 65 °C
	neg := physics.PowerFunc(func(tj float64) float64 { return math.Max(0, 10-0.2*(tj-25)) })
	r := physics.SolveTj(25, 20, neg, physics.SolveOptions{})
	if !r.Stable || math.Abs(r.Tj-65) > 0.01 || math.Abs(r.LoopGain+4) > 1e-6 {
		t.Errorf("negative feedback: %v T_j %g gain %g", r.Reason, r.Tj, r.LoopGain)
	}
	// constant loss: one step
	c := physics.SolveTj(40, 10, physics.PowerFunc(func(float64) float64 { return 2 }), physics.SolveOptions{})
	if !c.Stable || c.Tj != 60 || c.LoopGain != 0 {
		t.Errorf("constant loss: %+v", c)
	}
	// bad inputs
	nan := physics.PowerFunc(func(float64) float64 { return math.NaN() })
	for name, r := range map[string]physics.JunctionResult{
		"NaN ambient":  physics.SolveTj(math.NaN(), 10, c2(), physics.SolveOptions{}),
		"negative Rth": physics.SolveTj(25, -1, c2(), physics.SolveOptions{}),
		"NaN heater":   physics.SolveTj(25, 10, nan, physics.SolveOptions{}),
	} {
		if r.Status != physics.BadInput || r.Stable {
			t.Errorf("%s: %v", name, r.Reason)
		}
	}
	// slow convergence with a tiny iteration budget
	leak := physics.Leakage{IR0: 0.1e-3, T0: 25, A: 0.07675}
	lim := leak.Runaway(11, 25, 0)
	slow := physics.ReverseBiasTj(leak, 11, lim.TaMax-0.3, 25, 0, physics.SolveOptions{MaxIter: 3})
	if slow.Status != physics.NoConvergence || slow.Stable {
		t.Errorf("3 iterations near the edge: %v", slow.Reason)
	}
	if physics.Status(99).String() != "unknown status" || physics.RunawayGain.String() == "" {
		t.Error("status strings")
	}
}

func c2() physics.PowerFunc { return func(float64) float64 { return 2 } }

func TestLeakage(t *testing.T) {
	// two points: Tremaine 2008 0.1 mA @ 25 °C → 10 mA @ 85 °C [V] → a = 0.07675 /K [D]
	l, err := physics.NewLeakage(physics.LeakageData{IR: 0.1e-3, VR: 10, TJ: 25, Has2: true, IR2: 10e-3, TJ2: 85})
	if err != nil {
		t.Fatal(err)
	}
	if l.ASource != physics.AFromData || math.Abs(l.A-0.07675) > 1e-5 {
		t.Errorf("a = %g from %v", l.A, l.ASource)
	}
	// one point: doubling every 10 K [M] → ×2 at 35 °C, ×1024 at 125 °C
	d, err := physics.NewLeakage(physics.LeakageData{IR: 1e-6, VR: 30, TJ: 25})
	if err != nil {
		t.Fatal(err)
	}
	checkApprox(t, []approxCase{
		{"default ×2 at +10 K", d.IR(35, 30) / 1e-6, 2, 1e-9},
		{"default ×1024 at +100 K", d.IR(125, 30) / 1e-6, 1024, 1e-6},
		// voltage rule [M]: never below the test value, proportional above it
		{"half the test voltage", d.IR(25, 15) / 1e-6, 1, 1e-12},
		{"twice the test voltage", d.IR(25, 60) / 1e-6, 2, 1e-12},
	})
	if d.ASource != physics.ADefaultDoubling {
		t.Errorf("source %v", d.ASource)
	}
	// the user override wins over data: 8 K doubling
	o, err := physics.NewLeakage(physics.LeakageData{IR: 0.1e-3, TJ: 25, Has2: true, IR2: 10e-3, TJ2: 85, DoublingK: 8, Override: true})
	if err != nil || o.ASource != physics.AOverride || math.Abs(physics.DoublingInterval(o.A)-8) > 1e-12 {
		t.Errorf("override: %+v %v", o, err)
	}
	bad := []physics.LeakageData{
		{IR: 0, TJ: 25},
		{IR: 1e-6, TJ: 25, VR: -1},
		{IR: 1e-6, TJ: 25, Has2: true, IR2: 1e-7, TJ2: 100}, // falls with temperature
		{IR: 1e-6, TJ: 25, Has2: true, IR2: 1e-5, TJ2: 25.5},
		{IR: 1e-6, TJ: 25, DoublingK: -3},
	}
	for _, b := range bad {
		if _, err := physics.NewLeakage(b); err == nil {
			t.Errorf("%+v: no error", b)
		}
	}
}

func TestRdsonAt(t *testing.T) {
	two := physics.GateRatings{R1: 0.010, V1: 10, Has2: true, R2: 0.014, V2: 4.5}
	swapped := physics.GateRatings{R1: 0.014, V1: 4.5, Has2: true, R2: 0.010, V2: 10}
	cases := []struct {
		name   string
		g      physics.GateRatings
		vgs    float64
		r, vr  float64
		errLow bool
	}{
		{"above both", two, 12, 0.010, 10, false},
		{"at the higher rating", two, 10, 0.010, 10, false},
		{"between: the lower rating, never interpolated", two, 7, 0.014, 4.5, false},
		{"at the lower rating", two, 4.5, 0.014, 4.5, false},
		{"within 1 mV below", two, 4.4995, 0.014, 4.5, false},
		{"below both", two, 4.4, 0, 0, true},
		{"order of ratings does not matter", swapped, 7, 0.014, 4.5, false},
		{"order, high drive", swapped, 11, 0.010, 10, false},
		{"single rating", physics.GateRatings{R1: 0.02, V1: 4.5}, 5, 0.02, 4.5, false},
		{"single rating, low drive", physics.GateRatings{R1: 0.02, V1: 4.5}, 3.3, 0, 0, true},
	}
	for _, c := range cases {
		r, vr, err := c.g.RdsonAt(c.vgs)
		if c.errLow != (err != nil) || r != c.r || vr != c.vr {
			t.Errorf("%s: RdsonAt(%g) = %g Ω at %g V, %v", c.name, c.vgs, r, vr, err)
		}
		if err != nil && !errors.Is(err, physics.ErrDriveTooLow) {
			t.Errorf("%s: err %v", c.name, err)
		}
	}
	if v := two.MinRatedDrive(); v != 4.5 {
		t.Errorf("MinRatedDrive = %g", v)
	}
	if err := (physics.GateRatings{R1: 0, V1: 10}).Validate(); err == nil {
		t.Error("zero R_DS(on) accepted")
	}
	if err := two.Validate(); err != nil {
		t.Error(err)
	}
}

// Property: MOSFET loss grows with current; power-law model sanity.
func TestFETProperties(t *testing.T) {
	prev := 0.0
	for i := 0.5; i <= 20; i += 0.5 {
		r := physics.FETTj(0.005, 0.4, i, 50, 40, physics.SolveOptions{})
		if !r.Stable {
			break
		}
		if !(r.P > prev) {
			t.Fatalf("loss at %g A = %g not above %g", i, r.P, prev)
		}
		prev = r.P
	}
	// power law m = 2 from 300 K to 423 K (150 °C): ×2.0 for higher-voltage parts
	// [V Park/Choi/Chung 2000; m ≈ 2.0 D]; tolerance 0.02
	checkApprox(t, []approxCase{{"power law ×", physics.RdsFactorPowerLaw(Celsius(423), Celsius(300), 2), 1.99, 0.02}})
}

func Celsius(k float64) float64 { return physics.Celsius(k) }
