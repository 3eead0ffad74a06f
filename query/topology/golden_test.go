package topology

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/golden")

// golden compares v, encoded as indented JSON, with testdata/golden/name,
// or rewrites the file with -update.
func golden(t *testing.T, name string, v any) {
	t.Helper()
	got, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		t.Fatal(err)
	}
	got = append(got, '\n')
	path := filepath.Join("testdata", "golden", name)
	if *update {
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if !bytes.Equal(got, want) {
		gl, wl := bytes.Split(got, []byte("\n")), bytes.Split(want, []byte("\n"))
		for i := 0; i < len(gl) && i < len(wl); i++ {
			if !bytes.Equal(gl[i], wl[i]) {
				t.Fatalf("%s differs at line %d:\n got: %s\nwant: %s\n(run go test -update after checking the change)", path, i+1, gl[i], wl[i])
			}
		}
		t.Fatalf("%s differs in length: got %d lines, want %d (run go test -update after checking the change)", path, len(gl), len(wl))
	}
}

// TestGoldenExamples runs need and pick on the three example specs
// against the seed catalog (imported through the real importer) and
// compares the JSON with the golden files.
func TestGoldenExamples(t *testing.T) {
	st := seedCatalog(t)
	for _, name := range exampleNames {
		t.Run(name, func(t *testing.T) {
			s := exampleSpec(t, name)
			golden(t, name+".need.json", Needs(s))
			r, err := Pick(context.Background(), st, s, Options{})
			if err != nil {
				t.Fatal(err)
			}
			golden(t, name+".pick.json", r)
		})
	}
	s := exampleSpec(t, "vehicle-12v-accessory")
	ex, err := Explain(context.Background(), st, s, "VLMP60-16Q-A", Options{})
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "vehicle-12v-accessory.explain-VLMP60-16Q-A.json", ex)
}
