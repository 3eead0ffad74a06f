package gen

import (
	"fmt"
	"math"

	"partsieve/catalog"
)

// diodeRthJA is the junction-to-ambient thermal resistance (K/W) used for
// rectifier, Schottky and TVS packages: minimum recommended pad on FR4, or
// 10 mm leads for axial packages. Invented for demo; real values depend on
// the test board (REFERENCE §1.5, JESD51-2A/-7).
var diodeRthJA = map[string]float64{
	"SOD-123":  200,
	"SOD-123F": 150,
	"SMA":      90,
	"SMB":      70,
	"SMC":      55,
	"DO-41":    80,
	"DO-15":    65,
	"DO-201":   45,
	"DPAK":     60,
	"D2PAK":    45,
	"TO-220":   60,
}

// diodeCode is the package letter code used in invented diode part numbers.
var diodeCode = map[string]string{
	"SOD-123": "S2", "SOD-123F": "SF", "SOD-323": "S3", "SMA": "A", "SMB": "B", "SMC": "C",
	"DO-41": "L", "DO-15": "M", "DO-201": "P", "DPAK": "D", "D2PAK": "K", "TO-220": "T",
}

// pkgWords adds "axial" to through-hole axial packages in descriptions.
func pkgWords(pkg string) string {
	switch pkg {
	case "DO-41", "DO-15", "DO-201":
		return pkg + " axial"
	}
	return pkg
}

// Surge pulse conventions (REFERENCE §2.1): 8.3 ms half sine (60 Hz,
// "JEDEC method") or 10 ms half sine (50 Hz, IEC style).
const (
	surge83ms = 0.0083
	surge10ms = 0.01
)

// group is a set of voltage ratings sharing current rating and package.
type group struct {
	amps  float64
	pkg   string
	volts []float64
}

// rectFamily is one invented silicon-rectifier series.
type rectFamily struct {
	m      maker
	rec    byte    // 'G' general purpose, 'F' fast recovery, 'U' ultrafast recovery
	tsurge float64 // ifsm_t, s
	tjmax  float64 // °C
	ir2Tj  float64 // °C, second leakage point
	aecq   bool
	groups []group
	mpn    func(rec byte, amps, volts float64, code string) string
}

func corvaneRect(rec byte, amps, volts float64, code string) string {
	return fmt.Sprintf("CVR%d%c-%d%s", int(amps*10), rec, int(volts), code)
}

func halvardRect(rec byte, amps, volts float64, code string) string {
	return fmt.Sprintf("HLX%c%dV%d-%s", rec, int(amps*10), int(volts/10), code)
}

var rectFamilies = []rectFamily{
	{m: corvane, rec: 'G', tsurge: surge83ms, tjmax: 150, ir2Tj: 100, mpn: corvaneRect, groups: []group{
		{1, "DO-41", []float64{50, 100, 200, 400, 600, 800, 1000}},
		{1, "SMA", []float64{400, 1000}},
		{1, "SOD-123F", []float64{600}},
		{2, "SMB", []float64{200, 600, 1000}},
		{3, "DO-201", []float64{100, 400, 1000}},
		{3, "SMC", []float64{600}},
		{5, "DO-201", []float64{200, 800}},
		{6, "TO-220", []float64{600}},
	}},
	{m: corvane, rec: 'F', tsurge: surge83ms, tjmax: 150, ir2Tj: 100, mpn: corvaneRect, groups: []group{
		{1, "DO-41", []float64{200, 400, 600, 1000}},
		{1.5, "SMA", []float64{400}},
		{2, "SMB", []float64{600}},
		{3, "SMC", []float64{400, 1000}},
	}},
	{m: halvard, rec: 'U', tsurge: surge10ms, tjmax: 175, ir2Tj: 125, aecq: true, mpn: halvardRect, groups: []group{
		{1, "SMA", []float64{200, 400, 600}},
		{1, "SOD-123F", []float64{200}},
		{2, "SMB", []float64{200, 600}},
		{3, "SMC", []float64{400, 600}},
		{5, "DPAK", []float64{200, 600}},
		{6, "TO-220", []float64{400, 600}},
	}},
	{m: halvard, rec: 'F', tsurge: surge10ms, tjmax: 150, ir2Tj: 125, mpn: halvardRect, groups: []group{
		{1.5, "DO-41", []float64{600}},
		{2, "DO-15", []float64{800}},
	}},
}

// Temperature behaviour of silicon PN rectifiers.
const (
	// pnVFTempCo is dV_F/dT at constant current: −2 mV/K (REFERENCE §1.3,
	// silicon PN at low/moderate current density).
	pnVFTempCo = -0.002
	// pnLeakDoubling is the leakage doubling interval of the maximum I_R
	// values of PN rectifiers, 23 K, so that 25 → 100 °C multiplies I_R by
	// about 10 (invented for demo; REFERENCE §1.4 gives 8–11 K for
	// Schottky barriers, PN datasheet maxima rise more slowly).
	pnLeakDoubling = 23.0
	// vf2Tj is the junction temperature of the second V_F point, °C.
	vf2Tj = 125.0
)

// rectVF is the maximum V_F at I_F(AV), 25 °C, by recovery class (invented
// for demo, typical datasheet levels): faster recovery (gold/platinum
// lifetime control) costs forward drop, more so at higher voltage.
func rectVF(rec byte, amps, volts float64) float64 {
	switch rec {
	case 'F':
		if volts < 600 {
			return 1.2
		}
		return 1.3
	case 'U':
		switch {
		case volts <= 200:
			return 0.95
		case volts <= 400:
			return 1.25
		}
		return 1.7
	}
	switch {
	case amps <= 1.5:
		return 1.0
	case amps <= 3:
		return 1.05
	}
	return 1.1
}

// rectTrr is the maximum reverse-recovery time quoted in descriptions, ns.
func rectTrr(rec byte, volts float64) int {
	if rec == 'U' {
		switch {
		case volts <= 200:
			return 35
		case volts <= 400:
			return 50
		}
		return 75
	}
	switch {
	case volts <= 400:
		return 150
	case volts <= 800:
		return 250
	}
	return 500
}

// rectIR is the maximum I_R at V_RRM, 25 °C (invented for demo).
func rectIR(rec byte, amps float64) float64 {
	if rec == 'U' {
		switch {
		case amps <= 1:
			return 2e-6
		case amps <= 3:
			return 5e-6
		}
		return 10e-6
	}
	if amps <= 2 {
		return 5e-6
	}
	return 10e-6
}

// surgeFromAvg is the I_FSM of a die rated for I_F(AV) = amps:
// k·30·I^exp rounded to 5 A, at least 10 A. PN rectifiers use exp 1.05
// (30 A at 1 A, 160 A at 5 A), Schottky dies exp 0.9 (invented for demo
// from typical ratings).
func surgeFromAvg(amps, exp, k float64) float64 {
	return math.Max(10, roundStep(k*30*math.Pow(amps, exp), 5))
}

// leak scales a leakage current from 25 °C to tj with doubling interval dbl
// (REFERENCE §1.4: I_R(T) = I_R(T0)·2^((T−T0)/ΔT₂)), 2 significant digits.
func leak(ir25, tj, dbl float64) float64 {
	return roundSig(ir25*math.Pow(2, (tj-25)/dbl), 2)
}

func rectifiers() []catalog.Part {
	var out []catalog.Part
	for _, f := range rectFamilies {
		for _, gr := range f.groups {
			for _, v := range gr.volts {
				mpn := f.mpn(f.rec, gr.amps, v, diodeCode[gr.pkg])
				var desc string
				switch f.rec {
				case 'G':
					desc = fmt.Sprintf("General-purpose silicon rectifier %s A %s V, %s", g(gr.amps), g(v), pkgWords(gr.pkg))
				case 'F':
					desc = fmt.Sprintf("Fast-recovery silicon rectifier %s A %s V, trr max %d ns, %s", g(gr.amps), g(v), rectTrr(f.rec, v), pkgWords(gr.pkg))
				default:
					desc = fmt.Sprintf("Ultrafast-recovery rectifier %s A %s V, trr max %d ns, %s", g(gr.amps), g(v), rectTrr(f.rec, v), pkgWords(gr.pkg))
				}
				if f.aecq {
					desc += ", AEC-Q101"
				}
				p := newPart(catalog.Diode, "rectifier", f.m, mpn, gr.pkg, desc, f.aecq)
				vf := rectVF(f.rec, gr.amps, v)
				ir := rectIR(f.rec, gr.amps)
				ifsm := surgeFromAvg(gr.amps, 1.05, 1)
				if f.rec == 'U' {
					// thinner, lifetime-controlled die: 85 % of the standard surge
					ifsm = surgeFromAvg(gr.amps, 1.05, 0.85)
				}
				set(&p, map[string]float64{
					"tjmax": f.tjmax, "rthja": diodeRthJA[gr.pkg],
					"vrrm": v, "ifav": gr.amps, "ifsm": ifsm, "ifsm_t": f.tsurge,
					"vf": vf, "vf_if": gr.amps, "vf_tj": 25,
					// V_F(125 °C) = V_F(25 °C) + dV_F/dT·100 K
					"vf2": roundStep(vf+pnVFTempCo*(vf2Tj-25), 0.01), "vf2_if": gr.amps, "vf2_tj": vf2Tj,
					"ir": ir, "ir_vr": v, "ir_tj": 25,
					"ir2": leak(ir, f.ir2Tj, pnLeakDoubling), "ir2_tj": f.ir2Tj,
				})
				// price, EUR at 1000+: die cost by current and voltage,
				// recovery-class and package factors (invented)
				base := (0.018 + 0.012*gr.amps) * (1 + v/2500) * recPrice[f.rec] * diodePkgPrice[gr.pkg]
				addOffers(&p, base)
				out = append(out, p)
			}
		}
	}
	return out
}

var recPrice = map[byte]float64{'G': 1, 'F': 1.35, 'U': 1.8}

var diodePkgPrice = map[string]float64{
	"SOD-123": 0.9, "SOD-123F": 1.1, "SOD-323": 0.8, "SMA": 1, "SMB": 1.2, "SMC": 1.6,
	"DO-41": 0.8, "DO-15": 1.0, "DO-201": 1.3, "DPAK": 2.0, "D2PAK": 2.6, "TO-220": 2.8,
}

// set stores numeric fields on p.
func set(p *catalog.Part, vals map[string]float64) {
	for k, v := range vals {
		p.Set(k, v)
	}
}

// schFamily is one invented Schottky series.
type schFamily struct {
	m        maker
	lowLeak  bool    // high-barrier series: 1/10 the leakage, +30 mV V_F
	tsurge   float64 // ifsm_t, s
	doubling float64 // leakage doubling interval, K (REFERENCE §1.4: 8–11 K)
	ir2Tj    float64 // °C
	tjmax    func(volts float64) float64
	aecq     bool
	groups   []group
	mpn      func(amps, volts float64, code string) string
}

var schFamilies = []schFamily{
	{m: quillon, tsurge: surge83ms, doubling: 8, ir2Tj: 100,
		tjmax: func(v float64) float64 {
			if v <= 30 {
				return 125
			}
			return 150
		},
		mpn: func(a, v float64, c string) string { return fmt.Sprintf("QPS%d-%d%s", int(a*10), int(v), c) },
		groups: []group{
			{0.5, "SOD-123", []float64{20, 30, 40}},
			{1, "SMA", []float64{20, 30, 40, 60, 100}},
			{1, "SOD-123F", []float64{40}},
			{2, "SMA", []float64{20, 40}},
			{2, "SMB", []float64{60, 100}},
			{3, "SMB", []float64{20, 40, 60, 100}},
			{3, "SMC", []float64{40}},
			{5, "SMC", []float64{40, 60, 100}},
		}},
	{m: halvard, tsurge: surge10ms, doubling: 10, ir2Tj: 100,
		tjmax: func(v float64) float64 {
			if v >= 150 {
				return 175
			}
			return 150
		},
		mpn: func(a, v float64, c string) string { return fmt.Sprintf("HLXS%d-%d%s", int(a*10), int(v), c) },
		groups: []group{
			{8, "DPAK", []float64{45, 60}},
			{10, "TO-220", []float64{45, 100, 150}},
			{15, "TO-220", []float64{45, 200}},
			{15, "D2PAK", []float64{100}},
		}},
	{m: mosswell, lowLeak: true, tsurge: surge10ms, doubling: 11, ir2Tj: 125, aecq: true,
		tjmax: func(float64) float64 { return 175 },
		mpn:   func(a, v float64, c string) string { return fmt.Sprintf("MWL%dK%d-%s", int(v), int(a), c) },
		groups: []group{
			{1, "SMA", []float64{100}},
			{1, "SOD-123F", []float64{150}},
			{2, "SMB", []float64{60, 200}},
			{3, "SMB", []float64{60}},
			{3, "SMC", []float64{100}},
			{5, "SMC", []float64{150}},
			{5, "DPAK", []float64{45}},
			{10, "DPAK", []float64{60}},
		}},
}

// schVF is the maximum V_F of a Schottky at rated current, 25 °C, by
// voltage class (invented for demo; a higher barrier is needed for a
// higher reverse voltage, so V_F rises with V_RRM).
var schVF = map[float64]float64{20: 0.40, 30: 0.45, 40: 0.50, 45: 0.55, 60: 0.65, 100: 0.80, 150: 0.87, 200: 0.90}

// schLeak is the maximum I_R at V_RRM, 25 °C, per √A of rating (A/√A),
// by voltage class (invented for demo; tuned so the 0.5 A 40 V part reads
// 20 µA at 25 °C and 13 mA at 100 °C, the REFERENCE §1.4 example).
var schLeak = map[float64]float64{20: 60e-6, 30: 45e-6, 40: 28e-6, 45: 25e-6, 60: 15e-6, 100: 6e-6, 150: 3e-6, 200: 2e-6}

// schVFTempCo is dV_F/dT of a Schottky at rated current: −0.7 mV/K
// (REFERENCE §1.3, datasheet pairs −0.6…−0.9 mV/K).
const schVFTempCo = -0.0007

func schottkys() []catalog.Part {
	var out []catalog.Part
	for _, f := range schFamilies {
		for _, gr := range f.groups {
			for _, v := range gr.volts {
				mpn := f.mpn(gr.amps, v, diodeCode[gr.pkg])
				tjmax := f.tjmax(v)
				desc := fmt.Sprintf("Schottky barrier rectifier %s A %s V, low forward drop, %s", g(gr.amps), g(v), gr.pkg)
				if f.lowLeak {
					desc = fmt.Sprintf("High-barrier low-leakage Schottky rectifier %s A %s V, Tj up to %s °C, %s", g(gr.amps), g(v), g(tjmax), gr.pkg)
				}
				if f.aecq {
					desc += ", AEC-Q101"
				}
				p := newPart(catalog.Diode, "schottky", f.m, mpn, gr.pkg, desc, f.aecq)
				vf := schVF[v]
				ir := roundSig(schLeak[v]*math.Sqrt(gr.amps), 2)
				if f.lowLeak {
					vf += 0.03
					ir = roundSig(ir/10, 2)
				}
				// second V_F point at 125 °C, or 100 °C for 125 °C parts
				tj2 := math.Min(vf2Tj, tjmax-25)
				set(&p, map[string]float64{
					"tjmax": tjmax, "rthja": diodeRthJA[gr.pkg],
					"vrrm": v, "ifav": gr.amps, "ifsm": surgeFromAvg(gr.amps, 0.9, 1), "ifsm_t": f.tsurge,
					"vf": vf, "vf_if": gr.amps, "vf_tj": 25,
					"vf2": roundStep(vf+schVFTempCo*(tj2-25), 0.01), "vf2_if": gr.amps, "vf2_tj": tj2,
					"ir": ir, "ir_vr": v, "ir_tj": 25,
					"ir2": leak(ir, f.ir2Tj, f.doubling), "ir2_tj": f.ir2Tj,
				})
				base := (0.03 + 0.022*gr.amps) * (1 + v/400) * diodePkgPrice[gr.pkg]
				if f.lowLeak {
					base *= 1.4
				}
				addOffers(&p, base)
				out = append(out, p)
			}
		}
	}
	return out
}

// zenerFamily is one invented Zener series.
type zenerFamily struct {
	m      maker
	pkg    string
	pd     float64 // W
	tol    float64 // fraction
	aecq   bool
	values []float64 // V_Z, E24 series
}

var zenerFamilies = []zenerFamily{
	{larkspur, "SOD-323", 0.25, 0.05, false, []float64{3.3, 4.7, 5.1, 5.6, 6.2, 8.2, 10, 12, 15, 18}},
	{larkspur, "SOD-123", 0.5, 0.05, true, []float64{3.3, 3.9, 5.1, 6.8, 9.1, 10, 12, 13, 15, 16, 20, 24}},
	{larkspur, "SOD-123", 0.5, 0.02, false, []float64{5.1, 10, 12, 15}},
	{brindle, "SMA", 1, 0.05, false, []float64{5.6, 12, 15, 24}},
	{brindle, "DO-41", 1, 0.05, false, []float64{6.8, 12, 18}},
	{brindle, "SMB", 3, 0.05, true, []float64{10, 15, 22}},
	{brindle, "DO-201", 5, 0.05, false, []float64{12, 18}},
}

// zenerTjmax is the junction limit of every seed Zener, °C.
const zenerTjmax = 150

// vzCode writes a Zener voltage the way part numbers do: 5.1 → "5V1".
func vzCode(v float64) string {
	if v == math.Trunc(v) {
		return g(v)
	}
	i := math.Trunc(v)
	return fmt.Sprintf("%dV%d", int(i), int(math.Round((v-i)*10)))
}

func zeners() []catalog.Part {
	var out []catalog.Part
	for _, f := range zenerFamilies {
		tolLetter := 'J'
		if f.tol == 0.02 {
			tolLetter = 'G'
		}
		for _, vz := range f.values {
			var mpn string
			if f.m == larkspur {
				mpn = fmt.Sprintf("LKZ%s%c-%s", vzCode(vz), tolLetter, diodeCode[f.pkg])
			} else {
				mpn = fmt.Sprintf("BRM%sW-%s%c%s", g(f.pd), vzCode(vz), tolLetter, diodeCode[f.pkg])
			}
			desc := fmt.Sprintf("Zener voltage regulator diode %s V ±%s %% %s W, %s", g(vz), g(f.tol*100), g(f.pd), pkgWords(f.pkg))
			if f.aecq {
				desc += ", AEC-Q101"
			}
			p := newPart(catalog.Diode, "zener", f.m, mpn, f.pkg, desc, f.aecq)
			// forward drop point as datasheets give it
			vf, vfIf := 0.9, 0.01
			switch {
			case f.pd >= 5:
				vf, vfIf = 1.2, 1
			case f.pd >= 3:
				vf, vfIf = 1.2, 0.5
			case f.pd >= 1:
				vf, vfIf = 1.2, 0.2
			}
			// leakage below the knee: low-voltage Zeners leak more
			ir, irVR := 0.1e-6, roundStep(0.7*vz, 0.1)
			switch {
			case vz < 5:
				ir, irVR = 5e-6, 1
			case vz < 6.5:
				ir, irVR = 2e-6, 2
			}
			if f.pd >= 3 {
				ir *= 5 // larger junction
			}
			set(&p, map[string]float64{
				"tjmax": zenerTjmax,
				// R_thJA = (T_jmax − 25 °C)/P_D: the power rating is the
				// dissipation that brings the junction to T_jmax at 25 °C
				// ambient (REFERENCE §1.5, T_j = T_a + P·R_thJA)
				"rthja": roundStep((zenerTjmax-25)/f.pd, 0.01), "pd": f.pd,
				"vz": vz, "vz_tol": f.tol,
				"vf": vf, "vf_if": vfIf, "vf_tj": 25,
				"ir": roundSig(ir, 2), "ir_vr": irVR, "ir_tj": 25,
			})
			base := map[float64]float64{0.25: 0.012, 0.5: 0.015, 1: 0.04, 3: 0.12, 5: 0.25}[f.pd]
			if f.tol < 0.05 {
				base *= 1.5
			}
			addOffers(&p, base)
			out = append(out, p)
		}
	}
	return out
}

// tvsFamily is one invented unidirectional TVS series.
type tvsFamily struct {
	m     maker
	ppk   float64 // W, 10/1000 µs
	pkg   string
	ifsm  float64 // forward surge, A, 8.3 ms half sine
	vfIf  float64 // forward test current of V_F = 3.5 V, A
	aecq  bool
	vrwms []float64
}

var tvsFamilies = []tvsFamily{
	{tamsin, 400, "SMA", 40, 25, false, []float64{5, 12, 15, 18, 24, 26, 33, 36}},
	{tamsin, 600, "SMB", 100, 50, true, []float64{5, 12, 15, 18, 24, 26, 33, 48}},
	{corvane, 1500, "SMC", 200, 100, false, []float64{12, 15, 18, 24, 33, 48}},
}

func tvss() []catalog.Part {
	var out []catalog.Part
	for _, f := range tvsFamilies {
		for _, vrwm := range f.vrwms {
			var mpn string
			if f.m == tamsin {
				mpn = fmt.Sprintf("TMV%d-%dU", int(f.ppk/100), int(vrwm))
			} else {
				mpn = fmt.Sprintf("CVT%dK-%dU", int(f.ppk/100), int(vrwm))
			}
			desc := fmt.Sprintf("Unidirectional TVS diode %s W (10/1000 µs), stand-off %s V, %s", g(f.ppk), g(vrwm), f.pkg)
			if f.aecq {
				desc += ", AEC-Q101"
			}
			p := newPart(catalog.Diode, "tvs", f.m, mpn, f.pkg, desc, f.aecq)
			// V_BR(min) ≈ 1.11·V_RWM; V_C ≈ 1.6·V_RWM + 0.8 V at I_PP;
			// I_PP = P_PK / V_C so that P_PK ≈ V_C·I_PP (invented for demo,
			// typical ratios of unidirectional TVS ranges)
			vbr := roundStep(1.11*vrwm, 0.01)
			vc := roundStep(1.6*vrwm+0.8, 0.1)
			ir := 1e-6
			if vrwm < 10 {
				ir = 500e-6 // low-voltage TVS junctions leak heavily at V_RWM
			}
			set(&p, map[string]float64{
				"tjmax": 150, "rthja": diodeRthJA[f.pkg],
				"ifsm": f.ifsm, "ifsm_t": surge83ms, "vf": 3.5, "vf_if": f.vfIf, "vf_tj": 25,
				"ir": ir, "ir_vr": vrwm, "ir_tj": 25,
				"vrwm": vrwm, "vbr": vbr, "vc": vc, "ipp": roundStep(f.ppk/vc, 0.1), "ppk": f.ppk,
			})
			addOffers(&p, map[float64]float64{400: 0.06, 600: 0.09, 1500: 0.2}[f.ppk]*(1+vrwm/200))
			out = append(out, p)
		}
	}
	return out
}
