package topology

import (
	"fmt"
	"math"

	"partsieve/query/derate"
	"partsieve/query/physics"
	"partsieve/query/spec"
)

// FactorRef is a derating factor or model default used by a requirement,
// with its value, confidence and source.
type FactorRef struct {
	Name  string `json:"name"`
	Value Num    `json:"value"`
	Unit  string `json:"unit,omitempty"`
	// Tag is the confidence tag "[V]", "[D]", "[M]" or "[U]";
	// Confidence says it in words ("unverified default" for [M]).
	Tag        string `json:"tag"`
	Confidence string `json:"confidence"`
	Source     string `json:"source"`
}

func factorRef(f derate.Factor) FactorRef {
	return FactorRef{Name: f.Name, Value: Num(f.Value), Unit: f.Unit, Tag: f.Tag.String(), Confidence: f.Confidence(), Source: f.Source}
}

// Requirement is one line of a topology's requirement set: what a part
// (or the stage) must satisfy, computed from the spec and the policy.
// Value is the bound (null when it depends on the part, as for a fuse's
// clearing I²t); Field names the catalog field it bounds, if any.
type Requirement struct {
	Role    string      `json:"role"`
	Name    string      `json:"name"`
	Field   string      `json:"field,omitempty"`
	Op      string      `json:"op"`
	Value   Num         `json:"value"`
	Unit    string      `json:"unit"`
	Formula string      `json:"formula"`
	Factors []FactorRef `json:"factors,omitempty"`
	Source  string      `json:"source"`
	Note    string      `json:"note,omitempty"`
}

// Need is the requirement set of one topology.
type Need struct {
	Topology     Topology      `json:"topology"`
	Title        string        `json:"title"`
	Unsafe       bool          `json:"unsafe,omitempty"`
	UnsafeReason string        `json:"unsafe_reason,omitempty"`
	Requirements []Requirement `json:"requirements"`
	Hazards      []string      `json:"hazards,omitempty"`
}

// NeedSet is the output of `partsieve need`: the operating corners and
// the requirement set of every topology.
type NeedSet struct {
	Spec        string `json:"spec"`
	Policy      string `json:"policy"`
	PolicyTitle string `json:"policy_title"`
	// HotCorner and ColdCorner describe the operating points.
	HotCorner  string `json:"hot_corner"`
	ColdCorner string `json:"cold_corner"`
	Needs      []Need `json:"needs"`
	// Unverified lists the policy's factors that are unverified defaults.
	Unverified []FactorRef `json:"unverified"`
	Notes      []string    `json:"notes,omitempty"`
	Cautions   []string    `json:"cautions"`
}

// Needs computes the requirement set of each topology in topos (all four
// when none is given) for spec s: the work of `partsieve need`.
func Needs(s *spec.Spec, topos ...Topology) *NeedSet {
	e := newEngine(s, &Catalog{}, Options{Topologies: topos})
	pr := e.pr
	ns := &NeedSet{Spec: s.File, Policy: pr.Name, PolicyTitle: pr.Title,
		HotCorner: fmt.Sprintf("t_max = %s, i_max = %s (losses, junction temperatures, leakage)",
			fmtT(s.Ambient.TMax), fmtA(s.Load.IMax)),
		ColdCorner: fmt.Sprintf("t_min = %s, v_min = %s, i_max = %s with self-heating (drive, output voltage)",
			fmtT(s.Ambient.TMin), fmtV(s.Supply.VMin), fmtA(s.Load.IMax)),
		Notes: append([]string(nil), s.Notes...), Cautions: Cautions}
	for _, f := range pr.Unverified() {
		ns.Unverified = append(ns.Unverified, factorRef(f))
	}
	for _, t := range e.opt.Topologies {
		var n Need
		switch t {
		case SeriesDiode:
			n = e.needSeries()
		case ShuntFuse:
			n = e.needShunt()
		case PFETHigh:
			n = e.needFET(false)
		case NFETLow:
			n = e.needFET(true)
		default:
			continue
		}
		n.Topology, n.Title = t, t.Title()
		ns.Needs = append(ns.Needs, n)
	}
	return ns
}

func req(role, name, field, op string, v float64, unit, formula, source string, fs ...derate.Factor) Requirement {
	r := Requirement{Role: role, Name: name, Field: field, Op: op, Value: Num(v), Unit: unit, Formula: formula, Source: source}
	for _, f := range fs {
		r.Factors = append(r.Factors, factorRef(f))
	}
	return r
}

func (e *engine) budgetReqs(role string, lossUnit func(loss float64) (float64, string, string)) []Requirement {
	s := e.s
	var out []Requirement
	out = append(out, req("stage", "drop at the worse corner", "", "≤", e.dropLim, "V",
		fmt.Sprintf("min(drop_max, v_min − load.v_min) = %s (%s governs)", fmtV(e.dropLim), e.dropBy), srcHead))
	if s.Budget.HasLoss {
		v, unit, f := lossUnit(s.Budget.LossMax)
		out = append(out, req(role, "loss at the hot corner", "", "≤", v, unit, f, srcBudget))
	}
	return out
}

func (e *engine) needSeries() Need {
	s, pr := e.s, e.pr
	i := s.Load.IMax
	var n Need
	n.Requirements = append(n.Requirements,
		req("diode", "repetitive reverse voltage V_RRM", "vrrm", "≥", e.vrSeries/pr.KVRRM.Value, "V",
			fmt.Sprintf("(v_reverse + v_holdup)/k_vrrm = (%s + %s)/%g", fmtV(s.Supply.VReverse), fmtV(s.Load.VHoldup), pr.KVRRM.Value),
			pr.KVRRM.Source, pr.KVRRM),
		req("diode", "average forward current I_F(AV)", "ifav", "≥", i/pr.KIFAV.Value, "A",
			fmt.Sprintf("i_max/k_ifav = %s/%g", fmtA(i), pr.KIFAV.Value), pr.KIFAV.Source, pr.KIFAV))
	if s.Load.HasInrush {
		ipk := math.Sqrt(2*s.Load.InrushI2t/s.Load.InrushTime) / pr.KIFSM.Value
		n.Requirements = append(n.Requirements, req("diode", "surge current I_FSM at the inrush pulse length", "ifsm", "≥", ipk, "A",
			fmt.Sprintf("√(2·inrush_i2t/inrush_time)/k_ifsm = √(2·%s/%s)/%g; the part's I_FSM is converted from its own pulse (lower of constant I²t and I²√t)",
				fmtI2(s.Load.InrushI2t), fmtS(s.Load.InrushTime), pr.KIFSM.Value), srcSurge, pr.KIFSM))
	}
	n.Requirements = append(n.Requirements,
		req("diode", "junction temperature at the hot corner", "tjmax", "≤", pr.TjLimit.Value, "°C",
			fmt.Sprintf("T_j = t_max + R_thJA·V_F(i_max, T_j)·i_max ≤ min(%g °C, T_jmax − %g K)", pr.TjLimit.Value, pr.TjMarginDiode.Value),
			srcAN604, pr.TjLimit, pr.TjMarginDiode))
	n.Requirements = append(n.Requirements, e.budgetReqs("stage", func(l float64) (float64, string, string) {
		return l / i, "V", fmt.Sprintf("V_F(i_max, T_j) ≤ loss_max/i_max = %s/%s", fmtW(l), fmtA(i))
	})...)
	for k := range n.Requirements {
		if n.Requirements[k].Name == "drop at the worse corner" {
			n.Requirements[k].Note = "V_F(i_max, T_j) from the catalog's V_F points, with the " + vfTCNote(pr)
		}
	}
	r := req("diode", "no thermal runaway while reversed", "ir", "≥", s.Ambient.TMax, "°C",
		fmt.Sprintf("largest stable ambient T_a,max at V_R = %s ≥ t_max; T_j ≤ T_jmax", fmtV(e.vrSeries)), srcRunaw, pr.IRDoubling)
	if s.Supply.SteadyReverse() {
		r.Note = "the reversal lasts 10 s or more (or is continuous): judged on the thermal steady state"
	} else {
		r.Note = fmt.Sprintf("the reversal lasts %s: still judged on the steady state (conservative)", fmtS(s.Supply.ReverseTime))
	}
	n.Requirements = append(n.Requirements, r)
	return n
}

func vfTCNote(pr *derate.Profile) string {
	return fmt.Sprintf("class coefficients vf_tc_pn = %g V/K, vf_tc_schottky = %g V/K when the part has no second temperature point",
		pr.VFTCPN.Value, pr.VFTCSchottky.Value)
}

func (e *engine) needShunt() Need {
	s, pr := e.s, e.pr
	i := s.Load.IMax
	var n Need
	n.Requirements = append(n.Requirements,
		req("fuse", "DC voltage rating", "un_dc", "≥", e.vFuse, "V",
			fmt.Sprintf("max(v_max, v_transient, v_reverse) = max(%s, %s, %s)", fmtV(s.Supply.VMax), fmtV(s.Supply.VTransient), fmtV(s.Supply.VReverse)), srcFuseV))
	kt, _, _ := pr.RerateFactor(physics.RerateCurve{}, s.Ambient.TMax)
	for _, c := range []struct {
		std physics.FuseStd
		f   derate.Factor
	}{{physics.FuseUL, pr.KFuseUL}, {physics.FuseIEC, pr.KFuseIEC}, {physics.FuseBlade, pr.KFuseBlade}} {
		r := req("fuse", "rated current I_n, "+c.std.String()+" convention", "in", "≥", i/(c.f.Value*kt), "A",
			fmt.Sprintf("i_max/(%s·K_T(t_max)) = %s/(%g·%.3f)", c.f.Name, fmtA(i), c.f.Value, kt), srcFuseI, c.f, pr.FuseTC, pr.FuseTCKnee)
		r.Note = "K_T from the profile default; a fuse's own rerating curve replaces it"
		if pr.FuseByRating != nil {
			r.Note += "; small ratings derate further by the profile's rating table"
		}
		n.Requirements = append(n.Requirements, r)
	}
	n.Requirements = append(n.Requirements,
		req("fuse", "breaking capacity", "breaking", "≥", e.iBolted, "A",
			fmt.Sprintf("v_reverse/r_source = %s/%s (bolted fault)", fmtV(s.Supply.VReverse), fmtR(s.Supply.RSource)), srcBreak))
	if s.Load.HasInrush {
		r := req("fuse", "melting I²t", "i2t", "≥", s.Load.InrushI2t/e.pulseF, "A²s",
			fmt.Sprintf("inrush_i2t/P_f(%g) = %s/%.3f", s.Load.InrushPulses, fmtI2(s.Load.InrushI2t), e.pulseF), srcPulse)
		r.Note = "pulse factor table: " + pr.Pulse.Name + " " + pr.Pulse.Tag.String()
		n.Requirements = append(n.Requirements, r)
	}
	n.Requirements = append(n.Requirements,
		req("fuse", "largest rating that still opens", "in", "≤", e.iBolted/pr.KFuseOpen.Value, "A",
			fmt.Sprintf("I_f/k_fuse_open with I_f ≤ v_reverse/r_source = %s: the diode's drop, R_cold and the diode's resistance lower I_f per pair", fmtA(e.iBolted)),
			srcOpen, pr.KFuseOpen))
	rmax := e.dropLim / i
	formula := fmt.Sprintf("drop limit/i_max = %s/%s", fmtV(e.dropLim), fmtA(i))
	if s.Budget.HasLoss && s.Budget.LossMax/(i*i) < rmax {
		rmax = s.Budget.LossMax / (i * i)
		formula = fmt.Sprintf("loss_max/i_max² = %s/%s²", fmtW(s.Budget.LossMax), fmtA(i))
	}
	n.Requirements = append(n.Requirements,
		req("fuse", "cold resistance", "rcold", "≤", rmax, "Ω", formula, srcBudget),
		req("shunt-diode", "repetitive reverse voltage V_RRM", "vrrm", "≥", e.vShunt/pr.KVRRM.Value, "V",
			fmt.Sprintf("max(v_max, v_transient)/k_vrrm = %s/%g", fmtV(e.vShunt), pr.KVRRM.Value), pr.KVRRM.Source, pr.KVRRM),
		req("shunt-diode", "surge I²t capability", "ifsm", "≥", math.NaN(), "A²s",
			"(k_ifsm·I_FSM)²·t_p/2 ≥ the fuse's clearing I²t (maker value, else melting I²t × 2, estimated), at the clearing time", srcCoord, pr.KIFSM),
		req("pair", "reverse voltage at the load during the fault", "", "≤", s.Load.VReverseMax, "V",
			"V_F(I_f, t_min) ≤ load.v_reverse_max, I_f = (v_reverse − V_F)/(r_source + R_cold)", srcClamp),
		req("shunt-diode", "junction temperature in operation (leakage, runaway)", "tjmax", "≤", pr.TjLimit.Value, "°C",
			fmt.Sprintf("T_j = t_max + R_thJA·v_max·I_R(T_j) ≤ min(%g °C, T_jmax − %g K), stable", pr.TjLimit.Value, pr.TjMarginDiode.Value),
			srcRunaw, pr.TjLimit, pr.TjMarginDiode, pr.IRDoubling))
	if s.Budget.HasLoss {
		n.Requirements = append(n.Requirements, req("stage", "loss at the hot corner", "", "≤", s.Budget.LossMax, "W",
			"i_max²·R_cold + v_max·I_R(T_j) ≤ loss_max", srcBudget))
	}
	n.Hazards = append(n.Hazards, "after a reversal the fuse has opened and must be replaced")
	return n
}

func (e *engine) needFET(nfet bool) Need {
	s, pr := e.s, e.pr
	i := s.Load.IMax
	var n Need
	stress := e.vinMax
	stressF := fmt.Sprintf("max(v_max, v_transient)/k_vgs = %s/%g", fmtV(e.vinMax), pr.KVGS.Value)
	if nfet && s.Supply.VReverse > stress {
		stress = s.Supply.VReverse
		stressF = fmt.Sprintf("max(v_max, v_transient, v_reverse)/k_vgs = %s/%g (reversed, the gate sees −v_reverse)", fmtV(stress), pr.KVGS.Value)
	}
	n.Requirements = append(n.Requirements,
		req("mosfet", "drain-source voltage V_DS", "vds", "≥", e.vDS/pr.KVDS.Value, "V",
			fmt.Sprintf("max(v_max, v_transient, v_reverse + v_holdup)/k_vds = %s/%g", fmtV(e.vDS), pr.KVDS.Value), pr.KVDS.Source, pr.KVDS),
		req("mosfet", "drain current I_D", "id", "≥", i/pr.KID.Value, "A", fmt.Sprintf("i_max/k_id = %s/%g", fmtA(i), pr.KID.Value), pr.KID.Source, pr.KID),
		req("mosfet", "V_GS at which R_DS(on) is rated", "rdson_vgs", "≤", s.Supply.VMin, "V",
			"the gate sees min(v_min, V_Z,min) at the lowest input; R_DS(on) must be rated at or below it (never design on V_GS(th))", srcDrive),
		req("mosfet", "V_GS rating without a Zener clamp", "vgs_max", "≥", stress/pr.KVGS.Value, "V", stressF, srcZener, pr.KVGS))
	n.Requirements[len(n.Requirements)-1].Note = "below this a Zener from the catalog clamps the gate: V_Z,min ≥ the rated V_GS, V_Z,max ≤ k_vgs·V_GS,max"
	vinZ := e.vinMax
	if nfet {
		vinZ = math.Max(vinZ, s.Supply.VReverse)
	}
	n.Requirements = append(n.Requirements,
		req("zener", "Zener power", "pd", "≥", math.NaN(), "W",
			fmt.Sprintf("V_Z,max·(%s − V_Z,min)/R_G ≤ k_pz·P_Z", fmtV(vinZ)), srcZener, pr.KPZ),
		req("gate-resistor", "gate resistor", "", "≥", GateResistorDefault, "Ω",
			fmt.Sprintf("R_G from 10 kΩ up (E12) so that (%s − V_Z,min)²/R_G ≤ %s and the Zener power holds", fmtV(vinZ), fmtW(GateResistorMaxPower)), srcZener))
	rmax := e.dropLim / i
	formula := fmt.Sprintf("drop limit/i_max = %s/%s", fmtV(e.dropLim), fmtA(i))
	if s.Budget.HasLoss && s.Budget.LossMax/(i*i) < rmax {
		rmax = s.Budget.LossMax / (i * i)
		formula = fmt.Sprintf("loss_max/i_max² = %s/%s² (the clamp's own loss adds)", fmtW(s.Budget.LossMax), fmtA(i))
	}
	n.Requirements = append(n.Requirements,
		req("mosfet", "R_DS(on) at the hot junction", "rdson", "≤", rmax, "Ω",
			formula+"; R_DS(on)(T_j) = R_DS(on),max(25 °C)·(1 + α/100)^(T_j − 25)", srcFET, pr.RdsonAlpha),
		req("mosfet", "junction temperature at the hot corner", "tjmax", "≤", pr.TjLimit.Value, "°C",
			fmt.Sprintf("T_j = t_max + R_thJA·i_max²·R_DS(on)(T_j) ≤ min(%g °C, T_jmax − %g K), stable", pr.TjLimit.Value, pr.TjMarginFET.Value),
			srcFET, pr.TjLimit, pr.TjMarginFET))
	if e.backfeed != "" {
		n.Unsafe = true
		n.UnsafeReason = e.backfeed + ": a single MOSFET's channel conducts both ways, so it cannot block current flowing back"
	} else {
		n.Hazards = append(n.Hazards, "blocks reverse polarity, not reverse current: if the input collapses while the gate is biased, the load side discharges back into the source")
	}
	if nfet {
		n.Hazards = append(n.Hazards, "the load's ground is lifted by i_max·R_DS(on), and any other ground path (signal lines, chassis, shield) bypasses the protection")
	}
	return n
}
