package catalog

import (
	"context"
	"os"
	"path/filepath"
	"testing"
)

// A rebuild killed after swapping its index in leaves the old index as
// PATH.bleve.old-PID; one killed while building leaves PATH.bleve.tmp-PID-N.
// The next text search removes both (the process of the temporary one is
// gone) and keeps the current index.
func TestTextSearchCleansKilledRebuilds(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	s := openAt(t, path)
	importParts(t, s, "a", sampleParts()...)
	s.Close()
	old := path + ".bleve.old-999999999"
	tmp := path + ".bleve.tmp-999999999-42"
	for _, d := range []string{old, tmp} {
		if err := os.MkdirAll(filepath.Join(d, "store"), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	s = openAt(t, path)
	r, err := s.Search(context.Background(), Query{Text: "schottky"})
	if err != nil || r.Fallback || len(r.Parts) != 2 {
		t.Fatalf("search: %+v %v", r, err)
	}
	for _, d := range []string{old, tmp} {
		if _, err := os.Stat(d); !os.IsNotExist(err) {
			t.Errorf("%s left behind: %v", filepath.Base(d), err)
		}
	}
	if probs, err := s.Check(context.Background()); err != nil || len(probs) != 0 {
		t.Errorf("check: %v %v", probs, err)
	}
}
