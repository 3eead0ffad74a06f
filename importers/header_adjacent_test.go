package importers

import (
	"context"
	"math"
	"path/filepath"
	"testing"

	"partsieve/catalog"
)

// Neighbouring-column rules: a condition column after its value, and a
// maker's catalogue number as the part number.
func TestAdjacentColumns(t *testing.T) {
	ctx := context.Background()
	st, err := catalog.Open(ctx, filepath.Join(t.TempDir(), "c.db"))
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	for _, f := range []string{"maker-catalogue.csv", "condition-columns.csv"} {
		if _, err := ImportFile(ctx, st, filepath.Join("testdata", "adjacent", f), Options{}); err != nil {
			t.Fatalf("%s: %v", f, err)
		}
	}
	tests := []struct {
		mpn   string
		field string
		want  float64
	}{
		{"OH520-T2A5", "in", 2.5},
		{"OH520-T2A5", "rcold", 0.042},
		{"OH-BL10", "breaking", 1000},
		{"BFD-C1", "vf", 0.55},
		{"BFD-C1", "vf_if", 3},    // "@ IF (A)" after "VF max (V)"
		{"BFD-C1", "ir", 50e-6},   // "IR max (µA)"
		{"BFD-C1", "ir_vr", 40},   // "at VR (V)" after it
		{"BFD-C1", "ir2", 20e-3},  // "IR @ 100°C (µA)"
		{"BFD-C1", "ir2_tj", 100}, // from the header condition
	}
	for _, tt := range tests {
		ps, err := st.ByMPN(ctx, tt.mpn)
		if err != nil || len(ps) != 1 {
			t.Fatalf("%s: %v (%d parts)", tt.mpn, err, len(ps))
		}
		got, ok := ps[0].Get(tt.field)
		if !ok || math.Abs(got-tt.want) > 1e-9*math.Abs(tt.want) {
			t.Errorf("%s %s = %v (present %v), want %v", tt.mpn, tt.field, got, ok, tt.want)
		}
	}
	if ps, _ := st.ByMPN(ctx, "OH-BL10"); len(ps) == 1 && ps[0].FuseStd != "blade" {
		t.Errorf("OH-BL10 fuse_std = %q, want blade", ps[0].FuseStd)
	}
}
