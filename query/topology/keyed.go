package topology

import (
	"cmp"
	"slices"
)

// keyed is a value to order by, its tie-break and the index it stands for.
// (A radix sort of these was measured slower than this comparison sort
// at a million parts: its extra arrays cost more in first-touch page
// faults than it saved in comparisons.)
type keyed struct {
	v   float64
	tie int
	i   int32
}

// sortKeyed sorts s by v (cmp.Compare: NaN first, −0 equal to +0), then
// by tie.
func sortKeyed(s []keyed) {
	slices.SortFunc(s, func(a, b keyed) int {
		if c := cmp.Compare(a.v, b.v); c != 0 {
			return c
		}
		return cmp.Compare(a.tie, b.tie)
	})
}
