package topology

import (
	"runtime"
	"sync"
)

// minChunked is the smallest scan split into chunks (a tool choice: below
// it the goroutines cost more than they save). A variable for tests.
var minChunked = 4096

// chunkCount is a chunk's start and the number of results f left there.
type chunkCount struct{ lo, n int }

// chunks splits [0,n) into one contiguous chunk per processor and runs f
// on the chunks concurrently, each with an engine of its own (engines'
// caches are not shared; the first chunk uses e). f leaves its results at
// the start of its chunk and returns how many; it adds its eliminations
// to its own counts, which are summed into counts. Small scans run as
// one chunk.
func (e *engine) chunks(n int, f func(we *engine, lo, hi int, counts *[numChecks]int) int, counts *[numChecks]int) []chunkCount {
	w := runtime.GOMAXPROCS(0)
	if n < minChunked || w < 2 {
		return []chunkCount{{0, f(e, 0, n, counts)}}
	}
	out := make([]chunkCount, w)
	cs := make([][numChecks]int, w)
	var wg sync.WaitGroup
	for k := range w {
		lo, hi := n*k/w, n*(k+1)/w
		out[k].lo = lo
		wg.Add(1)
		go func() {
			defer wg.Done()
			we := e
			if k > 0 {
				we = newEngine(e.s, e.cat, e.opt)
			}
			out[k].n = f(we, lo, hi, &cs[k])
		}()
	}
	wg.Wait()
	for k := range cs {
		for j := range cs[k] {
			counts[j] += cs[k][j]
		}
	}
	return out
}

// joinChunks moves each chunk's results to follow the previous chunk's,
// in chunk order, and returns them: the order a single scan gives.
func joinChunks[T any](s []T, cs []chunkCount) []T {
	k := 0
	for _, c := range cs {
		k += copy(s[k:], s[c.lo:c.lo+c.n])
	}
	return s[:k]
}
