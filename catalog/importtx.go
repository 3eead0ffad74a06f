package catalog

import (
	"context"
	"database/sql"
	"database/sql/driver"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
)

// ImportTx is one import: every Put of a file happens in one SQLite
// transaction; Commit makes all of it visible at once, Rollback none.
// An ImportTx is used from one goroutine.
//
// The transaction runs on a connection of its own. The statements run for
// every row (the insert of a new part, the batched insert of new offers)
// go to that connection's driver directly, with values that are already
// driver values: database/sql's per-argument conversion took a fifth of
// the insert's time in a measurement at 200,000 parts. No statement run
// per row watches the import's context (the driver starts a goroutine per
// statement for a cancellable one); it is checked between rows instead
// (every ctxEvery Puts) and by the statements that run once per import.
type ImportTx struct {
	s       *Store
	ctx     context.Context
	conn    *sql.Conn // the connection tx runs on
	tx      *sql.Tx
	src     Source
	srcID   int64
	prevGen int64
	now     int64
	done    bool
	restore []string // pragmas that give conn back as the pool made it

	added, updated, unchanged int
	puts                      int
	dirty                     bool        // some part or offer changed
	textIDs                   []int64     // parts whose indexed text is new or changed
	linkIDs                   []int64     // stored parts met by this import, linked to the source at Commit
	firstNew, lastNew         int64       // ids of the first and last part added, 0 when none
	newRange                  bool        // the added parts hold exactly the ids firstNew..lastNew
	newOffers                 batchInsert // offers of new parts not yet inserted, offerCols values each
	partsAtBegin              int64       // max(id) when the import began
	linkedTo                  int64       // the parts added with ids up to this are linked to the source (linkNew)
	lastFound                 bool        // the previous Put found its part stored
	newRun                    int         // parts added since the last Put that found its part

	selPart, updPart              *sql.Stmt
	selOffers, insOffer, updOffer *sql.Stmt
	setOfferSrc, linkMany         *sql.Stmt
	linkRange                     *sql.Stmt
	insPart                       map[string]driver.Stmt // by which fields are present
	raw                           []driver.Stmt          // every driver statement, closed at the end

	args []any
	prep Preparer
	cur  Prepared // reused by Put

	bulk *bulkRows // new parts written a batch at a time; nil when off
}

// bulkRows holds the new parts of an import into an empty catalog until
// they are written together (see bulkrows.go). A part goes this way when
// the filter of the keys written so far is sure it is new; any other part
// first flushes the batch, then takes the row-at-a-time path, so every
// look-up sees every part written before it.
type bulkRows struct {
	filter   *keyFilter
	parts    batchInsert // id, mfr_key, mpn_key, then the fields of a row
	variants []uint8     // statement variant of each queued part (kindVariant)
	nextID   int64       // id of the next new part: ids are max(id)+1, as SQLite assigns them
}

// Bulk-load tuning. Offers of new parts, and new parts of an import into
// an empty catalog, are inserted bulkBatch at a time through one
// INSERT … SELECT from a virtual table over the batch (bulkrows.go).
//
// The secondary indexes of parts stay in place during an import. Dropping
// them for a bulk load and building them again before the commit cost
// more on the synthetic catalog of the scale benchmark (1,000,000 new
// parts: 45 s of CPU on the writing side against 41 s), because each
// CREATE INDEX scans the whole new table back out of the WAL (8 partial
// indexes, some 700,000 page reads, 9.5 s), while keeping them costs a
// b-tree insert into one to three small indexes per part, which stay in
// the page cache (under 1,000 cache misses for the whole import). With
// narrower rows the rebuild is cheaper (500,000 test parts of genParts:
// 16 to 19 s against 21 to 22 s), so the balance depends on the rows.
const (
	offerCols = 8    // values per offer of a new part; the source id is written into the statement
	bulkBatch = 2048 // rows per INSERT … SELECT
	linkBatch = 50000
	ctxEvery  = 1024
)

// BeginImport starts the transaction of one import from src (label, file,
// hash). Only one import runs at a time; a second waits (busy timeout) or
// fails with a clear message.
//
// The source is recorded by label: importing under an existing label
// updates that source's record. src.Time defaults to now.
func (s *Store) BeginImport(ctx context.Context, src Source) (*ImportTx, error) {
	src.Label = strings.TrimSpace(src.Label)
	if src.Label == "" {
		return nil, errors.New("an import needs a source label")
	}
	if src.Time.IsZero() {
		src.Time = time.Now()
	}
	busy := func(err error) error {
		if isBusy(err) {
			return fmt.Errorf("another import is writing to catalog %s; try again when it finishes", s.Path)
		}
		return s.beginErr(err)
	}
	conn, err := s.db.Conn(ctx)
	if err != nil {
		return nil, busy(err)
	}
	t := &ImportTx{s: s, ctx: ctx, conn: conn, src: src, now: src.Time.Unix()}
	// Foreign keys are not checked during the import: every offer and
	// provenance row it writes points at a part it inserted or found, and
	// at its own source, in the same transaction (catalog check runs
	// foreign_key_check). The check costs a parent look-up per row.
	// The pragma cannot change inside a transaction, so it is set before
	// BEGIN and restored after the end.
	if _, err := conn.ExecContext(ctx, `PRAGMA foreign_keys = OFF`); err != nil {
		t.release()
		return nil, busy(err)
	}
	t.restore = append(t.restore, `PRAGMA foreign_keys = ON`)
	// The transaction does not watch ctx: database/sql would roll it back
	// from another goroutine when ctx ends and keep the connection, and
	// the statements the import runs on the connection directly would
	// then each commit on their own. The import checks ctx itself
	// (PutPrepared, Commit) and its caller rolls back.
	if t.tx, err = conn.BeginTx(context.WithoutCancel(ctx), nil); err != nil { // BEGIN IMMEDIATE (_txlock)
		t.release()
		return nil, busy(err)
	}
	if err := t.prepare(); err != nil {
		t.tx.Rollback()
		t.release()
		return nil, busy(err)
	}
	return t, nil
}

func (s *Store) beginErr(err error) error {
	if why := storageTrouble(err); why != "" {
		return fmt.Errorf("catalog %s: cannot start the import: %s (%w)", s.Path, why, err)
	}
	return fmt.Errorf("catalog %s: cannot start the import: %w", s.Path, err)
}

// release closes the driver statements and gives the connection back to
// the pool with its pragmas restored. A connection that cannot be restored
// is discarded, and so is one still inside a transaction (a COMMIT that
// failed may leave it open), where the pragma would do nothing.
func (t *ImportTx) release() {
	if t.conn == nil {
		return
	}
	bg := context.Background()
	if len(t.raw) > 0 {
		t.conn.Raw(func(any) error {
			for _, st := range t.raw {
				st.Close()
			}
			return nil
		})
		t.raw = nil
	}
	// a connection that keeps a batch table is not given back: the
	// table's batch is gone
	ok := t.dropBatch(&t.newOffers)
	if t.bulk != nil {
		ok = t.dropBatch(&t.bulk.parts) && ok
		t.bulk = nil
	}
	for _, q := range t.restore {
		if !ok {
			break
		}
		if _, err := t.conn.ExecContext(bg, q); err != nil {
			ok = false
		}
	}
	var fk int
	if ok && (t.conn.QueryRowContext(bg, `PRAGMA foreign_keys`).Scan(&fk) != nil || fk != 1) {
		ok = false
	}
	if !ok {
		t.conn.Raw(func(any) error { return driver.ErrBadConn })
	}
	t.conn.Close()
	t.conn = nil
}

func (t *ImportTx) prepare() error {
	ctx := t.ctx
	var err error
	if t.prevGen, err = generation(ctx, t.tx); err != nil {
		return err
	}
	err = t.tx.QueryRowContext(ctx, `INSERT INTO sources(label, file, sha256, time) VALUES (?, ?, ?, ?)
		ON CONFLICT(label) DO UPDATE SET label = excluded.label RETURNING id`,
		t.src.Label, t.src.File, t.src.SHA256, t.src.Time.UTC().Format(time.RFC3339Nano)).Scan(&t.srcID)
	if err != nil {
		return err
	}
	if err = t.tx.QueryRowContext(ctx, `SELECT coalesce(max(id), 0) FROM parts`).Scan(&t.partsAtBegin); err != nil {
		return err
	}
	t.linkedTo = t.partsAtBegin
	var sets strings.Builder
	for i, f := range Fields {
		if i > 0 {
			sets.WriteString(", ")
		}
		sets.WriteString(`"` + colName(f.Name) + `" = ?`)
	}
	prep := func(dst **sql.Stmt, q string) {
		if err != nil {
			return
		}
		*dst, err = t.tx.PrepareContext(ctx, q)
	}
	prep(&t.selPart, `SELECT parts.id, `+partJSON()+` FROM parts WHERE mpn_key = ? AND mfr_key = ?`)
	prep(&t.updPart, `UPDATE parts SET `+sets.String()+`, updated = ? WHERE id = ?`)
	prep(&t.linkMany, `INSERT OR IGNORE INTO part_sources(part_id, source_id) SELECT value, ? FROM json_each(?)`)
	prep(&t.linkRange, `INSERT OR IGNORE INTO part_sources(part_id, source_id) SELECT id, ?1 FROM parts WHERE id > ?2 AND id <= ?3`)
	prep(&t.selOffers, `SELECT json_group_array(json_array(id, supplier, supplier_key, sku, stock, moq, currency, breaks, source_id)) FROM offers WHERE part_id = ?`)
	prep(&t.insOffer, `INSERT INTO offers(part_id, supplier, supplier_key, sku, stock, moq, currency, breaks, source_id) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`)
	prep(&t.updOffer, `UPDATE offers SET stock = ?, moq = ?, currency = ?, breaks = ?, source_id = ? WHERE id = ?`)
	prep(&t.setOfferSrc, `UPDATE offers SET source_id = ? WHERE id = ?`)
	if err != nil {
		return err
	}
	t.args = make([]any, 0, len(Fields)+4)
	t.insPart = map[string]driver.Stmt{}
	t.newRange = true
	srcID := strconv.FormatInt(t.srcID, 10)
	t.newOffers = batchInsert{batch: rowBatch{ncol: offerCols}, sql: func(table string, _ int) string {
		return `INSERT OR FAIL INTO offers(part_id, supplier, supplier_key, sku, stock, moq, currency, breaks, source_id)
			SELECT c0, c1, c2, c3, c4, c5, c6, c7, ` + srcID + ` FROM ` + table
	}}
	// empty: no part at all (max(id) = 0 would also hold for a table
	// whose ids were all set to zero or below from outside)
	var hasParts bool
	if err = t.tx.QueryRowContext(ctx, `SELECT EXISTS (SELECT 1 FROM parts)`).Scan(&hasParts); err != nil {
		return err
	}
	if !hasParts && bulkImports {
		t.startBulk(newKeyFilter(), 1)
	}
	return nil
}

// startBulk turns the batched writing of new parts on, with a filter that
// holds every key in the catalog and the id the next new part gets.
func (t *ImportTx) startBulk(f *keyFilter, nextID int64) {
	now := strconv.FormatInt(t.now, 10)
	t.bulk = &bulkRows{filter: f, nextID: nextID, parts: batchInsert{batch: rowBatch{ncol: 3 + len(Fields)}, sql: func(table string, variant int) string {
		// The ids are not written: an id given in the statement makes
		// SQLite check it is an integer, and that check may abort the
		// statement half way, so SQLite keeps a statement journal (a
		// copy of every page the statement changes: 8 of 32 s at a
		// million parts). SQLite gives each row max(id)+1 in the order
		// the table yields them, which is the ids handed out; flushBulk
		// checks the last one.
		// Variant v > 0 names only the fields of kind Kinds[v-1]: the
		// others are NULL in its rows, and every column named costs a
		// call from SQLite into the batch's cursor per row.
		// Its rows are all of that kind, so the kind is a literal of the
		// statement rather than a value the cursor hands over (a text
		// value costs two copies into C memory).
		var cols, sel strings.Builder
		for i, f := range Fields {
			if variant > 0 && !f.AppliesTo(Kinds[variant-1]) {
				continue
			}
			cols.WriteString(`, "` + colName(f.Name) + `"`)
			if variant > 0 && i == kindField {
				sel.WriteString(", '" + strings.ReplaceAll(string(Kinds[variant-1]), "'", "''") + "'")
				continue
			}
			sel.WriteString(", c" + strconv.Itoa(3+i))
		}
		return `INSERT OR FAIL INTO parts(mfr_key, mpn_key` + cols.String() + `, created, updated)
				SELECT c1, c2` + sel.String() + `, ` + now + `, ` + now + ` FROM ` + table
	}}}
}

// bulkAfter is the least run of new parts, one after the other, after
// which an import into a catalog that had parts turns the batched writing
// on: one batch's worth (a variable for tests). The filter then needs
// every key of the catalog, read from the key index (about a microsecond
// a part, against some 7 µs a part saved): the run must also be at least
// an eighth of the parts the catalog had, so that the parts added so far
// would have paid for the read, which new parts still to come then repay.
var bulkAfter = bulkBatch

// maybeStartBulk turns the batched writing on after a long enough run of
// new parts (see bulkAfter).
func (t *ImportTx) maybeStartBulk() error {
	if t.bulk != nil || !bulkImports || t.newRun < max(bulkAfter, int(t.partsAtBegin/8)) {
		return nil
	}
	f := newKeyFilter()
	rows, err := t.tx.QueryContext(t.ctx, `SELECT mpn_key, mfr_key FROM parts`)
	if err != nil {
		return err
	}
	defer rows.Close()
	var pk, mk string
	for rows.Next() {
		if err := rows.Scan(&pk, &mk); err != nil {
			return err
		}
		f.add(pk, mk)
	}
	if err := rows.Err(); err != nil {
		return err
	}
	// the run's last part got max(id)+1 from SQLite: the next id follows
	// it (flushBulk checks the ids)
	t.startBulk(f, t.lastNew+1)
	return nil
}

// bulkImports turns the batched writing of new parts on (a variable so
// that a test can compare both paths).
var bulkImports = true

// bulkAdd queues the new part pp (its key is certainly not in the
// catalog) for the next batch write.
func (t *ImportTx) bulkAdd(pp *Prepared) (Outcome, []Change, error) {
	b := t.bulk
	id := b.nextID
	b.nextID++
	b.parts.batch.vals = append(append(append(b.parts.batch.vals, id), pp.keyVals[:]...), pp.row...)
	b.variants = append(b.variants, pp.variant)
	b.filter.addHash(pp.hash)
	if err := t.noteNew(id, pp.offers); err != nil {
		return 0, nil, t.fail(err)
	}
	if b.parts.batch.len() >= bulkBatch {
		if err := t.flushBulk(); err != nil {
			return 0, nil, t.fail(err)
		}
	}
	t.lastFound = false
	return Added, nil, nil
}

// flushBulk writes the queued new parts: one statement per run of parts
// of one variant (kindVariant), each checked for the ids it was to give.
func (t *ImportTx) flushBulk() error {
	b := t.bulk
	if b == nil {
		return nil
	}
	bt := &b.parts.batch
	n := bt.len()
	if n == 0 {
		return nil
	}
	defer func() { bt.lo, bt.hi = 0, 0 }()
	for lo := 0; lo < n; {
		v := b.variants[lo]
		hi := lo + 1
		for hi < n && b.variants[hi] == v {
			hi++
		}
		st, err := t.batchStmt(&b.parts, int(v))
		if err != nil {
			return err
		}
		bt.lo, bt.hi = lo, hi
		res, err := t.rawExec(st, nil)
		if err != nil {
			return err
		}
		added, err := res.RowsAffected()
		if err != nil {
			return err
		}
		last, err := res.LastInsertId()
		if err != nil {
			return err
		}
		if want := bt.vals[(hi-1)*bt.ncol].(int64); added != int64(hi-lo) || last != want {
			return fmt.Errorf("internal error: rows %d–%d of a batch (statement variant %d): %d new parts written with last id %d, expected %d with last id %d", lo, hi-1, v, added, last, hi-lo, want)
		}
		lo = hi
	}
	b.parts.reset()
	b.variants = b.variants[:0]
	return t.linkNew(b.nextID - 1)
}

// linkNew links the parts added with ids up to last to the source. Every
// part with an id above partsAtBegin was added by this import (ids are
// max+1 and the import holds the write lock), so the links of a flushed
// batch, and of any part the row path added before it, come from a range
// of ids, read from table pages the batch has just written; at a million
// parts that was 0.7 s after the last row, with the reading goroutine
// idle, when all the links were written by Commit.
func (t *ImportTx) linkNew(last int64) error {
	if last <= t.linkedTo {
		return nil
	}
	if _, err := t.linkRange.ExecContext(rowCtx, t.srcID, t.linkedTo, last); err != nil {
		return err
	}
	t.linkedTo = last
	return nil
}

// kindField is the index of the kind in a row.
var kindField = fieldIndex["kind"]

// kindVariant is the statement variant that writes row (see startBulk):
// 1 + the index of its kind in Kinds when every field that does not apply
// to the kind is NULL (as Prepare makes it), else 0, which names every
// field, so that no value can be left out.
func kindVariant(r row) uint8 {
	k, _ := r[kindField].(string)
	for v, kind := range Kinds {
		if string(kind) != k {
			continue
		}
		for _, i := range notOfKind[v] {
			if r[i] != nil {
				return 0
			}
		}
		return uint8(v + 1)
	}
	return 0
}

// notOfKind lists, for each kind of Kinds, the fields that do not apply
// to it.
var notOfKind = func() [][]int {
	out := make([][]int, len(Kinds))
	for v, k := range Kinds {
		for i, f := range Fields {
			if !f.AppliesTo(k) {
				out[v] = append(out[v], i)
			}
		}
	}
	return out
}()

// rawPrepare prepares q on the import's connection at the driver level.
func (t *ImportTx) rawPrepare(q string) (driver.Stmt, error) {
	var st driver.Stmt
	err := t.conn.Raw(func(dc any) error {
		pc, ok := dc.(driver.ConnPrepareContext)
		if !ok {
			return fmt.Errorf("the SQLite driver (%T) cannot prepare statements with a context", dc)
		}
		var err error
		st, err = pc.PrepareContext(t.ctx, q)
		return err
	})
	if err != nil {
		return nil, err
	}
	if _, ok := st.(driver.StmtExecContext); !ok {
		st.Close()
		return nil, fmt.Errorf("the SQLite driver's statements (%T) cannot run with a context", st)
	}
	t.raw = append(t.raw, st)
	return st, nil
}

// rowCtx is the context of the statements run for each row. The import's
// own context is checked between rows instead (PutPrepared): the driver
// watches a cancellable context with a goroutine per statement.
var rowCtx = context.Background()

// rawExec runs a statement of rawPrepare. The values in args are driver
// values already (nil, int64, float64, string).
func (t *ImportTx) rawExec(st driver.Stmt, args []driver.NamedValue) (res driver.Result, err error) {
	err = t.conn.Raw(func(any) error {
		res, err = st.(driver.StmtExecContext).ExecContext(rowCtx, args)
		return err
	})
	return res, err
}

// appendArg appends v as the next positional driver argument.
func appendArg(args []driver.NamedValue, v any) []driver.NamedValue {
	return append(args, driver.NamedValue{Ordinal: len(args) + 1, Value: v})
}

// insertStmt returns the INSERT for the fields present in pp (its
// mask). Writing only the present columns halves the cost of an insert
// (most fields of a part belong to other kinds); a file uses a handful of
// column sets. The import time is written into the statement: constants
// cost nothing per row, a bound value a call into SQLite.
func (t *ImportTx) insertStmt(pp *Prepared) (driver.Stmt, error) {
	pp.insertArgs()
	if st := t.insPart[string(pp.buf)]; st != nil {
		return st, nil
	}
	var cols, marks strings.Builder
	for i, f := range Fields {
		if pp.row[i] != nil {
			cols.WriteString(`, "` + colName(f.Name) + `"`)
			marks.WriteString(", ?")
		}
	}
	now := strconv.FormatInt(t.now, 10)
	st, err := t.rawPrepare(`INSERT INTO parts(mfr_key, mpn_key` + cols.String() + `, created, updated) VALUES (?, ?` + marks.String() + `, ` + now + `, ` + now + `)
		ON CONFLICT (mpn_key, mfr_key) DO NOTHING`)
	if err != nil {
		return nil, err
	}
	t.insPart[string(pp.buf)] = st
	return st, nil
}

var errFinished = errors.New("the import is already committed or rolled back")

// ErrInvalidPart is matched (errors.Is) by the errors Put returns for a
// part it refuses before writing anything: the caller can report the row
// and go on. Other Put errors are database failures that end the import.
var ErrInvalidPart = errors.New("invalid part")

type invalidPart struct{ err error }

func (e invalidPart) Error() string        { return e.err.Error() }
func (e invalidPart) Unwrap() error        { return e.err }
func (e invalidPart) Is(target error) bool { return target == ErrInvalidPart }

// textFields are the fields the text index holds; a change to one of them
// re-indexes the part.
var textFields = map[string]bool{"kind": true, "type": true, "mfr": true, "mpn": true, "desc": true, "package": true}

// Prepared is a part checked and put in the store's form by a Preparer,
// ready for ImportTx.PutPrepared. Its buffers are reused by the next
// Prepare into it.
type Prepared struct {
	mk, pk  string
	row     row
	offers  []offerRow
	ins     []driver.NamedValue // the row path's INSERT arguments (insertArgs)
	buf     []byte
	variant uint8   // statement variant of a batched write (kindVariant)
	hash    keyHash // of (pk, mk), for the batched writes' key filter
	keyVals [2]any  // mk, pk as driver values, boxed on the reading goroutine
}

// A Preparer checks parts for an import ahead of the writes, so that an
// importer can do that work on another goroutine than the one writing
// (ImportTx.PutPrepared). A Preparer is used from one goroutine; it keeps
// a small memo of supplier keys.
type Preparer struct {
	supKey map[string]string // supplier name -> NormKey
}

// Prepare checks p as Put does and writes its store form into dst,
// reusing dst's buffers. A part the catalog refuses gives an error
// matching ErrInvalidPart (see Put).
func (pr *Preparer) Prepare(p *Part, dst *Prepared) error {
	mk, pk := normKey(p.Mfr), normKey(p.MPN)
	nr, err := partRowInto(p, dst.row, mk, pk)
	if err != nil {
		return invalidPart{err}
	}
	dst.row = nr
	offers, err := pr.normOffers(p, dst.offers[:0])
	if err != nil {
		return invalidPart{err}
	}
	dst.offers = offers
	dst.mk, dst.pk = mk, pk
	dst.ins = dst.ins[:0] // built by insertArgs when the part takes the row path
	dst.variant = kindVariant(nr)
	dst.hash = hashKey(pk, mk)
	dst.keyVals = [2]any{mk, pk}
	return nil
}

// insertArgs fills pp.buf with the mask of the fields present in pp (one
// byte each, which INSERT to use) and pp.ins with that INSERT's
// arguments: mk, pk, the present values. Only a part written by the row
// path needs them (a batched part does not), so the writer builds them
// there.
func (pp *Prepared) insertArgs() {
	pp.buf = pp.buf[:0]
	a := appendArg(appendArg(pp.ins[:0], pp.mk), pp.pk)
	for _, v := range pp.row {
		if v == nil {
			pp.buf = append(pp.buf, '0')
			continue
		}
		pp.buf = append(pp.buf, '1')
		a = appendArg(a, v)
	}
	pp.ins = a
}

// Put inserts or updates p and its offers (p.Offers, matched on supplier
// and SKU). It returns Unchanged when nothing differs, Updated with the list
// of changed fields otherwise.
//
// The part is found by (NormKey(Mfr), NormKey(MPN)). A field absent from p
// never erases a stored value (a sheet without that column keeps what the
// catalog knows); a present value that differs replaces it and is listed.
// When the kind changes, stored fields that do not apply to the new kind
// are cleared and listed. The stored spelling of Mfr and MPN is kept.
// Offers merge the same way: stock, MOQ, currency and price breaks given
// in p replace stored ones; an offer belongs to the last source that wrote
// it.
//
// An invalid part (empty manufacturer or part number, unknown kind, type
// or enum word, non-finite number, field that does not apply to the kind,
// bad offer) returns an error matching ErrInvalidPart before anything is
// written: the import can go on with the next part.
func (t *ImportTx) Put(p *Part) (Outcome, []Change, error) {
	if t.done {
		return 0, nil, errFinished
	}
	if err := t.prep.Prepare(p, &t.cur); err != nil {
		return 0, nil, err
	}
	return t.PutPrepared(&t.cur)
}

// PutPrepared is Put of a part checked by a Preparer (any Preparer, on any
// goroutine). The part must not change between Prepare and PutPrepared;
// PutPrepared writes into pp (the row path's arguments), so nothing else
// may read or write pp meanwhile; pp may be reused once it returns.
func (t *ImportTx) PutPrepared(pp *Prepared) (Outcome, []Change, error) {
	if t.done {
		return 0, nil, errFinished
	}
	if t.puts++; t.puts%ctxEvery == 0 {
		if err := t.ctx.Err(); err != nil {
			return 0, nil, t.fail(err)
		}
	}
	nr, offers, mk, pk := pp.row, pp.offers, pp.mk, pp.pk
	if t.bulk != nil {
		if !t.bulk.filter.mayHaveHash(pp.hash) {
			return t.bulkAdd(pp)
		}
		if err := t.flushBulk(); err != nil {
			return 0, nil, t.fail(err)
		}
	}
	// A new part costs one INSERT; an existing one a lookup. Which to try
	// first follows the previous Put: a new file is mostly new parts, a
	// re-import mostly known ones, and the wrong guess costs one statement.
	var id int64
	var old row
	found := false
	var err error
	if t.lastFound {
		if id, old, found, err = t.lookup(pk, mk); err != nil {
			return 0, nil, err
		}
	}
	if !found {
		o, err := t.insert(pp)
		if err != nil || o == Added {
			t.lastFound = false
			if err == nil {
				t.newRun++
				if err := t.maybeStartBulk(); err != nil {
					return 0, nil, t.fail(err)
				}
			}
			return o, nil, err
		}
		if id, old, found, err = t.lookup(pk, mk); err != nil {
			return 0, nil, err
		}
		if !found {
			return 0, nil, t.fail(fmt.Errorf("part %v %v neither inserted nor found", nr[fieldIndex["mfr"]], nr[fieldIndex["mpn"]]))
		}
	}
	t.lastFound = true
	t.newRun = 0
	merged, changes := mergeRows(old, nr)
	mfr, mpn := old[fieldIndex["mfr"]].(string), old[fieldIndex["mpn"]].(string)
	for i := range changes {
		changes[i].Mfr, changes[i].MPN = mfr, mpn
	}
	if len(changes) > 0 {
		t.args = append(t.args[:0], merged...)
		t.args = append(t.args, t.now, id)
		if _, err := t.updPart.ExecContext(rowCtx, t.args...); err != nil {
			return 0, nil, t.fail(err)
		}
		for _, c := range changes {
			if textFields[c.Field] {
				t.textIDs = append(t.textIDs, id)
				break
			}
		}
	}
	t.linkIDs = append(t.linkIDs, id)
	if len(offers) > 0 {
		oc, err := t.mergeOffers(id, offers)
		if err != nil {
			return 0, nil, t.fail(err)
		}
		for i := range oc {
			oc[i].Mfr, oc[i].MPN = mfr, mpn
		}
		changes = append(changes, oc...)
	}
	if len(changes) == 0 {
		t.unchanged++
		return Unchanged, nil, nil
	}
	t.updated++
	t.dirty = true
	return Updated, changes, nil
}

func (t *ImportTx) fail(err error) error {
	if why := storageTrouble(err); why != "" {
		// the caller rolls the import back: say that nothing of it stays
		return fmt.Errorf("catalog %s: %s (%w); nothing of this import was written", t.s.Path, why, err)
	}
	return fmt.Errorf("catalog %s: %w", t.s.Path, err)
}

// lookup reads the stored row of the part with keys pk, mk.
func (t *ImportTx) lookup(pk, mk string) (id int64, old row, found bool, err error) {
	if t.newOffers.batch.len() > 0 {
		// the part may be new in this import with its offers still buffered
		if err := t.flushNewOffers(); err != nil {
			return 0, nil, false, t.fail(err)
		}
	}
	var js string
	err = t.selPart.QueryRowContext(rowCtx, pk, mk).Scan(&id, &js)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, nil, false, nil
	}
	if err != nil {
		return 0, nil, false, t.fail(err)
	}
	if old, err = jsonRow(js); err != nil {
		return 0, nil, false, t.fail(fmt.Errorf("part %d: %w", id, err))
	}
	return id, old, true, nil
}

// insert adds the part when its identity is new and returns Added; it
// returns Unchanged (nothing written) when the part exists.
func (t *ImportTx) insert(pp *Prepared) (Outcome, error) {
	st, err := t.insertStmt(pp)
	if err != nil {
		return 0, t.fail(err)
	}
	offers := pp.offers
	res, err := t.rawExec(st, pp.ins)
	if err != nil {
		return 0, t.fail(err)
	}
	if n, err := res.RowsAffected(); err != nil || n == 0 {
		return Unchanged, err
	}
	id, err := res.LastInsertId()
	if err != nil {
		return 0, t.fail(err)
	}
	if b := t.bulk; b != nil {
		b.filter.add(pp.pk, pp.mk)
		b.nextID = id + 1
	}
	if err := t.noteNew(id, offers); err != nil {
		return 0, t.fail(err)
	}
	return Added, nil
}

// noteNew records the part id just added with its offers: the offers are
// queued for a batched insert (written when a batch is full), the id for
// the provenance links and the text index.
func (t *ImportTx) noteNew(id int64, offers []offerRow) error {
	switch {
	case t.firstNew == 0:
		t.firstNew = id
	case id != t.lastNew+1:
		t.newRange = false
	}
	t.lastNew = id
	for i := range offers {
		o := &offers[i]
		if dupOffer(offers[:i], o) {
			continue // the first of two offers with one supplier and SKU wins
		}
		t.newOffers.batch.vals = append(append(t.newOffers.batch.vals, id), o.values()...)
	}
	t.added++
	t.dirty = true
	t.textIDs = append(t.textIDs, id)
	if t.newOffers.batch.len() >= bulkBatch {
		return t.flushNewOffers()
	}
	return nil
}

func dupOffer(before []offerRow, o *offerRow) bool {
	for i := range before {
		if before[i].supKey == o.supKey && before[i].sku == o.sku {
			return true
		}
	}
	return false
}

// flushNewOffers inserts the buffered offers of new parts.
func (t *ImportTx) flushNewOffers() error {
	_, err := t.flushBatch(&t.newOffers)
	return err
}

// mergeRows merges the new row nr over the stored row old: present values
// replace, absent ones keep. It returns the merged row and the changes
// (Mfr and MPN not yet filled).
func mergeRows(old, nr row) (row, []Change) {
	merged := make(row, len(old))
	var changes []Change
	for i := range Fields {
		merged[i] = old[i]
		if nr[i] != nil && !sameValue(old[i], nr[i]) {
			merged[i] = nr[i]
			f := &Fields[i]
			if f.Name == "mfr" || f.Name == "mpn" {
				// same key, other spelling: keep the stored one
				merged[i] = old[i]
				continue
			}
			changes = append(changes, Change{Field: f.Name, Old: formatValue(f, old[i]), New: formatValue(f, nr[i])})
		}
	}
	ki := fieldIndex["kind"]
	if merged[ki] != old[ki] {
		kind := Kind(merged[ki].(string))
		for i := range Fields {
			f := &Fields[i]
			if merged[i] == nil || nr[i] != nil {
				continue
			}
			drop := !f.AppliesTo(kind)
			if f.Name == "type" {
				_, ok := canonEnum(&Field{Enum: Types[kind]}, merged[i].(string))
				drop = !ok
			}
			if drop {
				changes = append(changes, Change{Field: f.Name, Old: formatValue(f, merged[i])})
				merged[i] = nil
			}
		}
	}
	return merged, changes
}

// offerRow is a validated offer.
type offerRow struct {
	supplier, supKey, sku string
	stock                 *int64
	moq                   int64
	currency              string
	breaks                string // canonical JSON, "" when none given
	// vals are the batched insert's values after the part id, as
	// driver values (see batchVals): boxed by Prepare on the reading
	// goroutine rather than by the writer.
	vals [offerCols - 1]any
}

// batchVals sets o.vals from its fields. Prepare sets them; values sets
// them for an offer made otherwise.
func (o *offerRow) batchVals() {
	br := o.breaks
	if br == "" {
		br = "[]"
	}
	var stock any
	if o.stock != nil {
		stock = *o.stock
	}
	o.vals = [offerCols - 1]any{o.supplier, o.supKey, o.sku, stock, o.moq, o.currency, br}
}

// values returns o.vals, setting them first if nothing has.
func (o *offerRow) values() []any {
	if o.vals[0] == nil {
		o.batchVals()
	}
	return o.vals[:]
}

func (o *offerRow) label() string {
	if o.sku == "" {
		return "offer " + o.supplier
	}
	return "offer " + o.supplier + "/" + o.sku
}

// normOffers validates the offers of p, appending them to out.
func (pr *Preparer) normOffers(p *Part, out []offerRow) ([]offerRow, error) {
	if pr.supKey == nil {
		pr.supKey = map[string]string{}
	}
	for i, o := range p.Offers {
		who := func() string {
			return fmt.Sprintf("part %s %s: offer %d", strings.TrimSpace(p.Mfr), strings.TrimSpace(p.MPN), i+1)
		}
		r := offerRow{supplier: strings.TrimSpace(o.Supplier), sku: strings.TrimSpace(o.SKU),
			moq: o.MOQ, currency: strings.ToUpper(strings.TrimSpace(o.Currency))}
		key, ok := pr.supKey[r.supplier]
		if !ok {
			key = normKey(r.supplier)
			if len(pr.supKey) < 1000 {
				pr.supKey[r.supplier] = key
			}
		}
		r.supKey = key
		if r.supKey == "" {
			return nil, fmt.Errorf("%s has no supplier", who())
		}
		if o.Stock != nil {
			if *o.Stock < 0 {
				return nil, fmt.Errorf("%s: stock %d is negative", who(), *o.Stock)
			}
			v := *o.Stock
			r.stock = &v
		}
		if o.MOQ < 0 {
			return nil, fmt.Errorf("%s: MOQ %d is negative", who(), o.MOQ)
		}
		if len(o.Breaks) > 0 {
			s, err := encodeBreaks(o.Breaks)
			if err != nil {
				return nil, fmt.Errorf("%s: %v", who(), err)
			}
			r.breaks = s
		}
		r.batchVals()
		out = append(out, r)
	}
	return out, nil
}

// encodeBreaks validates price breaks and writes them as canonical JSON
// [[qty, price], ...] in ascending quantity.
// Breaks already in ascending quantity (as importers give them) are
// neither copied nor sorted, and the text is built in a stack buffer.
func encodeBreaks(bs []PriceBreak) (string, error) {
	s := bs
	if !slices.IsSortedFunc(bs, ByQty) {
		s = append([]PriceBreak(nil), bs...)
		slices.SortStableFunc(s, ByQty)
	}
	var buf [96]byte
	b := append(buf[:0], '[')
	for i, x := range s {
		if x.Qty < 1 {
			return "", fmt.Errorf("price break quantity %d is less than 1", x.Qty)
		}
		if math.IsNaN(x.Price) || math.IsInf(x.Price, 0) || x.Price < 0 {
			return "", fmt.Errorf("price %v at quantity %d is not a price", x.Price, x.Qty)
		}
		if i > 0 && s[i-1].Qty == x.Qty {
			if s[i-1].Price != x.Price {
				return "", fmt.Errorf("price break quantity %d is given twice with different prices", x.Qty)
			}
			continue
		}
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, '[')
		b = strconv.AppendInt(b, x.Qty, 10)
		b = append(b, ',')
		b = strconv.AppendFloat(b, x.Price, 'g', -1, 64)
		b = append(b, ']')
	}
	return string(append(b, ']')), nil
}

func decodeBreaks(s string) ([]PriceBreak, error) {
	var raw [][2]float64
	if err := json.Unmarshal([]byte(s), &raw); err != nil {
		return nil, err
	}
	if len(raw) == 0 {
		return nil, nil
	}
	out := make([]PriceBreak, len(raw))
	for i, x := range raw {
		out[i] = PriceBreak{Qty: int64(x[0]), Price: x[1]}
	}
	return out, nil
}

// breaksText is the display text of canonical breaks: "1: 0.12, 100: 0.08".
func breaksText(s string) string {
	bs, err := decodeBreaks(s)
	if err != nil {
		return s
	}
	parts := make([]string, len(bs))
	for i, b := range bs {
		parts[i] = strconv.FormatInt(b.Qty, 10) + ": " + strconv.FormatFloat(b.Price, 'g', -1, 64)
	}
	return strings.Join(parts, ", ")
}

func (t *ImportTx) insertOffer(partID int64, o *offerRow) error {
	args := append(append(append(make([]any, 0, offerCols+1), partID), o.values()...), t.srcID)
	_, err := t.insOffer.ExecContext(rowCtx, args...)
	return err
}

type storedOffer struct {
	id       int64
	supplier string
	stock    sql.NullInt64
	moq      int64
	currency string
	breaks   string
	source   sql.NullInt64
}

// mergeOffers merges offers into the stored offers of part id.
func (t *ImportTx) mergeOffers(id int64, offers []offerRow) ([]Change, error) {
	var js string
	if err := t.selOffers.QueryRowContext(rowCtx, id).Scan(&js); err != nil {
		return nil, err
	}
	v, err := parseJSON(js)
	raw, ok := v.([]any)
	if err != nil || !ok {
		return nil, fmt.Errorf("offers of part %d: %v", id, err)
	}
	stored := make(map[[2]string]*storedOffer, len(raw))
	for _, x := range raw {
		r, ok := x.([]any)
		if !ok || len(r) != 9 {
			return nil, fmt.Errorf("offers of part %d: bad row", id)
		}
		so := &storedOffer{id: jsonInt(r[0]).Int64, supplier: jsonStr(r[1]), stock: jsonInt(r[4]),
			moq: jsonInt(r[5]).Int64, currency: jsonStr(r[6]), breaks: jsonStr(r[7]), source: jsonInt(r[8])}
		stored[[2]string{jsonStr(r[2]), jsonStr(r[3])}] = so
	}
	var changes []Change
	for i := range offers {
		o := &offers[i]
		so := stored[[2]string{o.supKey, o.sku}]
		if so == nil {
			if err := t.insertOffer(id, o); err != nil {
				return nil, err
			}
			changes = append(changes, Change{Field: o.label(), New: "added"})
			continue
		}
		var ch []Change
		lbl := "offer " + so.supplier
		if o.sku != "" {
			lbl += "/" + o.sku
		}
		stock := so.stock
		if o.stock != nil && (!so.stock.Valid || so.stock.Int64 != *o.stock) {
			ch = append(ch, Change{Field: lbl + " stock", Old: nullIntText(so.stock), New: strconv.FormatInt(*o.stock, 10)})
			stock = sql.NullInt64{Int64: *o.stock, Valid: true}
		}
		moq := so.moq
		if o.moq != 0 && o.moq != so.moq {
			ch = append(ch, Change{Field: lbl + " moq", Old: intText(so.moq), New: strconv.FormatInt(o.moq, 10)})
			moq = o.moq
		}
		cur := so.currency
		if o.currency != "" && o.currency != so.currency {
			ch = append(ch, Change{Field: lbl + " currency", Old: so.currency, New: o.currency})
			cur = o.currency
		}
		br := so.breaks
		if o.breaks != "" && o.breaks != so.breaks {
			ch = append(ch, Change{Field: lbl + " price_breaks", Old: breaksText(so.breaks), New: breaksText(o.breaks)})
			br = o.breaks
		}
		switch {
		case len(ch) > 0:
			var sv any
			if stock.Valid {
				sv = stock.Int64
			}
			if _, err := t.updOffer.ExecContext(rowCtx, sv, moq, cur, br, t.srcID, so.id); err != nil {
				return nil, err
			}
			// a later offer in the same Put sees the merged values
			so.stock, so.moq, so.currency, so.breaks = stock, moq, cur, br
			changes = append(changes, ch...)
		case !so.source.Valid || so.source.Int64 != t.srcID:
			if _, err := t.setOfferSrc.ExecContext(rowCtx, t.srcID, so.id); err != nil {
				return nil, err
			}
		}
		so.source = sql.NullInt64{Int64: t.srcID, Valid: true}
	}
	return changes, nil
}

func jsonStr(v any) string {
	s, _ := v.(string)
	return s
}

func jsonInt(v any) sql.NullInt64 {
	f, ok := v.(float64)
	return sql.NullInt64{Int64: int64(f), Valid: ok}
}

func nullIntText(v sql.NullInt64) string {
	if !v.Valid {
		return ""
	}
	return strconv.FormatInt(v.Int64, 10)
}

func intText(v int64) string {
	if v == 0 {
		return ""
	}
	return strconv.FormatInt(v, 10)
}

// Counts returns what the Puts so far did: Added, Updated, Unchanged.
func (t *ImportTx) Counts() Source {
	c := t.src
	c.Added, c.Updated, c.Unchanged = t.added, t.updated, t.unchanged
	return c
}

// Commit records the source with its counts, commits, then brings the text
// index up to date.
//
// The source record takes Read and Rejected from counts (and File and
// SHA256 when counts gives them); Added, Updated and Unchanged are the
// store's own tallies of the Puts. The catalog generation is incremented
// only when a part or offer changed, so re-importing the same file leaves
// the catalog (and its index) as it was. A failure to update the text
// index does not undo the commit: the index is then stale and is rebuilt
// on its next use.
func (t *ImportTx) Commit(counts Source) error {
	if t.done {
		return errFinished
	}
	t.done = true
	ctx := t.ctx
	if err := ctx.Err(); err != nil {
		t.abort()
		return t.fail(err)
	}
	if err := t.finish(); err != nil {
		t.abort()
		return t.fail(err)
	}
	newGen := t.prevGen
	if t.dirty {
		newGen++
		if err := setGeneration(ctx, t.tx, newGen); err != nil {
			t.abort()
			return t.fail(err)
		}
	}
	file, sha := t.src.File, t.src.SHA256
	if counts.File != "" {
		file = counts.File
	}
	if counts.SHA256 != "" {
		sha = counts.SHA256
	}
	read := counts.Read
	if read == 0 {
		read = t.added + t.updated + t.unchanged + counts.Rejected
	}
	_, err := t.tx.ExecContext(ctx, `UPDATE sources SET file = ?, sha256 = ?, time = ?, n_read = ?, n_added = ?, n_updated = ?, n_unchanged = ?, n_rejected = ? WHERE id = ?`,
		file, sha, t.src.Time.UTC().Format(time.RFC3339Nano), read, t.added, t.updated, t.unchanged, counts.Rejected, t.srcID)
	if err != nil {
		t.abort()
		return t.fail(err)
	}
	err = t.tx.Commit()
	t.release()
	if err != nil {
		if why := storageTrouble(err); why != "" {
			// a failed COMMIT leaves the catalog as it was before the import
			return fmt.Errorf("catalog %s: the import could not be committed: %s (%w); nothing of it was written", t.s.Path, why, err)
		}
		return fmt.Errorf("catalog %s: the import could not be committed: %w", t.s.Path, err)
	}
	if t.dirty {
		t.s.updateIndex(ctx, t.prevGen, newGen, t.textIDs, nil)
		t.s.refreshColumnsAfterChange(ctx)
	}
	return nil
}

// finish writes what Put buffered: offers of new parts and the provenance
// links.
func (t *ImportTx) finish() error {
	if err := t.flushBulk(); err != nil {
		return err
	}
	if err := t.flushNewOffers(); err != nil {
		return err
	}
	if t.firstNew > 0 && t.lastNew > t.linkedTo {
		// The parts added and not linked yet (see linkNew). When they
		// are one run of ids (as SQLite assigns them), the links come
		// from a counter instead of a scan of the new rows.
		if t.newRange && t.firstNew == t.partsAtBegin+1 {
			q := `WITH RECURSIVE n(id) AS (SELECT ?2 UNION ALL SELECT id + 1 FROM n WHERE id < ?3)
				INSERT OR IGNORE INTO part_sources(part_id, source_id) SELECT id, ?1 FROM n`
			if _, err := t.tx.ExecContext(t.ctx, q, t.srcID, t.linkedTo+1, t.lastNew); err != nil {
				return err
			}
			t.linkedTo = t.lastNew
		} else if err := t.linkNew(math.MaxInt64); err != nil { // every id above linkedTo
			return err
		}
	}
	for start := 0; start < len(t.linkIDs); start += linkBatch {
		end := min(start+linkBatch, len(t.linkIDs))
		if _, err := t.linkMany.ExecContext(t.ctx, t.srcID, idsJSON(t.linkIDs[start:end])); err != nil {
			return err
		}
	}
	return nil
}

// abort rolls the transaction back after a failure inside Commit.
func (t *ImportTx) abort() {
	t.tx.Rollback()
	t.release()
}

// Rollback abandons the import; the catalog is exactly as before. It is a
// no-op after Commit, so it can be deferred.
func (t *ImportTx) Rollback() error {
	if t.done {
		return nil
	}
	t.done = true
	err := t.tx.Rollback()
	t.release()
	return err
}

// SortKey returns the prepared part's identity key, its normalised part
// number and maker (NormKey), the order of the catalog's identity index,
// and its kind (canonical). A batch of new parts is written one statement
// per run of parts of one kind (see kindVariant), so a writer that puts a
// batch's parts in order of kind first keeps those runs long.
func (pp *Prepared) SortKey() (kind Kind, pk, mk string) {
	if len(pp.row) <= kindField {
		return "", pp.pk, pp.mk // not prepared
	}
	k, _ := pp.row[kindField].(string)
	return Kind(k), pp.pk, pp.mk
}
