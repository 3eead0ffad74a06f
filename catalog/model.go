// Package catalog holds the part model (kinds, canonical fields, units), the
// SQLite store that is the single source of truth, and the bleve text index
// derived from it.
package catalog

import (
	"cmp"
	"encoding/json"
	"strings"
	"unicode"

	"partsieve/catalog/units"
)

// Kind is the class of a part.
type Kind string

// Part kinds.
const (
	Diode  Kind = "diode"
	Fuse   Kind = "fuse"
	MOSFET Kind = "mosfet"
)

// Kinds lists every kind in display order.
var Kinds = []Kind{Diode, Fuse, MOSFET}

// Types allowed per kind. Diode: rectifier (silicon PN, incl. fast and
// ultrafast recovery), schottky, zener, tvs. MOSFET: n, p (channel).
// Fuse: IEC 60127 speed letters FF (very quick acting), F (quick acting),
// M (medium time lag), T (time lag), TT (long time lag).
var Types = map[Kind][]string{
	Diode:  {"rectifier", "schottky", "zener", "tvs"},
	MOSFET: {"n", "p"},
	Fuse:   {"FF", "F", "M", "T", "TT"},
}

// FieldType is the storage class of a field.
type FieldType int

// Field storage classes.
const (
	Number FieldType = iota // float64 in base SI units (°C for temperatures)
	Text                    // free text
	Bool                    // true/false
	Enum                    // one of a fixed set of lower-case words
)

// Field is one entry of the field dictionary.
type Field struct {
	Name  string    // canonical name, used in SQL, JSON, --where and mapping files
	Kinds []Kind    // kinds the field applies to; nil means all kinds
	Type  FieldType // storage class
	Dim   units.Dim // dimension of a Number field
	Pick  units.Pick
	Doc   string   // one line for `partsieve fields`
	Enum  []string // allowed values of an Enum field
}

// AppliesTo reports whether f is meaningful for kind k.
func (f Field) AppliesTo(k Kind) bool {
	if f.Kinds == nil {
		return true
	}
	for _, x := range f.Kinds {
		if x == k {
			return true
		}
	}
	return false
}

var (
	allKinds  []Kind
	diodeOnly = []Kind{Diode}
	fuseOnly  = []Kind{Fuse}
	fetOnly   = []Kind{MOSFET}
	semis     = []Kind{Diode, MOSFET}
)

// Fields is the field dictionary. Numeric values are stored in base SI
// units (V, A, W, Ω, K/W, A²s, C, s), temperatures in °C, tolerances as
// fractions (5 % is 0.05).
var Fields = []Field{
	{Name: "kind", Kinds: allKinds, Type: Enum, Enum: []string{"diode", "fuse", "mosfet"}, Doc: "part class"},
	{Name: "type", Kinds: allKinds, Type: Enum, Enum: []string{"rectifier", "schottky", "zener", "tvs", "n", "p", "FF", "F", "M", "T", "TT"}, Doc: "diode: rectifier|schottky|zener|tvs; mosfet: n|p channel; fuse: IEC 60127 speed letter FF|F|M|T|TT"},
	{Name: "mfr", Type: Text, Doc: "manufacturer"},
	{Name: "mpn", Type: Text, Doc: "manufacturer part number"},
	{Name: "desc", Type: Text, Doc: "description"},
	{Name: "package", Type: Text, Doc: "package or case"},
	{Name: "datasheet", Type: Text, Doc: "datasheet URL"},
	{Name: "lifecycle", Type: Enum, Enum: []string{"active", "nrnd", "obsolete", "unknown"}, Doc: "production status"},
	{Name: "rohs", Type: Bool, Doc: "RoHS compliant"},
	{Name: "aecq", Type: Bool, Doc: "automotive qualified (AEC-Q101 discretes, AEC-Q200 fuses)"},

	{Name: "tjmax", Kinds: semis, Type: Number, Dim: units.Temperature, Pick: units.Upper, Doc: "maximum junction temperature"},
	{Name: "rthja", Kinds: semis, Type: Number, Dim: units.ThermalRes, Doc: "junction-to-ambient thermal resistance"},
	{Name: "pd", Kinds: semis, Type: Number, Dim: units.Power, Doc: "rated power dissipation (Zener: power rating)"},

	{Name: "vrrm", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "repetitive peak reverse voltage V_RRM"},
	{Name: "ifav", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "average forward current I_F(AV)"},
	{Name: "ifsm", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "non-repetitive peak surge current I_FSM (half-sine)"},
	{Name: "ifsm_t", Kinds: diodeOnly, Type: Number, Dim: units.Time, Doc: "surge pulse length of ifsm (8.3 ms when absent)"},
	{Name: "vf", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "maximum forward voltage V_F at vf_if, vf_tj"},
	{Name: "vf_if", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "test current of vf"},
	{Name: "vf_tj", Kinds: diodeOnly, Type: Number, Dim: units.Temperature, Pick: units.Signed, Doc: "junction temperature of vf (25 °C when absent)"},
	{Name: "vf2", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "second datasheet forward voltage point, at vf2_if and vf2_tj"},
	{Name: "vf2_if", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "test current of vf2"},
	{Name: "vf2_tj", Kinds: diodeOnly, Type: Number, Dim: units.Temperature, Pick: units.Signed, Doc: "junction temperature of vf2"},
	{Name: "ir", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "maximum reverse leakage I_R at ir_vr and ir_tj"},
	{Name: "ir_vr", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "test voltage of ir"},
	{Name: "ir_tj", Kinds: diodeOnly, Type: Number, Dim: units.Temperature, Pick: units.Signed, Doc: "junction temperature of ir (25 °C when absent)"},
	{Name: "ir2", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "reverse leakage at a second temperature ir2_tj (same test voltage)"},
	{Name: "ir2_tj", Kinds: diodeOnly, Type: Number, Dim: units.Temperature, Pick: units.Signed, Doc: "junction temperature of ir2"},
	{Name: "vz", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "nominal Zener voltage V_Z"},
	{Name: "vz_tol", Kinds: diodeOnly, Type: Number, Dim: units.Fraction, Doc: "tolerance of vz (5 % is 0.05)"},
	{Name: "vrwm", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "TVS stand-off voltage V_RWM"},
	{Name: "vbr", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "TVS breakdown voltage V_BR (minimum)"},
	{Name: "vc", Kinds: diodeOnly, Type: Number, Dim: units.Voltage, Doc: "TVS clamping voltage V_C at ipp"},
	{Name: "ipp", Kinds: diodeOnly, Type: Number, Dim: units.Current, Doc: "TVS peak pulse current I_PP"},
	{Name: "ppk", Kinds: diodeOnly, Type: Number, Dim: units.Power, Doc: "TVS peak pulse power P_PK"},

	{Name: "vds", Kinds: fetOnly, Type: Number, Dim: units.Voltage, Doc: "drain-source voltage rating V_DS (magnitude)"},
	{Name: "vgs_max", Kinds: fetOnly, Type: Number, Dim: units.Voltage, Doc: "gate-source absolute maximum V_GS (magnitude)"},
	{Name: "vgs_th", Kinds: fetOnly, Type: Number, Dim: units.Voltage, Pick: units.Magnitude, Doc: "maximum gate threshold V_GS(th) (magnitude; of a range the larger end)"},
	{Name: "rdson", Kinds: fetOnly, Type: Number, Dim: units.Resistance, Doc: "maximum on-resistance R_DS(on) at 25 °C at rdson_vgs"},
	{Name: "rdson_vgs", Kinds: fetOnly, Type: Number, Dim: units.Voltage, Doc: "gate drive (magnitude) at which rdson is specified"},
	{Name: "rdson2", Kinds: fetOnly, Type: Number, Dim: units.Resistance, Doc: "second R_DS(on) rating, at rdson2_vgs"},
	{Name: "rdson2_vgs", Kinds: fetOnly, Type: Number, Dim: units.Voltage, Doc: "gate drive of rdson2"},
	{Name: "id", Kinds: fetOnly, Type: Number, Dim: units.Current, Doc: "continuous drain current rating I_D"},
	{Name: "qg", Kinds: fetOnly, Type: Number, Dim: units.Charge, Doc: "total gate charge Q_G"},

	{Name: "in", Kinds: fuseOnly, Type: Number, Dim: units.Current, Doc: "rated current I_N"},
	{Name: "un_dc", Kinds: fuseOnly, Type: Number, Dim: units.Voltage, Doc: "rated voltage, DC"},
	{Name: "un_ac", Kinds: fuseOnly, Type: Number, Dim: units.Voltage, Doc: "rated voltage, AC"},
	{Name: "breaking", Kinds: fuseOnly, Type: Number, Dim: units.Current, Doc: "rated breaking capacity"},
	{Name: "i2t", Kinds: fuseOnly, Type: Number, Dim: units.I2t, Doc: "melting I²t"},
	{Name: "i2t_clear", Kinds: fuseOnly, Type: Number, Dim: units.I2t, Doc: "total clearing I²t (when the maker gives it)"},
	{Name: "rcold", Kinds: fuseOnly, Type: Number, Dim: units.Resistance, Doc: "cold resistance"},
	{Name: "fuse_std", Kinds: fuseOnly, Type: Enum, Enum: []string{"iec", "ul", "blade"}, Doc: "rating convention: iec (IEC 60127-style), ul (UL 248-14-style, 75 % rule), blade (ISO 8820 automotive)"},
	{Name: "rerate", Kinds: fuseOnly, Type: Text, Doc: `temperature rerating points "T:factor" pairs, e.g. "25:1, 65:0.9, 85:0.8"`},
}

var fieldIndex = func() map[string]int {
	m := make(map[string]int, len(Fields))
	for i, f := range Fields {
		m[f.Name] = i
	}
	return m
}()

// FieldByName returns the field named name (canonical name, case-insensitive).
func FieldByName(name string) (Field, bool) {
	i, ok := fieldIndex[strings.ToLower(name)]
	if !ok {
		// type enum keeps upper-case fuse letters, names are lower case
		return Field{}, false
	}
	return Fields[i], true
}

// NumberFields returns the Number fields in dictionary order.
func NumberFields() []Field {
	var out []Field
	for _, f := range Fields {
		if f.Type == Number {
			out = append(out, f)
		}
	}
	return out
}

// Part is one manufacturer part with its parameters and supplier offers.
// A part is identified by (Mfr, MPN) compared through NormKey.
type Part struct {
	Kind      Kind   `json:"kind"`
	Type      string `json:"type,omitempty"`
	Mfr       string `json:"mfr"`
	MPN       string `json:"mpn"`
	Desc      string `json:"desc,omitempty"`
	Package   string `json:"package,omitempty"`
	Datasheet string `json:"datasheet,omitempty"`
	Lifecycle string `json:"lifecycle,omitempty"`
	RoHS      *bool  `json:"rohs,omitempty"`
	AECQ      *bool  `json:"aecq,omitempty"`
	FuseStd   string `json:"fuse_std,omitempty"`
	Rerate    string `json:"rerate,omitempty"`
	// Num holds Number fields by canonical name; an absent key means the
	// value is unknown (never zero).
	Num    map[string]float64 `json:"values"`
	Offers []Offer            `json:"offers,omitempty"`
}

// Get returns a numeric field and whether it is present.
func (p *Part) Get(name string) (float64, bool) {
	v, ok := p.Num[name]
	return v, ok
}

// Set stores a numeric field.
func (p *Part) Set(name string, v float64) {
	if p.Num == nil {
		p.Num = map[string]float64{}
	}
	p.Num[name] = v
}

// Offer is what one supplier sheet says about a part.
type Offer struct {
	Supplier string       `json:"supplier"`
	SKU      string       `json:"sku,omitempty"`
	Stock    *int64       `json:"stock,omitempty"`
	MOQ      int64        `json:"moq,omitempty"`
	Currency string       `json:"currency,omitempty"`
	Breaks   []PriceBreak `json:"price_breaks,omitempty"`
}

// PriceBreak is a unit price that applies from Qty pieces upward.
type PriceBreak struct {
	Qty   int64   `json:"qty"`
	Price float64 `json:"unit_price"`
}

// ByQty orders price breaks by quantity (for slices.SortStableFunc).
func ByQty(x, y PriceBreak) int { return cmp.Compare(x.Qty, y.Qty) }

// NormKey normalises a manufacturer or part number for identity: upper
// case, with spaces, dashes (ASCII and Unicode) and underscores removed, so
// that "ab-12 34" and "AB1234" are the same part. Dots and slashes are kept:
// they often carry meaning in part numbers.
func NormKey(s string) string {
	var b strings.Builder
	for _, r := range strings.TrimSpace(s) {
		switch {
		case unicode.IsSpace(r), r == '-', r == '_', r == '‐', r == '‑', r == '–', r == '—':
			continue
		}
		b.WriteRune(unicode.ToUpper(r))
	}
	return b.String()
}

// MarshalJSON writes a part flat, with every field under its canonical name
// in base SI units (°C for temperatures) and the offers with price breaks:
// {"kind":"diode","mpn":"X","vrrm":400,"ifav":2,...,"offers":[...]}.
func (p Part) MarshalJSON() ([]byte, error) {
	m := p.Flat()
	if len(p.Offers) > 0 {
		m["offers"] = p.Offers
	} else {
		m["offers"] = []Offer{}
	}
	return json.Marshal(m)
}

// Flat returns the part's present fields by canonical name: strings for
// text and enum fields, bool for booleans, float64 for numbers.
func (p *Part) Flat() map[string]any {
	m := map[string]any{"kind": string(p.Kind), "mfr": p.Mfr, "mpn": p.MPN}
	put := func(k, v string) {
		if v != "" {
			m[k] = v
		}
	}
	put("type", p.Type)
	put("desc", p.Desc)
	put("package", p.Package)
	put("datasheet", p.Datasheet)
	put("lifecycle", p.Lifecycle)
	put("fuse_std", p.FuseStd)
	put("rerate", p.Rerate)
	if p.RoHS != nil {
		m["rohs"] = *p.RoHS
	}
	if p.AECQ != nil {
		m["aecq"] = *p.AECQ
	}
	for k, v := range p.Num {
		m[k] = v
	}
	return m
}

// TextField returns a text, enum or bool field of p as text ("" when
// absent; booleans as "yes"/"no").
func (p *Part) TextField(name string) string {
	b := func(x *bool) string {
		if x == nil {
			return ""
		}
		if *x {
			return "yes"
		}
		return "no"
	}
	switch name {
	case "kind":
		return string(p.Kind)
	case "type":
		return p.Type
	case "mfr":
		return p.Mfr
	case "mpn":
		return p.MPN
	case "desc":
		return p.Desc
	case "package":
		return p.Package
	case "datasheet":
		return p.Datasheet
	case "lifecycle":
		return p.Lifecycle
	case "fuse_std":
		return p.FuseStd
	case "rerate":
		return p.Rerate
	case "rohs":
		return b(p.RoHS)
	case "aecq":
		return b(p.AECQ)
	}
	return ""
}

// Label is the kind and type as people say them: "P-MOSFET",
// "schottky diode", "fuse T (iec)".
func (p *Part) Label() string {
	switch p.Kind {
	case MOSFET:
		switch strings.ToLower(p.Type) {
		case "p":
			return "P-MOSFET"
		case "n":
			return "N-MOSFET"
		}
		return "MOSFET"
	case Fuse:
		s := "fuse"
		if p.Type != "" {
			s += " " + p.Type
		}
		if p.FuseStd != "" {
			s += " (" + p.FuseStd + ")"
		}
		return s
	case Diode:
		if p.Type != "" {
			return p.Type + " diode"
		}
		return "diode"
	}
	return string(p.Kind)
}
