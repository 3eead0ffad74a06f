package importers

import (
	"fmt"
	"regexp"
	"strings"
	"sync"
	"unicode"

	"partsieve/catalog"
)

// guess is a kind and type told by words; either may be empty.
type guess struct {
	kind catalog.Kind
	typ  string
}

// phrase is a word or words that tell a kind, and perhaps a type.
type phrase struct {
	text string // normalised: lower case, words separated by one space
	kind catalog.Kind
	typ  string
	// needsKind: the phrase names this type only when the kind is known
	// from elsewhere ("fast" is a fuse speed or a diode recovery class).
	needsKind bool
}

// kindPhrases name a kind without a type.
var kindPhrases = []phrase{
	{text: "diode", kind: catalog.Diode}, {text: "diodes", kind: catalog.Diode},
	{text: "fuse", kind: catalog.Fuse}, {text: "fuses", kind: catalog.Fuse},
	{text: "fuse link", kind: catalog.Fuse}, {text: "fuselink", kind: catalog.Fuse},
	{text: "cartridge", kind: catalog.Fuse}, {text: "ato", kind: catalog.Fuse}, {text: "atc", kind: catalog.Fuse},
	{text: "mosfet", kind: catalog.MOSFET}, {text: "mosfets", kind: catalog.MOSFET},
	{text: "mos fet", kind: catalog.MOSFET}, {text: "fet", kind: catalog.MOSFET},
	{text: "power mos", kind: catalog.MOSFET}, {text: "transistor", kind: catalog.MOSFET},
}

// typePhrases name a type (and so a kind), checked in order: within a kind
// the first phrase found wins, so longer and stronger phrases come first
// ("very fast acting" before "fast acting", "TVS" before "rectifier").
var typePhrases = []phrase{
	// diodes
	{text: "tvs", kind: catalog.Diode, typ: "tvs"},
	{text: "transient voltage suppressor", kind: catalog.Diode, typ: "tvs"},
	{text: "transient voltage suppression", kind: catalog.Diode, typ: "tvs"},
	{text: "transient suppressor", kind: catalog.Diode, typ: "tvs"},
	{text: "esd protection", kind: catalog.Diode, typ: "tvs"},
	{text: "esd", kind: catalog.Diode, typ: "tvs", needsKind: true},
	{text: "unidirectional", kind: catalog.Diode, typ: "tvs", needsKind: true},
	{text: "bidirectional", kind: catalog.Diode, typ: "tvs", needsKind: true},
	{text: "zener", kind: catalog.Diode, typ: "zener"},
	{text: "z diode", kind: catalog.Diode, typ: "zener"},
	{text: "voltage regulator diode", kind: catalog.Diode, typ: "zener"},
	{text: "voltage reference diode", kind: catalog.Diode, typ: "zener"},
	{text: "schottky", kind: catalog.Diode, typ: "schottky"},
	{text: "sbd", kind: catalog.Diode, typ: "schottky"},
	{text: "rectifier", kind: catalog.Diode, typ: "rectifier"},
	{text: "rectifiers", kind: catalog.Diode, typ: "rectifier"},
	{text: "fast recovery", kind: catalog.Diode, typ: "rectifier"},
	{text: "ultrafast", kind: catalog.Diode, typ: "rectifier"},
	{text: "ultra fast recovery", kind: catalog.Diode, typ: "rectifier"},
	{text: "superfast", kind: catalog.Diode, typ: "rectifier"},
	{text: "super fast recovery", kind: catalog.Diode, typ: "rectifier"},
	{text: "frd", kind: catalog.Diode, typ: "rectifier"},
	{text: "standard recovery", kind: catalog.Diode, typ: "rectifier"},
	{text: "soft recovery", kind: catalog.Diode, typ: "rectifier"},
	{text: "avalanche rectifier", kind: catalog.Diode, typ: "rectifier"},
	{text: "general purpose", kind: catalog.Diode, typ: "rectifier", needsKind: true},
	{text: "switching diode", kind: catalog.Diode, typ: "rectifier"},
	{text: "ultra fast", kind: catalog.Diode, typ: "rectifier", needsKind: true},
	{text: "super fast", kind: catalog.Diode, typ: "rectifier", needsKind: true},
	{text: "fast", kind: catalog.Diode, typ: "rectifier", needsKind: true},
	{text: "standard", kind: catalog.Diode, typ: "rectifier", needsKind: true},
	{text: "silicon", kind: catalog.Diode, typ: "rectifier", needsKind: true},
	// MOSFETs: both channels named (a complementary pair) tells no type
	{text: "p channel", kind: catalog.MOSFET, typ: "p"},
	{text: "n channel", kind: catalog.MOSFET, typ: "n"},
	{text: "p ch", kind: catalog.MOSFET, typ: "p"},
	{text: "n ch", kind: catalog.MOSFET, typ: "n"},
	{text: "pch", kind: catalog.MOSFET, typ: "p"},
	{text: "nch", kind: catalog.MOSFET, typ: "n"},
	{text: "pmos", kind: catalog.MOSFET, typ: "p"},
	{text: "nmos", kind: catalog.MOSFET, typ: "n"},
	{text: "pfet", kind: catalog.MOSFET, typ: "p"},
	{text: "nfet", kind: catalog.MOSFET, typ: "n"},
	{text: "p mosfet", kind: catalog.MOSFET, typ: "p"},
	{text: "n mosfet", kind: catalog.MOSFET, typ: "n"},
	{text: "p type", kind: catalog.MOSFET, typ: "p", needsKind: true},
	{text: "n type", kind: catalog.MOSFET, typ: "n", needsKind: true},
	// fuses, IEC 60127 speed classes
	{text: "long time lag", kind: catalog.Fuse, typ: "TT"},
	{text: "very slow", kind: catalog.Fuse, typ: "TT", needsKind: true},
	{text: "super slow", kind: catalog.Fuse, typ: "TT", needsKind: true},
	{text: "extra slow", kind: catalog.Fuse, typ: "TT", needsKind: true},
	{text: "very fast acting", kind: catalog.Fuse, typ: "FF"},
	{text: "very quick acting", kind: catalog.Fuse, typ: "FF"},
	{text: "ultra fast acting", kind: catalog.Fuse, typ: "FF"},
	{text: "super fast acting", kind: catalog.Fuse, typ: "FF"},
	{text: "very fast", kind: catalog.Fuse, typ: "FF", needsKind: true},
	{text: "very quick", kind: catalog.Fuse, typ: "FF", needsKind: true},
	{text: "ultra fast", kind: catalog.Fuse, typ: "FF", needsKind: true},
	{text: "medium time lag", kind: catalog.Fuse, typ: "M"},
	{text: "medium acting", kind: catalog.Fuse, typ: "M"},
	{text: "medium", kind: catalog.Fuse, typ: "M", needsKind: true},
	{text: "slow blow", kind: catalog.Fuse, typ: "T"},
	{text: "slo blo", kind: catalog.Fuse, typ: "T"},
	{text: "slow acting", kind: catalog.Fuse, typ: "T"},
	{text: "time lag", kind: catalog.Fuse, typ: "T"},
	{text: "timelag", kind: catalog.Fuse, typ: "T"},
	{text: "time delay", kind: catalog.Fuse, typ: "T"},
	{text: "anti surge", kind: catalog.Fuse, typ: "T"},
	{text: "antisurge", kind: catalog.Fuse, typ: "T"},
	{text: "delay", kind: catalog.Fuse, typ: "T", needsKind: true},
	{text: "slow", kind: catalog.Fuse, typ: "T", needsKind: true},
	{text: "fast acting", kind: catalog.Fuse, typ: "F"},
	{text: "quick acting", kind: catalog.Fuse, typ: "F"},
	{text: "fast blow", kind: catalog.Fuse, typ: "F"},
	{text: "quick blow", kind: catalog.Fuse, typ: "F"},
	{text: "fast", kind: catalog.Fuse, typ: "F", needsKind: true},
	{text: "quick", kind: catalog.Fuse, typ: "F", needsKind: true},
	{text: "normal blow", kind: catalog.Fuse, typ: "F", needsKind: true},
}

// kindNames are the values a kind column may hold.
var kindNames = map[string]catalog.Kind{
	"diode": catalog.Diode, "diodes": catalog.Diode, "d": catalog.Diode, "rectifier": catalog.Diode,
	"fuse": catalog.Fuse, "fuses": catalog.Fuse, "f": catalog.Fuse,
	"mosfet": catalog.MOSFET, "mosfets": catalog.MOSFET, "fet": catalog.MOSFET, "mos": catalog.MOSFET,
	"transistor": catalog.MOSFET,
}

// exactTypes are whole cells of a type, channel or speed column: MOSFET
// channel letters and IEC 60127 speed letters.
var exactTypes = map[string]guess{
	"n": {catalog.MOSFET, "n"}, "p": {catalog.MOSFET, "p"},
	"ff": {catalog.Fuse, "FF"}, "f": {catalog.Fuse, "F"}, "m": {catalog.Fuse, "M"},
	"t": {catalog.Fuse, "T"}, "tt": {catalog.Fuse, "TT"},
	"rectifier": {catalog.Diode, "rectifier"}, "schottky": {catalog.Diode, "schottky"},
	"zener": {catalog.Diode, "zener"}, "tvs": {catalog.Diode, "tvs"},
}

// normText lower-cases s and separates words by single spaces: "P-Ch." and
// "p ch" are alike, "slow-blow" is "slow blow".
func normText(s string) string {
	var b strings.Builder
	b.Grow(len(s) + 2)
	b.WriteByte(' ')
	space := true
	for _, r := range strings.ToLower(s) {
		if unicode.IsLetter(r) || unicode.IsDigit(r) {
			b.WriteRune(r)
			space = false
		} else if !space {
			b.WriteByte(' ')
			space = true
		}
	}
	if !space {
		b.WriteByte(' ')
	}
	return b.String()
}

// has reports whether the normalised text t holds the phrase p as whole
// words, and where.
func has(t, p string) int {
	return strings.Index(t, " "+p+" ")
}

// wordsGuess reads a kind and type from free text (a category,
// description or type cell). The first kind named wins ("N-channel MOSFET
// with Schottky body diode" is a MOSFET); then the first type phrase of
// that kind. A cell that is one type word or letter ("Schottky", "T",
// "P") is exact. within is the kind known from elsewhere, "" if none.
func wordsGuess(text string, within catalog.Kind) guess {
	if len(text) > 200 {
		return guessWords(text, within)
	}
	k := guessKey{text, within}
	guessCache.Lock()
	g, ok := guessCache.m[k]
	guessCache.Unlock()
	if ok {
		return g
	}
	g = guessWords(text, within)
	guessCache.Lock()
	if len(guessCache.m) >= 4096 {
		clear(guessCache.m)
	}
	guessCache.m[k] = g
	guessCache.Unlock()
	return g
}

// guessCache remembers the words of category and type cells, which repeat
// down a sheet.
var guessCache = struct {
	sync.Mutex
	m map[guessKey]guess
}{m: map[guessKey]guess{}}

type guessKey struct {
	text   string
	within catalog.Kind
}

func guessWords(text string, within catalog.Kind) guess {
	t := normText(text)
	if len(t) <= 2 {
		return guess{}
	}
	if g, ok := exactTypes[strings.TrimSpace(t)]; ok {
		if within == "" || within == g.kind {
			return g
		}
		return guess{}
	}
	kind, pos := within, -1
	if kind == "" {
		for _, p := range kindPhrases {
			if i := has(t, p.text); i >= 0 && (pos < 0 || i < pos) {
				kind, pos = p.kind, i
			}
		}
		// a type phrase that tells its kind, earlier than the kind word
		for _, p := range typePhrases {
			if p.needsKind {
				continue
			}
			if i := has(t, p.text); i >= 0 && (pos < 0 || i < pos) {
				kind, pos = p.kind, i
			}
		}
	}
	if kind == "" {
		return guess{}
	}
	g := guess{kind: kind}
	if kind == catalog.MOSFET {
		for _, both := range [...]string{"n and p", "p and n", "n p", "p n", "complementary", "dual n p"} {
			if has(t, both) >= 0 {
				return g
			}
		}
	}
	for _, p := range typePhrases {
		if p.kind != kind || has(t, p.text) < 0 {
			continue
		}
		if kind == catalog.MOSFET && g.typ != "" && g.typ != p.typ {
			return guess{kind: kind} // N- and P-channel: a pair, no single type
		}
		if g.typ == "" {
			g.typ = p.typ
			if kind != catalog.MOSFET {
				break
			}
		}
	}
	return g
}

// fuseMarkRE finds an IEC marking of speed letter and rated current in a
// description: "T2A", "F 500mA", "T 2A L 250V", "FF10A".
var fuseMarkRE = regexp.MustCompile(`(?:^|[^A-Za-z0-9])(FF|TT|F|M|T)\s?\d+(?:[.,]\d+)?\s?m?A(?:$|[^A-Za-z0-9]|[LH])`)

// fuseMark returns the speed letter of an IEC marking in s.
func fuseMark(s string) string {
	if m := fuseMarkRE.FindStringSubmatch(s); m != nil {
		return m[1]
	}
	return ""
}

// fuseStd reads the rating convention of a fuse from words: "UL 248",
// "IEC 60127", "blade", "ATO", "ISO 8820". When a fuse names UL and IEC
// both, ul is returned: its 75 % continuous-load rule is the stricter one.
// "automotive" alone means blade unless the text speaks of AEC-Q, SMD or
// chip fuses (automotive-qualified SMD fuses are IEC/UL style).
func fuseStd(s string) string {
	t := normText(s)
	if strings.TrimSpace(t) == "" {
		return ""
	}
	for _, w := range []string{"blade", "ato", "atc", "mini blade", "minifuse", "maxi", "micro2", "apx", "iso 8820", "iso8820", "automotive fuse", "blade fuse"} {
		if has(t, w) >= 0 {
			return "blade"
		}
	}
	if has(t, "automotive") >= 0 && !strings.Contains(t, "aec") && has(t, "smd") < 0 && has(t, "chip") < 0 {
		return "blade"
	}
	for _, w := range []string{"ul", "ul 248", "ul248", "ul 248 14", "ul 248 1", "csa", "cul", "ul listed", "ul recognized", "ur"} {
		if has(t, w) >= 0 {
			return "ul"
		}
	}
	for _, w := range []string{"iec", "iec 60127", "iec60127", "iec 127", "en 60127", "en60127", "vde", "enec", "iec 60127 2", "iec 60127 4"} {
		if has(t, w) >= 0 {
			return "iec"
		}
	}
	// bare standard numbers
	if strings.Contains(t, "60127") {
		return "iec"
	}
	if strings.Contains(t, "248") && strings.Contains(t, "ul") {
		return "ul"
	}
	return ""
}

// kindFields are fields whose presence in a row hints its kind.
var kindFields = map[string]catalog.Kind{
	"vrrm": catalog.Diode, "ifav": catalog.Diode, "ifsm": catalog.Diode, "ifsm_t": catalog.Diode,
	"vf": catalog.Diode, "vf_if": catalog.Diode, "vf2": catalog.Diode, "ir": catalog.Diode, "ir_vr": catalog.Diode,
	"ir2": catalog.Diode, "vz": catalog.Diode, "vz_tol": catalog.Diode, "vrwm": catalog.Diode,
	"vbr": catalog.Diode, "vc": catalog.Diode, "ipp": catalog.Diode, "ppk": catalog.Diode,
	"vds": catalog.MOSFET, "vgs_max": catalog.MOSFET, "vgs_th": catalog.MOSFET, "rdson": catalog.MOSFET,
	"rdson_vgs": catalog.MOSFET, "rdson2": catalog.MOSFET, "id": catalog.MOSFET, "qg": catalog.MOSFET,
	"in": catalog.Fuse, "un_dc": catalog.Fuse, "un_ac": catalog.Fuse, "breaking": catalog.Fuse,
	"i2t": catalog.Fuse, "i2t_clear": catalog.Fuse, "rcold": catalog.Fuse, "rerate": catalog.Fuse,
}

// tvsFields are diode fields only a TVS has.
var tvsFields = []string{"vrwm", "vbr", "vc", "ipp", "ppk"}

// kindFacts is what a row says about its kind and type.
type kindFacts struct {
	fixed     catalog.Kind              // --kind or the mapping file
	fixedType string                    // the mapping file's type, a default
	kindCell  string                    // the kind column
	texts     []kindText                // type, category, channel, speed, description cells, strongest first
	section   guess                     // a section title row above ("Zener diodes")
	present   map[catalog.Kind][]string // headers of filled kind-specific columns
	hasVZ     bool
	hasTVS    bool
	negative  bool // a MOSFET voltage or current written negative
	desc      string
}

// kindText is one cell that may name a type.
type kindText struct {
	column string // header, for messages
	text   string
	exact  bool // a type, channel or speed column: single letters count
	typeCo bool // the type column: a type of another kind is an error
}

// kindError is a row whose kind or type cannot be settled.
type kindError struct {
	column, raw, reason string
}

const noKindReason = "cannot tell whether this row is a diode, fuse or MOSFET; add a category column or use --kind"

// decideKind settles a row's kind and type. Kind: --kind or the mapping
// file; else the kind column; else the first of the type, category,
// channel, speed and description cells that names one; else a section title
// above; else the fields the row fills (V_DS means a MOSFET, I_N and
// breaking capacity a fuse, V_RRM a diode). Type: the first cell that names
// one for that kind; else the mapping file's type; else a diode with V_Z is
// a Zener and one with TVS fields a TVS, a MOSFET with voltages written
// negative is P-channel, a fuse marked "T2A" is time-lag. Otherwise the type
// stays empty: partsieve does not guess a fuse's speed or a diode's
// technology.
func decideKind(f kindFacts) (catalog.Kind, string, *kindError) {
	kind := f.fixed
	said, saidRaw := "", "" // the column and cell that named the kind
	if kind == "" && strings.TrimSpace(f.kindCell) != "" {
		said, saidRaw = "kind", f.kindCell
		k, ok := kindNames[strings.TrimSpace(normText(f.kindCell))]
		if !ok {
			g := wordsGuess(f.kindCell, "")
			if g.kind == "" {
				return "", "", &kindError{column: "kind", raw: f.kindCell,
					reason: "kind must be diode, fuse or mosfet"}
			}
			k = g.kind
		}
		kind = k
	}
	if kind == "" {
		for _, t := range f.texts {
			if g := wordsGuess(t.text, ""); g.kind != "" && (t.exact || !isExactOnly(t.text)) {
				kind, said, saidRaw = g.kind, t.column, t.text
				break
			}
		}
	}
	if kind == "" {
		kind = f.section.kind
	}
	if said != "" && len(f.present[kind]) == 0 {
		for _, k := range catalog.Kinds {
			if k != kind && len(f.present[k]) > 0 {
				return "", "", &kindError{column: said, raw: saidRaw,
					reason: fmt.Sprintf("the row says %s here, but fills %s columns (%s)", kind, k, strings.Join(f.present[k], ", "))}
			}
		}
	}
	if kind == "" {
		best, n, tie := catalog.Kind(""), 0, false
		for _, k := range catalog.Kinds {
			switch c := len(f.present[k]); {
			case c > n:
				best, n, tie = k, c, false
			case c == n && c > 0:
				tie = true
			}
		}
		if !tie {
			kind = best
		}
	}
	if kind == "" {
		return "", "", &kindError{reason: noKindReason}
	}

	typ := ""
	for _, t := range f.texts {
		if !t.exact && isExactOnly(t.text) {
			continue
		}
		g := wordsGuess(t.text, kind)
		if g.typ != "" {
			typ = g.typ
			break
		}
		if t.typeCo {
			// the type column names a type of another kind
			if o := wordsGuess(t.text, ""); o.kind != "" && o.kind != kind && o.typ != "" {
				return "", "", &kindError{column: t.column, raw: t.text,
					reason: "type " + o.typ + " is a " + string(o.kind) + " type, but the row is a " + string(kind)}
			}
		}
	}
	if typ == "" && f.section.kind == kind {
		typ = f.section.typ
	}
	if typ == "" && f.fixedType != "" {
		typ = f.fixedType
	}
	if typ == "" {
		switch kind {
		case catalog.Diode:
			if f.hasVZ {
				typ = "zener"
			} else if f.hasTVS {
				typ = "tvs"
			}
		case catalog.MOSFET:
			if f.negative {
				typ = "p"
			}
		case catalog.Fuse:
			typ = fuseMark(f.desc)
		}
	}
	return kind, typ, nil
}

// isExactOnly reports a free-text cell that is a single letter: in a
// description it means nothing.
func isExactOnly(s string) bool {
	t := strings.TrimSpace(normText(s))
	return len(t) <= 2 && exactTypes[t] != (guess{})
}

func validType(k catalog.Kind, typ string) bool {
	for _, t := range catalog.Types[k] {
		if t == typ {
			return true
		}
	}
	return false
}
