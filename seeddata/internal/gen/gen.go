// Package gen builds the seed catalog (seeddata/seed.csv) from small
// tables of invented part families and from formulas that keep every value
// physically consistent. Every maker, part number, supplier, SKU, stock
// figure and price it produces is invented for demonstration.
//
// The output is deterministic: pseudo-random choices (lifecycle, supplier,
// stock, price spread) come from an FNV-1a hash of the part number, never
// from a random source, so regenerating gives the same bytes.
//
// Formulas are documented beside the tables that use them (diodes.go,
// fets.go, fuses.go, offers.go). Sources refer to the project's engineering
// reference (REFERENCE.md, section numbers); values it does not give are
// marked "invented for demo".
package gen

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"hash/fnv"
	"math"
	"strconv"

	"partsieve/catalog"
)

// OfferColumns are the supplier columns that follow the part fields.
var OfferColumns = []string{"supplier", "sku", "stock", "moq", "currency"}

// BreakQtys are the price-break quantities; their column titles are
// "1+", "10+", ... (unit price from that quantity upward).
var BreakQtys = []int64{1, 10, 100, 1000, 5000}

// BreakColumn is the header of the price-break column for qty.
func BreakColumn(qty int64) string { return strconv.FormatInt(qty, 10) + "+" }

// Header returns the CSV header: the canonical field names in dictionary
// order, the offer columns, then the price-break columns.
func Header() []string {
	h := make([]string, 0, len(catalog.Fields)+len(OfferColumns)+len(BreakQtys))
	for _, f := range catalog.Fields {
		h = append(h, f.Name)
	}
	h = append(h, OfferColumns...)
	for _, q := range BreakQtys {
		h = append(h, BreakColumn(q))
	}
	return h
}

// Parts returns every seed part with its offers, in output order.
func Parts() []catalog.Part {
	var ps []catalog.Part
	ps = append(ps, rectifiers()...)
	ps = append(ps, schottkys()...)
	ps = append(ps, zeners()...)
	ps = append(ps, tvss()...)
	ps = append(ps, mosfets()...)
	ps = append(ps, fuses()...)
	return ps
}

// Generate returns the seed catalog as CSV (UTF-8, comma, header row, one
// row per offer).
func Generate() ([]byte, error) {
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	header := Header()
	if err := w.Write(header); err != nil {
		return nil, err
	}
	ps := Parts()
	for i := range ps {
		p := &ps[i]
		if len(p.Offers) == 0 {
			return nil, fmt.Errorf("seed part %s %s has no offer", p.Mfr, p.MPN)
		}
		for _, o := range p.Offers {
			if err := w.Write(row(p, o, header)); err != nil {
				return nil, err
			}
		}
	}
	w.Flush()
	if err := w.Error(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// row renders one offer of p under header.
func row(p *catalog.Part, o catalog.Offer, header []string) []string {
	prices := map[string]string{}
	for _, b := range o.Breaks {
		prices[BreakColumn(b.Qty)] = fmtNum(b.Price)
	}
	out := make([]string, len(header))
	for i, h := range header {
		switch h {
		case "kind":
			out[i] = string(p.Kind)
		case "type":
			out[i] = p.Type
		case "mfr":
			out[i] = p.Mfr
		case "mpn":
			out[i] = p.MPN
		case "desc":
			out[i] = p.Desc
		case "package":
			out[i] = p.Package
		case "datasheet":
			out[i] = p.Datasheet
		case "lifecycle":
			out[i] = p.Lifecycle
		case "rohs":
			out[i] = yesNo(p.RoHS)
		case "aecq":
			out[i] = yesNo(p.AECQ)
		case "fuse_std":
			out[i] = p.FuseStd
		case "rerate":
			out[i] = p.Rerate
		case "supplier":
			out[i] = o.Supplier
		case "sku":
			out[i] = o.SKU
		case "stock":
			if o.Stock != nil {
				out[i] = strconv.FormatInt(*o.Stock, 10)
			}
		case "moq":
			out[i] = strconv.FormatInt(o.MOQ, 10)
		case "currency":
			out[i] = o.Currency
		default:
			if v, ok := p.Num[h]; ok {
				out[i] = fmtNum(v)
			} else {
				out[i] = prices[h]
			}
		}
	}
	return out
}

func yesNo(b *bool) string {
	switch {
	case b == nil:
		return ""
	case *b:
		return "yes"
	}
	return "no"
}

// fmtNum writes v as a plain decimal number (no exponent) after removing
// binary floating-point noise (9 significant digits).
func fmtNum(v float64) string {
	return strconv.FormatFloat(roundSig(v, 9), 'f', -1, 64)
}

// roundSig rounds v to n significant digits.
func roundSig(v float64, n int) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', n, 64), 64)
	return r
}

// roundStep rounds v to the nearest multiple of step.
func roundStep(v, step float64) float64 { return roundSig(math.Round(v/step)*step, 9) }

// floorStep rounds v down to a multiple of step.
func floorStep(v, step float64) float64 { return roundSig(math.Floor(v/step+1e-9)*step, 9) }

// hash is FNV-1a over the parts, the source of every deterministic
// pseudo-random choice.
func hash(parts ...string) uint64 {
	h := fnv.New64a()
	for _, s := range parts {
		h.Write([]byte(s))
		h.Write([]byte{0})
	}
	return h.Sum64()
}

// maker is an invented manufacturer.
type maker struct {
	name string
	slug string // for invented datasheet links under the reserved .example domain; "" = no link
}

// Invented manufacturers (none exists; any likeness is accidental).
var (
	corvane   = maker{"Corvane Semiconductor", "corvane"}
	halvard   = maker{"Halvard Electronics", ""}
	quillon   = maker{"Quillon Power", "quillon"}
	mosswell  = maker{"Mosswell Semi", ""}
	larkspur  = maker{"Larkspur Devices", "larkspur"}
	brindle   = maker{"Brindle Microdevices", ""}
	tamsin    = maker{"Tamsin Devices", "tamsin"}
	tidemark  = maker{"Tidemark Silicon", "tidemark"}
	ferrowind = maker{"Ferrowind Power", ""}
	velmora   = maker{"Velmora Semiconductor", "velmora"}
	saltmarsh = maker{"Saltmarsh Fuseworks", "saltmarsh"}
	elderline = maker{"Elderline Protection", ""}
	hollin    = maker{"Hollin Circuit Protection", "hollin"}
	brackwtr  = maker{"Brackwater Fuse Co.", "brackwater"}
)

// newPart starts a part with the common text fields. Lifecycle comes from
// lifecycleOf unless the caller overrides it; every seed part is RoHS
// compliant except obsolete ones whose hash says otherwise.
func newPart(k catalog.Kind, typ string, m maker, mpn, pkg, desc string, aecq bool) catalog.Part {
	p := catalog.Part{
		Kind:      k,
		Type:      typ,
		Mfr:       m.name,
		MPN:       mpn,
		Desc:      desc,
		Package:   pkg,
		Lifecycle: lifecycleOf(mpn),
		Num:       map[string]float64{},
	}
	if m.slug != "" {
		p.Datasheet = "https://" + m.slug + ".example/ds/" + mpn + ".pdf"
	}
	rohs := !(p.Lifecycle == "obsolete" && hash(mpn, "rohs")%2 == 0)
	p.RoHS = &rohs
	p.AECQ = &aecq
	return p
}

// lifecycleOf gives about 6 % "nrnd" and 4 % "obsolete" parts, the rest
// "active" (invented for demo).
func lifecycleOf(mpn string) string {
	switch h := hash(mpn, "life") % 100; {
	case h < 6:
		return "nrnd"
	case h < 10:
		return "obsolete"
	}
	return "active"
}

// setLife overrides the lifecycle and keeps the RoHS flag consistent.
func setLife(p *catalog.Part, life string) {
	p.Lifecycle = life
	rohs := !(life == "obsolete" && hash(p.MPN, "rohs")%2 == 0)
	p.RoHS = &rohs
}

// g formats a number for descriptions ("1.5", "400").
func g(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
