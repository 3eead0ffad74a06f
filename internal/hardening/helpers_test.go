package hardening

import (
	"bufio"
	"context"
	"crypto/sha256"
	"database/sql"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	_ "modernc.org/sqlite" // the "sqlite" driver, to read catalogs directly
)

// binDir holds the partsieve binary built for this test run and fixDir
// the shared catalogs; TestMain removes both.
var binDir, fixDir string

func TestMain(m *testing.M) {
	code := m.Run()
	for _, d := range []string{binDir, fixDir} {
		if d != "" {
			os.RemoveAll(d)
		}
	}
	os.Exit(code)
}

// fixture is shared by the tests: a catalog holding the seed parts and the
// base sheet (the "old" state), the update sheet, and a copy of the
// catalog after the complete import of the update sheet (the "new" state).
type fixture struct {
	base, update string // sheets
	nBase, nNew  int
	oldDB, newDB string // catalogs in the old and new state
	old, new     state
	importTime   time.Duration // one complete import of the update sheet
}

var (
	fixOnce sync.Once
	fix     *fixture
	fixErr  string
)

// sizes returns the rows of the base sheet and the new rows of the update
// sheet: 1000 and 4000 by default, or PARTSIEVE_CRASH_ROWS new rows. From
// 20000 new rows on, the import takes the bulk path that drops the
// parametric indexes inside its transaction and rebuilds them at commit.
func sizes(t *testing.T) (nBase, nNew int) {
	nBase, nNew = 1000, 4000
	if v := os.Getenv("PARTSIEVE_CRASH_ROWS"); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 1 {
			t.Fatalf("PARTSIEVE_CRASH_ROWS=%q: want a positive number of rows", v)
		}
		nNew = n
	}
	return nBase, nNew
}

// getFixture builds the shared fixture on first use.
func getFixture(t *testing.T) *fixture {
	t.Helper()
	bin := partsieve(t)
	fixOnce.Do(func() {
		fixErr = "building it failed in an earlier test"
		f, err := buildFixture(t, bin)
		if err != nil {
			fixErr = err.Error()
			return
		}
		fix = f
	})
	if fix == nil {
		t.Fatalf("fixture: %s", fixErr)
	}
	return fix
}

func buildFixture(t *testing.T, bin string) (*fixture, error) {
	var err error
	if fixDir, err = os.MkdirTemp("", "partsieve-fixture-"); err != nil {
		return nil, err
	}
	f := &fixture{}
	f.nBase, f.nNew = sizes(t)
	f.base, f.update = writeSheets(t, fixDir, f.nBase, f.nNew)
	f.oldDB = filepath.Join(fixDir, "old", "catalog.db")
	f.newDB = filepath.Join(fixDir, "new", "catalog.db")
	if r := cli(t, f.oldDB, "import", f.base); r.code != 0 {
		return nil, fmt.Errorf("base import:\n%s", r)
	}
	if r := cli(t, f.oldDB, "catalog", "check"); r.code != 0 {
		return nil, fmt.Errorf("check of the base catalog:\n%s", r)
	}
	if err := os.MkdirAll(filepath.Dir(f.newDB), 0o755); err != nil {
		return nil, err
	}
	copyCatalog(t, f.oldDB, f.newDB)
	r := cli(t, f.newDB, "import", f.update)
	if r.code != 0 {
		return nil, fmt.Errorf("update import:\n%s", r)
	}
	f.importTime = r.took
	if r := cli(t, f.newDB, "catalog", "check"); r.code != 0 {
		return nil, fmt.Errorf("check after the update:\n%s", r)
	}
	// time a second complete import: the first one runs on a cold cache
	again := filepath.Join(fixDir, "again", "catalog.db")
	if err := os.MkdirAll(filepath.Dir(again), 0o755); err != nil {
		return nil, err
	}
	copyCatalog(t, f.oldDB, again)
	if r := cli(t, again, "import", f.update); r.code != 0 {
		return nil, fmt.Errorf("second update import:\n%s", r)
	} else if r.took < f.importTime {
		f.importTime = r.took
	}
	if st := readState(t, again); st.Hash != readState(t, f.newDB).Hash {
		return nil, fmt.Errorf("two complete imports of the update sheet gave different catalogs:\n%v\n%v", st, readState(t, f.newDB))
	}
	os.RemoveAll(filepath.Dir(again))
	f.old, f.new = readState(t, f.oldDB), readState(t, f.newDB)
	if f.new.Parts != f.old.Parts+f.nNew || f.old.Hash == f.new.Hash {
		return nil, fmt.Errorf("fixture states: old %v, new %v", f.old, f.new)
	}
	t.Logf("fixture: old catalog %v\nnew catalog %v\nimport of %d rows took %v", f.old, f.new, f.nBase+f.nNew, f.importTime.Round(time.Millisecond))
	return f, nil
}

var (
	buildOnce sync.Once
	binPath   string
	buildErr  error
)

// noteSources stats the module's sources (go.mod, go.sum and every file
// under its package directories): go test caches a package's result by
// its own dependencies and by the files the test opens or stats, and this
// package imports no other of the module; it builds the command in a
// child process instead. Without this, a change to the catalog or the
// importers would leave a cached pass in place. The module root itself is
// not listed, so that files there that are not sources (a built binary,
// .git) do not drop a cached pass. A file edited while the test runs,
// after the build, can still be cached as passed: go test checks the
// files when the test ends.
func noteSources() {
	root := filepath.Join("..", "..")
	for _, f := range []string{"go.mod", "go.sum"} {
		os.Stat(filepath.Join(root, f))
	}
	for _, dir := range []string{"catalog", "cmd", "importers", "internal", "query", "seeddata"} {
		filepath.WalkDir(filepath.Join(root, dir), func(path string, d fs.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				os.Stat(path)
			}
			return nil
		})
	}
}

// partsieve returns the path of the partsieve binary, building it on first
// use (CGO_ENABLED=0, as released). It skips the test when the go command
// is not available.
func partsieve(t *testing.T) string {
	t.Helper()
	buildOnce.Do(func() {
		goCmd, err := exec.LookPath("go")
		if err != nil {
			buildErr = fmt.Errorf("go command not found: %w", err)
			return
		}
		binDir, err = os.MkdirTemp("", "partsieve-hardening-")
		if err != nil {
			buildErr = err
			return
		}
		exe := "partsieve"
		if runtime.GOOS == "windows" {
			exe += ".exe"
		}
		bin := filepath.Join(binDir, exe)
		noteSources()
		cmd := exec.Command(goCmd, "build", "-o", bin, "partsieve/cmd/partsieve")
		cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
		if out, err := cmd.CombinedOutput(); err != nil {
			buildErr = fmt.Errorf("go build: %v\n%s", err, out)
			return
		}
		binPath = bin
	})
	if buildErr != nil {
		if strings.HasPrefix(buildErr.Error(), "go command not found") {
			t.Skipf("cannot build partsieve: %v", buildErr)
		}
		t.Fatal(buildErr)
	}
	return binPath
}

// cliTimeout bounds one partsieve run; a run that takes longer is a hang.
const cliTimeout = 90 * time.Second

type result struct {
	stdout, stderr string
	code           int
	took           time.Duration
}

func (r result) String() string {
	return fmt.Sprintf("exit %d after %v\nstdout: %s\nstderr: %s", r.code, r.took.Round(time.Millisecond), clip(r.stdout), clip(r.stderr))
}

func clip(s string) string {
	if len(s) > 2000 {
		return s[:2000] + "…"
	}
	return s
}

// cli runs partsieve --db db args... to completion. A run that panics or
// hangs fails the test.
func cli(t *testing.T, db string, args ...string) result {
	t.Helper()
	r, err := runBin(partsieve(t), db, args...)
	if err != nil {
		t.Fatal(err)
	}
	checkNoPanic(t, args, r)
	return r
}

// runBin runs partsieve to completion without a *testing.T, for use in
// goroutines; err is set when it could not run or hung.
func runBin(bin, db string, args ...string) (result, error) {
	ctx, cancel := context.WithTimeout(context.Background(), cliTimeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, append([]string{"--db", db}, args...)...)
	cmd.Env = cliEnv()
	var out, errb strings.Builder
	cmd.Stdout, cmd.Stderr = &out, &errb
	start := time.Now()
	err := cmd.Run()
	r := result{stdout: out.String(), stderr: errb.String(), took: time.Since(start)}
	if ctx.Err() != nil {
		return r, fmt.Errorf("partsieve %s hung (killed after %v)\n%s", strings.Join(args, " "), cliTimeout, r)
	}
	if err != nil {
		var ee *exec.ExitError
		if !errors.As(err, &ee) {
			return r, fmt.Errorf("running partsieve %s: %v", strings.Join(args, " "), err)
		}
		r.code = ee.ExitCode()
	}
	return r, nil
}

func panicked(r result) bool {
	return strings.Contains(r.stderr, "panic:") || strings.Contains(r.stderr, "goroutine ") || strings.Contains(r.stderr, "fatal error:")
}

// cliEnv is the environment of partsieve children: no catalog from the
// environment, no terminal.
func cliEnv() []string {
	var env []string
	for _, e := range os.Environ() {
		if !strings.HasPrefix(e, "PARTSIEVE_DB=") {
			env = append(env, e)
		}
	}
	return env
}

func exitCode(t *testing.T, err error) int {
	t.Helper()
	if err == nil {
		return 0
	}
	var ee *exec.ExitError
	if errors.As(err, &ee) {
		return ee.ExitCode()
	}
	t.Fatalf("running partsieve: %v", err)
	return -1
}

func checkNoPanic(t *testing.T, args []string, r result) {
	t.Helper()
	if panicked(r) {
		t.Errorf("partsieve %s crashed:\n%s", strings.Join(args, " "), r)
	}
}

// The generated supplier sheets. Row i of kind i%3 (diode, MOSFET, fuse)
// has part number X{D,M,F}-iiiiii from one of four invented makers and one
// offer from an invented supplier. The base sheet holds rows [0, nBase);
// the update sheet holds the same rows with revised values (ratings
// +10 %, stock and prices changed, "qzrev7" added to the description)
// followed by nNew new rows.
var makers = []string{"Dunmere Devices", "Kestrel Vale Power", "Orvik Fuseworks", "Tamsin Microsystems"}

const (
	supplier  = "Slate Harbour Parts"
	revToken  = "qzrev7" // only in the descriptions of revised rows
	csvHeader = "kind,type,mfr,mpn,desc,package,vrrm,ifav,vf,vds,rdson,id,in,un_dc,supplier,sku,stock,currency,1+,100+\n"
)

func mpnOf(i int) string {
	return fmt.Sprintf("X%c-%06d", "DMF"[i%3], i)
}

func sheetRow(w io.Writer, i int, revised bool) {
	bump, stock, extra := 1.0, 100+i%900, ""
	if revised {
		bump, stock, extra = 1.1, 7+i%50, " "+revToken
	}
	m, mpn := makers[i%len(makers)], mpnOf(i)
	p1, p100 := 0.10+float64(i%9)/100*bump, 0.05*bump
	switch i % 3 {
	case 0:
		fmt.Fprintf(w, "diode,schottky,%s,%s,Schottky diode %d%s,SMA,%g,%d,%g,,,,,,", m, mpn, i, extra, 40*bump, 1+i%5, 0.45+float64(i%7)/100)
	case 1:
		fmt.Fprintf(w, "mosfet,n,%s,%s,N-channel MOSFET %d%s,SOT-23,,,,%g,%g,%d,,,", m, mpn, i, extra, 30*bump, 0.005+float64(i%9)/1000, 3+i%7)
	default:
		fmt.Fprintf(w, "fuse,T,%s,%s,time-lag fuse %d%s,1206,,,,,,,%d,%g,", m, mpn, i, extra, 1+i%10, 32*bump)
	}
	fmt.Fprintf(w, "%s,SHP-%d,%d,EUR,%.4f,%.4f\n", supplier, i, stock, p1, p100)
}

// writeSheets writes base.csv and update.csv into dir.
func writeSheets(t *testing.T, dir string, nBase, nNew int) (base, update string) {
	t.Helper()
	write := func(name string, rows func(w io.Writer)) string {
		path := filepath.Join(dir, name)
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		w := bufio.NewWriter(f)
		w.WriteString(csvHeader)
		rows(w)
		if err := w.Flush(); err != nil {
			t.Fatal(err)
		}
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		return path
	}
	base = write("base.csv", func(w io.Writer) {
		for i := 0; i < nBase; i++ {
			sheetRow(w, i, false)
		}
	})
	update = write("update.csv", func(w io.Writer) {
		for i := 0; i < nBase+nNew; i++ {
			sheetRow(w, i, i < nBase)
		}
	})
	return base, update
}

// state is what a catalog holds, for comparing catalogs: counts, the
// source records and a hash over every part (all field columns), offer,
// provenance link, meta row and schema object, without row ids and
// timestamps.
type state struct {
	Parts, Offers, Links int
	Sources              []string // label read/added/updated/unchanged/rejected
	Generation           string
	Hash                 string
}

func (s state) String() string {
	return fmt.Sprintf("%d parts, %d offers, %d links, generation %s, sources %v, hash %.12s",
		s.Parts, s.Offers, s.Links, s.Generation, s.Sources, s.Hash)
}

// readState reads the catalog at db directly with SQLite.
func readState(t *testing.T, db string) state {
	t.Helper()
	conn, err := sql.Open("sqlite", "file:"+db+"?_pragma=busy_timeout(10000)")
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	tx, err := conn.Begin()
	if err != nil {
		t.Fatalf("read %s: %v", db, err)
	}
	defer tx.Rollback()
	h := sha256.New()
	var st state
	dumpQ := func(q string, skip map[string]bool) int {
		rows, err := tx.Query(q)
		if err != nil {
			t.Fatalf("read %s: %s: %v", db, q, err)
		}
		defer rows.Close()
		cols, _ := rows.Columns()
		vals := make([]any, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		n := 0
		for rows.Next() {
			if err := rows.Scan(ptrs...); err != nil {
				t.Fatal(err)
			}
			for i, v := range vals {
				if !skip[cols[i]] {
					fmt.Fprintf(h, "%s=%v|", cols[i], v)
				}
			}
			h.Write([]byte{'\n'})
			n++
		}
		if err := rows.Err(); err != nil {
			t.Fatalf("read %s: %v", db, err)
		}
		return n
	}
	st.Parts = dumpQ(`SELECT * FROM parts ORDER BY mpn_key, mfr_key`, map[string]bool{"id": true, "created": true, "updated": true})
	st.Offers = dumpQ(`SELECT p.mfr_key, p.mpn_key, o.supplier, o.supplier_key, o.sku, o.stock, o.moq, o.currency, o.breaks, s.label
		FROM offers o JOIN parts p ON p.id = o.part_id LEFT JOIN sources s ON s.id = o.source_id ORDER BY 1, 2, 4, 5`, nil)
	st.Links = dumpQ(`SELECT p.mfr_key, p.mpn_key, s.label FROM part_sources ps JOIN parts p ON p.id = ps.part_id
		JOIN sources s ON s.id = ps.source_id ORDER BY 1, 2, 3`, nil)
	dumpQ(`SELECT key, value FROM meta ORDER BY key`, nil)
	dumpQ(`SELECT type, name, tbl_name, sql FROM sqlite_schema ORDER BY type, name`, nil)
	rows, err := tx.Query(`SELECT label, n_read, n_added, n_updated, n_unchanged, n_rejected, file, sha256 FROM sources ORDER BY label`)
	if err != nil {
		t.Fatal(err)
	}
	for rows.Next() {
		var label, file, sha string
		var r, a, u, un, rej int
		if err := rows.Scan(&label, &r, &a, &u, &un, &rej, &file, &sha); err != nil {
			t.Fatal(err)
		}
		st.Sources = append(st.Sources, fmt.Sprintf("%s %d/%d/%d/%d/%d", label, r, a, u, un, rej))
		fmt.Fprintf(h, "source %s %d %d %d %d %d %s %s\n", label, r, a, u, un, rej, file, sha)
	}
	rows.Close()
	if err := tx.QueryRow(`SELECT value FROM meta WHERE key = 'generation'`).Scan(&st.Generation); err != nil {
		t.Fatal(err)
	}
	st.Hash = hex.EncodeToString(h.Sum(nil))
	return st
}

// copyCatalog copies the catalog db (with its side files and text index)
// to the catalog path dst, replacing what is there.
func copyCatalog(t *testing.T, db, dst string) {
	t.Helper()
	for _, suffix := range []string{"", "-wal", "-shm", "-journal", ".bleve"} {
		if err := os.RemoveAll(dst + suffix); err != nil {
			t.Fatal(err)
		}
	}
	for _, suffix := range []string{"", "-wal", "-shm", ".bleve"} {
		if err := copyTree(db+suffix, dst+suffix); err != nil && !errors.Is(err, fs.ErrNotExist) {
			t.Fatal(err)
		}
	}
}

func copyTree(src, dst string) error {
	fi, err := os.Stat(src)
	if err != nil {
		return err
	}
	if !fi.IsDir() {
		return copyFile(src, dst, fi.Mode().Perm())
	}
	return filepath.WalkDir(src, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(src, p)
		target := filepath.Join(dst, rel)
		if d.IsDir() {
			return os.MkdirAll(target, 0o755)
		}
		info, err := d.Info()
		if err != nil {
			return err
		}
		return copyFile(p, target, info.Mode().Perm())
	})
}

func copyFile(src, dst string, perm fs.FileMode) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	out, err := os.OpenFile(dst, os.O_CREATE|os.O_WRONLY|os.O_TRUNC, perm)
	if err != nil {
		return err
	}
	if _, err := io.Copy(out, in); err != nil {
		out.Close()
		return err
	}
	return out.Close()
}

// problems returns the "problem:" lines of a catalog check.
func problems(out string) []string {
	var ps []string
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(l, "problem: ") {
			ps = append(ps, strings.TrimPrefix(l, "problem: "))
		}
	}
	return ps
}

// staleOnly reports whether the problems of a catalog check are only a
// text index marked as not reflecting the catalog (missing, unreadable,
// without or with another generation stamp), which the next text search
// repairs. A document count that differs from the part count is only
// acceptable together with such a mark: an index that claims to be
// current must be.
func staleOnly(ps []string) bool {
	marked := false
	for _, p := range ps {
		switch {
		case !strings.HasPrefix(p, "text index: "):
			return false
		case strings.Contains(p, "reflects catalog generation"), strings.Contains(p, "missing"),
			strings.Contains(p, "unreadable"), strings.Contains(p, "records no catalog generation"):
			marked = true
		case strings.Contains(p, " documents for "):
		default:
			return false
		}
	}
	return marked
}

// mustCheckClean runs catalog check and fails unless it reports no problem.
func mustCheckClean(t *testing.T, db, when string) {
	t.Helper()
	r := cli(t, db, "catalog", "check")
	if r.code != 0 || !strings.Contains(r.stdout, "catalog ok") {
		t.Fatalf("catalog check %s:\n%s", when, r)
	}
}
