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

// AllDims lists every dimension in declaration order.
func AllDims() []Dim {
	return []Dim{None, Voltage, Current, Power, Resistance, Temperature, ThermalRes, I2t, Charge, Time, Fraction}
}

// valid reports whether d is one of the declared dimensions.
func (d Dim) valid() bool { return d >= None && d <= Fraction }

// Example is a short value of dimension d as a user would type it, for help
// texts and error messages ("12 V", "45 mΩ", "150 °C").
func (d Dim) Example() string {
	switch d {
	case Voltage:
		return "12 V"
	case Current:
		return "3.2 A"
	case Power:
		return "500 mW"
	case Resistance:
		return "45 mΩ"
	case Temperature:
		return "150 °C"
	case ThermalRes:
		return "62.5 K/W"
	case I2t:
		return "1.5 A²s"
	case Charge:
		return "25 nC"
	case Time:
		return "8.3 ms"
	case Fraction:
		return "5 %"
	}
	return "2500"
}

// phrase names the dimension with its article for messages ("a voltage",
// "an I²t", "a plain number").
func (d Dim) phrase() string {
	switch d {
	case None:
		return "a plain number"
	case I2t:
		return "an I²t"
	}
	if d.valid() {
		return "a " + d.String()
	}
	return "an unknown dimension"
}

// String names the pick ("magnitude", "upper", "lower", "signed").
func (p Pick) String() string {
	switch p {
	case Magnitude:
		return "magnitude"
	case Upper:
		return "upper"
	case Lower:
		return "lower"
	case Signed:
		return "signed"
	}
	return "unknown pick"
}
