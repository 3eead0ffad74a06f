package shortlist

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"partsieve/query/topology"
)

// cellKind is the type a cell is written as.
type cellKind uint8

const (
	cEmpty cellKind = iota
	cText
	cNum
	cBool
)

// cell is one value of a sheet: text, a number with its number format
// (base SI units; the format shows the unit), or a boolean.
type cell struct {
	kind cellKind
	s    string
	f    float64
	b    bool
	fmt  string
}

func text(s string) cell {
	if s == "" {
		return cell{}
	}
	return cell{kind: cText, s: s}
}

// number is a numeric cell; NaN and infinities give an empty cell.
func number(v float64, format string) cell {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return cell{}
	}
	return cell{kind: cNum, f: v, fmt: format}
}

// count is a whole-number cell; 0 gives an empty cell when blankZero.
func count(n int64, blankZero bool) cell {
	if n == 0 && blankZero {
		return cell{}
	}
	return cell{kind: cNum, f: float64(n), fmt: fmtCount}
}

func boolean(b bool) cell { return cell{kind: cBool, b: b} }

// sheet is one worksheet: a header row and data rows.
type sheet struct {
	name    string
	headers []string
	rows    [][]cell
	// maxWidth caps a column's width (characters); 0 uses the default.
	maxWidth map[int]float64
}

// Number formats. Values are stored in base SI units (V, A, W, °C, and
// fractions for margins); the formats only show them with their unit.
const (
	fmtCount = `#,##0`
	fmtV     = `0.0## "V"`
	fmtA     = `0.0## "A"`
	fmtLoss  = `0.000## "W"`
	fmtDrop  = `0.000## "V"`
	fmtTemp  = `0.0 "°C"`
	fmtPct   = `0.0%`
	fmtPrice = `#,##0.0000##`
	fmtRate  = `0.0000##`
)

// unitFormat is the number format of a value in unit u: General with the
// unit appended (values are rounded to six significant digits by sig6, so
// General shows them without binary noise).
func unitFormat(u string) string {
	u = strings.ReplaceAll(u, `"`, "")
	if u == "" {
		return "General"
	}
	return `General" ` + u + `"`
}

// moneyFormat shows an amount in the build currency.
func moneyFormat(cur string, decimals int) string {
	return `#,##0.` + strings.Repeat("0", decimals) + ` "` + strings.ReplaceAll(cur, `"`, "") + `"`
}

// sig6 rounds v to six significant digits, as the JSON output does.
func sig6(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) || v == 0 {
		return v
	}
	r, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 6, 64), 64)
	if err != nil {
		return v
	}
	return r
}

// ShortlistHeaders returns the columns of the Shortlist sheet and of the
// CSV file, in order; the unit of a numeric column is in its header, and
// money columns name the build currency.
func ShortlistHeaders(cur string) []string {
	return []string{
		"Design", "Topology", "Line", "Role", "Maker", "Part number", "Type", "Package", "Key ratings",
		"Voltage rating (V)", "Current rating (A)", "Stage loss (W)", "Stage drop (V)", "T_j (°C)",
		"Smallest margin", "Margin check",
		"Per board", "Needed", "With spares", "Order qty", "MOQ", "Price break qty",
		"Offer unit price", "Offer currency", "Rate to " + cur,
		"Unit price (" + cur + ")", "Extended cost (" + cur + ")", "Cost per board (" + cur + ")",
		"Stock", "Stock status", "Supplier", "SKU", "Note",
	}
}

// lineCells is the row of a line, in the order of ShortlistHeaders.
func lineCells(l *Line, cur string) []cell {
	o := &l.Order
	stock := cell{}
	if o.Stock != nil {
		stock = count(*o.Stock, false)
	}
	catalogLine := l.Kind == KindPart || l.Kind == KindAlternate
	generic := l.Kind == KindGeneric
	qty := func(n int64) cell {
		if catalogLine || generic {
			return count(n, false)
		}
		return cell{}
	}
	perBoard := cell{}
	if l.PerBoard > 0 {
		perBoard = count(l.PerBoard, false)
	}
	moq, brk := cell{}, cell{}
	if catalogLine {
		moq, brk = count(o.MOQ, true), count(o.BreakQty, true)
	}
	return []cell{
		text(l.Design), text(string(l.Topology)), text(l.Kind), text(l.Role), text(l.Mfr), text(l.MPN), text(l.Type),
		text(l.Package), text(l.Ratings),
		number(l.VRating, fmtV), number(l.IRating, fmtA), number(l.Loss, fmtLoss), number(l.Drop, fmtDrop),
		number(l.Tj, fmtTemp), number(l.Margin, fmtPct), text(l.MarginCheck),
		perBoard, qty(o.Needed), qty(o.WithSpares), qty(o.Qty), moq, brk,
		number(o.OfferPrice, fmtPrice), text(o.OfferCurrency), number(o.Rate, fmtRate),
		number(o.Unit, moneyFormat(cur, 4)), number(o.Extended, moneyFormat(cur, 2)), number(l.PerBoardCost, moneyFormat(cur, 4)),
		stock, text(o.StockStatus), text(o.Supplier), text(o.SKU), text(l.Note),
	}
}

func (sl *Shortlist) shortlistSheet() sheet {
	sh := sheet{name: "Shortlist", headers: ShortlistHeaders(sl.Currency), maxWidth: map[int]float64{8: 60, 32: 90}}
	for _, l := range sl.Lines() {
		sh.rows = append(sh.rows, lineCells(&l, sl.Currency))
	}
	return sh
}

func factorsText(fs []topology.FactorRef) (text, confidence string) {
	var ts, cs []string
	for _, f := range fs {
		v := strconv.FormatFloat(float64(f.Value), 'g', 6, 64)
		if f.Unit != "" {
			v += " " + f.Unit
		}
		ts = append(ts, fmt.Sprintf("%s = %s (%s)", f.Name, v, f.Source))
		cs = append(cs, fmt.Sprintf("%s %s %s", f.Name, f.Tag, f.Confidence))
	}
	return strings.Join(ts, "; "), strings.Join(cs, "; ")
}

func (sl *Shortlist) requirementsSheet() sheet {
	sh := sheet{name: "Requirements", headers: []string{"Topology", "Role", "Requirement", "Field", "Op", "Value", "Unit",
		"Formula", "Factors", "Confidence", "Source", "Note"}, maxWidth: map[int]float64{7: 80, 8: 80, 11: 80}}
	for _, n := range sl.Needs.Needs {
		if n.Unsafe {
			sh.rows = append(sh.rows, []cell{text(string(n.Topology)), text("stage"), text("ranked out"), {}, {}, {}, {}, {}, {}, {}, {}, text(n.UnsafeReason)})
		}
		for _, r := range n.Requirements {
			ft, fc := factorsText(r.Factors)
			sh.rows = append(sh.rows, []cell{text(string(n.Topology)), text(r.Role), text(r.Name), text(r.Field), text(r.Op),
				number(sig6(float64(r.Value)), unitFormat(r.Unit)), text(r.Unit), text(r.Formula), text(ft), text(fc), text(r.Source), text(r.Note)})
		}
		for _, h := range n.Hazards {
			sh.rows = append(sh.rows, []cell{text(string(n.Topology)), text("stage"), text("hazard"), {}, {}, {}, {}, {}, {}, {}, {}, text(h)})
		}
	}
	return sh
}

func (sl *Shortlist) checksSheet() sheet {
	sh := sheet{name: "Checks", headers: []string{"Design", "Topology", "Evaluation", "Check role", "Part", "Check", "Corner",
		"Value", "Op", "Limit", "Unit", "Margin", "Pass", "Formula", "Source", "Note"}, maxWidth: map[int]float64{13: 80, 15: 80}}
	for _, d := range sl.Designs {
		for _, r := range d.Checks {
			c := r.Check
			val := number(sig6(float64(c.Value)), unitFormat(c.Unit))
			if math.IsInf(float64(c.Value), 1) {
				val = text("no stable point (runaway)")
			}
			sh.rows = append(sh.rows, []cell{text(r.Design), text(string(r.Topology)), text(r.Evaluation), text(c.Role), text(r.Part),
				text(c.Name), text(c.Corner), val, text(c.Op), number(sig6(float64(c.Limit)), unitFormat(c.Unit)), text(c.Unit),
				number(float64(c.Margin), fmtPct), boolean(c.Pass), text(c.Formula), text(c.Source), text(c.Note)})
		}
	}
	return sh
}

func (sl *Shortlist) assumptionsSheet() sheet {
	sh := sheet{name: "Assumptions", headers: []string{"Section", "Item", "Value", "Unit", "Confidence", "Source", "Note"},
		maxWidth: map[int]float64{2: 90, 5: 70, 6: 90}}
	rowItem := func(section string, item, v cell, unit, conf, source, note string) {
		sh.rows = append(sh.rows, []cell{text(section), item, v, text(unit), text(conf), text(source), text(note)})
	}
	row := func(section, item string, v cell, unit, conf, source, note string) {
		rowItem(section, text(item), v, unit, conf, source, note)
	}
	for i, c := range sl.Cautions {
		rowItem("caution", count(int64(i+1), false), text(c), "", "", "", "")
	}
	o := sl.Options
	mode := "the pick: top designs per topology"
	if len(o.Parts) > 0 {
		mode = "the part numbers given: " + strings.Join(o.Parts, ", ")
	}
	row("shortlist", "spec", text(sl.Spec), "", "", "", "")
	row("shortlist", "built from", text(mode), "", "", "", "")
	row("shortlist", "build quantity", number(float64(sl.Quantity), fmtCount), "boards", "", "application spec [build] quantity", "")
	row("shortlist", "currency", text(sl.Currency), "", "", "application spec [build] currency", "")
	rates := make([]string, 0, len(sl.Rates))
	for c := range sl.Rates {
		rates = append(rates, c)
	}
	sort.Strings(rates)
	for _, c := range rates {
		row("shortlist", "rate "+c, number(sl.Rates[c], fmtRate), sl.Currency+" per "+c, "", "application spec [build.rates]", "")
	}
	row("shortlist", "spares", number(o.SparesPct/100, fmtPct), "", "", "--spares", "added to every line")
	if len(o.Parts) == 0 {
		row("shortlist", "designs per topology", number(float64(o.Top), fmtCount), "", "", "--top", "")
		row("shortlist", "alternates per role", number(float64(o.Alternates), fmtCount), "", "", "--alternates", "")
		row("shortlist", "ranking", text(string(sl.Rank)), "", "", "--rank", "")
	}
	topos := "all"
	if len(o.Topologies) > 0 {
		var ts []string
		for _, t := range o.Topologies {
			ts = append(ts, string(t))
		}
		topos = strings.Join(ts, ", ")
	}
	row("shortlist", "topologies", text(topos), "", "", "--topology", "")
	for _, r := range arithmetic {
		row("arithmetic", r[0], text(r[1]), "", "", "partsieve", "")
	}
	row("operating corners", "hot", text(sl.Needs.HotCorner), "", "", "", "")
	row("operating corners", "cold", text(sl.Needs.ColdCorner), "", "", "", "")
	row("policy", "derating", text(sl.Policy), "", "", "", sl.PolicyTitle)
	for _, f := range sl.Factors {
		row("policy", f.Name, number(sig6(f.Value), "General"), f.Unit, f.Tag.String()+" "+f.Confidence(), f.Source, f.Label+": "+f.Why)
	}
	for _, n := range sl.Notes {
		row("note", "", text(n), "", "", "", "")
	}
	for _, n := range sl.Needs.Notes {
		row("note", "", text(n), "", "", "", "")
	}
	for _, d := range sl.Designs {
		for _, h := range d.Hazards {
			row("hazard", d.Label, text(h), "", "", "", "")
		}
	}
	if o.SpecText != "" {
		lines := strings.Split(strings.ReplaceAll(o.SpecText, "\r\n", "\n"), "\n")
		if n := len(lines); n > 0 && lines[n-1] == "" {
			lines = lines[:n-1]
		}
		for i, l := range lines {
			rowItem("spec as entered", count(int64(i+1), false), text(l), "", "", sl.Spec, "line")
		}
	}
	return sh
}

// arithmetic explains the shortlist's numbers, row by row.
var arithmetic = [][2]string{
	{"needed", "build quantity × parts per board (one per role)"},
	{"with spares", "⌈needed × (1 + spares/100)⌉"},
	{"order quantity", "with spares, raised to the offer's minimum: max(MOQ, first price break)"},
	{"price break", "the largest break quantity not above the order quantity"},
	{"extended cost", "order quantity × break price × rate (rate 1 in the build currency; [build.rates] otherwise)"},
	{"offer chosen", "the lowest extended cost in the build currency; offers without a price, a currency or a rate are listed but not costed"},
	{"stock", "the chosen offer's stock against the order quantity: SHORT when below"},
	{"cost per board", "extended cost ÷ build quantity; a design's total sums its part lines (not the alternates, not the generic gate resistor)"},
	{"alternates", "second sources per role: the design passes every check with the alternate in place; other makers first, then lower cost"},
	{"units", "numbers are stored in base SI units (V, A, W, Ω, A²s, s; °C; margins as fractions); the number formats show the unit"},
	{"smallest margin", "per part: the smallest margin of its own checks; per design: of every check (Check.Margin: relative, negative when failing)"},
}
