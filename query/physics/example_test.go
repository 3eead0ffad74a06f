package physics_test

import (
	"fmt"

	"partsieve/query/physics"
)

// A Schottky rectifier with two V_F,max points at 125 °C (REFERENCE E3):
// the AN604 line, the forward voltage and the loss at 5 A DC.
func ExampleNewForwardModel() {
	m, err := physics.NewForwardModel(physics.ForwardData{
		Class: physics.Schottky,
		VF:    0.40, IF: 8, TJ: 125,
		Has2: true, VF2: 0.57, IF2: 16, TJ2: 125,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("V_T0 %.3f V, r_d %.5f Ω\n", m.VT0, m.RD)
	fmt.Printf("V_F(5 A, 125 °C) = %.3f V, P = %.3f W\n", m.VF(5, 125), m.DCLoss(5, 125))
	fmt.Printf("V_F(5 A, 25 °C) = %.3f V (class default %+.1f mV/K)\n", m.VF(5, 25), m.TC*1e3)
	// Output:
	// V_T0 0.230 V, r_d 0.02125 Ω
	// V_F(5 A, 125 °C) = 0.336 V, P = 1.681 W
	// V_F(5 A, 25 °C) = 0.416 V (class default -0.8 mV/K)
}

// The P-MOSFET loss/temperature loop of REFERENCE E8.
func ExampleFETTj() {
	r := physics.FETTj(0.010, 0.4, 5, 85, 50, physics.SolveOptions{})
	fmt.Printf("T_j %.1f °C, R %.1f mΩ, P %.3f W, loop gain %.3f, %s\n", r.Tj, r.Rds*1e3, r.P, r.LoopGain, r.Reason)
	// Output:
	// T_j 102.0 °C, R 13.6 mΩ, P 0.340 W, loop gain 0.068, stable operating point
}

// Schottky leakage runaway under a sustained reverse bias (REFERENCE E5,
// Tremaine 2008 inputs).
func ExampleRunaway() {
	lim := physics.Runaway(0.07675, 0.1e-3, 25, 11, 25, 0)
	fmt.Printf("P_crit %.3f W, T_j,crit %.1f °C, T_a,max %.1f °C\n", lim.PCrit, lim.TjCrit, lim.TaMax)
	leak := physics.Leakage{IR0: 0.1e-3, T0: 25, VR0: 11, A: 0.07675}
	for _, ta := range []float64{60, 95} {
		r := physics.ReverseBiasTj(leak, 11, ta, 25, 0, physics.SolveOptions{})
		fmt.Printf("T_a %g °C: %s (T_j %.2f °C)\n", ta, r.Reason, r.Tj)
	}
	// Output:
	// P_crit 0.521 W, T_j,crit 105.3 °C, T_a,max 92.2 °C
	// T_a 60 °C: stable operating point (T_j 60.42 °C)
	// T_a 95 °C: thermal runaway: no fixed point below the temperature cap (T_j 400.00 °C)
}

// Fuse sizing with a catalog rerating curve (REFERENCE E9, AEM note).
func ExampleParseRerate() {
	c, err := physics.ParseRerate("25:1, 65:0.9, 85:0.8")
	if err != nil {
		fmt.Println(err)
		return
	}
	kt, _ := c.Factor(65)
	in := physics.RequiredFuseRating(4, physics.ULContinuousFactor, kt)
	fmt.Printf("K_T %.2f, I_n ≥ %.2f A → %g A\n", kt, in, physics.NextR10(in))
	// Output:
	// K_T 0.90, I_n ≥ 5.93 A → 6.3 A
}
