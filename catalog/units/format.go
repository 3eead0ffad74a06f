package units

import (
	"math"
	"strconv"
)

// Format writes v (base SI units, °C for temperature, a ratio for a
// fraction) in engineering notation with 3 significant digits, trailing
// zeros trimmed, and the unit symbol: 0.045 Ω gives "45 mΩ", 3.2 A gives
// "3.2 A", 1.25e-5 A gives "12.5 µA", 150 °C gives "150 °C", 0.05 gives
// "5 %". It is FormatSig(v, d, 3); Parse reads the result back.
func Format(v float64, d Dim) string { return FormatSig(v, d, 3) }

// FormatSig is Format with sig significant digits (1 to 17). Prefixes
// p, n, µ (U+00B5), m, k, M, G are used for voltage, current, power,
// resistance and charge; times below a second take p to m, times from a
// second up are written in seconds. Temperatures, thermal resistances, I²t
// and plain numbers have no prefix. A fraction is written in % (in ppm
// below 0.01 %). Values too small or too large for the prefixes are written
// with an exponent ("1.5e-20 A"). Negative values start with an ASCII "-";
// NaN and infinities are written as "NaN" and "+Inf"/"-Inf".
func FormatSig(v float64, d Dim, sig int) string {
	sig = min(max(sig, 1), 17)
	sym := d.Symbol()
	var buf [64]byte
	b := buf[:0]
	if math.IsNaN(v) || math.IsInf(v, 0) {
		b = strconv.AppendFloat(b, v, 'g', -1, 64)
		return string(appendSym(b, "", sym))
	}
	lo, hi := 0, 0 // allowed engineering exponents
	switch d {
	case Temperature:
		// Keep the rounded value at or above absolute zero, so that Parse
		// accepts it: -273.15 °C with one digit would be "-300 °C".
		for sig < 17 && v < absZeroC+100 && roundSig(v, sig) < absZeroC {
			sig++
		}
	case Voltage, Current, Power, Resistance, Charge:
		lo, hi = -12, 9
	case Time:
		lo, hi = -12, 0
	case Fraction:
		if x := v * 100; x == 0 || math.Abs(x) >= 0.01 {
			v = x
		} else {
			v, sym = v*1e6, "ppm"
		}
	}
	b, pfx := appendEng(b, v, sig, lo, hi)
	return string(appendSym(b, pfx, sym))
}

func appendSym(b []byte, pfx, sym string) []byte {
	if pfx == "" && sym == "" {
		return b
	}
	b = append(b, ' ')
	b = append(b, pfx...)
	return append(b, sym...)
}

// prefixSymbol is the SI prefix symbol for an engineering exponent.
func prefixSymbol(e int) string {
	switch e {
	case -12:
		return "p"
	case -9:
		return "n"
	case -6:
		return "µ"
	case -3:
		return "m"
	case 3:
		return "k"
	case 6:
		return "M"
	case 9:
		return "G"
	}
	return ""
}

// appendEng appends |v| rounded to sig significant digits, scaled by the
// engineering exponent in [lo, hi] nearest below its decimal exponent, and
// returns the prefix symbol of that exponent. Plain decimals are written
// while the scaled value stays within 1e-7 ≤ x < 1e15, else an exponent.
func appendEng(b []byte, v float64, sig, lo, hi int) ([]byte, string) {
	if v == 0 {
		return append(b, '0'), ""
	}
	if v < 0 {
		b = append(b, '-')
		v = -v
	}
	// Round through the shortest exact decimal form: "d.ddde±XX".
	var tmp [32]byte
	e := strconv.AppendFloat(tmp[:0], v, 'e', sig-1, 64)
	var digits [17]byte
	nd := 0
	k := 0
	for ; k < len(e) && e[k] != 'e'; k++ {
		if e[k] != '.' {
			digits[nd] = e[k]
			nd++
		}
	}
	exp, _ := strconv.Atoi(string(e[k+1:]))
	// Trim trailing zeros of the significand.
	for nd > 1 && digits[nd-1] == '0' {
		nd--
	}
	eng := floorDiv(exp, 3) * 3
	eng = min(max(eng, lo), hi)
	shift := exp - eng // decimal exponent of the first digit after scaling
	if shift < -7 || shift >= 15 {
		b = append(b, digits[0])
		if nd > 1 {
			b = append(b, '.')
			b = append(b, digits[1:nd]...)
		}
		b = append(b, 'e')
		b = strconv.AppendInt(b, int64(exp), 10)
		return b, ""
	}
	switch {
	case shift < 0:
		b = append(b, '0', '.')
		for i := 0; i < -shift-1; i++ {
			b = append(b, '0')
		}
		b = append(b, digits[:nd]...)
	case shift+1 >= nd:
		b = append(b, digits[:nd]...)
		for i := nd; i < shift+1; i++ {
			b = append(b, '0')
		}
	default:
		b = append(b, digits[:shift+1]...)
		b = append(b, '.')
		b = append(b, digits[shift+1:nd]...)
	}
	return b, prefixSymbol(eng)
}

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && (a < 0) != (b < 0) {
		q--
	}
	return q
}

// roundSig rounds v to sig significant decimal digits.
func roundSig(v float64, sig int) float64 {
	var tmp [32]byte
	r, _ := strconv.ParseFloat(string(strconv.AppendFloat(tmp[:0], v, 'e', sig-1, 64)), 64)
	return r
}
