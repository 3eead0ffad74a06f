package catalog

import (
	"context"
	"reflect"
	"strings"
	"testing"
)

func sampleStore(t testing.TB) *Store {
	t.Helper()
	s := openTemp(t)
	importParts(t, s, "sample", sampleParts()...)
	return s
}

func TestFindConditions(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	cases := []struct {
		name string
		q    Query
		want []string // in order
	}{
		{"all, by mfr then mpn", Query{}, []string{"HPN3020", "HPN4012", "LF-2A-T", "LF-500M-F", "QR1M", "QZ5V1", "SBX1100", "SBX340-13", "TNM6008", "TPM4030", "TV15A"}},
		{"kind", Query{Kind: Fuse}, []string{"LF-2A-T", "LF-500M-F"}},
		{"kind any case", Query{Kind: "FUSE"}, []string{"LF-2A-T", "LF-500M-F"}},
		{">=", Query{Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 100}}}, []string{"QR1M", "SBX1100"}},
		{">", Query{Conds: []Cond{{Field: "vrrm", Op: ">", Num: 100}}}, []string{"QR1M"}},
		{"<", Query{Conds: []Cond{{Field: "rdson", Op: "<", Num: 0.012}}}, []string{"TNM6008"}},
		{"<=", Query{Conds: []Cond{{Field: "rdson", Op: "<=", Num: 0.012}}}, []string{"HPN4012", "TNM6008"}},
		{"= with parse noise", Query{Conds: []Cond{{Field: "rdson", Op: "=", Num: 12 * 0.001}}}, []string{"HPN4012"}},
		{"!= skips absent", Query{Conds: []Cond{{Field: "rdson", Op: "!=", Num: 0.012}}}, []string{"TNM6008", "TPM4030"}},
		{"absent never matches <", Query{Conds: []Cond{{Field: "vf", Op: "<", Num: 10}}}, []string{"QR1M", "SBX1100", "SBX340-13"}},
		{"two conds", Query{Conds: []Cond{{Field: "vds", Op: ">=", Num: 40}, {Field: "id", Op: ">", Num: 10}}}, []string{"HPN4012", "TNM6008"}},
		{"bool true by num", Query{Conds: []Cond{{Field: "aecq", Op: "=", Num: 1}}}, []string{"HPN4012", "QR1M"}},
		{"bool yes by text", Query{Conds: []Cond{{Field: "rohs", Op: "=", Text: "yes"}}}, []string{"SBX1100", "SBX340-13"}},
		{"bool != skips absent", Query{Conds: []Cond{{Field: "aecq", Op: "!=", Text: "no"}}}, []string{"HPN4012", "QR1M"}},
		{"enum any case", Query{Conds: []Cond{{Field: "type", Op: "=", Text: "SCHOTTKY"}}}, []string{"SBX1100", "SBX340-13"}},
		{"enum fuse letter", Query{Conds: []Cond{{Field: "type", Op: "=", Text: "t"}}}, []string{"LF-2A-T"}},
		{"enum !=", Query{Kind: MOSFET, Conds: []Cond{{Field: "type", Op: "!=", Text: "n"}}}, []string{"TPM4030"}},
		{"kind as cond", Query{Conds: []Cond{{Field: "kind", Op: "=", Text: "fuse"}}}, []string{"LF-2A-T", "LF-500M-F"}},
		{"kind != cond", Query{Conds: []Cond{{Field: "kind", Op: "!=", Text: "diode"}, {Field: "package", Op: "=", Text: "sot-23"}}}, []string{"HPN3020", "TPM4030"}},
		{"text contains", Query{Conds: []Cond{{Field: "package", Op: "~", Text: "sod"}}}, []string{"QZ5V1", "SBX1100"}},
		{"text contains literal %", Query{Conds: []Cond{{Field: "desc", Op: "~", Text: "100%"}}}, nil},
		{"text = any case", Query{Conds: []Cond{{Field: "package", Op: "=", Text: "dfn5X6"}}}, []string{"HPN4012", "TNM6008"}},
		{"mpn = normalised", Query{Conds: []Cond{{Field: "mpn", Op: "=", Text: "lf 2a t"}}}, []string{"LF-2A-T"}},
		{"mfr = normalised", Query{Conds: []Cond{{Field: "mfr", Op: "=", Text: "tern-micro"}}}, []string{"TNM6008", "TPM4030", "TV15A"}},
		{"limit", Query{Kind: Diode, Limit: 2}, []string{"QR1M", "QZ5V1"}},
		{"contradiction", Query{Kind: Fuse, Conds: []Cond{{Field: "vrrm", Op: ">", Num: 0}}}, nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ps, err := s.Find(ctx, c.q)
			if err != nil {
				t.Fatal(err)
			}
			if got := mpns(ps); !reflect.DeepEqual(got, c.want) && !(len(got) == 0 && len(c.want) == 0) {
				t.Errorf("got %v\nwant %v", got, c.want)
			}
		})
	}
}

func TestFindSortNullsLast(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	cases := []struct {
		q    Query
		want []string
	}{
		{Query{Kind: MOSFET, Sort: "rdson"}, []string{"TNM6008", "HPN4012", "TPM4030", "HPN3020"}},
		{Query{Kind: MOSFET, Sort: "rdson", Desc: true}, []string{"TPM4030", "HPN4012", "TNM6008", "HPN3020"}},
		{Query{Kind: MOSFET, Sort: "rdson", Limit: 3}, []string{"TNM6008", "HPN4012", "TPM4030"}},
		{Query{Kind: MOSFET, Sort: "rdson", Limit: 4}, []string{"TNM6008", "HPN4012", "TPM4030", "HPN3020"}},
		{Query{Kind: Diode, Sort: "vf"}, []string{"SBX340-13", "SBX1100", "QR1M", "QZ5V1", "TV15A"}},
		{Query{Kind: Diode, Sort: "vf", Desc: true, Limit: 4}, []string{"QR1M", "SBX1100", "SBX340-13", "QZ5V1"}},
		{Query{Kind: Diode, Sort: "lifecycle"}, []string{"SBX340-13", "QR1M", "QZ5V1", "SBX1100", "TV15A"}},
		{Query{Kind: Diode, Sort: "mpn", Desc: true}, []string{"TV15A", "SBX340-13", "SBX1100", "QZ5V1", "QR1M"}},
		{Query{Kind: Fuse, Sort: "in"}, []string{"LF-500M-F", "LF-2A-T"}},
		{Query{Kind: Diode, Sort: "package", Limit: 3}, []string{"SBX340-13", "QR1M", "TV15A"}},
	}
	for _, c := range cases {
		ps, err := s.Find(ctx, c.q)
		if err != nil {
			t.Fatal(err)
		}
		if got := mpns(ps); !reflect.DeepEqual(got, c.want) {
			t.Errorf("%+v:\ngot  %v\nwant %v", c.q, got, c.want)
		}
	}
}

func TestFindReturnsFullParts(t *testing.T) {
	s := sampleStore(t)
	ps, err := s.Find(context.Background(), Query{Conds: []Cond{{Field: "mpn", Op: "=", Text: "SBX340-13"}}, Offers: true})
	if err != nil || len(ps) != 1 {
		t.Fatal(ps, err)
	}
	want := *sampleParts()[0]
	want.Offers[0].Currency = "EUR"
	if !reflect.DeepEqual(ps[0], want) {
		t.Errorf("got  %+v\nwant %+v", ps[0], want)
	}
	ps, _ = s.Find(context.Background(), Query{Kind: Fuse, Sort: "in", Limit: 1})
	if len(ps) != 1 || ps[0].Offers != nil {
		t.Errorf("offers loaded without Offers: %+v", ps)
	}
	if !reflect.DeepEqual(ps[0], *sampleParts()[10]) {
		t.Errorf("got  %+v\nwant %+v", ps[0], *sampleParts()[10])
	}
}

func TestFindErrors(t *testing.T) {
	s := sampleStore(t)
	cases := []struct {
		q    Query
		want string
	}{
		{Query{Kind: "resistor"}, `unknown kind "resistor" (one of diode, fuse, mosfet)`},
		{Query{Conds: []Cond{{Field: "voltage", Op: ">", Num: 1}}}, "condition voltage>: unknown field \"voltage\" (see `partsieve fields`)"},
		{Query{Conds: []Cond{{Field: "vds", Op: "~", Num: 1}}}, `condition vds~1: operator "~" does not apply to a number (use = != < <= > >=)`},
		{Query{Conds: []Cond{{Field: "type", Op: "=", Text: "shottky"}}}, `condition type=shottky: "shottky" is not one of rectifier, schottky, zener, tvs, n, p, FF, F, M, T, TT`},
		{Query{Conds: []Cond{{Field: "desc", Op: ">", Text: "a"}}}, `condition desc>a: operator ">" does not apply to a text field (use =, != or ~)`},
		{Query{Conds: []Cond{{Field: "rohs", Op: "=", Text: "maybe"}}}, `condition rohs=maybe: "maybe" is not yes or no`},
		{Query{Conds: []Cond{{Field: "rohs", Op: "<", Num: 1}}}, `condition rohs<1: operator "<" does not apply to a yes/no field (use = or !=)`},
		{Query{Sort: "price"}, "cannot sort by \"price\": no such field (see `partsieve fields`)"},
	}
	for _, c := range cases {
		_, err := s.Find(context.Background(), c.q)
		if err == nil || err.Error() != c.want {
			t.Errorf("%+v: %v\nwant %s", c.q, err, c.want)
		}
	}
}

// TestFindPlan pins the plans of typical parametric queries: a kind and a
// sort on an indexed rating walk that rating's partial index and stop
// after LIMIT (no temp B-tree for ORDER BY).
func TestFindPlan(t *testing.T) {
	s := sampleStore(t)
	cases := []struct {
		q     Query
		phase int
		index string
	}{
		{Query{Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 40}, {Field: "rdson", Op: "<=", Num: 0.02}, {Field: "id", Op: ">=", Num: 10}}, Sort: "rdson", Limit: 50}, 1, "parts_mosfet_rdson"},
		{Query{Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 100}, {Field: "ifav", Op: ">=", Num: 1}}, Sort: "vf", Limit: 50}, 1, "parts_diode_vf"},
		{Query{Kind: Diode, Sort: "vrrm", Desc: true, Limit: 20}, 1, "parts_diode_vrrm"},
		{Query{Kind: Fuse, Conds: []Cond{{Field: "in", Op: ">=", Num: 1}}, Sort: "in", Limit: 10}, 1, "parts_fuse_in"},
		{Query{Conds: []Cond{{Field: "mpn", Op: "=", Text: "ab-12"}}}, 0, "sqlite_autoindex_parts_1"},
	}
	for _, c := range cases {
		fq, err := compileQuery(c.q)
		if err != nil {
			t.Fatal(err)
		}
		stmt, args := fq.build(c.phase, c.q.Limit)
		p := queryPlan(t, s, stmt, args...)
		if !strings.Contains(p, "USING INDEX "+c.index) || strings.Contains(p, "TEMP B-TREE") {
			t.Errorf("%s\nplan: %s\nwant index %s without temp B-tree", stmt, p, c.index)
		}
	}
}

func TestByMPN(t *testing.T) {
	s := sampleStore(t)
	importParts(t, s, "other", part(Fuse, "Another Maker", "lf2at", "in", 2))
	ps, err := s.ByMPN(context.Background(), "lf 2a-t")
	if err != nil {
		t.Fatal(err)
	}
	if len(ps) != 2 || ps[0].Mfr != "Another Maker" || ps[1].Mfr != "Lumen Fuse" {
		t.Errorf("ByMPN = %+v", ps)
	}
	if ps, err := s.ByMPN(context.Background(), "nothing"); err != nil || len(ps) != 0 {
		t.Errorf("unknown: %v %v", ps, err)
	}
}

func TestStats(t *testing.T) {
	s := sampleStore(t)
	st, err := s.Stats(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	want := Stats{Parts: 11, Offers: 1, Sources: 1, Schema: schemaVersion, IndexOK: true,
		ByKind: map[string]int{"diode": 5, "mosfet": 4, "fuse": 2},
		ByType: map[string]int{"schottky": 2, "rectifier": 1, "zener": 1, "tvs": 1, "n": 3, "p": 1, "T": 1, "F": 1}}
	if !reflect.DeepEqual(st, want) {
		t.Errorf("got  %+v\nwant %+v", st, want)
	}
}
