package catalog

import "testing"

func TestLabel(t *testing.T) {
	tests := []struct {
		p    Part
		want string
	}{
		{Part{Kind: MOSFET, Type: "p"}, "P-MOSFET"},
		{Part{Kind: MOSFET, Type: "N"}, "N-MOSFET"},
		{Part{Kind: MOSFET}, "MOSFET"},
		{Part{Kind: Fuse, Type: "T", FuseStd: "iec"}, "fuse T (iec)"},
		{Part{Kind: Fuse}, "fuse"},
		{Part{Kind: Diode, Type: "schottky"}, "schottky diode"},
		{Part{Kind: Diode}, "diode"},
	}
	for _, tt := range tests {
		if got := tt.p.Label(); got != tt.want {
			t.Errorf("%+v.Label() = %q, want %q", tt.p, got, tt.want)
		}
	}
}
