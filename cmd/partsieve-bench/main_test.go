package main

import (
	"bytes"
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"partsieve/catalog"
	"partsieve/query/spec"
	"partsieve/query/topology"
	"partsieve/seeddata"
	"partsieve/seeddata/synth"
)

func TestQuantiles(t *testing.T) {
	p50, p90 := quantiles([]float64{10, 1, 9, 2, 8, 3, 7, 4, 6, 5})
	if p50 != 6 || p90 != 10 {
		t.Errorf("p50 %v p90 %v, want 6 and 10", p50, p90)
	}
}

// TestPhasesSmall runs every phase in process on 300 rows and checks the
// figures each must report.
func TestPhasesSmall(t *testing.T) {
	dir := t.TempDir()
	var picked results
	want := map[string][]string{
		"gen":    {"gen_s"},
		"import": {"import_usable_s", "import_ready_s"},
		"bleve":  {"bleve_s"},
		"xlsx":   {"xlsx_s"},
		"find":   {"find_open_s", "find_param-selective_p50", "find_text-fuzzy_p90"},
		"pick":   {"pick_vehicle-12v-accessory_s", "scan_load_s"},
		"driver": {"driver_bound_s", "driver_batched_s"},
	}
	order := []string{"gen", "import", "driver", "bleve", "xlsx", "find", "pick"}
	if _, err := exec.LookPath("sqlite3"); err == nil {
		want["sqlite3"] = []string{"sqlite3_import_s", "sqlite3_import_total_s", "sqlite3_fixup_s"}
		want["sqlite3-keyed"] = []string{"sqlite3_keyed_import_s", "sqlite3_keyed_import_total_s", "sqlite3_keyed_fixup_s", "sqlite3_keyed_peak_mb"}
		order = []string{"gen", "import", "sqlite3", "sqlite3-keyed", "driver", "bleve", "xlsx", "find", "pick"}
	}
	for _, ph := range order {
		r, err := runPhase(ph, dir, 300, 100, 1, 3)
		if err != nil {
			t.Fatalf("phase %s: %v", ph, err)
		}
		for _, k := range want[ph] {
			if v, ok := r[k]; !ok || v < 0 {
				t.Errorf("phase %s: %s = %v (present %v)", ph, k, v, ok)
			}
		}
		switch ph {
		case "import":
			if r["import_added"] != 300 || r["import_usable_s"] > r["import_ready_s"] {
				t.Errorf("import: %v", r)
			}
		case "driver":
			if r["driver_rows"] != 300 {
				t.Errorf("driver phase wrote %v rows, want 300", r["driver_rows"])
			}
		case "sqlite3-keyed":
			if r["sqlite3_keyed_rows"] != 300 || r["sqlite3_keyed_index_entries"] == 0 {
				t.Errorf("keyed .import: %v", r)
			}
		case "bleve":
			if r["bleve_docs"] != 300 {
				t.Errorf("bleve indexed %v docs, want 300", r["bleve_docs"])
			}
		case "xlsx":
			if r["xlsx_added"] != 100 {
				t.Errorf("xlsx added %v, want 100", r["xlsx_added"])
			}
		case "pick":
			if r["pick_parts"] != 300 || r["pick_x_parts"] != 100 {
				t.Errorf("pick on %v and %v parts, want 300 and 100", r["pick_parts"], r["pick_x_parts"])
			}
			picked = r
		}
	}
	// the plain scan counts what SQL counts for the same queries
	ctx := context.Background()
	st, err := catalog.Open(ctx, catPath(dir))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	for _, name := range seeddata.SpecNames() {
		data, path, _ := seeddata.Spec(name)
		s, err := spec.Parse(path, data)
		if err != nil {
			t.Fatal(err)
		}
		want := 0
		for _, q := range topology.PrefilterQueries(s, topology.Options{}) {
			ps, err := st.Find(ctx, q)
			if err != nil {
				t.Fatal(err)
			}
			want += len(ps)
		}
		if got := picked["scan_"+name+"_n"]; got != float64(want) || want == 0 {
			t.Errorf("%s: plain scan passes %v parts, SQL %d", name, got, want)
		}
	}
	if _, err := os.Stat(csvPath(dir)); err != nil {
		t.Error(err)
	}
}

// partsIndexes describes the indexes of table parts in the SQLite database
// at path, one string per index, sorted: unique or not, the columns in
// order and the partial-index predicate (double quotes and repeated spaces
// dropped), with column names passed through rename.
func partsIndexes(t *testing.T, path string, rename map[string]string) []string {
	t.Helper()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro")
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	type ix struct {
		name    string
		unique  bool
		partial bool
	}
	rows, err := db.Query(`SELECT name, "unique", partial FROM pragma_index_list('parts')`)
	if err != nil {
		t.Fatal(err)
	}
	var ixs []ix
	for rows.Next() {
		var x ix
		if err := rows.Scan(&x.name, &x.unique, &x.partial); err != nil {
			t.Fatal(err)
		}
		ixs = append(ixs, x)
	}
	rows.Close()
	nm := func(s string) string {
		if r, ok := rename[s]; ok {
			return r
		}
		return s
	}
	word := regexp.MustCompile(`[A-Za-z_][A-Za-z0-9_]*`)
	var out []string
	for _, x := range ixs {
		var cols []string
		r, err := db.Query(`SELECT name FROM pragma_index_info(?) ORDER BY seqno`, x.name)
		if err != nil {
			t.Fatal(err)
		}
		for r.Next() {
			var c string
			if err := r.Scan(&c); err != nil {
				t.Fatal(err)
			}
			cols = append(cols, nm(c))
		}
		r.Close()
		d := fmt.Sprintf("unique=%v (%s)", x.unique, strings.Join(cols, ", "))
		if x.partial {
			var ddl string
			if err := db.QueryRow(`SELECT sql FROM sqlite_master WHERE type = 'index' AND name = ?`, x.name).Scan(&ddl); err != nil {
				t.Fatal(err)
			}
			_, where, ok := strings.Cut(ddl, " WHERE ")
			if !ok {
				t.Fatalf("%s: partial index %s without WHERE: %s", path, x.name, ddl)
			}
			where = strings.Join(strings.Fields(strings.ReplaceAll(where, `"`, "")), " ")
			// rename the column words, not the quoted kind literals
			parts := strings.Split(where, "'")
			for i := 0; i < len(parts); i += 2 {
				parts[i] = word.ReplaceAllStringFunc(parts[i], nm)
			}
			d += " WHERE " + strings.Join(parts, "'")
		}
		out = append(out, d)
	}
	slices.Sort(out)
	return out
}

// TestKeyedSchemaMatchesCatalog fails when the keyed shell table's key and
// indexes (keyedDDL, with its copy of the catalog's partial indexes) drift
// from those catalog.Open creates on parts, the catalog's key columns and
// its f_id column named as in the CSV.
func TestKeyedSchemaMatchesCatalog(t *testing.T) {
	dir := t.TempDir()
	ctx := context.Background()
	st, err := catalog.Open(ctx, filepath.Join(dir, "c.db"))
	if err != nil {
		t.Fatal(err)
	}
	st.Close()
	want := partsIndexes(t, filepath.Join(dir, "c.db"), map[string]string{"mfr_key": "mfr", "mpn_key": "mpn", "f_id": "id"})

	gen := filepath.Join(dir, "parts.csv")
	if err := writeFile(gen, func(w io.Writer) error { return synth.WriteCSV(w, synth.New(1), synth.Canonical, 1) }); err != nil {
		t.Fatal(err)
	}
	_, cols, _, err := shellSchema(gen)
	if err != nil {
		t.Fatal(err)
	}
	db, err := sql.Open("sqlite", filepath.Join(dir, "k.db"))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec(keyedDDL(cols)); err != nil {
		t.Fatal(err)
	}
	db.Close()
	got := partsIndexes(t, filepath.Join(dir, "k.db"), nil)
	if !slices.Equal(got, want) {
		t.Errorf("keyed shell table indexes:\n  %s\ncatalog parts indexes:\n  %s", strings.Join(got, "\n  "), strings.Join(want, "\n  "))
	}
	if len(want) != 2+len(keyedParamIndexes) {
		t.Errorf("catalog has %d indexes on parts, want the key, the order index and %d partial ones: %v", len(want), len(keyedParamIndexes), want)
	}
}

func TestCSVCensus(t *testing.T) {
	const header = "kind,mfr,mpn,vrrm,ifav,vf,vds,rdson,id,in,un_dc\n"
	for _, tc := range []struct {
		name, csv             string
		rows, entries, blanks int
	}{
		// 2 diodes (vrrm, ifav, vf): 4 values, 2 blanks; 1 MOSFET (vds,
		// rdson, id): 2 values, 1 blank; 1 fuse (in, un_dc): 2 values;
		// the unknown kind counts as a row only
		{"mixed", header + "diode,Avelmoor,D1,40,1,,,,,,\n" + "diode,Avelmoor,D2,,2,0.5,,,,,\n" +
			"mosfet,Brackwell,M1,,,,30,0.01,,,\n" + "fuse,Corrindale,F1,,,,,,,2,32\n" + "thing,Dunmere,X1,1,1,1,1,1,1,1,1\n", 5, 8, 3},
		{"header only", header, 0, 0, 0},
		// a quoted cell over two lines is one row
		{"multi-line cell", "kind,mfr,mpn,vds\nmosfet,\"Eastor\nLabs\",M2,\n", 1, 0, 1},
	} {
		path := filepath.Join(t.TempDir(), "c.csv")
		if err := os.WriteFile(path, []byte(tc.csv), 0o644); err != nil {
			t.Fatal(err)
		}
		hdr, _, _, err := shellSchema(path)
		if err != nil {
			t.Fatal(err)
		}
		rows, entries, blanks, err := csvCensus(path, hdr)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if rows != tc.rows || entries != tc.entries || blanks != tc.blanks {
			t.Errorf("%s: rows %d entries %d blanks %d, want %d %d %d", tc.name, rows, entries, blanks, tc.rows, tc.entries, tc.blanks)
		}
	}
	if _, _, _, err := csvCensus(filepath.Join(t.TempDir(), "none.csv"), []string{"kind"}); err == nil {
		t.Error("census of a missing file: no error")
	}
}

// TestKeyedImportRefusesDuplicate: a CSV with a duplicate (mpn, mfr) makes
// the keyed phase fail rather than report a time for fewer rows.
func TestKeyedImportRefusesDuplicate(t *testing.T) {
	if _, err := exec.LookPath("sqlite3"); err != nil {
		t.Skip("no sqlite3 shell")
	}
	var buf bytes.Buffer
	if err := synth.WriteCSV(&buf, synth.New(1), synth.Canonical, 20); err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(buf.String(), "\n")
	dir := t.TempDir()
	if err := os.WriteFile(csvPath(dir), []byte(buf.String()+lines[3]), 0o644); err != nil {
		t.Fatal(err)
	}
	r, err := phaseSQLite3Keyed(dir)
	if err == nil || !strings.Contains(err.Error(), "UNIQUE") {
		t.Errorf("keyed .import of a duplicate row: %v, %v", r, err)
	}
	if err := os.WriteFile(csvPath(dir), buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	r, err = phaseSQLite3Keyed(dir)
	if err != nil || r["sqlite3_keyed_rows"] != 20 {
		t.Errorf("keyed .import of 20 rows: %v, %v", r, err)
	}
}

// TestReportShellReferences: the summary prints the keyed reference on a
// line of its own, with the ratio of parts usable to each reference.
func TestReportShellReferences(t *testing.T) {
	r := results{"import_usable_s": 30, "import_ready_s": 40, "sqlite3_import_s": 10, "sqlite3_import_total_s": 12.5, "sqlite3_fixup_s": 4,
		"sqlite3_keyed_import_s": 20, "sqlite3_keyed_fixup_s": 6, "sqlite3_keyed_peak_mb": 80, "bleve_s": 8,
		"driver_bound_s": 17, "driver_batched_s": 9}
	var buf bytes.Buffer
	report(&buf, r, map[string]float64{"import": 250}, 1000, 100)
	out := buf.String()
	for _, want := range []string{
		".import 10.00 s to its commit, whole command 12.50 s (+4.00 s NULL fix-up)",
		"MISS (3.00×)",
		"vs .import, same key and indexes as the catalog",
		".import 20.00 s (+6.00 s NULL fix-up), peak 80 MB",
		"PASS (1.50×)",
		"one INSERT a row 17.00 s, batched 9.00 s",
		"1.70× and 0.90× .import",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	delete(r, "sqlite3_keyed_import_s")
	buf.Reset()
	report(&buf, r, nil, 1000, 100)
	if strings.Contains(buf.String(), "same key") {
		t.Errorf("keyed line without a keyed figure:\n%s", buf.String())
	}
}

// TestImportUsablePhase: the pairs' import phase reports parts usable and
// ends the process at the commit, before the text index; the shell's pair
// phase reports the .import alone. The import phase runs in a child (this
// test binary again), since it ends its process.
func TestImportUsablePhase(t *testing.T) {
	if dir := os.Getenv("PARTSIEVE_BENCH_HELPER_DIR"); dir != "" {
		runPhase("import-usable", dir, 300, 100, 1, 3)
		t.Fatal("the import-usable phase returned instead of ending the process")
	}
	dir := t.TempDir()
	if _, err := runPhase("gen", dir, 300, 100, 1, 3); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(os.Args[0], "-test.run=^TestImportUsablePhase$")
	cmd.Env = append(os.Environ(), "PARTSIEVE_BENCH_HELPER_DIR="+dir)
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("child: %v\n%s", err, out)
	}
	var r results
	if err := json.Unmarshal(out, &r); err != nil || len(r) != 2 || r["import_usable_s"] <= 0 || r["import_added"] != 300 {
		t.Fatalf("child printed %q (%v); want import_usable_s and import_added 300", out, err)
	}
	st, err := catalog.Open(context.Background(), catPath(dir))
	if err != nil {
		t.Fatal(err)
	}
	stats, err := st.Stats(context.Background())
	st.Close()
	if err != nil || stats.Parts != 300 {
		t.Errorf("catalog after the phase: %d parts, %v; want 300", stats.Parts, err)
	}
	if _, err := exec.LookPath("sqlite3"); err != nil {
		return
	}
	r, err = runPhase("sqlite3-pair", dir, 300, 100, 1, 3)
	if err != nil || len(r) != 3 || r["sqlite3_import_s"] <= 0 || r["sqlite3_import_s"] > r["sqlite3_import_total_s"] {
		t.Errorf("sqlite3-pair: %v, %v; want the time to the commit, at most the whole command's", r, err)
	}
}

// TestReportPairs: with pairs, the summary gives the medians and the
// verdict on the median of the pairs' ratios, and every pair.
func TestReportPairs(t *testing.T) {
	r := results{"import_usable_s": 21, "import_ready_s": 40, "sqlite3_import_s": 10, "sqlite3_fixup_s": 4}
	for i, p := range [][2]float64{{21, 10}, {18, 10}, {19, 10}} {
		r[pairKey("usable", i+1)], r[pairKey("import", i+1)] = p[0], p[1]
	}
	var buf bytes.Buffer
	report(&buf, r, nil, 1000, 100)
	out := buf.String()
	for _, want := range []string{
		"MISS (2.10×)", // the first run alone
		"the same over 3 pairs run one after the other",
		"median 19.00 s", ".import median 10.00 s",
		"PASS (median ratio 1.90×)", // ratios 2.1, 1.8, 1.9
		"21.00/10.00 s = 2.10×; 18.00/10.00 s = 1.80×; 19.00/10.00 s = 1.90×",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	r["sqlite3_commit_unseen"] = 2
	buf.Reset()
	report(&buf, r, nil, 1000, 100)
	if !strings.Contains(buf.String(), "[2 run(s): commit not seen, whole command used]") {
		t.Errorf("report does not say that the shell's commit was not seen:\n%s", buf.String())
	}
	if m := median([]float64{3, 1, 2, 4}); m != 2.5 {
		t.Errorf("median of 1..4 = %v", m)
	}
}
