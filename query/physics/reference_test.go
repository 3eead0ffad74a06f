package physics_test

import (
	"math"
	"testing"

	"partsieve/query/physics"
)

// Check values of REFERENCE.md §8 (numbered as there) and the worked
// examples of §7. Every case names its source and an explicit tolerance.

type approxCase struct {
	name string
	got  float64
	want float64
	tol  float64 // absolute tolerance, in the unit of want
}

func checkApprox(t *testing.T, cases []approxCase) {
	t.Helper()
	for _, c := range cases {
		if math.IsNaN(c.got) || math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s = %.6g, want %.6g ± %g", c.name, c.got, c.want, c.tol)
		}
	}
}

func mustForward(t *testing.T, d physics.ForwardData) physics.ForwardModel {
	t.Helper()
	m, err := physics.NewForwardModel(d)
	if err != nil {
		t.Fatalf("NewForwardModel(%+v): %v", d, err)
	}
	return m
}

func TestReferenceChecks(t *testing.T) {
	// #4 ST AN604 rev 3 trapezoid
	trap := physics.Waveform{Shape: physics.Trapezoid, Peak: 11.8, Min: 4, Duty: 0.6}
	// #5 ST datasheet, 30 V/8 A Schottky, V_F,max at 125 °C
	st := mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.40, IF: 8, TJ: 125, Has2: true, VF2: 0.57, IF2: 16, TJ2: 125})
	conv := physics.ConvertIFSM(1, physics.JEDECSurgeTime, physics.IECSurgeTime)
	lim := physics.Runaway(0.07675, 0.1e-3, 25, 11, 25, 0)
	leak := physics.Leakage{IR0: 0.1e-3, T0: 25, VR0: 11, A: 0.07675}
	a9 := physics.LeakageSlope(0.1e-3, 25, 10e-3, 85)
	e8 := physics.FETTj(0.010, 0.4, 5, 85, 50, physics.SolveOptions{})

	checkApprox(t, []approxCase{
		// #1 [D] SI 2019 exact k and q: V_T(298.15 K) = 25.6926 mV ± 0.001 mV
		{"#1 V_T(298.15 K) mV", physics.ThermalVoltage(298.15) * 1e3, 25.6926, 0.001},
		// REFERENCE §1.1 [D]: V_T at 300.15 K and 398.15 K
		{"V_T(300.15 K) mV", physics.ThermalVoltage(300.15) * 1e3, 25.865, 0.001},
		{"V_T(125 °C) mV", physics.ThermalVoltageC(125) * 1e3, 34.310, 0.001},
		// #2 [D] n = 1 at 25 °C: 59.159 mV per decade
		{"#2 mV/decade", physics.VoltsPerDecade(1, 25) * 1e3, 59.159, 0.001},
		// #3 [V] ST AN604 (E1): V_T0 1.15 V, r_d 0.029 Ω, 20 A rectangular, δ 0.5 → 17.3 W
		{"#3 P W", physics.ConductionLoss(1.15, 0.029,
			physics.Waveform{Shape: physics.Rectangular, Peak: 20, Duty: 0.5}.Average(),
			physics.Waveform{Shape: physics.Rectangular, Peak: 20, Duty: 0.5}.RMS2()), 17.3, 0.005},
		// #4 [V] ST AN604 rev 3: I_AV 4.74 A, I_RMS 6.363 A (AN rounds to 4.7 / 6.4)
		{"#4 I_AV A", trap.Average(), 4.74, 0.005},
		{"#4 I_RMS A", trap.RMS(), 6.363, 0.001},
		// #5 [V] ST datasheet: V_T0 0.230 V, r_d 0.02125 Ω (printed 0.23 / 0.021)
		{"#5 V_T0 V", st.VT0, 0.230, 0.0005},
		{"#5 r_d Ω", st.RD, 0.02125, 1e-6},
		// #6 [D] V_T0 0.23 V, r_d 0.021 Ω, 5 A DC → 1.675 W
		{"#6 P W", physics.ConductionLoss(0.23, 0.021, physics.DCCurrent(5).Average(), physics.DCCurrent(5).RMS2()), 1.675, 0.0005},
		// E3 [D] same part from its own two points at 5 A DC: 1.15 + 0.53 = 1.68 W
		{"E3 P W", st.DCLoss(5, 125), 1.68, 0.005},
		// #7 [V]/[D] bridge datasheet (E4): 50 A half-sine, 8.333 ms → 10.42 A²s (datasheet: 10)
		{"#7 I²t A²s", physics.HalfSineI2t(50, physics.JEDECSurgeTime), 10.42, 0.005},
		// #8 [D] 8.3 → 10 ms: ×0.9129 (constant I²t), ×0.9554 (constant I²√t); tool picks 0.9129
		{"#8 constant I²t", conv.FactorI2t, 0.9129, 0.0001},
		{"#8 constant I²√t", conv.FactorI2SqrtT, 0.9554, 0.0001},
		{"#8 chosen", conv.Factor, 0.9129, 0.0001},
		// #9 [D] from [V] Tremaine 2008: 0.1 mA @ 25 °C → 10 mA @ 85 °C: a = 0.07675 /K, ΔT_2 = 9.03 K
		{"#9 a 1/K", a9, 0.07675, 0.00001},
		{"#9 doubling K", physics.DoublingInterval(a9), 9.03, 0.005},
		// #10 [D] Tremaine 2008 inputs (E5): T_j,crit 105.3 °C, T_a,max 92.2 °C, P_crit 0.521 W
		{"#10 T_j,crit °C", lim.TjCrit, 105.3, 0.05},
		{"#10 T_a,max °C", lim.TaMax, 92.2, 0.05},
		{"E5 P_crit W", lim.PCrit, 0.521, 0.0005},
		// #10 [D] stable point at T_a = 60 °C: 60.42 °C
		{"#10 T_j(60 °C) °C", physics.ReverseBiasTj(leak, 11, 60, 25, 0, physics.SolveOptions{}).Tj, 60.42, 0.005},
		// #11 [D] Infineon AN (Graovac et al. 2006) §2.1.1, α 0.4 %/K
		{"#11 factor 125 °C", physics.RdsFactor(125, 0.4), 1.4906, 0.0001},
		{"#11 factor 150 °C", physics.RdsFactor(150, 0.4), 1.6471, 0.0001},
		// #12 [D] curve factor 1.7 at 150 °C → α = 0.4254 %/K
		{"#12 α %/K", physics.AlphaFromFactor(1.7, 150), 0.4254, 0.0001},
		// #13 [V] TI datasheet (E6): 4.4 A, 70 mΩ hot → 1.355 W
		{"#13 P W", physics.NewFETConduction(0.070, 0, 4.4).Power(150), 1.355, 0.0005},
		// #14 [D] E8 loop: 5 A, 10 mΩ, α 0.4, 50 K/W, 85 °C → T_j ≈ 102.0 °C, P ≈ 0.340 W
		{"#14 T_j °C", e8.Tj, 102.0, 0.1},
		{"#14 P W", e8.P, 0.340, 0.001},
		{"E8 R mΩ", e8.Rds * 1e3, 13.6, 0.05},
		{"E8 loop gain", e8.LoopGain, 0.068, 0.001},
		// #15 [V] AEM thin-film fuse note (E9): 4 A, K_T 0.90, UL 0.75 → 5.93 A → 6.3 A
		{"#15 I_n min A", physics.RequiredFuseRating(4, 0.75, 0.90), 5.93, 0.005},
		{"#15 R10 A", physics.NextR10(physics.RequiredFuseRating(4, 0.75, 0.90)), 6.3, 1e-9},
		// #16 [V] Schurter time-lag SMD (E9): 1 A, K_T 0.83, IEC → 1.205 A → 1.25 A
		{"#16 I_n min A", physics.RequiredFuseRating(1, 1.0, 0.83), 1.205, 0.001},
		{"#16 R10 A", physics.NextR10(physics.RequiredFuseRating(1, 1.0, 0.83)), 1.25, 1e-9},
		// E9 [V] TA-I: 1.5 A, 0.7 × 0.95 → 2.255 A minimum
		{"E9 TA-I A", physics.RequiredFuseRating(1.5, 0.7, 0.95), 2.255, 0.001},
		// #18 [V] Matsuo datasheet (E10): 60 A²s, load ratio 0.35 → 171.4 A²s
		{"#18 I²t A²s", physics.RequiredMeltingI2t(60, 0.35), 171.4, 0.05},
		// E10 [D] with the Littelfuse factor 0.22 at 10⁵ pulses → 273 A²s
		{"E10 Littelfuse A²s", physics.RequiredMeltingI2t(60, 0.22), 273, 0.5},
	})
	if !e8.Stable || e8.Status != physics.Stable {
		t.Errorf("#14 E8 loop: status %v, want stable", e8.Status)
	}
	if conv.Model != "constant I²t" {
		t.Errorf("#8 model %q, want constant I²t", conv.Model)
	}
	// #17 [V] Littelfuse pulse factors, exact table rows (tolerance 1e-9)
	for _, c := range []struct{ n, want float64 }{{1e5, 0.22}, {1e4, 0.29}, {1e3, 0.38}, {1e2, 0.48}} {
		got, outside := physics.LittelfusePulseTable.Factor(c.n)
		if math.Abs(got-c.want) > 1e-9 || outside {
			t.Errorf("#17 pulse factor(%g) = %g (outside %v), want %g", c.n, got, outside, c.want)
		}
	}
}

// TestE2Trapezoid checks the derived AN604 rev 3 example (REFERENCE E2 [D]):
// curve readings give r_d 14.1 mΩ, V_T0 0.464 V at 25 °C and 15.4 mΩ, 0.368 V
// at 125 °C; P = 2.77 W and 2.37 W for the trapezoid of check 4.
func TestE2Trapezoid(t *testing.T) {
	w := physics.Waveform{Shape: physics.Trapezoid, Peak: 11.8, Min: 4, Duty: 0.6}
	m25 := mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.52, IF: 4, TJ: 25, Has2: true, VF2: 0.63, IF2: 11.8, TJ2: 25})
	m125 := mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.43, IF: 4, TJ: 125, Has2: true, VF2: 0.55, IF2: 11.8, TJ2: 125})
	checkApprox(t, []approxCase{
		{"r_d 25 °C mΩ", m25.RD * 1e3, 14.1, 0.05},
		{"V_T0 25 °C V", m25.VT0, 0.464, 0.0005},
		{"r_d 125 °C mΩ", m125.RD * 1e3, 15.4, 0.05},
		{"V_T0 125 °C V", m125.VT0, 0.368, 0.001},
		{"P 25 °C W", m25.Loss(w, 25), 2.77, 0.005},
		{"P 125 °C W", m125.Loss(w, 125), 2.37, 0.005},
	})
}

// TestGateTables checks #19 and #20 as data lookups.
func TestGateTables(t *testing.T) {
	type want struct {
		current    float64 // A
		min, max   float64 // s, 0 = no bound
		continuous bool
	}
	cases := []struct {
		name  string
		table physics.GateTable
		in    float64
		want  []want
	}{
		// #19 [V] Littelfuse (UL 248-14), I_n = 5 A: carry 5 A; ≤ 60 min at 6.75 A; ≤ 2 min at 10 A
		{"#19 UL 248-14 5 A", physics.UL248_14, 5, []want{{5, 0, 0, true}, {6.75, 0, 3600, false}, {10, 0, 120, false}}},
		// UL 248-14 [V]: 35–60 A ratings get 4 min at 200 %
		{"UL 248-14 40 A", physics.UL248_14, 40, []want{{40, 0, 0, true}, {54, 0, 3600, false}, {80, 0, 240, false}}},
		// #20 [V] Schurter/Littelfuse Sheet 3, I_n = 1 A
		{"#20 IEC 60127-2/3 1 A", physics.IEC60127Sheet3, 1, []want{
			{1.5, 3600, 0, false}, {2.1, 0, 120, false}, {2.75, 0.6, 10, false}, {4, 0.15, 3, false}, {10, 0.02, 0.3, false}}},
		// Sheet 3 [V], small ratings 0.05–0.1 A
		{"IEC 60127-2/3 0.1 A", physics.IEC60127Sheet3, 0.1, []want{
			{0.15, 3600, 0, false}, {0.21, 0, 120, false}, {0.275, 0.2, 10, false}, {0.4, 0.04, 3, false}, {1, 0.01, 0.3, false}}},
	}
	const tol = 1e-9
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := c.table.For(c.in)
			if len(got) != len(c.want) {
				t.Fatalf("%d gates, want %d: %+v", len(got), len(c.want), got)
			}
			for k, w := range c.want {
				g := got[k]
				if math.Abs(g.Current(c.in)-w.current) > tol || math.Abs(g.Min-w.min) > tol ||
					math.Abs(g.Max-w.max) > tol || g.Continuous != w.continuous {
					t.Errorf("gate %d: %s (min %g s, max %g s), want %+v", k, g.Describe(c.in), g.Min, g.Max, w)
				}
				if g.Tag != physics.Verified {
					t.Errorf("gate %d tag %v, want [V]", k, g.Tag)
				}
			}
		})
	}
	// Sheet 3 breaking capacity [V]: 35 A up to 3.15 A, 10·I_n above (40/50/63 A at 4/5/6.3 A)
	for _, c := range []struct{ in, want float64 }{{1, 35}, {3.15, 35}, {4, 40}, {5, 50}, {6.3, 63}} {
		if got := physics.IEC60127Sheet3.MinBreaking(c.in); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("Sheet 3 breaking at %g A = %g A, want %g A", c.in, got, c.want)
		}
	}
	// UL 248-14 interrupting minimum at 250 V [V]
	for _, c := range []struct{ in, want float64 }{{0.5, 35}, {1, 35}, {2, 100}, {5, 200}, {12, 750}, {30, 1500}} {
		if got, ok := physics.ULInterruptingMin(c.in); !ok || got != c.want {
			t.Errorf("UL interrupting at %g A = %g (%v), want %g", c.in, got, ok, c.want)
		}
	}
	if d := physics.UL248_14.For(5)[1].Describe(5); d != "at 6.75 A (135 % I_n): open within 60 min" {
		t.Errorf("Describe = %q", d)
	}
}

// TestE8PFETStage is the derived pfet-high regression case (REFERENCE E8 [D]).
func TestE8PFETStage(t *testing.T) {
	z, err := physics.ZenerClampInput{
		VZ: 12, Tol: 0.05, RG: 10e3,
		VinMin: 6, VinNom: 14, VinMax: 35, // crank, generator voltage, clamped load dump
		VGSRated: 10, VGSMax: 20, KVGS: 0.8,
	}.Size()
	if err != nil {
		t.Fatal(err)
	}
	checkApprox(t, []approxCase{
		{"V_Z,min V", z.VZMin, 11.4, 1e-9},
		{"V_Z,max V", z.VZMax, 12.6, 1e-9},
		{"V_Z limit V", z.VZLimit, 16, 1e-9},
		{"I_Z at 35 V mA", z.IZMax * 1e3, 2.36, 0.005},
		{"P_RG mW", z.PRG * 1e3, 55.7, 0.05},
		{"P_Z mW", z.PZ * 1e3, 29.7, 0.05},
		{"I_Z at 16 V mA", z.ZenerCurrent(16, 10e3) * 1e3, 0.46, 0.005},
		{"I_q at 14 V mA", z.IQNom * 1e3, 0.26, 0.005},
		{"|V_GS| at 6 V crank", z.DriveMin, 6, 1e-9},
	})
	if !z.WindowOK {
		t.Error("Zener window 11.4–12.6 V should pass 0.8·20 V = 16 V")
	}
	if z.DriveOK {
		t.Error("6 V crank gives only 6 V of drive: R_DS(on) rated at 10 V must not be accepted")
	}
	// at 6 V, R_DS(on) must come from a rating at ≤ 6 V (E8: "needs R_DS(on) specified at ≤ 4.5 V")
	g := physics.GateRatings{R1: 0.010, V1: 10, Has2: true, R2: 0.014, V2: 4.5}
	if r, v, err := g.RdsonAt(z.DriveMin); err != nil || r != 0.014 || v != 4.5 {
		t.Errorf("RdsonAt(6 V) = %g Ω at %g V, %v; want 0.014 Ω at 4.5 V", r, v, err)
	}
	if _, _, err := (physics.GateRatings{R1: 0.010, V1: 10}).RdsonAt(6); err != physics.ErrDriveTooLow {
		t.Errorf("10 V-only part at 6 V: err %v, want ErrDriveTooLow", err)
	}
}
