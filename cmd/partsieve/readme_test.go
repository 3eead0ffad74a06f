package main

import (
	"os"
	"strings"
	"testing"

	"partsieve/query/spec"
)

// The README documents every spec key and shows the commands it promises.
func TestREADMECoversSpecKeys(t *testing.T) {
	b, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	for _, k := range spec.Keys() {
		if !strings.Contains(readme, "`"+k.Key+"`") {
			t.Errorf("README does not document spec key %s", k.Key)
		}
	}
	for _, s := range []string{"go run ./cmd/partsieve --db /tmp/partsieve-demo.db pick vehicle-12v-accessory", "go test ./..."} {
		if !strings.Contains(readme, s) {
			t.Errorf("README lacks the command %q", s)
		}
	}
}
