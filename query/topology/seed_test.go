package topology

import (
	"context"
	"path/filepath"
	"sync"
	"testing"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/query/spec"
	"partsieve/seeddata"
)

var (
	seedOnce  sync.Once
	seedStore *catalog.Store
	seedErr   error
	seedDir   string
)

// seedCatalog returns a store holding the seed catalog, imported once per
// test binary into a temporary directory through the real importer.
func seedCatalog(t testing.TB) *catalog.Store {
	t.Helper()
	seedOnce.Do(func() {
		dir, err := osMkdirTemp()
		if err != nil {
			seedErr = err
			return
		}
		seedDir = dir
		ctx := context.Background()
		st, err := catalog.Open(ctx, filepath.Join(dir, "catalog.db"))
		if err != nil {
			seedErr = err
			return
		}
		if _, err := importers.ImportData(ctx, st, seeddata.FileName, seeddata.CatalogCSV, importers.Options{Source: seeddata.SourceLabel}); err != nil {
			seedErr = err
			return
		}
		seedStore = st
	})
	if seedErr != nil {
		t.Fatalf("seed catalog: %v", seedErr)
	}
	return seedStore
}

// exampleSpec parses one of the example specs of seeddata.
func exampleSpec(t testing.TB, name string) *spec.Spec {
	t.Helper()
	data, path, ok := seeddata.Spec(name)
	if !ok {
		t.Fatalf("no example spec %q", name)
	}
	s, err := spec.Parse(path, data)
	if err != nil {
		t.Fatalf("%v", err)
	}
	return s
}
