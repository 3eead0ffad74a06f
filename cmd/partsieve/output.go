package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"partsieve/internal/sheetsafe"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// table writes aligned columns for people.
type table struct {
	tw *tabwriter.Writer
}

func newTable(w io.Writer, headers ...string) *table {
	t := &table{tw: tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)}
	t.row(headers...)
	return t
}

func (t *table) row(cells ...string) {
	for i, c := range cells {
		cells[i] = strings.NewReplacer("\t", " ", "\n", " ", "\r", " ").Replace(c)
	}
	fmt.Fprintln(t.tw, strings.Join(cells, "\t"))
}

func (t *table) flush() error { return t.tw.Flush() }

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}

// csvSafe neutralises text that a spreadsheet program would evaluate as a
// formula; plain numbers written by us are left alone.
var csvSafe = sheetsafe.Cell

func writeCSV(w io.Writer, header []string, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, r := range rows {
		safe := make([]string, len(r))
		for i, c := range r {
			safe[i] = csvSafe(c)
		}
		if err := cw.Write(safe); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// eng formats a field value of p for people ("45 mΩ"), "" when absent.
func eng(p *catalog.Part, name string) string {
	v, ok := p.Get(name)
	if !ok {
		return ""
	}
	f, _ := catalog.FieldByName(name)
	return units.Format(v, f.Dim)
}

// machine formats a number in base SI units for CSV output.
func machine(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// keyRatings summarises the ratings that matter for the part's class.
func keyRatings(p *catalog.Part) string {
	var parts []string
	add := func(label, name string) {
		if s := eng(p, name); s != "" {
			if label != "" {
				s = label + " " + s
			}
			parts = append(parts, s)
		}
	}
	at := func(label, name, cond string) {
		s := eng(p, name)
		if s == "" {
			return
		}
		if c := eng(p, cond); c != "" {
			s += " @ " + c
		}
		parts = append(parts, label+" "+s)
	}
	switch p.Kind {
	case catalog.Diode:
		switch p.Type {
		case "zener":
			s := eng(p, "vz")
			if tol, ok := p.Get("vz_tol"); ok && s != "" {
				s += " ±" + units.Format(tol, units.Fraction)
			}
			if s != "" {
				parts = append(parts, "V_Z "+s)
			}
			add("P", "pd")
		case "tvs":
			add("V_RWM", "vrwm")
			add("V_C", "vc")
			add("P_PK", "ppk")
		default:
			add("V_RRM", "vrrm")
			add("I_F(AV)", "ifav")
			at("V_F", "vf", "vf_if")
			add("I_FSM", "ifsm")
		}
	case catalog.MOSFET:
		add("V_DS", "vds")
		at("R_DS(on)", "rdson", "rdson_vgs")
		add("I_D", "id")
		add("V_GS max", "vgs_max")
	case catalog.Fuse:
		add("I_N", "in")
		add("U_DC", "un_dc")
		add("breaking", "breaking")
		add("I²t", "i2t")
	}
	return strings.Join(parts, ", ")
}

// currencyPrice is the lowest entry price of a part in one currency.
type currencyPrice struct {
	Currency string
	Price    float64
}

// offerSummary returns, per currency, the lowest entry price (the price of
// an offer's smallest break), lowest first (prices in different currencies
// are not compared with each other, only ordered), and the total stock
// (known is false when no offer gives its stock).
func offerSummary(p *catalog.Part) (prices []currencyPrice, stock int64, known bool) {
	best := map[string]float64{}
	for _, o := range p.Offers {
		if o.Stock != nil {
			stock += *o.Stock
			known = true
		}
		first := -1
		for i, b := range o.Breaks {
			if first < 0 || b.Qty < o.Breaks[first].Qty {
				first = i
			}
		}
		if first < 0 {
			continue
		}
		if v, ok := best[o.Currency]; !ok || o.Breaks[first].Price < v {
			best[o.Currency] = o.Breaks[first].Price
		}
	}
	for c, v := range best {
		prices = append(prices, currencyPrice{c, v})
	}
	sort.Slice(prices, func(i, j int) bool {
		return prices[i].Price < prices[j].Price || prices[i].Price == prices[j].Price && prices[i].Currency < prices[j].Currency
	})
	return prices, stock, known
}

// bestOffer formats offerSummary for people: "0.39 USD / 0.395 EUR" and
// the total stock ("" when unknown).
func bestOffer(p *catalog.Part) (price string, stock string) {
	prices, total, known := offerSummary(p)
	var ps []string
	for _, cp := range prices {
		ps = append(ps, strings.TrimSpace(money(cp.Price)+" "+cp.Currency))
	}
	if known {
		stock = strconv.FormatInt(total, 10)
	}
	return strings.Join(ps, " / "), stock
}

// money writes a unit price with at least two decimals and no trailing
// noise: 0.39 gives "0.39", 0.3375 gives "0.3375", 0.680824 gives
// "0.6808", 12 gives "12.00".
func money(v float64) string {
	s := strconv.FormatFloat(v, 'f', -1, 64)
	if dot := strings.IndexByte(s, '.'); dot >= 0 && len(s)-dot-1 > 4 {
		s = strings.TrimRight(strconv.FormatFloat(v, 'f', 4, 64), "0")
	}
	dot := strings.IndexByte(s, '.')
	switch {
	case dot < 0:
		return s + ".00"
	case len(s)-dot-1 == 1:
		return s + "0"
	}
	return s
}
