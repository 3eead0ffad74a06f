// Package synth generates large deterministic synthetic catalogs for the
// scale benchmark (cmd/partsieve-bench): N parts drawn from the seed
// catalog's part families (every class, package and rating spread of
// seeddata), sold under invented makers by invented suppliers with invented
// price breaks, written as CSV or XLSX in several header styles.
//
// Electrical values are copied whole from one seed part (the template),
// so every row is as physically consistent as the seed catalog, whose values
// come from documented formulas (seeddata/internal/gen). What varies per row
// is the maker, part number, lifecycle, supplier, SKU, stock, order quantity,
// currency and prices (the template's breaks times a factor 0.6–1.6).
//
// Output is a pure function of (seed, row index, style): the same arguments
// give the same bytes. Rows are produced one at a time, so writing a million
// rows runs in constant memory (XLSX through excelize's StreamWriter, which
// spills to a temporary file).
//
// Every maker, part number, supplier, SKU, stock figure and price is
// invented; none describes a real product.
package synth

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"

	"partsieve/catalog"
	"partsieve/catalog/units"
	"partsieve/importers"
	"partsieve/seeddata/internal/gen"
)

// Style is a header style of the generated sheet.
type Style int

const (
	// Canonical: the canonical field names of catalog.Fields, values in base
	// SI units, comma delimiter, decimal point (the seed catalog's layout).
	Canonical Style = iota
	// Symbols: trade symbols with the unit in the header ("V_RRM [V]"),
	// plain numbers in the cells, comma delimiter.
	Symbols
	// Words: plain words without units in the header ("reverse voltage"),
	// units in the cells with SI prefixes ("45 mΩ"), semicolon delimiter and
	// decimal comma ("0,8 V").
	Words
)

// Styles lists every header style.
func Styles() []Style { return []Style{Canonical, Symbols, Words} }

func (s Style) String() string {
	switch s {
	case Canonical:
		return "canonical"
	case Symbols:
		return "symbols"
	case Words:
		return "words"
	}
	return "style(" + strconv.Itoa(int(s)) + ")"
}

// Comma is the CSV delimiter of the style.
func (s Style) Comma() rune {
	if s == Words {
		return ';'
	}
	return ','
}

// Invented makers (none exists; any likeness is accidental) with the prefix
// of their part numbers.
var makers = []struct{ name, prefix, slug string }{
	{"Arvenna Microsystems", "AV", "arvenna"},
	{"Bellcrest Semiconductor", "BC", ""},
	{"Corriemoor Devices", "CM", "corriemoor"},
	{"Dunholt Power", "DH", ""},
	{"Estwick Silicon", "ES", "estwick"},
	{"Fallowmere Electronics", "FM", ""},
	{"Glenwarden Protection", "GW", "glenwarden"},
	{"Harrowgate Components", "HG", ""},
}

// Invented suppliers with their SKU prefix and currency.
var suppliers = []struct{ name, prefix, currency string }{
	{"Northmoor Parts Depot", "NPD", "EUR"},
	{"Copperline Distribution", "CLD", "USD"},
	{"Wrenfield Electronics Supply", "WES", "GBP"},
	{"Ashgrove Component Store", "ACS", "EUR"},
	{"Kestrel Bay Trading", "KBT", "USD"},
}

// Generator produces synthetic parts from a seed.
type Generator struct {
	seed      uint64
	templates []catalog.Part
}

// New returns a generator; the same seed gives the same parts.
func New(seed uint64) *Generator {
	return &Generator{seed: seed, templates: gen.Parts()}
}

// mix is SplitMix64 (Steele, Lea, Flood 2014): a bijective 64-bit mixer,
// used as a counter-based pseudo-random source so row i never depends on
// the rows before it.
func mix(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// rnd returns the k-th pseudo-random number of row i.
func (g *Generator) rnd(i int, k uint64) uint64 {
	return mix(g.seed ^ mix(uint64(i)*16+k))
}

// Part returns row i: one part with exactly one offer.
func (g *Generator) Part(i int) catalog.Part {
	t := &g.templates[g.rnd(i, 0)%uint64(len(g.templates))]
	m := makers[g.rnd(i, 1)%uint64(len(makers))]
	p := *t
	p.Num = make(map[string]float64, len(t.Num))
	for k, v := range t.Num {
		p.Num[k] = v
	}
	// Part number: maker prefix, the template's family code, the row in
	// base 36 (unique per row).
	fam := t.MPN
	if j := strings.IndexAny(fam, "-"); j > 0 {
		fam = fam[:j]
	}
	p.Mfr = m.name
	p.MPN = m.prefix + fam + "-" + strings.ToUpper(strconv.FormatInt(int64(i), 36))
	p.Datasheet = ""
	if m.slug != "" {
		p.Datasheet = "https://" + m.slug + ".example/ds/" + p.MPN + ".pdf"
	}
	switch r := g.rnd(i, 2) % 100; {
	case r < 6:
		p.Lifecycle = "nrnd"
	case r < 10:
		p.Lifecycle = "obsolete"
	default:
		p.Lifecycle = "active"
	}
	p.Offers = []catalog.Offer{g.offer(i, t)}
	return p
}

// offer invents the single offer of row i from the template's first offer.
func (g *Generator) offer(i int, t *catalog.Part) catalog.Offer {
	s := suppliers[g.rnd(i, 3)%uint64(len(suppliers))]
	o := catalog.Offer{
		Supplier: s.name,
		SKU:      s.prefix + "-" + strconv.FormatInt(int64(i)+100000, 10),
		Currency: s.currency,
		MOQ:      []int64{1, 1, 1, 10, 100}[g.rnd(i, 4)%5],
	}
	var stock int64
	if r := g.rnd(i, 5); r%5 != 0 { // a fifth out of stock
		stock = int64(r>>8%500) * 100
	}
	o.Stock = &stock
	// Price factor 0.6 to 1.6, uniform (invented for demo).
	f := 0.6 + float64(g.rnd(i, 6)>>11)/float64(1<<53)
	if len(t.Offers) > 0 {
		for _, b := range t.Offers[0].Breaks {
			if b.Qty < o.MOQ {
				continue
			}
			o.Breaks = append(o.Breaks, catalog.PriceBreak{Qty: b.Qty, Price: roundSig(b.Price*f, 4)})
		}
	}
	if len(o.Breaks) == 0 {
		o.Breaks = []catalog.PriceBreak{{Qty: o.MOQ, Price: 0.1}}
	}
	return o
}

func roundSig(v float64, n int) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', n, 64), 64)
	return r
}

// column is one output column: its header and the canonical name of what
// it holds (a catalog field, an offer column or a break quantity).
type column struct {
	head string
	key  string
	dim  units.Dim
	num  bool
}

// columns returns the columns of style s.
func columns(s Style) []column {
	var cols []column
	for _, f := range catalog.Fields {
		c := column{head: f.Name, key: f.Name, dim: f.Dim, num: f.Type == catalog.Number}
		switch s {
		case Symbols:
			c.head = symbolHeader(f)
		case Words:
			c.head = wordHeader(f.Name)
		}
		cols = append(cols, c)
	}
	for _, o := range gen.OfferColumns {
		h := o
		if s == Words {
			h = wordHeader(o)
		}
		cols = append(cols, column{head: h, key: o})
	}
	for _, q := range gen.BreakQtys {
		h := gen.BreakColumn(q)
		if s == Words {
			h = "Price @" + strconv.FormatInt(q, 10)
		}
		cols = append(cols, column{head: h, key: gen.BreakColumn(q)})
	}
	return cols
}

// recognised reports whether header h is read back as field with unit.
func recognised(h, field, unit string) bool {
	c := importers.RecognizeHeader(h)
	return c.Field == field && c.Unit == unit && c.Qual == "" && len(c.Conds) == 0
}

// symbolHeader is a trade symbol of f with its base unit in brackets
// ("V_RRM [V]"), the first of importers.HeaderWords that reads back as f;
// the canonical name with the unit, or the bare canonical name, otherwise.
func symbolHeader(f catalog.Field) string {
	unit := ""
	if f.Type == catalog.Number && f.Dim != units.None && f.Dim != units.Fraction {
		unit = f.Dim.Symbol()
	}
	suffix := ""
	if unit != "" {
		suffix = " [" + unit + "]"
	}
	for _, w := range importers.HeaderWords(f.Name) {
		if w == f.Name || w == strings.ToLower(w) || strings.Contains(w, " ") {
			continue // a trade symbol has capitals and no space
		}
		if recognised(w+suffix, f.Name, unit) {
			return w + suffix
		}
	}
	if recognised(f.Name+suffix, f.Name, unit) {
		return f.Name + suffix
	}
	return f.Name
}

// wordHeader is a plain-words alias of name (lower case, a space, no
// underscore) that reads back as name without a unit; name otherwise.
func wordHeader(name string) string {
	for _, w := range importers.HeaderWords(name) {
		if !strings.Contains(w, " ") || strings.ContainsAny(w, "_()[]@") || w != strings.ToLower(w) {
			continue
		}
		if recognised(w, name, "") {
			return w
		}
	}
	return name
}

// Header returns the header row of style s.
func Header(s Style) []string {
	cols := columns(s)
	h := make([]string, len(cols))
	for i, c := range cols {
		h[i] = c.head
	}
	return h
}

// Writer renders rows of one style.
type Writer struct {
	g     *Generator
	style Style
	cols  []column
	row   []string
}

// NewWriter returns a row renderer for style s.
func NewWriter(g *Generator, s Style) *Writer {
	cols := columns(s)
	return &Writer{g: g, style: s, cols: cols, row: make([]string, len(cols))}
}

// Row renders row i; the returned slice is reused by the next call.
func (w *Writer) Row(i int) []string {
	p := w.g.Part(i)
	o := p.Offers[0]
	for j, c := range w.cols {
		w.row[j] = w.cell(&p, &o, c)
	}
	return w.row
}

func (w *Writer) cell(p *catalog.Part, o *catalog.Offer, c column) string {
	if f, ok := catalog.FieldByName(c.key); ok && f.Type != catalog.Number {
		return p.TextField(c.key)
	}
	switch c.key {
	case "supplier":
		return o.Supplier
	case "sku":
		return o.SKU
	case "stock":
		if o.Stock != nil {
			return strconv.FormatInt(*o.Stock, 10)
		}
		return ""
	case "moq":
		return strconv.FormatInt(o.MOQ, 10)
	case "currency":
		return o.Currency
	}
	if c.num {
		v, ok := p.Num[c.key]
		if !ok {
			return ""
		}
		if w.style == Words && c.dim != units.None {
			return strings.ReplaceAll(units.FormatSig(v, c.dim, 9), ".", ",")
		}
		return fmtNum(v)
	}
	for _, b := range o.Breaks {
		if gen.BreakColumn(b.Qty) == c.key {
			if w.style == Words {
				return strings.ReplaceAll(fmtNum(b.Price), ".", ",")
			}
			return fmtNum(b.Price)
		}
	}
	return ""
}

// fmtNum writes v as a plain decimal (no exponent) at 9 significant digits.
func fmtNum(v float64) string {
	return strconv.FormatFloat(roundSig(v, 9), 'f', -1, 64)
}

// WriteCSV writes a header row and rows 0..n-1 of style s as CSV.
func WriteCSV(w io.Writer, g *Generator, s Style, n int) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	cw := csv.NewWriter(bw)
	cw.Comma = s.Comma()
	if err := cw.Write(Header(s)); err != nil {
		return err
	}
	rw := NewWriter(g, s)
	for i := 0; i < n; i++ {
		if err := cw.Write(rw.Row(i)); err != nil {
			return fmt.Errorf("synth: row %d: %w", i, err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}

// WriteXLSX writes a workbook with one sheet "parts": a header row and rows
// 0..n-1 of style s, every cell a string (as supplier exports often are).
// It streams through excelize's StreamWriter.
func WriteXLSX(w io.Writer, g *Generator, s Style, n int) error {
	f := excelize.NewFile()
	defer f.Close()
	const sheet = "parts"
	if err := f.SetSheetName("Sheet1", sheet); err != nil {
		return err
	}
	sw, err := f.NewStreamWriter(sheet)
	if err != nil {
		return err
	}
	h := Header(s)
	cells := make([]any, len(h))
	for j, v := range h {
		cells[j] = v
	}
	if err := sw.SetRow("A1", cells); err != nil {
		return err
	}
	rw := NewWriter(g, s)
	for i := 0; i < n; i++ {
		for j, v := range rw.Row(i) {
			if v == "" {
				cells[j] = nil
			} else {
				cells[j] = v
			}
		}
		ref, err := excelize.CoordinatesToCellName(1, i+2)
		if err != nil {
			return err
		}
		if err := sw.SetRow(ref, cells); err != nil {
			return fmt.Errorf("synth: row %d: %w", i, err)
		}
	}
	if err := sw.Flush(); err != nil {
		return err
	}
	_, err = f.WriteTo(w)
	return err
}
