package catalog

import (
	"context"
	"database/sql"
	"sort"
	"strings"
	"testing"
)

// dumpCatalog writes everything an import stores, except the import time
// (created, updated, sources.time), as sorted lines: parts with every
// column, offers, provenance and the source records.
func dumpCatalog(t *testing.T, s *Store) []string {
	t.Helper()
	var out []string
	q := func(label, query string) { out = append(out, rowLines(t, s, label, query)...) }
	q("part", `SELECT id, mfr_key, mpn_key, `+fieldColumns+` FROM parts`)
	q("offer", `SELECT id, part_id, supplier, supplier_key, sku, stock, moq, currency, breaks, source_id FROM offers`)
	q("link", `SELECT part_id, source_id FROM part_sources`)
	q("source", `SELECT id, label, file, sha256, n_read, n_added, n_updated, n_unchanged, n_rejected FROM sources`)
	sort.Strings(out)
	return out
}

func sameDump(t *testing.T, what string, got, want []string) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s: %d rows, want %d", what, len(got), len(want))
	}
	for i := range min(len(got), len(want)) {
		if got[i] != want[i] {
			t.Errorf("%s: row %d\n got %s\nwant %s", what, i, got[i], want[i])
			return
		}
	}
}

// bulkParts are 100 invented parts of every kind, then five of them again:
// one unchanged, one with a new value, one with a new offer, one with a
// changed price, one with a new kind.
func bulkParts() []*Part {
	ps := genParts(100, 21)
	again := func(i int) *Part {
		p := *ps[i]
		p.Num = map[string]float64{}
		for k, v := range ps[i].Num {
			p.Num[k] = v
		}
		p.Offers = append([]Offer(nil), ps[i].Offers...)
		return &p
	}
	same := again(3)
	val := again(10)
	if _, ok := val.Num["tjmax"]; ok {
		val.Num["tjmax"] = 175
	} else {
		val.Desc += " (revised)"
	}
	off := again(20)
	off.Offers = []Offer{offer("Second Source Ltd", "SS-20", 5, 1, "EUR", PriceBreak{1, 0.9})}
	price := again(30)
	price.Offers[0].Breaks = []PriceBreak{{1, 0.45}, {100, 0.25}}
	kind := part(Fuse, ps[40].Mfr, ps[40].MPN, "type", "T", "in", 2.0, "un_ac", 250.0)
	return append(ps, same, val, off, price, kind)
}

// An import in one transaction into an empty catalog (new parts and
// offers written in batches, provenance by id range) stores the same
// catalog as the parts imported one transaction each, which goes through
// the look-up path for every part met before; a repeat import changes
// nothing.
func TestBulkImportMatchesPartByPart(t *testing.T) {
	ctx := context.Background()
	ps := bulkParts()

	bulk := openTemp(t)
	outs, c := importAll(t, bulk, ps)
	if c.Added != 100 || c.Updated != 4 || c.Unchanged != 1 {
		t.Errorf("bulk counts %+v", c)
	}

	single := openTemp(t)
	for i, p := range ps {
		tx, err := single.BeginImport(ctx, Source{Label: "sheet", File: "sheet.csv", SHA256: "abc"})
		if err != nil {
			t.Fatal(err)
		}
		o, _, err := tx.Put(p)
		if err != nil {
			t.Fatal(err)
		}
		if o != outs[i] {
			t.Errorf("part %d: %v one by one, %v in bulk", i, o, outs[i])
		}
		// the last import's counts are the whole file's
		if err := tx.Commit(Source{Read: len(ps)}); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := single.db.ExecContext(ctx, `UPDATE sources SET n_added = ?, n_updated = ?, n_unchanged = ?`, c.Added, c.Updated, c.Unchanged); err != nil {
		t.Fatal(err)
	}
	sameDump(t, "bulk vs part by part", dumpCatalog(t, bulk), dumpCatalog(t, single))

	before := dumpCatalog(t, bulk)
	tx, err := bulk.BeginImport(ctx, Source{Label: "sheet", File: "sheet.csv", SHA256: "abc"})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range ps[:100] {
		if o, ch, err := tx.Put(p); err != nil || o == Added {
			t.Fatalf("repeat %s: %v %v %v", p.MPN, o, ch, err)
		}
	}
	// the last rows changed parts 10, 30 and 40 (and added an offer to 20,
	// which a sheet without it keeps): their first rows change them back
	if c := tx.Counts(); c.Added != 0 || c.Updated != 3 || c.Unchanged != 97 {
		t.Errorf("repeat counts %+v", c)
	}
	tx.Rollback()
	sameDump(t, "after a rolled back repeat", dumpCatalog(t, bulk), before)
	if probs, err := bulk.Check(ctx); err != nil || len(probs) != 0 {
		t.Errorf("Check: %q %v", probs, err)
	}
}

// The import turns foreign-key checks off on its own connection only, and
// every way out of the import gives the connection back with them on.
func TestImportRestoresForeignKeys(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	// every open connection of the pool, the import's among them, has the
	// checks on: take them all at once and ask each
	fk := func(when string) {
		t.Helper()
		n := s.db.Stats().OpenConnections
		var conns []*sql.Conn
		for range n {
			c, err := s.db.Conn(ctx)
			if err != nil {
				t.Fatal(err)
			}
			conns = append(conns, c)
			var on int
			if err := c.QueryRowContext(ctx, `PRAGMA foreign_keys`).Scan(&on); err != nil || on != 1 {
				t.Errorf("%s: foreign_keys = %d on one of %d connections (%v)", when, on, n, err)
			}
		}
		for _, c := range conns {
			c.Close()
		}
	}
	ps := genParts(5, 4)
	for _, end := range []string{"commit", "rollback", "failed commit"} {
		tx, err := s.BeginImport(ctx, Source{Label: end})
		if err != nil {
			t.Fatal(err)
		}
		var on int
		if err := tx.tx.QueryRowContext(ctx, `PRAGMA foreign_keys`).Scan(&on); err != nil || on != 0 {
			t.Errorf("%s: foreign_keys = %d during the import (%v)", end, on, err)
		}
		for _, p := range ps {
			if _, _, err := tx.Put(p); err != nil {
				t.Fatal(err)
			}
		}
		switch end {
		case "commit":
			err = tx.Commit(Source{})
		case "rollback":
			err = tx.Rollback()
		default:
			// a statement of finish fails: the transaction is rolled back
			tx.linkIDs = append(tx.linkIDs, 1)
			tx.linkMany.Close()
			if err = tx.Commit(Source{}); err == nil {
				t.Error("commit with a closed statement succeeded")
			}
			err = nil
		}
		if err != nil {
			t.Fatalf("%s: %v", end, err)
		}
		fk(end)
	}
	// deleting a source still cascades to its provenance rows
	if _, _, err := s.RemoveSource(ctx, "commit"); err != nil {
		t.Fatal(err)
	}
	var n int
	s.db.QueryRow(`SELECT count(*) FROM part_sources`).Scan(&n)
	if n != 0 {
		t.Errorf("%d provenance rows left after removing the only source", n)
	}
}

// The provenance of new parts comes from the id range they occupy; when
// the ids are not one run (never seen from SQLite, but not assumed) the
// new rows are read instead. Both give the same links.
func TestNewPartLinks(t *testing.T) {
	ctx := context.Background()
	for _, contiguous := range []bool{true, false} {
		s := openTemp(t)
		importParts(t, s, "old", genParts(7, 1)...)
		tx, err := s.BeginImport(ctx, Source{Label: "new"})
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range genParts(20, 2) {
			p.MPN = "N" + p.MPN
			if _, _, err := tx.Put(p); err != nil {
				t.Fatal(err)
			}
		}
		if _, _, err := tx.Put(genParts(7, 1)[3]); err != nil { // an old part, linked too
			t.Fatal(err)
		}
		if tx.firstNew != 8 || tx.lastNew != 27 || !tx.newRange {
			t.Errorf("new ids %d..%d, one run %v", tx.firstNew, tx.lastNew, tx.newRange)
		}
		tx.newRange = contiguous
		if err := tx.Commit(Source{}); err != nil {
			t.Fatal(err)
		}
		var n, lo, hi int
		s.db.QueryRow(`SELECT count(*), min(part_id), max(part_id) FROM part_sources WHERE source_id = (SELECT id FROM sources WHERE label = 'new')`).Scan(&n, &lo, &hi)
		if n != 21 || lo != 4 || hi != 27 {
			t.Errorf("contiguous %v: %d links of the new source, parts %d..%d", contiguous, n, lo, hi)
		}
		if probs, err := s.Check(ctx); err != nil || len(probs) != 0 {
			t.Errorf("Check: %q %v", probs, err)
		}
	}
}

// A large import keeps the parametric indexes (they are not dropped for a
// bulk load) and a query still uses them afterwards.
func TestLargeImportKeepsIndexes(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	importParts(t, s, "many", genParts(3000, 8)...)
	var n int
	s.db.QueryRow(`SELECT count(*) FROM sqlite_schema WHERE type = 'index' AND name LIKE 'parts\_%' ESCAPE '\'`).Scan(&n)
	if n < len(paramIndexes) {
		t.Errorf("%d parametric indexes after the import, want %d", n, len(paramIndexes))
	}
	var offers, links int
	s.db.QueryRow(`SELECT count(*) FROM offers`).Scan(&offers)
	s.db.QueryRow(`SELECT count(*) FROM part_sources`).Scan(&links)
	if offers != 3000 || links != 3000 {
		t.Errorf("%d offers, %d provenance links", offers, links)
	}
	if probs, err := s.Check(ctx); err != nil || len(probs) != 0 {
		t.Errorf("Check: %q %v", probs, err)
	}
}

// A cancelled context ends the import at the next check between rows;
// nothing of it is written.
func TestPutStopsOnCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	s := openTemp(t)
	tx, err := s.BeginImport(ctx, Source{Label: "x"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	cancel()
	var putErr error
	for _, p := range genParts(ctxEvery+1, 3) {
		if _, _, putErr = tx.Put(p); putErr != nil {
			break
		}
	}
	if putErr == nil || !strings.Contains(putErr.Error(), "context canceled") {
		t.Errorf("Put after cancel: %v", putErr)
	}
	tx.Rollback()
	var n int
	if err := s.db.QueryRow(`SELECT count(*) FROM parts`).Scan(&n); err != nil || n != 0 {
		t.Errorf("%d parts after a cancelled import (%v)", n, err)
	}
}
