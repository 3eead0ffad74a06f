package main

import (
	"bufio"
	"bytes"
	"context"
	"database/sql"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"sync/atomic"
	"syscall"
	"time"

	"github.com/blevesearch/bleve/v2"
	_ "modernc.org/sqlite"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/query/spec"
	"partsieve/query/topology"
	"partsieve/seeddata"
	"partsieve/seeddata/synth"
)

func runPhase(name, dir string, rows, xrows int, seed uint64, reps int) (results, error) {
	ctx := context.Background()
	switch name {
	case "gen":
		return phaseGen(dir, rows, xrows, seed)
	case "import":
		return phaseImport(ctx, dir, false)
	case "import-usable":
		return phaseImport(ctx, dir, true)
	case "sqlite3":
		return phaseSQLite3(dir, false)
	case "sqlite3-pair":
		return phaseSQLite3(dir, true)
	case "sqlite3-keyed":
		return phaseSQLite3Keyed(dir)
	case "driver":
		return phaseDriver(dir)
	case "bleve":
		return phaseBleve(dir)
	case "xlsx":
		return phaseXLSX(ctx, dir)
	case "find":
		return phaseFind(ctx, dir, rows, seed, reps)
	case "pick":
		return phasePick(ctx, dir)
	}
	if rest, ok := strings.CutPrefix(name, "pickone:"); ok {
		db, specName, _ := strings.Cut(rest, ":")
		return phasePickOne(ctx, filepath.Join(dir, db), specName)
	}
	return nil, fmt.Errorf("unknown phase %q", name)
}

func writeFile(path string, write func(io.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := write(f); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

func phaseGen(dir string, rows, xrows int, seed uint64) (results, error) {
	t0 := time.Now()
	g := synth.New(seed)
	if err := writeFile(csvPath(dir), func(w io.Writer) error { return synth.WriteCSV(w, g, synth.Canonical, rows) }); err != nil {
		return nil, err
	}
	if err := writeFile(xlsxPath(dir), func(w io.Writer) error { return synth.WriteXLSX(w, g, synth.Words, xrows) }); err != nil {
		return nil, err
	}
	return results{"gen_s": time.Since(t0).Seconds()}, nil
}

// phaseImport imports the CSV into a new catalog. A second connection
// polls the catalog generation every 5 ms: it changes in the import's
// transaction, so the first poll that sees it marks the moment the parts
// became usable by other processes. With stopAtUsable (the pairs), the
// process reports and ends at that moment, leaving the text index
// unfinished.
func phaseImport(ctx context.Context, dir string, stopAtUsable bool) (results, error) {
	path := catPath(dir)
	removeDB(path)
	os.RemoveAll(path + ".bleve")
	st, err := catalog.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	db, err := sql.Open("sqlite", "file:"+path+"?mode=ro&_pragma=busy_timeout(5000)")
	if err != nil {
		return nil, err
	}
	defer db.Close()
	var usable atomic.Int64
	stop := make(chan struct{})
	done := make(chan struct{})
	t0 := time.Now()
	go func() {
		defer close(done)
		for {
			select {
			case <-stop:
				return
			case <-time.After(5 * time.Millisecond):
			}
			var gen string
			if db.QueryRow(`SELECT value FROM meta WHERE key = 'generation'`).Scan(&gen) == nil && gen != "0" {
				u := time.Since(t0)
				usable.Store(int64(u))
				if stopAtUsable {
					// the run counts only when the commit holds every row
					var n int64
					if err := db.QueryRow(`SELECT count(*) FROM parts`).Scan(&n); err != nil {
						fmt.Fprintf(os.Stderr, "phase import-usable: %v\n", err)
						os.Exit(1)
					}
					json.NewEncoder(os.Stdout).Encode(results{"import_usable_s": u.Seconds(), "import_added": float64(n)})
					os.Exit(0)
				}
				return
			}
		}
	}()
	sum, err := importers.ImportFile(ctx, st, csvPath(dir), importers.Options{Source: "synth"})
	ready := time.Since(t0)
	if err != nil {
		close(stop)
		return nil, err
	}
	// the commit is visible by now: let the poller see it
	select {
	case <-done:
	case <-time.After(2 * time.Second):
		close(stop)
		<-done
	}
	if sum.Rejected != 0 {
		return nil, fmt.Errorf("%d rows rejected, first: %+v", sum.Rejected, sum.Rejects[0])
	}
	u := time.Duration(usable.Load())
	if u == 0 {
		return nil, errors.New("the poller never saw the commit")
	}
	return results{"import_usable_s": u.Seconds(), "import_ready_s": ready.Seconds(), "import_added": float64(sum.Added)}, nil
}

// shellDB is the sqlite3 shell's database.
func shellDB(dir string) string { return filepath.Join(dir, "shell.db") }

func quoteIdent(s string) string { return `"` + strings.ReplaceAll(s, `"`, `""`) + `"` }

// shellSchema reads the CSV's header and returns its column names, the
// column definitions of the shell's typed table (REAL for number fields,
// stock, moq and price breaks, TEXT otherwise) and the NULLIF assignments
// that turn the empty cells of the REAL columns into NULL.
func shellSchema(path string) (header, cols, fix []string, err error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, nil, err
	}
	header, err = csv.NewReader(bufio.NewReader(f)).Read()
	f.Close()
	if err != nil {
		return nil, nil, nil, fmt.Errorf("%s: header: %w", path, err)
	}
	for _, h := range header {
		typ := "TEXT"
		if fl, ok := catalog.FieldByName(h); ok && fl.Type == catalog.Number && h != "kind" {
			typ = "REAL"
		} else if h == "stock" || h == "moq" || strings.HasSuffix(h, "+") {
			typ = "REAL"
		}
		cols = append(cols, quoteIdent(h)+" "+typ)
		if typ == "REAL" {
			fix = append(fix, quoteIdent(h)+" = NULLIF("+quoteIdent(h)+", '')")
		}
	}
	return header, cols, fix, nil
}

// shellRun runs the sqlite3 shell at bin on database db with the pragmas
// of LIBRARIES.md and args; it returns the wall time, the shell's peak
// resident memory (MB), its standard output and its standard error (where
// .import reports a row it refused, and goes on).
func shellRun(bin, db string, args ...string) (d time.Duration, rss float64, stdout, stderr []byte, err error) {
	cmd := exec.Command(bin, append([]string{db, "-cmd", "PRAGMA journal_mode=WAL", "-cmd", "PRAGMA synchronous=NORMAL", "-cmd", "PRAGMA cache_size=-65536"}, args...)...)
	var out, errOut bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errOut
	t0 := time.Now()
	err = cmd.Run()
	d = time.Since(t0)
	if err != nil {
		return 0, 0, nil, nil, fmt.Errorf("sqlite3 %v: %v: %s%s", args, err, out.Bytes(), errOut.Bytes())
	}
	if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
		rss = float64(ru.Maxrss) / 1024
	}
	return d, rss, out.Bytes(), errOut.Bytes(), nil
}

// shellTimes is what shellImport measured.
type shellTimes struct {
	committed, total time.Duration
	// unseen: the poller did not see the commit while the shell ran (a
	// command shorter than a few polls, the tests' small files);
	// committed is then the whole command's time
	unseen bool
	rss    float64
	warn   []byte // the shell's standard error
}

// unseenFlag is the unseen figure of a phase's results: 1 or 0.
func (st shellTimes) unseenFlag() float64 {
	if st.unseen {
		return 1
	}
	return 0
}

// shellImport runs the shell's .import of csv into the table parts of db
// (empty, in WAL mode) and times it twice: until its commit is visible to
// another connection, polled every 5 ms as phaseImport polls the catalog
// (the figure set beside parts usable), and the whole command, which also
// holds the shell's checkpoints after the commit (the automatic one, and
// the one when it closes the database: the import's pages copied from the
// WAL into the file and synced), work that parts usable does not hold.
func shellImport(bin, db, csv string) (shellTimes, error) {
	var st shellTimes
	poll, err := sql.Open("sqlite", "file:"+db+"?_pragma=busy_timeout(5000)")
	if err != nil {
		return st, err
	}
	defer poll.Close()
	has := func() bool {
		var ok bool
		return poll.QueryRow(`SELECT EXISTS (SELECT 1 FROM parts)`).Scan(&ok) == nil && ok
	}
	if has() {
		return st, fmt.Errorf("%s: the table is not empty before the .import", db)
	}
	var seen atomic.Int64
	stop, done := make(chan struct{}), make(chan struct{})
	t0 := time.Now()
	go func() {
		defer close(done)
		// the poller's connection is closed once it has seen the commit:
		// an open connection keeps a shared lock, and the shell would then
		// skip its checkpoint at close
		defer poll.Close()
		for {
			select {
			case <-stop:
				return
			case <-time.After(5 * time.Millisecond):
			}
			if has() {
				seen.Store(int64(time.Since(t0)))
				return
			}
		}
	}()
	st.total, st.rss, _, st.warn, err = shellRun(bin, db, ".import --csv --skip 1 "+csv+" parts")
	close(stop)
	<-done
	if err != nil {
		return st, err
	}
	// a commit seen only after the shell ended (or never) is known only
	// to be within the command
	st.committed = time.Duration(seen.Load())
	if st.committed == 0 || st.committed > st.total {
		st.committed, st.unseen = st.total, true
	}
	return st, nil
}

// removeDB removes an SQLite database with its WAL and shared-memory files.
func removeDB(path string) {
	for _, sfx := range []string{"", "-wal", "-shm"} {
		os.Remove(path + sfx)
	}
}

// firstLines is the first n lines of s, "..." marking a cut.
func firstLines(s string, n int) string {
	ls := strings.SplitN(strings.TrimSpace(s), "\n", n+1)
	if len(ls) > n {
		ls[n] = "..."
	}
	return strings.Join(ls, "\n")
}

// phaseSQLite3 runs the C shell's .import of the CSV into a typed table
// (shellSchema) with no key and no index, with the pragmas of
// LIBRARIES.md, then the NULLIF fix-up of empty cells (timed apart) and
// the indexes the find comparison uses (untimed).
func phaseSQLite3(dir string, importOnly bool) (results, error) {
	bin, err := exec.LookPath("sqlite3")
	if err != nil {
		return results{}, nil // reported as absent
	}
	_, cols, fix, err := shellSchema(csvPath(dir))
	if err != nil {
		return nil, err
	}
	db := shellDB(dir)
	removeDB(db)
	if _, _, _, _, err := shellRun(bin, db, "CREATE TABLE parts ("+strings.Join(cols, ", ")+")"); err != nil {
		return nil, fmt.Errorf("sqlite3 create: %w", err)
	}
	imp, err := shellImport(bin, db, csvPath(dir))
	if err != nil {
		return nil, err
	}
	r := results{"sqlite3_import_s": imp.committed.Seconds(), "sqlite3_import_total_s": imp.total.Seconds(), "sqlite3_commit_unseen": imp.unseenFlag()}
	if importOnly {
		return r, nil
	}
	fixup, _, _, _, err := shellRun(bin, db, "UPDATE parts SET "+strings.Join(fix, ", "))
	if err != nil {
		return nil, err
	}
	if _, _, _, _, err := shellRun(bin, db, "CREATE INDEX p_kind ON parts(kind, vds, rdson); CREATE INDEX p_vrrm ON parts(kind, vrrm); CREATE INDEX p_mpn ON parts(mpn COLLATE NOCASE); CREATE INDEX p_mfr ON parts(mfr, mpn);"); err != nil {
		return nil, err
	}
	r["sqlite3_fixup_s"], r["sqlite3_peak_mb"] = fixup.Seconds(), imp.rss
	return r, nil
}

// keyedParamIndexes is a copy of the catalog's partial parametric indexes
// (paramIndexes in catalog/schema.go, unexported there): kind and column,
// the column named as in the CSV (the field name; the catalog names the
// MOSFET drain current column "f_id"). TestKeyedSchemaMatchesCatalog
// fails when the copy drifts from the indexes catalog.Open creates.
var keyedParamIndexes = []struct {
	kind catalog.Kind
	col  string
}{
	{catalog.Diode, "vrrm"}, {catalog.Diode, "ifav"}, {catalog.Diode, "vf"},
	{catalog.MOSFET, "vds"}, {catalog.MOSFET, "rdson"}, {catalog.MOSFET, "id"},
	{catalog.Fuse, "in"}, {catalog.Fuse, "un_dc"},
}

// keyedDDL is the schema of the keyed shell table: the typed columns of
// shellSchema (kind, mfr and mpn NOT NULL as in the catalog), the
// catalog's kind of key and indexes on the raw columns, all in place
// before the .import so that the shell maintains them row by row:
//
//   - UNIQUE (mpn, mfr), for the catalog's UNIQUE (mpn_key, mfr_key). The
//     catalog's keys are folded in Go (upper case, no spaces or hyphens)
//     and compared by SQLite with the default BINARY collation, so the raw
//     columns are compared BINARY here too (no COLLATE NOCASE, which would
//     put case folding into every B-tree comparison that partsieve's
//     SQLite does not do);
//   - an index on (mfr, mpn, kind), for find_order (mfr_key, mpn_key, kind);
//   - the partial indexes of keyedParamIndexes, with the catalog's
//     predicate: kind = 'K' AND col IS NOT NULL.
//
// Not mirrored: the catalog's separate offers and part_sources tables
// (one flat table here) and its extra key columns.
func keyedDDL(cols []string) string {
	cc := make([]string, len(cols))
	for i, c := range cols {
		cc[i] = c
		for _, nn := range []string{"kind", "mfr", "mpn"} {
			if strings.HasPrefix(c, quoteIdent(nn)+" ") {
				cc[i] += " NOT NULL"
			}
		}
	}
	stmts := []string{
		"CREATE TABLE parts (" + strings.Join(cc, ", ") + ", UNIQUE (mpn, mfr))",
		`CREATE INDEX parts_order ON parts(mfr, mpn, "kind")`,
	}
	for _, ix := range keyedParamIndexes {
		c := quoteIdent(ix.col)
		stmts = append(stmts, fmt.Sprintf(`CREATE INDEX parts_%s_%s ON parts(%s) WHERE "kind" = '%s' AND %s IS NOT NULL`,
			ix.kind, ix.col, c, ix.kind, c))
	}
	return strings.Join(stmts, ";\n") + ";"
}

// csvCensus reads the CSV at path and returns its number of data rows and,
// over the partial indexes of keyedParamIndexes, how many rows of the
// index's kind have a value in its column (the entries the catalog's
// index holds) and how many have an empty cell. The shell imports an
// empty cell as an empty string, not NULL, so until the NULLIF fix-up its
// partial indexes also hold those blank entries.
func csvCensus(path string, header []string) (rows, entries, blanks int, err error) {
	at := map[string]int{}
	for i, h := range header {
		at[h] = i
	}
	k, ok := at["kind"]
	if !ok {
		return 0, 0, 0, fmt.Errorf("%s: no kind column", path)
	}
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, 0, err
	}
	defer f.Close()
	r := csv.NewReader(bufio.NewReaderSize(f, 1<<16))
	r.ReuseRecord = true
	if _, err := r.Read(); err != nil {
		return 0, 0, 0, fmt.Errorf("%s: header: %w", path, err)
	}
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return 0, 0, 0, fmt.Errorf("%s: %w", path, err)
		}
		rows++
		for _, ix := range keyedParamIndexes {
			c, ok := at[ix.col]
			if !ok || rec[k] != string(ix.kind) {
				continue
			}
			if rec[c] == "" {
				blanks++
			} else {
				entries++
			}
		}
	}
	return rows, entries, blanks, nil
}

// shellKeyedDB is the database of the keyed shell reference.
func shellKeyedDB(dir string) string { return filepath.Join(dir, "shell_keyed.db") }

// phaseSQLite3Keyed is the second shell reference: .import of the same CSV
// into a table that carries the catalog's kind of key and indexes
// (keyedDDL), created before the import, with the same pragmas as
// phaseSQLite3 and the NULLIF fix-up timed apart. It fails when the table
// does not end with one row per CSV row (the unique key refusing a
// duplicate, or any other row the shell skipped).
func phaseSQLite3Keyed(dir string) (results, error) {
	bin, err := exec.LookPath("sqlite3")
	if err != nil {
		return results{}, nil // reported as absent
	}
	header, cols, fix, err := shellSchema(csvPath(dir))
	if err != nil {
		return nil, err
	}
	rows, entries, blanks, err := csvCensus(csvPath(dir), header)
	if err != nil {
		return nil, err
	}
	db := shellKeyedDB(dir)
	removeDB(db)
	if _, _, _, _, err := shellRun(bin, db, keyedDDL(cols)); err != nil {
		return nil, fmt.Errorf("sqlite3 create keyed table: %w", err)
	}
	imp, err := shellImport(bin, db, csvPath(dir))
	if err != nil {
		return nil, fmt.Errorf("keyed .import: %w", err)
	}
	if len(imp.warn) > 0 {
		return nil, fmt.Errorf("keyed .import of %s refused rows: %s", csvPath(dir), firstLines(string(imp.warn), 5))
	}
	// the journal_mode pragma prints "wal" first: the count is the last line
	_, _, out, _, err := shellRun(bin, db, "SELECT count(*) FROM parts")
	if err != nil {
		return nil, err
	}
	ls := strings.Fields(string(out))
	n := -1
	if len(ls) > 0 {
		n, err = strconv.Atoi(ls[len(ls)-1])
	}
	if n < 0 || err != nil {
		return nil, fmt.Errorf("keyed .import: no row count in %q", out)
	}
	if n != rows {
		return nil, fmt.Errorf("keyed .import: %d rows in the table, %d in %s (a duplicate (mpn, mfr) or a row the shell skipped)", n, rows, csvPath(dir))
	}
	fixup, _, _, _, err := shellRun(bin, db, "UPDATE parts SET "+strings.Join(fix, ", "))
	if err != nil {
		return nil, fmt.Errorf("keyed fix-up: %w", err)
	}
	return results{"sqlite3_keyed_import_s": imp.committed.Seconds(), "sqlite3_keyed_import_total_s": imp.total.Seconds(), "sqlite3_keyed_commit_unseen": imp.unseenFlag(), "sqlite3_keyed_fixup_s": fixup.Seconds(), "sqlite3_keyed_peak_mb": imp.rss,
		"sqlite3_keyed_rows": float64(n), "sqlite3_keyed_index_entries": float64(entries), "sqlite3_keyed_blank_entries": float64(blanks)}, nil
}

// phaseBleve indexes mfr, mpn, desc and package of every CSV row into a
// new bleve index with the default mapping, in batches of 10,000.
func phaseBleve(dir string) (results, error) {
	f, err := os.Open(csvPath(dir))
	if err != nil {
		return nil, err
	}
	defer f.Close()
	path := filepath.Join(dir, "raw.bleve")
	os.RemoveAll(path)
	t0 := time.Now()
	ix, err := bleve.New(path, bleve.NewIndexMapping())
	if err != nil {
		return nil, err
	}
	r := csv.NewReader(bufio.NewReaderSize(f, 1<<16))
	r.ReuseRecord = true
	header, err := r.Read()
	if err != nil {
		return nil, err
	}
	want := []string{"mfr", "mpn", "desc", "package"}
	at := make([]int, len(want))
	for i, w := range want {
		at[i] = -1
		for j, h := range header {
			if h == w {
				at[i] = j
			}
		}
		if at[i] < 0 {
			return nil, fmt.Errorf("no %s column", w)
		}
	}
	b := ix.NewBatch()
	n := 0
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		doc := make(map[string]any, len(want))
		for i, w := range want {
			doc[w] = rec[at[i]]
		}
		if err := b.Index(strconv.Itoa(n), doc); err != nil {
			return nil, err
		}
		n++
		if b.Size() >= 10000 {
			if err := ix.Batch(b); err != nil {
				return nil, err
			}
			b.Reset()
		}
	}
	if b.Size() > 0 {
		if err := ix.Batch(b); err != nil {
			return nil, err
		}
	}
	if err := ix.Close(); err != nil {
		return nil, err
	}
	return results{"bleve_s": time.Since(t0).Seconds(), "bleve_docs": float64(n)}, nil
}

func phaseXLSX(ctx context.Context, dir string) (results, error) {
	path := filepath.Join(dir, "xlsx.db")
	removeDB(path)
	os.RemoveAll(path + ".bleve")
	st, err := catalog.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	t0 := time.Now()
	sum, err := importers.ImportFile(ctx, st, xlsxPath(dir), importers.Options{Source: "synth-xlsx"})
	if err != nil {
		return nil, err
	}
	if sum.Rejected != 0 {
		return nil, fmt.Errorf("%d XLSX rows rejected, first: %+v", sum.Rejected, sum.Rejects[0])
	}
	return results{"xlsx_s": time.Since(t0).Seconds(), "xlsx_added": float64(sum.Added)}, nil
}

// findQuery is one query of the find comparison: through the store and,
// when sql is set, in the sqlite3 shell on its typed table.
type findQuery struct {
	name string
	q    func(prefix string) catalog.Query
	sql  func(prefix string) string
}

var findQueries = []findQuery{
	{"param-selective", func(string) catalog.Query {
		return catalog.Query{Kind: catalog.MOSFET, Conds: []catalog.Cond{{Field: "vds", Op: ">=", Num: 100}, {Field: "rdson", Op: "<=", Num: 0.01}}, Limit: 50}
	}, func(string) string {
		return `SELECT * FROM parts WHERE kind = 'mosfet' AND vds >= 100 AND rdson <= 0.01 ORDER BY mfr, mpn LIMIT 50;`
	}},
	{"param-broad", func(string) catalog.Query {
		return catalog.Query{Kind: catalog.Diode, Conds: []catalog.Cond{{Field: "vrrm", Op: ">=", Num: 40}}, Limit: 50}
	}, func(string) string {
		return `SELECT * FROM parts WHERE kind = 'diode' AND vrrm >= 40 ORDER BY mfr, mpn LIMIT 50;`
	}},
	{"text-term", func(string) catalog.Query { return catalog.Query{Text: "rectifier", Limit: 50} },
		func(string) string {
			return `SELECT * FROM parts WHERE desc LIKE '%rectifier%' ORDER BY mfr, mpn LIMIT 50;`
		}},
	{"text-mpn-prefix", func(p string) catalog.Query { return catalog.Query{Text: p, Limit: 50} },
		func(p string) string {
			return `SELECT * FROM parts WHERE mpn LIKE '` + p + `%' ORDER BY mfr, mpn LIMIT 50;`
		}},
	{"text-fuzzy", func(string) catalog.Query { return catalog.Query{Text: "shotky", Limit: 50} }, nil},
}

func quantiles(d []float64) (p50, p90 float64) {
	sort.Float64s(d)
	return d[len(d)/2], d[(len(d)*9)/10]
}

var runTime = regexp.MustCompile(`Run Time: real ([0-9.]+)`)

func phaseFind(ctx context.Context, dir string, rows int, seed uint64, reps int) (results, error) {
	st, err := catalog.Open(ctx, catPath(dir))
	if err != nil {
		return nil, err
	}
	defer st.Close()
	mpn := synth.New(seed).Part(rows / 8).MPN
	prefix := mpn[:len(mpn)-2]
	res := results{}
	// The first text search opens the index: time it apart.
	t0 := time.Now()
	if _, err := st.Search(ctx, catalog.Query{Text: "diode", Limit: 1}); err != nil {
		return nil, err
	}
	res["find_open_s"] = time.Since(t0).Seconds()
	for _, fq := range findQueries {
		var ds []float64
		var hits int
		for i := 0; i < reps; i++ {
			t := time.Now()
			r, err := st.Search(ctx, fq.q(prefix))
			if err != nil {
				return nil, fmt.Errorf("%s: %w", fq.name, err)
			}
			ds = append(ds, time.Since(t).Seconds())
			hits = len(r.Parts)
			if r.Fallback {
				return nil, fmt.Errorf("%s: the text index was not used", fq.name)
			}
		}
		res["find_"+fq.name+"_p50"], res["find_"+fq.name+"_p90"] = quantiles(ds)
		res["find_"+fq.name+"_n"] = float64(hits)
	}
	bin, err := exec.LookPath("sqlite3")
	if err != nil {
		return res, nil
	}
	for _, fq := range findQueries {
		if fq.sql == nil {
			continue
		}
		script := ".timer on\n" + strings.Repeat(fq.sql(prefix)+"\n", reps)
		cmd := exec.Command(bin, shellDB(dir))
		cmd.Stdin = strings.NewReader(script)
		out, err := cmd.CombinedOutput()
		if err != nil {
			return nil, fmt.Errorf("sqlite3 %s: %v: %s", fq.name, err, out)
		}
		var ds []float64
		for _, m := range runTime.FindAllSubmatch(out, -1) {
			v, _ := strconv.ParseFloat(string(m[1]), 64)
			ds = append(ds, v)
		}
		if len(ds) == 0 {
			return nil, fmt.Errorf("sqlite3 %s: no timings in %q", fq.name, out)
		}
		res["sh_"+fq.name+"_p50"], res["sh_"+fq.name+"_p90"] = quantiles(ds)
	}
	return res, nil
}

// phasePick times topology.Pick per example spec on the CSV catalog and
// on the XLSX one (-xlsx-rows parts), each in a fresh store as the CLI
// opens it. The reference is a plain in-memory Go scan of the same
// columns: the catalog's column sets loaded once, then a loop over them
// applying Pick's pre-filter conditions (kind, type, hard limits) and
// counting the parts that pass: the floor of any scan of that data.
func phasePick(ctx context.Context, dir string) (results, error) {
	res := results{}
	specs := map[string]*spec.Spec{}
	for _, name := range seeddata.SpecNames() {
		data, path, ok := seeddata.Spec(name)
		if !ok {
			return nil, fmt.Errorf("spec %s missing", name)
		}
		s, err := spec.Parse(path, data)
		if err != nil {
			return nil, err
		}
		specs[name] = s
	}
	names := seeddata.SpecNames()
	for _, db := range []struct{ tag, file string }{{"", "catalog.db"}, {"x_", "xlsx.db"}} {
		st, err := catalog.Open(ctx, filepath.Join(dir, db.file))
		if err != nil {
			return nil, err
		}
		n, err := st.PartCounts(ctx)
		st.Close()
		if err != nil {
			return nil, err
		}
		res["pick_"+db.tag+"parts"] = float64(n.Parts)
		for _, name := range names {
			// each pick in a fresh process, as the command line runs it
			// (the median of three), timed from process start to result
			var ts []float64
			var one results
			for range pickRuns {
				t0 := time.Now()
				if selfExe != "" {
					cmd := exec.Command(selfExe, "-phase", "pickone:"+db.file+":"+name, "-dir", dir)
					var out bytes.Buffer
					cmd.Stdout, cmd.Stderr = &out, os.Stderr
					if err := cmd.Run(); err != nil {
						return nil, fmt.Errorf("pick %s: %w", name, err)
					}
					one = results{}
					if err := json.Unmarshal(out.Bytes(), &one); err != nil {
						return nil, fmt.Errorf("pick %s: %w", name, err)
					}
				} else if one, err = phasePickOne(ctx, filepath.Join(dir, db.file), name); err != nil {
					return nil, err
				}
				ts = append(ts, time.Since(t0).Seconds())
			}
			sort.Float64s(ts)
			res["pick_"+db.tag+name+"_s"] = ts[len(ts)/2]
			res["pick_"+db.tag+name+"_in_s"] = one["pick_s"]
			res["pick_"+db.tag+name+"_qualified"] = one["qualified"]
		}
	}
	st, err := catalog.Open(ctx, catPath(dir))
	if err != nil {
		return nil, err
	}
	defer st.Close()
	v, err := st.View(ctx)
	if err != nil {
		return nil, err
	}
	defer v.Close()
	t0 := time.Now()
	cols, err := v.Columns(ctx, nil)
	if err != nil {
		return nil, err
	}
	res["scan_load_s"] = time.Since(t0).Seconds()
	defer cols.Close()
	for _, name := range names {
		qs := topology.PrefilterQueries(specs[name], topology.Options{})
		t0 := time.Now()
		n := plainScan(cols, qs)
		res["scan_"+name+"_s"] = time.Since(t0).Seconds()
		res["scan_"+name+"_n"] = float64(n)
	}
	return res, nil
}

// pickRuns is how many times each pick is timed (the median is kept).
const pickRuns = 3

// selfExe is this program, for phases that run children; "" in tests,
// where they run in process.
var selfExe string

// phasePickOne opens the catalog at path and picks for one example spec;
// it reports the time from opening the store to the result and the
// number of qualifying designs.
func phasePickOne(ctx context.Context, path, name string) (results, error) {
	data, sp, ok := seeddata.Spec(name)
	if !ok {
		return nil, fmt.Errorf("spec %s missing", name)
	}
	s, err := spec.Parse(sp, data)
	if err != nil {
		return nil, err
	}
	t0 := time.Now()
	st, err := catalog.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	r, err := topology.Pick(ctx, st, s, topology.Options{})
	if err != nil {
		return nil, fmt.Errorf("pick %s: %w", name, err)
	}
	q := 0
	for _, tr := range r.Topologies {
		q += tr.Qualified
	}
	return results{"pick_s": time.Since(t0).Seconds(), "qualified": float64(q)}, nil
}

// plainScan counts, per query, the parts of the column sets that pass the
// query's kind, type and number conditions (>= and <=; an absent value
// fails), as a loop over plain slices.
func plainScan(cols *catalog.Columns, qs []catalog.Query) int {
	n := 0
	for _, q := range qs {
		for _, cs := range cols.Sets {
			if cs.Kind != q.Kind || !typeOK(cs.Type, q.Conds) {
				continue
			}
			type cond struct {
				col []float64
				ge  bool
				x   float64
			}
			var cc []cond
			for _, c := range q.Conds {
				if c.Field != "type" {
					cc = append(cc, cond{cs.Col(c.Field), c.Op == ">=", c.Num})
				}
			}
		rows:
			for i := 0; i < cs.Len(); i++ {
				for _, c := range cc {
					if c.col == nil {
						continue rows
					}
					v := c.col[i]
					if c.ge && !(v >= c.x) || !c.ge && !(v <= c.x) {
						continue rows
					}
				}
				n++
			}
		}
	}
	return n
}

func typeOK(typ string, conds []catalog.Cond) bool {
	for _, c := range conds {
		if c.Field != "type" {
			continue
		}
		eq := strings.EqualFold(typ, c.Text)
		if c.Op == "=" && !eq || c.Op == "!=" && eq {
			return false
		}
	}
	return true
}
