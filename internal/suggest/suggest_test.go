package suggest

import (
	"reflect"
	"testing"
)

func TestDistance(t *testing.T) {
	// textbook values of the Levenshtein distance (common practice)
	tests := []struct {
		a, b string
		want int
	}{
		{"", "", 0}, {"abc", "", 3}, {"kitten", "sitting", 3}, {"flaw", "lawn", 2},
		{"vdss", "vds", 1}, {"i_mx", "i_max", 1}, {"µA", "uA", 1},
	}
	for _, tt := range tests {
		if got := Distance(tt.a, tt.b); got != tt.want {
			t.Errorf("Distance(%q, %q) = %d, want %d", tt.a, tt.b, got, tt.want)
		}
	}
}

func TestClosest(t *testing.T) {
	got := Closest("vdss", []string{"vrrm", "vds", "vgs_max", "ids", "vbr"}, 2, 2)
	if want := []string{"vds", "ids"}; !reflect.DeepEqual(got, want) {
		t.Errorf("Closest = %v, want %v", got, want)
	}
}
