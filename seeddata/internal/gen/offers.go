package gen

import (
	"fmt"
	"math"
	"strings"

	"partsieve/catalog"
)

// supplier is an invented distributor.
type supplier struct {
	name     string
	currency string
	fx       float64 // price in this currency per EUR of the base price
	sku      func(p *catalog.Part) string
	// moq and breaks from the part's base price (EUR at 1000+)
	plan func(base float64) (moq int64, breaks []int64)
}

// Invented distributors (none exists; any likeness is accidental).
var suppliers = []supplier{
	{name: "Alderholt Elektronik", currency: "EUR", fx: 1,
		sku: func(p *catalog.Part) string { return fmt.Sprintf("AE%07d", hash(p.Mfr, p.MPN, "ae")%10_000_000) },
		plan: func(base float64) (int64, []int64) {
			if base > 0.3 {
				return 1, []int64{1, 10, 100, 1000}
			}
			return 1, []int64{1, 10, 100, 1000, 5000}
		}},
	{name: "Riverbend Parts Supply", currency: "USD", fx: 1.08,
		sku: func(p *catalog.Part) string { return fmt.Sprintf("RBP-%07d", hash(p.Mfr, p.MPN, "rb")%10_000_000) },
		plan: func(base float64) (int64, []int64) {
			if base < 0.05 {
				return 10, []int64{10, 100, 1000, 5000}
			}
			return 1, []int64{1, 10, 100, 1000}
		}},
	{name: "Quayside Components", currency: "EUR", fx: 1,
		sku: func(p *catalog.Part) string {
			code := strings.ToUpper(strings.ReplaceAll(p.Mfr, " ", ""))[:3]
			return "QC-" + code + "-" + p.MPN
		},
		plan: func(base float64) (int64, []int64) {
			if base < 0.1 {
				return 100, []int64{100, 1000, 5000}
			}
			return 10, []int64{10, 100, 1000}
		}},
}

// qtyFactor is the unit price at a break relative to the 1000+ price
// (invented for demo: small quantities carry handling cost).
var qtyFactor = map[int64]float64{1: 3.0, 10: 2.1, 100: 1.4, 1000: 1.0, 5000: 0.82}

// secondOfferPercent is the share of parts listed by a second supplier.
const secondOfferPercent = 30

// addOffers attaches one offer, and for about 30 % of parts a second one
// from another supplier. base is the part's unit price in EUR at 1000+.
//
// Unit price at break q: base·qtyFactor[q]·s·fx, with a per-supplier,
// per-part spread s in [0.92, 1.15]; rounded to 4 decimals below 0.1,
// 3 below 1, else 2 (prices fall strictly with quantity because adjacent
// factors differ by at least 18 %).
func addOffers(p *catalog.Part, base float64) {
	first := int(hash(p.Mfr, p.MPN, "supplier") % uint64(len(suppliers)))
	p.Offers = append(p.Offers, offer(p, suppliers[first], base))
	if hash(p.Mfr, p.MPN, "second")%100 < secondOfferPercent {
		second := (first + 1 + int(hash(p.Mfr, p.MPN, "which")%2)) % len(suppliers)
		p.Offers = append(p.Offers, offer(p, suppliers[second], base))
	}
}

func offer(p *catalog.Part, s supplier, base float64) catalog.Offer {
	moq, qtys := s.plan(base)
	spread := 0.92 + float64(hash(p.Mfr, p.MPN, s.name, "spread")%24)/100
	o := catalog.Offer{Supplier: s.name, SKU: s.sku(p), MOQ: moq, Currency: s.currency}
	for _, q := range qtys {
		o.Breaks = append(o.Breaks, catalog.PriceBreak{Qty: q, Price: roundPrice(base * qtyFactor[q] * spread * s.fx)})
	}
	// stock: 0 for about one offer in twelve, else log-uniform 10…100 000,
	// two significant digits; obsolete parts keep a twentieth of that
	h := hash(p.Mfr, p.MPN, s.name, "stock")
	var stock int64
	if h%12 != 0 {
		stock = int64(roundSig(math.Pow(10, 1+float64(h/12%4000)/1000), 2))
	}
	if p.Lifecycle == "obsolete" {
		stock /= 20
	}
	o.Stock = &stock
	return o
}

func roundPrice(v float64) float64 {
	switch {
	case v < 0.1:
		return roundStep(v, 0.0001)
	case v < 1:
		return roundStep(v, 0.001)
	}
	return roundStep(v, 0.01)
}
