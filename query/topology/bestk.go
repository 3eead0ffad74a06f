package topology

// bestK is a segment tree over positions 0..n-1 that answers "the k best
// active positions at or after l" in O(k·log n), with activation and
// deactivation of single positions in O(k·log n). Better means a smaller
// key, ties broken by the smaller tie value. The shunt-fuse pairing uses
// it with diodes sorted by surge capability (a suffix is every diode
// strong enough for a fuse) and keyed by the ranking.
type bestK struct {
	k, size int
	node    []int32 // (2·size)·k entries, -1 for empty, best first
	key     []float64
	tie     []int
	buf     []int32
	qa, qb  []int32
}

func newBestK(n, k int, key []float64, tie []int) *bestK {
	size := 1
	for size < n {
		size *= 2
	}
	t := &bestK{k: k, size: size, node: make([]int32, 2*size*k), key: key, tie: tie,
		buf: make([]int32, 2*k), qa: make([]int32, k), qb: make([]int32, k)}
	for i := range t.node {
		t.node[i] = -1
	}
	return t
}

func (t *bestK) better(a, b int32) bool {
	if t.key[a] != t.key[b] {
		return t.key[a] < t.key[b]
	}
	return t.tie[a] < t.tie[b]
}

// merge writes the k best of lists a and b (each best first) into dst.
func (t *bestK) merge(dst, a, b []int32) {
	out := t.buf[:0]
	i, j := 0, 0
	for len(out) < t.k {
		ai, bj := int32(-1), int32(-1)
		if i < len(a) {
			ai = a[i]
		}
		if j < len(b) {
			bj = b[j]
		}
		if ai < 0 && bj < 0 {
			break
		}
		if bj < 0 || ai >= 0 && t.better(ai, bj) {
			out = append(out, ai)
			i++
		} else {
			out = append(out, bj)
			j++
		}
	}
	n := copy(dst, out)
	for ; n < len(dst); n++ {
		dst[n] = -1
	}
}

func (t *bestK) list(node int) []int32 { return t.node[node*t.k : (node+1)*t.k] }

// set activates or deactivates position pos.
func (t *bestK) set(pos int, on bool) {
	n := pos + t.size
	leaf := t.list(n)
	for i := range leaf {
		leaf[i] = -1
	}
	if on {
		leaf[0] = int32(pos)
	}
	for n > 1 {
		n /= 2
		t.merge(t.list(n), t.list(2*n), t.list(2*n+1))
	}
}

// query appends to out the up to k best active positions in [l, size).
func (t *bestK) query(l int, out []int32) []int32 {
	acc, tmp := t.qa, t.qb
	for i := range acc {
		acc[i] = -1
	}
	lo, hi := l+t.size, 2*t.size
	for lo < hi {
		if lo&1 == 1 {
			t.merge(tmp, acc, t.list(lo))
			acc, tmp = tmp, acc
			lo++
		}
		if hi&1 == 1 {
			hi--
			t.merge(tmp, acc, t.list(hi))
			acc, tmp = tmp, acc
		}
		lo /= 2
		hi /= 2
	}
	for _, x := range acc {
		if x >= 0 {
			out = append(out, x)
		}
	}
	return out
}
