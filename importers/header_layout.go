package importers

import (
	"fmt"
	"sort"
	"strings"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// layout is what a sheet's header row means: which column feeds which
// field, under which unit and test conditions.
type layout struct {
	headers []string         // as written, by column index
	clean   []string         // headers with spaces cleaned, for messages (filled on first use)
	cols    []Column         // by column index; Field "" = not used
	byField map[string][]int // target -> columns, first preferred
	unknown []string         // headers not recognised
	ignored []string         // recognised headers not used, with the reason
	pairs   []pricePair      // "Break N qty"/"Break N price" columns
	prices  []int            // price columns with a quantity in the header or plain
	hasMPN  bool
}

// pricePair is a quantity column and its price column.
type pricePair struct{ qty, price int }

// recognizer tells what one header means; the mapping file may override
// the synonym table.
type recognizer func(header string, index int) Column

// buildLayout decides, for a header row, which column feeds which field:
// units in headers must fit the field, typical values give way to maximum
// ones, two R_DS(on), V_F or I_R columns with different test conditions
// become the field and its second rating (rdson2, vf2, ir2), and price
// columns pair up.
func buildLayout(headers []string, rec recognizer) *layout {
	lo := &layout{headers: headers, cols: make([]Column, len(headers)), byField: map[string][]int{}}
	for i, h := range headers {
		c := rec(h, i)
		if c.Field == "" {
			if strings.TrimSpace(h) != "" && !c.mapped {
				lo.unknown = append(lo.unknown, cleanSpaces(h))
			}
			continue
		}
		if why := unitMismatch(c); why != "" {
			lo.ignore(c, why)
			continue
		}
		lo.cols[i] = c
	}
	adjacentPass(headers, lo.cols)
	if len(lo.unknown) > 0 {
		var still []string
		for i, h := range headers {
			if lo.cols[i].Field == "" && strings.TrimSpace(h) != "" && !rec(h, i).mapped && rec(h, i).Field == "" {
				still = append(still, cleanSpaces(h))
			}
		}
		lo.unknown = still
	}
	lo.chooseQualified()
	lo.splitSecondRatings()
	lo.pairPrices()
	for i, c := range lo.cols {
		if c.Field != "" {
			lo.byField[c.Field] = append(lo.byField[c.Field], i)
		}
	}
	lo.hasMPN = len(lo.byField["mpn"]) > 0
	return lo
}

func (lo *layout) ignore(c Column, why string) {
	lo.ignored = append(lo.ignored, fmt.Sprintf("%s: %s", cleanSpaces(c.Header), why))
}

// genericDim is the dimension of the generic rating targets.
var genericDim = map[string]units.Dim{
	gVoltage: units.Voltage, gCurrent: units.Current, gPower: units.Power,
	gResist: units.Resistance, gBreak: units.Voltage,
}

// targetDim is the dimension a target's cells are parsed in (None for
// text and offer targets).
func targetDim(target string) units.Dim {
	if d, ok := genericDim[target]; ok {
		return d
	}
	if f, ok := fieldOf(target); ok && f.Type == catalog.Number {
		return f.Dim
	}
	return units.None
}

// unitMismatch explains a header unit that does not fit the field ("VRRM
// (A)").
func unitMismatch(c Column) string {
	if c.Unit == "" {
		return ""
	}
	d := targetDim(c.Field)
	if d == units.None {
		return ""
	}
	for _, ud := range units.UnitDim(c.Unit) {
		if ud == d {
			return ""
		}
	}
	return fmt.Sprintf("unit %q in the header is not a %s, which %s needs", c.Unit, d, c.Field)
}

// qualRank says which qualifier a field takes and how much it prefers it
// (lower is better); ok is false for a qualifier the field must not take:
// a typical value is never stored as a maximum rating.
func qualRank(field, qual string) (rank int, ok bool) {
	var order []string
	switch {
	case field == "vbr" || field == gBreak:
		order = []string{"min", "", "nom"}
	case field == "qg":
		order = []string{"max", "", "typ"}
	case field == "vz":
		order = []string{"", "nom", "typ"}
	case field == "rcold":
		order = []string{"", "typ", "max"}
	case targetDim(field) != units.None:
		order = []string{"max", "", "nom"}
	default:
		order = []string{""}
	}
	for i, q := range order {
		if q == qual {
			return i, true
		}
	}
	return 0, false
}

func qualWhy(field, qual string) string {
	switch qual {
	case "typ":
		return fmt.Sprintf("typical value; %s is stored as a guaranteed limit", field)
	case "min":
		return fmt.Sprintf("minimum value; %s is stored as a maximum", field)
	case "max":
		if field == "vbr" {
			return "maximum value; vbr is stored as the minimum breakdown voltage"
		}
		return fmt.Sprintf("maximum value; %s is stored as the nominal value", field)
	}
	return fmt.Sprintf("%s qualifier does not fit %s", qual, field)
}

// condKey groups columns of one field with the same test conditions.
func condKey(c Column) string {
	var parts []string
	for _, k := range c.Conds {
		if k.Field == "" && k.Dim != units.Temperature {
			continue
		}
		parts = append(parts, fmt.Sprintf("%d:%g:%s", k.Dim, k.Value, k.Ref))
	}
	sort.Strings(parts)
	return c.Field + "|" + strings.Join(parts, ",")
}

// chooseQualified keeps, among columns of one field and one set of test
// conditions, the one with the best qualifier (max over plain over typ).
func (lo *layout) chooseQualified() {
	best := map[string]int{} // condKey -> column
	for i, c := range lo.cols {
		if c.Field == "" || c.mapped || c.Field == fPrice || c.Field == fQty {
			continue
		}
		r, ok := qualRank(c.Field, c.Qual)
		if !ok {
			lo.ignore(c, qualWhy(c.Field, c.Qual))
			lo.cols[i].Field = ""
			continue
		}
		k := condKey(c)
		j, seen := best[k]
		if !seen {
			best[k] = i
			continue
		}
		rj, _ := qualRank(lo.cols[j].Field, lo.cols[j].Qual)
		if r < rj {
			lo.ignore(lo.cols[j], fmt.Sprintf("column %q gives %s", cleanSpaces(c.Header), c.Field))
			lo.cols[j].Field = ""
			best[k] = i
		} else if r > rj {
			lo.ignore(c, fmt.Sprintf("column %q gives %s", cleanSpaces(lo.cols[j].Header), c.Field))
			lo.cols[i].Field = ""
		}
		// equal rank: both kept, the first non-empty cell of a row wins
	}
}

// condValue returns the value of the condition of dimension d, ok false
// when the column has none.
func condValue(c Column, d units.Dim) (float64, bool) {
	for _, k := range c.Conds {
		if k.Dim == d && k.Ref == "" {
			return k.Value, true
		}
	}
	return 0, false
}

// second names the second rating of a field and its condition fields.
var second = map[string]struct {
	name  string
	conds map[string]string
}{
	"rdson": {"rdson2", map[string]string{"rdson_vgs": "rdson2_vgs"}},
	"vf":    {"vf2", map[string]string{"vf_if": "vf2_if", "vf_tj": "vf2_tj"}},
	"ir":    {"ir2", map[string]string{"ir_tj": "ir2_tj", "ir_vr": "ir_vr"}},
}

// splitSecondRatings turns two columns of one field with different test
// conditions into the field and its second rating: the R_DS(on) at the
// higher gate drive (or with none written) is rdson, the other rdson2; the
// V_F or I_R at the lower temperature (25 °C when none is written) is vf or
// ir, the other vf2 or ir2. A field without a second rating keeps the
// column nearest 25 °C.
func (lo *layout) splitSecondRatings() {
	groups := map[string][]int{} // field -> distinct condition groups (first column of each)
	seen := map[string]bool{}
	var fields []string
	for i, c := range lo.cols {
		if c.Field == "" || c.mapped || c.Field == fPrice || c.Field == fQty {
			continue
		}
		k := condKey(c)
		if seen[k] {
			continue
		}
		seen[k] = true
		if _, ok := groups[c.Field]; !ok {
			fields = append(fields, c.Field)
		}
		groups[c.Field] = append(groups[c.Field], i)
	}
	for _, f := range fields {
		g := groups[f]
		if len(g) < 2 {
			continue
		}
		// all columns of each group, in column order
		members := func(first int) []int {
			var out []int
			k := condKey(lo.cols[first])
			for i, c := range lo.cols {
				if c.Field == f && condKey(c) == k {
					out = append(out, i)
				}
			}
			return out
		}
		order := append([]int(nil), g...)
		sort.SliceStable(order, func(a, b int) bool {
			ca, cb := lo.cols[order[a]], lo.cols[order[b]]
			if f == "rdson" {
				va, oka := condValue(ca, units.Voltage)
				vb, okb := condValue(cb, units.Voltage)
				if !oka {
					va = 1e9
				}
				if !okb {
					vb = 1e9
				}
				return va > vb
			}
			ta, oka := condValue(ca, units.Temperature)
			tb, okb := condValue(cb, units.Temperature)
			if !oka {
				ta = 25
			}
			if !okb {
				tb = 25
			}
			if s, has := second[f]; !has || s.name == "" {
				return abs(ta-25) < abs(tb-25)
			}
			return ta < tb
		})
		s, has := second[f]
		for rank, first := range order {
			for _, i := range members(first) {
				switch {
				case rank == 0:
					// the field itself
				case rank == 1 && has:
					c := &lo.cols[i]
					c.Field = s.name
					var conds []Condition
					for _, k := range c.Conds {
						if k.Field == "" {
							continue
						}
						if to, ok := s.conds[k.Field]; ok {
							k.Field = to
							conds = append(conds, k)
						}
					}
					c.Conds = conds
				default:
					lo.ignore(lo.cols[i], fmt.Sprintf("another %s column with other test conditions is used", f))
					lo.cols[i].Field = ""
				}
			}
		}
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// pairPrices matches "Break N qty" with "Break N price", "Qty N" with
// "Price N", and a plain quantity column with a plain price column.
func (lo *layout) pairPrices() {
	qtyIdx := map[int]int{}   // pair index -> qty column
	priceIdx := map[int]int{} // pair index -> price column
	bareQty := map[int64]int{}
	barePrice := map[int64]int{}
	plainQty, plainPrice := -1, -1
	for i, c := range lo.cols {
		switch {
		case c.Field == fQty && c.Pair > 0:
			qtyIdx[c.Pair] = i
		case c.Field == fQty:
			plainQty = i
		case c.Field == fPrice && c.Pair > 0:
			priceIdx[c.Pair] = i
		case c.Field == fPrice && c.bareNum && c.Pair < 0:
			bareQty[c.Qty] = i
		case c.Field == fPrice && c.bareNum:
			barePrice[c.Qty] = i
		case c.Field == fPrice && c.Qty == 0:
			if plainPrice < 0 {
				plainPrice = i
			}
		}
	}
	// "Qty N" + "Price N" with the same N are a pair; alone, N is a quantity
	for n, qi := range bareQty {
		if pi, ok := barePrice[n]; ok && n > 0 && n < 100 {
			qtyIdx[int(n)+1000], priceIdx[int(n)+1000] = qi, pi
			lo.cols[qi].Field, lo.cols[pi].Field = fQty, fPrice
			lo.cols[pi].Qty, lo.cols[qi].Qty = 0, 0
			delete(barePrice, n)
			continue
		}
		lo.cols[qi].Pair = 0
	}
	keys := make([]int, 0, len(priceIdx))
	for n := range priceIdx {
		keys = append(keys, n)
	}
	sort.Ints(keys)
	for _, n := range keys {
		pi := priceIdx[n]
		qi, ok := qtyIdx[n]
		if !ok {
			lo.ignore(lo.cols[pi], "price break without its quantity column")
			lo.cols[pi].Field = ""
			continue
		}
		lo.pairs = append(lo.pairs, pricePair{qty: qi, price: pi})
		lo.cols[qi].Field, lo.cols[pi].Field = fQty, fPrice
		delete(qtyIdx, n)
	}
	for _, qi := range qtyIdx {
		lo.ignore(lo.cols[qi], "break quantity without its price column")
		lo.cols[qi].Field = ""
	}
	if plainQty >= 0 {
		if plainPrice >= 0 {
			lo.pairs = append(lo.pairs, pricePair{qty: plainQty, price: plainPrice})
		} else {
			// a lone "Quantity" column is the stock
			lo.cols[plainQty].Field = fStock
		}
	}
	paired := map[int]bool{}
	for _, p := range lo.pairs {
		paired[p.qty], paired[p.price] = true, true
	}
	for i, c := range lo.cols {
		if c.Field == fPrice && !paired[i] {
			lo.prices = append(lo.prices, i)
		}
	}
	// the pair columns are read through lo.pairs only
	for i := range lo.cols {
		if paired[i] {
			lo.cols[i].Field = pairedField
			lo.cols[i].Pair = 0
		}
	}
}

// pairedField marks columns read through layout.pairs.
const pairedField = "price pair"

// score rates a row as a header candidate: the number of distinct cell
// texts recognised as fields (a merged group header repeated over its
// columns counts once), whether they name at least two distinct fields,
// and whether one of them is the part number.
func score(cells []string, rec recognizer) (n int, mpn bool) {
	seen := map[string]bool{}
	texts := map[string]bool{}
	for i, c := range cells {
		if strings.TrimSpace(c) == "" {
			continue
		}
		col := rec(c, i)
		if col.Field == "" {
			continue
		}
		seen[col.Field] = true
		if k := headerKey(c); !texts[k] {
			texts[k] = true
			n++
		}
		if col.Field == "mpn" {
			mpn = true
		}
	}
	if !mpn && seen["mfr"] {
		for _, c := range cells {
			if isCatalogueHeader(c) {
				mpn = true
			}
		}
	}
	if len(seen) < 2 {
		return 0, false
	}
	return n, mpn
}
