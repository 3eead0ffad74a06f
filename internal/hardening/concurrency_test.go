package hardening

import (
	"context"
	"database/sql"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"
)

// startImport starts partsieve import of file in the background; wait
// returns its result.
func startImport(t *testing.T, db, file string) (done <-chan struct{}, wait func() result) {
	t.Helper()
	cmd := exec.Command(partsieve(t), "--db", db, "import", file)
	cmd.Env = cliEnv()
	var out, errb strings.Builder
	cmd.Stdout, cmd.Stderr = &out, &errb
	start := time.Now()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	ch := make(chan struct{})
	var r result
	go func() {
		err := cmd.Wait()
		r = result{stdout: out.String(), stderr: errb.String(), took: time.Since(start)}
		if err != nil {
			r.code = -1
			if cmd.ProcessState != nil {
				r.code = cmd.ProcessState.ExitCode()
			}
		}
		close(ch)
	}()
	t.Cleanup(func() {
		cmd.Process.Kill()
		<-ch
	})
	return ch, func() result {
		select {
		case <-ch:
		case <-time.After(cliTimeout):
			t.Fatalf("import of %s hung", file)
		}
		return r
	}
}

// settle brings a catalog whose text index may be stale to a clean check:
// check, and when only the index is stale, one text search (which
// rebuilds it) and a check that must be clean.
func settle(t *testing.T, db, text string) {
	t.Helper()
	r := cli(t, db, "catalog", "check")
	if r.code == 0 {
		return
	}
	if !staleOnly(problems(r.stdout)) {
		t.Fatalf("catalog check:\n%s", r)
	}
	if r := cli(t, db, "find", text); r.code != 0 || strings.Contains(r.stderr, "substring search") {
		t.Fatalf("text search to rebuild the index:\n%s", r)
	}
	mustCheckClean(t, db, "after the text search rebuilt the index")
}

// TestReadersDuringImport runs find (by text and by parameters) and pick
// in other processes, over and over, while an import runs: every run must
// exit 0 with sane output. A text search may fall back to a plain
// substring search while the import holds the text index (it says so on
// stderr); its answer must still be right.
func TestReadersDuringImport(t *testing.T) {
	f := getFixture(t)
	bin := partsieve(t)
	db := filepath.Join(t.TempDir(), "catalog.db")
	copyCatalog(t, f.oldDB, db)
	probe := mpnOf(3) // a base diode: V_RRM 40 V before the update, 44 V after

	done, wait := startImport(t, db, f.update)
	alive := func() bool {
		select {
		case <-done:
			return false
		default:
			return true
		}
	}
	type tally struct {
		name            string
		runs, during    int
		fallbacks, news int
	}
	readers := []struct {
		name string
		args []string
		// check returns an error for wrong output, and whether it saw
		// the new state
		check func(r result) (bool, error)
	}{
		{"find by text", []string{"find", probe, "--format", "json"}, func(r result) (bool, error) {
			var ps []map[string]any
			if err := json.Unmarshal([]byte(r.stdout), &ps); err != nil {
				return false, err
			}
			if len(ps) != 1 || ps[0]["mpn"] != probe {
				return false, fmt.Errorf("want only %s, got %d parts", probe, len(ps))
			}
			switch ps[0]["vrrm"] {
			case 40.0:
				return false, nil
			case 44.0:
				return true, nil
			}
			return false, fmt.Errorf("%s V_RRM = %v, want 40 (old) or 44 (new)", probe, ps[0]["vrrm"])
		}},
		{"find by parameters", []string{"find", "--kind", "mosfet", "--where", "vds>=30V", "--sort", "rdson", "--limit", "5", "--format", "json"}, func(r result) (bool, error) {
			var ps []map[string]any
			if err := json.Unmarshal([]byte(r.stdout), &ps); err != nil {
				return false, err
			}
			if len(ps) != 5 {
				return false, fmt.Errorf("%d parts, want 5", len(ps))
			}
			prev := 0.0
			for _, p := range ps {
				vds, _ := p["vds"].(float64)
				rds, _ := p["rdson"].(float64)
				if p["kind"] != "mosfet" || vds < 30 || rds < prev {
					return false, fmt.Errorf("part %v breaks kind=mosfet, vds>=30 V or the R_DS(on) order", p)
				}
				prev = rds
			}
			return false, nil
		}},
		{"pick", []string{"pick", "vehicle-12v-accessory", "--format", "json"}, func(r result) (bool, error) {
			var out struct {
				Topologies []struct {
					Topology  string `json:"topology"`
					Qualified int    `json:"qualified"`
				} `json:"topologies"`
			}
			if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
				return false, err
			}
			qualified := 0
			for _, tp := range out.Topologies {
				qualified += tp.Qualified
			}
			if len(out.Topologies) != 4 || qualified == 0 {
				return false, fmt.Errorf("%d topologies, %d qualified designs; want 4 topologies and some designs", len(out.Topologies), qualified)
			}
			return false, nil
		}},
	}
	tallies := make([]tally, len(readers))
	var wg sync.WaitGroup
	for i, rd := range readers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			tl := &tallies[i]
			tl.name = rd.name
			sawNew := false
			for alive() {
				r, err := runBin(bin, db, rd.args...)
				during := alive()
				if err == nil && (r.code != 0 || panicked(r) || strings.Contains(r.stderr, "Error")) {
					err = fmt.Errorf("exit %d", r.code)
				}
				var isNew bool
				if err == nil {
					isNew, err = rd.check(r)
				}
				if err != nil {
					t.Errorf("%s during the import: %v\n%s", rd.name, err, r)
					return
				}
				if sawNew && !isNew && rd.name == "find by text" {
					t.Errorf("%s saw the new state, then the old one again:\n%s", rd.name, r)
				}
				sawNew = sawNew || isNew
				tl.runs++
				if during {
					tl.during++
				}
				if isNew {
					tl.news++
				}
				if strings.Contains(r.stderr, "substring search") {
					tl.fallbacks++
				}
			}
		}()
	}
	wg.Wait()
	imp := wait()
	if imp.code != 0 {
		t.Fatalf("the import failed:\n%s", imp)
	}
	t.Logf("import of %d rows took %v with readers running", f.nBase+f.nNew, imp.took.Round(time.Millisecond))
	for _, tl := range tallies {
		t.Logf("%-18s %d runs finished while the import ran, all exit 0; new state seen %d times, substring fallback %d times", tl.name+":", tl.during, tl.news, tl.fallbacks)
		if tl.runs == 0 {
			t.Errorf("%s never ran during the import", tl.name)
		}
	}
	settle(t, db, probe)
	if st := readState(t, db); st.Hash != f.new.Hash {
		t.Errorf("after the import: %v\nwant %v", st, f.new)
	}
}

// writeExtra writes a sheet of n parts that are in neither the base nor
// the update sheet.
func writeExtra(t *testing.T, f *fixture, n int) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "extra.csv")
	var b strings.Builder
	b.WriteString(csvHeader)
	for i := f.nBase + f.nNew; i < f.nBase+f.nNew+n; i++ {
		sheetRow(&b, i, false)
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// lockProbe tells whether some connection holds the catalog's write lock,
// by trying BEGIN IMMEDIATE without waiting.
type lockProbe struct{ db *sql.DB }

func newLockProbe(t *testing.T, path string) *lockProbe {
	t.Helper()
	db, err := sql.Open("sqlite", "file:"+path+"?_pragma=busy_timeout(0)")
	if err != nil {
		t.Fatal(err)
	}
	db.SetMaxOpenConns(1)
	t.Cleanup(func() { db.Close() })
	return &lockProbe{db}
}

func (p *lockProbe) held(t *testing.T) bool {
	t.Helper()
	ctx := context.Background()
	c, err := p.db.Conn(ctx)
	if err != nil {
		t.Fatal(err)
	}
	defer c.Close()
	if _, err := c.ExecContext(ctx, "BEGIN IMMEDIATE"); err != nil {
		if strings.Contains(err.Error(), "locked") || strings.Contains(err.Error(), "SQLITE_BUSY") {
			return true
		}
		t.Fatalf("lock probe: %v", err)
	}
	if _, err := c.ExecContext(ctx, "ROLLBACK"); err != nil {
		t.Fatal(err)
	}
	return false
}

// busyTimeout is the catalog's SQLite busy timeout (catalog.busyTimeout):
// how long a second writer waits for the first.
const busyTimeout = 10 * time.Second

// TestTwoImports starts a second import while the first one holds the
// catalog's write lock. The catalog's busy timeout (10 s) outlasts the
// first import, so the second waits and then runs: both end with exit 0
// and the catalog holds both. (Were the first import to hold the lock
// longer than the busy timeout, the second would fail with the message
// TestSecondImportFailsWhileLocked checks.)
func TestTwoImports(t *testing.T) {
	f := getFixture(t)
	db := filepath.Join(t.TempDir(), "catalog.db")
	copyCatalog(t, f.oldDB, db)
	extra := writeExtra(t, f, 50)
	probe := newLockProbe(t, db)

	done, wait := startImport(t, db, f.update)
	for !probe.held(t) {
		select {
		case <-done:
			t.Fatalf("the first import ended before its write lock was seen:\n%s", wait())
		case <-time.After(5 * time.Millisecond):
		}
	}
	second := cli(t, db, "import", extra)
	first := wait()
	if first.code != 0 {
		t.Fatalf("first import:\n%s", first)
	}
	if second.code != 0 {
		t.Fatalf("second import (started while the first held the write lock, which it held for less than %v):\n%s", busyTimeout, second)
	}
	if !strings.Contains(second.stdout, "read 50, added 50, updated 0") {
		t.Errorf("second import summary:\n%s", second)
	}
	t.Logf("the second import waited for the first and ran after it: first %v, second %v", first.took.Round(time.Millisecond), second.took.Round(time.Millisecond))
	settle(t, db, mpnOf(3))
	st := readState(t, db)
	wantSources := strings.Join(append([]string{f.new.Sources[0], "extra.csv 50/50/0/0/0"}, f.new.Sources[1:]...), "|")
	if st.Parts != f.new.Parts+50 || strings.Join(st.Sources, "|") != wantSources {
		t.Errorf("after both imports: %v\nwant %d parts and sources %s", st, f.new.Parts+50, wantSources)
	}
}

// TestSecondImportFailsWhileLocked holds the catalog's write lock (as a
// long import does) for longer than the busy timeout: an import and a
// source removal started meanwhile wait that long, then fail with a clear
// message, and the catalog is unchanged. It runs in parallel with the
// other parallel tests, since it mostly waits.
func TestSecondImportFailsWhileLocked(t *testing.T) {
	t.Parallel()
	f := getFixture(t)
	bin := partsieve(t)
	db := filepath.Join(t.TempDir(), "catalog.db")
	copyCatalog(t, f.oldDB, db)
	extra := writeExtra(t, f, 50)

	holder := newLockProbe(t, db)
	ctx := context.Background()
	c, err := holder.db.Conn(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := c.ExecContext(ctx, "BEGIN IMMEDIATE"); err != nil {
		t.Fatal(err)
	}
	want := "another import is writing to catalog " + db + "; try again when it finishes"
	var wg sync.WaitGroup
	for _, args := range [][]string{{"import", extra}, {"catalog", "remove", "--source", "base.csv"}} {
		wg.Add(1)
		go func() {
			defer wg.Done()
			r, err := runBin(bin, db, args...)
			if err != nil {
				t.Error(err)
				return
			}
			if r.code != 1 || !strings.Contains(r.stderr, want) || r.took < busyTimeout*9/10 {
				t.Errorf("%s while the write lock is held: want exit 1 after about %v with %q:\n%s", strings.Join(args, " "), busyTimeout, want, r)
				return
			}
			t.Logf("%s failed after %v: %s", strings.Join(args, " "), r.took.Round(time.Millisecond), strings.TrimSpace(r.stderr))
		}()
	}
	wg.Wait()
	if _, err := c.ExecContext(ctx, "ROLLBACK"); err != nil {
		t.Fatal(err)
	}
	c.Close()
	if st := readState(t, db); st.Hash != f.old.Hash {
		t.Errorf("catalog changed by the failed writers: %v\nwant %v", st, f.old)
	}
	mustCheckClean(t, db, "after the failed writers")
}
