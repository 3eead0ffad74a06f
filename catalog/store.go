package catalog

import (
	"bytes"
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"sync"
	"syscall"
	"time"

	"github.com/blevesearch/bleve/v2"
	sqlite "modernc.org/sqlite"
	sqlite3 "modernc.org/sqlite/lib"
)

// busyTimeout is how long a connection waits for another writer's lock
// before it gives up (SQLite busy_timeout). Tests shorten it.
var busyTimeout = 10 * time.Second

// Store is an open catalog: the SQLite database (truth) and the bleve text
// index beside it (derived, rebuilt when stale).
//
// A Store is safe for concurrent use by several goroutines, except that one
// ImportTx must be used from one goroutine at a time. Several processes may
// open the same catalog: readers keep working while one process imports
// (SQLite WAL); a second import waits for the first (busy timeout) or fails
// with a clear message.
type Store struct {
	Path string
	// New is true when Open created the database file, or found one with
	// nothing in it yet (the caller seeds it).
	New bool
	// Notify, when set, receives one-line notices about slow or degraded
	// work: a text index rebuild, a text index held by another process.
	Notify func(msg string)

	db *sql.DB

	mu   sync.Mutex  // guards ix and ixRW
	ix   bleve.Index // open text index, nil until a text search or update needs it
	ixRW bool        // ix is open read-write
}

func (s *Store) notify(format string, args ...any) {
	if s.Notify != nil {
		s.Notify(fmt.Sprintf(format, args...))
	}
}

// dsn builds the SQLite data source name. Every pooled connection runs the
// pragmas; busy_timeout is applied first. WAL lets readers work while one
// writer imports; synchronous=NORMAL is durable at checkpoints and safe in
// WAL. cache_size (64 MiB, allocated as needed) keeps a bulk import's
// pages in memory; journal_size_limit trims the WAL file after a large
// import. _txlock=immediate makes every read-write transaction take the
// write lock at BEGIN, so a writer never fails on a lock upgrade
// (SQLITE_BUSY_SNAPSHOT), which busy_timeout does not cover.
func dsn(path string) string {
	q := busyPragma() + "&_pragma=journal_mode(WAL)&_pragma=foreign_keys(1)&_pragma=synchronous(NORMAL)&_pragma=cache_size(-" + strconv.Itoa(storeCacheKiB) + ")&_pragma=journal_size_limit(67108864)&_txlock=immediate"
	return fileURL(path) + "?" + q
}

func fileURL(path string) string {
	u := url.URL{Scheme: "file", Opaque: (&url.URL{Path: path}).EscapedPath()}
	return u.String()
}

func busyPragma() string {
	return "_pragma=busy_timeout(" + strconv.FormatInt(busyTimeout.Milliseconds(), 10) + ")"
}

// pageSize is the page size of a new catalog, in bytes (SQLite's default
// is 4,096; 65,536 is the largest). Measured at a million imported parts
// on the scale benchmark's CSV (2-core VM, runs alternating between the
// sizes, which this VM needs: its speed drifts by a sixth over minutes):
// parts usable 23.8–29.3 s with 4 KiB pages, 24.2–26.1 s with 16 KiB,
// 20.2–22.8 s with 32 KiB, 23.2 s with 64 KiB (one run); CPU 37–46 s at
// 4 KiB, 34–40 s at 32 KiB. A row insert descends fewer, larger pages:
// fewer b-tree page splits, WAL frames and page-cache look-ups (b-tree
// inserts 12.7 → 7.3 CPU-seconds, WAL writes 4.2 → 1.1 in the profile),
// and the page cache holds the same bytes in fewer, larger slots (peak
// 259 MB at 4 KiB, 216 MB at 32 KiB). An update import of 100,000 known
// parts into that catalog (stock of each changed, half the descriptions)
// took 9.6 s at 4 KiB, 9.7 s at 16 KiB and 8.0 s at 32 KiB; find and pick
// at a million parts were unchanged (README). A catalog keeps the page
// size it was made with.
const pageSize = 32768

// createFile makes the new, empty database file of a catalog with the
// catalog's page size, in WAL mode. The page size only takes effect before
// the first page is written, and switching to WAL writes it: the data
// source name's pragmas run in name order (the driver sorts them), so
// journal_mode would come before page_size there.
func createFile(ctx context.Context, abs string) error {
	db, err := sql.Open("sqlite", fileURL(abs)+"?"+busyPragma())
	if err != nil {
		return err
	}
	defer db.Close()
	conn, err := db.Conn(ctx)
	if err != nil {
		return err
	}
	defer conn.Close()
	if _, err := conn.ExecContext(ctx, "PRAGMA page_size = "+strconv.Itoa(pageSize)); err != nil {
		return err
	}
	_, err = conn.ExecContext(ctx, "PRAGMA journal_mode = WAL")
	return err
}

// storeCacheKiB is the page cache of each connection (KiB).
const storeCacheKiB = 65536

var sqliteMagic = []byte("SQLite format 3\x00")

// Open opens or creates the catalog at path, applying forward schema
// migrations. A database written by a newer schema version is refused.
//
// Before a migration runs on an existing file, a consistent copy is written
// to PATH.bak-vN (N the version found) and removed only after the migration
// committed.
func Open(ctx context.Context, path string) (*Store, error) {
	if path == "" {
		return nil, errors.New("no catalog path given")
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", path, err)
	}
	dir := filepath.Dir(abs)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("catalog %s: cannot create its directory: %w", path, err)
	}
	isNew := false
	st, err := os.Stat(abs)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		isNew = true
	case err != nil:
		return nil, fmt.Errorf("catalog %s: %w", path, err)
	case st.IsDir():
		return nil, fmt.Errorf("catalog %s is a directory, not a catalog file", path)
	default:
		if err := checkExisting(abs, path, st.Size()); err != nil {
			return nil, err
		}
		isNew = st.Size() == 0
	}
	if err := checkDirWritable(dir, path); err != nil {
		return nil, err
	}

	if isNew {
		if err := createFile(ctx, abs); err != nil {
			return nil, explainOpen(path, err)
		}
	}
	db, err := sql.Open("sqlite", dsn(abs))
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", path, err)
	}
	db.SetMaxIdleConns(4)
	s := &Store{Path: abs, New: isNew, db: db}
	if err := s.prepare(ctx, path); err != nil {
		db.Close()
		return nil, err
	}
	return s, nil
}

// checkExisting refuses files that are not SQLite databases and catalogs
// that cannot be written.
func checkExisting(abs, path string, size int64) error {
	f, err := os.OpenFile(abs, os.O_RDWR, 0)
	if errors.Is(err, fs.ErrPermission) || errors.Is(err, syscall.EROFS) {
		// EROFS: the file system is mounted read-only
		return fmt.Errorf("catalog %s is read-only (%v); partsieve needs to write to it: fix its permissions or use another --db", path, unwrapPath(err))
	}
	if err != nil {
		return fmt.Errorf("catalog %s: %w", path, err)
	}
	defer f.Close()
	if size == 0 {
		return nil
	}
	head := make([]byte, len(sqliteMagic))
	if _, err := io.ReadFull(f, head); err != nil || !bytes.Equal(head, sqliteMagic) {
		return fmt.Errorf("file %s is not a partsieve catalog: not an SQLite database", path)
	}
	return nil
}

func unwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// checkDirWritable makes sure SQLite can create the -wal and -shm files.
func checkDirWritable(dir, path string) error {
	f, err := os.CreateTemp(dir, ".partsieve-probe-*")
	if err != nil {
		if errors.Is(err, fs.ErrPermission) || errors.Is(err, fs.ErrExist) || os.IsPermission(err) || errors.Is(err, syscall.EROFS) {
			return fmt.Errorf("catalog %s: directory %s is not writable (%v); the catalog keeps its journal files beside it", path, dir, err)
		}
		return fmt.Errorf("catalog %s: directory %s: %w", path, dir, err)
	}
	name := f.Name()
	f.Close()
	os.Remove(name)
	return nil
}

// sqliteCode returns the primary SQLite result code of err, or 0.
func sqliteCode(err error) int {
	var se *sqlite.Error
	if errors.As(err, &se) {
		return se.Code() & 0xff
	}
	return 0
}

func notDatabase(err error) bool {
	c := sqliteCode(err)
	return c == sqlite3.SQLITE_NOTADB || c == sqlite3.SQLITE_CORRUPT
}

func isBusy(err error) bool {
	c := sqliteCode(err)
	return c == sqlite3.SQLITE_BUSY || c == sqlite3.SQLITE_LOCKED
}

func readOnlyErr(err error) bool {
	c := sqliteCode(err)
	return c == sqlite3.SQLITE_READONLY || c == sqlite3.SQLITE_CANTOPEN || c == sqlite3.SQLITE_PERM
}

// storageTrouble explains an SQLite error that comes from the disk or the
// file rather than from what the catalog holds, or returns "". SQLite's
// own texts ("disk I/O error (4874)") do not tell a user what to do; a
// full disk shows as SQLITE_FULL when a write fails and as
// SQLITE_IOERR_SHMSIZE when even the small -shm file beside the catalog
// cannot be created.
func storageTrouble(err error) string {
	var se *sqlite.Error
	if !errors.As(err, &se) {
		return ""
	}
	switch se.Code() & 0xff {
	case sqlite3.SQLITE_FULL:
		return "the disk is full"
	case sqlite3.SQLITE_IOERR:
		if se.Code() == sqlite3.SQLITE_IOERR_SHMSIZE {
			return "cannot write the shared-memory file beside the catalog: the disk is probably full"
		}
		return "the disk reported an input/output error (full, failing or removed)"
	case sqlite3.SQLITE_CORRUPT:
		return "the catalog file is damaged"
	}
	return ""
}

// explainOpen words an error met while opening the catalog at path.
func explainOpen(path string, err error) error {
	switch {
	case sqliteCode(err) == sqlite3.SQLITE_CORRUPT:
		// the SQLite header was read, so this is a damaged database
		// rather than some other file
		return fmt.Errorf("catalog %s is damaged (%v): restore it from a backup copy, or move it away and import the spreadsheets again", path, err)
	case notDatabase(err):
		return fmt.Errorf("file %s is not a partsieve catalog, or it is damaged: %v", path, err)
	case storageTrouble(err) != "":
		return fmt.Errorf("catalog %s: %s (%v)", path, storageTrouble(err), err)
	case readOnlyErr(err):
		return fmt.Errorf("catalog %s cannot be written: %v", path, err)
	case isBusy(err):
		return fmt.Errorf("catalog %s is locked by another process: %v", path, err)
	}
	return fmt.Errorf("catalog %s: %w", path, err)
}

// prepare checks what the file holds and migrates it to schemaVersion.
func (s *Store) prepare(ctx context.Context, path string) error {
	wrap := func(err error) error { return explainOpen(path, err) }
	ver, tables, app, err := s.inspect(ctx)
	if err != nil {
		return wrap(err)
	}
	if ver > schemaVersion {
		return fmt.Errorf("catalog %s was written by a newer partsieve (schema %d; this one knows %d)", path, ver, schemaVersion)
	}
	if ver == 0 && tables > 0 {
		return fmt.Errorf("file %s is not a partsieve catalog: it is an SQLite database holding other tables", path)
	}
	if ver == 0 && tables == 0 {
		// an SQLite file with nothing in it yet: a first Open that stopped
		// after making the file and before its schema was committed
		s.New = true
	}
	if ver > 0 && app != "partsieve" {
		return fmt.Errorf("file %s is not a partsieve catalog: it has no partsieve marker (schema version %d)", path, ver)
	}
	if ver < schemaVersion {
		if err := s.migrate(ctx, path, ver); err != nil {
			return err
		}
	}
	missing, err := missingColumns(ctx, s.db)
	if err != nil {
		return wrap(err)
	}
	if len(missing) > 0 {
		tx, err := s.db.BeginTx(ctx, nil)
		if err != nil {
			return wrap(err)
		}
		defer tx.Rollback()
		// another process may have added them meanwhile
		if missing, err = missingColumns(ctx, tx); err != nil {
			return wrap(err)
		}
		if err := addColumns(ctx, tx, missing); err != nil {
			return wrap(err)
		}
		if err := tx.Commit(); err != nil {
			return wrap(err)
		}
	}
	return nil
}

// inspect reads the schema version, the number of tables and the
// application marker.
func (s *Store) inspect(ctx context.Context) (ver, tables int, app string, err error) {
	if err = s.db.QueryRowContext(ctx, `PRAGMA user_version`).Scan(&ver); err != nil {
		return
	}
	if err = s.db.QueryRowContext(ctx, `SELECT count(*) FROM sqlite_schema WHERE type = 'table'`).Scan(&tables); err != nil {
		return
	}
	if ver > 0 {
		var n int
		if err = s.db.QueryRowContext(ctx, `SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = 'meta'`).Scan(&n); err != nil || n == 0 {
			return
		}
		e := s.db.QueryRowContext(ctx, `SELECT value FROM meta WHERE key = 'application'`).Scan(&app)
		if e != nil && !errors.Is(e, sql.ErrNoRows) {
			err = e
		}
	}
	return
}

// migrate runs the forward migrations from version from to schemaVersion in
// one transaction. An existing catalog is first copied to PATH.bak-vN.
func (s *Store) migrate(ctx context.Context, path string, from int) error {
	backup := ""
	if from > 0 {
		backup = fmt.Sprintf("%s.bak-v%d", s.Path, from)
		if _, err := os.Stat(backup); err == nil {
			backup = fmt.Sprintf("%s.bak-v%d-%d", s.Path, from, time.Now().Unix())
		}
		if _, err := s.db.ExecContext(ctx, `VACUUM INTO ?`, backup); err != nil {
			return fmt.Errorf("catalog %s: cannot write the backup %s before upgrading the schema: %v", path, backup, err)
		}
	}
	fail := func(err error) error {
		if backup != "" {
			return fmt.Errorf("catalog %s: schema upgrade from version %d failed: %v (the catalog is unchanged; a copy is in %s)", path, from, err, backup)
		}
		return fmt.Errorf("catalog %s: cannot create the schema: %v", path, err)
	}
	tx, err := s.db.BeginTx(ctx, nil)
	if err != nil {
		return fail(err)
	}
	defer tx.Rollback()
	var ver int
	if err := tx.QueryRowContext(ctx, `PRAGMA user_version`).Scan(&ver); err != nil {
		return fail(err)
	}
	if ver > schemaVersion {
		return fmt.Errorf("catalog %s was written by a newer partsieve (schema %d; this one knows %d)", path, ver, schemaVersion)
	}
	for v := ver; v < schemaVersion; v++ {
		if err := migrations[v](ctx, tx); err != nil {
			return fail(fmt.Errorf("migration to version %d: %w", v+1, err))
		}
	}
	if _, err := tx.ExecContext(ctx, fmt.Sprintf(`PRAGMA user_version = %d`, schemaVersion)); err != nil {
		return fail(err)
	}
	if err := tx.Commit(); err != nil {
		return fail(err)
	}
	if backup != "" {
		os.Remove(backup)
	}
	return nil
}

// Close closes the database and the index.
func (s *Store) Close() error {
	s.mu.Lock()
	var err error
	if s.ix != nil {
		err = s.ix.Close()
		s.ix = nil
	}
	s.mu.Unlock()
	if s.db != nil {
		if e := s.db.Close(); e != nil && err == nil {
			err = e
		}
		s.db = nil
	}
	return err
}

// generation reads the catalog generation.
func generation(ctx context.Context, q queryer) (int64, error) {
	var v string
	if err := q.QueryRowContext(ctx, `SELECT value FROM meta WHERE key = 'generation'`).Scan(&v); err != nil {
		return 0, err
	}
	return strconv.ParseInt(v, 10, 64)
}

func setGeneration(ctx context.Context, tx *sql.Tx, g int64) error {
	_, err := tx.ExecContext(ctx, `UPDATE meta SET value = ? WHERE key = 'generation'`, strconv.FormatInt(g, 10))
	return err
}

// Source describes one import.
type Source struct {
	Label     string    `json:"label"`
	File      string    `json:"file"`
	SHA256    string    `json:"sha256"`
	Time      time.Time `json:"time"`
	Read      int       `json:"read"`
	Added     int       `json:"added"`
	Updated   int       `json:"updated"`
	Unchanged int       `json:"unchanged"`
	Rejected  int       `json:"rejected"`
}

// Outcome is what Put did with one part.
type Outcome int

// Outcomes of Put.
const (
	Added Outcome = iota
	Updated
	Unchanged
)

// String names the outcome.
func (o Outcome) String() string {
	switch o {
	case Added:
		return "added"
	case Updated:
		return "updated"
	case Unchanged:
		return "unchanged"
	}
	return "outcome(" + strconv.Itoa(int(o)) + ")"
}

// Change lists one parameter changed by an update. Field is a canonical
// field name, or for offers "offer SUPPLIER/SKU" (a new offer, Old empty)
// and "offer SUPPLIER/SKU stock|moq|currency|price_breaks".
// Old and New are display text; an empty string means absent.
type Change struct {
	Mfr, MPN, Field string
	Old, New        string
}

// Cond is one parametric condition of a query, on a canonical field.
// Op is one of = != < <= > >= for Number, Bool and Enum fields (Num holds
// the number in base SI units, Text the word), and ~ (contains, case
// insensitive) or = for Text fields.
//
// Number = and != compare with a relative tolerance of 1e-9 (values parsed
// from "45m" and "0.045" differ in the last bit). A Bool condition takes
// Text ("yes", "no", "true", "false", "1", "0") or, when Text is empty,
// Num (non-zero is true); only = and != apply. Enum and Text = and != are
// case-insensitive; mfr = and mpn = compare the normalised keys (NormKey).
// Text fields accept =, != and ~; Enum fields =, != and ~. An absent value
// (NULL) never satisfies any condition.
type Cond struct {
	Field string
	Op    string
	Num   float64
	Text  string
}

// Query selects parts. Text is free text matched through the text index
// (terms fuzzy, prefix on part numbers); the SQLite catalog then applies
// Kind and Conds, sorts and limits. An empty query lists the catalog.
type Query struct {
	Text   string
	Kind   Kind
	Conds  []Cond
	Sort   string // canonical field; "" = text relevance, else mfr, mpn
	Desc   bool
	Limit  int  // 0 = no limit
	Offers bool // load offers with price breaks
}

// Stats counts the catalog.
type Stats struct {
	Parts   int            `json:"parts"`
	Offers  int            `json:"offers"`
	Sources int            `json:"sources"`
	ByKind  map[string]int `json:"by_kind"`
	ByType  map[string]int `json:"by_type"`
	Schema  int            `json:"schema_version"`
	IndexOK bool           `json:"index_current"`
}
