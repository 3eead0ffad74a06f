package catalog

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestOpenCreatesSchema(t *testing.T) {
	path := filepath.Join(t.TempDir(), "sub", "dir", "catalog.db")
	s := openAt(t, path)
	if !s.New {
		t.Error("New = false for a new file")
	}
	ctx := context.Background()
	var ver int
	if err := s.db.QueryRowContext(ctx, `PRAGMA user_version`).Scan(&ver); err != nil || ver != schemaVersion {
		t.Fatalf("user_version = %d, %v; want %d", ver, err, schemaVersion)
	}
	var mode string
	if err := s.db.QueryRowContext(ctx, `PRAGMA journal_mode`).Scan(&mode); err != nil || mode != "wal" {
		t.Errorf("journal_mode = %q, %v", mode, err)
	}
	// the page size is fixed when the first page is written (SQLite
	// documentation, "PRAGMA page_size"): a new catalog gets the
	// catalog's, not the 4,096 default
	var ps int
	if err := s.db.QueryRowContext(ctx, `PRAGMA page_size`).Scan(&ps); err != nil || ps != pageSize || pageSize == 4096 {
		t.Errorf("page_size = %d, %v; want %d", ps, err, pageSize)
	}
	var fk int
	if err := s.db.QueryRowContext(ctx, `PRAGMA foreign_keys`).Scan(&fk); err != nil || fk != 1 {
		t.Errorf("foreign_keys = %d, %v", fk, err)
	}
	types := map[string]string{}
	rows, err := s.db.QueryContext(ctx, `SELECT name, type FROM pragma_table_info('parts')`)
	if err != nil {
		t.Fatal(err)
	}
	for rows.Next() {
		var n, ty string
		rows.Scan(&n, &ty)
		types[n] = ty
	}
	rows.Close()
	for _, f := range Fields {
		want := map[FieldType]string{Number: "REAL", Text: "TEXT", Enum: "TEXT", Bool: "INTEGER"}[f.Type]
		if got := types[colName(f.Name)]; got != want {
			t.Errorf("column for field %s: type %q, want %q", f.Name, got, want)
		}
		if f.Type != Number && !hasAccessor(f.Name) {
			t.Errorf("field %s has no Part accessor", f.Name)
		}
	}
	for _, c := range []string{"id", "mfr_key", "mpn_key", "created", "updated"} {
		if types[c] == "" {
			t.Errorf("parts lacks column %s", c)
		}
	}
	for _, table := range []string{"meta", "sources", "offers", "part_sources"} {
		var n int
		s.db.QueryRowContext(ctx, `SELECT count(*) FROM sqlite_schema WHERE type='table' AND name=?`, table).Scan(&n)
		if n != 1 {
			t.Errorf("table %s missing", table)
		}
	}
	if g := gen(t, s); g != 0 {
		t.Errorf("generation of a new catalog = %d", g)
	}
	s.Close()
	s2 := openAt(t, path)
	if s2.New {
		t.Error("New = true on reopening")
	}
}

// An empty file (made by a user or a script before the first import) is a
// new catalog too, with the catalog's page size; an existing database keeps
// its own (SQLite documentation, "PRAGMA page_size"), and one with no table
// yet is a new catalog as well.
func TestOpenPageSize(t *testing.T) {
	dir := t.TempDir()
	empty := filepath.Join(dir, "empty.db")
	if err := os.WriteFile(empty, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	old := filepath.Join(dir, "old.db")
	db, err := sql.Open("sqlite", "file:"+old)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := db.Exec(`PRAGMA page_size = 8192; PRAGMA journal_mode = WAL`); err != nil {
		t.Fatal(err)
	}
	db.Close()
	for _, c := range []struct {
		path string
		want int
	}{{empty, pageSize}, {old, 8192}} { // old: an SQLite file with no table yet, as a first Open that stopped early leaves it

		s := openAt(t, c.path)
		var ps int
		if err := s.db.QueryRow(`PRAGMA page_size`).Scan(&ps); err != nil || ps != c.want {
			t.Errorf("%s: page_size = %d, %v; want %d", filepath.Base(c.path), ps, err, c.want)
		}
		if !s.New {
			t.Errorf("%s: New = false for a file with no catalog in it yet (it would never get the seed catalog)", filepath.Base(c.path))
		}
	}
}

func TestOpenRefusesNewerSchema(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	s := openAt(t, path)
	s.Close()
	rawExec(t, path, `PRAGMA user_version = 99`)
	_, err := Open(context.Background(), path)
	want := fmt.Sprintf("catalog %s was written by a newer partsieve (schema 99; this one knows %d)", path, schemaVersion)
	if err == nil || err.Error() != want {
		t.Fatalf("err = %v\nwant %s", err, want)
	}
}

func TestOpenRefusesOtherFiles(t *testing.T) {
	dir := t.TempDir()
	text := filepath.Join(dir, "notes.db")
	os.WriteFile(text, []byte("hello, this is not a database at all, but long enough\n"), 0o644)
	other := filepath.Join(dir, "other.db")
	rawExec(t, other, `CREATE TABLE customers(id INTEGER PRIMARY KEY, name TEXT)`)
	trunc := filepath.Join(dir, "trunc.db")
	os.WriteFile(trunc, append([]byte("SQLite format 3\x00"), make([]byte, 80)...), 0o644)
	for _, tc := range []struct{ path, want string }{
		{text, "file " + text + " is not a partsieve catalog: not an SQLite database"},
		{other, "file " + other + " is not a partsieve catalog: it is an SQLite database holding other tables"},
		{trunc, "file " + trunc + " is not a partsieve catalog"},
		{dir, "catalog " + dir + " is a directory"},
	} {
		_, err := Open(context.Background(), tc.path)
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) {
			t.Errorf("Open(%s) = %v\nwant prefix %s", tc.path, err, tc.want)
		}
	}
}

func TestOpenReadOnly(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("root ignores file permissions")
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "c.db")
	s := openAt(t, path)
	s.Close()
	os.Chmod(path, 0o444)
	_, err := Open(context.Background(), path)
	if err == nil || !strings.Contains(err.Error(), "is read-only") {
		t.Errorf("read-only file: %v", err)
	}
	os.Chmod(path, 0o644)
	os.Chmod(dir, 0o555)
	defer os.Chmod(dir, 0o755)
	_, err = Open(context.Background(), path)
	if err == nil || !strings.Contains(err.Error(), "is not writable") {
		t.Errorf("read-only directory: %v", err)
	}
}

// TestMigrationBackup runs a made-up next version over a catalog of this
// build's version:
// a failing one leaves the catalog as it was plus its backup, a working
// one upgrades and removes the backup.
func TestMigrationBackup(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	s := openAt(t, path)
	importParts(t, s, "a", sampleParts()...)
	s.Close()
	saved := migrations
	defer func() { migrations, schemaVersion = saved, len(saved) }()
	cur := len(saved)
	backup := fmt.Sprintf("%s.bak-v%d", path, cur)

	migrations = append(append([]migration(nil), saved...), func(ctx context.Context, tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx, `CREATE TABLE notes(x)`); err != nil {
			return err
		}
		return errors.New("boom")
	})
	schemaVersion = len(migrations)
	_, err := Open(context.Background(), path)
	if err == nil || !strings.Contains(err.Error(), fmt.Sprintf("schema upgrade from version %d failed: migration to version %d: boom", cur, cur+1)) ||
		!strings.Contains(err.Error(), backup) {
		t.Fatalf("failing migration: %v", err)
	}
	if _, err := os.Stat(backup); err != nil {
		t.Fatalf("backup missing after a failed migration: %v", err)
	}
	orig, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	var ver, notes int
	orig.QueryRow(`PRAGMA user_version`).Scan(&ver)
	orig.QueryRow(`SELECT count(*) FROM sqlite_schema WHERE name = 'notes'`).Scan(&notes)
	orig.Close()
	if ver != cur || notes != 0 {
		t.Errorf("failed migration left version %d, notes table %d", ver, notes)
	}
	bak, err := sql.Open("sqlite", backup)
	if err != nil {
		t.Fatal(err)
	}
	var n int
	if err := bak.QueryRow(`SELECT count(*) FROM parts`).Scan(&n); err != nil || n != len(sampleParts()) {
		t.Errorf("backup holds %d parts (%v)", n, err)
	}
	bak.Close()
	os.Remove(backup)

	migrations[cur] = func(ctx context.Context, tx *sql.Tx) error {
		_, err := tx.ExecContext(ctx, `CREATE TABLE notes(x)`)
		return err
	}
	s2 := openAt(t, path)
	ver = 0
	s2.db.QueryRow(`PRAGMA user_version`).Scan(&ver)
	if ver != cur+1 {
		t.Errorf("user_version after migration = %d", ver)
	}
	if _, err := os.Stat(backup); !os.IsNotExist(err) {
		t.Errorf("backup not removed after success: %v", err)
	}
	if n := len(findAll(t, s2)); n != len(sampleParts()) {
		t.Errorf("%d parts after migration", n)
	}
}

// A field added to the dictionary gets its column on the next Open.
func TestOpenAddsNewFieldColumns(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	s := openAt(t, path)
	s.Close()
	saved := Fields
	defer func() { Fields = saved; fieldColumns = fieldColumnList() }()
	Fields = append(append([]Field(nil), saved...), Field{Name: "trr", Kinds: []Kind{Diode}, Type: Number, Doc: "reverse recovery time"})
	fieldColumns = fieldColumnList()
	s2 := openAt(t, path)
	miss, err := missingColumns(context.Background(), s2.db)
	if err != nil || len(miss) != 0 {
		t.Fatalf("missing after Open: %v %v", miss, err)
	}
}

func findAll(t testing.TB, s *Store) []Part {
	t.Helper()
	ps, err := s.Find(context.Background(), Query{})
	if err != nil {
		t.Fatal(err)
	}
	return ps
}
