package shortlist

import (
	"cmp"
	"fmt"
	"math"
	"math/big"
	"slices"
	"strings"

	"partsieve/catalog"
)

// MaxSparesPct bounds the spares percentage (a tool choice: more than ten
// times the build is a typing error, not a spares policy).
const MaxSparesPct = 1000

// maxPieces bounds every quantity, far below the int64 range (the spec
// allows builds up to 10¹²).
const maxPieces = 1e15

// Quantity returns the pieces of one line before any supplier minimum:
//
//	needed      = build × perBoard
//	withSpares  = ⌈needed × (1 + sparesPct/100)⌉
//
// sparesPct is taken to six decimals (so 0.1 % is exactly a thousandth and
// 1000 boards with 0.1 % spares need 1001 pieces, not 1002 through binary
// rounding); the ceiling is computed exactly in integers.
func Quantity(build, perBoard int64, sparesPct float64) (needed, withSpares int64, err error) {
	if build < 1 || perBoard < 1 {
		return 0, 0, fmt.Errorf("quantity: build %d × %d per board: both must be at least 1", build, perBoard)
	}
	if !(sparesPct >= 0 && sparesPct <= MaxSparesPct) {
		return 0, 0, fmt.Errorf("spares %g %%: want a percentage from 0 to %d", sparesPct, MaxSparesPct)
	}
	if float64(build)*float64(perBoard) > maxPieces {
		return 0, 0, fmt.Errorf("quantity: %d × %d pieces is beyond %g", build, perBoard, maxPieces)
	}
	needed = build * perBoard
	const scale = 100_000_000 // 100 % in millionths of a percent
	micro := int64(math.Round(sparesPct * 1e6))
	num := new(big.Int).Mul(big.NewInt(needed), big.NewInt(scale+micro))
	q, r := new(big.Int).QuoRem(num, big.NewInt(scale), new(big.Int))
	if r.Sign() > 0 {
		q.Add(q, big.NewInt(1))
	}
	return needed, q.Int64(), nil
}

// Stock status of a line.
const (
	StockOK      = "ok"       // the chosen offer's stock covers the order
	StockShort   = "SHORT"    // the chosen offer has less than the order in stock
	StockUnknown = "unknown"  // the offer states no stock
	StockNone    = "no offer" // the catalog has no offer for the part
)

// Order is what to buy for one line: the quantity after supplier minimums,
// the price break that applies, the cost in the build currency and the
// offer it comes from.
type Order struct {
	// Needed is build × parts per board; WithSpares adds the spares.
	Needed     int64
	WithSpares int64
	// Qty is the order quantity: WithSpares raised to the offer's minimum,
	// max(MOQ, first price break).
	Qty int64
	// MOQ is the offer's minimum order quantity (0 when not stated).
	MOQ int64
	// BreakQty is the quantity of the price break that applies: the
	// largest break not above Qty (0 when the offer has no price).
	BreakQty int64
	// OfferPrice is the unit price of that break in OfferCurrency.
	OfferPrice    float64
	OfferCurrency string
	// Rate converts OfferCurrency to the build currency (1 for the same
	// currency; NaN when the spec gives no rate).
	Rate float64
	// Unit and Extended (= Qty × Unit) are in the build currency; NaN
	// when the line is not costed.
	Unit     float64
	Extended float64
	Costed   bool
	Supplier string
	SKU      string
	// Stock is the chosen offer's stock (nil when not stated).
	Stock       *int64
	StockStatus string
	// Note says why a line is not costed and which offers were not
	// compared.
	Note string
}

// Generic returns the order of a line that has no catalog part (the gate
// resistor): the pieces with spares, nothing costed.
func Generic(needed, withSpares int64) Order {
	return Order{Needed: needed, WithSpares: withSpares, Qty: withSpares,
		OfferPrice: math.NaN(), Rate: math.NaN(), Unit: math.NaN(), Extended: math.NaN(), StockStatus: StockNone}
}

// offerCalc is one offer evaluated at the line's quantity.
type offerCalc struct {
	i        int
	o        *catalog.Offer
	qty      int64
	moq      int64
	breakQty int64
	price    float64
	priced   bool
	cur      string
	rate     float64
	costed   bool
	ext      float64
	why      string // why it is not costed
}

// validBreak reports whether a price break can be used.
func validBreak(b catalog.PriceBreak) bool {
	return b.Price >= 0 && !math.IsInf(b.Price, 0) && b.Qty >= 0
}

// evalOffer computes the order of offer o for want pieces.
func evalOffer(o *catalog.Offer, want int64, cur string, rates map[string]float64) offerCalc {
	c := offerCalc{o: o, moq: max(o.MOQ, 0), qty: want, price: math.NaN(), rate: math.NaN(), ext: math.NaN()}
	c.cur = strings.ToUpper(strings.TrimSpace(o.Currency))
	first := int64(-1)
	for _, b := range o.Breaks {
		if validBreak(b) && (first < 0 || b.Qty < first) {
			first = b.Qty
		}
	}
	c.qty = max(want, c.moq, first)
	for _, b := range o.Breaks {
		if validBreak(b) && b.Qty <= c.qty && (!c.priced || b.Qty > c.breakQty || b.Qty == c.breakQty && b.Price < c.price) {
			c.breakQty, c.price, c.priced = b.Qty, b.Price, true
		}
	}
	switch {
	case !c.priced:
		c.why = "no price"
	case c.cur == "":
		c.why = "no currency"
	case c.cur == strings.ToUpper(cur):
		c.rate = 1
	default:
		if r, ok := rates[c.cur]; ok && r > 0 && !math.IsInf(r, 0) {
			c.rate = r
		} else {
			c.why = "a price in " + c.cur + " without a rate in [build.rates]"
		}
	}
	if c.why == "" {
		c.costed = true
		c.ext = float64(c.qty) * c.price * c.rate
	}
	return c
}

func (c *offerCalc) covers() bool { return c.o.Stock != nil && *c.o.Stock >= c.qty }

// PlaceOrder chooses the offer of part p for want pieces (the quantity
// with spares) in build currency cur:
//
//   - per offer, the order quantity is want raised to the offer's minimum
//     max(MOQ, first price break); the price break that applies is the
//     largest break quantity not above it; the extended cost is
//     quantity × break price × rate, where rate is 1 for an offer in cur
//     and rates[currency] otherwise (units of cur per unit of the offer's
//     currency);
//   - the offer with the lowest extended cost is chosen (ties: the one
//     whose stock covers the order, then the larger stock, then supplier
//     and SKU in alphabetical order, then catalog order);
//   - offers without a price, without a currency or in a currency without
//     a rate are not costed; when no offer is costed the line still names
//     one (a priced one whose stock covers the order first) and its cost
//     stays empty.
//
// The stock status compares the chosen offer's stock with its order
// quantity.
func PlaceOrder(p *catalog.Part, needed, want int64, cur string, rates map[string]float64) Order {
	if len(p.Offers) == 0 {
		o := Generic(needed, want)
		o.Note = "no offer in the catalog"
		return o
	}
	calcs := make([]offerCalc, len(p.Offers))
	for i := range p.Offers {
		calcs[i] = evalOffer(&p.Offers[i], want, cur, rates)
		calcs[i].i = i
	}
	better := func(a, b *offerCalc) int {
		if a.costed != b.costed {
			if a.costed {
				return -1
			}
			return 1
		}
		if a.costed {
			if c := cmp.Compare(a.ext, b.ext); c != 0 {
				return c
			}
		} else if a.priced != b.priced {
			if a.priced {
				return -1
			}
			return 1
		}
		if a.covers() != b.covers() {
			if a.covers() {
				return -1
			}
			return 1
		}
		as, bs := int64(-1), int64(-1)
		if a.o.Stock != nil {
			as = *a.o.Stock
		}
		if b.o.Stock != nil {
			bs = *b.o.Stock
		}
		if c := cmp.Compare(bs, as); c != 0 {
			return c
		}
		if c := cmp.Compare(a.o.Supplier, b.o.Supplier); c != 0 {
			return c
		}
		if c := cmp.Compare(a.o.SKU, b.o.SKU); c != 0 {
			return c
		}
		return cmp.Compare(a.i, b.i)
	}
	best := slices.MinFunc(calcs, func(a, b offerCalc) int { return better(&a, &b) })
	o := Order{Needed: needed, WithSpares: want, Qty: best.qty, MOQ: best.moq, BreakQty: best.breakQty,
		OfferPrice: best.price, OfferCurrency: best.cur, Rate: best.rate,
		Unit: math.NaN(), Extended: math.NaN(), Costed: best.costed,
		Supplier: best.o.Supplier, SKU: best.o.SKU, Stock: best.o.Stock}
	if best.costed {
		o.Unit = best.price * best.rate
		o.Extended = best.ext
	}
	switch {
	case best.o.Stock == nil:
		o.StockStatus = StockUnknown
	case *best.o.Stock >= best.qty:
		o.StockStatus = StockOK
	default:
		o.StockStatus = StockShort
	}
	var notes []string
	if !best.costed {
		notes = append(notes, "not costed: "+best.why)
	}
	if best.qty > want {
		notes = append(notes, fmt.Sprintf("raised from %d to the offer's minimum of %d", want, best.qty))
	}
	var skipped []string
	for i := range calcs {
		if c := &calcs[i]; c.i != best.i && !c.costed && best.costed {
			skipped = append(skipped, fmt.Sprintf("%s (%s)", c.o.Supplier, c.why))
		}
	}
	if len(skipped) > 0 {
		notes = append(notes, "offers not compared: "+strings.Join(skipped, ", "))
	}
	o.Note = strings.Join(notes, "; ")
	return o
}
