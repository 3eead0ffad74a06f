package derate_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"partsieve/query/derate"
	"partsieve/query/physics"
)

func mustLookup(t *testing.T, name string) derate.Profile {
	t.Helper()
	p, err := derate.Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// Every factor of every built-in profile is complete and within its own
// override range.
func TestBuiltinProfilesComplete(t *testing.T) {
	for _, p := range derate.Builtin() {
		if p.Name == "" || p.Title == "" || p.Base != "" {
			t.Errorf("profile %+v: name/title/base", p.Name)
		}
		fs := p.Factors()
		if len(fs) != 22 {
			t.Errorf("%s: %d factors", p.Name, len(fs))
		}
		for _, f := range fs {
			if f.Name == "" || f.Label == "" || f.Source == "" || f.Why == "" || f.Tag == "" {
				t.Errorf("%s/%s: incomplete %+v", p.Name, f.Name, f)
			}
			if _, err := p.WithOverrides(map[string]float64{f.Name: f.Value}); err != nil {
				t.Errorf("%s/%s: own value refused: %v", p.Name, f.Name, err)
			}
			if f.Unverified() != (f.Tag == physics.Memory) || (f.Unverified() && f.Confidence() != "unverified default") {
				t.Errorf("%s/%s: label %q for tag %v", p.Name, f.Name, f.Confidence(), f.Tag)
			}
		}
		if p.Pulse.Tag != physics.Verified || len(p.Pulse.Points) == 0 {
			t.Errorf("%s: pulse table %+v", p.Name, p.Pulse)
		}
		if len(p.Unverified()) == 0 {
			t.Errorf("%s: REFERENCE §5 is mostly [M]; expected unverified factors", p.Name)
		}
	}
}

// The profile table: values chosen from REFERENCE §5 (tolerance: exact).
func TestProfileValues(t *testing.T) {
	type row struct {
		name          string
		com, ind, hir float64
		comTag        physics.Tag
	}
	rows := []row{
		// §5.1 diodes: V_RRM commercial 80 % [M], ECSS 75 % [M], EEE-INST-002 70 % [M]
		{"k_vrrm", 0.80, 0.75, 0.70, physics.Memory},
		// I_F(AV): commercial 70–80 % [M] (middle), MIL-HDBK-338B level II 65 %, EEE/ECSS 50 %
		{"k_ifav", 0.75, 0.65, 0.50, physics.Memory},
		// I_FSM: commercial 75 % [M], EEE/ECSS 50 % [M]
		{"k_ifsm", 0.75, 0.60, 0.50, physics.Memory},
		// Zener power: MIL levels 70/60 %, EEE/ECSS 50 % [M]
		{"k_pz", 0.70, 0.60, 0.50, physics.Memory},
		// TVS peak: EEE-INST-002 80 % [M]
		{"k_tvs_ppk", 1.00, 0.90, 0.80, physics.Memory},
		// T_j cap: MIL level III / EEE 125 °C, ECSS 110 °C [M]
		{"tj_limit", 150, 125, 110, physics.Memory},
		{"tj_margin_diode", 20, 25, 40, physics.Memory},
		// MOSFETs ≥ 30 °C below T_jmax [V risingedgetech]
		{"tj_margin_fet", 30, 30, 40, physics.Verified},
		// §5.2: V_DS commercial 80 % [V Renesas], EEE 75 % [M]
		{"k_vds", 0.80, 0.75, 0.75, physics.Verified},
		// V_GS: commercial 80 % [M], MIL-DTL-917 70 % [V], EEE 60 % [M]
		{"k_vgs", 0.80, 0.70, 0.60, physics.Memory},
		{"k_id", 0.80, 0.80, 0.75, physics.Memory},
		{"k_pd", 1.00, 0.60, 0.50, physics.Memory},
		// §5.3 fuses: UL 75 % [V Littelfuse], IEC 100 % [V Schurter], makers' 80 % [M], EEE-style 50 % [V interfacebus]
		{"k_fuse_ul", 0.75, 0.75, 0.50, physics.Verified},
		{"k_fuse_iec", 1.00, 0.80, 0.50, physics.Verified},
		{"k_fuse_blade", 0.75, 0.75, 0.50, physics.Memory},
		// ECSS §6.17.3c: source delivers ≥ 3× rating [V]
		{"k_fuse_open", 3, 3, 3, physics.Verified},
		{"fuse_tc", 0.5, 0.5, 0.5, physics.Memory},
		{"fuse_tc_knee", 25, 25, 25, physics.Memory},
		// model defaults: α 0.4 %/K [D], −2 mV/K [V], −0.8 mV/K [M], 10 K [M]
		{"rdson_alpha", 0.4, 0.4, 0.4, physics.Derived},
		{"vf_tc_pn", -0.002, -0.002, -0.002, physics.Verified},
		{"vf_tc_schottky", -0.0008, -0.0008, -0.0008, physics.Memory},
		{"ir_doubling", 10, 10, 10, physics.Memory},
	}
	com, ind, hir := mustLookup(t, "commercial"), mustLookup(t, "industrial"), mustLookup(t, "high-reliability")
	for _, r := range rows {
		for _, c := range []struct {
			p    derate.Profile
			want float64
		}{{com, r.com}, {ind, r.ind}, {hir, r.hir}} {
			f, ok := c.p.Factor(r.name)
			if !ok || f.Value != c.want {
				t.Errorf("%s %s = %g (%v), want %g", c.p.Name, r.name, f.Value, ok, c.want)
			}
		}
		if f, _ := com.Factor(r.name); f.Tag != r.comTag {
			t.Errorf("commercial %s tag %v, want %v", r.name, f.Tag, r.comTag)
		}
	}
}

// A stricter profile never allows more: ratios fall, the cap falls,
// margins grow (needed for "a stricter policy never adds candidates").
func TestProfilesOrderedByStrictness(t *testing.T) {
	ps := derate.Builtin()
	margin := map[string]bool{"tj_margin_diode": true, "tj_margin_fet": true}
	model := map[string]bool{"rdson_alpha": true, "vf_tc_pn": true, "vf_tc_schottky": true, "ir_doubling": true, "fuse_tc": true, "fuse_tc_knee": true, "k_fuse_open": true}
	for k := 1; k < len(ps); k++ {
		a, b := ps[k-1].Factors(), ps[k].Factors()
		for i := range a {
			if model[a[i].Name] {
				continue
			}
			isMargin := margin[a[i].Name]
			if isMargin && b[i].Value < a[i].Value || !isMargin && b[i].Value > a[i].Value {
				t.Errorf("%s: %s %g → %s %g is looser", a[i].Name, ps[k-1].Name, a[i].Value, ps[k].Name, b[i].Value)
			}
		}
	}
	// fuse factor by rating is never looser either
	for _, in := range []float64{0.1, 0.25, 0.75, 1.5, 5, 20} {
		for _, std := range []physics.FuseStd{physics.FuseIEC, physics.FuseUL, physics.FuseBlade} {
			prev := math.Inf(1)
			for _, p := range ps {
				k := p.FuseContinuousFactor(std, in)
				if k > prev {
					t.Errorf("%s fuse %v %g A: %g after %g", p.Name, std, in, k, prev)
				}
				prev = k
			}
		}
	}
}

func TestTjLimitRule(t *testing.T) {
	com, ind, hir := mustLookup(t, "commercial"), mustLookup(t, "industrial"), mustLookup(t, "hirel")
	cases := []struct {
		name string
		got  float64
		want float64
	}{
		{"commercial diode 150 °C part: 150 − 20", com.TjLimitDiode(150), 130},
		{"commercial diode 175 °C part: cap 150", com.TjLimitDiode(175), 150},
		{"commercial FET 175 °C part: 175 − 30", com.TjLimitFET(175), 145},
		{"industrial FET 175 °C part: cap 125", ind.TjLimitFET(175), 125},
		{"industrial diode 125 °C part: 125 − 25", ind.TjLimitDiode(125), 100},
		// EEE-INST-002/ECSS: ≤ 110 °C or T_jmax − 40 °C, the lower [M]
		{"high-rel 150 °C part", hir.TjLimitDiode(150), 110},
		{"high-rel 125 °C part", hir.TjLimitFET(125), 85},
		{"unknown T_jmax: cap only", hir.TjLimitDiode(math.NaN()), 110},
	}
	for _, c := range cases {
		if c.got != c.want {
			t.Errorf("%s: %g °C, want %g °C", c.name, c.got, c.want)
		}
	}
}

func TestFuseRules(t *testing.T) {
	com, hir := mustLookup(t, "commercial"), mustLookup(t, "high-reliability")
	aem, _ := physics.ParseRerate("25:1, 65:0.9")
	// check 15 [V AEM]: 4 A at 65 °C, UL → 5.93 A → 6.3 A, with the commercial profile
	kt, def, out := com.RerateFactor(aem, 65)
	in := physics.RequiredFuseRating(4, com.FuseContinuousFactor(physics.FuseUL, 6.3), kt)
	if def || out || math.Abs(in-5.926) > 0.001 || physics.NextR10(in) != 6.3 {
		t.Errorf("check 15 via profile: K_T %g (default %v), I_n %g → %g", kt, def, in, physics.NextR10(in))
	}
	// no part curve: profile default −0.5 %/K above 25 °C → 0.825 at 60 °C (Schurter 0.83 [V]), tolerance 1e-12
	kt, def, _ = com.RerateFactor(physics.RerateCurve{}, 60)
	if !def || math.Abs(kt-0.825) > 1e-12 {
		t.Errorf("default rerate at 60 °C: %g (default %v)", kt, def)
	}
	// EEE-style table by rating [V interfacebus]
	for _, c := range []struct{ in, want float64 }{{0.1, 0.25}, {0.125, 0.25}, {0.2, 0.25}, {0.25, 0.30}, {0.375, 0.35}, {0.75, 0.40}, {1.5, 0.45}, {2, 0.5}, {15, 0.5}} {
		if got := hir.FuseContinuousFactor(physics.FuseUL, c.in); got != c.want {
			t.Errorf("high-rel %g A: %g, want %g", c.in, got, c.want)
		}
	}
	if com.FuseContinuousFactor(physics.FuseIEC, 0.1) != 1 || com.FuseContinuousFactor(physics.FuseBlade, 10) != 0.75 {
		t.Error("commercial IEC/blade factors")
	}
	// check 17 through the profile [V Littelfuse]
	if f, _ := com.PulseFactor(1e5); f != 0.22 {
		t.Errorf("pulse factor 10⁵ = %g", f)
	}
}

func TestOverrides(t *testing.T) {
	com := mustLookup(t, "commercial")
	p, err := com.WithOverrides(map[string]float64{"K_VRRM": 0.7, "tj_limit": 125, "vf_tc": -0.0015, "tj_margin": 35, "ir_doubling": 8})
	if err != nil {
		t.Fatal(err)
	}
	f, _ := p.Factor("k_vrrm")
	if f.Value != 0.7 || f.Tag != physics.User || f.Confidence() != "user override" || !strings.Contains(f.Why, "commercial profile has 0.8") {
		t.Errorf("k_vrrm override: %+v", f)
	}
	if p.TjLimitDiode(175) != 125 || p.TjLimitFET(150) != 115 {
		t.Errorf("tj overrides: %g %g", p.TjLimitDiode(175), p.TjLimitFET(150))
	}
	for _, c := range []physics.DiodeClass{physics.SiliconPN, physics.Schottky} {
		if tc, ov := p.ForwardTC(c); tc != -0.0015 || !ov {
			t.Errorf("vf_tc alias, %v: %g %v", c, tc, ov)
		}
	}
	if tc, ov := com.ForwardTC(physics.Schottky); tc != -0.0008 || ov {
		t.Errorf("default Schottky TC %g %v", tc, ov)
	}
	if k, ov := p.LeakageDoubling(); k != 8 || !ov {
		t.Errorf("ir_doubling %g %v", k, ov)
	}
	// the original is untouched
	if f, _ := com.Factor("k_vrrm"); f.Value != 0.8 || f.Tag != physics.Memory {
		t.Errorf("base changed: %+v", f)
	}
	if q, err := com.WithOverrides(nil); err != nil || q.KVRRM != com.KVRRM {
		t.Errorf("nil overrides: %v", err)
	}
}

func TestOverrideErrors(t *testing.T) {
	com := mustLookup(t, "commercial")
	cases := []struct {
		ov      map[string]float64
		name    string
		reason  string
		suggest string
		unknown bool
	}{
		{map[string]float64{"k_vrm": 0.7}, "k_vrm", "unknown factor", "k_vrrm", true},
		{map[string]float64{"kvgs": 0.7}, "kvgs", "unknown factor", "k_vgs", true},
		{map[string]float64{"rdson_alph": 0.5}, "rdson_alph", "unknown factor", "rdson_alpha", true},
		{map[string]float64{"completely_wrong": 1}, "completely_wrong", "unknown factor", "", true},
		{map[string]float64{"k_vrrm": 1.2}, "k_vrrm", "want 0 < value ≤ 1", "", false},
		{map[string]float64{"k_vrrm": 0}, "k_vrrm", "want 0 < value ≤ 1", "", false},
		{map[string]float64{"tj_limit": 400}, "tj_limit", "want 25 ≤ value ≤ 250 °C", "", false},
		{map[string]float64{"ir_doubling": math.NaN()}, "ir_doubling", "not a finite number", "", false},
		{map[string]float64{"vf_tc": 0.01}, "vf_tc", "want -0.005 ≤ value ≤ 0.002 V/K", "", false},
	}
	for _, c := range cases {
		got, err := com.WithOverrides(c.ov)
		var oe *derate.OverrideError
		if !errors.As(err, &oe) || oe.Name != c.name || oe.Reason != c.reason || oe.Suggest != c.suggest || errors.Is(err, derate.ErrUnknownFactor) != c.unknown {
			t.Errorf("%v: %v (%+v)", c.ov, err, oe)
		}
		if got.KVRRM.Value != 0.8 {
			t.Errorf("%v: profile changed on error", c.ov)
		}
	}
	// all problems at once, in name order
	_, err := com.WithOverrides(map[string]float64{"zz": 1, "k_vrrm": 2, "k_ifav": 0.5})
	if err == nil || !strings.Contains(err.Error(), `"k_vrrm" = 2`) || !strings.Contains(err.Error(), `"zz" = 1: unknown factor`) {
		t.Errorf("joined errors: %v", err)
	}
	if msg := (&derate.OverrideError{Name: "k_vrm", Value: 0.7, Reason: "unknown factor", Suggest: "k_vrrm"}).Error(); msg != `derating factor "k_vrm" = 0.7: unknown factor (did you mean "k_vrrm"?)` {
		t.Errorf("message %q", msg)
	}
}

func TestLookupAndCustomProfiles(t *testing.T) {
	for _, n := range []string{"commercial", "Industrial", " HIGH-RELIABILITY ", "hirel", "high-rel"} {
		if _, err := derate.Lookup(n); err != nil {
			t.Errorf("Lookup(%q): %v", n, err)
		}
	}
	_, err := derate.Lookup("industiral")
	if !errors.Is(err, derate.ErrUnknownProfile) || !strings.Contains(err.Error(), `did you mean "industrial"?`) {
		t.Errorf("unknown profile: %v", err)
	}
	p, err := derate.NewProfile("rail", "industrial", map[string]float64{"k_vds": 0.6, "tj_limit": 115})
	if err != nil {
		t.Fatal(err)
	}
	if p.Name != "rail" || p.Base != "industrial" || p.KVDS.Value != 0.6 || p.TjLimit.Value != 115 || p.KIFAV.Value != 0.65 {
		t.Errorf("custom profile: %+v", p)
	}
	for _, c := range []struct{ name, base string }{{"", "commercial"}, {"Commercial", "industrial"}, {"hirel", "industrial"}, {"x", "nope"}} {
		if _, err := derate.NewProfile(c.name, c.base, nil); err == nil {
			t.Errorf("NewProfile(%q, %q): no error", c.name, c.base)
		}
	}
	if _, err := derate.NewProfile("x", "commercial", map[string]float64{"k_vds": 3}); err == nil || !strings.Contains(err.Error(), `custom derating profile "x"`) {
		t.Errorf("bad override in custom profile: %v", err)
	}
	names := derate.FactorNames()
	if len(names) != 24 || names[0] != "fuse_tc" {
		t.Errorf("FactorNames: %v", names)
	}
	if got := derate.Names(); strings.Join(got, ",") != "commercial,industrial,high-reliability" {
		t.Errorf("Names: %v", got)
	}
}

// E8 [D]: the commercial k_vgs gives the 0.8·20 V = 16 V Zener limit.
func TestE8WithProfile(t *testing.T) {
	com := mustLookup(t, "commercial")
	z, err := physics.ZenerClampInput{VZ: 12, Tol: 0.05, RG: 10e3, VinMin: 6, VinNom: 14, VinMax: 35,
		VGSRated: 10, VGSMax: 20, KVGS: com.KVGS.Value}.Size()
	if err != nil || z.VZLimit != 16 || !z.WindowOK {
		t.Errorf("E8 window: %+v %v", z, err)
	}
	r := physics.FETTj(0.010, com.RdsonAlpha.Value, 5, 85, 50, physics.SolveOptions{})
	if math.Abs(r.Tj-102.0) > 0.1 || r.Tj > com.TjLimitFET(150) {
		t.Errorf("E8 T_j %g vs limit %g", r.Tj, com.TjLimitFET(150))
	}
}

func TestFactorString(t *testing.T) {
	com := mustLookup(t, "commercial")
	if s := com.KVRRM.String(); s != "k_vrrm = 0.8 [M] unverified default (commercial/industrial practice (REFERENCE §5.1/§5.2))" {
		t.Errorf("String = %q", s)
	}
	if s := com.TjLimit.String(); !strings.HasPrefix(s, "tj_limit = 150 °C [M]") {
		t.Errorf("String = %q", s)
	}
}

// FuzzWithOverrides: never panics; an accepted override lands in range and
// is tagged [U]; a refused one leaves the profile unchanged.
func FuzzWithOverrides(f *testing.F) {
	f.Add("k_vrrm", 0.7)
	f.Add("vf_tc", -0.001)
	f.Add("K_VRM", 2.0)
	f.Add("", 0.0)
	f.Add("tj_margin", 1e300)
	com, err := derate.Lookup("commercial")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, name string, v float64) {
		p, err := com.WithOverrides(map[string]float64{name: v})
		if err != nil {
			if p.KVRRM != com.KVRRM || p.TjLimit != com.TjLimit {
				t.Fatal("profile changed on error")
			}
			return
		}
		changed := 0
		for _, fc := range p.Factors() {
			if fc.Tag == physics.User {
				changed++
				if fc.Value != v || fc.Value < fc.Min || fc.Value > fc.Max {
					t.Fatalf("%s = %g outside %g…%g", fc.Name, fc.Value, fc.Min, fc.Max)
				}
			}
		}
		if changed == 0 {
			t.Fatalf("override %q = %g accepted but nothing changed", name, v)
		}
	})
}
