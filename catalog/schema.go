package catalog

import (
	"context"
	"database/sql"
	"fmt"
	"strings"
)

// The SQLite schema.
//
//	meta(key, value)            application = "partsieve", generation = N
//	sources(id, label UNIQUE, file, sha256, time, n_read, n_added,
//	        n_updated, n_unchanged, n_rejected)
//	parts(id, mfr_key, mpn_key, <one column per field>, created, updated)
//	        UNIQUE(mpn_key, mfr_key)
//	offers(id, part_id, supplier, supplier_key, sku, stock, moq, currency,
//	        breaks, source_id) UNIQUE(part_id, supplier_key, sku)
//	part_sources(part_id, source_id)  which imports brought a part
//
// Indexes besides the keys: the partial indexes of paramIndexes, one per
// kind and rating; find_order(mfr_key, mpn_key, kind) for the default
// order of find (schema version 2).
//
// Field columns are named after the field (quoted, since "in", "desc" and
// "package" are SQL keywords), except where the name collides with a
// fixed column: the MOSFET drain current field "id" is column "f_id".
// Number fields are REAL, Text and Enum fields TEXT, Bool fields INTEGER
// 0/1; NULL means absent, never zero.
//
// The identity constraint is declared (mpn_key, mfr_key) rather than
// (mfr_key, mpn_key): same uniqueness, and the same index then serves
// lookups by part number alone (ByMPN), saving a separate index.
//
// Price breaks are a JSON column of the offer, [[qty, unit price], ...] in
// ascending quantity, rather than a child table: they are always read and
// written together with their offer and never filtered on in SQL, so one row
// per offer keeps imports at one insert per offer and makes "did the breaks
// change" a comparison of two canonical strings. SQLite's json_each can still
// open them up if a query ever needs it.
//
// The text index records the meta generation it reflects; every committed
// change of parts or offers (import, remove) increments it.

// fixedPartCols are the non-field columns of parts.
var fixedPartCols = map[string]bool{"id": true, "mfr_key": true, "mpn_key": true, "created": true, "updated": true}

// colName is the parts column of field name.
func colName(name string) string {
	if fixedPartCols[name] {
		return "f_" + name
	}
	return name
}

// qcol is the quoted column of a field, qualified by the parts table.
func qcol(name string) string { return `parts."` + colName(name) + `"` }

func sqlType(t FieldType) string {
	switch t {
	case Number:
		return "REAL"
	case Bool:
		return "INTEGER"
	}
	return "TEXT"
}

// paramIndexes are the partial indexes for parametric search: a query with
// the literal kind term and a condition or sort on the column walks the
// index in order and stops after LIMIT. Partial (one kind, non-NULL only)
// keeps each index small, and a part only pays for the indexes of its own
// kind on insert.
var paramIndexes = []struct {
	kind  Kind
	field string
}{
	{Diode, "vrrm"}, {Diode, "ifav"}, {Diode, "vf"},
	{MOSFET, "vds"}, {MOSFET, "rdson"}, {MOSFET, "id"},
	{Fuse, "in"}, {Fuse, "un_dc"},
}

func paramIndexName(k Kind, field string) string { return "parts_" + string(k) + "_" + colName(field) }

func paramIndexDDL() []string {
	var out []string
	for _, ix := range paramIndexes {
		c := `"` + colName(ix.field) + `"`
		out = append(out, fmt.Sprintf(`CREATE INDEX IF NOT EXISTS %s ON parts(%s) WHERE "kind" = '%s' AND %s IS NOT NULL`,
			paramIndexName(ix.kind, ix.field), c, ix.kind, c))
	}
	return out
}

// migration brings the schema from version-1 to version (its index+1 in
// migrations). Each runs inside the migration transaction.
type migration func(ctx context.Context, tx *sql.Tx) error

// migrations is the ordered list of forward migrations; migrations[i]
// produces schema version i+1. Append only.
var migrations = []migration{
	migrateV1,
	migrateV2,
}

// schemaVersion is the schema this build writes.
var schemaVersion = len(migrations)

// migrateV1 creates the initial schema.
func migrateV1(ctx context.Context, tx *sql.Tx) error {
	var cols strings.Builder
	for _, f := range Fields {
		fmt.Fprintf(&cols, "\t%q %s", colName(f.Name), sqlType(f.Type))
		switch f.Name {
		case "kind", "mfr", "mpn":
			cols.WriteString(" NOT NULL")
		}
		cols.WriteString(",\n")
	}
	stmts := []string{
		`CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL) WITHOUT ROWID`,
		`INSERT INTO meta(key, value) VALUES ('application', 'partsieve'), ('generation', '0')`,
		`CREATE TABLE sources (
	id INTEGER PRIMARY KEY,
	label TEXT NOT NULL UNIQUE,
	file TEXT NOT NULL DEFAULT '',
	sha256 TEXT NOT NULL DEFAULT '',
	time TEXT NOT NULL,
	n_read INTEGER NOT NULL DEFAULT 0,
	n_added INTEGER NOT NULL DEFAULT 0,
	n_updated INTEGER NOT NULL DEFAULT 0,
	n_unchanged INTEGER NOT NULL DEFAULT 0,
	n_rejected INTEGER NOT NULL DEFAULT 0
)`,
		`CREATE TABLE parts (
	id INTEGER PRIMARY KEY,
	mfr_key TEXT NOT NULL,
	mpn_key TEXT NOT NULL,
` + cols.String() + `	created INTEGER NOT NULL,
	updated INTEGER NOT NULL,
	UNIQUE (mpn_key, mfr_key)
)`,
		`CREATE TABLE offers (
	id INTEGER PRIMARY KEY,
	part_id INTEGER NOT NULL REFERENCES parts(id) ON DELETE CASCADE,
	supplier TEXT NOT NULL,
	supplier_key TEXT NOT NULL,
	sku TEXT NOT NULL DEFAULT '',
	stock INTEGER,
	moq INTEGER NOT NULL DEFAULT 0,
	currency TEXT NOT NULL DEFAULT '',
	breaks TEXT NOT NULL DEFAULT '[]',
	source_id INTEGER REFERENCES sources(id) ON DELETE SET NULL,
	UNIQUE (part_id, supplier_key, sku)
)`,
		`CREATE INDEX offers_source ON offers(source_id)`,
		`CREATE TABLE part_sources (
	part_id INTEGER NOT NULL REFERENCES parts(id) ON DELETE CASCADE,
	source_id INTEGER NOT NULL REFERENCES sources(id) ON DELETE CASCADE,
	PRIMARY KEY (part_id, source_id)
) WITHOUT ROWID`,
		`CREATE INDEX part_sources_source ON part_sources(source_id)`,
	}
	stmts = append(stmts, paramIndexDDL()...)
	for _, s := range stmts {
		if _, err := tx.ExecContext(ctx, s); err != nil {
			return fmt.Errorf("%w\n%s", err, s)
		}
	}
	return nil
}

// migrateV2 adds the order index: parts in the default order of find
// (manufacturer key, part number key), with the kind. A query in that
// order with a Limit walks it and stops after Limit matches instead of
// sorting every match (at 1,000,000 parts, diodes with V_RRM ≥ 40 V took
// 1.3 s that way, 10 ms by the walk); the kind column lets a walk of one
// kind skip the others without reading their rows. About 45 bytes a part.
func migrateV2(ctx context.Context, tx *sql.Tx) error {
	_, err := tx.ExecContext(ctx, `CREATE INDEX IF NOT EXISTS `+orderIndex+` ON parts(mfr_key, mpn_key, "kind")`)
	return err
}

// missingColumns lists the fields of the dictionary that have no column in
// parts yet (a field added to the dictionary after the catalog was made).
func missingColumns(ctx context.Context, q queryer) ([]Field, error) {
	rows, err := q.QueryContext(ctx, `SELECT name FROM pragma_table_info('parts')`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	have := map[string]bool{}
	for rows.Next() {
		var n string
		if err := rows.Scan(&n); err != nil {
			return nil, err
		}
		have[n] = true
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	var out []Field
	for _, f := range Fields {
		if !have[colName(f.Name)] {
			out = append(out, f)
		}
	}
	return out, nil
}

// addColumns adds the columns of fields that are new to the dictionary.
// Adding a nullable column is additive and needs no schema version: old
// rows read as absent.
func addColumns(ctx context.Context, tx *sql.Tx, fs []Field) error {
	for _, f := range fs {
		if _, err := tx.ExecContext(ctx, fmt.Sprintf(`ALTER TABLE parts ADD COLUMN %q %s`, colName(f.Name), sqlType(f.Type))); err != nil {
			return err
		}
	}
	for _, s := range paramIndexDDL() {
		if _, err := tx.ExecContext(ctx, s); err != nil {
			return err
		}
	}
	return nil
}

type queryer interface {
	QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error)
	QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row
}
