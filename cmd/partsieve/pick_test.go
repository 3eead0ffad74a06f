package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestNeedTemplateParses(t *testing.T) {
	db := newDB(t)
	out, _, code := runCLI(t, db, "need", "--template")
	if code != 0 || !strings.Contains(out, "[supply]") {
		t.Fatalf("need --template: code %d\n%s", code, out)
	}
	path := filepath.Join(t.TempDir(), "spec.toml")
	if err := os.WriteFile(path, []byte(out), 0o644); err != nil {
		t.Fatal(err)
	}
	out, errs, code := runCLI(t, db, "need", path, "--format", "json")
	if code != 0 {
		t.Fatalf("need on the template: code %d stderr %s", code, errs)
	}
	var ns struct {
		Needs []struct {
			Topology     string `json:"topology"`
			Requirements []struct {
				Name  string   `json:"name"`
				Value *float64 `json:"value"`
			} `json:"requirements"`
		} `json:"needs"`
		Cautions []string `json:"cautions"`
	}
	if err := json.Unmarshal([]byte(out), &ns); err != nil {
		t.Fatal(err)
	}
	if len(ns.Needs) != 4 || len(ns.Cautions) == 0 {
		t.Fatalf("need json: %d topologies, %d cautions", len(ns.Needs), len(ns.Cautions))
	}
	for _, n := range ns.Needs {
		if len(n.Requirements) < 3 {
			t.Errorf("%s: only %d requirements", n.Topology, len(n.Requirements))
		}
	}
}

// The example specs run against the seed catalog through the command:
// the vehicle accessory qualifies MOSFET designs, the handheld with a
// back-feeding charger ranks both MOSFET stages out.
func TestPickExamples(t *testing.T) {
	db := newDB(t)
	out, errs, code := runCLI(t, db, "pick", "vehicle-12v-accessory", "--format", "json")
	if code != 0 {
		t.Fatalf("pick: code %d stderr %s", code, errs)
	}
	var r struct {
		Topologies []struct {
			Topology   string            `json:"topology"`
			Unsafe     bool              `json:"unsafe"`
			Candidates []json.RawMessage `json:"candidates"`
			RankedOut  []json.RawMessage `json:"ranked_out"`
		} `json:"topologies"`
		Cautions []string `json:"cautions"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	got := map[string]int{}
	for _, tr := range r.Topologies {
		got[tr.Topology] = len(tr.Candidates)
	}
	if got["pfet-high"] == 0 || got["nfet-low"] == 0 {
		t.Errorf("vehicle picks per topology = %v, want MOSFET designs", got)
	}
	if len(r.Cautions) == 0 {
		t.Error("pick result without cautions")
	}

	out, _, code = runCLI(t, db, "pick", "handheld-2s-liion", "--format", "json")
	if code != 0 {
		t.Fatalf("handheld pick: code %d", code)
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	for _, tr := range r.Topologies {
		if (tr.Topology == "pfet-high" || tr.Topology == "nfet-low") && (!tr.Unsafe || len(tr.Candidates) != 0) {
			t.Errorf("handheld %s: unsafe %v with %d candidates; back-feed must rank it out", tr.Topology, tr.Unsafe, len(tr.Candidates))
		}
	}

	// table output ends with the caution
	out, _, _ = runCLI(t, db, "pick", "sensor-24v-industrial", "--top", "2")
	if !strings.Contains(out, "Best of each topology") || !strings.Contains(out, "datasheet") {
		t.Errorf("pick table lacks the comparison or the caution:\n%s", out)
	}
	// --explain shows every check of one part
	out, _, code = runCLI(t, db, "pick", "sensor-24v-industrial", "--explain", "QPS30-40C")
	if code != 0 || !strings.Contains(out, "series-diode as diode") {
		t.Errorf("explain: code %d\n%s", code, out)
	}
}

func TestPickErrors(t *testing.T) {
	db := newDB(t)
	bad := filepath.Join(t.TempDir(), "bad.toml")
	os.WriteFile(bad, []byte("[supply]\nv_mim = \"9 V\"\n"), 0o644)
	// an impossible spec: nothing qualifies, exit 4 naming the top eliminator
	hard := filepath.Join(t.TempDir(), "hard.toml")
	data, _, _ := runCLI(t, db, "need", "--template")
	data = strings.Replace(data, "i_max = ", "i_max = \"900 A\" # ", 1)
	os.WriteFile(hard, []byte(data), 0o644)
	tests := []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"pick", "no-such-spec"}, exitError, "no such file"},
		{[]string{"pick", bad}, exitError, "supply.v_mim"},
		{[]string{"pick", "vehicle-12v-accessory", "--rank", "price"}, exitUsage, "rank"},
		{[]string{"pick", "vehicle-12v-accessory", "--topology", "relay"}, exitUsage, "topolog"},
		{[]string{"pick", "vehicle-12v-accessory", "--explain", "NO-SUCH"}, exitNoMatch, "NO-SUCH"},
		{[]string{"pick", hard}, exitNoMatch, "eliminated most parts"},
	}
	for _, tt := range tests {
		_, errs, code := runCLI(t, db, tt.args...)
		if code != tt.code || !strings.Contains(errs, tt.msg) {
			t.Errorf("%v: code %d stderr %q, want %d and %q", tt.args, code, errs, tt.code, tt.msg)
		}
	}
}
