package catalog

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"time"
)

// Sources lists the recorded imports, newest first.
func (s *Store) Sources(ctx context.Context) ([]Source, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT label, file, sha256, time, n_read, n_added, n_updated, n_unchanged, n_rejected
		FROM sources ORDER BY time DESC, id DESC`)
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	defer rows.Close()
	var out []Source
	for rows.Next() {
		var src Source
		var t string
		if err := rows.Scan(&src.Label, &src.File, &src.SHA256, &t, &src.Read, &src.Added, &src.Updated, &src.Unchanged, &src.Rejected); err != nil {
			return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
		}
		src.Time, _ = time.Parse(time.RFC3339Nano, t)
		out = append(out, src)
	}
	return out, rows.Err()
}

// RemoveSource deletes the offers that source brought and the parts that no
// other source brought, in one transaction.
//
// "Brought" follows the provenance table: every Put links the part to the
// importing source. An offer belongs to the last source that wrote it. The
// catalog generation is incremented when anything was deleted, and the
// deleted parts leave the text index.
func (s *Store) RemoveSource(ctx context.Context, label string) (parts, offers int, err error) {
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		if isBusy(err) {
			return 0, 0, fmt.Errorf("another import is writing to catalog %s; try again when it finishes", s.Path)
		}
		return 0, 0, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	defer tx.Rollback()
	fail := func(err error) (int, int, error) {
		return 0, 0, fmt.Errorf("catalog %s: remove source %q: %w", s.Path, label, err)
	}
	var sid int64
	err = tx.QueryRowContext(ctx, `SELECT id FROM sources WHERE label = ?`, label).Scan(&sid)
	if errors.Is(err, sql.ErrNoRows) {
		return 0, 0, fmt.Errorf("catalog %s has no source labelled %q (see `partsieve catalog sources`)", s.Path, label)
	}
	if err != nil {
		return fail(err)
	}
	prevGen, err := generation(ctx, tx)
	if err != nil {
		return fail(err)
	}
	rows, err := tx.QueryContext(ctx, `SELECT ps.part_id FROM part_sources AS ps WHERE ps.source_id = ?
		AND NOT EXISTS (SELECT 1 FROM part_sources AS o WHERE o.part_id = ps.part_id AND o.source_id != ?)`, sid, sid)
	if err != nil {
		return fail(err)
	}
	var gone []int64
	for rows.Next() {
		var id int64
		if err := rows.Scan(&id); err != nil {
			rows.Close()
			return fail(err)
		}
		gone = append(gone, id)
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return fail(err)
	}
	res, err := tx.ExecContext(ctx, `DELETE FROM offers WHERE source_id = ?`, sid)
	if err != nil {
		return fail(err)
	}
	n, _ := res.RowsAffected()
	offers = int(n)
	if len(gone) > 0 {
		ids := idsJSON(gone)
		var more int
		if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM offers WHERE part_id IN (SELECT value FROM json_each(?))`, ids).Scan(&more); err != nil {
			return fail(err)
		}
		offers += more
		res, err := tx.ExecContext(ctx, `DELETE FROM parts WHERE id IN (SELECT value FROM json_each(?))`, ids)
		if err != nil {
			return fail(err)
		}
		n, _ := res.RowsAffected()
		parts = int(n)
	}
	if _, err := tx.ExecContext(ctx, `DELETE FROM sources WHERE id = ?`, sid); err != nil {
		return fail(err)
	}
	newGen := prevGen
	if parts > 0 || offers > 0 {
		newGen++
		if err := setGeneration(ctx, tx, newGen); err != nil {
			return fail(err)
		}
	}
	if err := tx.Commit(); err != nil {
		return fail(err)
	}
	if newGen != prevGen {
		s.updateIndex(ctx, prevGen, newGen, nil, gone)
		s.refreshColumnsAfterChange(ctx)
	}
	return parts, offers, nil
}

// PartCounts counts the parts, by kind and by type, and nothing else: no
// offer or source counts and no look at the text index, so it is the cheap
// count that pick uses to attribute the parts its SQL pre-filters leave out.
func (s *Store) PartCounts(ctx context.Context) (Stats, error) {
	st := Stats{ByKind: map[string]int{}, ByType: map[string]int{}}
	rows, err := s.db.QueryContext(ctx, `SELECT "kind", coalesce("type", ''), count(*) FROM parts GROUP BY 1, 2`)
	if err != nil {
		return Stats{}, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	defer rows.Close()
	for rows.Next() {
		var k, t string
		var n int
		if err := rows.Scan(&k, &t, &n); err != nil {
			return Stats{}, fmt.Errorf("catalog %s: %w", s.Path, err)
		}
		st.Parts += n
		st.ByKind[k] += n
		if t != "" {
			st.ByType[t] += n
		}
	}
	if err := rows.Err(); err != nil {
		return Stats{}, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	return st, nil
}

// Stats returns catalog counts. IndexOK tells whether the text index
// reflects the catalog (it opens the index).
func (s *Store) Stats(ctx context.Context) (Stats, error) {
	st := Stats{ByKind: map[string]int{}, ByType: map[string]int{}}
	fail := func(err error) (Stats, error) { return Stats{}, fmt.Errorf("catalog %s: %w", s.Path, err) }
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return fail(err)
	}
	defer tx.Rollback()
	for _, c := range []struct {
		q   string
		dst *int
	}{
		{`SELECT count(*) FROM parts`, &st.Parts},
		{`SELECT count(*) FROM offers`, &st.Offers},
		{`SELECT count(*) FROM sources`, &st.Sources},
		{`PRAGMA user_version`, &st.Schema},
	} {
		if err := tx.QueryRowContext(ctx, c.q).Scan(c.dst); err != nil {
			return fail(err)
		}
	}
	rows, err := tx.QueryContext(ctx, `SELECT "kind", coalesce("type", ''), count(*) FROM parts GROUP BY 1, 2`)
	if err != nil {
		return fail(err)
	}
	defer rows.Close()
	for rows.Next() {
		var k, t string
		var n int
		if err := rows.Scan(&k, &t, &n); err != nil {
			return fail(err)
		}
		st.ByKind[k] += n
		if t != "" {
			st.ByType[t] += n
		}
	}
	if err := rows.Err(); err != nil {
		return fail(err)
	}
	gen, err := generation(ctx, tx)
	if err != nil {
		return fail(err)
	}
	tx.Rollback()
	g, ok, _ := s.indexState()
	st.IndexOK = ok && g == gen
	return st, nil
}

// indexState reads the generation of the text index, opening it read-only
// when it is not open. ok is false when it is missing or unreadable; busy
// when another process holds it.
func (s *Store) indexState() (gen int64, ok bool, err error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.ix == nil {
		ix, err := openIndex(s.indexDir(), false)
		if err != nil {
			return 0, false, err
		}
		s.ix, s.ixRW = ix, false
	}
	g, ok := indexGeneration(s.ix)
	return g, ok, nil
}

// Reindex rebuilds the text index and the column file from the catalog.
func (s *Store) Reindex(ctx context.Context) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	err := s.rebuildLocked(ctx)
	if errors.Is(err, errIndexBusy) {
		return fmt.Errorf("the text index of catalog %s is in use by another process; try again when it finishes", s.Path)
	}
	if err != nil {
		return fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	os.Remove(s.colsPath()) // rebuilt from scratch as well
	if err := s.RefreshColumns(ctx); err != nil {
		return fmt.Errorf("catalog %s: column file: %w", s.Path, err)
	}
	return nil
}

// Check runs SQLite's integrity check and compares the text index with the
// catalog; it returns the problems found (none means healthy).
//
// It runs PRAGMA integrity_check and PRAGMA foreign_key_check, checks the
// catalog's marker and generation, and compares the text index's document
// count and generation with the catalog. A stale or missing text index is
// reported (the next text search rebuilds it); it is not an error.
func (s *Store) Check(ctx context.Context) ([]string, error) {
	var problems []string
	fail := func(err error) ([]string, error) {
		if notDatabase(err) {
			// SQLite stops reading a damaged file with SQLITE_CORRUPT
			// (even PRAGMA integrity_check can): that is the finding,
			// reported with those made so far
			return append(problems, fmt.Sprintf("sqlite integrity: the catalog file is damaged (%v)", err)), nil
		}
		if why := storageTrouble(err); why != "" {
			return nil, fmt.Errorf("catalog %s: check: %s (%w)", s.Path, why, err)
		}
		return nil, fmt.Errorf("catalog %s: check: %w", s.Path, err)
	}
	rows, err := s.db.QueryContext(ctx, `PRAGMA integrity_check`)
	if err != nil {
		return fail(err)
	}
	for rows.Next() {
		var msg string
		if err := rows.Scan(&msg); err != nil {
			rows.Close()
			return fail(err)
		}
		if msg != "ok" {
			problems = append(problems, "sqlite integrity: "+msg)
		}
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return fail(err)
	}
	rows, err = s.db.QueryContext(ctx, `PRAGMA foreign_key_check`)
	if err != nil {
		return fail(err)
	}
	for rows.Next() {
		var table, parent string
		var rowid sql.NullInt64
		var fkid int
		if err := rows.Scan(&table, &rowid, &parent, &fkid); err != nil {
			rows.Close()
			return fail(err)
		}
		problems = append(problems, fmt.Sprintf("foreign key: %s row %d refers to a missing %s row", table, rowid.Int64, parent))
	}
	rows.Close()
	if err := rows.Err(); err != nil {
		return fail(err)
	}
	var app string
	if err := s.db.QueryRowContext(ctx, `SELECT value FROM meta WHERE key = 'application'`).Scan(&app); err != nil || app != "partsieve" {
		problems = append(problems, "meta: the partsieve marker is missing")
	}
	gen, err := generation(ctx, s.db)
	if err != nil {
		problems = append(problems, fmt.Sprintf("meta: the catalog generation is unreadable: %v", err))
	}
	var nparts uint64
	if err := s.db.QueryRowContext(ctx, `SELECT count(*) FROM parts`).Scan(&nparts); err != nil {
		return fail(err)
	}

	s.mu.Lock()
	defer s.mu.Unlock()
	ix := s.ix
	if ix == nil {
		var err error
		ix, err = openIndex(s.indexDir(), false)
		switch {
		case errors.Is(err, errIndexBusy):
			return append(problems, "text index: in use by another process, not checked"), nil
		case errors.Is(err, os.ErrNotExist):
			return append(problems, "text index: missing (the next text search rebuilds it, or run `partsieve catalog reindex`)"), nil
		case err != nil:
			return append(problems, fmt.Sprintf("text index: unreadable (%v); run `partsieve catalog reindex`", err)), nil
		}
		s.ix, s.ixRW = ix, false
	}
	g, ok := indexGeneration(ix)
	switch {
	case !ok:
		problems = append(problems, "text index: it records no catalog generation; run `partsieve catalog reindex`")
	case g != gen:
		problems = append(problems, fmt.Sprintf("text index: it reflects catalog generation %d, the catalog is at %d (the next text search rebuilds it)", g, gen))
	}
	n, err := ix.DocCount()
	if err != nil {
		problems = append(problems, fmt.Sprintf("text index: cannot count documents: %v", err))
	} else if n != nparts {
		problems = append(problems, fmt.Sprintf("text index: %d documents for %d parts", n, nparts))
	}
	return problems, nil
}
