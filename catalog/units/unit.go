package units

import "strings"

// dimSet is a set of dimensions, one bit per Dim.
type dimSet uint16

func dims(ds ...Dim) dimSet {
	var s dimSet
	for _, d := range ds {
		s |= 1 << uint(d)
	}
	return s
}

func (s dimSet) has(d Dim) bool { return d.valid() && s&(1<<uint(d)) != 0 }

// describe names the dimensions of s for messages: "a charge or a temperature".
func (s dimSet) describe() string {
	var parts []string
	for _, d := range AllDims() {
		if s.has(d) {
			parts = append(parts, d.phrase())
		}
	}
	return strings.Join(parts, " or ")
}

// conv is a conversion that is not a pure scale factor.
type conv uint8

const (
	convScale      conv = iota // x · 10^exp10 · mul
	convKelvin                 // °C = K − 273.15
	convFahrenheit             // °C = (°F − 32) · 5/9
)

// unitDef says what a unit text means.
type unitDef struct {
	dims       dimSet  // dimensions the unit measures
	pdims      dimSet  // dimensions in which an SI prefix may precede it
	exp10      int     // power of ten to the base unit, prefix included
	mul        float64 // further factor (60 for min), 0 means 1
	conv       conv    // offset conversion of temperatures
	prefixOnly bool    // a bare SI prefix ("m" in "20m"): the field's base unit
}

// absZeroC is absolute zero in degrees Celsius (0 K, ITS-90 / SI definition
// of the kelvin with T/°C = T/K − 273.15).
const absZeroC = -273.15

// symbolPrefixes are the SI prefix symbols accepted in front of a unit
// symbol. "u" is the ASCII stand-in for micro; "K" is a common misspelling
// of kilo that cannot be confused with the kelvin in front of another unit.
var symbolPrefixes = []struct {
	sym string
	exp int
}{
	{"p", -12}, {"n", -9}, {"u", -6}, {"µ", -6}, {"μ", -6}, {"m", -3},
	{"k", 3}, {"K", 3}, {"M", 6}, {"G", 9},
}

// wordPrefixes are the SI prefix names, written in lower case.
var wordPrefixes = []struct {
	word string
	exp  int
}{
	{"pico", -12}, {"nano", -9}, {"micro", -6}, {"milli", -3},
	{"kilo", 3}, {"mega", 6}, {"giga", 9},
}

// symbols holds case-sensitive unit symbols, with every allowed SI prefix
// already applied ("mΩ", "kV", "µs"), and the bare prefixes.
var symbols map[string]unitDef

// words holds lower-case unit words and their prefixed forms
// ("volt", "milliohm", "kilohm"), matched case-insensitively.
var words map[string]unitDef

func init() {
	vDim := dims(Voltage)
	aDim := dims(Current)
	wDim := dims(Power)
	rDim := dims(Resistance)
	tDim := dims(Temperature)
	sDim := dims(Time)
	qDim := dims(Charge)
	thDim := dims(ThermalRes)
	i2Dim := dims(I2t)
	fDim := dims(Fraction)
	nDim := dims(None)

	plain := func(d dimSet, prefixable bool) unitDef {
		u := unitDef{dims: d}
		if prefixable {
			u.pdims = d
		}
		return u
	}
	base := map[string]unitDef{
		"V":      plain(vDim, true),
		"A":      plain(aDim, true),
		"W":      plain(wDim, true),
		"\u2126": plain(rDim, true), // OHM SIGN
		"\u03a9": plain(rDim, true), // GREEK CAPITAL LETTER OMEGA
		"ohm":    plain(rDim, true),
		"Ohm":    plain(rDim, true),
		"OHM":    plain(rDim, true),
		"ohms":   plain(rDim, true),
		"Ohms":   plain(rDim, true),
		"OHMS":   plain(rDim, true),
		"R":      plain(rDim, false),
		"s":      plain(sDim, true),
		"sec":    plain(sDim, true),
		"min":    {dims: sDim, mul: 60},
		"h":      {dims: sDim, mul: 3600},
		"hr":     {dims: sDim, mul: 3600},
		"hrs":    {dims: sDim, mul: 3600},
		// "C" is a coulomb in a charge field (prefixable) and °C in a
		// temperature field (never prefixed).
		"C":      {dims: qDim | tDim, pdims: qDim},
		"°C":     plain(tDim, false),
		"ºC":     plain(tDim, false), // masculine ordinal indicator, a common look-alike of °
		"℃":      plain(tDim, false),
		"degC":   plain(tDim, false),
		"K":      {dims: tDim, conv: convKelvin},
		"°F":     {dims: tDim, conv: convFahrenheit},
		"ºF":     {dims: tDim, conv: convFahrenheit},
		"℉":      {dims: tDim, conv: convFahrenheit},
		"degF":   {dims: tDim, conv: convFahrenheit},
		"K/W":    plain(thDim, false),
		"°C/W":   plain(thDim, false),
		"ºC/W":   plain(thDim, false),
		"℃/W":    plain(thDim, false),
		"C/W":    plain(thDim, false),
		"degC/W": plain(thDim, false),
		"%":      {dims: fDim, exp10: -2},
		"‰":      {dims: fDim, exp10: -3},
		"ppm":    {dims: fDim, exp10: -6},
	}
	for _, a := range []string{"A²", "A^2", "A2"} {
		for _, dot := range []string{"", "·", "⋅", "*", "."} {
			base[a+dot+"s"] = plain(i2Dim, false)
		}
	}

	symbols = make(map[string]unitDef, 256)
	for k, u := range base {
		symbols[k] = u
	}
	for k, u := range base {
		if u.pdims == 0 {
			continue
		}
		for _, p := range symbolPrefixes {
			key := p.sym + k
			if _, taken := symbols[key]; taken {
				continue // an unprefixed unit of the same spelling wins
			}
			symbols[key] = unitDef{dims: u.pdims, pdims: 0, exp10: u.exp10 + p.exp, mul: u.mul}
		}
	}
	// Bare prefixes: the base unit of the field. "m" is not a time (milli or
	// minute?), and counts take only k, K, M and G.
	pfxDims := dims(Voltage, Current, Power, Resistance, Charge, Time)
	for _, p := range symbolPrefixes {
		d := pfxDims
		switch p.sym {
		case "m":
			d = dims(Voltage, Current, Power, Resistance, Charge)
		case "k", "M", "G":
			d |= nDim
		case "K":
			continue // kelvin; kilo only in resistance and count fields (see lookupUnit)
		}
		if _, taken := symbols[p.sym]; !taken {
			symbols[p.sym] = unitDef{dims: d, exp10: p.exp, prefixOnly: true}
		}
	}

	words = map[string]unitDef{
		"v":          plain(vDim, true),
		"volt":       plain(vDim, true),
		"volts":      plain(vDim, true),
		"a":          plain(aDim, true),
		"amp":        plain(aDim, true),
		"amps":       plain(aDim, true),
		"ampere":     plain(aDim, true),
		"amperes":    plain(aDim, true),
		"w":          plain(wDim, true),
		"watt":       plain(wDim, true),
		"watts":      plain(wDim, true),
		"ohm":        plain(rDim, true),
		"ohms":       plain(rDim, true),
		"coulomb":    plain(qDim, true),
		"coulombs":   plain(qDim, true),
		"sec":        plain(sDim, true),
		"secs":       plain(sDim, true),
		"second":     plain(sDim, true),
		"seconds":    plain(sDim, true),
		"min":        {dims: sDim, mul: 60},
		"mins":       {dims: sDim, mul: 60},
		"minute":     {dims: sDim, mul: 60},
		"minutes":    {dims: sDim, mul: 60},
		"hr":         {dims: sDim, mul: 3600},
		"hrs":        {dims: sDim, mul: 3600},
		"hour":       {dims: sDim, mul: 3600},
		"hours":      {dims: sDim, mul: 3600},
		"percent":    {dims: fDim, exp10: -2},
		"pct":        {dims: fDim, exp10: -2},
		"ppm":        {dims: fDim, exp10: -6},
		"kelvin":     {dims: tDim, conv: convKelvin},
		"celsius":    plain(tDim, false),
		"degc":       plain(tDim, false),
		"degreec":    plain(tDim, false),
		"degreesc":   plain(tDim, false),
		"deg.c":      plain(tDim, false),
		"fahrenheit": {dims: tDim, conv: convFahrenheit},
		"degf":       {dims: tDim, conv: convFahrenheit},
		"k/w":        plain(thDim, false),
		"c/w":        plain(thDim, false),
		"degc/w":     plain(thDim, false),
		"a2s":        plain(i2Dim, false),
		"a^2s":       plain(i2Dim, false),
		"a²s":        plain(i2Dim, false),
		"pcs":        plain(nDim, false),
		"pc":         plain(nDim, false),
		"pce":        plain(nDim, false),
		"piece":      plain(nDim, false),
		"pieces":     plain(nDim, false),
		"ea":         plain(nDim, false),
	}
	var prefixed = map[string]unitDef{
		"kilohm":  {dims: rDim, exp10: 3},
		"kilohms": {dims: rDim, exp10: 3},
		"megohm":  {dims: rDim, exp10: 6},
		"megohms": {dims: rDim, exp10: 6},
	}
	for k, u := range words {
		if u.pdims == 0 || len(k) < 3 {
			continue
		}
		for _, p := range wordPrefixes {
			prefixed[p.word+k] = unitDef{dims: u.pdims, exp10: u.exp10 + p.exp, mul: u.mul}
		}
	}
	for k, u := range prefixed {
		if _, taken := words[k]; !taken {
			words[k] = u
		}
	}
}

// unitBufLen bounds the length of a unit text; longer texts are unknown.
const unitBufLen = 32

// lookupUnit finds the meaning of a unit text for a field of dimension d,
// without checking that the unit fits d. Spaces inside the text are
// ignored ("A^2 s", "deg C", "K / W").
func lookupUnit(text string, d Dim) (unitDef, bool) {
	var buf [unitBufLen]byte
	n := 0
	for i := 0; i < len(text); {
		r, size := decode(text, i)
		if isSpace(r) {
			i += size
			continue
		}
		if n+size > len(buf) {
			return unitDef{}, false
		}
		n += copy(buf[n:], text[i:i+size])
		i += size
	}
	u := buf[:n]
	if n == 0 {
		return unitDef{}, false
	}
	// An upper-case K alone is kilo where the kelvin means nothing.
	if n == 1 && u[0] == 'K' && (d == Resistance || d == None) {
		return unitDef{dims: dims(Resistance, None), exp10: 3, prefixOnly: true}, true
	}
	if def, ok := lookupPlain(u); ok {
		return def, true
	}
	// Voltage and current marks: VDC, Vac, V~, Arms, V(DC).
	for _, suf := range acdcSuffixes {
		if n > len(suf) && string(u[n-len(suf):]) == suf {
			if def, ok := lookupPlain(u[:n-len(suf)]); ok && !def.prefixOnly && def.dims&^dims(Voltage, Current) == 0 {
				return def, true
			}
		}
	}
	return unitDef{}, false
}

var acdcSuffixes = []string{"DC", "dc", "Dc", "AC", "ac", "Ac", "RMS", "rms", "Rms", "~", "(DC)", "(AC)", "(dc)", "(ac)"}

// lookupPlain looks u up as a symbol, as a word in any case, and as a
// prefix symbol followed by a word in any case ("MOhm", "mVolt").
func lookupPlain(u []byte) (unitDef, bool) {
	if def, ok := symbols[string(u)]; ok {
		return def, true
	}
	var low [unitBufLen]byte
	if !lowerASCII(low[:], u) {
		return unitDef{}, false
	}
	l := low[:len(u)]
	// Single letters are symbols, case matters: only v, a, w stand for
	// themselves in lower case ("s" for "S" would turn siemens into seconds).
	if len(l) >= 2 || l[0] == 'v' || l[0] == 'a' || l[0] == 'w' {
		if def, ok := words[string(l)]; ok {
			return def, true
		}
	}
	for _, p := range symbolPrefixes {
		if len(u) <= len(p.sym) || string(u[:len(p.sym)]) != p.sym {
			continue
		}
		// The rest is matched case-insensitively; its lower-case form is
		// the tail of l only when the prefix is ASCII.
		rest := u[len(p.sym):]
		var rl [unitBufLen]byte
		if !lowerASCII(rl[:], rest) {
			continue
		}
		if def, ok := words[string(rl[:len(rest)])]; ok && def.pdims != 0 {
			return unitDef{dims: def.pdims, exp10: def.exp10 + p.exp, mul: def.mul}, true
		}
	}
	return unitDef{}, false
}

// lowerASCII writes u into dst with ASCII letters in lower case (other
// bytes are copied) and reports false when u does not fit.
func lowerASCII(dst []byte, u []byte) bool {
	if len(u) > len(dst) {
		return false
	}
	for i, c := range u {
		if c >= 'A' && c <= 'Z' {
			c += 'a' - 'A'
		}
		dst[i] = c
	}
	return true
}

// resolveUnit finds the unit text for a field of dimension d and checks
// that it measures d. The reason is empty on success.
func resolveUnit(text string, d Dim) (unitDef, string) {
	u, ok := lookupUnit(text, d)
	if !ok {
		if prefixedOnlyElsewhere(text, d) {
			return u, "unit " + quote(text) + " has an SI prefix, but " + d.phrase() + " is written without one, as in " + quote(d.Example())
		}
		return u, "unknown unit " + quote(text) + "; " + d.phrase() + " is written like " + quote(d.Example())
	}
	if !u.dims.has(d) {
		if u.prefixOnly {
			if d == None {
				return u, quote(text) + " is not a count suffix; a plain number takes only k, K, M or G (\"2.5k\")"
			}
			if d == Time && text == "m" {
				return u, `a bare "m" is ambiguous in a time field; write "ms" or "min"`
			}
			return u, quote(text) + " is only a prefix; " + d.phrase() + " needs a unit, as in " + quote(d.Example())
		}
		return u, "unit " + quote(text) + " is " + u.dims.describe() + "; this field wants " + d.phrase()
	}
	return u, ""
}

// prefixedOnlyElsewhere reports whether text is an SI prefix in front of a
// unit of dimension d that takes no prefix ("kA²s", "mK/W", "mC" in a
// temperature field), for a clearer message.
func prefixedOnlyElsewhere(text string, d Dim) bool {
	t := strings.TrimSpace(text)
	for _, p := range symbolPrefixes {
		if !strings.HasPrefix(t, p.sym) || len(t) == len(p.sym) {
			continue
		}
		if def, ok := lookupUnit(t[len(p.sym):], d); ok && !def.prefixOnly && def.dims.has(d) {
			return true
		}
	}
	return false
}

// unitDims returns the dimensions a unit text can mean, leaving out bare
// prefixes.
func unitDims(text string) dimSet {
	var s dimSet
	for _, d := range AllDims() {
		if u, ok := lookupUnit(text, d); ok && !u.prefixOnly && u.dims.has(d) {
			s |= dims(d)
		}
	}
	return s
}

// UnitDim returns the dimensions a unit text can mean ("C" is a temperature
// or a charge, "mΩ" only a resistance), in AllDims order. Enclosing
// parentheses or brackets and surrounding spaces are ignored. It returns
// nil for an unknown unit and for a bare prefix ("k").
func UnitDim(unit string) []Dim {
	s := unitDims(stripBrackets(unit))
	if s == 0 {
		return nil
	}
	var out []Dim
	for _, d := range AllDims() {
		if s.has(d) {
			out = append(out, d)
		}
	}
	return out
}

// stripBrackets trims spaces and one pair of enclosing (), [] or {}.
func stripBrackets(s string) string {
	s = trimSpace(s)
	if len(s) >= 2 {
		switch {
		case s[0] == '(' && s[len(s)-1] == ')',
			s[0] == '[' && s[len(s)-1] == ']',
			s[0] == '{' && s[len(s)-1] == '}':
			s = trimSpace(s[1 : len(s)-1])
		}
	}
	return s
}
