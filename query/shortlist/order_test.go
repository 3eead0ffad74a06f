package shortlist

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"partsieve/catalog"
)

type orderCase struct {
	name   string
	lineNo int
	build  int64
	per    int64
	spares float64
	cur    string
	rates  map[string]float64
	part   catalog.Part
	want   map[string]string
}

// readOrderCases reads testdata/orders.txt (format in its header).
func readOrderCases(t *testing.T) []orderCase {
	t.Helper()
	f, err := os.Open("testdata/orders.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var cases []orderCase
	var cur *orderCase
	sc := bufio.NewScanner(f)
	n := 0
	fail := func(format string, a ...any) {
		t.Helper()
		t.Fatalf("testdata/orders.txt:%d: "+format, append([]any{n}, a...)...)
	}
	kv := func(fields []string) map[string]string {
		m := map[string]string{}
		for _, f := range fields {
			k, v, ok := strings.Cut(f, "=")
			if !ok {
				fail("want key=value, got %q", f)
			}
			m[k] = v
		}
		return m
	}
	atoi := func(s string) int64 {
		v, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			fail("%v", err)
		}
		return v
	}
	atof := func(s string) float64 {
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			fail("%v", err)
		}
		return v
	}
	for sc.Scan() {
		n++
		line := strings.TrimSpace(sc.Text())
		if strings.HasPrefix(line, "#") {
			continue
		}
		if line == "" {
			cur = nil
			continue
		}
		word, rest, _ := strings.Cut(line, " ")
		switch word {
		case "case":
			cases = append(cases, orderCase{name: strings.TrimSpace(rest), lineNo: n, rates: map[string]float64{}, part: catalog.Part{Kind: catalog.Diode, MPN: "X"}})
			cur = &cases[len(cases)-1]
			continue
		}
		if cur == nil {
			fail("%q outside a case", word)
		}
		note := ""
		if i := strings.Index(rest, "note~"); i >= 0 && word == "want" {
			// note~TEXT may contain spaces: it runs to the end of the line
			rest, note = rest[:i], rest[i+len("note~"):]
		}
		m := kv(strings.Fields(rest))
		if note != "" {
			m["note~"] = note
		}
		switch word {
		case "line":
			cur.build, cur.per, cur.spares, cur.cur = atoi(m["build"]), atoi(m["per"]), atof(m["spares"]), m["cur"]
			for k, v := range m {
				if c, ok := strings.CutPrefix(k, "rate."); ok {
					cur.rates[c] = atof(v)
				}
			}
		case "offer":
			o := catalog.Offer{Supplier: m["supplier"], SKU: m["sku"], Currency: m["cur"]}
			if v, ok := m["moq"]; ok {
				o.MOQ = atoi(v)
			}
			if v, ok := m["stock"]; ok {
				s := atoi(v)
				o.Stock = &s
			}
			if v := m["breaks"]; v != "" {
				for _, b := range strings.Split(v, ",") {
					q, p, ok := strings.Cut(b, ":")
					if !ok {
						fail("break %q: want QTY:PRICE", b)
					}
					o.Breaks = append(o.Breaks, catalog.PriceBreak{Qty: atoi(q), Price: atof(p)})
				}
			}
			cur.part.Offers = append(cur.part.Offers, o)
		case "want":
			cur.want = m
		default:
			fail("unknown line %q", word)
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return cases
}

func sameMoney(got, want float64) bool {
	if math.IsNaN(want) {
		return math.IsNaN(got)
	}
	return math.Abs(got-want) <= 1e-9*math.Max(1, math.Abs(want))
}

// The quantity, MOQ, price-break, spares and currency rules, case by case
// from testdata/orders.txt.
func TestOrderTable(t *testing.T) {
	cases := readOrderCases(t)
	if len(cases) < 20 {
		t.Fatalf("%d cases read, want the whole table", len(cases))
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			needed, with, err := Quantity(c.build, c.per, c.spares)
			if err != nil {
				t.Fatalf("line %d: %v", c.lineNo, err)
			}
			o := PlaceOrder(&c.part, needed, with, c.cur, c.rates)
			for k, v := range c.want {
				var ok bool
				var got any
				switch k {
				case "needed":
					got, ok = o.Needed, strconv.FormatInt(o.Needed, 10) == v
				case "spares":
					got, ok = o.WithSpares, strconv.FormatInt(o.WithSpares, 10) == v
				case "qty":
					got, ok = o.Qty, strconv.FormatInt(o.Qty, 10) == v
				case "moq":
					got, ok = o.MOQ, strconv.FormatInt(o.MOQ, 10) == v
				case "break":
					got, ok = o.BreakQty, strconv.FormatInt(o.BreakQty, 10) == v
				case "price", "rate", "unit", "ext":
					f := map[string]float64{"price": o.OfferPrice, "rate": o.Rate, "unit": o.Unit, "ext": o.Extended}[k]
					w, _ := strconv.ParseFloat(v, 64)
					got, ok = f, sameMoney(f, w)
				case "supplier":
					got, ok = o.Supplier, o.Supplier == v
				case "sku":
					got, ok = o.SKU, o.SKU == v
				case "stock":
					if v == "none" {
						v = StockNone
					}
					got, ok = o.StockStatus, o.StockStatus == v
				case "costed":
					got, ok = o.Costed, strconv.FormatBool(o.Costed) == v
				case "note~":
					got, ok = o.Note, strings.Contains(o.Note, v)
				default:
					t.Fatalf("line %d: unknown key %q", c.lineNo, k)
				}
				if !ok {
					t.Errorf("line %d: %s = %v, want %s (order %+v)", c.lineNo, k, got, v, o)
				}
			}
			if o.Costed && !sameMoney(o.Extended, float64(o.Qty)*o.Unit) {
				t.Errorf("extended %g ≠ %d × %g", o.Extended, o.Qty, o.Unit)
			}
		})
	}
}

func TestQuantityErrors(t *testing.T) {
	for _, c := range []struct {
		build, per int64
		pct        float64
	}{{0, 1, 0}, {1, 0, 0}, {10, 1, -1}, {10, 1, math.NaN()}, {10, 1, MaxSparesPct + 1}, {1e12, 1e4, 0}} {
		if _, _, err := Quantity(c.build, c.per, c.pct); err == nil {
			t.Errorf("Quantity(%d, %d, %g): want an error", c.build, c.per, c.pct)
		}
	}
	// the largest build the spec allows with the largest spares fits
	n, w, err := Quantity(1e12, 1, MaxSparesPct)
	if err != nil || n != 1e12 || w != 11e12 {
		t.Errorf("Quantity(1e12, 1, %d) = %d, %d, %v", MaxSparesPct, n, w, err)
	}
}

// Invariants of PlaceOrder over arbitrary offers: the order covers the
// quantity and the offer's minimum, the break applies, the cost is the
// product, and no costed offer would have been cheaper.
func FuzzPlaceOrder(f *testing.F) {
	f.Add(int64(100), 5.0, int64(0), int64(1), 0.25, int64(1000), 0.1, int64(50), "EUR", int64(10), int64(200), 0.3, "USD")
	f.Add(int64(1), 0.0, int64(1000), int64(3000), 0.02, int64(6000), 0.01, int64(0), "", int64(0), int64(0), -1.0, "JPY")
	f.Fuzz(func(t *testing.T, build int64, spares float64, moq, q1 int64, p1 float64, q2 int64, p2 float64, stock int64, cur2 string, moq2, q3 int64, p3 float64, cur3 string) {
		if build < 1 || build > 1e9 || moq > 1e9 || moq2 > 1e9 || q1 > 1e9 || q2 > 1e9 || q3 > 1e9 {
			return
		}
		needed, want, err := Quantity(build, 1, spares)
		if err != nil {
			return
		}
		if want < needed {
			t.Fatalf("with spares %d < needed %d", want, needed)
		}
		part := catalog.Part{Offers: []catalog.Offer{
			{Supplier: "A", Currency: "EUR", MOQ: moq, Stock: &stock, Breaks: []catalog.PriceBreak{{Qty: q1, Price: p1}, {Qty: q2, Price: p2}}},
			{Supplier: "B", Currency: cur2, MOQ: moq2, Breaks: []catalog.PriceBreak{{Qty: q3, Price: p3}}},
			{Supplier: "C", Currency: cur3},
		}}
		rates := map[string]float64{"USD": 0.9}
		o := PlaceOrder(&part, needed, want, "EUR", rates)
		if o.Qty < want || o.Qty < o.MOQ {
			t.Fatalf("order %d below want %d or MOQ %d", o.Qty, want, o.MOQ)
		}
		if o.BreakQty > o.Qty {
			t.Fatalf("break %d above the order %d", o.BreakQty, o.Qty)
		}
		if o.Costed {
			if !(o.Unit >= 0) || !sameMoney(o.Extended, float64(o.Qty)*o.Unit) {
				t.Fatalf("costed order %+v", o)
			}
			for i := range part.Offers {
				c := evalOffer(&part.Offers[i], want, "EUR", rates)
				if c.costed && c.ext < o.Extended*(1-1e-12) {
					t.Fatalf("offer %s costs %g < chosen %g", c.o.Supplier, c.ext, o.Extended)
				}
			}
		} else if !math.IsNaN(o.Extended) {
			t.Fatalf("uncosted order with extended cost %g", o.Extended)
		}
	})
}
