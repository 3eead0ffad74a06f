// Package units parses and formats engineering values: a number with an
// optional SI prefix and unit symbol, as written in supplier spreadsheets
// ("4R7", "45 mΩ", "0,33 A", "±20 V", "-55 to 150 °C").
//
// Every value is returned in the base SI unit of its dimension (V, A, W, Ω,
// K/W, A²s, C, s), except temperature, which is returned in degrees Celsius
// because every datasheet and standard in the trade states junction and
// ambient temperatures in °C.
package units

// Dim is the physical dimension a field expects. Parsing is directed by the
// dimension: "C" means degrees Celsius in a temperature field and coulomb in
// a charge field, "R" is the decimal mark of "4R7" only in a resistance field.
type Dim int

// Dimensions known to partsieve.
const (
	None        Dim = iota // dimensionless number (counts, quantities, factors)
	Voltage                // V
	Current                // A
	Power                  // W
	Resistance             // Ω
	Temperature            // °C (kelvin input is converted)
	ThermalRes             // K/W (°C/W accepted, same size)
	I2t                    // A²s
	Charge                 // C
	Time                   // s
	Fraction               // 1 (a "%" input is divided by 100)
)

// Symbol is the display symbol of the base unit of d ("" for None).
func (d Dim) Symbol() string {
	switch d {
	case Voltage:
		return "V"
	case Current:
		return "A"
	case Power:
		return "W"
	case Resistance:
		return "Ω"
	case Temperature:
		return "°C"
	case ThermalRes:
		return "K/W"
	case I2t:
		return "A²s"
	case Charge:
		return "C"
	case Time:
		return "s"
	case Fraction:
		return "%"
	}
	return ""
}

// String names the dimension for messages ("voltage", "current", ...).
func (d Dim) String() string {
	switch d {
	case Voltage:
		return "voltage"
	case Current:
		return "current"
	case Power:
		return "power"
	case Resistance:
		return "resistance"
	case Temperature:
		return "temperature"
	case ThermalRes:
		return "thermal resistance"
	case I2t:
		return "I²t"
	case Charge:
		return "charge"
	case Time:
		return "time"
	case Fraction:
		return "fraction"
	}
	return "number"
}

// Pick says which number a field takes from a signed value or a range.
type Pick int

const (
	// Magnitude takes |x| of a single value and the largest magnitude of a
	// range or "±" value. Used for ratings such as V_DS, V_GS(max) or
	// P-channel voltages written negative.
	Magnitude Pick = iota
	// Upper takes the upper end of a range ("-55 to 150 °C" gives 150),
	// a single value is kept with its sign. Used for T_j(max).
	Upper
	// Lower takes the lower end of a range, a single value keeps its sign.
	Lower
	// Signed keeps a single value with its sign; a range is an error.
	Signed
)
