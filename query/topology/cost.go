package topology

import (
	"fmt"
	"math"
	"strings"

	"partsieve/catalog"
)

// partCost is the best unit price of a part at the build quantity.
type partCost struct {
	unit     float64 // in the build currency; NaN when not costed
	supplier string
	offerCur string
	offerPx  float64 // in the offer's currency
	stock    *int64  // stock of the chosen offer
	total    *int64  // stock over all offers (nil when none states it)
	note     string
}

// UnitPrice returns the unit price of part p at quantity qty in currency
// cur, from the offer that is cheapest after conversion, with the offer's
// supplier and a note. Rules:
//
//   - the price break that applies is the one with the largest quantity
//     not above qty; an offer whose first break is above qty is used only
//     when no offer applies at qty, at its first break, and the note says
//     the minimum order is above the quantity;
//   - an offer in cur is taken as is; one in another currency is converted
//     with rates[currency] (units of cur per unit of the offer currency);
//     one without a rate (or without a currency) is not costed.
//
// ok is false when no offer could be costed.
func UnitPrice(p *catalog.Part, qty int64, cur string, rates map[string]float64) (price float64, supplier, note string, ok bool) {
	c := computeCost(p, qty, cur, rates)
	return c.unit, c.supplier, c.note, !math.IsNaN(c.unit)
}

func computeCost(p *catalog.Part, qty int64, cur string, rates map[string]float64) *partCost {
	pc := &partCost{unit: math.NaN()}
	var uncosted []string
	fallback := partCost{unit: math.NaN()} // best offer whose first break is above qty
	for i := range p.Offers {
		o := &p.Offers[i]
		if o.Stock != nil {
			if pc.total == nil {
				pc.total = new(int64)
			}
			*pc.total += *o.Stock
		}
		px, moqNote, ok := breakPrice(o.Breaks, qty)
		if !ok {
			continue
		}
		oc := strings.ToUpper(strings.TrimSpace(o.Currency))
		rate := 1.0
		if oc != strings.ToUpper(cur) {
			r, ok := rates[oc]
			if !ok || oc == "" {
				uncosted = append(uncosted, o.Supplier)
				continue
			}
			rate = r
		}
		u := px * rate
		dst := pc
		if moqNote != "" {
			dst = &fallback
		}
		if math.IsNaN(dst.unit) || u < dst.unit {
			dst.unit, dst.supplier, dst.offerCur, dst.offerPx, dst.stock = u, o.Supplier, oc, px, o.Stock
			dst.note = moqNote
		}
	}
	if math.IsNaN(pc.unit) && !math.IsNaN(fallback.unit) {
		total := pc.total
		*pc = fallback
		pc.total = total
	}
	if len(uncosted) > 0 {
		msg := fmt.Sprintf("offer(s) from %s in a currency without a rate are not costed", strings.Join(uncosted, ", "))
		if pc.note != "" {
			pc.note += "; " + msg
		} else {
			pc.note = msg
		}
	}
	return pc
}

// breakPrice returns the unit price that applies at qty.
func breakPrice(b []catalog.PriceBreak, qty int64) (px float64, note string, ok bool) {
	bestQ := int64(-1)
	firstQ, firstPx := int64(math.MaxInt64), 0.0
	for _, br := range b {
		if !(br.Price >= 0) || math.IsInf(br.Price, 0) {
			continue
		}
		if br.Qty <= qty && br.Qty > bestQ {
			bestQ, px = br.Qty, br.Price
		}
		if br.Qty < firstQ {
			firstQ, firstPx = br.Qty, br.Price
		}
	}
	if bestQ >= 0 {
		return px, "", true
	}
	if firstQ != math.MaxInt64 {
		return firstPx, fmt.Sprintf("first price break is %d pieces, above the build quantity", firstQ), true
	}
	return 0, "", false
}

// unitOf returns the unit price of a record's part: from the part when
// it is in memory, else the price its record carries (Catalog.units).
func (e *engine) unitOf(p *catalog.Part, unit float64) float64 {
	if p != nil {
		return e.cost(p).unit
	}
	return unit
}

func (e *engine) cost(p *catalog.Part) *partCost {
	if c, ok := e.costs[p]; ok {
		return c
	}
	c := computeCost(p, e.s.Build.Quantity, e.s.Build.Currency, e.s.Build.Rates)
	e.costs[p] = c
	return c
}
