package units

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Error explains why a value could not be parsed. Its message is the reason
// followed by the input, e.g.
//
//	unit "A" is a current; this field wants a voltage (got "3 A")
type Error struct {
	Input  string // the raw text
	Reason string // e.g. `unit "A" is a current; this field wants a voltage`
}

// Error returns the reason followed by the input, quoted and shortened.
func (e *Error) Error() string { return e.Reason + " (got " + quote(e.Input) + ")" }

// quote quotes s for a message, shortened to 60 runes.
func quote(s string) string {
	const max = 60
	if len(s) > max {
		n := 0
		for i := range s {
			if n == max {
				s = s[:i] + "…"
				break
			}
			n++
		}
	}
	return strconv.Quote(s)
}

// ErrEmpty is returned for a cell that means "absent": "", "-", "—", "N/A"
// (the full list is in the package documentation). Callers test it with
// errors.Is.
var ErrEmpty = errors.New("no value (empty cell or absent marker)")

// Limits on magnitudes in base units: beyond them a value is a typo or a
// unit mistake, not a part rating.
const (
	maxMagnitude = 1e15
	minMagnitude = 1e-30
)

// Parse reads s as a value of dimension d and returns it in base SI units
// (°C for temperature, a ratio for fractions). pick says which number of a
// signed value or range the field needs. Absent markers return ErrEmpty;
// anything else that is not a value of dimension d returns an *Error.
//
//	Parse("45 mΩ", Resistance, Magnitude)       = 0.045
//	Parse("4R7", Resistance, Magnitude)         = 4.7
//	Parse("-55 to 150 °C", Temperature, Upper)  = 150
//	Parse("±20 V", Voltage, Magnitude)          = 20
func Parse(s string, d Dim, pick Pick) (float64, error) {
	return ParseWith(s, d, pick, "")
}

// ParseWith is Parse with a default unit taken from the column header
// ("mΩ" from "R_DS(on) (mΩ)"); it applies when the cell has no unit, and a
// unit in the cell wins: "45" with header unit "mΩ" is 0.045 Ω, "0.05 Ω"
// with the same header is 0.05 Ω. The header unit may keep its brackets
// ("(mΩ)"). An unknown header unit, or one of another dimension, is an
// error only when a cell needs it.
func ParseWith(s string, d Dim, pick Pick, headerUnit string) (float64, error) {
	if !d.valid() {
		return 0, &Error{Input: s, Reason: "unknown dimension " + strconv.Itoa(int(d))}
	}
	if pick < Magnitude || pick > Signed {
		return 0, &Error{Input: s, Reason: "unknown pick " + strconv.Itoa(int(pick))}
	}
	t := trimSpace(s)
	if isAbsent(t) {
		return 0, ErrEmpty
	}
	v, reason := parse(t, d, pick, headerUnit)
	if reason != "" {
		return 0, &Error{Input: s, Reason: reason}
	}
	return v, nil
}

// sign of a number.
type sign uint8

const (
	signNone sign = iota
	signPlus
	signMinus
	signPM // ± : a symmetric pair
)

// maxDigits bounds the significant digits kept from a number; later
// digits change the value by less than 1e-29 relative and are dropped.
const maxDigits = 30

// number is a scanned number: the value is digits · 10^exp, without sign.
type number struct {
	digits [maxDigits]byte // significant digits, no leading zeros
	n      int             // digits held
	exp    int             // decimal exponent of the integer digits
	rkm    bool            // IEC 60062 letter code ("4R7"): the unit is the ohm
}

// value is one end of a range or the single value, as written.
type value struct {
	num  number
	neg  bool
	unit string // unit text after the number, "" if none
}

// parse reads a trimmed, non-empty cell. The reason is empty on success.
func parse(t string, d Dim, pick Pick, headerUnit string) (float64, string) {
	i, qualified := skipQualifier(t, 0)
	var a, b value
	sg, i := scanSign(t, i)
	pm := sg == signPM
	if pm {
		i = skipSpaces(t, i)
	}
	a.neg = sg == signMinus
	i, reason := scanValue(t, i, d, &a)
	if reason != "" {
		return 0, reason
	}
	i = skipSpaces(t, i)
	isRange := false
	if i < len(t) {
		n := rangeSep(t, i)
		if n == 0 {
			if startsNumber(t, i) {
				return 0, "two numbers without a range mark; write one value or a range such as " + quote(rangeExample(d))
			}
			return 0, "unexpected " + quote(t[i:]) + " after the value; " + d.phrase() + " is written like " + quote(d.Example())
		}
		if pm {
			return 0, `"±" cannot start a range`
		}
		if qualified {
			return 0, "a comparison sign cannot start a range"
		}
		i = skipSpaces(t, i+n)
		sg, i = scanSign(t, i)
		if sg == signPM {
			return 0, `"±" cannot end a range`
		}
		b.neg = sg == signMinus
		i, reason = scanValue(t, i, d, &b)
		if reason != "" {
			return 0, reason
		}
		i = skipSpaces(t, i)
		if i < len(t) {
			return 0, "unexpected " + quote(t[i:]) + " after the range"
		}
		isRange = true
	}
	if pick == Signed {
		if isRange {
			return 0, "a range is not allowed here; this field wants one signed value"
		}
		if pm {
			return 0, `"±" gives two values; this field wants one signed value`
		}
	}

	// Units: each end's own, else the other end's, else the header's.
	var ua, ub unitDef
	var hasA, hasB bool
	if ua, hasA, reason = endUnit(&a, d); reason != "" {
		return 0, reason
	}
	if isRange {
		if ub, hasB, reason = endUnit(&b, d); reason != "" {
			return 0, reason
		}
	}
	bare := false
	switch {
	case hasA && isRange && !hasB:
		// "500 mV to 2" could mean 2 V or 2 mV: refuse rather than guess.
		return 0, "a unit on the first value only; write it after the last value or on both, as in " + quote(rangeExample(d))
	case !hasA && hasB:
		ua = ub
	case !hasA && !hasB:
		if h := stripBrackets(headerUnit); h != "" {
			u, r := resolveUnit(h, d)
			if r != "" {
				return 0, "header unit: " + r
			}
			ua, ub = u, u
		} else {
			bare = true
		}
	}

	x, reason := a.convert(ua, d)
	if reason != "" {
		return 0, reason
	}
	if bare && d == Fraction && math.Abs(x) > 1 {
		return 0, "a bare number above 1 in a fraction field; write " + quote(percentHint(t)) + " or a ratio such as 0.05"
	}
	if !isRange {
		switch {
		case pm && pick == Lower:
			if d == Temperature && -math.Abs(x) < absZeroC-1e-9 {
				return 0, "the lower end of a \"±\" temperature is below absolute zero (-273.15 °C)"
			}
			return -math.Abs(x), ""
		case pm, pick == Magnitude:
			return math.Abs(x), ""
		}
		return x, ""
	}
	y, reason := b.convert(ub, d)
	if reason != "" {
		return 0, reason
	}
	if bare && d == Fraction && math.Abs(y) > 1 {
		return 0, "a bare number above 1 in a fraction field; write it with % or as a ratio such as 0.05"
	}
	switch pick {
	case Upper:
		return math.Max(x, y), ""
	case Lower:
		return math.Min(x, y), ""
	}
	return math.Max(math.Abs(x), math.Abs(y)), ""
}

func rangeExample(d Dim) string {
	switch d {
	case Temperature:
		return "-55 to 150 °C"
	case None, Fraction:
		return "1 to 2.5"
	}
	return "1 to 2.5 " + d.Symbol()
}

// percentHint suggests the percent form of a bare number ("5 %" for "5").
func percentHint(t string) string {
	for i := 0; i < len(t); i++ {
		c := t[i]
		if !(c >= '0' && c <= '9' || c == '.' || c == ',' || c == '-' || c == '+') {
			return "5 %"
		}
	}
	return t + " %"
}

// endUnit resolves the unit written on one end. has is false when the end
// has none and must borrow one.
func endUnit(v *value, d Dim) (u unitDef, has bool, reason string) {
	if v.num.rkm {
		if v.unit != "" {
			u, reason = resolveUnit(v.unit, d)
			if reason != "" {
				return u, true, reason
			}
			if u.exp10 != 0 || u.prefixOnly {
				return u, true, "a letter-coded value such as 4k7 takes no further prefix; write " + quote("4k7") + " or " + quote("4.7 kΩ")
			}
			return u, true, ""
		}
		return unitDef{dims: dims(Resistance)}, true, ""
	}
	if v.unit == "" {
		return u, false, ""
	}
	u, reason = resolveUnit(v.unit, d)
	return u, true, reason
}

// convert computes the value of v in unit u for dimension d and checks it.
func (v *value) convert(u unitDef, d Dim) (float64, string) {
	x, reason := v.num.float(u.exp10)
	if reason != "" {
		return 0, reason
	}
	if v.neg {
		x = -x
	}
	if u.mul != 0 {
		x *= u.mul
	}
	switch u.conv {
	case convKelvin:
		if x < 0 {
			return 0, "a negative kelvin temperature is below absolute zero"
		}
		x += absZeroC
	case convFahrenheit:
		x = (x - 32) * 5 / 9
	}
	switch ax := math.Abs(x); {
	case math.IsNaN(x) || math.IsInf(x, 0):
		return 0, "not a finite number"
	case ax > maxMagnitude:
		return 0, "magnitude " + strconv.FormatFloat(ax, 'g', 3, 64) + " " + d.Symbol() + " is beyond 1e15; check the unit and the decimal mark"
	case ax != 0 && ax < minMagnitude:
		return 0, "magnitude " + strconv.FormatFloat(ax, 'g', 3, 64) + " " + d.Symbol() + " is below 1e-30; check the unit and the decimal mark"
	}
	if d == Temperature && x < absZeroC-1e-9 {
		return 0, "temperature below absolute zero (-273.15 °C)"
	}
	return x, ""
}

// float returns digits · 10^(exp+extra), correctly rounded.
func (n *number) float(extra int) (float64, string) {
	if n.n == 0 {
		return 0, ""
	}
	e := n.exp + extra
	// The value lies in [10^(e+n-1), 10^(e+n)).
	if e+n.n > 400 {
		return 0, "magnitude far beyond 1e15; check the exponent"
	}
	if e+n.n < -400 {
		return 0, "magnitude far below 1e-30; check the exponent"
	}
	var buf [maxDigits + 8]byte
	b := append(buf[:0], n.digits[:n.n]...)
	b = append(b, 'e')
	b = strconv.AppendInt(b, int64(e), 10)
	x, err := strconv.ParseFloat(string(b), 64)
	if err != nil && !math.IsInf(x, 0) {
		return 0, "malformed number"
	}
	return x, ""
}

// scanValue reads a number and the unit text after it from t[i:].
func scanValue(t string, i int, d Dim, v *value) (int, string) {
	j, reason := scanNumber(t, i, d, &v.num)
	if reason != "" {
		return j, reason
	}
	k := skipSpaces(t, j)
	u0, u1, next := scanUnitText(t, k)
	if u1 > u0 {
		v.unit = t[u0:u1]
		return next, ""
	}
	return j, ""
}

// scanNumber reads the digits, decimal mark, thousands separators and
// exponent of a number starting at t[i] into n.
func scanNumber(t string, i int, d Dim, n *number) (int, string) {
	start := i
	j := i
	var (
		nDigits          int
		dots, commas     int
		lastDot, lastCom = -1, -1
		others           int  // apostrophe-class thousands separators
		otherRune        rune // the one used
		rkmAt            = -1 // byte index of an RKM letter
		rkmExp           int
	)
scan:
	for j < len(t) {
		c := t[j]
		switch {
		case c >= '0' && c <= '9':
			nDigits++
			j++
			continue
		case c == '.':
			if j+1 < len(t) && t[j+1] == '.' {
				break scan // ".." or "..." range mark
			}
			if rkmAt >= 0 {
				break scan
			}
			dots++
			lastDot = j
			j++
			continue
		case c == ',':
			if j > start && isDigit(t[j-1]) && j+1 < len(t) && isDigit(t[j+1]) && rkmAt < 0 {
				commas++
				lastCom = j
				j++
				continue
			}
			break scan
		case d == Resistance && isRKMLetter(c) && rkmAt < 0 && dots == 0 && commas == 0 && others == 0 &&
			j+1 < len(t) && isDigit(t[j+1]) && (nDigits > 0 || c == 'R' || c == 'r'):
			rkmAt = j
			rkmExp, _ = rkmLetter(c)
			j++
			continue
		}
		r, size := decode(t, j)
		if isThousandsRune(r) && j > start && isDigit(t[j-1]) && j+size < len(t) && isDigit(t[j+size]) && rkmAt < 0 {
			if others > 0 && r != otherRune {
				return j, "malformed number: mixed thousands separators"
			}
			others++
			otherRune = r
			j += size
			continue
		}
		break
	}
	if nDigits == 0 {
		return j, notANumber(t, start, d)
	}
	// Which mark is decimal, which separates thousands.
	var dec, thou byte // 0 for none; thou 'o' for the apostrophe class
	switch {
	case rkmAt >= 0:
		dec = 'r'
	case dots > 0 && commas > 0:
		if lastDot > lastCom {
			dec, thou = '.', ','
		} else {
			dec, thou = ',', '.'
		}
		if dec == '.' && dots > 1 || dec == ',' && commas > 1 {
			return j, "malformed number: more than one decimal mark"
		}
	case commas == 1:
		dec = ','
		if d == None && others == 0 && commaThousands(t[start:j], lastCom-start) {
			dec, thou = 0, ','
		}
	case commas > 1:
		thou = ','
	case dots == 1:
		dec = '.'
	case dots > 1:
		thou = '.'
	}
	if others > 0 {
		if thou != 0 {
			return j, "malformed number: mixed thousands separators"
		}
		thou = 'o'
	}
	// Copy significant digits, checking thousands groups.
	*n = number{}
	var (
		afterDec bool
		group    int // digits in the current thousands group
		groups   int // thousands separators met
		dropped  int // integer digits dropped beyond maxDigits
	)
	checkGroup := func() string {
		if groups == 0 {
			if group < 1 || group > 3 {
				return "malformed number: a thousands group must have 1 to 3 digits before the first separator"
			}
		} else if group != 3 {
			return "malformed number: thousands groups must have 3 digits"
		}
		return ""
	}
	for k := start; k < j; {
		c := t[k]
		switch {
		case isDigit(c):
			if !afterDec {
				group++
			}
			switch {
			case n.n == 0 && c == '0': // leading zero, not significant
				if afterDec {
					n.exp--
				}
			case n.n < maxDigits:
				n.digits[n.n] = c
				n.n++
				if afterDec {
					n.exp--
				}
			case !afterDec:
				dropped++ // beyond maxDigits: keeps its place value only
			}
			k++
			continue
		case k == rkmAt:
			afterDec = true
			k++
			continue
		case c == '.' || c == ',':
			if c == dec {
				if thou != 0 && groups > 0 {
					if r := checkGroup(); r != "" {
						return j, r
					}
				}
				afterDec = true
				k++
				continue
			}
			if afterDec {
				return j, "malformed number: a thousands separator after the decimal mark"
			}
			if r := checkGroup(); r != "" {
				return j, r
			}
			groups++
			group = 0
			k++
			continue
		}
		_, size := decode(t, k)
		if afterDec {
			return j, "malformed number: a thousands separator after the decimal mark"
		}
		if r := checkGroup(); r != "" {
			return j, r
		}
		groups++
		group = 0
		k += size
	}
	if groups > 0 && !afterDec {
		if r := checkGroup(); r != "" {
			return j, r
		}
	}
	n.exp += dropped + rkmExp
	n.rkm = rkmAt >= 0
	// Exponent.
	if rkmAt < 0 && j < len(t) && (t[j] == 'e' || t[j] == 'E') {
		k := j + 1
		neg := false
		if k < len(t) && (t[k] == '+' || t[k] == '-') {
			neg = t[k] == '-'
			k++
		}
		if k < len(t) && isDigit(t[k]) {
			e := 0
			for k < len(t) && isDigit(t[k]) {
				if e < 100000 {
					e = e*10 + int(t[k]-'0')
				}
				k++
			}
			if neg {
				e = -e
			}
			n.exp += e
			j = k
		}
	}
	return j, ""
}

func isRKMLetter(c byte) bool { _, ok := rkmLetter(c); return ok }

// rkmLetter returns the power of ten of an IEC 60062 letter used as the
// decimal mark of a resistance.
func rkmLetter(c byte) (int, bool) {
	switch c {
	case 'R', 'r':
		return 0, true
	case 'k', 'K':
		return 3, true
	case 'M':
		return 6, true
	case 'G':
		return 9, true
	case 'm':
		return -3, true
	}
	return 0, false
}

// commaThousands reports whether a number with one comma at index c reads
// as a count with a thousands comma: 1 to 3 digits not starting with 0
// before it and exactly 3 digits after ("1,000", "12,500").
func commaThousands(num string, c int) bool {
	before, after := c, len(num)-c-1
	return before >= 1 && before <= 3 && num[0] != '0' && after == 3
}

// notANumber explains a missing number at t[i:].
func notANumber(t string, i int, d Dim) string {
	rest := strings.ToLower(t[i:])
	for _, w := range []string{"nan", "inf", "infinity"} {
		if strings.HasPrefix(rest, w) && (len(rest) == len(w) || !isLetter(rest[len(w)])) {
			return "NaN and infinity are not values"
		}
	}
	if i == 0 && len(t) > 1 && t[0] == '#' {
		return "a spreadsheet error value, not a number"
	}
	return "expected a number; " + d.phrase() + " is written like " + quote(d.Example())
}

// scanUnitText finds the unit text starting at t[i]: it runs up to the end,
// a range mark, or a space before something that starts a number. u1 is
// the end of the text without trailing spaces; next is where scanning goes
// on.
func scanUnitText(t string, i int) (u0, u1, next int) {
	u0, u1 = i, i
	j := i
	for j < len(t) {
		r, size := decode(t, j)
		if isSpace(r) {
			k := skipSpaces(t, j)
			if k == len(t) || startsNumber(t, k) || rangeSep(t, k) > 0 {
				return u0, u1, j
			}
			j = k
			continue
		}
		if j == u0 && startsNumber(t, j) {
			return u0, u1, j
		}
		if r == '+' || r == ',' || r == ';' || rangeSep(t, j) > 0 && !isWordTo(t, j) {
			return u0, u1, j
		}
		if isWordTo(t, j) && (j == u0 || !isLetter(t[j-1])) {
			return u0, u1, j
		}
		j += size
		u1 = j
	}
	return u0, u1, j
}

// rangeSep returns the byte length of a range mark at t[i], or 0.
func rangeSep(t string, i int) int {
	if i >= len(t) {
		return 0
	}
	switch t[i] {
	case '-':
		return 1
	case '~':
		// a final "~" is the AC mark of "250 V~"
		if skipSpaces(t, i+1) == len(t) {
			return 0
		}
		return 1
	case '.':
		if i+1 < len(t) && t[i+1] == '.' {
			if i+2 < len(t) && t[i+2] == '.' {
				return 3
			}
			return 2
		}
		return 0
	case 't', 'T':
		if isWordTo(t, i) {
			return 2
		}
		return 0
	}
	r, size := decode(t, i)
	switch r {
	case '–', '—', '‒', '−', '…', '～':
		return size
	}
	return 0
}

// isWordTo reports whether t[i:] starts with the word "to" followed by a
// space, a digit or a sign.
func isWordTo(t string, i int) bool {
	if i+2 > len(t) || (t[i] != 't' && t[i] != 'T') || (t[i+1] != 'o' && t[i+1] != 'O') {
		return false
	}
	if i+2 == len(t) {
		return false
	}
	r, _ := decode(t, i+2)
	return isSpace(r) || startsNumber(t, i+2)
}

// startsNumber reports whether t[i:] begins with a digit, a decimal point
// before a digit, or a sign.
func startsNumber(t string, i int) bool {
	if i >= len(t) {
		return false
	}
	c := t[i]
	switch {
	case isDigit(c), c == '+':
		return true
	case c == '.', c == '-':
		return i+1 < len(t) && (isDigit(t[i+1]) || t[i+1] == '.')
	}
	r, _ := decode(t, i)
	return r == '±' || r == '∓'
}

// scanSign reads an optional sign at t[i].
func scanSign(t string, i int) (sign, int) {
	if i >= len(t) {
		return signNone, i
	}
	switch t[i] {
	case '+':
		if strings.HasPrefix(t[i+1:], "/-") {
			return signPM, i + 3
		}
		if i+1 < len(t) && t[i+1] == '-' {
			return signPM, i + 2
		}
		return signPlus, i + 1
	case '-':
		if strings.HasPrefix(t[i+1:], "/+") {
			return signPM, i + 3
		}
		return signMinus, i + 1
	}
	r, size := decode(t, i)
	switch r {
	case '±', '∓':
		return signPM, i + size
	case '−', '‐', '‒', '–', '﹣', '－':
		// Unicode minus, and dashes that word processors put for a minus,
		// when a digit follows.
		if i+size < len(t) && (isDigit(t[i+size]) || t[i+size] == '.') {
			return signMinus, i + size
		}
	}
	return signNone, i
}

// skipQualifier skips a leading comparison or approximation sign.
func skipQualifier(t string, i int) (int, bool) {
	if i >= len(t) {
		return i, false
	}
	switch t[i] {
	case '<', '>', '=':
		i++
		if i < len(t) && t[i] == '=' {
			i++
		}
		return skipSpaces(t, i), true
	case '~':
		return skipSpaces(t, i+1), true
	}
	r, size := decode(t, i)
	switch r {
	case '≤', '≥', '≈', '≦', '≧', '⩽', '⩾', '≲', '≳':
		return skipSpaces(t, i+size), true
	}
	return i, false
}

// isAbsent reports whether a trimmed cell is an absent marker.
func isAbsent(t string) bool {
	if len(t) == 0 {
		return true
	}
	if len(t) > 6 || isDigit(t[0]) {
		return false
	}
	switch t {
	case "-", "--", "---", "—", "–", "−", "?", "/":
		return true
	}
	for _, m := range absentWords {
		if strings.EqualFold(t, m) {
			return true
		}
	}
	return false
}

var absentWords = []string{"n/a", "#n/a", "na", "n.a.", "n.a", "none", "null", "nil", "-/-"}

func isDigit(c byte) bool  { return c >= '0' && c <= '9' }
func isLetter(c byte) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' }

// decode returns the rune at s[i] and its size, fast for ASCII.
func decode(s string, i int) (rune, int) {
	if c := s[i]; c < utf8.RuneSelf {
		return rune(c), 1
	}
	return utf8.DecodeRuneInString(s[i:])
}

// isSpace reports white space, including the no-break and thin spaces that
// spreadsheets and typesetting put between a number and its unit, and the
// zero-width space and byte-order mark that copy and paste leave behind.
func isSpace(r rune) bool {
	switch r {
	case ' ', '\t', '\n', '\r', '\v', '\f', 0x85, 0xA0, 0x2007, 0x2009, 0x200A, 0x200B, 0x202F, 0x205F, 0x3000, 0xFEFF:
		return true
	}
	return false
}

// isThousandsRune reports a character that only ever separates groups of
// thousands: apostrophe, right single quote, underscore and the no-break
// and thin spaces.
func isThousandsRune(r rune) bool {
	switch r {
	case '\'', '’', '_', 0xA0, 0x2007, 0x2009, 0x202F:
		return true
	}
	return false
}

func skipSpaces(s string, i int) int {
	for i < len(s) {
		r, size := decode(s, i)
		if !isSpace(r) {
			break
		}
		i += size
	}
	return i
}

// trimSpace trims isSpace characters from both ends.
func trimSpace(s string) string {
	s = s[skipSpaces(s, 0):]
	for len(s) > 0 {
		r, size := utf8.DecodeLastRuneInString(s)
		if !isSpace(r) {
			break
		}
		s = s[:len(s)-size]
	}
	return s
}
