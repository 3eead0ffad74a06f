package spec

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"partsieve/query/physics"
)

// minimal is a valid spec with every required key and nothing else.
const minimal = `[supply]
kind = "bench"
v_min = 10
v_nom = 12
v_max = 14
v_reverse = 12
reverse_time = "continuous"
r_source = 0.5

[load]
i_max = 1
v_min = 9
v_reverse_max = 0.3

[ambient]
t_min = 0
t_max = 40
`

func TestTemplateParses(t *testing.T) {
	s, err := Parse("template.toml", []byte(Template()))
	if err != nil {
		t.Fatalf("template does not parse:\n%v", err)
	}
	if s.Supply.Kind != Vehicle || s.Supply.VTransient != 35 || s.Load.InrushPulses != 1e5 {
		t.Errorf("template values: %+v", s)
	}
	if got := s.Build.Rates["USD"]; got != 0.92 {
		t.Errorf("rates: %v", s.Build.Rates)
	}
	// every fixed key is documented in the template
	tpl := Template()
	for _, d := range schema {
		name := d.Key[strings.IndexByte(d.Key, '.')+1:]
		if !strings.Contains(tpl, name) {
			t.Errorf("template does not mention %s", d.Key)
		}
	}
}

func TestParseValid(t *testing.T) {
	s, err := Parse("min.toml", []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	if !s.Supply.ReverseContinuous || !s.Supply.SteadyReverse() {
		t.Errorf("continuous reversal not read: %+v", s.Supply)
	}
	if s.Policy.Derating != "commercial" || s.Policy.Profile.Name != "commercial" {
		t.Errorf("default policy: %q", s.Policy.Derating)
	}
	if s.Build.Quantity != 1 || s.Build.Currency != "EUR" {
		t.Errorf("build defaults: %+v", s.Build)
	}
	if s.Budget.HasDrop || s.Budget.HasLoss {
		t.Errorf("no budget given: %+v", s.Budget)
	}
	if v, by := s.DropLimit(); v != 1 || by != "supply.v_min − load.v_min" {
		t.Errorf("DropLimit = %v %q", v, by)
	}
	if s.BackfeedReason() != "" {
		t.Errorf("no back-feed expected")
	}
}

func TestParseUnitsAndDefaults(t *testing.T) {
	src := strings.NewReplacer(
		"v_reverse = 12", `v_reverse = "-12 V"`,
		"r_source = 0.5", `r_source = "50 mΩ"`,
		`reverse_time = "continuous"`, `reverse_time = "1 min"`,
		"t_min = 0", `t_min = "-40 °C"`,
		"i_max = 1", `i_max = "1500 mA"`+"\nbackfeed = true",
	).Replace(minimal) + `
[budget]
drop_max = "0.2 V"
loss_max = "800 mW"
[policy]
derating = "mine"
k_vrrm = 0.6
[policy.profiles.mine]
base = "industrial"
tj_limit = "110 °C"
[build]
quantity = "5k"
currency = "usd"
[build.rates]
EUR = 1.08
`
	s, err := Parse("u.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	checks := []struct {
		name      string
		got, want float64
	}{
		{"v_reverse magnitude", s.Supply.VReverse, 12},
		{"r_source", s.Supply.RSource, 0.05},
		{"reverse_time", s.Supply.ReverseTime, 60},
		{"t_min", s.Ambient.TMin, -40},
		{"i_max", s.Load.IMax, 1.5},
		{"v_holdup default = v_max with backfeed", s.Load.VHoldup, 14},
		{"drop_max", s.Budget.DropMax, 0.2},
		{"loss_max", s.Budget.LossMax, 0.8},
		{"quantity", float64(s.Build.Quantity), 5000},
		{"k_vrrm override", s.Policy.Profile.KVRRM.Value, 0.6},
		{"custom tj_limit", s.Policy.Profile.TjLimit.Value, 110},
		{"custom keeps base k_vds", s.Policy.Profile.KVDS.Value, 0.75},
		{"rate", s.Build.Rates["EUR"], 1.08},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %v, want %v", c.name, c.got, c.want)
		}
	}
	if s.Policy.Profile.KVRRM.Tag != physics.User {
		t.Errorf("override tag = %v, want [U]", s.Policy.Profile.KVRRM.Tag)
	}
	if s.Build.Currency != "USD" {
		t.Errorf("currency = %q", s.Build.Currency)
	}
	if s.Supply.SteadyReverse() != true {
		t.Errorf("60 s reversal is steady")
	}
	if !strings.Contains(s.BackfeedReason(), "load.backfeed") {
		t.Errorf("BackfeedReason = %q", s.BackfeedReason())
	}
	if v, by := s.DropLimit(); v != 0.2 || by != "budget.drop_max" {
		t.Errorf("DropLimit = %v %q", v, by)
	}
	joined := strings.Join(s.Notes, "\n")
	if !strings.Contains(joined, "v_holdup defaults to supply.v_max") {
		t.Errorf("notes: %s", joined)
	}
}

// TestParseErrors checks the problems reported for broken specs: each
// names the file, the line and the key. All problems of a file come
// together.
func TestParseErrors(t *testing.T) {
	tests := []struct {
		name string
		edit func(string) string
		want []string
	}{
		{"unknown key with suggestion",
			func(s string) string { return strings.Replace(s, "i_max = 1", "i_mx = 1", 1) },
			[]string{
				"spec.toml:10: load.i_max: missing required key (highest steady load current)",
				"spec.toml:11: load.i_mx: unknown key; did you mean load.i_max?",
			}},
		{"wrong unit",
			func(s string) string { return strings.Replace(s, "v_max = 14", `v_max = "14 A"`, 1) },
			[]string{`spec.toml:5: supply.v_max: unit "A" is a current; this key wants a voltage (got "14 A")`}},
		{"missing key",
			func(s string) string { return strings.Replace(s, "r_source = 0.5\n", "", 1) },
			[]string{"spec.toml:1: supply.r_source: missing required key (source plus wiring resistance; sets the fault current)"}},
		{"missing table",
			func(s string) string { return s[:strings.Index(s, "[ambient]")] },
			[]string{"spec.toml: ambient: missing table [ambient]"}},
		{"v_min above v_nom",
			func(s string) string { return strings.Replace(s, "v_min = 10", "v_min = 13", 1) },
			[]string{"spec.toml:3: supply.v_min: supply.v_min (13 V) is above supply.v_nom (12 V)"}},
		{"v_nom above v_max",
			func(s string) string { return strings.Replace(s, "v_nom = 12", "v_nom = 15", 1) },
			[]string{"spec.toml:4: supply.v_nom: supply.v_nom (15 V) is above supply.v_max (14 V)"}},
		{"t_min above t_max",
			func(s string) string { return strings.Replace(s, "t_min = 0", "t_min = 50", 1) },
			[]string{"spec.toml:16: ambient.t_min: ambient.t_min (50 °C) is above ambient.t_max (40 °C)"}},
		{"load v_min above supply v_min",
			func(s string) string { return strings.Replace(s, "v_min = 9", "v_min = 11", 1) },
			[]string{"spec.toml:12: load.v_min: load.v_min (11 V) is above supply.v_min (10 V): no protection stage delivers more than its input; the load must work at supply.v_min minus the stage's drop"}},
		{"transient below v_max",
			func(s string) string { return strings.Replace(s, "v_max = 14\n", "v_max = 14\nv_transient = 12\n", 1) },
			[]string{"spec.toml:6: supply.v_transient: supply.v_transient (12 V) is below supply.v_max (14 V); a transient lies above the steady maximum (leave it out when there is none)"}},
		{"unknown table",
			func(s string) string { return s + "[ambeint]\nt_max = 3\n" },
			[]string{"spec.toml:18: ambeint: unknown table or key; did you mean ambient?"}},
		{"key outside its table",
			func(s string) string { return "i_max = 2\n" + s },
			[]string{"spec.toml:1: i_max: unknown table or key; keys belong in a table: did you mean load.i_max?"}},
		{"bad supply kind",
			func(s string) string { return strings.Replace(s, `"bench"`, `"batery"`, 1) },
			[]string{`spec.toml:2: supply.kind: unknown supply kind "batery" (one of battery, vehicle, adapter, bench, bus); did you mean battery?`}},
		{"non-positive",
			func(s string) string { return strings.Replace(s, "r_source = 0.5", "r_source = 0", 1) },
			[]string{"spec.toml:8: supply.r_source: must be above zero (got 0 Ω)"}},
		{"wrong type",
			func(s string) string { return strings.Replace(s, "i_max = 1", "i_max = true", 1) },
			[]string{`spec.toml:11: load.i_max: want a number or a value with unit such as "3.2 A", got a boolean`}},
		{"bad reverse time",
			func(s string) string { return strings.Replace(s, `"continuous"`, `"forever"`, 1) },
			[]string{`spec.toml:7: supply.reverse_time: expected a number; a time is written like "8.3 ms" (got "forever"); or write "continuous"`}},
		{"inrush incomplete",
			func(s string) string { return strings.Replace(s, "i_max = 1", "i_max = 1\ninrush_i2t = 0.2", 1) },
			[]string{
				"spec.toml:10: load.inrush_time: missing: inrush_i2t, inrush_time and inrush_pulses go together",
				"spec.toml:10: load.inrush_pulses: missing: inrush_i2t, inrush_time and inrush_pulses go together",
			}},
		{"policy problems",
			func(s string) string {
				return s + "[policy]\nderating = \"industral\"\nk_vrm = 0.5\nk_vds = 1.5\n[policy.profiles.x]\nbase = \"hirel\"\nk_id = 2\n"
			},
			[]string{
				`spec.toml:19: policy.derating: unknown derating profile "industral" (built in: commercial, industrial, high-reliability; did you mean "industrial"?)`,
				"spec.toml:20: policy.k_vrm: unknown key; did you mean policy.k_vrrm?",
				"spec.toml:21: policy.k_vds: 1.5: want 0 < value ≤ 1",
				"spec.toml:24: policy.profiles.x.k_id: 2: want 0 < value ≤ 1",
			}},
		{"build problems",
			func(s string) string {
				return s + "[build]\nquantity = 2.5\ncurrency = \"euro\"\n[build.rates]\nUSD = -1\n"
			},
			[]string{
				"spec.toml:19: build.quantity: want a whole number of at least 1 (got 2.5)",
				`spec.toml:20: build.currency: want a three-letter currency code such as EUR or USD (got "euro")`,
				"spec.toml:22: build.rates.USD: must be a positive number (got -1)",
			}},
		{"syntax error",
			func(s string) string { return strings.Replace(s, "v_min = 10", "v_min = = 10", 1) },
			[]string{"spec.toml:3: TOML syntax: expected value but found '=' instead"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Parse("spec.toml", []byte(tc.edit(minimal)))
			var se *Error
			if !errors.As(err, &se) {
				t.Fatalf("want *Error, got %v", err)
			}
			var got []string
			for _, p := range se.Problems {
				got = append(got, p.Error())
			}
			if strings.Join(got, "\n") != strings.Join(tc.want, "\n") {
				t.Errorf("problems:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(tc.want, "\n"))
			}
		})
	}
}

func TestKeyLines(t *testing.T) {
	src := `# comment
[supply]
v_min = 9 # trailing
"v max" = 3
arr = [
  1,
  2,
]
doc = """
x = 1
"""
[policy.profiles."my one"]
base = 'x'
load.i_max = 3
`
	got := keyLines(src)
	want := map[string]int{
		"supply": 2, "supply.v_min": 3, `supply."v max"`: 4, "supply.arr": 5, "supply.doc": 9,
		"policy": 12, "policy.profiles": 12, `policy.profiles."my one"`: 12, `policy.profiles."my one".base`: 13,
		`policy.profiles."my one".load.i_max`: 14,
	}
	for k, v := range want {
		if got[k] != v {
			t.Errorf("line of %s = %d, want %d", k, got[k], v)
		}
	}
	if _, ok := got["supply.x"]; ok {
		t.Errorf("key inside a multi-line string was listed")
	}
}

// TestExampleSpecs parses the example specs kept in seeddata.
func TestExampleSpecs(t *testing.T) {
	files, _ := filepath.Glob("../../seeddata/specs/*.toml")
	if len(files) < 3 {
		t.Fatalf("want at least 3 example specs, found %d", len(files))
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := Parse(filepath.Base(f), data); err != nil {
			t.Errorf("%s:\n%v", f, err)
		}
	}
}

func TestKeys(t *testing.T) {
	ks := Keys()
	seen := map[string]bool{}
	for _, k := range ks {
		if seen[k.Key] {
			t.Errorf("duplicate key %s", k.Key)
		}
		seen[k.Key] = true
		if k.Doc == "" {
			t.Errorf("%s has no doc", k.Key)
		}
	}
	for _, want := range []string{"supply.v_transient", "load.v_holdup", "policy.k_vrrm", "policy.rdson_alpha", "build.rates"} {
		if !seen[want] {
			t.Errorf("Keys lacks %s", want)
		}
	}
}
