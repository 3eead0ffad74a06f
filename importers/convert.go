package importers

import (
	"errors"
	"fmt"
	"sort"
	"strings"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// converter turns the data rows of one sheet into parts.
type converter struct {
	lo        *layout
	fixed     catalog.Kind // --kind or mapping kind
	fixedType string       // mapping type (a default)
	supplier  string       // supplier when the sheet has no supplier column
	currency  string       // currency when neither column, header nor cell tells
	fuseStd   string       // mapping fuse_std (a default)
	consts    []constant   // mapping constants, defaults for every row
	section   guess        // kind told by a section title row above
	rowStd    string       // fuse standard of the row being converted
	na        map[int]map[catalog.Kind]bool

	// per-column facts and per-row scratch, kept across rows
	cols    []colInfo
	numHint int // most numbers a row gave so far: the size of the next Num map
	fedBy   map[string]int
	fedCols []bool // by column: it gave a value of this row
	present map[catalog.Kind][]string
	texts   []kindText
	reratec map[string]string // rerating cells already read and their normal form (rerate)
}

// rerateMemo bounds converter.reratec: a sheet repeats a few rerating
// curves over thousands of fuses, and reading one costs some 3 µs.
const rerateMemo = 256

// rerate is parseRerate with a memo of the cells it accepted.
func (cv *converter) rerate(v string) (string, error) {
	if s, ok := cv.reratec[v]; ok {
		return s, nil
	}
	s, err := parseRerate(v)
	if err == nil && len(cv.reratec) < rerateMemo {
		if cv.reratec == nil {
			cv.reratec = map[string]string{}
		}
		// a cell is a piece of its whole record's text: keep a copy
		cv.reratec[strings.Clone(v)] = s
	}
	return s, err
}

// colInfo is what convert needs to know of a column on every row, worked
// out once per sheet.
type colInfo struct {
	dim      units.Dim     // dimension of its cells (targetDim), None for text and offers
	field    catalog.Field // catalog field of its target, when not a generic rating
	isField  bool
	kind     catalog.Kind // kind a filled cell hints (kindFields), "" for none
	signedOK bool         // the field may be written negative (signedFields, temperatures)
}

// columns returns the per-column facts of the converter's layout.
func (cv *converter) columns() []colInfo {
	if cv.cols != nil {
		return cv.cols
	}
	cv.cols = make([]colInfo, len(cv.lo.cols))
	for i, c := range cv.lo.cols {
		ci := &cv.cols[i]
		if c.Field == "" {
			continue
		}
		ci.dim = targetDim(c.Field)
		ci.kind = kindFields[c.Field]
		if _, generic := genericDim[c.Field]; !generic {
			ci.field, ci.isField = catalog.FieldByName(c.Field)
			ci.signedOK = signedFields[ci.field.Name] || ci.field.Dim == units.Temperature
		}
	}
	return cv.cols
}

// constant is a mapping-file value applied to every row lacking the field.
type constant struct {
	field string
	num   float64
	text  string
	isNum bool
	b     *bool
}

// rowReject says why a row is refused: the column header as written (or a
// field name), the raw cell and the reason.
type rowReject struct {
	column, raw, reason string
}

// signedFields may be written negative (P-channel MOSFET voltages and
// currents, symmetric tolerances) and are stored as magnitudes by their
// pick; temperatures keep their sign.
var signedFields = map[string]bool{
	"vds": true, "vgs_max": true, "vgs_th": true, "rdson_vgs": true, "rdson2_vgs": true,
	"id": true, "qg": true, "vz_tol": true, "ir_vr": true,
}

// row gives access to one row's cells.
type row struct {
	cells []string
	lo    *layout
}

func (r row) at(i int) string {
	if i < 0 || i >= len(r.cells) {
		return ""
	}
	return strings.TrimSpace(r.cells[i])
}

// first returns the first non-absent cell of target and its column.
func (r row) first(target string) (string, int) {
	for _, i := range r.lo.byField[target] {
		if v := r.at(i); !isAbsent(v) {
			return v, i
		}
	}
	return "", -1
}

// header is a column's header as written, or fallback when there is none.
func (lo *layout) header(i int, fallback string) string {
	if i < 0 || i >= len(lo.headers) {
		return fallback
	}
	if lo.clean == nil {
		lo.clean = make([]string, len(lo.headers))
		for j, h := range lo.headers {
			lo.clean[j] = cleanSpaces(h)
		}
	}
	if h := lo.clean[i]; h != "" {
		return h
	}
	return fallback
}

// headerOf is the header of the first column of target, or target.
func (lo *layout) headerOf(target string) string {
	if cols := lo.byField[target]; len(cols) > 0 {
		return lo.header(cols[0], target)
	}
	return target
}

// convert turns one data row into a part, or says why the row is refused.
func (cv *converter) convert(cells []string) (*catalog.Part, *rowReject) {
	return cv.convertInto(cells, new(catalog.Part))
}

// convertInto is convert writing into p, whatever p held before: its
// number map and offer slice are emptied and reused, so that a reader
// converting row after row into the same few parts allocates neither
// (the map alone was a kilobyte a row, a third of an import's garbage
// at a million rows). On a refused row p is left partly filled.
func (cv *converter) convertInto(cells []string, p *catalog.Part) (*catalog.Part, *rowReject) {
	lo := cv.lo
	r := row{cells: cells, lo: lo}

	mpn, _ := r.first("mpn")
	mfr, _ := r.first("mfr")
	if mfr == "" {
		mfr = cv.constText("mfr")
	}
	if mpn == "" {
		return nil, &rowReject{column: lo.headerOf("mpn"), reason: "no part number (mpn)"}
	}
	if mfr == "" {
		return nil, &rowReject{column: lo.headerOf("mfr"), reason: "no manufacturer (add a manufacturer column, or mfr under [constants] in a mapping file)"}
	}

	kind, typ, rej := cv.kindOf(r)
	if rej != nil {
		return nil, rej
	}
	num, offers := p.Num, p.Offers[:0]
	if num == nil {
		num = make(map[string]float64, cv.numHint)
	} else {
		clear(num)
	}
	*p = catalog.Part{Kind: kind, Type: typ, Mfr: cleanSpaces(mfr), MPN: cleanSpaces(mpn), Num: num}
	defer func() { cv.numHint = max(cv.numHint, len(p.Num)) }()
	if cv.fedBy == nil {
		cv.fedBy, cv.fedCols = map[string]int{}, make([]bool, len(lo.cols))
	}
	fedBy := cv.fedBy // field -> column that gave its value
	clear(fedBy)
	for _, t := range [...]string{"desc", "package", "datasheet"} {
		if v, _ := r.first(t); v != "" {
			setText(p, t, cleanSpaces(v))
		} else if v := cv.constText(t); v != "" {
			setText(p, t, v)
		}
	}
	cv.rowStd = ""
	if kind == catalog.Fuse {
		if v, _ := r.first("fuse_std"); v != "" {
			cv.rowStd = fuseStdCell(v)
		}
		if cv.rowStd == "" {
			cv.rowStd = cv.fuseStd
		}
		if cv.rowStd == "" {
			words := []string{p.Desc, p.Package}
			for _, t := range [...]string{"type", fCategory, fSpeed} {
				if v, _ := r.first(t); v != "" {
					words = append(words, v)
				}
			}
			cv.rowStd = fuseStd(strings.Join(words, " | "))
		}
		p.FuseStd = cv.rowStd
	}

	// numbers, left to right so the first bad cell is the one reported
	cols := cv.columns()
	for i, c := range lo.cols {
		if c.Field == "" || cols[i].dim == units.None {
			continue
		}
		raw := r.at(i)
		if isAbsent(raw) {
			continue
		}
		if rej := cv.number(p, fedBy, i, c, raw); rej != nil {
			return nil, rej
		}
	}

	// enums, booleans
	if v, i := r.first("lifecycle"); v != "" {
		lc, err := parseLifecycle(v)
		if err != nil {
			return nil, &rowReject{column: lo.header(i, "lifecycle"), raw: v, reason: err.Error()}
		}
		p.Lifecycle = lc
	} else if v := cv.constText("lifecycle"); v != "" {
		p.Lifecycle = v
	}
	for _, t := range [...]string{"rohs", "aecq"} {
		var b *bool
		if v, i := r.first(t); v != "" {
			x, err := parseBool(v)
			if err != nil {
				return nil, &rowReject{column: lo.header(i, t), raw: v, reason: t + ": " + err.Error()}
			}
			b = &x
		} else if c := cv.constOf(t); c != nil && c.b != nil {
			x := *c.b
			b = &x
		}
		if t == "rohs" {
			p.RoHS = b
		} else {
			p.AECQ = b
		}
	}
	if kind == catalog.Fuse {
		if v, i := r.first("rerate"); v != "" {
			s, err := cv.rerate(v)
			if err != nil {
				return nil, &rowReject{column: lo.header(i, "rerate"), raw: v, reason: err.Error()}
			}
			p.Rerate = s
		} else if v := cv.constText("rerate"); v != "" {
			p.Rerate = v
		}
	}

	// test conditions written in headers, for rows that lack the field
	fedCols := cv.fedCols
	clear(fedCols)
	for _, i := range fedBy {
		if i < 0 {
			continue
		}
		fedCols[i] = true
	}
	for i, c := range lo.cols {
		if !fedCols[i] {
			continue
		}
		for _, k := range c.Conds {
			if k.Field == "" || !appliesTo(k.Field, kind) {
				continue
			}
			if _, set := p.Num[k.Field]; set {
				continue
			}
			if k.Ref != "" {
				if v, ok := p.Num[k.Ref]; ok {
					p.Num[k.Field] = v
					fedBy[k.Field] = -1
				}
				continue
			}
			p.Num[k.Field] = k.Value
			fedBy[k.Field] = -1
		}
	}
	// mapping constants, for rows that lack the field
	for _, c := range cv.consts {
		if !c.isNum || !appliesTo(c.field, kind) {
			continue
		}
		if _, set := p.Num[c.field]; !set {
			p.Num[c.field] = c.num
			fedBy[c.field] = -2
		}
	}

	if field, reason := validatePart(p); reason != "" {
		col, raw := field, ""
		if i, ok := fedBy[field]; ok {
			switch {
			case i >= 0:
				col, raw = lo.header(i, field), r.at(i)
			case i == -1:
				col = field + " (from a column header)"
			case i == -2:
				col = field + " (mapping constant)"
			}
		} else if field == "vz" || field == "type" {
			// the type came from a type or category column
			col = "type"
			for _, t := range [...]string{"type", fCategory, "desc"} {
				if v, i := r.first(t); v != "" {
					col, raw = lo.header(i, t), v
					break
				}
			}
		}
		return nil, &rowReject{column: col, raw: raw, reason: reason}
	}

	var reuse []catalog.PriceBreak // the breaks p held before, to fill again
	if len(offers) < cap(offers) {
		reuse = offers[:1][0].Breaks
	}
	o, rej := cv.offer(r, reuse)
	if rej != nil {
		return nil, rej
	}
	if o != nil {
		p.Offers = append(offers, *o)
	}
	return p, nil
}

func setText(p *catalog.Part, field, v string) {
	switch field {
	case "desc":
		p.Desc = v
	case "package":
		p.Package = v
	case "datasheet":
		p.Datasheet = v
	}
}

func appliesTo(field string, k catalog.Kind) bool {
	f, ok := catalog.FieldByName(field)
	return ok && f.AppliesTo(k)
}

// fuseStdCell reads a standard column: iec, ul, blade or words.
func fuseStdCell(v string) string {
	switch strings.ToLower(strings.TrimSpace(v)) {
	case "iec", "ul", "blade":
		return strings.ToLower(strings.TrimSpace(v))
	}
	return fuseStd(v)
}

func (cv *converter) constOf(field string) *constant {
	for i := range cv.consts {
		if cv.consts[i].field == field {
			return &cv.consts[i]
		}
	}
	return nil
}

func (cv *converter) constText(field string) string {
	if c := cv.constOf(field); c != nil && !c.isNum {
		return c.text
	}
	return ""
}

// number parses one numeric cell into p.
func (cv *converter) number(p *catalog.Part, fedBy map[string]int, i int, c Column, raw string) *rowReject {
	lo := cv.lo
	target := c.Field
	if _, generic := genericDim[target]; generic {
		if p.Kind == catalog.Fuse && target == gVoltage {
			return cv.fuseVoltage(p, fedBy, i, c, raw, "")
		}
		target = resolveGeneric(target, p.Kind, p.Type)
		if target == "" {
			cv.notApplicable(i, p.Kind)
			return nil
		}
	}
	var f catalog.Field
	var ok, signedOK bool
	if target == c.Field {
		ci := &cv.columns()[i]
		f, ok, signedOK = ci.field, ci.isField, ci.signedOK
	} else {
		f, ok = catalog.FieldByName(target)
		signedOK = signedFields[f.Name] || f.Dim == units.Temperature
	}
	if !ok {
		return nil
	}
	if !f.AppliesTo(p.Kind) {
		cv.notApplicable(i, p.Kind)
		return nil
	}
	if _, set := fedBy[target]; set {
		return nil // an earlier column gave it
	}
	if target == "un_dc" || target == "un_ac" {
		return cv.fuseVoltage(p, fedBy, i, c, raw, target)
	}
	pick := f.Pick
	if c.hasPick {
		pick = c.pick
	}
	v, err := parseNumber(raw, f.Dim, pick, c.Unit, signedOK)
	if errors.Is(err, units.ErrEmpty) {
		return nil
	}
	if err != nil {
		return &rowReject{column: lo.header(i, target), raw: raw, reason: f.Name + ": " + err.Error()}
	}
	p.Num[target] = v
	fedBy[target] = i
	return nil
}

// fuseVoltage reads a fuse voltage rating. A cell marked AC or DC goes to
// un_ac or un_dc; an unmarked value goes to the column's field, and for a
// generic "Rated voltage" column to un_dc for blade fuses (ISO 8820 fuses
// are DC parts) and to un_ac otherwise: a DC rating is never assumed from
// an unmarked one, DC being the harder duty to interrupt.
func (cv *converter) fuseVoltage(p *catalog.Part, fedBy map[string]int, i int, c Column, raw, field string) *rowReject {
	ac, dc, plain, hasAC, hasDC, hasPlain, err := fuseVoltages(raw, c.Unit)
	if errors.Is(err, units.ErrEmpty) {
		return nil
	}
	if err != nil {
		name := field
		if name == "" {
			name = "voltage rating"
		}
		return &rowReject{column: cv.lo.header(i, name), raw: raw, reason: name + ": " + err.Error()}
	}
	if field == "un_dc" && hasAC && !hasDC && !hasPlain {
		return &rowReject{column: cv.lo.header(i, field), raw: raw, reason: "un_dc: the cell gives an AC rating in a DC column"}
	}
	if field == "un_ac" && hasDC && !hasAC && !hasPlain {
		return &rowReject{column: cv.lo.header(i, field), raw: raw, reason: "un_ac: the cell gives a DC rating in an AC column"}
	}
	set := func(f string, v float64) {
		if _, ok := fedBy[f]; !ok {
			p.Num[f] = v
			fedBy[f] = i
		}
	}
	if hasAC {
		set("un_ac", ac)
	}
	if hasDC {
		set("un_dc", dc)
	}
	if hasPlain {
		switch {
		case field != "":
			set(field, plain)
		case cv.rowStd == "blade":
			set("un_dc", plain)
		default:
			set("un_ac", plain)
		}
	}
	return nil
}

// resolveGeneric maps a generic rating column to the field of a kind.
func resolveGeneric(target string, k catalog.Kind, typ string) string {
	switch target {
	case gVoltage:
		switch k {
		case catalog.Diode:
			switch typ {
			case "zener":
				return "vz"
			case "tvs":
				return "vrwm"
			}
			return "vrrm"
		case catalog.MOSFET:
			return "vds"
		}
	case gCurrent:
		switch k {
		case catalog.Diode:
			if typ == "zener" || typ == "tvs" {
				return ""
			}
			return "ifav"
		case catalog.MOSFET:
			return "id"
		case catalog.Fuse:
			return "in"
		}
	case gPower:
		switch k {
		case catalog.Diode:
			if typ == "tvs" {
				return "ppk"
			}
			return "pd"
		case catalog.MOSFET:
			return "pd"
		}
	case gResist:
		switch k {
		case catalog.MOSFET:
			return "rdson"
		case catalog.Fuse:
			return "rcold"
		}
	case gBreak:
		switch k {
		case catalog.Diode:
			switch typ {
			case "tvs":
				return "vbr"
			case "zener":
				return "vz"
			}
		case catalog.MOSFET:
			return "vds"
		}
	}
	return ""
}

func (cv *converter) notApplicable(i int, k catalog.Kind) {
	if cv.na == nil {
		cv.na = map[int]map[catalog.Kind]bool{}
	}
	if cv.na[i] == nil {
		cv.na[i] = map[catalog.Kind]bool{}
	}
	cv.na[i][k] = true
}

// notApplicableNotes lists columns whose values were dropped because they
// do not apply to a row's kind.
func (cv *converter) notApplicableNotes() []string {
	var idx []int
	for i := range cv.na {
		idx = append(idx, i)
	}
	sort.Ints(idx)
	var out []string
	for _, i := range idx {
		var ks []string
		for _, k := range catalog.Kinds {
			if cv.na[i][k] {
				ks = append(ks, string(k))
			}
		}
		out = append(out, fmt.Sprintf("%s: does not apply to %s rows, values dropped", cv.lo.header(i, "?"), strings.Join(ks, ", ")))
	}
	return out
}

// kindOf gathers what a row says about its kind and settles it.
func (cv *converter) kindOf(r row) (catalog.Kind, string, *rowReject) {
	lo := r.lo
	if cv.present == nil {
		cv.present = map[catalog.Kind][]string{}
	}
	for k, hs := range cv.present {
		cv.present[k] = hs[:0]
	}
	f := kindFacts{fixed: cv.fixed, fixedType: cv.fixedType, section: cv.section, present: cv.present, texts: cv.texts[:0]}
	defer func() { cv.texts = f.texts[:0] }()
	f.kindCell, _ = r.first("kind")
	add := func(target string, exact, typeCol bool) {
		for _, i := range lo.byField[target] {
			if v := r.at(i); !isAbsent(v) {
				f.texts = append(f.texts, kindText{column: lo.header(i, target), text: v, exact: exact, typeCo: typeCol})
			}
		}
	}
	add("type", true, true)
	add(fCategory, false, false)
	add(fChannel, true, false)
	add(fSpeed, true, false)
	add("desc", false, false)
	f.desc, _ = r.first("desc")
	cols := cv.columns()
	for i, c := range lo.cols {
		if k := cols[i].kind; k != "" && !isAbsent(r.at(i)) {
			f.present[k] = append(f.present[k], lo.header(i, c.Field))
		}
	}
	if v, _ := r.first("vz"); v != "" {
		f.hasVZ = true
	}
	for _, t := range tvsFields {
		if v, _ := r.first(t); v != "" {
			f.hasTVS = true
		}
	}
	for _, t := range [...]string{"vds", "vgs_th", "id"} {
		if v, _ := r.first(t); strings.HasPrefix(v, "-") || strings.HasPrefix(v, "−") {
			f.negative = true
		}
	}
	if f.fixed == catalog.MOSFET || len(f.present[catalog.MOSFET]) > 0 {
		if v, _ := r.first(gVoltage); strings.HasPrefix(v, "-") || strings.HasPrefix(v, "−") {
			f.negative = true
		}
	}
	kind, typ, ke := decideKind(f)
	if ke != nil {
		col, raw := ke.column, ke.raw
		switch {
		case col == "kind":
			col = lo.headerOf("kind")
		case col == "":
			col = lo.headerOf(fCategory)
			if col == fCategory {
				col = lo.headerOf("type")
			}
			if col == "type" {
				col = "kind"
			}
			if len(f.texts) > 0 {
				raw = f.texts[0].text
			}
		}
		return "", "", &rowReject{column: col, raw: raw, reason: ke.reason}
	}
	if typ != "" && !validType(kind, typ) {
		return "", "", &rowReject{column: lo.headerOf("type"), raw: typ, reason: fmt.Sprintf("type %s does not fit a %s", typ, kind)}
	}
	return kind, typ, nil
}

// numberReason says why value v of Number field n is impossible, or "".
func numberReason(n string, v float64) string {
	f, _ := catalog.FieldByName(n)
	switch {
	case f.Dim == units.Temperature:
		if v < -70 || v > 300 {
			return fmt.Sprintf("%s %s is outside -70..300 °C", n, units.Format(v, f.Dim))
		}
	case n == "vz_tol":
		if v < 0 || v > 0.5 {
			return fmt.Sprintf("vz_tol %g is outside 0..0.5 (0..50 %%)", v)
		}
	case v < 0:
		return fmt.Sprintf("%s is negative (%s)", n, units.Format(v, f.Dim))
	case v == 0 && positiveField(n):
		return fmt.Sprintf("%s must be above zero", n)
	}
	return ""
}

// positiveFields must be above zero when given; everything numeric except
// temperatures, leakage currents (a sheet may round them to 0) and the
// Zener tolerance.
func positiveField(name string) bool {
	switch name {
	case "tjmax", "vf_tj", "vf2_tj", "ir_tj", "ir2_tj", "ir", "ir2", "vz_tol":
		return false
	}
	return true
}

// validatePart checks a converted part for physically impossible or
// contradictory values. It returns the offending field and the reason, or
// "" when the part is sound. Checks:
//
//   - ratings, limits and test conditions above zero; leakage not negative
//   - temperatures (tjmax, test junction temperatures) within -70..300 °C
//   - Zener tolerance within 0..0.5 (0..50 %)
//   - V_F (and V_F2) not above V_RRM; I_R test voltage not above V_RRM
//   - R_DS(on) gate drive and V_GS(th) not above V_GS(max)
//   - a Zener has V_Z; a TVS has V_BR ≥ V_RWM and V_C ≥ V_BR
//   - a fuse's breaking capacity is not below its rated current
func validatePart(p *catalog.Part) (field, reason string) {
	// the first bad number in name order is reported: the smallest
	// failing name, whatever the map's order
	bad, found := "", false
	for n, v := range p.Num {
		if v > 0 && v <= 300 && n != "vz_tol" {
			continue // the common case, which numberReason passes
		}
		if (!found || n < bad) && numberReason(n, v) != "" {
			bad, found = n, true
		}
	}
	if found {
		return bad, numberReason(bad, p.Num[bad])
	}
	get := p.Get
	fmtv := func(name string, v float64) string {
		f, _ := catalog.FieldByName(name)
		return units.Format(v, f.Dim)
	}
	if vrrm, ok := get("vrrm"); ok {
		for _, n := range [...]string{"vf", "vf2"} {
			if vf, ok := get(n); ok && vf > vrrm {
				return n, fmt.Sprintf("V_F %s is above V_RRM %s", fmtv(n, vf), fmtv("vrrm", vrrm))
			}
		}
		if vr, ok := get("ir_vr"); ok && vr > vrrm*(1+1e-9) {
			return "ir_vr", fmt.Sprintf("I_R test voltage %s is above V_RRM %s", fmtv("ir_vr", vr), fmtv("vrrm", vrrm))
		}
	}
	if vgs, ok := get("vgs_max"); ok {
		for _, n := range [...]string{"rdson_vgs", "rdson2_vgs"} {
			if d, ok := get(n); ok && d > vgs*(1+1e-9) {
				return n, fmt.Sprintf("R_DS(on) gate drive %s is above V_GS(max) %s", fmtv(n, d), fmtv("vgs_max", vgs))
			}
		}
		if th, ok := get("vgs_th"); ok && th > vgs {
			return "vgs_th", fmt.Sprintf("V_GS(th) %s is above V_GS(max) %s", fmtv("vgs_th", th), fmtv("vgs_max", vgs))
		}
	}
	if p.Kind == catalog.Diode && p.Type == "zener" {
		if _, ok := get("vz"); !ok {
			return "vz", "a Zener diode needs V_Z (vz)"
		}
	}
	if p.Kind == catalog.Diode {
		vrwm, okw := get("vrwm")
		vbr, okb := get("vbr")
		vc, okc := get("vc")
		if okw && okb && vbr < vrwm {
			return "vbr", fmt.Sprintf("V_BR %s is below V_RWM %s", fmtv("vbr", vbr), fmtv("vrwm", vrwm))
		}
		if okb && okc && vc < vbr {
			return "vc", fmt.Sprintf("V_C %s is below V_BR %s", fmtv("vc", vc), fmtv("vbr", vbr))
		}
		if okw && okc && !okb && vc < vrwm {
			return "vc", fmt.Sprintf("V_C %s is below V_RWM %s", fmtv("vc", vc), fmtv("vrwm", vrwm))
		}
	}
	if in, ok := get("in"); ok {
		if br, ok := get("breaking"); ok && br < in {
			return "breaking", fmt.Sprintf("breaking capacity %s is below the rated current %s", fmtv("breaking", br), fmtv("in", in))
		}
	}
	return "", ""
}
