package topology

import (
	"math"
	"testing"

	"partsieve/catalog"
)

// e8Spec is the derived pfet-high case of REFERENCE E8: 12 V vehicle,
// 5 A, 85 °C, 35 V clamped load dump, 16 V steady. v_min is 10.5 V so
// that the gate reaches the 10 V at which R_DS(on) is rated (E8's own
// crank case at 6 V is TestE8CrankDrive). Commercial policy: k_vgs = 0.8.
const e8Spec = `[supply]
kind = "vehicle"
v_min = 10.5
v_nom = 13.5
v_max = 16
v_transient = 35
v_reverse = 14
reverse_time = "60 s"
r_source = 0.02
[load]
i_max = 5
v_min = 9
v_reverse_max = 0.5
[ambient]
t_min = -40
t_max = 85
[policy]
derating = "commercial"
`

// e8Parts: a P-MOSFET with R_DS(on),max 10 mΩ at V_GS = 10 V, R_thJA
// 50 K/W, V_GS,max 20 V, and a 12 V ±5 % Zener.
func e8Parts() []catalog.Part {
	return []catalog.Part{
		mk(catalog.MOSFET, "p", "E8-PFET", "vds", 60, "id", 50, "vgs_max", 20, "vgs_th", 2.5,
			"rdson", 0.010, "rdson_vgs", 10, "rthja", 50, "tjmax", 175, "pd", 3),
		mk(catalog.Diode, "zener", "E8-Z12", "vz", 12, "vz_tol", 0.05, "pd", 0.5, "tjmax", 150, "rthja", 250),
	}
}

// TestE8 runs REFERENCE E8 through the pfet-high evaluation. Expected
// values [D] from REFERENCE E8 / check value 14: T_j ≈ 102.0 °C, R =
// 13.6 mΩ, P = 0.340 W, loop gain 0.068; Zener window 11.4–12.6 V ≤ 0.8·20
// = 16 V; R_G = 10 kΩ; at 35 V I_Z = 2.36 mA, P_RG = 55.7 mW, P_Z =
// 29.7 mW; at 16 V I_Z = 0.46 mA.
func TestE8(t *testing.T) {
	s := mustSpec(t, e8Spec)
	r := Evaluate(s, NewCatalog(e8Parts()), Options{Topologies: []Topology{PFETHigh}})
	tr := topo(t, r, PFETHigh)
	if len(tr.Candidates) != 1 {
		t.Fatalf("want 1 candidate, got %d (eliminated %v)", len(tr.Candidates), tr.Eliminated)
	}
	c := tr.Candidates[0]
	if len(c.Parts) != 2 || c.Parts[0].MPN != "E8-PFET" || c.Parts[1].MPN != "E8-Z12" {
		t.Fatalf("parts %+v", c.Parts)
	}
	checks := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"T_j hot (°C)", float64(c.TjHot), 102.0, 0.1},
		{"loss (W)", float64(c.Loss) - float64(c.GateResistor.PowerSteady) - zenerSteady(c), 0.340, 0.002},
		{"drop = I·R(T_j) (V)", float64(c.Drop), 5 * 0.0136, 0.0005},
		{"R_G (Ω)", float64(c.GateResistor.Value), 10e3, 0},
		{"P_RG at 35 V (W)", float64(c.GateResistor.Power), 0.0557, 0.0001},
		{"I_Z at 16 V (A)", math.Sqrt(float64(c.GateResistor.PowerSteady) / 10e3), 0.46e-3, 0.005e-3},
	}
	for _, x := range checks {
		if !near(x.got, x.want, x.tol) {
			t.Errorf("%s = %.5g, want %.5g ± %g", x.name, x.got, x.want, x.tol)
		}
	}
	z := findCheck(t, c.Checks, "zener", "Zener window")
	if !near(float64(z.Value), 12.6, 1e-9) || !near(float64(z.Limit), 16, 1e-9) || !z.Pass {
		t.Errorf("Zener window check %+v, want 12.6 V ≤ 16 V", z)
	}
	zd := findCheck(t, c.Checks, "zener", "Zener keeps the drive")
	if !near(float64(zd.Value), 11.4, 1e-9) || float64(zd.Limit) != 10 {
		t.Errorf("Zener drive check %+v, want 11.4 V ≥ 10 V", zd)
	}
	zp := findCheck(t, c.Checks, "zener", "Zener power")
	if !near(float64(zp.Value), 0.0297, 0.0001) {
		t.Errorf("P_Z = %v W, want 29.7 mW", zp.Value)
	}
	tj := findCheck(t, c.Checks, "mosfet", "junction temperature")
	if !tj.Pass || !near(float64(tj.Limit), 145, 1e-9) {
		t.Errorf("T_j check %+v: limit min(150, 175 − 30) = 145 °C", tj)
	}
	d := findCheck(t, c.Checks, "mosfet", "gate drive at lowest input")
	if float64(d.Value) != 10.5 || float64(d.Limit) != 10 {
		t.Errorf("drive check %+v, want 10.5 V ≥ 10 V", d)
	}
}

func zenerSteady(c Candidate) float64 {
	// P_Z at v_max = V_Z,max·I_Z(16 V)
	iz := math.Sqrt(float64(c.GateResistor.PowerSteady) / float64(c.GateResistor.Value))
	return 12.6 * iz
}

// TestE8CrankDrive is the hazard "too little gate drive at the lowest
// input": at a 6 V crank the gate sees −6 V, but this MOSFET's R_DS(on)
// is rated only at 10 V (REFERENCE E8: "needs R_DS(on) specified at ≤
// 4.5 V"). A part with a 4.5 V rating passes and uses it.
func TestE8CrankDrive(t *testing.T) {
	s := mustSpec(t, edit(t, edit(t, e8Spec, "v_min = 10.5", "v_min = 6"), "v_min = 9", "v_min = 5"))
	parts := append(e8Parts(), mk(catalog.MOSFET, "p", "E8-PFET-LL", "vds", 60, "id", 50, "vgs_max", 20, "vgs_th", 2,
		"rdson", 0.010, "rdson_vgs", 10, "rdson2", 0.014, "rdson2_vgs", 4.5, "rthja", 50, "tjmax", 175, "pd", 3))
	cat := NewCatalog(parts)
	r := Evaluate(s, cat, Options{Topologies: []Topology{PFETHigh}})
	tr := topo(t, r, PFETHigh)
	if n := elim(tr, "mosfet", "gate drive at lowest input"); n != 1 {
		t.Errorf("gate drive eliminated %d parts, want 1 (%v)", n, tr.Eliminated)
	}
	if len(tr.Candidates) != 1 || tr.Candidates[0].Parts[0].MPN != "E8-PFET-LL" {
		t.Fatalf("candidates %+v", tr.Candidates)
	}
	ex, err := ExplainCatalog(s, cat, "E8-PFET", Options{})
	if err != nil {
		t.Fatal(err)
	}
	rep := ex.Parts[0].Roles[0]
	if rep.Pass || rep.FirstFail != "mosfet: gate drive at lowest input" {
		t.Fatalf("explain: %v", rep)
	}
	d := findCheck(t, rep.Checks, "mosfet", "gate drive at lowest input")
	if float64(d.Value) != 6 || float64(d.Limit) != 10 || d.Pass || float64(d.Margin) >= 0 {
		t.Errorf("drive check %+v, want 6 V ≥ 10 V failing", d)
	}
	ll := findCheck(t, tr.Candidates[0].Checks, "mosfet", "gate drive at lowest input")
	if float64(ll.Limit) != 4.5 {
		t.Errorf("logic-level part should use its 4.5 V rating, check %+v", ll)
	}
}
