package catalog

import (
	"context"
	"errors"
	"time"
)

// SKELETON: the signatures below are the contract between the store and its
// callers (importers, query, cmd). Bodies are filled in by the store work.

var errTODO = errors.New("not implemented")

// Store is an open catalog: the SQLite database (truth) and the bleve text
// index beside it (derived, rebuilt when stale).
type Store struct {
	Path string
	// New is true when Open created the database file (the caller seeds it).
	New bool
}

// Open opens or creates the catalog at path, applying forward schema
// migrations. A database written by a newer schema version is refused.
func Open(ctx context.Context, path string) (*Store, error) { return nil, errTODO }

// Close closes the database and the index.
func (s *Store) Close() error { return nil }

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

// Change lists one parameter changed by an update.
type Change struct {
	Mfr, MPN, Field string
	Old, New        string
}

// ImportTx is one import: every Put of a file happens in one SQLite
// transaction; Commit makes all of it visible at once, Rollback none.
type ImportTx struct{}

// BeginImport starts the transaction of one import from src (label, file,
// hash). Only one import runs at a time; a second waits (busy timeout) or
// fails with a clear message.
func (s *Store) BeginImport(ctx context.Context, src Source) (*ImportTx, error) {
	return nil, errTODO
}

// Put inserts or updates p and its offers (p.Offers, matched on supplier
// and SKU). It returns Unchanged when nothing differs, Updated with the list
// of changed fields otherwise.
func (tx *ImportTx) Put(p *Part) (Outcome, []Change, error) { return 0, nil, errTODO }

// Commit records the source with its counts, commits, then brings the text
// index up to date.
func (tx *ImportTx) Commit(counts Source) error { return errTODO }

// Rollback abandons the import; the catalog is exactly as before.
func (tx *ImportTx) Rollback() error { return nil }

// Cond is one parametric condition of a query, on a canonical field.
// Op is one of = != < <= > >= for Number, Bool and Enum fields (Num holds
// the number in base SI units, Text the word), and ~ (contains, case
// insensitive) or = for Text fields.
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

// Find runs q. Parts whose sort field is absent sort last.
func (s *Store) Find(ctx context.Context, q Query) ([]Part, error) { return nil, errTODO }

// ByMPN returns every part whose normalised MPN equals NormKey(mpn), with
// offers (several makers can use the same number).
func (s *Store) ByMPN(ctx context.Context, mpn string) ([]Part, error) { return nil, errTODO }

// Sources lists the recorded imports, newest first.
func (s *Store) Sources(ctx context.Context) ([]Source, error) { return nil, errTODO }

// RemoveSource deletes the offers that source brought and the parts that no
// other source brought, in one transaction.
func (s *Store) RemoveSource(ctx context.Context, label string) (parts, offers int, err error) {
	return 0, 0, errTODO
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

// Stats returns catalog counts.
func (s *Store) Stats(ctx context.Context) (Stats, error) { return Stats{}, errTODO }

// Reindex rebuilds the text index from the catalog.
func (s *Store) Reindex(ctx context.Context) error { return errTODO }

// Check runs SQLite's integrity check and compares the text index with the
// catalog; it returns the problems found (none means healthy).
func (s *Store) Check(ctx context.Context) ([]string, error) { return nil, errTODO }
