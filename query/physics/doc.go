// Package physics holds the device models that partsieve uses to judge a
// reverse-polarity protection part at an operating point: diode forward
// voltage and conduction loss, junction temperature by fixed-point
// iteration with thermal-runaway detection, Schottky reverse leakage,
// MOSFET on-resistance versus temperature and gate drive, surge I²t,
// fuse selection rules and time gates, and the Zener gate clamp of a
// high-side P-MOSFET stage.
//
// The package is pure: no database, no I/O, no globals that change. Every
// function takes plain float64 values in base SI units (V, A, W, Ω, K/W,
// A²s, s); temperatures are in °C unless a name says kelvin, and every
// exponential uses kelvin where physics needs it. The hot functions
// (ForwardModel.VF, SolveTj with the provided heaters) do not allocate,
// because pick calls them for every catalog part.
//
// # Sources and confidence tags
//
// Formulas and constants cite the sources collected in the project's
// engineering reference (REFERENCE.md), by name: "ST AN604" (Calculation of
// conduction losses in a power rectifier), "Infineon AN (Graovac et al.
// 2006) §2.1.1" (MOSFET power losses from datasheet parameters), "Tremaine
// 2008" (Schottky diode thermal runaway), "SI 2019" (SI Brochure, 9th ed.,
// exact k and q), "Littelfuse" (fuseology and pulse-derating guidance),
// "UL 248-14", "IEC 60127-2", the JEDEC JESD51 family, and so on. Every
// number carries a confidence tag as in REFERENCE.md:
//
//	[V] confirmed in the cited source
//	[D] derived by shown arithmetic from [V] inputs
//	[M] from memory, not confirmed: a default the user must be able to override
//
// A value without any source is marked "from memory"; a tool choice made
// here (not taken from a source) is said to be one.
//
// # Typical versus guaranteed
//
// Datasheet V_F,max and R_DS(on),max are guaranteed at their test
// conditions; temperature coefficients, leakage slopes, rerating curves and
// pulse factors are typical. The models combine "maximum at the test point"
// with "typical factor" (the Infineon AN approach) and the callers should
// say so in their output.
package physics
