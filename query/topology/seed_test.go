package topology

import (
	"partsieve/internal/seedstore"
	"testing"

	"partsieve/catalog"
	"partsieve/query/spec"
	"partsieve/seeddata"
)

var (
	seed seedstore.Shared
)

// seedCatalog returns a store holding the seed catalog, imported once per
// test binary through the real importer.
func seedCatalog(t testing.TB) *catalog.Store { return seed.Get(t) }

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
