package topology

import (
	"strings"
	"testing"

	"partsieve/catalog"
)

// TestBackfeedRanksMOSFETsOut: with load.backfeed (or supply.shared) both
// single-MOSFET stages are unsafe, their otherwise good designs are ranked
// out with the reason, and the elimination table names back-feed.
func TestBackfeedRanksMOSFETsOut(t *testing.T) {
	parts := append(e8Parts(), mk(catalog.MOSFET, "n", "E8-NFET", "vds", 60, "id", 50, "vgs_max", 20, "vgs_th", 2.5,
		"rdson", 0.006, "rdson_vgs", 10, "rthja", 50, "tjmax", 175, "pd", 3))
	cat := NewCatalog(parts)
	// without back-feed both stages qualify
	r := Evaluate(mustSpec(t, e8Spec), cat, Options{})
	for _, tp := range []Topology{PFETHigh, NFETLow} {
		if tr := topo(t, r, tp); len(tr.Candidates) != 1 || tr.Unsafe {
			t.Fatalf("%s without back-feed: %d candidates, unsafe %v", tp, len(tr.Candidates), tr.Unsafe)
		}
	}
	for _, c := range []struct{ name, old, new, why string }{
		{"backfeed", "v_reverse_max = 0.5", "v_reverse_max = 0.5\nbackfeed = true", "load.backfeed"},
		{"shared", `kind = "vehicle"`, "kind = \"vehicle\"\nshared = true", "supply.shared"},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := Evaluate(mustSpec(t, edit(t, e8Spec, c.old, c.new)), cat, Options{})
			for _, tp := range []Topology{PFETHigh, NFETLow} {
				tr := topo(t, r, tp)
				if !tr.Unsafe || !strings.Contains(tr.UnsafeReason, c.why) || !strings.Contains(tr.UnsafeReason, "both ways") {
					t.Errorf("%s: unsafe %v, reason %q", tp, tr.Unsafe, tr.UnsafeReason)
				}
				if len(tr.Candidates) != 0 || tr.Qualified != 0 {
					t.Errorf("%s: %d candidates, want none", tp, len(tr.Candidates))
				}
				if len(tr.RankedOut) != 1 || !tr.RankedOut[0].Unsafe {
					t.Errorf("%s: ranked out %+v", tp, tr.RankedOut)
				}
				if n := elim(tr, "stage", "back-feed"); n != 1 {
					t.Errorf("%s: back-feed eliminated %d, want 1", tp, n)
				}
			}
			for _, row := range r.Comparison {
				if (row.Topology == PFETHigh || row.Topology == NFETLow) && row.Status != "unsafe" {
					t.Errorf("comparison %s status %q, want unsafe", row.Topology, row.Status)
				}
			}
			if r.Qualified() {
				t.Errorf("no safe candidate exists, Qualified() = true")
			}
		})
	}
}

// runawaySpec: a reversed 11 V bench supply held indefinitely; the series
// diode's leakage inputs are those of REFERENCE E5 (Tremaine 2008).
const runawaySpec = `[supply]
kind = "bench"
v_min = 11.5
v_nom = 12
v_max = 12.5
v_reverse = 11
reverse_time = "continuous"
r_source = 0.5
[load]
i_max = 0.5
v_min = 10
v_reverse_max = 0.5
[ambient]
t_min = 0
t_max = 60
[policy]
derating = "commercial"
`

// e5Schottky has I_R 0.1 mA at 25 °C and 10 mA at 85 °C at 11 V, R_thJA
// 25 K/W (REFERENCE E5 / check value 10).
func e5Schottky() catalog.Part {
	return mk(catalog.Diode, "schottky", "E5-SK", "vrrm", 20, "ifav", 3, "ifsm", 80, "vf", 0.5, "vf_if", 3,
		"rthja", 25, "tjmax", 150, "ir", 1e-4, "ir_vr", 11, "ir_tj", 25, "ir2", 1e-2, "ir2_tj", 85)
}

// TestSchottkyRunaway: at 60 °C ambient the reversed Schottky settles at
// T_j = 60.42 °C (check value 10); above T_a,max = 92.2 °C it runs away.
func TestSchottkyRunaway(t *testing.T) {
	cat := NewCatalog([]catalog.Part{e5Schottky()})
	opt := Options{Topologies: []Topology{SeriesDiode}}
	r := Evaluate(mustSpec(t, runawaySpec), cat, opt)
	tr := topo(t, r, SeriesDiode)
	if len(tr.Candidates) != 1 {
		t.Fatalf("at 60 °C: %d candidates (%v)", len(tr.Candidates), tr.Eliminated)
	}
	rb := findCheck(t, tr.Candidates[0].Checks, "diode", "reverse bias at t_max")
	// source: REFERENCE §8 check 10 (Tremaine 2008 inputs), tolerance 0.02 K
	if !rb.Pass || !near(float64(rb.Value), 60.42, 0.02) {
		t.Errorf("reverse bias check %+v, want T_j 60.42 °C", rb)
	}
	ra := findCheck(t, tr.Candidates[0].Checks, "diode", "no thermal runaway while reversed")
	// source: REFERENCE §8 check 10: T_a,max = 92.2 °C, T_j,crit = 105.3 °C; tolerance 0.05 K
	if !ra.Pass || float64(ra.Value) != 60 || !near(float64(ra.Limit), 92.2, 0.05) || !strings.Contains(ra.Note, "T_j,crit = 105 °C") {
		t.Errorf("runaway check %+v, want 60 °C ≤ 92.2 °C", ra)
	}
	// margin: (92.2 − 60)/(60 − 0) of the ambient span
	if !near(float64(ra.Margin), (92.2-60)/60, 0.002) {
		t.Errorf("runaway margin %v", ra.Margin)
	}
	hot := mustSpec(t, edit(t, runawaySpec, "t_max = 60", "t_max = 100"))
	r = Evaluate(hot, cat, opt)
	tr = topo(t, r, SeriesDiode)
	if len(tr.Candidates) != 0 || elim(tr, "diode", "no thermal runaway while reversed") != 1 {
		t.Fatalf("at 100 °C: candidates %d, eliminated %v", len(tr.Candidates), tr.Eliminated)
	}
	if !strings.Contains(tr.NoneReason, "no thermal runaway while reversed") {
		t.Errorf("none reason %q", tr.NoneReason)
	}
	ex, err := ExplainCatalog(hot, cat, "E5-SK", opt)
	if err != nil {
		t.Fatal(err)
	}
	ra = findCheck(t, ex.Parts[0].Roles[0].Checks, "diode", "no thermal runaway while reversed")
	if ra.Pass || float64(ra.Value) != 100 || !near(float64(ra.Limit), 92.2, 0.05) || float64(ra.Margin) >= 0 {
		t.Errorf("runaway check %+v", ra)
	}
	if ex.Parts[0].Roles[0].FirstFail != "diode: no thermal runaway while reversed" {
		t.Errorf("first fail %q", ex.Parts[0].Roles[0].FirstFail)
	}
}

// crowbarSpec: a 12 V bench supply behind 0.5 Ω, reversed indefinitely;
// bolted fault 26 A.
const crowbarSpec = `[supply]
kind = "bench"
v_min = 11
v_nom = 12
v_max = 13
v_reverse = 13
reverse_time = "continuous"
r_source = 0.5
[load]
i_max = 0.5
v_min = 10
v_reverse_max = 2
[ambient]
t_min = 0
t_max = 40
[policy]
derating = "commercial"
`

// crowbarParts: a 1 A UL-style fuse (breaking 50 A) and a Schottky with a
// two-current V_F line (0.5 V at 1 A, 0.8 V at 10 A).
func crowbarParts() []catalog.Part {
	return []catalog.Part{
		mk(catalog.Fuse, "F", "CB-F1A", "in", 1, "un_dc", 63, "breaking", 50, "i2t", 0.25, "rcold", 0.16, "fuse_std", "ul"),
		mk(catalog.Diode, "schottky", "CB-SK", "vrrm", 40, "ifav", 3, "ifsm", 80, "vf", 0.5, "vf_if", 1, "vf2", 0.8, "vf2_if", 10,
			"rthja", 70, "tjmax", 150, "ir", 5e-5, "ir_vr", 40, "ir_tj", 25, "ir2", 0.03, "ir2_tj", 100),
	}
}

func TestShuntFusePair(t *testing.T) {
	r := Evaluate(mustSpec(t, crowbarSpec), NewCatalog(crowbarParts()), Options{Topologies: []Topology{ShuntFuse}})
	tr := topo(t, r, ShuntFuse)
	if len(tr.Candidates) != 1 {
		t.Fatalf("candidates %d, eliminated %v", len(tr.Candidates), tr.Eliminated)
	}
	c := tr.Candidates[0]
	// I_f = (13 − V_F(I_f))/(0.5 + 0.16) with V_F = 0.4667 + 0.0333·I
	// (+ cold-corner TC): about 18.1 A, clamp about 1.1 V [D]
	if !near(float64(c.FaultCurrent), 18.1, 0.3) || !near(float64(c.ClampVoltage), 1.1, 0.1) {
		t.Errorf("fault %v A, clamp %v V", c.FaultCurrent, c.ClampVoltage)
	}
	i2 := findCheck(t, c.Checks, "pair", "diode I²t vs fuse clearing I²t")
	if float64(i2.Value) != 0.5 || !strings.Contains(i2.Note, "estimated from melting I²t") {
		t.Errorf("I²t check %+v: clearing estimated as 2 × 0.25 A²s", i2)
	}
	if c.Parts[0].Role != "fuse" || c.Parts[1].Role != "shunt-diode" {
		t.Errorf("roles %+v", c.Parts)
	}
}

// TestClampVoltageHazard: the load survives only 0.5 V reversed, less than
// the diode's drop at the fault current: the pair is refused and the
// reason names the clamp check.
func TestClampVoltageHazard(t *testing.T) {
	s := mustSpec(t, edit(t, crowbarSpec, "v_reverse_max = 2", "v_reverse_max = 0.5"))
	r := Evaluate(s, NewCatalog(crowbarParts()), Options{Topologies: []Topology{ShuntFuse}})
	tr := topo(t, r, ShuntFuse)
	if len(tr.Candidates) != 0 || elim(tr, "pair", "reverse voltage at the load") != 1 {
		t.Fatalf("candidates %d, eliminated %v", len(tr.Candidates), tr.Eliminated)
	}
	if !strings.Contains(tr.NoneReason, "reverse voltage at the load") {
		t.Errorf("none reason %q", tr.NoneReason)
	}
	ex, err := ExplainCatalog(s, NewCatalog(crowbarParts()), "CB-F1A", Options{})
	if err != nil {
		t.Fatal(err)
	}
	rep := ex.Parts[0].Roles[0]
	cl := findCheck(t, rep.Checks, "pair", "reverse voltage at the load")
	if cl.Pass || float64(cl.Limit) != 0.5 || len(rep.Partners) != 1 || rep.Partners[0].MPN != "CB-SK" {
		t.Errorf("explain: %+v partners %+v", cl, rep.Partners)
	}
}

// TestFuseCannotBreak: behind 10 mΩ the bolted fault is 1300 A, far above
// the fuse's 50 A breaking capacity.
func TestFuseCannotBreak(t *testing.T) {
	s := mustSpec(t, edit(t, crowbarSpec, "r_source = 0.5", "r_source = 0.01"))
	parts := append(crowbarParts(), mk(catalog.Fuse, "T", "CB-F1A-HBC", "in", 1, "un_dc", 125, "breaking", 1500, "i2t", 3.5, "rcold", 0.1, "fuse_std", "iec"))
	cat := NewCatalog(parts)
	r := Evaluate(s, cat, Options{Topologies: []Topology{ShuntFuse}})
	tr := topo(t, r, ShuntFuse)
	if n := elim(tr, "fuse", "breaking capacity"); n != 1 {
		t.Errorf("breaking capacity eliminated %d, want 1 (%v)", n, tr.Eliminated)
	}
	ex, err := ExplainCatalog(s, cat, "CB-F1A", Options{})
	if err != nil {
		t.Fatal(err)
	}
	rep := ex.Parts[0].Roles[0]
	b := findCheck(t, rep.Checks, "fuse", "breaking capacity")
	if b.Pass || float64(b.Value) != 50 || !near(float64(b.Limit), 1300, 1e-9) || rep.FirstFail != "fuse: breaking capacity" {
		t.Errorf("breaking check %+v, first fail %q", b, rep.FirstFail)
	}
	ex, err = ExplainCatalog(s, cat, "CB-F1A-HBC", Options{})
	if err != nil {
		t.Fatal(err)
	}
	b = findCheck(t, ex.Parts[0].Roles[0].Checks, "fuse", "breaking capacity")
	if !b.Pass {
		t.Errorf("1500 A fuse should break 1300 A: %+v", b)
	}
}
