package importers

import (
	"sort"

	"partsieve/catalog"
)

// Pseudo-fields: header targets that are not catalog fields but steer the
// import. They appear in `partsieve fields` through ExtraFields.
const (
	fSupplier = "supplier" // offer: supplier name
	fSKU      = "sku"      // offer: supplier's order code
	fStock    = "stock"    // offer: pieces in stock
	fMOQ      = "moq"      // offer: minimum order quantity
	fCurrency = "currency" // offer: ISO 4217 code or symbol of the prices
	fPrice    = "price"    // offer: unit price (at Column.Qty, or a break pair)
	fQty      = "qty"      // offer: quantity of a break pair
	fBreaks   = "breaks"   // offer: "1:0.50; 10:0.42" in one cell
	fCategory = "category" // words that tell kind and type
	fChannel  = "channel"  // MOSFET channel: N or P (words)
	fSpeed    = "speed"    // fuse speed class: FF F M T TT (words or letters)
	gVoltage  = "voltage"  // generic voltage rating, resolved per row by kind
	gCurrent  = "current"  // generic current rating, resolved per row by kind
	gPower    = "power"    // generic power rating, resolved per row by kind
	gResist   = "resistance"
	gBreak    = "breakdown" // generic breakdown voltage
)

// ExtraField is a header target that is not a catalog field: offer columns,
// words that tell the kind, and generic ratings resolved by kind.
type ExtraField struct {
	Name string
	Doc  string
}

// ExtraFields lists the header targets besides catalog.Fields, for
// `partsieve fields` and mapping files.
var ExtraFields = []ExtraField{
	{fSupplier, "offer: supplier (default: --supplier, else the source label)"},
	{fSKU, "offer: supplier order code"},
	{fStock, "offer: pieces in stock"},
	{fMOQ, "offer: minimum order quantity"},
	{fCurrency, "offer: currency of the prices (ISO 4217 code or €, $, £)"},
	{fPrice, `offer: unit price; "1+", "Price @100", "100-999" give the break quantity`},
	{fQty, `offer: quantity of a "Break N qty"/"Break N price" pair`},
	{fBreaks, `offer: all price breaks in one cell, "1:0.50; 10:0.42; 100:0.31"`},
	{fCategory, "words that tell kind and type (Schottky, Zener, P-channel, slow-blow...)"},
	{fChannel, "MOSFET channel: N or P"},
	{fSpeed, "fuse speed class: FF, F, M, T, TT or words (fast-acting, time-lag...)"},
	{gVoltage, "voltage rating by kind: diode vrrm (Zener vz, TVS vrwm), MOSFET vds, fuse un_dc/un_ac"},
	{gCurrent, "current rating by kind: diode ifav, MOSFET id, fuse in"},
	{gPower, "power rating by kind: TVS ppk, other diodes and MOSFETs pd"},
	{gResist, "resistance by kind: MOSFET rdson, fuse rcold"},
	{gBreak, "breakdown voltage by kind: TVS vbr, Zener vz, MOSFET vds"},
}

// headerWords lists, per target, the header texts recognised for it as the
// trade writes them. Matching is done on normalised text (see normWord), so
// "V_RRM", "V RRM", "Vrrm" and "V-RRM" are one entry; the list keeps the
// readable forms for `partsieve fields`. The canonical name is always
// recognised and need not be listed.
var headerWords = map[string][]string{
	"kind":      {"part kind", "device kind", "part class", "device class", "class"},
	"type":      {"subtype", "diode type", "fuse type", "mosfet type", "device type", "part type", "technology"},
	fCategory:   {"category", "product category", "family", "product family", "product type", "group", "product group", "component type", "series type"},
	fChannel:    {"channel", "channel type", "polarity", "fet type", "transistor polarity", "configuration", "n/p"},
	fSpeed:      {"speed", "characteristic", "fuse characteristic", "speed class", "blow characteristic", "time-current characteristic", "tripping characteristic", "fusing speed", "speed rating", "blow type", "fuse speed", "response"},
	"mfr":       {"mfr", "mfg", "manufacturer", "manufacturer name", "maker", "make", "brand", "producer", "mfr name", "mfg name", "mfr.", "manuf", "manufacturer / brand"},
	"mpn":       {"MPN", "part number", "part no", "part no.", "part #", "PN", "P/N", "mfr part number", "mfr part no.", "mfr part #", "mfr. part number", "manufacturer part number", "manufacturer part no.", "mfg part number", "mfg part no.", "mfr PN", "mfg PN", "part", "part name", "type number", "device", "model", "part_number", "component", "device name", "manufacturer pn", "mfr p/n", "part id"},
	"desc":      {"description", "desc", "product description", "part description", "item description", "short description", "detailed description", "descr", "long description"},
	"package":   {"pkg", "case", "case/package", "package/case", "case style", "package type", "housing", "size", "footprint", "outline", "case code", "package / case", "body", "dimensions"},
	"datasheet": {"data sheet", "datasheet url", "datasheet link", "pdf", "documentation", "spec sheet", "datasheet (url)"},
	"lifecycle": {"life cycle", "lifecycle status", "status", "part status", "product status", "production status", "life-cycle"},
	"rohs":      {"RoHS", "RoHS compliant", "RoHS status", "RoHS compliance", "lead free", "Pb-free", "RoHS 3"},
	"aecq":      {"AEC-Q101", "AEC-Q200", "AEC-Q", "AEC qualified", "automotive", "automotive grade", "automotive qualified", "qualification", "AEC-Q101 qualified", "AEC-Q200 qualified"},

	"tjmax":  {"Tj max", "Tjmax", "Tj", "T_J", "TJ(max)", "T_J(max)", "Tjm", "junction temperature", "max junction temperature", "maximum junction temperature", "operating junction temperature", "operating temperature", "operating temperature range", "junction temperature range"},
	"rthja":  {"RthJA", "Rth(j-a)", "R_th(j-a)", "Rth j-a", "RθJA", "θJA", "theta JA", "R_thJA", "Rth JA", "thermal resistance", "thermal resistance junction to ambient", "thermal resistance junction-ambient", "junction to ambient thermal resistance", "Rth(ja)", "R_θJA"},
	"pd":     {"Pd", "P_D", "Ptot", "P_tot", "power dissipation", "max power dissipation", "total power dissipation", "dissipation", "Pd max", "PD(max)"},
	"vrrm":   {"VRRM", "V_RRM", "V RRM", "Vrrm", "VRM", "V_RM", "VR", "V_R", "VRRM/VR", "reverse voltage", "max reverse voltage", "maximum reverse voltage", "peak reverse voltage", "repetitive peak reverse voltage", "peak repetitive reverse voltage", "blocking voltage", "DC blocking voltage", "reverse voltage rating", "PIV", "PRV", "peak inverse voltage", "max repetitive reverse voltage"},
	"ifav":   {"IF(AV)", "I_F(AV)", "IFAV", "I_FAV", "IF AV", "Io", "I_O", "I0", "IF", "I_F", "forward current", "average forward current", "avg forward current", "average rectified current", "average rectified forward current", "rectified current", "max forward current", "continuous forward current", "rated forward current", "output current", "max average forward current"},
	"ifsm":   {"IFSM", "I_FSM", "I FSM", "surge current", "peak surge current", "forward surge current", "peak forward surge current", "non-repetitive peak forward current", "non-repetitive surge current", "surge", "max surge current", "peak forward surge"},
	"ifsm_t": {"surge pulse length", "surge duration", "surge time", "IFSM pulse", "IFSM time", "surge pulse width", "tp surge"},
	"vf":     {"VF", "V_F", "V F", "VFM", "V_FM", "forward voltage", "forward voltage drop", "max forward voltage", "forward drop", "max instantaneous forward voltage", "instantaneous forward voltage"},
	"vf_if":  {"VF IF", "VF test current", "test current VF", "IF test", "IF for VF", "VF condition IF", "forward test current"},
	"vf_tj":  {"VF Tj", "VF temperature"},
	"ir":     {"IR", "I_R", "IRM", "I_RM", "reverse current", "reverse leakage", "reverse leakage current", "leakage current", "leakage", "max reverse current", "max reverse leakage current", "reverse current IR", "DC reverse current"},
	"ir_vr":  {"IR VR", "VR test", "IR test voltage", "leakage test voltage", "VR for IR", "reverse test voltage"},
	"ir_tj":  {"IR Tj", "IR temperature"},
	"vz":     {"VZ", "V_Z", "Vz nom", "zener voltage", "nominal zener voltage", "zener voltage nom", "Z voltage", "zener voltage VZ", "VZ(nom)"},
	"vz_tol": {"tolerance", "tol", "tol.", "VZ tolerance", "zener tolerance", "voltage tolerance", "VZ tol"},
	"vrwm":   {"VRWM", "V_RWM", "VWM", "V_WM", "stand-off voltage", "standoff voltage", "reverse stand-off voltage", "working peak reverse voltage", "reverse working voltage", "stand off voltage", "working voltage"},
	"vbr":    {"VBR", "V_BR", "V(BR)", "V(BR)R", "VBR min", "min breakdown voltage", "minimum breakdown voltage", "reverse breakdown voltage", "VBR(min)", "breakdown voltage min"},
	"vc":     {"VC", "V_C", "VCL", "V_CL", "clamping voltage", "max clamping voltage", "clamp voltage", "VC max", "clamping voltage VC"},
	"ipp":    {"IPP", "I_PP", "IPPM", "I_PPM", "peak pulse current", "max peak pulse current", "pulse current", "peak pulse surge current"},
	"ppk":    {"PPK", "P_PK", "PPP", "P_PP", "PPPM", "P_PPM", "Ppk", "peak pulse power", "peak power", "peak pulse power dissipation", "pulse power", "peak power dissipation"},

	"vds":        {"VDS", "V_DS", "VDSS", "V_DSS", "V(BR)DSS", "BVDSS", "BV_DSS", "drain-source voltage", "drain source voltage", "drain to source voltage", "drain-source breakdown voltage", "VDS max", "drain voltage", "max drain-source voltage"},
	"vgs_max":    {"VGS", "V_GS", "VGS max", "Vgsmax", "VGSS", "V_GSS", "gate-source voltage", "gate source voltage", "gate to source voltage", "max gate-source voltage", "gate voltage", "gate-source voltage max", "VGS(max)"},
	"vgs_th":     {"VGS(th)", "V_GS(th)", "Vgs(th)", "VGSth", "V GS(th)", "Vth", "V_th", "gate threshold", "gate threshold voltage", "threshold voltage", "VGS(to)", "Vgs th"},
	"rdson":      {"RDS(on)", "R_DS(on)", "RDSon", "Rdson", "RDS on", "R DS(on)", "RDS", "R_DS", "Ron", "R_on", "on-resistance", "on resistance", "drain-source on-resistance", "static drain-source on-resistance", "drain source on resistance"},
	"rdson_vgs":  {"RDS(on) VGS", "VGS for RDS(on)", "VGS(RDSon)", "gate drive", "gate drive voltage", "drive voltage", "RDS(on) test voltage", "VGS test", "RDS(on) gate voltage"},
	"rdson2":     {"RDS(on) 2", "RDSon2"},
	"rdson2_vgs": {"RDS(on) 2 VGS"},
	"id":         {"ID", "I_D", "drain current", "continuous drain current", "ID max", "IDmax", "max drain current", "ID cont", "drain current continuous", "ID(cont)"},
	"qg":         {"Qg", "Q_G", "Qg total", "Qgtot", "Q_g(tot)", "total gate charge", "gate charge", "Qg(tot)"},

	"in":        {"IN", "I_N", "I N", "nominal current", "rated current IN", "fuse current", "fuse rating", "current rating IN", "nominal current IN"},
	"un_dc":     {"UN DC", "UN(DC)", "U_N DC", "VDC", "V DC", "rated voltage DC", "voltage rating DC", "DC voltage", "DC voltage rating", "max voltage DC", "voltage DC", "DC rated voltage", "rated DC voltage", "voltage (DC)"},
	"un_ac":     {"UN AC", "UN(AC)", "U_N AC", "VAC", "V AC", "rated voltage AC", "voltage rating AC", "AC voltage", "AC voltage rating", "max voltage AC", "voltage AC", "AC rated voltage", "rated AC voltage", "voltage (AC)"},
	"breaking":  {"breaking capacity", "interrupting rating", "interrupting capacity", "rated breaking capacity", "breaking current", "interrupt rating", "max interrupting current", "short circuit rating", "breaking capacity DC", "rupturing capacity", "BC"},
	"i2t":       {"I2t", "I²t", "I^2t", "melting I2t", "melting I²t", "pre-arcing I2t", "prearcing I²t", "nominal melting I2t", "I2t melting", "joule integral", "melting integral", "I²t melting"},
	"i2t_clear": {"clearing I2t", "total clearing I²t", "I2t clearing", "operating I2t", "clearing I²t"},
	"rcold":     {"Rcold", "R_cold", "cold resistance", "resistance cold", "typical cold resistance", "internal resistance", "DC cold resistance", "cold resistance typ"},
	"fuse_std":  {"standard", "fuse standard", "approval", "approvals", "agency approval", "standards", "rating standard", "norm", "certification"},
	"rerate":    {"rerating", "temperature rerating", "derating", "temperature derating"},

	fSupplier: {"vendor", "distributor", "seller", "stockist", "supplier name", "vendor name"},
	fSKU:      {"SKU", "supplier part number", "supplier part no.", "order code", "order number", "order no.", "ordering code", "article number", "article no.", "item number", "item no.", "catalog number", "cat. no.", "stock code", "vendor part number", "distributor part number", "supplier PN", "order #", "supplier SKU"},
	fStock:    {"in stock", "qty available", "quantity available", "available", "qty in stock", "inventory", "on hand", "stock qty", "stock level", "quantity on hand", "qty on hand", "stock quantity", "available qty"},
	fMOQ:      {"MOQ", "minimum order", "minimum order quantity", "min order", "min order qty", "min qty", "minimum quantity", "min. order", "order minimum", "min. order qty"},
	fCurrency: {"curr", "ccy", "currency code"},
	fPrice:    {"unit price", "cost", "unit cost", "price each", "price per unit", "each", "price/unit"},
	fQty:      {"quantity", "break qty", "price break qty", "break quantity"},
	fBreaks:   {"price breaks", "pricing", "price_breaks", "price tiers", "tiered pricing", "volume pricing", "prices"},
	gVoltage:  {"rated voltage", "voltage rating", "max voltage", "maximum voltage", "V rating", "Vmax", "UN", "U_N", "nominal voltage", "V_max"},
	gCurrent:  {"rated current", "current rating", "max current", "maximum current", "I max", "Imax", "amperage", "amp rating", "ampere rating", "I_max"},
	gPower:    {"power rating", "rated power", "max power", "maximum power", "P max", "Pmax", "wattage", "P_max"},
	gResist:   {"resistance"},
	gBreak:    {"breakdown voltage", "breakdown"},
}

// headerIndex maps a normalised header word to its target.
var headerIndex = func() map[string]string {
	m := map[string]string{}
	add := func(word, target string) {
		k := normWord(word)
		if k == "" {
			return
		}
		if prev, ok := m[k]; ok && prev != target {
			panic("importers: header word " + word + " maps to both " + prev + " and " + target)
		}
		m[k] = target
	}
	for _, f := range catalog.Fields {
		add(f.Name, f.Name)
	}
	for _, f := range ExtraFields {
		add(f.Name, f.Name)
	}
	// targets sorted so that a clash panics the same way every run
	targets := make([]string, 0, len(headerWords))
	for t := range headerWords {
		targets = append(targets, t)
	}
	sort.Strings(targets)
	for _, t := range targets {
		for _, w := range headerWords[t] {
			add(w, t)
		}
	}
	return m
}()

// HeaderWords returns the header words recognised for a canonical field or
// an extra field (see ExtraFields), canonical name first, for `partsieve
// fields`. Matching ignores case, spaces, underscores, dashes, dots,
// parentheses and subscripts, and strips units, test conditions ("@ 10V")
// and max/typ/min qualifiers, so each word stands for many spellings.
func HeaderWords(field string) []string {
	words, ok := headerWords[field]
	_, isField := catalog.FieldByName(field)
	if !ok && !isField && !isExtra(field) {
		return nil
	}
	out := []string{field}
	seen := map[string]bool{normWord(field): true}
	for _, w := range words {
		if k := normWord(w); !seen[k] {
			seen[k] = true
			out = append(out, w)
		}
	}
	return out
}

func isExtra(name string) bool {
	for _, f := range ExtraFields {
		if f.Name == name {
			return true
		}
	}
	return false
}
