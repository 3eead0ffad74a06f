package gen

import (
	"fmt"
	"math"

	"partsieve/catalog"
)

// gateDrive is a gate class: absolute maximum V_GS, maximum threshold, the
// drive of the main R_DS(on) rating and, optionally, a second rating at a
// lower drive with resistance ratio ratio2 (REFERENCE §3.2: ±20 V for
// standard parts, ±12 V or ±8 V for logic-level small parts; R_DS(on) is
// guaranteed only at the printed V_GS values).
type gateDrive struct {
	vgsMax, vth  float64 // V
	vgs1         float64 // V, drive of rdson
	vgs2, ratio2 float64 // V and rdson2/rdson; vgs2 0 = no second rating
	words        string
}

var (
	// standard gate: 10 V drive only, threshold up to 4 V
	stdGate = gateDrive{vgsMax: 20, vth: 4.0, vgs1: 10, words: "standard gate, rated at 10 V"}
	// standard V_GS range, also guaranteed at 4.5 V
	gate45 = gateDrive{vgsMax: 20, vth: 2.5, vgs1: 10, vgs2: 4.5, ratio2: 1.4, words: "rated at 10 V and 4.5 V gate drive"}
	// logic-level, ±12 V gate
	logic12 = gateDrive{vgsMax: 12, vth: 1.3, vgs1: 4.5, vgs2: 2.5, ratio2: 1.45, words: "logic-level gate, rated at 4.5 V and 2.5 V"}
	// low-threshold, ±8 V gate
	logic8 = gateDrive{vgsMax: 8, vth: 1.0, vgs1: 4.5, vgs2: 2.5, ratio2: 1.35, words: "low-threshold gate, rated at 4.5 V and 2.5 V, ±8 V max"}
)

// fetPkg holds package data: R_thJA on a 1 in² FR4 pad, R_thJC for power
// packages whose I_D is rated at 25 °C case (0 = I_D rated at 25 °C
// ambient), the package/bond-wire current limit and a price base (EUR at
// 1000+). Invented for demo.
type fetPkg struct {
	rthja, rthjc, idMax, price float64
	code                       string
}

var fetPkgs = map[string]fetPkg{
	"SOT-23":  {160, 0, 6, 0.04, "S"},
	"SOT-223": {60, 0, 10, 0.12, "G"},
	"SO-8":    {50, 0, 20, 0.15, "E"},
	"5x6 DFN": {40, 1.5, 100, 0.22, "Q"},
	"DPAK":    {50, 1.5, 90, 0.20, "D"},
	"D2PAK":   {40, 0.8, 120, 0.45, "K"},
	"TO-220":  {62, 1.0, 120, 0.40, "T"},
}

// fetFOM is the R_DS(on)·Q_G figure of merit of the invented N-channel
// trench process by V_DS class, mΩ·nC (invented for demo, typical levels);
// P-channel dies are pFOM times worse (hole mobility).
var fetFOM = map[float64]float64{20: 60, 30: 100, 40: 150, 60: 250, 80: 350, 100: 450}

const pFOM = 2.5

// rdsonAlpha is the R_DS(on) temperature coefficient, %/K (REFERENCE §3.1,
// exponential model, α = 0.4 %/K).
const rdsonAlpha = 0.4

type fetSpec struct {
	m     maker
	ch    string // "n" or "p"
	vds   float64
	pkg   string
	gate  gateDrive
	rdson float64 // Ω at gate.vgs1, 25 °C, maximum
	aecq  bool
	life  string // "" = active
}

// tjmax by maker: the power series are rated to 175 °C.
func fetTjmax(m maker) float64 {
	if m == tidemark {
		return 150
	}
	return 175
}

// P-channel parts have 2–3× the R_DS(on) of the N-channel part in the same
// package and voltage class (REFERENCE §3.3: N-channel is the lower-loss
// choice for a given size).
var fetSpecs = []fetSpec{
	// Tidemark Silicon: small-signal and logic-level parts
	{tidemark, "n", 20, "SOT-23", logic8, 0.030, false, ""},
	{tidemark, "n", 20, "SOT-23", logic12, 0.060, false, ""},
	{tidemark, "n", 20, "SO-8", logic12, 0.012, false, ""},
	{tidemark, "n", 30, "SOT-23", gate45, 0.035, false, ""},
	{tidemark, "n", 30, "SOT-23", logic12, 0.050, false, ""},
	{tidemark, "n", 30, "SO-8", gate45, 0.008, false, ""},
	{tidemark, "n", 30, "5x6 DFN", gate45, 0.003, false, ""},
	{tidemark, "n", 40, "5x6 DFN", gate45, 0.004, false, ""},
	{tidemark, "n", 60, "SOT-23", gate45, 0.300, false, ""},
	{tidemark, "n", 60, "SOT-23", gate45, 0.120, false, ""},
	{tidemark, "n", 100, "SOT-23", gate45, 0.280, false, "nrnd"},
	{tidemark, "p", 20, "SOT-23", logic8, 0.060, false, ""},
	{tidemark, "p", 20, "SOT-23", logic12, 0.120, false, ""},
	{tidemark, "p", 20, "SO-8", logic12, 0.025, false, ""},
	{tidemark, "p", 20, "5x6 DFN", logic12, 0.010, false, ""},
	{tidemark, "p", 30, "SOT-23", gate45, 0.080, false, ""},
	{tidemark, "p", 30, "SOT-23", logic12, 0.110, false, ""},
	{tidemark, "p", 30, "SO-8", gate45, 0.020, false, ""},
	{tidemark, "p", 30, "5x6 DFN", gate45, 0.009, false, ""},
	{tidemark, "p", 60, "SOT-23", gate45, 0.300, false, ""},
	// Ferrowind Power: power packages, many 10 V-only gates
	{ferrowind, "n", 40, "DPAK", stdGate, 0.006, true, ""},
	{ferrowind, "n", 40, "D2PAK", stdGate, 0.003, false, ""},
	{ferrowind, "n", 60, "TO-220", stdGate, 0.008, false, ""},
	{ferrowind, "n", 60, "DPAK", gate45, 0.015, true, ""},
	{ferrowind, "n", 60, "SO-8", gate45, 0.025, false, ""},
	{ferrowind, "n", 60, "SOT-223", gate45, 0.060, false, ""},
	{ferrowind, "n", 80, "5x6 DFN", gate45, 0.009, false, ""},
	{ferrowind, "n", 100, "TO-220", stdGate, 0.012, false, ""},
	{ferrowind, "n", 100, "DPAK", stdGate, 0.040, false, ""},
	{ferrowind, "n", 100, "D2PAK", stdGate, 0.007, false, ""},
	{ferrowind, "n", 100, "SOT-223", gate45, 0.180, false, ""},
	{ferrowind, "p", 40, "DPAK", gate45, 0.015, true, ""},
	{ferrowind, "p", 40, "SO-8", gate45, 0.022, false, ""},
	{ferrowind, "p", 40, "D2PAK", stdGate, 0.008, false, ""},
	{ferrowind, "p", 60, "DPAK", gate45, 0.045, true, ""},
	{ferrowind, "p", 60, "TO-220", stdGate, 0.025, false, ""},
	{ferrowind, "p", 60, "SO-8", gate45, 0.065, false, ""},
	{ferrowind, "p", 60, "SOT-223", gate45, 0.150, false, ""},
	{ferrowind, "p", 100, "DPAK", stdGate, 0.120, false, ""},
	{ferrowind, "p", 100, "TO-220", stdGate, 0.035, false, "obsolete"},
	// Velmora Semiconductor: automotive-qualified series
	{velmora, "n", 40, "5x6 DFN", gate45, 0.005, true, ""},
	{velmora, "n", 60, "5x6 DFN", gate45, 0.006, true, ""},
	{velmora, "n", 60, "DPAK", gate45, 0.010, true, ""},
	{velmora, "n", 60, "SO-8", gate45, 0.014, true, ""},
	{velmora, "n", 60, "SOT-23", gate45, 0.200, true, ""},
	{velmora, "n", 30, "SOT-23", logic12, 0.045, true, "nrnd"},
	{velmora, "n", 40, "TO-220", stdGate, 0.020, true, "obsolete"},
	{velmora, "p", 40, "5x6 DFN", gate45, 0.012, true, ""},
	{velmora, "p", 60, "5x6 DFN", gate45, 0.016, true, ""},
	{velmora, "p", 60, "DPAK", gate45, 0.025, true, ""},
	{velmora, "p", 60, "SO-8", gate45, 0.040, true, ""},
	{velmora, "p", 60, "SOT-23", gate45, 0.300, true, ""},
	{velmora, "p", 30, "SOT-223", gate45, 0.050, true, "nrnd"},
}

func fetMPN(s fetSpec) string {
	ch := map[string]string{"n": "N", "p": "P"}[s.ch]
	code := fetPkgs[s.pkg].code
	mohm := int(math.Round(s.rdson * 1000))
	switch s.m {
	case tidemark:
		return fmt.Sprintf("TDM%s%d-%d%s", ch, int(s.vds), mohm, code)
	case ferrowind:
		return fmt.Sprintf("FW%s%d%s%02d", ch, int(s.vds), code, mohm)
	}
	return fmt.Sprintf("VLM%s%d-%d%s-A", ch, int(s.vds), mohm, code)
}

func mosfets() []catalog.Part {
	var out []catalog.Part
	for _, s := range fetSpecs {
		pk := fetPkgs[s.pkg]
		tjmax := fetTjmax(s.m)
		chWord := map[string]string{"n": "N-channel", "p": "P-channel"}[s.ch]
		desc := fmt.Sprintf("%s enhancement MOSFET %s V, %s mΩ at %s V, %s, %s",
			chWord, g(s.vds), g(roundSig(s.rdson*1000, 3)), g(s.gate.vgs1), s.gate.words, s.pkg)
		if s.aecq {
			desc += ", AEC-Q101"
		}
		p := newPart(catalog.MOSFET, s.ch, s.m, fetMPN(s), s.pkg, desc, s.aecq)
		if s.life != "" {
			setLife(&p, s.life)
		} else {
			setLife(&p, "active")
		}
		// Continuous I_D: the current whose conduction loss I²·R_DS(on)(T_jmax)
		// brings the junction to T_jmax, I_D = √((T_jmax − 25)/(R_th·R(T_jmax))),
		// with R(T) = R(25)·(1 + α/100)^(T − 25) (REFERENCE §3.1, §3.5) and
		// R_th = R_thJC (25 °C case) for power packages, R_thJA (25 °C
		// ambient) for small ones; limited by the package; rounded down.
		rth := pk.rthjc
		if rth == 0 {
			rth = pk.rthja
		}
		rHot := s.rdson * math.Pow(1+rdsonAlpha/100, tjmax-25)
		id := math.Min(pk.idMax, math.Sqrt((tjmax-25)/(rth*rHot)))
		if id < 10 {
			id = floorStep(id, 0.1)
		} else {
			id = math.Floor(id)
		}
		fom := fetFOM[s.vds]
		if s.ch == "p" {
			fom *= pFOM
		}
		vals := map[string]float64{
			"tjmax": tjmax, "rthja": pk.rthja,
			// P_D at 25 °C ambient on the R_thJA board: (T_jmax − 25)/R_thJA
			"pd":      roundStep((tjmax-25)/pk.rthja, 0.01),
			"vds":     s.vds,
			"vgs_max": s.gate.vgsMax, "vgs_th": s.gate.vth,
			"rdson": s.rdson, "rdson_vgs": s.gate.vgs1,
			"id": id,
			// Q_G = FOM / R_DS(on), 2 significant digits, in coulomb
			"qg": roundSig(fom/(s.rdson*1000), 2) * 1e-9,
		}
		if s.gate.vgs2 > 0 {
			ratio := s.gate.ratio2
			if s.ch == "p" {
				ratio *= 1.1 // P-channel channel share of R_DS(on) is larger
			}
			vals["rdson2"] = roundSig(s.rdson*ratio, 2)
			vals["rdson2_vgs"] = s.gate.vgs2
		}
		set(&p, vals)
		// price, EUR at 1000+: package base, lower R_DS(on) and higher V_DS
		// cost die area; P-channel and AEC-Q101 add a premium (invented)
		base := pk.price * (1 + 0.5*math.Sqrt(0.010/s.rdson)) * (1 + s.vds/200)
		if s.ch == "p" {
			base *= 1.3
		}
		if s.aecq {
			base *= 1.3
		}
		addOffers(&p, base)
		out = append(out, p)
	}
	return out
}
