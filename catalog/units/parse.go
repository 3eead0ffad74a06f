package units

import "errors"

// Error explains why a value could not be parsed.
type Error struct {
	Input  string // the raw text
	Reason string // e.g. `unit "A" is a current, this field wants a voltage`
}

func (e *Error) Error() string { return e.Reason + " (got " + quote(e.Input) + ")" }

func quote(s string) string { return "\"" + s + "\"" }

// ErrEmpty is returned for a cell that means "absent": "", "-", "—", "N/A".
var ErrEmpty = errors.New("empty")

// Parse reads s as a value of dimension d and returns it in base SI units
// (°C for temperature). pick says which number of a signed value or range
// the field needs. Absent markers return ErrEmpty.
// TODO(units helper): implement.
func Parse(s string, d Dim, pick Pick) (float64, error) {
	return ParseWith(s, d, pick, "")
}

// ParseWith is Parse with a default unit taken from the column header
// ("mΩ" from "R_DS(on) (mΩ)"); it applies when the cell has no unit.
func ParseWith(s string, d Dim, pick Pick, headerUnit string) (float64, error) {
	return 0, &Error{Input: s, Reason: "not implemented"}
}

// SplitHeaderUnit finds a unit written in a column header, in parentheses
// or brackets ("(mΩ)", "[V]", "in A") and returns the header without it and
// the unit text. ok is false when the header holds no recognisable unit.
func SplitHeaderUnit(header string) (rest, unit string, ok bool) {
	return header, "", false
}

// UnitDim returns the dimensions a unit text can mean ("C" can be charge or
// temperature, "mΩ" only resistance). It returns nil for an unknown unit.
func UnitDim(unit string) []Dim { return nil }

// Format writes v (base SI units, °C for temperature) in engineering
// notation with 3 significant digits and the unit symbol: 0.045 Ω gives
// "45 mΩ", 3.2 A gives "3.2 A", 150 °C gives "150 °C".
func Format(v float64, d Dim) string { return "" }
