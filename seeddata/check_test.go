package seeddata

// A self-contained reader and rule checker for the seed CSV. It does not use
// the importer on purpose: the seed file is checked against the field
// dictionary and against physics rules independently of how the importer
// reads it.

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"partsieve/catalog"
)

// offerCols are the supplier columns that follow the part fields.
var offerCols = []string{"supplier", "sku", "stock", "moq", "currency"}

// breakCol matches a price-break header such as "100+".
var breakCol = regexp.MustCompile(`^([1-9][0-9]*)\+$`)

// plainNumber is the only number format the seed file uses: a
// non-negative decimal without exponent, sign, unit or thousands separator.
var plainNumber = regexp.MustCompile(`^[0-9]+(\.[0-9]+)?$`)

// seedRow is one data row: every cell by header, and the Number fields
// that are present and well formed, parsed.
type seedRow struct {
	line int
	text map[string]string
	num  map[string]float64
}

func (r *seedRow) has(col string) bool { _, ok := r.num[col]; return ok }

// identity is the part key: normalised manufacturer and part number.
func (r *seedRow) identity() string {
	return catalog.NormKey(r.text["mfr"]) + "\x00" + catalog.NormKey(r.text["mpn"])
}

// breaks returns the filled price-break columns in header order.
func (r *seedRow) breaks(qtys []int64) (q []int64, p []float64) {
	for _, qty := range qtys {
		s := r.text[strconv.FormatInt(qty, 10)+"+"]
		if s == "" {
			continue
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			continue
		}
		q = append(q, qty)
		p = append(p, v)
	}
	return q, p
}

// seedSheet is the parsed file.
type seedSheet struct {
	header []string
	qtys   []int64 // price-break quantities in header order
	rows   []*seedRow
}

// problems collects rule violations, each naming file, row and column.
type problems []string

func (p *problems) add(line int, col, format string, args ...any) {
	*p = append(*p, fmt.Sprintf("seed.csv row %d, column %s: %s", line, col, fmt.Sprintf(format, args...)))
}

// readSeed parses the CSV and checks the header and the format of every
// cell (numbers plain and present only for the kinds they apply to, enums,
// booleans). It returns the parsed rows and the format problems; err is set
// only when the file cannot be read as CSV at all.
func readSeed(data []byte) (*seedSheet, problems, error) {
	rd := csv.NewReader(bytes.NewReader(data))
	header, err := rd.Read()
	if errors.Is(err, io.EOF) {
		return nil, nil, errors.New("seed.csv: empty file")
	}
	if err != nil {
		return nil, nil, fmt.Errorf("seed.csv: %w", err)
	}
	var probs problems
	sh := &seedSheet{header: header}
	seen := map[string]bool{}
	for _, h := range header {
		if seen[h] {
			probs.add(1, h, "duplicate header")
		}
		seen[h] = true
		if m := breakCol.FindStringSubmatch(h); m != nil {
			q, err := strconv.ParseInt(m[1], 10, 64)
			if err != nil {
				probs.add(1, h, "break quantity out of range")
				continue
			}
			sh.qtys = append(sh.qtys, q)
			continue
		}
		if _, ok := catalog.FieldByName(h); !ok && !slices.Contains(offerCols, h) {
			probs.add(1, h, "not a canonical field, offer column or price break")
		}
	}
	if !slices.IsSorted(sh.qtys) {
		probs.add(1, "price breaks", "break columns are not in increasing quantity")
	}
	for _, need := range []string{"kind", "type", "mfr", "mpn"} {
		if !seen[need] {
			return nil, probs, fmt.Errorf("seed.csv: header lacks column %q", need)
		}
	}
	for {
		rec, err := rd.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, probs, fmt.Errorf("seed.csv: %w", err)
		}
		line, _ := rd.FieldPos(0)
		r := &seedRow{line: line, text: map[string]string{}, num: map[string]float64{}}
		for i, h := range header {
			r.text[h] = rec[i]
		}
		checkCells(r, &probs)
		sh.rows = append(sh.rows, r)
	}
	return sh, probs, nil
}

// checkCells checks one row against the field dictionary.
func checkCells(r *seedRow, probs *problems) {
	kind := catalog.Kind(r.text["kind"])
	if !slices.Contains(catalog.Kinds, kind) {
		probs.add(r.line, "kind", "unknown kind %q", kind)
		return
	}
	if !slices.Contains(catalog.Types[kind], r.text["type"]) {
		probs.add(r.line, "type", "type %q is not one of %v for %s", r.text["type"], catalog.Types[kind], kind)
	}
	for col, s := range r.text {
		f, ok := catalog.FieldByName(col)
		if !ok || s == "" {
			continue
		}
		if !f.AppliesTo(kind) {
			probs.add(r.line, col, "field does not apply to a %s, must be empty (got %q)", kind, s)
			continue
		}
		switch f.Type {
		case catalog.Number:
			if !plainNumber.MatchString(s) {
				probs.add(r.line, col, "not a plain decimal number in base units (got %q)", s)
				continue
			}
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || math.IsInf(v, 0) {
				probs.add(r.line, col, "number out of range (got %q)", s)
				continue
			}
			r.num[col] = v
		case catalog.Bool:
			if s != "yes" && s != "no" {
				probs.add(r.line, col, `boolean must be "yes" or "no" (got %q)`, s)
			}
		case catalog.Enum:
			if col != "type" && !slices.Contains(f.Enum, s) {
				probs.add(r.line, col, "%q is not one of %v", s, f.Enum)
			}
		}
	}
}

// checkSeed runs every rule over data and returns the problems found.
func checkSeed(data []byte) []string {
	sh, probs, err := readSeed(data)
	if err != nil {
		return append(probs, err.Error())
	}
	for _, r := range sh.rows {
		checkText(r, &probs)
		switch catalog.Kind(r.text["kind"]) {
		case catalog.Diode:
			checkDiode(r, &probs)
		case catalog.MOSFET:
			checkMOSFET(r, &probs)
		case catalog.Fuse:
			checkFuse(r, &probs)
		}
		checkOffer(r, sh.qtys, &probs)
	}
	checkIdentity(sh, &probs)
	return probs
}

// realPrefixes are part-number prefixes of real product ranges that the
// invented numbers must not imitate.
var realPrefixes = []string{"1N", "BAT", "SS", "MBR", "IRF", "SI", "BZX", "SMAJ"}

// exampleLink matches an invented datasheet link under the reserved
// .example top-level domain (RFC 2606).
var exampleLink = regexp.MustCompile(`^https://[a-z]+\.example/`)

func checkText(r *seedRow, probs *problems) {
	for _, col := range []string{"mfr", "mpn", "desc", "package", "lifecycle", "rohs", "aecq"} {
		if r.text[col] == "" {
			probs.add(r.line, col, "must not be empty")
		}
	}
	for _, pre := range realPrefixes {
		if strings.HasPrefix(strings.ToUpper(r.text["mpn"]), pre) {
			probs.add(r.line, "mpn", "%q imitates a real part-number prefix %q", r.text["mpn"], pre)
		}
	}
	if ds := r.text["datasheet"]; ds != "" && !exampleLink.MatchString(ds) {
		probs.add(r.line, "datasheet", "link must use the reserved .example domain (got %q)", ds)
	}
}

// need reports each missing column and returns false if any is missing.
func need(r *seedRow, probs *problems, cols ...string) bool {
	ok := true
	for _, c := range cols {
		if !r.has(c) {
			probs.add(r.line, c, "required for a %s %s", r.text["type"], r.text["kind"])
			ok = false
		}
	}
	return ok
}

// within reports whether v lies in [lo, hi].
func within(v, lo, hi float64) bool { return v >= lo && v <= hi }

// pdMatchesRth checks P_D = (T_jmax − 25 °C)/R_thJA within 2 %.
func pdMatchesRth(r *seedRow, probs *problems) {
	if !r.has("pd") || !r.has("rthja") || !r.has("tjmax") {
		return
	}
	want := (r.num["tjmax"] - 25) / r.num["rthja"]
	if math.Abs(r.num["pd"]-want) > 0.02*want {
		probs.add(r.line, "pd", "%g W does not match (tjmax − 25)/rthja = %.3g W", r.num["pd"], want)
	}
}

// e24 holds the E24 mantissas (×1 and ×10) used for Zener voltages.
var e24 = []float64{1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1}

func isE24(v float64) bool {
	for _, m := range e24 {
		if math.Abs(v-m) < 1e-9 || math.Abs(v-10*m) < 1e-9 {
			return true
		}
	}
	return false
}

func checkDiode(r *seedRow, probs *problems) {
	typ := r.text["type"]
	if !need(r, probs, "tjmax", "rthja") {
		return
	}
	tjmax := r.num["tjmax"]
	if !within(tjmax, 100, 200) {
		probs.add(r.line, "tjmax", "%g °C outside 100…200 °C", tjmax)
	}
	for _, c := range []string{"vf_tj", "vf2_tj", "ir_tj", "ir2_tj"} {
		if r.has(c) && r.num[c] > tjmax {
			probs.add(r.line, c, "%g °C above tjmax %g °C", r.num[c], tjmax)
		}
	}
	pdMatchesRth(r, probs)
	switch typ {
	case "rectifier", "schottky":
		checkRectifier(r, probs)
	case "zener":
		checkZener(r, probs)
	case "tvs":
		checkTVS(r, probs)
	}
}

func checkRectifier(r *seedRow, probs *problems) {
	if !need(r, probs, "vrrm", "ifav", "ifsm", "ifsm_t", "vf", "vf_if", "ir", "ir_vr") {
		return
	}
	n := r.num
	schottky := r.text["type"] == "schottky"
	vfLo, vfHi := 0.7, 2.0
	vLo, vHi, iLo, iHi := 50.0, 1000.0, 1.0, 6.0
	// dV_F/dT bands (REFERENCE §1.3): PN −1.8…−2.2 mV/K, Schottky −0.1…−1.0 mV/K
	tcLo, tcHi := -2.2e-3, -1.5e-3
	// leakage doubling interval: Schottky 8–11 K (REFERENCE §1.4), PN slower
	dblLo, dblHi := 15.0, 35.0
	if schottky {
		vfLo, vfHi = 0.3, 0.95
		vLo, vHi, iLo, iHi = 20, 200, 0.5, 15
		tcLo, tcHi = -1.0e-3, -0.1e-3
		dblLo, dblHi = 7.5, 11.5
	}
	if !within(n["vf"], vfLo, vfHi) {
		probs.add(r.line, "vf", "%g V outside %g…%g V for a %s", n["vf"], vfLo, vfHi, r.text["type"])
	}
	if n["vf"] >= n["vrrm"] {
		probs.add(r.line, "vf", "forward drop %g V not below vrrm %g V", n["vf"], n["vrrm"])
	}
	if !within(n["vrrm"], vLo, vHi) {
		probs.add(r.line, "vrrm", "%g V outside %g…%g V", n["vrrm"], vLo, vHi)
	}
	if !within(n["ifav"], iLo, iHi) {
		probs.add(r.line, "ifav", "%g A outside %g…%g A", n["ifav"], iLo, iHi)
	}
	if n["ifsm"] < 10*n["ifav"] {
		probs.add(r.line, "ifsm", "surge %g A below 10 × ifav", n["ifsm"])
	}
	if t := n["ifsm_t"]; t != 0.0083 && t != 0.01 {
		probs.add(r.line, "ifsm_t", "surge pulse %g s is neither 8.3 ms nor 10 ms", t)
	}
	if n["ir_vr"] > n["vrrm"] {
		probs.add(r.line, "ir_vr", "leakage test voltage %g V above vrrm", n["ir_vr"])
	}
	if r.has("vf2") && need(r, probs, "vf2_if", "vf2_tj") {
		tj1 := 25.0
		if r.has("vf_tj") {
			tj1 = n["vf_tj"]
		}
		if n["vf2_if"] == n["vf_if"] && n["vf2_tj"] > tj1 {
			tc := (n["vf2"] - n["vf"]) / (n["vf2_tj"] - tj1)
			if !within(tc, tcLo-1e-9, tcHi+1e-9) {
				probs.add(r.line, "vf2", "dVf/dT = %.2f mV/K outside %.1f…%.1f mV/K", tc*1e3, tcLo*1e3, tcHi*1e3)
			}
		}
	}
	if r.has("ir2") && need(r, probs, "ir2_tj") {
		tj1 := 25.0
		if r.has("ir_tj") {
			tj1 = n["ir_tj"]
		}
		if n["ir2"] <= n["ir"] || n["ir2_tj"] <= tj1 {
			probs.add(r.line, "ir2", "leakage %g A at %g °C must exceed %g A at %g °C", n["ir2"], n["ir2_tj"], n["ir"], tj1)
			return
		}
		dbl := math.Ln2 * (n["ir2_tj"] - tj1) / math.Log(n["ir2"]/n["ir"])
		if !within(dbl, dblLo, dblHi) {
			probs.add(r.line, "ir2", "leakage doubles every %.1f K, outside %g…%g K", dbl, dblLo, dblHi)
		}
	}
}

func checkZener(r *seedRow, probs *problems) {
	if !need(r, probs, "vz", "vz_tol", "pd") {
		return
	}
	n := r.num
	if !within(n["vz"], 3.3, 24) || !isE24(n["vz"]) {
		probs.add(r.line, "vz", "%g V is not an E24 value in 3.3…24 V", n["vz"])
	}
	if n["vz_tol"] != 0.02 && n["vz_tol"] != 0.05 {
		probs.add(r.line, "vz_tol", "tolerance %g is neither 0.02 nor 0.05", n["vz_tol"])
	}
	if !within(n["pd"], 0.25, 5) {
		probs.add(r.line, "pd", "%g W outside 0.25…5 W", n["pd"])
	}
	if n["tjmax"] != 150 {
		probs.add(r.line, "tjmax", "seed Zeners are rated 150 °C (got %g)", n["tjmax"])
	}
	if r.has("ir_vr") && n["ir_vr"] >= n["vz"]*(1-n["vz_tol"]) {
		probs.add(r.line, "ir_vr", "leakage test voltage %g V not below the Zener knee", n["ir_vr"])
	}
}

func checkTVS(r *seedRow, probs *problems) {
	if !need(r, probs, "vrwm", "vbr", "vc", "ipp", "ppk") {
		return
	}
	n := r.num
	if !(n["vrwm"] < n["vbr"] && n["vbr"] < n["vc"]) {
		probs.add(r.line, "vbr", "need vrwm < vbr < vc (got %g, %g, %g V)", n["vrwm"], n["vbr"], n["vc"])
	}
	if k := n["vbr"] / n["vrwm"]; !within(k, 1.05, 1.2) {
		probs.add(r.line, "vbr", "vbr/vrwm = %.3f outside 1.05…1.2", k)
	}
	if k := n["vc"] / n["vrwm"]; !within(k, 1.4, 2.0) {
		probs.add(r.line, "vc", "vc/vrwm = %.3f outside 1.4…2.0", k)
	}
	if !slices.Contains([]float64{400, 600, 1500}, n["ppk"]) {
		probs.add(r.line, "ppk", "%g W is not a 400/600/1500 W class", n["ppk"])
	}
	if p := n["vc"] * n["ipp"]; math.Abs(p-n["ppk"]) > 0.03*n["ppk"] {
		probs.add(r.line, "ipp", "vc × ipp = %.4g W differs from ppk %g W by more than 3 %%", p, n["ppk"])
	}
	if r.has("ir_vr") && n["ir_vr"] > n["vrwm"] {
		probs.add(r.line, "ir_vr", "leakage test voltage above vrwm")
	}
}

func checkMOSFET(r *seedRow, probs *problems) {
	if !need(r, probs, "vds", "vgs_max", "vgs_th", "rdson", "rdson_vgs", "id", "qg", "pd", "rthja", "tjmax") {
		return
	}
	n := r.num
	if !within(n["vds"], 20, 100) {
		probs.add(r.line, "vds", "%g V outside 20…100 V", n["vds"])
	}
	if !slices.Contains([]float64{8, 12, 20}, n["vgs_max"]) {
		probs.add(r.line, "vgs_max", "%g V is not ±8, ±12 or ±20 V", n["vgs_max"])
	}
	if n["rdson_vgs"] > n["vgs_max"] {
		probs.add(r.line, "rdson_vgs", "drive %g V above vgs_max %g V", n["rdson_vgs"], n["vgs_max"])
	}
	if n["vgs_max"] < 20 && n["rdson_vgs"] > 4.5 {
		probs.add(r.line, "rdson_vgs", "a ±%g V logic-level part must be rated at 4.5 V or less", n["vgs_max"])
	}
	if !within(n["vgs_th"], 0.5, 4) || n["vgs_th"] >= n["rdson_vgs"] {
		probs.add(r.line, "vgs_th", "threshold %g V must be 0.5…4 V and below the drive %g V", n["vgs_th"], n["rdson_vgs"])
	}
	if !within(n["rdson"], 0.003, 0.3) {
		probs.add(r.line, "rdson", "%g Ω outside 3…300 mΩ", n["rdson"])
	}
	if r.has("rdson2") != r.has("rdson2_vgs") {
		probs.add(r.line, "rdson2", "rdson2 and rdson2_vgs go together")
	} else if r.has("rdson2") {
		if n["rdson2_vgs"] >= n["rdson_vgs"] || n["rdson2"] <= n["rdson"] {
			probs.add(r.line, "rdson2", "second rating must be at a lower drive with a higher resistance (got %g Ω at %g V vs %g Ω at %g V)",
				n["rdson2"], n["rdson2_vgs"], n["rdson"], n["rdson_vgs"])
		}
		if n["vgs_th"] >= n["rdson2_vgs"] {
			probs.add(r.line, "vgs_th", "threshold %g V not below the second drive %g V", n["vgs_th"], n["rdson2_vgs"])
		}
	}
	if n["tjmax"] != 150 && n["tjmax"] != 175 {
		probs.add(r.line, "tjmax", "%g °C is neither 150 nor 175 °C", n["tjmax"])
	}
	if !within(n["qg"], 0.5e-9, 300e-9) {
		probs.add(r.line, "qg", "%g C outside 0.5…300 nC", n["qg"])
	}
	if n["id"] <= 0 {
		probs.add(r.line, "id", "must be positive")
	}
	pdMatchesRth(r, probs)
}

// fuseI2tBand is the accepted melting I²t/I_N² per speed class, A²s/A²
// (the seed's invented scale: fast small, time-lag larger).
var fuseI2tBand = map[string][2]float64{
	"FF": {0.05, 0.3}, "F": {0.15, 1.0}, "M": {0.8, 3}, "T": {1.5, 6}, "TT": {4, 10},
}

// fuseWords are description words required per speed class.
var fuseWords = map[string][]string{
	"FF": {"very fast"}, "F": {"quick-acting", "fast-acting"}, "M": {"medium time-lag", "blade"},
	"T": {"time-lag", "time-delay", "slow-blow"}, "TT": {"long time-lag"},
}

// stdWords are description words required per rating convention.
var stdWords = map[string]string{"iec": "IEC 60127", "ul": "UL 248", "blade": "blade"}

func checkFuse(r *seedRow, probs *problems) {
	if !need(r, probs, "in", "breaking", "i2t", "rcold") {
		return
	}
	n := r.num
	typ, std := r.text["type"], r.text["fuse_std"]
	if std == "" {
		probs.add(r.line, "fuse_std", "required for a fuse")
	}
	if !r.has("un_dc") && !r.has("un_ac") {
		probs.add(r.line, "un_dc", "a fuse needs un_dc or un_ac")
	}
	if !within(n["in"], 0.5, 40) {
		probs.add(r.line, "in", "%g A outside 0.5…40 A", n["in"])
	}
	if n["breaking"] < 10*n["in"] {
		probs.add(r.line, "breaking", "%g A below 10 × in", n["breaking"])
	}
	if b, ok := fuseI2tBand[typ]; ok {
		if k := n["i2t"] / (n["in"] * n["in"]); !within(k, b[0], b[1]) {
			probs.add(r.line, "i2t", "i2t/in² = %.3g A²s/A² outside %g…%g for speed %s", k, b[0], b[1], typ)
		}
	}
	if r.has("i2t_clear") && n["i2t_clear"] <= n["i2t"] {
		probs.add(r.line, "i2t_clear", "clearing I²t %g not above melting I²t %g", n["i2t_clear"], n["i2t"])
	}
	if drop := n["in"] * n["rcold"]; !within(drop, 0.03, 0.3) {
		probs.add(r.line, "rcold", "cold drop in × rcold = %.3g V outside 0.03…0.3 V", drop)
	}
	desc := strings.ToLower(r.text["desc"])
	if ws := fuseWords[typ]; ws != nil && !slices.ContainsFunc(ws, func(w string) bool { return strings.Contains(desc, strings.ToLower(w)) }) {
		probs.add(r.line, "desc", "speed %s needs one of %q in the description", typ, ws)
	}
	if w := stdWords[std]; w != "" && !strings.Contains(desc, strings.ToLower(w)) {
		probs.add(r.line, "desc", "fuse_std %s needs %q in the description", std, w)
	}
	switch std {
	case "iec":
		if n["un_ac"] != 250 {
			probs.add(r.line, "un_ac", "IEC 5x20 seed fuses are rated 250 V AC")
		}
	case "ul":
		if !slices.Contains([]float64{32, 63, 125}, n["un_dc"]) {
			probs.add(r.line, "un_dc", "UL-style seed fuses carry a 32, 63 or 125 V DC rating (got %g)", n["un_dc"])
		}
	case "blade":
		if n["un_dc"] != 32 || r.has("un_ac") || n["breaking"] != 1000 || !strings.HasPrefix(r.text["package"], "blade") {
			probs.add(r.line, "fuse_std", "blade fuses are 32 V DC only, 1000 A breaking, package \"blade …\"")
		}
	}
	if rr := r.text["rerate"]; rr != "" {
		if err := checkRerate(rr); err != nil {
			probs.add(r.line, "rerate", "%v", err)
		}
	}
}

// checkRerate checks a "T:factor, T:factor" list: temperatures rising,
// factors in (0, 1.1] and not rising.
func checkRerate(s string) error {
	prevT, prevF := math.Inf(-1), math.Inf(1)
	for _, pair := range strings.Split(s, ",") {
		t, f, ok := strings.Cut(strings.TrimSpace(pair), ":")
		if !ok {
			return fmt.Errorf("%q is not a T:factor pair", pair)
		}
		tv, err1 := strconv.ParseFloat(t, 64)
		fv, err2 := strconv.ParseFloat(f, 64)
		if err1 != nil || err2 != nil {
			return fmt.Errorf("%q is not a pair of numbers", pair)
		}
		if tv <= prevT || fv > prevF || fv <= 0 || fv > 1.1 {
			return fmt.Errorf("%q: temperatures must rise and factors (0…1.1] must not", pair)
		}
		prevT, prevF = tv, fv
	}
	return nil
}

func checkOffer(r *seedRow, qtys []int64, probs *problems) {
	for _, c := range []string{"supplier", "sku", "currency"} {
		if r.text[c] == "" {
			probs.add(r.line, c, "must not be empty")
		}
	}
	if c := r.text["currency"]; c != "EUR" && c != "USD" {
		probs.add(r.line, "currency", "%q is neither EUR nor USD", c)
	}
	stock, err := strconv.ParseInt(r.text["stock"], 10, 64)
	if err != nil || stock < 0 {
		probs.add(r.line, "stock", "not a whole number ≥ 0 (got %q)", r.text["stock"])
	}
	moq, err := strconv.ParseInt(r.text["moq"], 10, 64)
	if err != nil || moq < 1 {
		probs.add(r.line, "moq", "not a whole number ≥ 1 (got %q)", r.text["moq"])
	}
	first, last := -1, -1
	for i, q := range qtys {
		s := r.text[strconv.FormatInt(q, 10)+"+"]
		if s == "" {
			continue
		}
		if !plainNumber.MatchString(s) {
			probs.add(r.line, strconv.FormatInt(q, 10)+"+", "price is not a plain decimal (got %q)", s)
		}
		if first < 0 {
			first = i
		} else if last != i-1 {
			probs.add(r.line, "price breaks", "gap between filled break columns")
		}
		last = i
	}
	q, p := r.breaks(qtys)
	if len(q) < 3 || len(q) > 5 {
		probs.add(r.line, "price breaks", "%d breaks, want 3…5", len(q))
		return
	}
	if q[0] != moq {
		probs.add(r.line, "moq", "first break %d+ differs from moq %d", q[0], moq)
	}
	for i := range p {
		if p[i] <= 0 || (i > 0 && p[i] >= p[i-1]) {
			probs.add(r.line, strconv.FormatInt(q[i], 10)+"+", "unit prices must be positive and fall with quantity (%v)", p)
			break
		}
	}
}

// checkIdentity checks rows of the same part: identical part columns,
// different suppliers; and SKUs unique per supplier.
func checkIdentity(sh *seedSheet, probs *problems) {
	first := map[string]*seedRow{}
	suppliers := map[string][]string{}
	skus := map[string]int{}
	partCols := make([]string, 0, len(catalog.Fields))
	for _, f := range catalog.Fields {
		if slices.Contains(sh.header, f.Name) {
			partCols = append(partCols, f.Name)
		}
	}
	for _, r := range sh.rows {
		key := r.identity()
		if f, ok := first[key]; ok {
			for _, c := range partCols {
				if f.text[c] != r.text[c] {
					probs.add(r.line, c, "differs from row %d of the same part (%q vs %q)", f.line, r.text[c], f.text[c])
				}
			}
		} else {
			first[key] = r
		}
		if slices.Contains(suppliers[key], r.text["supplier"]) {
			probs.add(r.line, "supplier", "part listed twice by %q", r.text["supplier"])
		}
		suppliers[key] = append(suppliers[key], r.text["supplier"])
		sk := r.text["supplier"] + "\x00" + r.text["sku"]
		if l, ok := skus[sk]; ok {
			probs.add(r.line, "sku", "SKU %q already used on row %d", r.text["sku"], l)
		}
		skus[sk] = r.line
	}
}
