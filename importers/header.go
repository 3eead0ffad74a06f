package importers

import (
	"regexp"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// Column is what one header cell means.
type Column struct {
	Header   string      `json:"header"`             // the header as written in the sheet
	Field    string      `json:"field,omitempty"`    // catalog field or ExtraFields name; "" = not recognised
	Unit     string      `json:"unit,omitempty"`     // unit written in the header: the default for the column's cells
	Qual     string      `json:"qual,omitempty"`     // qualifier written in the header: "max", "min", "typ", "nom" or ""
	Conds    []Condition `json:"conds,omitempty"`    // test conditions written in the header ("@ 10V")
	Qty      int64       `json:"qty,omitempty"`      // price: the break quantity ("10+" gives 10); 0 = plain price
	Pair     int         `json:"pair,omitempty"`     // price, qty: index N of a "Break N qty"/"Break N price" pair
	Currency string      `json:"currency,omitempty"` // currency written in the header ("(EUR)", "€")

	bareNum bool       // "Price 3" or "Qty 3": a break pair index or a quantity, decided with the other columns
	pick    units.Pick // mapping file override of the field's pick
	hasPick bool
	mapped  bool // set by a mapping file: taken as it is
}

// Condition is a test condition written in a header: "RDS(on) @ 10V" gives
// {Field: "rdson_vgs", Value: 10}; "IR @ VR" gives {Field: "ir_vr", Ref:
// "vrrm"} (the row's own V_RRM).
type Condition struct {
	Field string    `json:"field,omitempty"` // field the condition fills for this column's field; "" = no place for it
	Dim   units.Dim `json:"-"`
	Value float64   `json:"value,omitempty"` // base SI units, °C for temperature (when Ref is "")
	Ref   string    `json:"ref,omitempty"`   // take the value from this field of the same row
	Text  string    `json:"text"`            // as written
}

// RecognizeHeader tells what one header cell means: the field, the unit
// written in it, a max/typ/min qualifier, test conditions and, for price
// columns, the break quantity and currency. Field is "" when the header is
// not recognised. It never fails; an unrecognisable header is simply
// unknown.
func RecognizeHeader(header string) Column {
	if len(header) > maxHeaderLen {
		return Column{Header: header} // prose, not a column header
	}
	col, cur := recognize(header, true)
	if cur != "" && col.Field != fPrice && col.Field != fBreaks && col.Field != fQty {
		// a currency code that is part of a name ("Ron" is also the
		// Romanian leu): read the header again without cutting it
		col, _ = recognize(header, false)
	}
	if col.Field == "" && strings.Contains(header, "/") {
		// two languages or two names: "Hersteller / Manufacturer"
		var found Column
		n := 0
		for _, part := range strings.Split(header, "/") {
			if c := RecognizeHeader(part); c.Field != "" {
				if n > 0 && c.Field != found.Field {
					return Column{Header: header}
				}
				found, n = c, n+1
			}
		}
		if n > 0 {
			found.Header = header
			return found
		}
	}
	return col
}

// recognize is RecognizeHeader, cutting a currency out of the header
// first when cutCur is set; it also returns the currency it cut.
func recognize(header string, cutCur bool) (Column, string) {
	col := Column{Header: header}
	h := cleanSpaces(header)
	if h == "" {
		return col, ""
	}
	if cutCur {
		h, col.Currency = cutCurrency(h)
	}
	cur := col.Currency
	if pc, ok := priceHeader(h); ok {
		pc.Header, pc.Currency = header, col.Currency
		return pc, cur
	}

	// Bracket groups: units, conditions, or words that belong to the name.
	var kept []string // non-unit word groups that may be noise ("(English)")
	h = bracketRE.ReplaceAllStringFunc(h, func(g string) string {
		inner := strings.TrimSpace(g[1 : len(g)-1])
		switch {
		case inner == "":
			return " "
		case isHeaderUnit(inner):
			col.Unit = inner
			return " "
		case hasDigit(inner):
			if cs := parseConds(inner); len(cs) > 0 {
				col.Conds = append(col.Conds, cs...)
			}
			return " " // annotations such as "(10/1000 µs)" are dropped
		}
		kept = append(kept, inner)
		return g
	})

	main, cond := splitCondition(h)
	if cond != "" {
		col.Conds = append(col.Conds, parseConds(cond)...)
	}
	main, inline := cutInlineConds(main)
	col.Conds = append(col.Conds, inline...)

	target, qual, ok := matchHeader(main)
	if !ok && len(kept) > 0 {
		// "Description (English)": retry without word groups, unless the
		// group changes the meaning ("Part number (internal)").
		stripped, meaningful := main, false
		for _, k := range kept {
			if meaningChangers[normWord(k)] {
				meaningful = true
			}
			stripped = strings.Replace(stripped, "("+k+")", " ", 1)
			stripped = strings.Replace(stripped, "["+k+"]", " ", 1)
		}
		if !meaningful {
			target, qual, ok = matchHeader(stripped)
			if ok {
				main = stripped
			}
		}
	}
	if !ok && col.Unit == "" {
		// a bare unit at the end: "VRRM V", "IR, µA", "I2t in A²s"
		if rest, unit, found := cutTrailingUnit(main); found {
			if target, qual, ok = matchHeader(rest); ok {
				col.Unit = unit
			}
		}
	}
	if !ok && col.Unit == "" {
		if rest, unit, found := units.SplitHeaderUnit(main); found && rest != main {
			if target, qual, ok = matchHeader(rest); ok {
				col.Unit = unit
			}
		}
	}
	if !ok {
		return Column{Header: header}, cur
	}
	col.Field, col.Qual = target, qual
	if targetDim(col.Field) == units.None {
		col.Unit = "" // "Stock (pcs)": no unit to apply
	}
	resolveConds(&col)
	return col, cur
}

// maxHeaderLen bounds the text taken for a column header; longer cells
// are notes.
const maxHeaderLen = 160

// resolveConds names the field each condition fills for col.Field.
func resolveConds(col *Column) {
	for i := range col.Conds {
		col.Conds[i].Field = condTarget(col.Field, col.Conds[i].Dim)
	}
}

// condTarget is the field a test condition of dimension d fills for field.
func condTarget(field string, d units.Dim) string {
	switch field {
	case "rdson":
		if d == units.Voltage {
			return "rdson_vgs"
		}
	case "rdson2":
		if d == units.Voltage {
			return "rdson2_vgs"
		}
	case "vf":
		switch d {
		case units.Current:
			return "vf_if"
		case units.Temperature:
			return "vf_tj"
		}
	case "vf2":
		switch d {
		case units.Current:
			return "vf2_if"
		case units.Temperature:
			return "vf2_tj"
		}
	case "ir":
		switch d {
		case units.Voltage:
			return "ir_vr"
		case units.Temperature:
			return "ir_tj"
		}
	case "ir2":
		if d == units.Temperature {
			return "ir2_tj"
		}
	case "ifsm":
		if d == units.Time {
			return "ifsm_t"
		}
	}
	return ""
}

var (
	bracketRE = regexp.MustCompile(`\([^()]*\)|\[[^\[\]]*\]`)
	// "@" or the word "at" starts the test conditions
	atWordRE = regexp.MustCompile(`(?i)\s+at\s+`)
	// a symbol with "=" or ":" before a value: "VGS=10V", "Tj: 125 °C"
	symValueRE = regexp.MustCompile(`^\s*([A-Za-zθ][A-Za-z0-9_()θ\-]*)\s*[=:]\s*(.+?)\s*$`)
)

// cleanSpaces turns line breaks, tabs and no-break spaces into single
// spaces and trims.
func cleanSpaces(s string) string {
	if spacesClean(s) {
		return s
	}
	return strings.Join(strings.FieldsFunc(s, isCleanedSpace), " ")
}

func isCleanedSpace(r rune) bool {
	return unicode.IsSpace(r) || r == '\u00a0' || r == '\u202f'
}

// spacesClean reports whether cleanSpaces would return s unchanged: no
// space at either end, no space but single ASCII spaces between words.
func spacesClean(s string) bool {
	prevSpace := true // a space at the start is not clean
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			switch {
			case c == ' ':
				if prevSpace {
					return false
				}
				prevSpace = true
			case c == '\t' || c == '\n' || c == '\v' || c == '\f' || c == '\r':
				return false
			default:
				prevSpace = false
			}
			i++
			continue
		}
		r, n := utf8.DecodeRuneInString(s[i:])
		if isCleanedSpace(r) {
			return false
		}
		prevSpace = false
		i += n
	}
	return !prevSpace || s == ""
}

func hasDigit(s string) bool {
	return strings.IndexFunc(s, unicode.IsDigit) >= 0
}

// splitCondition splits "RDS(on) max @ 10V" into "RDS(on) max" and "10V".
func splitCondition(h string) (main, cond string) {
	if i := strings.IndexAny(h, "@"); i >= 0 {
		return strings.TrimSpace(h[:i]), strings.TrimSpace(h[i+1:])
	}
	if loc := atWordRE.FindStringIndex(h); loc != nil {
		return strings.TrimSpace(h[:loc[0]]), strings.TrimSpace(h[loc[1]:])
	}
	return h, ""
}

// cutInlineConds takes conditions written without "@": "RDS(on) VGS=10V",
// "RDS(on) 4.5 V".
func cutInlineConds(main string) (string, []Condition) {
	toks := strings.Fields(main)
	if len(toks) < 2 {
		return main, nil
	}
	var out []string
	var conds []Condition
	for i := 0; i < len(toks); i++ {
		t := toks[i]
		if i > 0 && strings.ContainsAny(t, "=") && hasDigit(t) {
			if cs := parseConds(t); len(cs) > 0 {
				conds = append(conds, cs...)
				continue
			}
		}
		if i > 0 && t[0] >= '0' && t[0] <= '9' {
			v := t
			if i+1 < len(toks) && !hasDigit(toks[i+1]) && isHeaderUnit(toks[i+1]) {
				v += " " + toks[i+1]
			}
			if c, ok := parseCondValue(v, ""); ok {
				c.Text = v
				conds = append(conds, c)
				if v != t {
					i++
				}
				continue
			}
		}
		out = append(out, t)
	}
	return strings.Join(out, " "), conds
}

// parseConds reads "VR, 125°C", "VGS=10V", "IF=1A; Tj=25°C".
func parseConds(s string) []Condition {
	parts := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == ';' || r == '&' })
	var out []Condition
	for _, p := range parts {
		for _, q := range strings.Split(p, " and ") {
			q = strings.TrimSpace(q)
			if q == "" {
				continue
			}
			sym, val := "", q
			if m := symValueRE.FindStringSubmatch(q); m != nil {
				sym, val = m[1], m[2]
			}
			if c, ok := parseCondValue(val, sym); ok {
				c.Text = q
				out = append(out, c)
				continue
			}
			// no number: a reference to the row's rating, "VR" or "IF"
			ref := val
			if !hasDigit(ref) {
				if f, d := condRef(ref); f != "" {
					out = append(out, Condition{Dim: d, Ref: f, Text: q})
				}
			}
		}
	}
	return out
}

// parseCondValue reads the value of a condition; sym ("VGS", "Tj") tells
// the dimension of a bare number.
func parseCondValue(v, sym string) (Condition, bool) {
	v = strings.TrimSpace(v)
	if v == "" || !hasDigit(v) {
		return Condition{}, false
	}
	if strings.IndexFunc(v, unicode.IsLetter) < 0 && !strings.ContainsAny(v, "°%") {
		d := symDim(sym)
		if d == units.None {
			return Condition{}, false
		}
		x, err := units.Parse(v, d, units.Signed)
		if err != nil {
			return Condition{}, false
		}
		return Condition{Dim: d, Value: x}, true
	}
	for _, d := range []units.Dim{units.Voltage, units.Current, units.Temperature, units.Time} {
		if x, err := units.Parse(v, d, units.Signed); err == nil {
			return Condition{Dim: d, Value: x}, true
		}
	}
	return Condition{}, false
}

// symDim guesses the dimension of a condition symbol: V.. and U.. are
// voltages, I.. currents, T.. temperatures.
func symDim(sym string) units.Dim {
	s := strings.ToLower(strings.TrimSpace(sym))
	if s == "" {
		return units.None
	}
	switch s[0] {
	case 'v', 'u':
		return units.Voltage
	case 'i':
		return units.Current
	case 't':
		return units.Temperature
	}
	return units.None
}

// condRef maps a condition written as a symbol ("VR", "IF") to the row
// field that holds its value.
func condRef(sym string) (string, units.Dim) {
	switch normWord(sym) {
	case "vr", "vrrm", "vrwm", "vrmax", "ratedvr", "vrated", "vrrated", "vrm", "ratedvoltage":
		return "vrrm", units.Voltage
	case "if", "ifav", "io", "ratedif", "ifrated", "ifmax", "ratedcurrent", "ifn":
		return "ifav", units.Current
	}
	return "", units.None
}

// nonUnits are bracket words that look like units to a liberal parser but
// belong to trade symbols: IF(AV), RDS(on), VGS(th), V(BR), Rth(j-a).
var nonUnits = map[string]bool{
	"av": true, "on": true, "th": true, "br": true, "ja": true, "jc": true,
	"tot": true, "dc": true, "ac": true, "max": true, "min": true, "typ": true, "nom": true,
	"rms": true, "pk": true, "avg": true, "cont": true, "to": true, "off": true, "sat": true,
	"j-a": true, "j-c": true, "c-a": true, "f": true, "t": true, "m": true, "ff": true, "tt": true,
}

// isHeaderUnit reports whether s is a unit as written in a header ("mΩ",
// "V", "°C", "A²s", "%").
func isHeaderUnit(s string) bool {
	s = strings.TrimSpace(s)
	if s == "" || len(s) > 12 || nonUnits[strings.ToLower(s)] {
		return false
	}
	for _, r := range s {
		if unicode.IsDigit(r) && r != '2' {
			return false
		}
	}
	return len(units.UnitDim(s)) > 0
}

// cutTrailingUnit removes a bare unit at the end: "VRRM V", "IR, µA",
// "I2t in A²s", "U/V".
func cutTrailingUnit(s string) (rest, unit string, ok bool) {
	i := strings.LastIndexAny(s, " ,/")
	if i < 0 {
		return s, "", false
	}
	u := strings.TrimSpace(s[i+1:])
	if !isHeaderUnit(u) {
		return s, "", false
	}
	rest = strings.TrimRight(strings.TrimSpace(s[:i]), ",/ ")
	if strings.HasSuffix(strings.ToLower(rest), " in") {
		rest = strings.TrimSpace(rest[:len(rest)-3])
	}
	return rest, u, rest != ""
}

// qualifiers are the words that say which value of a spread a column holds.
var qualifiers = map[string]string{
	"max": "max", "maximum": "max", "typ": "typ", "typical": "typ",
	"min": "min", "minimum": "min", "nom": "nom", "nominal": "nom",
}

// noiseWords may sit beside a trade symbol without changing its meaning:
// "Rated VRRM", "ID continuous", "forward voltage VF".
var noiseWords = map[string]bool{
	"value": true, "values": true, "the": true, "of": true, "abs": true, "absolute": true,
	"rated": true, "rating": true, "total": true, "continuous": true, "cont": true,
	"limit": true, "spec": true, "specified": true, "parameter": true, "param": true,
	"symbol": true, "sym": true, "english": true, "text": true, "data": true, "per": true,
	"device": true, "part": true,
}

// meaningChangers are bracket words that make a header something else:
// "Part number (internal)" is not the manufacturer part number.
var meaningChangers = map[string]bool{
	"internal": true, "customer": true, "supplier": true, "vendor": true, "distributor": true,
	"old": true, "alt": true, "alternative": true, "alternate": true, "replacement": true,
	"substitute": true, "equivalent": true, "competitor": true, "cross": true, "legacy": true,
	"our": true, "ours": true, "obsolete": true,
}

// matchHeader finds the target of header text without units and
// conditions: the whole text, then without qualifiers, then as a cover of
// words that all name the same target ("forward voltage VF").
func matchHeader(s string) (target, qual string, ok bool) {
	toks := wordTokens(s)
	if len(toks) == 0 {
		return "", "", false
	}
	if t, ok := headerIndex[strings.Join(toks, "")]; ok {
		// "Max reverse voltage", "Typical cold resistance": the qualifier
		// is part of the words but still says which value the column holds
		if targetDim(t) != units.None {
			for _, tk := range toks {
				if q, isQ := qualifiers[tk]; isQ {
					return t, q, true
				}
			}
		}
		return t, "", true
	}
	rest := make([]string, 0, len(toks))
	for _, tk := range toks {
		if q, isQ := qualifiers[tk]; isQ {
			if qual == "" {
				qual = q
			}
			continue
		}
		rest = append(rest, tk)
	}
	if len(rest) == 0 {
		return "", "", false
	}
	joined := strings.Join(rest, "")
	if qual != "" {
		if t, ok := headerIndex[joined]; ok {
			return t, qual, true
		}
	}
	// glued qualifier: "RDSonmax", "VBRmin"
	for _, suf := range [...]string{"max", "min", "typ", "nom"} {
		if len(joined) > len(suf)+1 && strings.HasSuffix(joined, suf) {
			if t, ok := headerIndex[joined[:len(joined)-len(suf)]]; ok && qual == "" {
				return t, suf, true
			}
		}
	}
	if t, ok := coverMatch(rest); ok {
		return t, qual, true
	}
	return "", "", false
}

// maxSynonymWords is the most words a synonym has ("thermal resistance
// junction to ambient").
const maxSynonymWords = 8

// coverMatch accepts a header whose words are all covered, left to right
// and longest first, by synonyms of one target or by noise words.
func coverMatch(toks []string) (string, bool) {
	target := ""
	for i := 0; i < len(toks); {
		found := false
		for j := min(len(toks), i+maxSynonymWords); j > i; j-- {
			if t, ok := headerIndex[strings.Join(toks[i:j], "")]; ok {
				if target != "" && target != t {
					return "", false
				}
				target, i, found = t, j, true
				break
			}
		}
		if found {
			continue
		}
		if !noiseWords[toks[i]] {
			return "", false
		}
		i++
	}
	return target, target != ""
}

// subscripts maps subscript and superscript characters to plain ones, so
// that "V_RRM", "VRRM" written with subscripts and "I²t" match.
var subscripts = strings.NewReplacer(
	"₀", "0", "₁", "1", "₂", "2", "₃", "3", "₄", "4", "₅", "5", "₆", "6", "₇", "7", "₈", "8", "₉", "9",
	"ₐ", "a", "ₑ", "e", "ₒ", "o", "ₓ", "x", "ₕ", "h", "ₖ", "k", "ₗ", "l", "ₘ", "m", "ₙ", "n",
	"ₚ", "p", "ₛ", "s", "ₜ", "t", "ᵢ", "i", "ⱼ", "j", "ᵣ", "r", "ᵤ", "u", "ᵥ", "v",
	"²", "2", "³", "3", "¹", "1", "^", "", "ϑ", "θ", "Θ", "θ",
)

// wordTokens lower-cases s, maps subscripts and splits it into words of
// letters and digits; every other character separates.
func wordTokens(s string) []string {
	s = strings.ToLower(subscripts.Replace(s))
	return strings.FieldsFunc(s, func(r rune) bool {
		return !unicode.IsLetter(r) && !unicode.IsDigit(r)
	})
}

// normWord is the matching key of a header word: lower case letters and
// digits only, subscripts mapped ("V_RRM", "V RRM", "Vrrm" give "vrrm").
func normWord(s string) string { return strings.Join(wordTokens(s), "") }

// ---- price columns ----

var (
	qtyNum = `(\d[\d,.' ]*?\s*k?)`
	// "1+", "10+", "Price 1+", "Unit price (1+)", "1k+", "1+ price"
	rePlus = regexp.MustCompile(`^(?:(?:unit\s+)?price|cost|unit\s+cost)?\s*[@(\[]?\s*` + qtyNum + `\s*\+\s*[)\]]?\s*(?:pcs|pieces|pc|units|off)?\s*(?:(?:unit\s+)?price|cost)?$`)
	// "100-999", "Price 100-999"
	reRange = regexp.MustCompile(`^(?:(?:unit\s+)?price\s*)?[@(\[]?\s*` + qtyNum + `\s*(?:-|–|to)\s*(?:\d[\d,.]*k?)\s*[)\]]?\s*(?:pcs|pieces|units)?$`)
	// "Price @100", "Price (100 pcs)", "Price for 1000", "Unit price @ 1k", "Price 3"
	reAt = regexp.MustCompile(`^(?:unit\s+)?(?:price|cost)(?:\s+each)?\s*(@|at|for|per|x|qty|break\s+qty)?\s*[(\[]?\s*(?:qty\s*)?` + qtyNum + `\s*(\+|pcs|pieces|pc|units|off)?\s*[)\]]?$`)
	// "Qty 1", "Quantity 10"
	reQtyN = regexp.MustCompile(`^(?:qty|quantity)\s*[@(\[]?\s*` + qtyNum + `\s*[)\]]?$`)
	// "Break 1 qty", "Price break 1", "Qty break 2", "Break qty 3", "Tier 1 price"
	reBreak1 = regexp.MustCompile(`^(?:price\s*)?(?:break|tier|level|pb)\s*#?\s*(\d+)\s*(qty|quantity|price|cost|unit price)?$`)
	reBreak2 = regexp.MustCompile(`^(qty|quantity|price|cost|unit price)\s*(?:break|tier|level)\s*#?\s*(\d+)$`)
	reBreak3 = regexp.MustCompile(`^(?:price\s*)?(?:break|tier|level)\s*(qty|quantity|price|cost)\s*#?\s*(\d+)$`)
)

// priceHeader recognises price break columns.
func priceHeader(h string) (Column, bool) {
	s := strings.ToLower(strings.Join(strings.Fields(strings.NewReplacer("_", " ", ".", " ").Replace(h)), " "))
	s = strings.TrimSpace(strings.ReplaceAll(s, " +", "+"))
	// restore decimal-looking quantities spoilt by the dot replacement: not
	// needed, quantities are whole numbers written with separators only.
	pairField := func(w string) string {
		if strings.Contains(w, "qty") || strings.Contains(w, "quantity") {
			return fQty
		}
		return fPrice
	}
	if m := reBreak1.FindStringSubmatch(s); m != nil {
		n, _ := strconv.Atoi(m[1])
		return Column{Field: pairField(m[2]), Pair: n}, n > 0
	}
	if m := reBreak2.FindStringSubmatch(s); m != nil {
		n, _ := strconv.Atoi(m[2])
		return Column{Field: pairField(m[1]), Pair: n}, n > 0
	}
	if m := reBreak3.FindStringSubmatch(s); m != nil {
		n, _ := strconv.Atoi(m[2])
		return Column{Field: pairField(m[1]), Pair: n}, n > 0
	}
	if m := rePlus.FindStringSubmatch(s); m != nil {
		if q, ok := parseQty(m[1]); ok {
			return Column{Field: fPrice, Qty: q}, true
		}
	}
	if m := reRange.FindStringSubmatch(s); m != nil {
		if q, ok := parseQty(m[1]); ok {
			return Column{Field: fPrice, Qty: q}, true
		}
	}
	if m := reAt.FindStringSubmatch(s); m != nil {
		if q, ok := parseQty(m[2]); ok {
			bare := m[1] == "" && m[3] == "" && !strings.ContainsAny(s, "([")
			return Column{Field: fPrice, Qty: q, bareNum: bare}, true
		}
	}
	if m := reQtyN.FindStringSubmatch(s); m != nil {
		if q, ok := parseQty(m[1]); ok {
			return Column{Field: fPrice, Qty: q, bareNum: true, Pair: -1}, true
		}
	}
	return Column{}, false
}

// parseQty reads a whole quantity: "100", "1k", "1,000", "1.000", "1 000",
// "10'000".
func parseQty(s string) (int64, bool) {
	s = strings.TrimSpace(strings.ToLower(s))
	mult := int64(1)
	if strings.HasSuffix(s, "k") {
		mult, s = 1000, strings.TrimSpace(strings.TrimSuffix(s, "k"))
	}
	if s == "" {
		return 0, false
	}
	// thousands separators: groups of exactly three digits
	groups := strings.FieldsFunc(s, func(r rune) bool { return r == ',' || r == '.' || r == '\'' || r == ' ' })
	if len(groups) > 1 {
		for _, g := range groups[1:] {
			if len(g) != 3 {
				if mult == 1000 && len(groups) == 2 {
					// "1.5k"
					f, err := strconv.ParseFloat(groups[0]+"."+groups[1], 64)
					if err != nil || f <= 0 {
						return 0, false
					}
					return int64(f*1000 + 0.5), true
				}
				return 0, false
			}
		}
	}
	n, err := strconv.ParseInt(strings.Join(groups, ""), 10, 64)
	if err != nil || n < 0 || n > 1e12 {
		return 0, false
	}
	return n * mult, true
}

// ---- currencies ----

// currencySymbols maps symbols and codes written in headers and cells to
// ISO 4217 codes. "¥" is read as JPY; write CNY or RMB for yuan.
var currencySymbols = map[string]string{
	"€": "EUR", "$": "USD", "us$": "USD", "£": "GBP", "¥": "JPY", "₹": "INR", "₩": "KRW",
	"cn¥": "CNY", "rmb": "CNY", "zł": "PLN", "kč": "CZK", "fr.": "CHF", "sfr": "CHF",
	"eur": "EUR", "usd": "USD", "gbp": "GBP", "chf": "CHF", "jpy": "JPY", "cny": "CNY",
	"sek": "SEK", "nok": "NOK", "dkk": "DKK", "pln": "PLN", "czk": "CZK", "huf": "HUF",
	"cad": "CAD", "aud": "AUD", "inr": "INR", "krw": "KRW", "twd": "TWD", "hkd": "HKD",
	"sgd": "SGD", "nzd": "NZD", "mxn": "MXN", "brl": "BRL", "zar": "ZAR", "try": "TRY",
	"ils": "ILS", "ron": "RON", "bgn": "BGN", "thb": "THB", "myr": "MYR",
	"euro": "EUR", "euros": "EUR", "dollar": "USD", "dollars": "USD",
}

var currencyWordRE = regexp.MustCompile(`(?i)(?:^|[\s(\[/,])(eur|usd|gbp|chf|jpy|cny|sek|nok|dkk|pln|czk|huf|cad|aud|inr|krw|twd|hkd|sgd|nzd|mxn|brl|zar|ils|ron|bgn|thb|myr|rmb|euro|euros)(?:$|[\s)\]/,])`)

// cutCurrency removes a currency written in a header ("(EUR)", "€", "in
// USD") and returns it as an ISO code.
func cutCurrency(h string) (string, string) {
	cur := ""
	if m := currencyWordRE.FindStringSubmatchIndex(h); m != nil {
		cur = currencySymbols[strings.ToLower(h[m[2]:m[3]])]
		h = h[:m[2]] + h[m[3]:]
	}
	for _, sym := range [...]string{"US$", "CN¥", "€", "$", "£", "¥", "₹", "₩"} {
		if strings.Contains(h, sym) {
			if cur == "" {
				cur = currencySymbols[strings.ToLower(sym)]
			}
			h = strings.ReplaceAll(h, sym, " ")
		}
	}
	if cur != "" {
		h = strings.NewReplacer("()", " ", "[]", " ", "( )", " ", "[ ]", " ").Replace(h)
		h = strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(h), " in"))
		h = cleanSpaces(h)
	}
	return h, cur
}

// fieldOf returns the catalog field of a target, if it is one.
func fieldOf(target string) (catalog.Field, bool) {
	if target == "" {
		return catalog.Field{}, false
	}
	return catalog.FieldByName(target)
}
