// Package units parses and formats engineering values: a number with an
// optional SI prefix and unit symbol, as written in supplier spreadsheets
// ("4R7", "45 mΩ", "0,33 A", "±20 V", "-55 to 150 °C").
//
// Every value is returned in the base SI unit of its dimension (V, A, W, Ω,
// K/W, A²s, C, s), except temperature, which is returned in degrees Celsius
// because every datasheet and standard in the trade states junction and
// ambient temperatures in °C. Fractions are returned as plain ratios
// (5 % is 0.05).
//
// # Numbers
//
// A number is an optional sign, digits with an optional decimal mark, and an
// optional exponent ("2.5e+2", "1E3"). Signs: "+", "-", "−" (U+2212), and
// "±", "+/-", "+-" for a symmetric value. The decimal mark is resolved as
// follows, because European sheets write a decimal comma:
//
//   - one comma and no dot: the comma is the decimal mark ("0,33" is 0.33,
//     and "1,000" is 1.0, not a thousand). Exception: in a None field
//     (counts, quantities) "1,000" and "12,500" are thousands, since counts
//     are written that way; "0,5" stays 0.5 there too.
//   - both a comma and a dot: the one written last is the decimal mark, the
//     other separates thousands ("1,234.5" and "1.234,5" are both 1234.5).
//   - the same mark twice or more: thousands ("1,234,567", "1.234.567").
//   - an apostrophe ("1'234"), right single quote, underscore, no-break space
//     U+00A0, narrow no-break space U+202F, thin space U+2009 or figure space
//     U+2007 between digits always separates thousands. A plain ASCII space
//     does not ("1 000" is two numbers and an error).
//
// Thousands groups must have exactly three digits after a separator and one
// to three before the first one; anything else is an error.
//
// In a resistance field the letters R, k, K, M, G and m may stand in for the
// decimal mark, as in the IEC 60062 letter code: "4R7" is 4.7 Ω, "R047" is
// 0.047 Ω, "4k7" is 4.7 kΩ, "2M2" is 2.2 MΩ, "4m7" is 4.7 mΩ. "10R" is 10 Ω
// and "10K" is 10 kΩ.
//
// A leading comparison or approximation sign ("<", ">", "≤", "≥", "<=",
// ">=", "≈", "~") is dropped: "<1 µA" is read as 1 µA, the bound itself.
//
// # Units
//
// SI prefixes p n u µ (U+00B5) μ (U+03BC) m k M G; "K" is also accepted as
// kilo in front of a unit ("KV", "KOhm") and alone in resistance and count
// fields. Unit symbols and words (words are case-insensitive):
//
//	voltage      V, volt(s), with AC/DC marks: VDC, Vdc, V DC, VAC, Vrms, V~
//	current      A, amp(s), ampere(s) (also ADC, Arms)
//	power        W, watt(s)
//	resistance   Ω (U+2126 or U+03A9), ohm(s), Ohm, mOhm, kOhm, MOhm, R,
//	             milliohm, kilohm, megohm
//	temperature  °C, ºC, ℃, degC, deg C, C, K (kelvin: x − 273.15),
//	             °F, degF ((x − 32)·5/9)
//	thermal res. K/W, °C/W, ºC/W, C/W, degC/W (K/W and °C/W are the same size)
//	I²t          A²s, A2s, A^2s, A²·s, A^2 s (no prefix: "kA²s" is ambiguous)
//	charge       C, nC, pC, µC, coulomb(s) (only in a charge field may a bare
//	             "C" be a coulomb; in a temperature field it is °C)
//	time         s, sec, second(s), ms, µs, us, min (60 s), h, hr (3600 s)
//	fraction     %, percent, ‰, ppm
//	none         pcs, pc, pce, piece(s), ea, and a k, K, M or G suffix
//	             ("2.5k" is 2500)
//
// A bare prefix stands for the field's base unit, so "20m" in a resistance
// field is 20 mΩ and "1.5k" in a voltage field is 1.5 kV; a bare "m" is
// refused in a time field (milli or minute?) and bare prefixes are refused
// for temperature, thermal resistance, I²t and fractions.
//
// A value with no unit takes the column header's unit (ParseWith), else the
// base unit. A unit in the cell wins over the header unit. In a fraction
// field a bare number with no header unit is a ratio and must lie within
// [−1, 1]: "5" is refused with a hint to write "5 %" or "0.05".
//
// # Ranges and signed values
//
// A range is two values joined by "to", "...", "..", "…", "~", "-", "–"
// (en dash), "—" (em dash) or "−": "-55 to 150 °C", "-55...150",
// "−55 – +150 °C", "-40~125", "1-2.5 V". The unit may be written on both
// ends ("500 mV to 2 V") or after the last one only, and then applies to
// both; a unit on the first end only ("500 mV to 2") is refused as
// ambiguous. Pick says which number the field takes: the largest magnitude,
// the upper or the lower end, or a single signed value. A "±" value is the
// range from −x to +x.
//
// # Refusals
//
// Absent markers give ErrEmpty: "", "-", "--", "---", "—", "–", "−", "/",
// "-/-", "?", and in any letter case "N/A", "#N/A", "NA", "n.a.", "none",
// "null", "nil". Everything else that is not a
// value gives an *Error with a readable reason: garbage, two numbers, an
// unknown unit, a unit of the wrong dimension, NaN or infinity, magnitudes
// above 1e15 or below 1e-30 (other than zero) in base units, and
// temperatures below absolute zero. No input makes the parser panic.
//
// # Formatting
//
// Format writes a value back in engineering notation with three significant
// digits ("45 mΩ", "12.5 µA", "1.5 kV"); temperatures, thermal resistances,
// I²t and counts are written without prefixes, times of a second and more in
// plain seconds, fractions in % (or ppm below 0.01 %). Parse reads every
// string Format writes, back to within the rounding of the last digit.
package units
