package seeddata

import (
	"strings"
	"testing"
)

func TestSpecs(t *testing.T) {
	names := SpecNames()
	want := []string{"handheld-2s-liion", "sensor-24v-industrial", "vehicle-12v-accessory"}
	if strings.Join(names, ",") != strings.Join(want, ",") {
		t.Fatalf("SpecNames = %v, want %v", names, want)
	}
	for _, n := range names {
		data, path, ok := Spec(n)
		if !ok || len(data) == 0 || path != "specs/"+n+".toml" {
			t.Errorf("Spec(%q) = %d bytes, %q, %v", n, len(data), path, ok)
		}
		if _, _, ok := Spec(n + ".toml"); !ok {
			t.Errorf("Spec(%q.toml) not found", n)
		}
	}
	if _, _, ok := Spec("nope"); ok {
		t.Errorf("unknown spec found")
	}
}
