// Package seedstore gives tests a catalog holding the embedded seed
// catalog, imported through the real importer once per test binary.
package seedstore

import (
	"context"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/seeddata"
)

// Shared is a seed catalog shared by the tests of one package: Get imports
// it on first use into a new temporary directory; Close (from TestMain)
// closes it and removes the directory.
type Shared struct {
	once sync.Once
	st   *catalog.Store
	dir  string
	err  error
}

// Get returns the shared store, failing the test if the seed catalog could
// not be imported.
func (s *Shared) Get(t testing.TB) *catalog.Store {
	t.Helper()
	s.once.Do(func() {
		s.dir, s.err = os.MkdirTemp("", "partsieve-seed-")
		if s.err != nil {
			return
		}
		s.st, s.err = Open(context.Background(), filepath.Join(s.dir, "catalog.db"))
	})
	if s.err != nil {
		t.Fatalf("seed catalog: %v", s.err)
	}
	return s.st
}

// Close closes the store and removes its directory.
func (s *Shared) Close() {
	if s.st != nil {
		s.st.Close()
	}
	if s.dir != "" {
		os.RemoveAll(s.dir)
	}
}

// Open creates a catalog at path and imports the seed catalog into it.
func Open(ctx context.Context, path string) (*catalog.Store, error) {
	st, err := catalog.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	if _, err := importers.ImportData(ctx, st, seeddata.FileName, seeddata.CatalogCSV, importers.Options{Source: seeddata.SourceLabel}); err != nil {
		st.Close()
		return nil, err
	}
	return st, nil
}
