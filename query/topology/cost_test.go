package topology

import (
	"math"
	"strings"
	"testing"

	"partsieve/catalog"
)

func TestUnitPrice(t *testing.T) {
	p := mk(catalog.Diode, "schottky", "C1")
	p = withOffer(p, "Alpha", "EUR", 100, 1, 0.50, 100, 0.30, 1000, 0.20)
	p = withOffer(p, "Beta", "USD", 5000, 10, 0.40, 1000, 0.18)
	p = withOffer(p, "Gamma", "GBP", 9, 1, 0.01)
	rates := map[string]float64{"USD": 0.9}
	tests := []struct {
		qty      int64
		cur      string
		rates    map[string]float64
		want     float64
		supplier string
		note     string
	}{
		{1, "EUR", rates, 0.50, "Alpha", "Gamma"},         // Beta's first break is 10: 0.40·0.9 = 0.36 < 0.50
		{500, "EUR", rates, 0.30, "Alpha", "not costed"},  // Alpha 100+ 0.30; Beta 10+ 0.40·0.9 = 0.36
		{2000, "EUR", rates, 0.162, "Beta", "not costed"}, // Beta 1000+ 0.18·0.9
		{2000, "EUR", nil, 0.20, "Alpha", "not costed"},   // no rate: only EUR offers
		{2000, "USD", nil, 0.18, "Beta", "Alpha, Gamma"},  // EUR and GBP without a rate
		{2000, "GBP", nil, 0.01, "Gamma", "Alpha, Beta"},  // only Gamma in GBP
		{2000, "CHF", nil, math.NaN(), "", "not costed"},  // nothing costed
	}
	for _, tc := range tests {
		got, sup, note, ok := UnitPrice(&p, tc.qty, tc.cur, tc.rates)
		if math.IsNaN(tc.want) {
			if ok {
				t.Errorf("%d %s: costed %v, want not costed", tc.qty, tc.cur, got)
			}
			continue
		}
		if !ok || !near(got, tc.want, 1e-12) || sup != tc.supplier || !strings.Contains(note, tc.note) {
			t.Errorf("%d %s: %v %q %q %v, want %v %q (note with %q)", tc.qty, tc.cur, got, sup, note, ok, tc.want, tc.supplier, tc.note)
		}
	}
	// quantity below every break of the only offer: the first break, noted
	q := withOffer(mk(catalog.Fuse, "F", "C2"), "Delta", "EUR", 0, 100, 0.05)
	got, _, note, ok := UnitPrice(&q, 10, "EUR", nil)
	if !ok || got != 0.05 || !strings.Contains(note, "first price break is 100 pieces") {
		t.Errorf("MOQ case: %v %q %v", got, note, ok)
	}
}

// TestCostRanking: ranking by cost puts the cheapest qualifying design
// first and leaves uncosted ones last.
func TestCostRanking(t *testing.T) {
	base := e5Schottky()
	a := withOffer(base, "S", "EUR", 10, 1, 0.30)
	a.MPN = "CHEAP-B"
	b := withOffer(base, "S", "EUR", 10, 1, 0.10)
	b.MPN = "CHEAP-A"
	c := withOffer(base, "S", "JPY", 10, 1, 5)
	c.MPN = "UNCOSTED"
	r := Evaluate(mustSpec(t, runawaySpec), NewCatalog([]catalog.Part{c, a, b}), Options{Rank: RankCost, Topologies: []Topology{SeriesDiode}})
	tr := topo(t, r, SeriesDiode)
	var order []string
	for _, cd := range tr.Candidates {
		order = append(order, cd.Parts[0].MPN)
	}
	if strings.Join(order, ",") != "CHEAP-A,CHEAP-B,UNCOSTED" {
		t.Errorf("cost order %v", order)
	}
	if !math.IsNaN(float64(tr.Candidates[2].Cost)) || float64(tr.Candidates[0].Cost) != 0.10 {
		t.Errorf("costs %v %v", tr.Candidates[0].Cost, tr.Candidates[2].Cost)
	}
}
