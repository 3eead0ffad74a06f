package catalog

import (
	"context"
	"database/sql"
	"math/rand/v2"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// planStore is a catalog of n generated parts.
func planStore(t *testing.T, n int) *Store {
	t.Helper()
	s := openTemp(t)
	ctx := context.Background()
	tx, err := s.BeginImport(ctx, Source{Label: "gen"})
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range genParts(n, 5) {
		if _, _, err := tx.Put(p); err != nil {
			t.Fatal(err)
		}
	}
	if err := tx.Commit(Source{}); err != nil {
		t.Fatal(err)
	}
	return s
}

// randomQuery makes a query of the kinds find gets: a kind or not, up to
// three conditions (ranges on indexed and other ratings, types, packages,
// makers, one of mpns), a sort field or the default order, text or not.
func randomQuery(rng *rand.Rand, mpns []string) Query {
	var q Query
	if rng.IntN(3) > 0 {
		q.Kind = []Kind{Diode, MOSFET, Fuse}[rng.IntN(3)]
	}
	nums := map[Kind][]struct {
		field string
		vals  []float64
	}{
		Diode:  {{"vrrm", []float64{20, 40, 100, 400, 1000}}, {"ifav", []float64{0.5, 1, 3}}, {"vf", []float64{0.4, 0.8, 1.2}}, {"ir", []float64{1e-5, 5e-5}}},
		MOSFET: {{"vds", []float64{20, 40, 100}}, {"rdson", []float64{0.002, 0.01, 0.05}}, {"id", []float64{5, 40, 70}}, {"qg", []float64{1e-8, 5e-8}}},
		Fuse:   {{"in", []float64{0.25, 1, 5}}, {"un_dc", []float64{32, 63, 125}}, {"i2t", []float64{0.1, 10}}},
	}
	ops := []string{"<", "<=", ">", ">=", "=", "!="}
	for range rng.IntN(4) {
		k := q.Kind
		if k == "" {
			k = []Kind{Diode, MOSFET, Fuse}[rng.IntN(3)]
		}
		switch rng.IntN(7) {
		case 6:
			q.Conds = append(q.Conds, Cond{Field: "mpn", Op: "=", Text: mpns[rng.IntN(len(mpns))]})
		case 0:
			q.Conds = append(q.Conds, Cond{Field: "type", Op: "=", Text: map[Kind][]string{Diode: {"schottky", "zener"}, MOSFET: {"n", "p"}, Fuse: {"T", "FF"}}[k][rng.IntN(2)]})
		case 1:
			q.Conds = append(q.Conds, Cond{Field: "package", Op: "~", Text: []string{"SO", "SM", "2"}[rng.IntN(3)]})
		case 2:
			q.Conds = append(q.Conds, Cond{Field: "mfr", Op: []string{"=", "!="}[rng.IntN(2)], Text: []string{"sable semi", "Tern-Micro"}[rng.IntN(2)]})
		default:
			f := nums[k][rng.IntN(len(nums[k]))]
			q.Conds = append(q.Conds, Cond{Field: f.field, Op: ops[rng.IntN(len(ops))], Num: f.vals[rng.IntN(len(f.vals))]})
		}
	}
	if rng.IntN(2) == 0 {
		q.Sort = []string{"vrrm", "vf", "rdson", "vds", "in", "qg", "mfr", "package", "type"}[rng.IntN(9)]
		q.Desc = rng.IntN(2) == 0
	}
	if rng.IntN(5) == 0 {
		q.Text = []string{"schottky", "diode", "fuse", "sable", "channel 40v", "mosfet"}[rng.IntN(6)]
	}
	q.Limit = []int{1, 3, 10, 40}[rng.IntN(4)]
	return q
}

// With a Limit, Search chooses an access path per query (walk, range,
// ids, scan, or a walk given up for another); whichever it takes, the
// parts are the first Limit of those the same query gives without a
// Limit, where SQLite's planner reads every match.
func TestPickedPathsGiveTheFullQueryPrefix(t *testing.T) {
	s := planStore(t, 3000)
	ctx := context.Background()
	savedProbe, savedPatience := walkProbe, walkPatience
	defer func() { walkProbe, walkPatience = savedProbe, savedPatience }()
	paths := map[string]int{}
	tracePick = func(phase int, path string, other float64) {
		for _, p := range []string{"walk find_order", "walk parts_", ", then ", "ids", "scan", "mpn"} {
			if strings.Contains(path, p) {
				paths[p]++
			}
		}
		if strings.HasPrefix(path, "parts_") {
			paths["range"]++
		}
	}
	defer func() { tracePick = func(int, string, float64) {} }()
	rng := rand.New(rand.NewPCG(3, 9))
	var some []string
	for _, p := range findAll(t, s)[:40] {
		some = append(some, p.MPN)
	}
	for i := range 300 {
		// small budgets and both patiences, so that on 3,000 parts the
		// walks take several budgets and sometimes give up
		walkProbe, walkPatience = 4+rng.IntN(3)*20, []float64{1, 32}[rng.IntN(2)]
		q := randomQuery(rng, some)
		got, err := s.Search(ctx, q)
		if err != nil {
			t.Fatalf("%d %+v: %v", i, q, err)
		}
		all := q
		all.Limit = 0
		want, err := s.Search(ctx, all)
		if err != nil {
			t.Fatal(err)
		}
		w := mpns(want.Parts)
		if len(w) > q.Limit {
			w = w[:q.Limit]
		}
		if g := mpns(got.Parts); !reflect.DeepEqual(g, w) && len(g)+len(w) > 0 {
			t.Fatalf("query %d %+v (probe %d):\ngot  %v\nwant %v", i, q, walkProbe, g, w)
		}
		if got.TextHits != want.TextHits || got.Capped != want.Capped {
			t.Errorf("query %d %+v: hits %d/%v, without limit %d/%v", i, q, got.TextHits, got.Capped, want.TextHits, want.Capped)
		}
	}
	for _, p := range []string{"walk find_order", "walk parts_", ", then ", "range", "ids", "scan", "mpn"} {
		if paths[p] == 0 {
			t.Errorf("no query took the path %q (%v)", p, paths)
		}
	}
	t.Logf("paths: %v", paths)
}

// The text-relevance order pages through the hits: a filter that keeps
// few of them makes several pages, and the parts are the same as from
// the hits taken all at once (Limit 0), in the same order.
func TestRelevancePagesMatchAllHits(t *testing.T) {
	s := planStore(t, 3000)
	ctx := context.Background()
	var pages []int
	traceTextPage = func(from, size int) { pages = append(pages, from) }
	defer func() { traceTextPage = func(int, int) {} }()
	cases := []Query{
		{Text: "diode", Limit: 5},
		{Text: "diode", Limit: 1},
		{Text: "schottky", Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 1000}}, Limit: 3},
		{Text: "diode", Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 1000}, {Field: "ifav", Op: ">=", Num: 5}}, Limit: 2},
		{Text: "fuse", Kind: Fuse, Conds: []Cond{{Field: "in", Op: "=", Num: 10}, {Field: "un_dc", Op: "=", Num: 32}}, Limit: 4},
		{Text: "sable", Kind: MOSFET, Conds: []Cond{{Field: "rdson", Op: "<", Num: 0.003}}, Limit: 10},
		{Text: "mosfet", Kind: Fuse, Limit: 10}, // nothing passes: every page is read
		{Text: "tern", Conds: []Cond{{Field: "package", Op: "~", Text: "blade"}}, Limit: 7},
	}
	multi := 0
	for _, q := range cases {
		pages = nil
		got, err := s.Search(ctx, q)
		if err != nil {
			t.Fatal(err)
		}
		if len(pages) > 1 {
			multi++
		}
		all := q
		all.Limit = 0
		want, err := s.Search(ctx, all)
		if err != nil {
			t.Fatal(err)
		}
		w := mpns(want.Parts)
		if len(w) > q.Limit {
			w = w[:q.Limit]
		}
		if g := mpns(got.Parts); !reflect.DeepEqual(g, w) && len(g)+len(w) > 0 {
			t.Errorf("%+v (pages from %v):\ngot  %v\nwant %v", q, pages, g, w)
		}
		if got.TextHits != want.TextHits || got.TextHits == 0 || got.Fallback {
			t.Errorf("%+v: hits %d, all at once %d, fallback %v", q, got.TextHits, want.TextHits, got.Fallback)
		}
	}
	if multi < 3 {
		t.Errorf("only %d queries read more than one page", multi)
	}
}

// The access paths named in the benchmark are the ones chosen on
// a catalog where they pay: a broad default-order query walks the order
// index, a rare one reads the small range, a sort on an indexed rating
// walks that rating's index.
func TestPickPlans(t *testing.T) {
	s := planStore(t, 3000)
	ctx := context.Background()
	savedProbe := walkProbe
	defer func() { walkProbe = savedProbe }()
	walkProbe = 20
	var got []string
	tracePick = func(phase int, path string, other float64) { got = append(got, path) }
	defer func() { tracePick = func(int, string, float64) {} }()
	cases := []struct {
		q    Query
		want []string
	}{
		{Query{Kind: Diode, Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 40}}, Limit: 50}, []string{"walk find_order"}},
		{Query{Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 20}, {Field: "rdson", Op: "<=", Num: 0.0012}}, Limit: 50}, []string{"parts_mosfet_rdson"}},
		{Query{Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 40}}, Sort: "rdson", Limit: 20}, []string{"walk parts_mosfet_rdson"}},
		{Query{Conds: []Cond{{Field: "type", Op: "=", Text: "zener"}}, Sort: "vf", Limit: 20}, []string{"scan"}},
		{Query{Limit: 5}, []string{"walk find_order"}},
		{Query{Conds: []Cond{{Field: "mpn", Op: "=", Text: "dsc40-7"}}, Limit: 5}, []string{"mpn"}},
		{Query{Conds: []Cond{{Field: "mfr", Op: "=", Text: "Sable Semi"}}, Limit: 5}, []string{"walk find_order"}},
	}
	for _, c := range cases {
		got = nil
		if _, err := s.Search(ctx, c.q); err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, c.want) {
			t.Errorf("%+v: paths %q, want %q", c.q, got, c.want)
		}
	}
}

// A catalog of schema version 1 gets the order index on Open, keeps its
// data, and its backup is removed after the upgrade.
func TestMigrateV1AddsOrderIndex(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	saved := migrations
	migrations, schemaVersion = saved[:1], 1
	s := openAt(t, path)
	importParts(t, s, "a", sampleParts()...)
	before := dump(t, s)
	s.Close()
	migrations, schemaVersion = saved, len(saved)
	if n := indexCount(t, path, orderIndex); n != 0 {
		t.Fatalf("version 1 has the order index")
	}

	s = openAt(t, path)
	if v := userVersion(t, path); v != 2 {
		t.Errorf("user_version = %d", v)
	}
	if n := indexCount(t, path, orderIndex); n != 1 {
		t.Errorf("order index missing after the upgrade")
	}
	if got := dump(t, s); got != before {
		t.Errorf("upgrade changed the catalog:\n%s\nwant\n%s", got, before)
	}
	if left, _ := filepath.Glob(path + ".bak-v*"); len(left) != 0 {
		t.Errorf("backups left: %v", left)
	}
	ps, err := s.Find(context.Background(), Query{Kind: Diode, Limit: 3})
	if err != nil || !reflect.DeepEqual(mpns(ps), []string{"QR1M", "QZ5V1", "SBX1100"}) {
		t.Errorf("find after the upgrade: %v %v", mpns(ps), err)
	}
}

func indexCount(t *testing.T, path, name string) int {
	t.Helper()
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var n int
	if err := db.QueryRow(`SELECT count(*) FROM sqlite_schema WHERE type = 'index' AND name = ?`, name).Scan(&n); err != nil {
		t.Fatal(err)
	}
	return n
}

// walkOn's rule, by cases: with matches, the expected rest against the
// other path; without, patience.
func TestWalkOn(t *testing.T) {
	cases := []struct {
		n, k, limit int
		other       float64
		want        bool
	}{
		{1000, 28, 50, 25722, true},   // (50−28)·1000/28 = 786
		{1000, 1, 50, 25722, false},   // 49,000
		{1000, 0, 50, 250000, true},   // 32,000 ≤ 250,000
		{16000, 0, 50, 250000, false}, // 512,000
		{4000, 49, 50, 100, true},     // 82
	}
	for _, c := range cases {
		if got := walkOn(c.n, c.k, c.limit, c.other); got != c.want {
			t.Errorf("walkOn(%d, %d, %d, %g) = %v", c.n, c.k, c.limit, c.other, got)
		}
	}
}

// Hits of documents the catalog no longer has are skipped: with a Limit,
// the next page of hits is read instead.
func TestRelevanceSkipsGhostHits(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	if _, err := s.Search(ctx, Query{Text: "x"}); err != nil { // builds the index
		t.Fatal(err)
	}
	s.mu.Lock()
	s.closeIndexLocked()
	ix, err := openIndex(s.indexDir(), true)
	if err != nil {
		s.mu.Unlock()
		t.Fatal(err)
	}
	// ghosts that outrank the real Schottky diodes (short text, the word twice)
	for _, id := range []string{"424242", "424243", "424244"} {
		if err := ix.Index(id, map[string]any{"text": "schottky schottky"}); err != nil {
			t.Fatal(err)
		}
	}
	ix.Close()
	s.mu.Unlock()
	var pages []int
	traceTextPage = func(from, size int) { pages = append(pages, from) }
	defer func() { traceTextPage = func(int, int) {} }()
	r, err := s.Search(ctx, Query{Text: "schottky", Limit: 1})
	if err != nil || r.Fallback {
		t.Fatal(err, r.Fallback)
	}
	if len(r.Parts) != 1 || !strings.HasPrefix(r.Parts[0].MPN, "SBX") || r.TextHits != 5 {
		t.Errorf("parts %v, hits %d", mpns(r.Parts), r.TextHits)
	}
	if len(pages) < 2 {
		t.Errorf("pages from %v: the ghosts should have filled the first", pages)
	}
	r, err = s.Search(ctx, Query{Text: "schottky"})
	if err != nil || !reflect.DeepEqual(sorted(mpns(r.Parts)), []string{"SBX1100", "SBX340-13"}) {
		t.Errorf("without limit: %v %v", mpns(r.Parts), err)
	}
}

// Without a Limit every match is read, so the order index would cost a
// random row read per part to save a sort: SQLite is kept from it, except
// where a condition fixes the manufacturer (then the index finds that
// maker's parts in order).
func TestNoLimitPlansAvoidOrderIndex(t *testing.T) {
	s := planStore(t, 300)
	cases := []struct {
		q        Query
		useOrder bool
	}{
		{Query{Kind: Fuse}, false},
		{Query{}, false},
		{Query{Kind: Diode, Conds: []Cond{{Field: "type", Op: "=", Text: "zener"}}}, false},
		{Query{Conds: []Cond{{Field: "mfr", Op: "!=", Text: "Sable Semi"}}}, false},
		{Query{Conds: []Cond{{Field: "mfr", Op: "=", Text: "Sable Semi"}}}, true},
	}
	for _, c := range cases {
		fq, err := compileQuery(c.q)
		if err != nil {
			t.Fatal(err)
		}
		stmt, args := fq.build(0, 0)
		p := queryPlan(t, s, stmt, args...)
		if strings.Contains(p, orderIndex) != c.useOrder {
			t.Errorf("%+v: plan %s", c.q, p)
		}
	}
}
