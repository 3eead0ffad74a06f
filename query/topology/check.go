package topology

import (
	"math"
	"strconv"
)

// Num is a float64 that encodes to JSON with six significant digits, and
// as null when it is not a finite number (an unknown value, or a runaway
// junction temperature).
type Num float64

// MarshalJSON writes n with six significant digits, or null.
func (n Num) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	if f == 0 {
		return []byte("0"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', 6, 64), nil
}

// UnmarshalJSON reads a number or null (NaN).
func (n *Num) UnmarshalJSON(b []byte) error {
	if string(b) == "null" {
		*n = Num(math.NaN())
		return nil
	}
	f, err := strconv.ParseFloat(string(b), 64)
	*n = Num(f)
	return err
}

// Check is one verification of a part (or pair, or stage) at an operating
// point: the computed value, the limit it must respect, the margin and
// whether it passes, with the formula and its source.
//
// Margin is relative and negative when the check fails:
//
//	value ≤ limit:  (limit − value)/|limit|
//	value ≥ limit:  (value − limit)/|limit|
//	temperatures:   (T_limit − T_j)/(T_limit − T_ambient), the share of the
//	                thermal headroom above ambient left unused
//	runaway:        (T_a,max − t_max)/max(t_max − t_min, 10 K), how far the
//	                ambient may rise past t_max before thermal runaway,
//	                relative to the specified ambient span
//
// A check whose data are missing has a null value and margin and fails.
type Check struct {
	Name string `json:"name"`
	// Role is the part the check is about: diode, fuse, shunt-diode,
	// mosfet, zener, gate-resistor, or pair/stage for the combination.
	Role string `json:"role"`
	// Corner is the operating point: hot (t_max, i_max), cold (t_min,
	// v_min, i_max, with self-heating), reverse (reversed supply at t_max),
	// normal (steady operation at t_max), fault (reversed supply into the
	// shunt diode), transient (highest input), or rating (no operating point).
	Corner  string `json:"corner"`
	Value   Num    `json:"value"`
	Op      string `json:"op"` // "≤" or "≥": value Op limit must hold
	Limit   Num    `json:"limit"`
	Unit    string `json:"unit"`
	Margin  Num    `json:"margin"`
	Pass    bool   `json:"pass"`
	Formula string `json:"formula"`
	Source  string `json:"source"`
	Note    string `json:"note,omitempty"`
}

// checkID names a check definition.
type checkID uint8

// checkDef is the fixed part of a check: everything but the numbers.
type checkDef struct {
	name, role, corner, unit string
	upper                    bool // value ≤ limit
	thermal                  bool // margin relative to the headroom above ambient
	formula, source          string
}

// Check definitions. The order inside a role is the order of evaluation:
// the first failing check of a part is the one that eliminated it.
const (
	sdVRRM checkID = iota
	sdIFAV
	sdSurge
	sdTjHot
	sdLoss
	sdVout
	sdDrop
	sdRunaway
	sdReverse

	fuVoltage
	fuCurrent
	fuBreaking
	fuInrush
	fuOpensBound
	fuVout
	fuDrop
	fuLoss

	shVRRM
	shSurgeData
	shRunaway
	shLeakTj

	prI2t
	prOpens
	prClamp
	prLoss

	feVDS
	feID
	feDrive
	feVGS
	feZener
	feZenerDrive
	feZenerPower
	feRGPower
	feTjHot
	fePower
	feVout
	feDrop
	feLoss
	feBackfeed

	numChecks
)

const (
	srcK      = "derating profile (see partsieve need)"
	srcAN604  = "ST AN604 line model, JESD51 steady state (REFERENCE §1.2, §1.5)"
	srcSurge  = "half-sine I²t = I_FSM²·t_p/2, 8.3/10 ms conversion (REFERENCE §2.1)"
	srcRunaw  = "Tremaine 2008 loop gain; leakage model (REFERENCE §1.4)"
	srcBudget = "application spec budget"
	srcHead   = "application spec: supply.v_min − load.v_min"
	srcFuseV  = "fuse voltage rating is an arc-quenching rating; DC needs a DC rating (REFERENCE §4.5)"
	srcFuseI  = "UL 248-14 75 % / IEC 60127 100 % rule × temperature rerating (REFERENCE §4.3)"
	srcBreak  = "breaking capacity ≥ prospective fault current (REFERENCE §4.5)"
	srcPulse  = "Littelfuse pulse-cycle derating (REFERENCE §4.4)"
	srcOpen   = "ECSS-Q-ST-30-11C §6.17.3c; crowbar method (REFERENCE §2.2)"
	srcCoord  = "crowbar energy coordination (REFERENCE §2.2 step 3)"
	srcClamp  = "crowbar fault point (REFERENCE §2.2 steps 1 and 4)"
	srcFET    = "Infineon AN (Graovac et al. 2006) R_DS(on)(T_j); loop (REFERENCE §3.1, §3.5)"
	srcDrive  = "R_DS(on) is specified only at the printed V_GS; never design on V_GS(th) (REFERENCE §3.2)"
	srcZener  = "Zener gate clamp sizing (REFERENCE §3.4)"
	srcBack   = "a MOSFET channel conducts both ways (REFERENCE §3.3; TI SLVAE57B)"
)

var defs = [numChecks]checkDef{
	sdVRRM:  {"reverse voltage", "diode", "reverse", "V", true, false, "V_R = v_reverse + v_holdup ≤ k_vrrm·V_RRM", srcK},
	sdIFAV:  {"average forward current", "diode", "hot", "A", true, false, "i_max ≤ k_ifav·I_F(AV)", srcK},
	sdSurge: {"surge vs inrush", "diode", "rating", "A²s", true, false, "inrush_i2t ≤ (k_ifsm·I_FSM(t_inrush))²·t_inrush/2", srcSurge},
	sdTjHot: {"junction temperature", "diode", "hot", "°C", true, true, "T_j = t_max + R_thJA·V_F(i_max, T_j)·i_max ≤ min(tj_limit, T_jmax − tj_margin_diode)", srcAN604},
	sdLoss:  {"loss budget", "stage", "cold", "W", true, false, "V_F(i_max, T_j)·i_max ≤ loss_max (worst of cold and hot corner)", srcBudget},
	sdVout:  {"output voltage", "stage", "cold", "V", false, false, "v_min − V_F(i_max, T_j) ≥ load.v_min (worst of cold and hot corner)", srcHead},
	sdDrop:  {"drop budget", "stage", "cold", "V", true, false, "V_F(i_max, T_j) ≤ drop_max (worst of cold and hot corner)", srcBudget},
	sdRunaway: {"no thermal runaway while reversed", "diode", "reverse", "°C", true, false,
		"t_max ≤ T_a,max = T_j,crit − R_thJA·P_R,crit at V_R = v_reverse + v_holdup (P_R,crit = 1/(a·R_thJA))", srcRunaw},
	sdReverse: {"reverse bias at t_max", "diode", "reverse", "°C", true, true,
		"T_j = t_max + R_thJA·V_R·I_R(T_j, V_R) ≤ T_jmax", srcRunaw},

	fuVoltage:    {"DC voltage rating", "fuse", "rating", "V", false, false, "U_N,DC ≥ max(v_max, v_transient, v_reverse)", srcFuseV},
	fuCurrent:    {"continuous current", "fuse", "hot", "A", true, false, "i_max ≤ k_std·K_T(t_max)·I_n", srcFuseI},
	fuBreaking:   {"breaking capacity", "fuse", "fault", "A", false, false, "breaking ≥ v_reverse/r_source (bolted fault)", srcBreak},
	fuInrush:     {"inrush pulse withstand", "fuse", "rating", "A²s", true, false, "inrush_i2t ≤ P_f(inrush_pulses)·I²t_melt", srcPulse},
	fuOpensBound: {"fuse opens (upper bound)", "fuse", "fault", "A", false, false, "v_reverse/(r_source + R_cold) ≥ k_fuse_open·I_n", srcOpen},
	fuVout:       {"output voltage", "stage", "cold", "V", false, false, "v_min − i_max·R_cold ≥ load.v_min", srcHead},
	fuDrop:       {"drop budget", "stage", "cold", "V", true, false, "i_max·R_cold ≤ drop_max", srcBudget},
	fuLoss:       {"fuse loss", "fuse", "hot", "W", true, false, "i_max²·R_cold ≤ loss_max", srcBudget},

	shVRRM:      {"reverse voltage in operation", "shunt-diode", "transient", "V", true, false, "max(v_max, v_transient) ≤ k_vrrm·V_RRM", srcK},
	shSurgeData: {"surge and forward data given", "shunt-diode", "rating", "", false, false, "I_FSM and V_F given (to coordinate with the fuse and find the fault point)", srcCoord},
	shRunaway: {"no thermal runaway in operation", "shunt-diode", "normal", "°C", true, false,
		"t_max ≤ T_a,max at V_R = v_max (P_R,crit = 1/(a·R_thJA))", srcRunaw},
	shLeakTj: {"junction temperature in operation", "shunt-diode", "normal", "°C", true, true,
		"T_j = t_max + R_thJA·v_max·I_R(T_j, v_max) ≤ min(tj_limit, T_jmax − tj_margin_diode)", srcRunaw},

	prI2t:   {"diode I²t vs fuse clearing I²t", "pair", "fault", "A²s", true, false, "I²t_clear(fuse) ≤ (k_ifsm·I_FSM)²·t_p/2, at the clearing time", srcCoord},
	prOpens: {"fuse opens", "pair", "fault", "A", false, false, "I_f = (v_reverse − V_F(I_f))/(r_source + R_cold) ≥ k_fuse_open·I_n", srcOpen},
	prClamp: {"reverse voltage at the load", "pair", "fault", "V", true, false, "V_F(I_f, t_min) ≤ load.v_reverse_max", srcClamp},
	prLoss:  {"loss budget", "stage", "hot", "W", true, false, "i_max²·R_cold + v_max·I_R(T_j) ≤ loss_max", srcBudget},

	feVDS:        {"drain-source voltage", "mosfet", "transient", "V", true, false, "max(v_max, v_transient, v_reverse + v_holdup) ≤ k_vds·V_DS", srcK},
	feID:         {"drain current", "mosfet", "hot", "A", true, false, "i_max ≤ k_id·I_D", srcK},
	feDrive:      {"gate drive at lowest input", "mosfet", "cold", "V", false, false, "|V_GS| = min(v_min, V_Z,min) ≥ V_GS at which R_DS(on) is rated", srcDrive},
	feVGS:        {"gate-source stress", "mosfet", "transient", "V", true, false, "|V_GS|max (input, or V_Z,max with a Zener) ≤ k_vgs·V_GS,max", srcZener},
	feZener:      {"Zener window", "zener", "rating", "V", true, false, "V_Z,max = V_Z·(1 + tol) ≤ k_vgs·V_GS,max with V_Z,min = V_Z·(1 − tol) ≥ rated V_GS", srcZener},
	feZenerDrive: {"Zener keeps the drive", "zener", "cold", "V", false, false, "V_Z,min = V_Z·(1 − tol) ≥ the V_GS at which R_DS(on) is rated", srcZener},
	feZenerPower: {"Zener power", "zener", "transient", "W", true, false, "P_Z = V_Z,max·(V_in,max − V_Z,min)/R_G ≤ k_pz·P_Z", srcZener},
	feRGPower:    {"gate resistor power", "gate-resistor", "transient", "W", true, false, "P_RG = (V_in,max − V_Z,min)²/R_G ≤ 62.5 mW (0805, 0.125 W at 50 %)", srcZener},
	feTjHot:      {"junction temperature", "mosfet", "hot", "°C", true, true, "T_j = t_max + R_thJA·i_max²·R_DS(on)(T_j) ≤ min(tj_limit, T_jmax − tj_margin_fet)", srcFET},
	fePower:      {"power dissipation", "mosfet", "hot", "W", true, false, "i_max²·R_DS(on)(T_j) ≤ k_pd·P_D", srcK},
	feVout:       {"output voltage", "stage", "hot", "V", false, false, "v_min − i_max·R_DS(on)(T_j) ≥ load.v_min (worst of hot and cold corner)", srcHead},
	feDrop:       {"drop budget", "stage", "hot", "V", true, false, "i_max·R_DS(on)(T_j) ≤ drop_max (worst of hot and cold corner)", srcBudget},
	feLoss:       {"loss budget", "stage", "hot", "W", true, false, "i_max²·R_DS(on)(T_j) + P_RG + P_Z (at v_max) ≤ loss_max", srcBudget},
	feBackfeed:   {"back-feed", "stage", "reverse", "", true, false, "no source on the load side (load.backfeed, supply.shared, load.v_holdup)", srcBack},
}

// checker evaluates checks in order. In fast mode (rec false) it stops
// being asked after the first failure and records nothing, so the scan of
// a large catalog does not allocate; in recording mode it keeps every
// check with its numbers.
type checker struct {
	rec     bool
	ambient float64
	span    float64 // t_max − t_min, for runaway margins
	checks  []Check

	failed    bool
	first     checkID
	minMargin float64
	minID     checkID
}

func (c *checker) reset(rec bool, ambient float64) {
	c.rec, c.ambient = rec, ambient
	c.checks = c.checks[:0]
	c.failed, c.first = false, 0
	c.minMargin, c.minID = math.Inf(1), 0
}

// margin returns the relative margin of value against limit for check id.
func (c *checker) margin(id checkID, value, limit float64) float64 {
	d := &defs[id]
	if math.IsNaN(value) || math.IsNaN(limit) {
		return math.NaN()
	}
	if math.IsInf(value, 0) {
		return math.Inf(-1)
	}
	if id == sdRunaway || id == shRunaway { // runaway: relative to the ambient span
		span := math.Max(c.span, 10)
		return (limit - value) / span
	}
	if d.thermal {
		head := limit - c.ambient
		if head <= 0 {
			return math.Inf(-1)
		}
		return (limit - value) / head
	}
	den := math.Abs(limit)
	if den == 0 {
		den = 1
	}
	if d.upper {
		return (limit - value) / den
	}
	return (value - limit) / den
}

// add evaluates check id and reports whether the caller should go on:
// true when it passed or when every check is being recorded.
func (c *checker) add(id checkID, value, limit float64) bool {
	return c.addPass(id, value, limit, true)
}

// addPass is add with an extra condition that must hold for the check to
// pass (a stable operating point, data present).
func (c *checker) addPass(id checkID, value, limit float64, extra bool) bool {
	d := &defs[id]
	m := c.margin(id, value, limit)
	pass := extra && !math.IsNaN(m) && m >= 0
	if !pass && !c.failed {
		c.failed, c.first = true, id
	}
	if !math.IsNaN(m) && m < c.minMargin {
		c.minMargin, c.minID = m, id
	}
	if c.rec {
		op := "≥"
		if d.upper {
			op = "≤"
		}
		c.checks = append(c.checks, Check{
			Name: d.name, Role: d.role, Corner: d.corner, Unit: d.unit, Op: op,
			Value: Num(value), Limit: Num(limit), Margin: Num(m), Pass: pass,
			Formula: d.formula, Source: d.source,
		})
	}
	return pass || c.rec
}

// missing records a check that cannot be made because data are absent.
func (c *checker) missing(id checkID, what string) bool {
	c.addPass(id, math.NaN(), math.NaN(), false)
	if c.rec {
		c.note(what + " not given")
	}
	return c.rec
}

// note sets the note of the last recorded check (recording mode only).
func (c *checker) note(s string) {
	if c.rec && len(c.checks) > 0 {
		last := &c.checks[len(c.checks)-1]
		if last.Note == "" {
			last.Note = s
		} else {
			last.Note += "; " + s
		}
	}
}

// source replaces the source of the last recorded check (recording only),
// e.g. with the derating factor's own source.
func (c *checker) source(s string) {
	if c.rec && len(c.checks) > 0 {
		c.checks[len(c.checks)-1].Source = s
	}
}

// CheckNames returns the name of every check, by role, in evaluation
// order (for documentation and the elimination table).
func CheckNames() []string {
	out := make([]string, 0, numChecks)
	for _, d := range defs {
		out = append(out, d.role+": "+d.name)
	}
	return out
}
