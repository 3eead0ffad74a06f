package physics

// Physical constants of the SI 2019 revision (SI Brochure, 9th ed. 2019;
// CODATA 2018). Both are exact by definition [V].
const (
	// Boltzmann is the Boltzmann constant k in J/K (exact) [V SI 2019].
	Boltzmann = 1.380649e-23
	// ElementaryCharge is the elementary charge q in C (exact) [V SI 2019].
	ElementaryCharge = 1.602176634e-19
	// BoltzmannOverQ is k/q in V/K, ≈ 8.617333262e-5 V/K [D].
	BoltzmannOverQ = Boltzmann / ElementaryCharge
	// ZeroCelsius is 0 °C in kelvin (exact by definition of the Celsius scale).
	ZeroCelsius = 273.15
	// TRoom is the reference temperature of datasheet ratings, 25 °C.
	TRoom = 25.0
)

// Kelvin converts a temperature in °C to kelvin: T_K = T_°C + 273.15 (exact).
func Kelvin(celsius float64) float64 { return celsius + ZeroCelsius }

// Celsius converts a temperature in kelvin to °C: T_°C = T_K − 273.15.
func Celsius(kelvin float64) float64 { return kelvin - ZeroCelsius }

// ThermalVoltage returns V_T = k·T/q in volts for an absolute temperature
// in kelvin, from the exact SI 2019 constants [D]:
//
//	V_T(298.15 K) = 25.6926 mV,  V_T(300.15 K) = 25.865 mV,  V_T(398.15 K) = 34.310 mV
//
// Domain: T > 0 K; a non-positive T gives a non-positive result (caller error).
// Source: SI 2019 (REFERENCE §1.1).
func ThermalVoltage(kelvin float64) float64 { return BoltzmannOverQ * kelvin }

// ThermalVoltageC is ThermalVoltage for a temperature in °C.
func ThermalVoltageC(celsius float64) float64 { return BoltzmannOverQ * (celsius + ZeroCelsius) }

// VoltsPerDecade returns the shift of the ideal junction voltage for a
// tenfold change of current, n·V_T·ln 10, in volts, for ideality factor n
// at junction temperature tj (°C). At n = 1 and 25 °C it is 59.159 mV [D]
// (REFERENCE §1.2(a), check value 2).
func VoltsPerDecade(n, tj float64) float64 { return n * ThermalVoltageC(tj) * ln10 }

const ln10 = 2.302585092994046
