package main

import (
	"context"
	"os"
	"os/exec"
	"testing"

	"partsieve/catalog"
	"partsieve/query/spec"
	"partsieve/query/topology"
	"partsieve/seeddata"
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
	}
	order := []string{"gen", "import", "bleve", "xlsx", "find", "pick"}
	if _, err := exec.LookPath("sqlite3"); err == nil {
		want["sqlite3"] = []string{"sqlite3_import_s", "sqlite3_fixup_s"}
		order = []string{"gen", "import", "sqlite3", "bleve", "xlsx", "find", "pick"}
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
