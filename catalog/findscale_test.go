package catalog

import (
	"context"
	"os"
	"sort"
	"strconv"
	"testing"
	"time"

	"github.com/blevesearch/bleve/v2"
	"github.com/blevesearch/bleve/v2/search/query"
)

// benchStore opens the catalog named by PARTSIEVE_BENCH_DB (for instance a
// copy of the 1,000,000-part catalog of cmd/partsieve-bench) or skips.
// Opening may upgrade the catalog's schema: use a copy.
func benchStore(b *testing.B) *Store {
	b.Helper()
	path := os.Getenv("PARTSIEVE_BENCH_DB")
	if path == "" {
		b.Skip("PARTSIEVE_BENCH_DB is not set")
	}
	s, err := Open(context.Background(), path)
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(func() { s.Close() })
	return s
}

// benchFindQueries are the find queries of cmd/partsieve-bench plus
// filtered and sorted text queries.
func benchFindQueries(mpnPrefix string) map[string]Query {
	return map[string]Query{
		"param-selective": {Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 100}, {Field: "rdson", Op: "<=", Num: 0.01}}, Limit: 50},
		"param-broad":     {Kind: Diode, Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 40}}, Limit: 50},
		"param-rare":      {Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 20}, {Field: "rdson", Op: "<=", Num: 0.0015}}, Limit: 50},
		"param-none":      {Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 600}, {Field: "rdson", Op: "<=", Num: 0.002}}, Limit: 50},
		"param-noindex":   {Conds: []Cond{{Field: "type", Op: "=", Text: "schottky"}, {Field: "qg", Op: "<=", Num: 1}}, Limit: 50},
		"param-sorted":    {Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 40}}, Sort: "rdson", Limit: 50},
		"all":             {Limit: 50},
		"text-term":       {Text: "rectifier", Limit: 50},
		"text-mpn-prefix": {Text: mpnPrefix, Limit: 50},
		"text-fuzzy":      {Text: "shotky", Limit: 50},
		"text-filtered":   {Text: "rectifier", Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 1000}}, Limit: 50},
		"text-sorted":     {Text: "schottky", Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 100}}, Sort: "vf", Limit: 50},
	}
}

// BenchmarkFindScale runs Search on the catalog of PARTSIEVE_BENCH_DB.
//
//	PARTSIEVE_BENCH_DB=/tmp/copy/catalog.db go test -run XXX -bench FindScale ./catalog/
func BenchmarkFindScale(b *testing.B) {
	s := benchStore(b)
	ctx := context.Background()
	var mpn string
	if err := s.db.QueryRowContext(ctx, `SELECT mpn FROM parts WHERE id = (SELECT max(id) / 8 FROM parts)`).Scan(&mpn); err != nil {
		b.Fatal(err)
	}
	// open the text index outside the timings
	if _, err := s.Search(ctx, Query{Text: "diode", Limit: 1}); err != nil {
		b.Fatal(err)
	}
	for name, q := range benchFindQueries(mpn[:len(mpn)-2]) {
		b.Run(name, func(b *testing.B) {
			var n int
			var ds []float64
			for b.Loop() {
				t0 := time.Now()
				r, err := s.Search(ctx, q)
				if err != nil {
					b.Fatal(err)
				}
				ds = append(ds, float64(time.Since(t0).Microseconds())/1000)
				if r.Fallback {
					b.Fatal("the text index was not used")
				}
				n = len(r.Parts)
			}
			sort.Float64s(ds)
			b.ReportMetric(ds[len(ds)/2], "p50-ms")
			b.ReportMetric(ds[len(ds)*9/10], "p90-ms")
			b.ReportMetric(float64(n), "parts")
		})
	}
}

// BenchmarkBleveScale measures the text index alone: the query of a term
// at the result sizes Search asks for.
func BenchmarkBleveScale(b *testing.B) {
	s := benchStore(b)
	ctx := context.Background()
	ix := benchIndex(b, s)
	for _, text := range []string{"rectifier", "shotky"} {
		for _, size := range []int{50, 200, 3200, TextCap} {
			for _, scored := range []bool{true, false} {
				name := text + "/" + strconv.Itoa(size)
				if !scored {
					name += "/unscored"
				}
				b.Run(name, func(b *testing.B) {
					var hits int
					for b.Loop() {
						req := bleve.NewSearchRequestOptions(textQueryFor(text, ix), size, 0, false)
						if !scored {
							req.Score = bleve.ScoreNone
						}
						res, err := ix.SearchInContext(ctx, req)
						if err != nil {
							b.Fatal(err)
						}
						hits = int(res.Total)
					}
					b.ReportMetric(float64(hits), "hits")
				})
			}
		}
	}
}

// BenchmarkBleveShapes compares query shapes for one term at a page of
// 50: textQueryFor (what Search runs), textQuery (the same with the part
// number and package clauses that match nothing), and a lone fuzzy or
// term query on the text field (the floor).
func BenchmarkBleveShapes(b *testing.B) {
	s := benchStore(b)
	ctx := context.Background()
	ix := benchIndex(b, s)
	for _, text := range []string{"rectifier", "shotky"} {
		fz := bleve.NewFuzzyQuery(text)
		fz.SetField("text")
		fz.SetFuzziness(2)
		tm := bleve.NewTermQuery(text)
		tm.SetField("text")
		shapes := map[string]query.Query{
			"search":     textQueryFor(text, ix),
			"unpruned":   textQuery(text),
			"text-fuzzy": fz,
			"text-term":  tm,
		}
		for name, q := range shapes {
			b.Run(text+"/"+name, func(b *testing.B) {
				var hits int
				for b.Loop() {
					res, err := ix.SearchInContext(ctx, bleve.NewSearchRequestOptions(q, 50, 0, false))
					if err != nil {
						b.Fatal(err)
					}
					hits = int(res.Total)
				}
				b.ReportMetric(float64(hits), "hits")
			})
		}
	}
}

// benchStoreT is benchStore for a test.
func benchStoreT(t *testing.T) *Store {
	path := os.Getenv("PARTSIEVE_BENCH_DB")
	if path == "" {
		t.Skip("PARTSIEVE_BENCH_DB is not set")
	}
	s, err := Open(context.Background(), path)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// TestFindScalePaths logs the access path and time of each parametric
// query of benchFindQueries on the catalog of PARTSIEVE_BENCH_DB (run with
// -v); it checks nothing but that they run.
func TestFindScalePaths(t *testing.T) {
	s := benchStoreT(t)
	tracePick = func(phase int, path string, other float64) { t.Logf("phase %d: %s (other %.0f)", phase, path, other) }
	traceWalk = func(n, k int, other float64) { t.Logf("walk %d rows %d matches, other %.0f", n, k, other) }
	defer func() { tracePick = func(int, string, float64) {} }()
	for name, q := range benchFindQueries("XX") {
		if q.Text != "" {
			continue
		}
		t0 := time.Now()
		_, err := s.Search(context.Background(), q)
		t.Logf("%s: %v %v", name, time.Since(t0), err)
	}
}

// benchIndex returns the store's text index, brought up to date.
func benchIndex(b *testing.B, s *Store) bleve.Index {
	b.Helper()
	ctx := context.Background()
	gen, err := generation(ctx, s.db)
	if err != nil {
		b.Fatal(err)
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	ix, err := s.currentIndexLocked(ctx, gen)
	if err != nil {
		b.Fatal(err)
	}
	return ix
}
