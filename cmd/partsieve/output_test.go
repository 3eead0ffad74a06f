package main

import (
	"testing"

	"partsieve/catalog"
)

func TestOfferSummary(t *testing.T) {
	stock := int64(100)
	p := &catalog.Part{Offers: []catalog.Offer{
		{Currency: "EUR", Stock: &stock, Breaks: []catalog.PriceBreak{{Qty: 100, Price: 0.20}, {Qty: 1, Price: 0.395}}},
		{Currency: "USD", Breaks: []catalog.PriceBreak{{Qty: 10, Price: 0.39}}},
		{Currency: "EUR", Stock: &stock, Breaks: []catalog.PriceBreak{{Qty: 1, Price: 0.41}}},
		{Currency: "EUR"}, // no prices
	}}
	price, st := bestOffer(p)
	if price != "0.39 USD / 0.395 EUR" || st != "200" {
		t.Errorf("bestOffer = %q, %q", price, st)
	}
	mp, cur, ms := bestOfferMachine(p)
	if mp != "0.39" || cur != "USD" || ms != "200" {
		t.Errorf("bestOfferMachine = %q %q %q", mp, cur, ms)
	}
	// the offers' breaks are left in their order
	if p.Offers[0].Breaks[0].Qty != 100 {
		t.Error("offer breaks were reordered")
	}
	if price, st := bestOffer(&catalog.Part{}); price != "" || st != "" {
		t.Errorf("no offers: %q %q", price, st)
	}
}

func TestMoney(t *testing.T) {
	for in, want := range map[float64]string{0.39: "0.39", 0.3375: "0.3375", 0.680824: "0.6808", 12: "12.00", 1.5: "1.50"} {
		if got := money(in); got != want {
			t.Errorf("money(%v) = %q, want %q", in, got, want)
		}
	}
}
