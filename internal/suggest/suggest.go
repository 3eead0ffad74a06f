// Package suggest finds the names closest to a misspelt one, for "did you
// mean" hints in error messages.
package suggest

import "sort"

// Distance is the Levenshtein edit distance between a and b (insertions,
// deletions and substitutions of runes, each costing 1).
func Distance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := 1
			if ra[i-1] == rb[j-1] {
				c = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+c)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// Closest returns up to n candidates within maxDist edits of name, nearest
// first (ties in the order given).
func Closest(name string, candidates []string, maxDist, n int) []string {
	type cand struct {
		s string
		d int
		i int
	}
	var cs []cand
	for i, c := range candidates {
		if d := Distance(name, c); d <= maxDist {
			cs = append(cs, cand{c, d, i})
		}
	}
	sort.Slice(cs, func(i, j int) bool { return cs[i].d < cs[j].d || cs[i].d == cs[j].d && cs[i].i < cs[j].i })
	if len(cs) > n {
		cs = cs[:n]
	}
	out := make([]string, len(cs))
	for i, c := range cs {
		out[i] = c.s
	}
	return out
}
