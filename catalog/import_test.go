package catalog

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"
)

func TestPutOutcomes(t *testing.T) {
	s := openTemp(t)
	ctx := context.Background()
	out := importParts(t, s, "a", sampleParts()...)
	for i, o := range out {
		if o != Added {
			t.Errorf("part %d: %v, want added", i, o)
		}
	}
	if g := gen(t, s); g != 1 {
		t.Errorf("generation after first import = %d", g)
	}

	// the same file again: nothing changes, the generation stays
	before := dumpParts(t, s)
	for i, o := range importParts(t, s, "a", sampleParts()...) {
		if o != Unchanged {
			t.Errorf("re-import part %d: %v", i, o)
		}
	}
	if g := gen(t, s); g != 1 {
		t.Errorf("generation after identical re-import = %d", g)
	}
	if after := dumpParts(t, s); after != before {
		t.Errorf("identical re-import changed the catalog:\n%s\n---\n%s", before, after)
	}

	tx, err := s.BeginImport(ctx, Source{Label: "b"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	// other spelling of the same identity, one value changed, one added,
	// most columns absent: absent must not erase
	p := part(Diode, "SABLE SEMI", "sbx 340_13", "vrrm", 45, "ir", 0.0005, "vf", 0.5+1e-12)
	o, ch, err := tx.Put(p)
	if err != nil || o != Updated {
		t.Fatalf("Put = %v, %v", o, err)
	}
	want := []Change{
		{Mfr: "Sable Semi", MPN: "SBX340-13", Field: "vrrm", Old: fmtNum(40, "vrrm"), New: fmtNum(45, "vrrm")},
		{Mfr: "Sable Semi", MPN: "SBX340-13", Field: "ir", Old: "", New: fmtNum(0.0005, "ir")},
	}
	if !reflect.DeepEqual(ch, want) {
		t.Errorf("changes = %+v\nwant %+v", ch, want)
	}
	// identical duplicate row in the same file
	o, ch, err = tx.Put(p)
	if err != nil || o != Unchanged || len(ch) != 0 {
		t.Errorf("duplicate row: %v %v %v", o, ch, err)
	}
	if c := tx.Counts(); c.Added != 0 || c.Updated != 1 || c.Unchanged != 1 {
		t.Errorf("counts %+v", c)
	}
	if err := tx.Commit(Source{Read: 2}); err != nil {
		t.Fatal(err)
	}
	ps, err := s.ByMPN(ctx, "SBX340-13")
	if err != nil || len(ps) != 1 {
		t.Fatalf("ByMPN: %v %v", ps, err)
	}
	got := ps[0]
	if v, _ := got.Get("vrrm"); v != 45 {
		t.Errorf("vrrm = %v", v)
	}
	if v, ok := got.Get("ifsm"); !ok || v != 80 {
		t.Errorf("ifsm erased by a row without it: %v %v", v, ok)
	}
	if got.Desc != "Schottky rectifier 40V 3A" || got.Package != "SMA" || got.RoHS == nil || !*got.RoHS || got.Lifecycle != "active" {
		t.Errorf("text fields lost: %+v", got)
	}
	if got.Mfr != "Sable Semi" || got.MPN != "SBX340-13" {
		t.Errorf("stored spelling changed: %q %q", got.Mfr, got.MPN)
	}
	if len(got.Offers) != 1 {
		t.Errorf("offers = %+v", got.Offers)
	}
	if g := gen(t, s); g != 2 {
		t.Errorf("generation = %d", g)
	}
	srcs, err := s.Sources(ctx)
	if err != nil || len(srcs) != 2 {
		t.Fatalf("sources %v %v", srcs, err)
	}
	if b := srcs[0]; b.Label != "b" || b.Read != 2 || b.Updated != 1 || b.Unchanged != 1 || b.Added != 0 {
		t.Errorf("newest source %+v", b)
	}
	if a := srcs[1]; a.Label != "a" || a.File != "a.csv" || a.SHA256 != "sha-a" || a.Unchanged != len(sampleParts()) {
		t.Errorf("source a %+v", a)
	}
}

func fmtNum(v float64, field string) string {
	f, _ := FieldByName(field)
	return formatValue(&f, v)
}

func dumpParts(t testing.TB, s *Store) string {
	var keep []string
	for _, l := range strings.Split(dump(t, s), "\n") {
		if !strings.HasPrefix(l, "sources ") {
			keep = append(keep, l)
		}
	}
	return strings.Join(keep, "\n")
}

func TestPutKindChangeClearsFields(t *testing.T) {
	s := openTemp(t)
	importParts(t, s, "a", part(Diode, "Acme", "X1", "type", "schottky", "vrrm", 40, "desc", "odd one"))
	tx, _ := s.BeginImport(context.Background(), Source{Label: "b"})
	defer tx.Rollback()
	o, ch, err := tx.Put(part(MOSFET, "Acme", "X1", "vds", 30))
	if err != nil || o != Updated {
		t.Fatal(o, err)
	}
	fields := map[string]Change{}
	for _, c := range ch {
		fields[c.Field] = c
	}
	if fields["kind"].New != "mosfet" || fields["vrrm"].New != "" || fields["type"].Old != "schottky" || fields["type"].New != "" {
		t.Errorf("changes %+v", ch)
	}
	tx.Commit(Source{})
	ps, _ := s.ByMPN(context.Background(), "X1")
	if _, ok := ps[0].Get("vrrm"); ok || ps[0].Type != "" || ps[0].Desc != "odd one" {
		t.Errorf("after kind change: %+v", ps[0])
	}
}

func TestPutRejectsBadParts(t *testing.T) {
	s := openTemp(t)
	tx, err := s.BeginImport(context.Background(), Source{Label: "bad"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	nan := part(Diode, "A", "B")
	nan.Set("vf", 0)
	nan.Num["vf"] = nan.Num["vf"] / nan.Num["vf"] // NaN
	cases := []struct {
		p    *Part
		want string
	}{
		{part(Diode, "", "B1"), `part "B1": manufacturer is empty`},
		{part(Diode, "A", " - "), `part of "A": part number is empty`},
		{part("resistor", "A", "B"), `part A B: kind "resistor" is not one of diode, fuse, mosfet`},
		{part(Diode, "A", "B", "type", "n"), `part A B: type "n" is not a diode type (one of rectifier, schottky, zener, tvs)`},
		{part(Diode, "A", "B", "vds", 30), `part A B: field vds does not apply to a diode`},
		{part(Diode, "A", "B", "lifecycle", "retired"), `part A B: lifecycle "retired" is not one of active, nrnd, obsolete, unknown`},
		{part(Diode, "A", "B", "mystery", 1), `part A B: "mystery" is not a numeric field`},
		{nan, `part A B: vf is not a finite number`},
		{&Part{Kind: Fuse, Mfr: "A", MPN: "B", Offers: []Offer{{SKU: "x"}}}, `part A B: offer 1 has no supplier`},
		{&Part{Kind: Fuse, Mfr: "A", MPN: "B", Offers: []Offer{{Supplier: "S", Breaks: []PriceBreak{{0, 1}}}}}, `part A B: offer 1: price break quantity 0 is less than 1`},
		{&Part{Kind: Fuse, Mfr: "A", MPN: "B", Offers: []Offer{{Supplier: "S", Breaks: []PriceBreak{{10, 1}, {10, 2}}}}}, `part A B: offer 1: price break quantity 10 is given twice with different prices`},
	}
	for _, c := range cases {
		_, _, err := tx.Put(c.p)
		if err == nil || err.Error() != c.want || !errors.Is(err, ErrInvalidPart) {
			t.Errorf("Put(%s %s) = %v\nwant %s (ErrInvalidPart)", c.p.Mfr, c.p.MPN, err, c.want)
		}
	}
	// the transaction is still usable
	if o, _, err := tx.Put(part(Fuse, "A", "B", "type", "tt", "in", 1)); err != nil || o != Added {
		t.Fatalf("good part after bad ones: %v %v", o, err)
	}
	tx.Commit(Source{})
	ps, _ := s.ByMPN(context.Background(), "B")
	if len(ps) != 1 || ps[0].Type != "TT" {
		t.Errorf("enum not canonical: %+v", ps)
	}
}

func TestOffersFromTwoSuppliers(t *testing.T) {
	s := openTemp(t)
	ctx := context.Background()
	p := part(Diode, "Sable Semi", "SBX1100", "vrrm", 100)
	p.Offers = []Offer{offer("Northwind Parts", "NW-7", 500, 1, "EUR", PriceBreak{1, 0.5}, PriceBreak{100, 0.3})}
	importParts(t, s, "northwind", p)

	q := part(Diode, "Sable Semi", "SBX1100")
	q.Offers = []Offer{offer("Bluefin Supply", "BF 22", 40, 10, "usd", PriceBreak{10, 0.4})}
	if o := importParts(t, s, "bluefin", q); o[0] != Updated {
		t.Errorf("second supplier: %v", o[0])
	}
	ps, err := s.ByMPN(ctx, "sbx1100")
	if err != nil || len(ps) != 1 || len(ps[0].Offers) != 2 {
		t.Fatalf("%+v %v", ps, err)
	}
	bf, nw := ps[0].Offers[0], ps[0].Offers[1]
	if bf.Supplier != "Bluefin Supply" || bf.Currency != "USD" || *bf.Stock != 40 || bf.MOQ != 10 || !reflect.DeepEqual(bf.Breaks, []PriceBreak{{10, 0.4}}) {
		t.Errorf("bluefin offer %+v", bf)
	}
	if nw.Supplier != "Northwind Parts" || !reflect.DeepEqual(nw.Breaks, []PriceBreak{{1, 0.5}, {100, 0.3}}) {
		t.Errorf("northwind offer %+v", nw)
	}

	// new prices from northwind, stock column absent: breaks replaced,
	// stock kept; the supplier name matched through its key
	r := part(Diode, "Sable Semi", "SBX1100")
	r.Offers = []Offer{{Supplier: "NORTHWIND  PARTS", SKU: "NW-7", Breaks: []PriceBreak{{100, 0.28}, {1, 0.5}}}}
	tx, _ := s.BeginImport(ctx, Source{Label: "northwind"})
	o, ch, err := tx.Put(r)
	if err != nil || o != Updated {
		t.Fatal(o, err)
	}
	want := []Change{{Mfr: "Sable Semi", MPN: "SBX1100", Field: "offer Northwind Parts/NW-7 price_breaks", Old: "1: 0.5, 100: 0.3", New: "1: 0.5, 100: 0.28"}}
	if !reflect.DeepEqual(ch, want) {
		t.Errorf("changes %+v", ch)
	}
	tx.Commit(Source{})
	ps, _ = s.ByMPN(ctx, "SBX1100")
	nw = ps[0].Offers[1]
	if *nw.Stock != 500 || nw.Breaks[1].Price != 0.28 {
		t.Errorf("after update %+v", nw)
	}
}

func TestRollbackLeavesCatalogUnchanged(t *testing.T) {
	s := openTemp(t)
	ctx := context.Background()
	importParts(t, s, "a", sampleParts()...)
	before := dump(t, s)
	tx, err := s.BeginImport(ctx, Source{Label: "new"})
	if err != nil {
		t.Fatal(err)
	}
	p := part(Diode, "Sable Semi", "SBX340-13", "vrrm", 45)
	p.Offers = []Offer{offer("Northwind Parts", "NW-1001", 5, 1, "EUR"), offer("Other", "", 1, 1, "EUR")}
	for _, p := range []*Part{p, part(Fuse, "New Maker", "NM1", "in", 1)} {
		if _, _, err := tx.Put(p); err != nil {
			t.Fatal(err)
		}
	}
	if err := tx.Rollback(); err != nil {
		t.Fatal(err)
	}
	if after := dump(t, s); after != before {
		t.Errorf("rollback changed the catalog:\n%s\n---\n%s", before, after)
	}
	if _, _, err := tx.Put(p); err != errFinished {
		t.Errorf("Put after Rollback: %v", err)
	}
	if err := tx.Commit(Source{}); err != errFinished {
		t.Errorf("Commit after Rollback: %v", err)
	}
}

func TestRemoveSource(t *testing.T) {
	s := openTemp(t)
	ctx := context.Background()
	p1 := part(Diode, "Acme", "ONLY-A", "vrrm", 40, "desc", "lonely schottky")
	p1.Offers = []Offer{offer("Supplier A", "A1", 1, 1, "EUR")}
	p2a := part(Diode, "Acme", "SHARED", "vrrm", 60)
	p2a.Offers = []Offer{offer("Supplier A", "A2", 1, 1, "EUR")}
	p2b := part(Diode, "Acme", "SHARED")
	p2b.Offers = []Offer{offer("Supplier B", "B2", 1, 1, "EUR")}
	p3 := part(Diode, "Acme", "ONLY-B", "vrrm", 80)
	importParts(t, s, "A", p1, p2a)
	importParts(t, s, "B", p2b, p3)
	// make sure the index exists and is current before the removal
	if r, err := s.Search(ctx, Query{Text: "lonely"}); err != nil || len(r.Parts) != 1 {
		t.Fatalf("text search before removal: %+v %v", r, err)
	}
	g := gen(t, s)

	if _, _, err := s.RemoveSource(ctx, "nope"); err == nil || !strings.Contains(err.Error(), `has no source labelled "nope"`) {
		t.Errorf("unknown label: %v", err)
	}
	parts, offers, err := s.RemoveSource(ctx, "A")
	if err != nil || parts != 1 || offers != 2 {
		t.Fatalf("RemoveSource = %d parts, %d offers, %v", parts, offers, err)
	}
	if got := mpns(findAll(t, s)); !reflect.DeepEqual(got, []string{"ONLY-B", "SHARED"}) {
		t.Errorf("left %v", got)
	}
	ps, _ := s.ByMPN(ctx, "SHARED")
	if len(ps[0].Offers) != 1 || ps[0].Offers[0].Supplier != "Supplier B" {
		t.Errorf("shared part offers %+v", ps[0].Offers)
	}
	if v, _ := ps[0].Get("vrrm"); v != 60 {
		t.Errorf("shared part values kept: %v", v)
	}
	srcs, _ := s.Sources(ctx)
	if len(srcs) != 1 || srcs[0].Label != "B" {
		t.Errorf("sources %+v", srcs)
	}
	if gen(t, s) != g+1 {
		t.Errorf("generation %d, want %d", gen(t, s), g+1)
	}
	r, err := s.Search(ctx, Query{Text: "lonely"})
	if err != nil || len(r.Parts) != 0 || r.Fallback {
		t.Errorf("removed part still found: %+v %v", r, err)
	}
	if probs, err := s.Check(ctx); err != nil || len(probs) != 0 {
		t.Errorf("Check after removal: %v %v", probs, err)
	}
}

// A part new in this import, listed again in the same file: its offers
// are still buffered when the second row arrives.
func TestPutRepeatedNewPartInOneImport(t *testing.T) {
	s := openTemp(t)
	tx, err := s.BeginImport(context.Background(), Source{Label: "f"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	mk := func(price float64) *Part {
		p := part(Fuse, "Lumen Fuse", "LF-1A-F", "type", "F", "in", 1)
		p.Offers = []Offer{offer("Northwind Parts", "NW-9", 10, 1, "EUR", PriceBreak{1, price}),
			offer("Northwind Parts", "NW-9", 99, 1, "EUR")} // same offer twice: the first wins
		return p
	}
	for i, want := range []Outcome{Added, Unchanged, Updated} {
		price := 0.1
		if i == 2 {
			price = 0.2
		}
		p := mk(price)
		if i > 0 {
			p.Offers = p.Offers[:1]
		}
		o, ch, err := tx.Put(p)
		if err != nil || o != want {
			t.Fatalf("row %d: %v %v %v", i+1, o, ch, err)
		}
		if i == 2 && (len(ch) != 1 || ch[0].Field != "offer Northwind Parts/NW-9 price_breaks" || ch[0].Old != "1: 0.1" || ch[0].New != "1: 0.2") {
			t.Errorf("changes %+v", ch)
		}
	}
	if err := tx.Commit(Source{}); err != nil {
		t.Fatal(err)
	}
	ps, _ := s.ByMPN(context.Background(), "LF-1A-F")
	if len(ps) != 1 || len(ps[0].Offers) != 1 || *ps[0].Offers[0].Stock != 10 || ps[0].Offers[0].Breaks[0].Price != 0.2 {
		t.Errorf("stored %+v", ps)
	}
}

// Price breaks are stored as canonical JSON in ascending quantity, one
// entry per quantity, whatever order the sheet gave them in; the caller's
// slice is left as it was.
func TestEncodeBreaks(t *testing.T) {
	for _, c := range []struct {
		in   []PriceBreak
		want string
		err  string
	}{
		{nil, "[]", ""},
		{[]PriceBreak{{1, 0.25}, {100, 0.125}, {1000, 0.0625}}, "[[1,0.25],[100,0.125],[1000,0.0625]]", ""},
		{[]PriceBreak{{1000, 0.0625}, {1, 0.25}, {100, 0.125}}, "[[1,0.25],[100,0.125],[1000,0.0625]]", ""},
		{[]PriceBreak{{10, 0.5}, {1, 0.75}, {10, 0.5}}, "[[1,0.75],[10,0.5]]", ""},
		{[]PriceBreak{{1, 0.1}, {5000, 1e-3}}, "[[1,0.1],[5000,0.001]]", ""},
		{[]PriceBreak{{10, 1}, {10, 2}}, "", "price break quantity 10 is given twice with different prices"},
		{[]PriceBreak{{0, 1}}, "", "price break quantity 0 is less than 1"},
		{[]PriceBreak{{1, math.NaN()}}, "", "price NaN at quantity 1 is not a price"},
		{[]PriceBreak{{1, -0.5}}, "", "price -0.5 at quantity 1 is not a price"},
	} {
		before := fmt.Sprint(c.in)
		got, err := encodeBreaks(c.in)
		if c.err != "" {
			if err == nil || err.Error() != c.err {
				t.Errorf("%v: error %v, want %q", c.in, err, c.err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("%v: %q, %v; want %q", c.in, got, err, c.want)
		}
		if fmt.Sprint(c.in) != before {
			t.Errorf("encodeBreaks changed its input: %v, was %s", c.in, before)
		}
		if back, err := decodeBreaks(got); err != nil || len(back) == 0 && len(c.in) > 0 {
			t.Errorf("%q does not decode: %v %v", got, back, err)
		}
	}
}
