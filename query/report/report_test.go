package report

import (
	"context"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/query/spec"
	"partsieve/query/topology"
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
		dir, err := os.MkdirTemp("", "partsieve-report-")
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

func TestMain(m *testing.M) {
	code := m.Run()
	if seedStore != nil {
		seedStore.Close()
	}
	if seedDir != "" {
		os.RemoveAll(seedDir)
	}
	os.Exit(code)
}

// exampleInput picks the example spec name against the seed catalog.
func exampleInput(t testing.TB, name string, opt topology.Options) Input {
	t.Helper()
	data, path, ok := seeddata.Spec(name)
	if !ok {
		t.Fatalf("no example spec %q", name)
	}
	s, err := spec.Parse(path, data)
	if err != nil {
		t.Fatal(err)
	}
	st := seedCatalog(t)
	ctx := context.Background()
	r, err := topology.Pick(ctx, st, s, opt)
	if err != nil {
		t.Fatal(err)
	}
	parts, err := topology.CandidateParts(ctx, st, r)
	if err != nil {
		t.Fatal(err)
	}
	return Input{Spec: s, SpecText: data, Result: r, Parts: parts}
}

func TestWriteExamplesQuick(t *testing.T) {
	for _, name := range seeddata.SpecNames() {
		in := exampleInput(t, name, topology.Options{})
		b, err := Render(in)
		if err != nil {
			t.Fatal(err)
		}
		if dir := os.Getenv("REPORT_OUT"); dir != "" {
			os.WriteFile(filepath.Join(dir, name+".html"), b, 0o644)
		}
	}
}
