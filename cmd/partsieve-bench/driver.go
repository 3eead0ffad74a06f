package main

import (
	"bufio"
	"context"
	"database/sql"
	"database/sql/driver"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"modernc.org/sqlite/vtab"
)

// phaseDriver does the shell's .import (same typed table, same pragmas,
// every cell as text, one transaction) through the pure-Go SQLite driver
// partsieve uses, twice: one prepared INSERT per row with its values
// bound, as a program usually writes it, and batches of 2,048 rows read
// by one INSERT … SELECT from a virtual table over the batch, as
// partsieve's import writes new parts. It measures what the driver itself
// costs against the C shell for the same work, apart from everything
// partsieve does on top (typed conversion, keys, indexes, offers).
func phaseDriver(dir string) (results, error) {
	header, cols, _, err := shellSchema(csvPath(dir))
	if err != nil {
		return nil, err
	}
	out := results{}
	for _, batched := range []bool{false, true} {
		name := "driver_bound_s"
		if batched {
			name = "driver_batched_s"
		}
		db := filepath.Join(dir, "driver.db")
		d, n, err := driverImport(csvPath(dir), db, cols, len(header), batched)
		removeDB(db)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		out[name] = d.Seconds()
		out["driver_rows"] = float64(n)
	}
	return out, nil
}

// driverImport creates the table at db and imports the CSV rows of path
// into it; it returns the time from the CREATE TABLE to the commit and
// the rows written.
func driverImport(path, db string, cols []string, ncol int, batched bool) (time.Duration, int, error) {
	ctx := context.Background()
	removeDB(db)
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, err
	}
	defer f.Close()
	r := csv.NewReader(bufio.NewReaderSize(f, 1<<20))
	r.ReuseRecord = true
	r.FieldsPerRecord = ncol
	if _, err := r.Read(); err != nil { // the header
		return 0, 0, err
	}
	h, err := sql.Open("sqlite", "file:"+db+"?_pragma=journal_mode(WAL)&_pragma=synchronous(NORMAL)&_pragma=cache_size(-65536)")
	if err != nil {
		return 0, 0, err
	}
	defer h.Close()
	conn, err := h.Conn(ctx)
	if err != nil {
		return 0, 0, err
	}
	defer conn.Close()
	t0 := time.Now()
	if _, err := conn.ExecContext(ctx, "CREATE TABLE parts ("+strings.Join(cols, ", ")+")"); err != nil {
		return 0, 0, err
	}
	if _, err := conn.ExecContext(ctx, "BEGIN"); err != nil {
		return 0, 0, err
	}
	var n int
	if batched {
		n, err = driverBatched(ctx, conn, r, ncol)
	} else {
		n, err = driverBound(ctx, conn, r, ncol)
	}
	if err != nil {
		conn.ExecContext(ctx, "ROLLBACK")
		return 0, 0, err
	}
	if _, err := conn.ExecContext(ctx, "COMMIT"); err != nil {
		return 0, 0, err
	}
	d := time.Since(t0)
	var got int
	if err := conn.QueryRowContext(ctx, "SELECT count(*) FROM parts").Scan(&got); err != nil || got != n {
		return 0, 0, fmt.Errorf("%d rows in the table, %d read (%v)", got, n, err)
	}
	return d, n, nil
}

// driverBound inserts each record with one prepared INSERT, its values
// bound, at the driver level (no database/sql conversion per value).
func driverBound(ctx context.Context, conn *sql.Conn, r *csv.Reader, ncol int) (int, error) {
	n := 0
	err := conn.Raw(func(dc any) error {
		pc, ok := dc.(driver.ConnPrepareContext)
		if !ok {
			return errors.New("the driver cannot prepare with a context")
		}
		st, err := pc.PrepareContext(ctx, "INSERT INTO parts VALUES (?"+strings.Repeat(", ?", ncol-1)+")")
		if err != nil {
			return err
		}
		defer st.Close()
		ex, ok := st.(driver.StmtExecContext)
		if !ok {
			return errors.New("the driver's statements cannot run with a context")
		}
		args := make([]driver.NamedValue, ncol)
		for {
			rec, err := r.Read()
			if err == io.EOF {
				return nil
			}
			if err != nil {
				return err
			}
			for i := range args {
				args[i] = driver.NamedValue{Ordinal: i + 1, Value: rec[i]}
			}
			if _, err := ex.ExecContext(ctx, args); err != nil {
				return err
			}
			n++
		}
	})
	return n, err
}

// benchRows is the batch the virtual table of driverBatched serves.
var benchRows struct {
	ncol int
	vals []any
}

func init() {
	if err := vtab.RegisterModule(nil, "bench_rows", benchModule{}); err != nil {
		panic(err)
	}
}

// driverBatched inserts the records 2,048 at a time, by one INSERT …
// SELECT from a temp virtual table over the batch.
func driverBatched(ctx context.Context, conn *sql.Conn, r *csv.Reader, ncol int) (int, error) {
	benchRows.ncol, benchRows.vals = ncol, benchRows.vals[:0]
	if _, err := conn.ExecContext(ctx, "CREATE VIRTUAL TABLE temp.rows USING bench_rows"); err != nil {
		return 0, err
	}
	defer conn.ExecContext(context.Background(), "DROP TABLE IF EXISTS temp.rows")
	ins, err := conn.PrepareContext(ctx, "INSERT INTO parts SELECT * FROM temp.rows")
	if err != nil {
		return 0, err
	}
	defer ins.Close()
	flush := func() error {
		if len(benchRows.vals) == 0 {
			return nil
		}
		_, err := ins.ExecContext(ctx)
		clear(benchRows.vals)
		benchRows.vals = benchRows.vals[:0]
		return err
	}
	n := 0
	for {
		rec, err := r.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return 0, err
		}
		for _, v := range rec {
			benchRows.vals = append(benchRows.vals, v)
		}
		if n++; n%2048 == 0 {
			if err := flush(); err != nil {
				return 0, err
			}
		}
	}
	return n, flush()
}

type benchModule struct{}

func (m benchModule) Create(c vtab.Context, args []string) (vtab.Table, error) {
	return m.Connect(c, args)
}

func (benchModule) Connect(c vtab.Context, args []string) (vtab.Table, error) {
	cs := make([]string, benchRows.ncol)
	for i := range cs {
		cs[i] = "c" + strconv.Itoa(i)
	}
	if err := c.Declare("CREATE TABLE x(" + strings.Join(cs, ", ") + ")"); err != nil {
		return nil, err
	}
	return benchTable{}, nil
}

type benchTable struct{}

func (benchTable) BestIndex(*vtab.IndexInfo) error { return nil }
func (benchTable) Open() (vtab.Cursor, error)      { return &benchCursor{}, nil }
func (benchTable) Disconnect() error               { return nil }
func (benchTable) Destroy() error                  { return nil }

type benchCursor struct{ i int }

func (c *benchCursor) Filter(int, string, []vtab.Value) error { c.i = 0; return nil }
func (c *benchCursor) Next() error                            { c.i++; return nil }
func (c *benchCursor) Eof() bool                              { return c.i*benchRows.ncol >= len(benchRows.vals) }
func (c *benchCursor) Rowid() (int64, error)                  { return int64(c.i + 1), nil }
func (c *benchCursor) Close() error                           { return nil }
func (c *benchCursor) Column(col int) (vtab.Value, error) {
	return benchRows.vals[c.i*benchRows.ncol+col], nil
}
