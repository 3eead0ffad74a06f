package catalog

import (
	"context"
	"database/sql/driver"
	"errors"
	"fmt"
	"hash/maphash"
	"strconv"
	"strings"
	"sync"

	"modernc.org/sqlite/vtab"
)

// Rows of new parts reach SQLite through a virtual table over a Go batch:
// one INSERT … SELECT per batch instead of one INSERT per part.
//
// Why: the driver binds each argument with its own call into SQLite, and
// each such call takes the connection's mutex (the driver opens every
// connection fully serialised) and copies the text into C memory, then
// clears it again after the step. Measured on the scale benchmark's
// 1,000,000-row CSV, imported as text into a bare table (same method as
// the sqlite3 shell's .import): the shell took 7.6 s, the driver with one
// bound INSERT per row 17.0 s, of which 2.3 s inside SQLite's step and
// most of the rest in binding and clearing arguments; the same rows
// through a virtual table over batches of 2,048 took 9.1 s. A value handed
// back by a virtual table's cursor takes no mutex (sqlite3_result_* works
// on the statement's own context), numbers are not copied, and the
// statement runs once per batch, not once per row.
//
// The virtual table lives in the connection's temp schema, so nothing of
// it is ever written into the catalog file; it is dropped when the import
// gives its connection back.

// bulkModule is the name of the module every connection of the process
// knows (registered at init, before any connection is opened).
const bulkModule = "partsieve_batch"

func init() {
	if err := vtab.RegisterModule(nil, bulkModule, batchModule{}); err != nil {
		panic(fmt.Sprintf("catalog: cannot register the virtual table module %s: %v", bulkModule, err))
	}
}

// rowBatch is the rows a virtual table serves: ncol values each, one
// row after the other in vals, in the column order of its declaration
// (c0, c1, …).
type rowBatch struct {
	ncol   int
	vals   []any
	lo, hi int // the cursor serves rows lo ≤ i < hi; all rows when hi is 0
}

func (b *rowBatch) len() int { return len(b.vals) / b.ncol }

// end is the row after the last one the cursor serves.
func (b *rowBatch) end() int {
	if b.hi > 0 {
		return b.hi
	}
	return b.len()
}

// batches maps the number in a virtual table's arguments to its batch.
var batches struct {
	sync.Mutex
	next int
	m    map[int]*rowBatch
}

// newBatchTable registers b and returns the SQL that creates a temp
// virtual table over it, with its name, and a function that forgets b.
func newBatchTable(b *rowBatch) (name, create string, forget func()) {
	batches.Lock()
	batches.next++
	id := batches.next
	if batches.m == nil {
		batches.m = map[int]*rowBatch{}
	}
	batches.m[id] = b
	batches.Unlock()
	name = "temp.partsieve_batch_" + strconv.Itoa(id)
	create = "CREATE VIRTUAL TABLE " + name + " USING " + bulkModule + "(" + strconv.Itoa(id) + ")"
	return name, create, func() {
		batches.Lock()
		delete(batches.m, id)
		batches.Unlock()
	}
}

type batchModule struct{}

func (m batchModule) Create(ctx vtab.Context, args []string) (vtab.Table, error) {
	return m.Connect(ctx, args)
}

// Connect declares the table's columns (c0 … c(n-1)) for the batch named
// by the module argument (args: module, database, table, then arguments).
func (batchModule) Connect(ctx vtab.Context, args []string) (vtab.Table, error) {
	if len(args) != 4 {
		return nil, errors.New(bulkModule + ": wants one argument, the batch number")
	}
	id, err := strconv.Atoi(strings.TrimSpace(args[3]))
	if err != nil {
		return nil, fmt.Errorf("%s: batch number %q: %v", bulkModule, args[3], err)
	}
	batches.Lock()
	b := batches.m[id]
	batches.Unlock()
	if b == nil {
		return nil, fmt.Errorf("%s: no batch %d in this process", bulkModule, id)
	}
	var decl strings.Builder
	decl.WriteString("CREATE TABLE x(")
	for i := range b.ncol {
		if i > 0 {
			decl.WriteString(", ")
		}
		decl.WriteString("c" + strconv.Itoa(i))
	}
	decl.WriteString(")")
	if err := ctx.Declare(decl.String()); err != nil {
		return nil, err
	}
	return batchTable{b}, nil
}

type batchTable struct{ b *rowBatch }

// BestIndex: the table is only ever read whole, in order.
func (t batchTable) BestIndex(info *vtab.IndexInfo) error {
	info.EstimatedRows = int64(t.b.len())
	info.EstimatedCost = float64(t.b.len())
	return nil
}
func (t batchTable) Open() (vtab.Cursor, error) { return &batchCursor{b: t.b}, nil }
func (batchTable) Disconnect() error            { return nil }
func (batchTable) Destroy() error               { return nil }

type batchCursor struct {
	b *rowBatch
	i int
}

func (c *batchCursor) Filter(int, string, []vtab.Value) error { c.i = c.b.lo; return nil }
func (c *batchCursor) Next() error                            { c.i++; return nil }
func (c *batchCursor) Eof() bool                              { return c.i >= c.b.end() }
func (c *batchCursor) Rowid() (int64, error)                  { return int64(c.i + 1), nil }
func (c *batchCursor) Close() error                           { return nil }

// Column returns a value as stored in the batch: nil, int64, float64 or
// string (a row's values, see row).
func (c *batchCursor) Column(col int) (vtab.Value, error) {
	if c.i >= c.b.end() || col < 0 || col >= c.b.ncol {
		return nil, fmt.Errorf("%s: no column %d in row %d", bulkModule, col, c.i)
	}
	return c.b.vals[c.i*c.b.ncol+col], nil
}

// batchInsert is a batch of rows and the statements that insert them
// from a temp virtual table over the batch: variant 0 for all of them,
// others for runs of rows (flushBulk).
type batchInsert struct {
	batch  rowBatch
	table  string        // the temp virtual table, once created
	forget func()        // unregisters batch
	ins    []driver.Stmt // the INSERT … SELECT of each variant, once prepared
	sql    func(table string, variant int) string
}

// batchStmt returns bi's statement of the variant, creating the table and
// preparing the statement on first use.
func (t *ImportTx) batchStmt(bi *batchInsert, variant int) (driver.Stmt, error) {
	if bi.table == "" {
		name, create, forget := newBatchTable(&bi.batch)
		if _, err := t.conn.ExecContext(t.ctx, create); err != nil {
			forget()
			return nil, err
		}
		bi.forget = forget
		bi.table = name
	}
	for len(bi.ins) <= variant {
		bi.ins = append(bi.ins, nil)
	}
	if bi.ins[variant] == nil {
		st, err := t.rawPrepare(bi.sql(bi.table, variant))
		if err != nil {
			return nil, err
		}
		bi.ins[variant] = st
	}
	return bi.ins[variant], nil
}

// reset empties the batch.
func (bi *batchInsert) reset() {
	clear(bi.batch.vals) // let the values go
	bi.batch.vals = bi.batch.vals[:0]
	bi.batch.lo, bi.batch.hi = 0, 0
}

// flushBatch runs bi's INSERT (variant 0) over all its rows and empties
// the batch. It returns the statement's result (nil when the batch was
// empty).
func (t *ImportTx) flushBatch(bi *batchInsert) (driver.Result, error) {
	if bi.batch.len() == 0 {
		return nil, nil
	}
	st, err := t.batchStmt(bi, 0)
	if err != nil {
		return nil, err
	}
	res, err := t.rawExec(st, nil)
	if err != nil {
		return nil, err
	}
	bi.reset()
	return res, nil
}

// dropBatch drops bi's virtual table (its INSERT must be closed first)
// and unregisters its batch. It reports whether the table is gone.
func (t *ImportTx) dropBatch(bi *batchInsert) bool {
	ok := true
	if bi.table != "" {
		_, err := t.conn.ExecContext(context.Background(), "DROP TABLE IF EXISTS "+bi.table)
		ok = err == nil
		bi.table, bi.ins = "", nil
	}
	if bi.forget != nil {
		bi.forget()
		bi.forget = nil
	}
	return ok
}

// keyFilter is a Bloom filter of identity keys (part number key,
// manufacturer key): "no" is certain, "maybe" is wrong with a small
// probability, (1 − e^(−k·n/m))^k for n keys in m bits with k probes
// (Bloom, "Space/time trade-offs in hash coding with allowable errors",
// CACM 13(7), 1970). With m = 2^25 bits (4 MiB) and k = 5: about 5·10⁻⁵ at
// a million keys, 4 % at five million. A wrong "maybe" only sends a part
// down the slower path that looks it up in the catalog.
type keyFilter struct {
	bits []uint64
}

// keyFilterBits is the size of a keyFilter in bits (a power of two); a
// variable so that a test can make wrong "maybe"s common.
var keyFilterBits = 1 << 25

const keyFilterProbes = 5

func newKeyFilter() *keyFilter {
	return &keyFilter{bits: make([]uint64, keyFilterBits/64)}
}

// keySeed seeds the hashes of every keyFilter of the process, so that
// Prepare can hash a part's key on the reading goroutine, ahead of the
// writer that tests and adds it (keyHash).
var keySeed = maphash.MakeSeed()

// keyHash is the filter hash of an identity key: h1 and the step h2 of
// the double hashing (probe i at h1 + i·h2).
type keyHash struct{ h1, h2 uint64 }

func hashKey(pk, mk string) keyHash {
	h1 := maphash.String(keySeed, pk) ^ maphash.String(keySeed, mk)*0x9e3779b97f4a7c15
	return keyHash{h1, (h1>>33 | h1<<31) | 1}
}

func (f *keyFilter) add(pk, mk string) { f.addHash(hashKey(pk, mk)) }

func (f *keyFilter) mayHave(pk, mk string) bool { return f.mayHaveHash(hashKey(pk, mk)) }

func (f *keyFilter) addHash(h keyHash) {
	h1, h2 := h.h1, h.h2
	mask := uint64(len(f.bits)*64 - 1)
	for i := range uint64(keyFilterProbes) {
		b := (h1 + i*h2) & mask
		f.bits[b/64] |= 1 << (b % 64)
	}
}

func (f *keyFilter) mayHaveHash(h keyHash) bool {
	h1, h2 := h.h1, h.h2
	mask := uint64(len(f.bits)*64 - 1)
	for i := range uint64(keyFilterProbes) {
		b := (h1 + i*h2) & mask
		if f.bits[b/64]&(1<<(b%64)) == 0 {
			return false
		}
	}
	return true
}
