package topology

import (
	"context"
	"math"
	"strings"
	"testing"

	"partsieve/catalog"
)

func findReq(t *testing.T, n Need, role, name string) Requirement {
	t.Helper()
	for _, r := range n.Requirements {
		if r.Role == role && r.Name == name {
			return r
		}
	}
	t.Fatalf("%s: no requirement %s: %s", n.Topology, role, name)
	return Requirement{}
}

// TestNeedsVehicle checks requirement values of the vehicle example
// (industrial policy: k_vrrm 0.75, k_ifav 0.65, k_ifsm 0.6, k_vds 0.75,
// k_vgs 0.7, k_id 0.8, k_fuse_ul 0.75; default fuse rerating −0.5 %/K
// above 25 °C).
func TestNeedsVehicle(t *testing.T) {
	ns := Needs(exampleSpec(t, "vehicle-12v-accessory"))
	if len(ns.Needs) != 4 || ns.Policy != "industrial" {
		t.Fatalf("needs %d, policy %q", len(ns.Needs), ns.Policy)
	}
	tests := []struct {
		topo       int
		role, name string
		want, tol  float64
		factor     string
	}{
		{0, "diode", "repetitive reverse voltage V_RRM", 14 / 0.75, 1e-9, "k_vrrm"},
		{0, "diode", "average forward current I_F(AV)", 3 / 0.65, 1e-9, "k_ifav"},
		// √(2·0.2 A²s / 2 ms)/0.6 = 14.142/0.6
		{0, "diode", "surge current I_FSM at the inrush pulse length", math.Sqrt(2*0.2/0.002) / 0.6, 1e-9, "k_ifsm"},
		{0, "stage", "drop at the worse corner", 0.6, 1e-12, ""},
		{1, "fuse", "DC voltage rating", 35, 0, ""},
		// K_T(85 °C) = 1 − 0.005·60 = 0.7; 3/(0.75·0.7)
		{1, "fuse", "rated current I_n, ul convention", 3 / (0.75 * 0.7), 1e-9, "k_fuse_ul"},
		{1, "fuse", "breaking capacity", 14 / 0.02, 1e-9, ""},
		// P_f(10⁵) = 0.22 (Littelfuse)
		{1, "fuse", "melting I²t", 0.2 / 0.22, 1e-9, ""},
		{1, "fuse", "largest rating that still opens", 700.0 / 3, 1e-9, "k_fuse_open"},
		{1, "shunt-diode", "repetitive reverse voltage V_RRM", 35 / 0.75, 1e-9, "k_vrrm"},
		{2, "mosfet", "drain-source voltage V_DS", 35 / 0.75, 1e-9, "k_vds"},
		{2, "mosfet", "drain current I_D", 3 / 0.8, 1e-9, "k_id"},
		{2, "mosfet", "V_GS at which R_DS(on) is rated", 9, 0, ""},
		{2, "mosfet", "V_GS rating without a Zener clamp", 35 / 0.7, 1e-9, "k_vgs"},
		// min(0.6 V/3 A, 1.5 W/9 A²) = 0.1667 Ω
		{2, "mosfet", "R_DS(on) at the hot junction", 1.5 / 9, 1e-9, "rdson_alpha"},
	}
	for _, tc := range tests {
		r := findReq(t, ns.Needs[tc.topo], tc.role, tc.name)
		if !near(float64(r.Value), tc.want, tc.tol) {
			t.Errorf("%s %s = %v, want %v", ns.Needs[tc.topo].Topology, tc.name, r.Value, tc.want)
		}
		if tc.factor != "" {
			found := false
			for _, f := range r.Factors {
				found = found || f.Name == tc.factor && f.Source != "" && f.Confidence != ""
			}
			if !found {
				t.Errorf("%s: factor %s missing in %+v", tc.name, tc.factor, r.Factors)
			}
		}
		if r.Formula == "" || r.Source == "" {
			t.Errorf("%s: formula or source missing", tc.name)
		}
	}
	// [M] factors are shown as unverified defaults
	var unv []string
	for _, f := range ns.Unverified {
		if f.Confidence != "unverified default" || f.Tag != "[M]" {
			t.Errorf("unverified list holds %+v", f)
		}
		unv = append(unv, f.Name)
	}
	if !strings.Contains(strings.Join(unv, ","), "k_vrrm") {
		t.Errorf("k_vrrm should be listed as unverified: %v", unv)
	}
	if ns.Needs[3].Hazards == nil || !strings.Contains(strings.Join(ns.Needs[3].Hazards, " "), "ground is lifted") {
		t.Errorf("nfet-low hazards %v", ns.Needs[3].Hazards)
	}
}

func TestNeedsBackfeed(t *testing.T) {
	ns := Needs(exampleSpec(t, "handheld-2s-liion"), PFETHigh, SeriesDiode)
	if len(ns.Needs) != 2 || ns.Needs[0].Topology != PFETHigh {
		t.Fatalf("needs %+v", ns.Needs)
	}
	if !ns.Needs[0].Unsafe || !strings.Contains(ns.Needs[0].UnsafeReason, "load.backfeed") {
		t.Errorf("pfet-high should be unsafe: %+v", ns.Needs[0])
	}
	// the series diode blocks v_reverse + v_holdup = 8.4 + 8.4 V, k_vrrm 0.8
	r := findReq(t, ns.Needs[1], "diode", "repetitive reverse voltage V_RRM")
	if !near(float64(r.Value), 16.8/0.8, 1e-9) {
		t.Errorf("V_RRM requirement %v, want 21 V", r.Value)
	}
}

// TestEliminationAccounting: for single-part topologies every part of the
// role is either qualified or counted once under the check (or catalog
// pre-filter) that eliminated it.
func TestEliminationAccounting(t *testing.T) {
	st := seedCatalog(t)
	stats, err := st.Stats(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range exampleNames {
		r, err := Pick(context.Background(), st, exampleSpec(t, name), Options{})
		if err != nil {
			t.Fatal(err)
		}
		for _, tr := range r.Topologies {
			role, total := "", 0
			switch tr.Topology {
			case SeriesDiode:
				role, total = "diode", stats.ByType["rectifier"]+stats.ByType["schottky"]
			case PFETHigh:
				role, total = "mosfet", stats.ByType["p"]
			case NFETLow:
				role, total = "mosfet", stats.ByType["n"]
			default:
				continue
			}
			sum := 0
			for _, e := range tr.Eliminated {
				sum += e.Count
			}
			if sum+tr.Qualified != total || tr.Evaluated[role] != total {
				t.Errorf("%s %s: eliminated %d + qualified %d, evaluated %d, catalog holds %d",
					name, tr.Topology, sum, tr.Qualified, tr.Evaluated[role], total)
			}
		}
	}
}

func TestResultHelpers(t *testing.T) {
	r := Evaluate(mustSpec(t, runawaySpec), NewCatalog([]catalog.Part{e5Schottky()}), Options{})
	if !r.Qualified() {
		t.Errorf("the series diode qualifies at 60 °C")
	}
	s := mustSpec(t, edit(t, runawaySpec, "t_max = 60", "t_max = 100"))
	r = Evaluate(s, NewCatalog([]catalog.Part{e5Schottky()}), Options{})
	if r.Qualified() {
		t.Errorf("nothing qualifies at 100 °C")
	}
	e, tp, ok := r.TopEliminator()
	if !ok || tp != SeriesDiode || e.Check != "no thermal runaway while reversed" || e.Count != 1 {
		t.Errorf("TopEliminator = %+v %s %v", e, tp, ok)
	}
	for _, tr := range r.Topologies {
		if tr.Qualified == 0 && tr.NoneReason == "" {
			t.Errorf("%s: no reason given", tr.Topology)
		}
	}
	if _, err := ParseTopology("pfet"); err == nil {
		t.Errorf("ParseTopology accepted a wrong name")
	}
	if tp, err := ParseTopology(" NFET-low "); err != nil || tp != NFETLow {
		t.Errorf("ParseTopology = %v, %v", tp, err)
	}
	if rk, err := ParseRank(""); err != nil || rk != RankLoss {
		t.Errorf("ParseRank(\"\") = %v, %v", rk, err)
	}
	if _, err := ParseRank("price"); err == nil {
		t.Errorf("ParseRank accepted price")
	}
	if _, err := ExplainCatalog(s, NewCatalog(nil), "NOPE", Options{}); err == nil {
		t.Errorf("explaining an unknown MPN should fail")
	}
}

// TestExplainZener explains a Zener against the clamp windows the
// MOSFETs of the E8 spec need.
func TestExplainZener(t *testing.T) {
	ex, err := ExplainCatalog(mustSpec(t, e8Spec), NewCatalog(e8Parts()), "e8-z12", Options{})
	if err != nil {
		t.Fatal(err)
	}
	rs := ex.Parts[0].Roles
	if len(rs) != 2 || rs[0].Topology != PFETHigh || rs[1].Topology != NFETLow {
		t.Fatalf("roles %v", rs)
	}
	if !rs[0].Pass || !strings.Contains(rs[0].Note, "this Zener is the one chosen") {
		t.Errorf("pfet-high zener report %+v", rs[0])
	}
	if !strings.Contains(rs[1].Note, "no MOSFET") {
		t.Errorf("the E8 catalog has no N-MOSFET: %+v", rs[1])
	}
}
