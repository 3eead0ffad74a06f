package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCLI runs partsieve with args against the catalog db and returns
// stdout, stderr and the exit code.
func runCLI(t *testing.T, db string, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), append([]string{"--db", db}, args...), strings.NewReader(""), &out, &errb)
	return out.String(), errb.String(), code
}

func newDB(t *testing.T) string {
	t.Helper()
	return filepath.Join(t.TempDir(), "catalog.db")
}

// The seed catalog is loaded into a new catalog through the importer.
func TestSeededCatalog(t *testing.T) {
	db := newDB(t)
	out, errs, code := runCLI(t, db, "catalog", "stats", "--format", "json")
	if code != 0 {
		t.Fatalf("stats: code %d, stderr %s", code, errs)
	}
	var st struct {
		Parts   int            `json:"parts"`
		Sources int            `json:"sources"`
		ByKind  map[string]int `json:"by_kind"`
	}
	if err := json.Unmarshal([]byte(out), &st); err != nil {
		t.Fatalf("stats json: %v\n%s", err, out)
	}
	if st.Parts < 150 || st.Sources != 1 || st.ByKind["diode"] == 0 || st.ByKind["fuse"] == 0 || st.ByKind["mosfet"] == 0 {
		t.Errorf("seeded stats = %+v, want ≥150 parts of all kinds from one source", st)
	}
	out, _, code = runCLI(t, db, "catalog", "sources", "--format", "csv")
	if code != 0 || !strings.Contains(out, "\nseed,") {
		t.Errorf("sources: code %d, want a seed source:\n%s", code, out)
	}
}

func TestImportSummaryAndRejects(t *testing.T) {
	db := newDB(t)
	rejects := filepath.Join(t.TempDir(), "refused.csv")
	file := filepath.Join("testdata", "harbor-diodes.csv")
	out, errs, code := runCLI(t, db, "import", "--format", "json", "--rejects", rejects, file)
	if code != exitRejected {
		t.Fatalf("import: code %d, want %d (rows refused); stderr %s", code, exitRejected, errs)
	}
	var sum map[string]any
	if err := json.Unmarshal([]byte(out), &sum); err != nil {
		t.Fatalf("summary json: %v\n%s", err, out)
	}
	for key, want := range map[string]float64{"read": 5, "added": 3, "updated": 0, "unchanged": 0, "rejected": 2} {
		if got, ok := sum[key].(float64); !ok || got != want {
			t.Errorf("summary %s = %v, want %v", key, sum[key], want)
		}
	}
	f, err := os.Open(rejects)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 3 {
		t.Fatalf("rejects CSV has %d records, want header + 2:\n%v", len(recs), recs)
	}
	// row numbers are the sheet's own: title, date, blank line, header = rows 1-4
	if recs[1][2] != "8" || recs[1][3] != "VF max (V)" || recs[2][2] != "9" || recs[2][3] != "VRRM (V)" || recs[2][4] != "3 A" {
		t.Errorf("rejects = %v", recs[1:])
	}

	// the same file again: nothing changes
	out, _, _ = runCLI(t, db, "import", "--format", "json", file)
	if err := json.Unmarshal([]byte(out), &sum); err != nil {
		t.Fatal(err)
	}
	if sum["added"].(float64) != 0 || sum["updated"].(float64) != 0 || sum["unchanged"].(float64) != 3 {
		t.Errorf("re-import summary = %v, want all 3 unchanged", sum)
	}
}

func TestFindAndShow(t *testing.T) {
	db := newDB(t)
	if _, errs, code := runCLI(t, db, "import", filepath.Join("testdata", "harbor-diodes.csv")); code != exitRejected {
		t.Fatalf("import code %d: %s", code, errs)
	}
	out, errs, code := runCLI(t, db, "find", "--where", "vrrm>=40V and ifav>=3A", "--where", "mfr~Brightfen", "--sort", "-ifav", "--format", "json")
	if code != 0 {
		t.Fatalf("find code %d: %s", code, errs)
	}
	var parts []map[string]any
	if err := json.Unmarshal([]byte(out), &parts); err != nil {
		t.Fatalf("find json: %v\n%s", err, out)
	}
	if len(parts) != 2 || parts[0]["mpn"] != "BFD-S540" || parts[1]["mpn"] != "BFD-S340" {
		t.Fatalf("find = %v, want BFD-S540 then BFD-S340", parts)
	}
	// JSON is flat, canonical names, base SI units: V_F 0,58 V, T_j max 150 °C (upper end of the range)
	if parts[0]["vf"] != 0.58 || parts[0]["tjmax"] != 150.0 || parts[0]["vrrm"] != 40.0 {
		t.Errorf("BFD-S540 = %v", parts[0])
	}
	offers, _ := parts[1]["offers"].([]any)
	if len(offers) != 1 {
		t.Fatalf("BFD-S340 offers = %v", parts[1]["offers"])
	}
	o := offers[0].(map[string]any)
	if o["currency"] != "EUR" {
		t.Errorf("offer currency = %v, want EUR from the price header", o["currency"])
	}

	// table output uses engineering notation
	out, _, code = runCLI(t, db, "show", "bfd s340")
	if code != 0 || !strings.Contains(out, "550 mV") || !strings.Contains(out, "80 A") {
		t.Errorf("show: code %d\n%s", code, out)
	}
	// csv output: base SI units
	out, _, code = runCLI(t, db, "find", "--where", "mpn=BFD-S340", "--format", "csv")
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || code != 0 || len(recs) != 2 {
		t.Fatalf("csv find: code %d err %v\n%s", code, err, out)
	}
	col := map[string]string{}
	for i, h := range recs[0] {
		col[h] = recs[1][i]
	}
	if col["vf"] != "0.55" || col["ifav"] != "3" || col["best_unit_price"] != "0.41" {
		t.Errorf("csv row = %v", col)
	}
}

func TestExitCodes(t *testing.T) {
	db := newDB(t)
	tests := []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"find", "--where", "vds>=3A"}, exitUsage, "voltage"},
		{[]string{"find", "--where", "vdss>=40"}, exitUsage, "did you mean vds"},
		{[]string{"find", "--bogus"}, exitUsage, "unknown flag"},
		{[]string{"show"}, exitUsage, "accepts 1 arg"},
		{[]string{"find", "--format", "xml"}, exitUsage, "--format"},
		{[]string{"find", "--where", "vrrm>=1MV"}, exitNoMatch, ""},
		{[]string{"show", "NO-SUCH-PART"}, exitNoMatch, "no part"},
		{[]string{"import", "testdata/does-not-exist.csv"}, exitError, "does-not-exist.csv"},
		{[]string{"import", "--kind", "resistor", "x.csv"}, exitUsage, "not a kind"},
		{[]string{"catalog", "remove"}, exitUsage, "--source"},
	}
	for _, tt := range tests {
		_, errs, code := runCLI(t, db, tt.args...)
		if code != tt.code || !strings.Contains(errs, tt.msg) {
			t.Errorf("%v: code %d stderr %q, want code %d and %q", tt.args, code, errs, tt.code, tt.msg)
		}
	}
}

// A file that cannot be read leaves the catalog exactly as it was.
func TestBrokenFileLeavesCatalog(t *testing.T) {
	db := newDB(t)
	before, _, _ := runCLI(t, db, "find", "--limit", "0", "--format", "csv")
	for _, name := range []string{"broken.xlsx", "truncated.xlsx"} {
		_, errs, code := runCLI(t, db, "import", filepath.Join("testdata", name))
		if code != exitError || !strings.Contains(errs, name) {
			t.Errorf("import %s: code %d stderr %q, want exit 1 naming the file", name, code, errs)
		}
	}
	after, _, _ := runCLI(t, db, "find", "--limit", "0", "--format", "csv")
	if before != after {
		t.Error("catalog changed after a failed import")
	}
	out, _, _ := runCLI(t, db, "catalog", "sources", "--format", "csv")
	if strings.Count(out, "\n") != 2 {
		t.Errorf("sources after failed imports:\n%s", out)
	}
}

func TestFieldsListsHeaderWords(t *testing.T) {
	out, _, code := runCLI(t, newDB(t), "fields", "--format", "json")
	if code != 0 {
		t.Fatal(code)
	}
	var fs []struct {
		Name    string   `json:"name"`
		Unit    string   `json:"unit"`
		Headers []string `json:"header_words"`
	}
	if err := json.Unmarshal([]byte(out), &fs); err != nil {
		t.Fatal(err)
	}
	got := map[string]string{}
	words := map[string]string{}
	for _, f := range fs {
		got[f.Name] = f.Unit
		words[f.Name] = strings.ToLower(strings.Join(f.Headers, "|"))
	}
	for name, unit := range map[string]string{"vrrm": "V", "rdson": "Ω", "i2t": "A²s", "tjmax": "°C", "rthja": "K/W", "qg": "C", "mpn": ""} {
		if got[name] != unit {
			t.Errorf("field %s unit %q, want %q", name, got[name], unit)
		}
	}
	for name, w := range map[string]string{"vrrm": "repetitive peak reverse voltage", "rdson": "on-resistance", "breaking": "breaking capacity", "package": "case"} {
		if !strings.Contains(words[name], w) {
			t.Errorf("field %s header words %q lack %q", name, words[name], w)
		}
	}
}

// TestCheckTellsColumnFile: `catalog check` tells the column file's state
// (a cache the next pick rebuilds) without counting it as a problem.
func TestCheckTellsColumnFile(t *testing.T) {
	db := newDB(t)
	out, errs, code := runCLI(t, db, "catalog", "check")
	if code != 0 || !strings.Contains(out, "catalog ok") || !strings.Contains(out, "column file: current\n") {
		t.Fatalf("check on the seeded catalog: code %d\n%s%s", code, out, errs)
	}
	if err := os.Remove(db + ".cols"); err != nil {
		t.Fatal(err)
	}
	out, errs, code = runCLI(t, db, "catalog", "check")
	if code != 0 || !strings.Contains(out, "column file: missing (the next pick rebuilds it") {
		t.Fatalf("check without the column file: code %d\n%s%s", code, out, errs)
	}
	if _, _, code := runCLI(t, db, "pick", "vehicle-12v-accessory"); code != 0 {
		t.Fatalf("pick: code %d", code)
	}
	if out, _, _ = runCLI(t, db, "catalog", "check"); !strings.Contains(out, "column file: current\n") {
		t.Errorf("after a pick the column file is not current:\n%s", out)
	}
}

// TestImportInterrupted: an import run with its context already cancelled
// (Ctrl-C before the catalog is open) ends with exit code 130 and says it
// was interrupted; the catalog keeps what it had. An interrupt part way
// through an import is TestInterruptDuringImport in internal/hardening
// (a real SIGINT to the binary).
func TestImportInterrupted(t *testing.T) {
	db := newDB(t)
	before, errs, code := runCLI(t, db, "catalog", "stats", "--format", "json")
	if code != 0 {
		t.Fatalf("stats: code %d, stderr %s", code, errs)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	code = run(ctx, []string{"--db", db, "import", filepath.Join("testdata", "harbor-diodes.csv")}, strings.NewReader(""), &out, &errb)
	if code != exitCanceled || !strings.Contains(errb.String(), "interrupted") {
		t.Errorf("cancelled import: code %d, stderr %s", code, errb.String())
	}
	if after, _, _ := runCLI(t, db, "catalog", "stats", "--format", "json"); after != before {
		t.Errorf("catalog changed by a cancelled import:\n%s\nwant\n%s", after, before)
	}
}
