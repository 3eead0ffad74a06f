package derate

import "partsieve/query/physics"

// Source strings (REFERENCE.md §5 and the sections named).
const (
	srcCommercial   = "commercial/industrial practice (REFERENCE §5.1/§5.2)"
	srcEEE          = "NASA EEE-INST-002 (GSFC 2003/2008) (REFERENCE §5)"
	srcECSS         = "ECSS-Q-ST-30-11C Rev 1/2 (REFERENCE §5)"
	srcEEEECSS      = "NASA EEE-INST-002 and ECSS-Q-ST-30-11C (REFERENCE §5)"
	srcMIL338       = "MIL-HDBK-338B / AFSC-P 800-27 levels I/II/III (REFERENCE §5)"
	srcMIL917       = "MIL-DTL-917 Table XIX (NAVSEA) (REFERENCE §5.2)"
	srcRenesas      = "Renesas FAQ, commercial V_DS derating (REFERENCE §5.2)"
	srcRising       = "risingedgetech derating tutorial (REFERENCE §5.2)"
	srcLittelfuse   = "Littelfuse Fuseology, UL-style 75 % rule (REFERENCE §4.3/§5.3)"
	srcSchurter     = "Schurter Guide to Fuse Selection, IEC 60127 100 % (REFERENCE §4.3/§5.3)"
	srcMakers80     = "fuse makers' advice of ≤ 80 % for IEC fuses (REFERENCE §5.3)"
	srcInterfacebus = "interfacebus fuse derating table, EEE-INST-002/MIL-STD-1547 style; attribution unconfirmed (REFERENCE §5.3)"
	srcECSSFuse     = "ECSS-Q-ST-30-11C Rev 2 §6.17.3c: source delivers ≥ 3× fuse rating (REFERENCE §2.2/§4.5)"
	srcFuseTC       = "−0.5 %/K above 25 °C, interfacebus military-fuse rule [V], attribution M; 60 °C gives 0.825 vs Schurter's 0.83 [V] (REFERENCE §4.3)"
	srcAlpha        = "α = 0.4 %/K fits low-voltage trench R_DS(on) curves: ×1.49 at 125 °C, ×1.65 at 150 °C (REFERENCE §3.1)"
	srcTCPN         = "silicon PN −2 mV/K, textbook (Sedra & Smith) (REFERENCE §1.3)"
	srcTCSchottky   = "Schottky −0.8 mV/K, within −0.6…−0.9 mV/K from datasheet V_F,max pairs (REFERENCE §1.3)"
	srcDoubling     = "leakage doubles every 10 K, generic silicon rule; datasheet pairs give 8–11 K (REFERENCE §1.4)"
	srcTool         = "tool choice (partsieve), no published value"
)

func ratio(name, label string) Factor {
	return Factor{Name: name, Label: label, Min: 0, MinOpen: true, Max: 1}
}

func (f Factor) set(v float64, tag physics.Tag, src, why string) Factor {
	f.Value, f.Tag, f.Source, f.Why = v, tag, src, why
	return f
}

// skeleton returns a profile with every factor's name, label, unit and
// override range, values unset.
func skeleton() Profile {
	return Profile{
		KVRRM:         ratio("k_vrrm", "diode reverse voltage: V_R ≤ k·V_RRM"),
		KIFAV:         ratio("k_ifav", "diode average forward current: I_F(AV) ≤ k·I_F(AV),rated"),
		KIFSM:         ratio("k_ifsm", "diode surge current: I_pk ≤ k·I_FSM, I²t ≤ (k·I_FSM)²·t_p/2"),
		KPZ:           ratio("k_pz", "Zener power: P_Z ≤ k·P_Z,rated"),
		KTVSPpk:       ratio("k_tvs_ppk", "TVS peak pulse power: P ≤ k·P_PK"),
		TjLimit:       Factor{Name: "tj_limit", Label: "junction temperature cap: T_j ≤ min(tj_limit, T_jmax − margin)", Unit: "°C", Min: 25, Max: 250},
		TjMarginDiode: Factor{Name: "tj_margin_diode", Label: "diode junction margin below T_jmax", Unit: "K", Min: 0, Max: 150},
		TjMarginFET:   Factor{Name: "tj_margin_fet", Label: "MOSFET junction margin below T_jmax", Unit: "K", Min: 0, Max: 150},
		KVDS:          ratio("k_vds", "MOSFET drain-source voltage: V_DS ≤ k·V_DS,rated"),
		KVGS:          ratio("k_vgs", "MOSFET gate-source voltage: |V_GS| ≤ k·V_GS,max"),
		KID:           ratio("k_id", "MOSFET drain current: I_D ≤ k·I_D,rated"),
		KPD:           ratio("k_pd", "semiconductor power: P ≤ k·P_D,rated"),
		KFuseUL:       ratio("k_fuse_ul", "UL 248-14-style fuse: I_op ≤ k·K_T·I_n"),
		KFuseIEC:      ratio("k_fuse_iec", "IEC 60127-style fuse: I_op ≤ k·K_T·I_n"),
		KFuseBlade:    ratio("k_fuse_blade", "ISO 8820 blade fuse: I_op ≤ k·K_T·I_n"),
		KFuseOpen:     Factor{Name: "k_fuse_open", Label: "crowbar fault current must reach k·I_n for the fuse to open", Unit: "× I_n", Min: 1, Max: 100},
		FuseTC:        Factor{Name: "fuse_tc", Label: "default fuse rerating slope above fuse_tc_knee (when the part has no curve)", Unit: "%/K", Min: 0, Max: 5},
		FuseTCKnee:    Factor{Name: "fuse_tc_knee", Label: "temperature where default fuse rerating starts", Unit: "°C", Min: -55, Max: 150},
		RdsonAlpha:    Factor{Name: "rdson_alpha", Label: "R_DS(on) temperature coefficient α: R(T) = R(25 °C)·(1 + α/100)^(T − 25)", Unit: "%/K", Min: 0, Max: 2},
		VFTCPN:        Factor{Name: "vf_tc_pn", Label: "V_F temperature coefficient, silicon PN (no second datasheet temperature)", Unit: "V/K", Min: -0.005, Max: 0.002},
		VFTCSchottky:  Factor{Name: "vf_tc_schottky", Label: "V_F temperature coefficient, Schottky (no second datasheet temperature)", Unit: "V/K", Min: -0.005, Max: 0.002},
		IRDoubling:    Factor{Name: "ir_doubling", Label: "reverse-leakage doubling interval (one datasheet leakage point)", Unit: "K", Min: 1, Max: 50},
	}
}

// withModelDefaults sets the model defaults shared by the built-in
// profiles. They describe device physics, not policy, so they do not
// change with strictness; a high-reliability user may prefer α = 0.47 %/K
// (×1.80 at 150 °C, REFERENCE §3.1).
func withModelDefaults(p Profile) Profile {
	p.RdsonAlpha = p.RdsonAlpha.set(physics.DefaultRdsonAlpha, physics.Derived, srcAlpha,
		"class default for low-voltage trench MOSFETs; the typical curves span 1.4–1.6 at 125 °C")
	p.VFTCPN = p.VFTCPN.set(physics.TCSiliconPN, physics.Verified, srcTCPN,
		"textbook value; the −1.8…−2.2 mV/K range is from memory")
	p.VFTCSchottky = p.VFTCSchottky.set(physics.TCSchottky, physics.Memory, srcTCSchottky,
		"middle of the spread derived from four datasheet pairs; as a class default it is unverified")
	p.IRDoubling = p.IRDoubling.set(physics.DefaultLeakageDoubling, physics.Memory, srcDoubling,
		"used only when the part has a single leakage point; two points give the slope")
	p.Pulse = physics.LittelfusePulseTable
	p.FuseTC = p.FuseTC.set(0.5, physics.Memory, srcFuseTC,
		"generic default when the fuse record has no rerate curve; family curves differ, so unverified")
	p.FuseTCKnee = p.FuseTCKnee.set(25, physics.Memory, srcFuseTC, "the rule starts at 25 °C ambient")
	p.KFuseOpen = p.KFuseOpen.set(3, physics.Verified, srcECSSFuse,
		"the only published multiple; IEC F fuses need about 10·I_n to open within 20 ms (check the gates)")
	return p
}

func commercial() Profile {
	p := withModelDefaults(skeleton())
	p.Name, p.Title = "commercial", "commercial: makers' rules and common commercial practice"
	p.KVRRM = p.KVRRM.set(0.80, physics.Memory, srcCommercial, "commercial column: 80 %")
	p.KIFAV = p.KIFAV.set(0.75, physics.Memory, srcCommercial, "commercial column gives 70–80 %; the middle is taken")
	p.KIFSM = p.KIFSM.set(0.75, physics.Memory, srcCommercial, "commercial column: 75 %")
	p.KPZ = p.KPZ.set(0.70, physics.Memory, srcMIL338, "no commercial value; the loosest published one (level III, 70 %)")
	p.KTVSPpk = p.KTVSPpk.set(1.00, physics.Memory, srcTool, "no commercial value published; the rating is used as is")
	p.TjLimit = p.TjLimit.set(150, physics.Memory, srcTool,
		"no commercial cap published; 150 °C, so that the margin below T_jmax governs for parts rated up to 175 °C")
	p.TjMarginDiode = p.TjMarginDiode.set(20, physics.Memory, srcCommercial, "commercial column: T_jmax − 20…25 °C; the lower end")
	p.TjMarginFET = p.TjMarginFET.set(30, physics.Verified, srcRising, "power MOSFETs ≥ 30 °C below T_jmax")
	p.KVDS = p.KVDS.set(0.80, physics.Verified, srcRenesas, "commercial column: 80 %")
	p.KVGS = p.KVGS.set(0.80, physics.Memory, srcCommercial, "commercial column: 80 %")
	p.KID = p.KID.set(0.80, physics.Memory, srcCommercial, "commercial column: 80 %")
	p.KPD = p.KPD.set(1.00, physics.Memory, srcTool, "no commercial value published; the junction-temperature limit governs")
	p.KFuseUL = p.KFuseUL.set(physics.ULContinuousFactor, physics.Verified, srcLittelfuse, "UL 248-14 fuses carry 75 % of rating at 25 °C")
	p.KFuseIEC = p.KFuseIEC.set(physics.IECContinuousFactor, physics.Verified, srcSchurter, "IEC 60127 fuses may carry 100 % of I_n at 23–25 °C")
	p.KFuseBlade = p.KFuseBlade.set(physics.BladeContinuousFactor, physics.Memory, srcTool, "from memory: blade fuses treated like the UL 75 % rule")
	return p
}

func industrial() Profile {
	p := withModelDefaults(skeleton())
	p.Name, p.Title = "industrial", "industrial: between commercial practice and high-reliability rules"
	p.KVRRM = p.KVRRM.set(0.75, physics.Memory, srcECSS, "between commercial 80 % and high-rel 70 %: the ECSS value")
	p.KIFAV = p.KIFAV.set(0.65, physics.Memory, srcMIL338, "MIL-HDBK-338B level II, between commercial 75 % and high-rel 50 %")
	p.KIFSM = p.KIFSM.set(0.60, physics.Memory, srcTool, "between commercial 75 % and high-rel 50 %, midpoint rounded down")
	p.KPZ = p.KPZ.set(0.60, physics.Memory, srcMIL338, "MIL-HDBK-338B level II")
	p.KTVSPpk = p.KTVSPpk.set(0.90, physics.Memory, srcTool, "between no derating and high-rel 80 %")
	p.TjLimit = p.TjLimit.set(125, physics.Memory, srcMIL338, "MIL-HDBK-338B level III cap, also the EEE-INST-002 cap")
	p.TjMarginDiode = p.TjMarginDiode.set(25, physics.Memory, srcCommercial, "commercial column: T_jmax − 20…25 °C; the upper end")
	p.TjMarginFET = p.TjMarginFET.set(30, physics.Verified, srcRising, "power MOSFETs ≥ 30 °C below T_jmax")
	p.KVDS = p.KVDS.set(0.75, physics.Memory, srcEEEECSS, "no intermediate value between 80 % and 75 %; the stricter is taken")
	p.KVGS = p.KVGS.set(0.70, physics.Verified, srcMIL917, "MIL-DTL-917: 70 %, between commercial 80 % and high-rel 60 %")
	p.KID = p.KID.set(0.80, physics.Verified, srcMIL917, "MIL-DTL-917: maximum 80 % of rated I_D at T_jmax")
	p.KPD = p.KPD.set(0.60, physics.Memory, srcMIL338, "MIL-HDBK-338B level II")
	p.KFuseUL = p.KFuseUL.set(0.75, physics.Verified, srcLittelfuse, "the maker's UL rule already includes the margin")
	p.KFuseIEC = p.KFuseIEC.set(0.80, physics.Memory, srcMakers80, "many makers still advise ≤ 80 % for IEC fuses")
	p.KFuseBlade = p.KFuseBlade.set(0.75, physics.Memory, srcTool, "from memory: blade fuses treated like the UL 75 % rule")
	return p
}

// eeeFuseTable is the EEE-INST-002/MIL-STD-1547-style fuse derating by
// rating [V interfacebus; attribution M] (REFERENCE §5.3).
var eeeFuseTable = []RatingStep{
	{0.125, 0.25}, {0.25, 0.30}, {0.375, 0.35}, {0.5, 0.40}, {1, 0.45}, {2, 0.50},
}

func highReliability() Profile {
	p := withModelDefaults(skeleton())
	p.Name, p.Title = "high-reliability", "high-reliability: NASA EEE-INST-002 / ECSS-Q-ST-30-11C, the stricter where they differ"
	p.KVRRM = p.KVRRM.set(0.70, physics.Memory, srcEEE, "EEE-INST-002 70 % (ECSS 75 %; MIL-HDBK-338B 70 %)")
	p.KIFAV = p.KIFAV.set(0.50, physics.Memory, srcEEEECSS, "both give 50 %")
	p.KIFSM = p.KIFSM.set(0.50, physics.Memory, srcEEEECSS, "both give 50 %")
	p.KPZ = p.KPZ.set(0.50, physics.Memory, srcEEEECSS, "both give 50 % (average power)")
	p.KTVSPpk = p.KTVSPpk.set(0.80, physics.Memory, srcEEE, "EEE-INST-002: TVS peak pulse ≤ 80 %")
	p.TjLimit = p.TjLimit.set(110, physics.Memory, srcECSS, "ECSS 110 °C, stricter than EEE-INST-002's 125 °C")
	p.TjMarginDiode = p.TjMarginDiode.set(40, physics.Memory, srcEEEECSS, "both: T_jmax − 40 °C")
	p.TjMarginFET = p.TjMarginFET.set(40, physics.Memory, srcEEEECSS, "both: T_jmax − 40 °C")
	p.KVDS = p.KVDS.set(0.75, physics.Memory, srcEEEECSS, "EEE-INST-002 75 % (ECSS 75–80 %)")
	p.KVGS = p.KVGS.set(0.60, physics.Memory, srcEEE, "EEE-INST-002 60 %, stricter than ECSS 75 %")
	p.KID = p.KID.set(0.75, physics.Memory, srcEEEECSS, "both give 75 %")
	p.KPD = p.KPD.set(0.50, physics.Memory, srcEEE, "EEE-INST-002 50 %, stricter than ECSS 65 %")
	p.KFuseUL = p.KFuseUL.set(0.50, physics.Verified, srcInterfacebus, "50 % for 2–15 A fuses; smaller ratings by the rating table")
	p.KFuseIEC = p.KFuseIEC.set(0.50, physics.Verified, srcInterfacebus, "50 % for 2–15 A fuses; smaller ratings by the rating table")
	p.KFuseBlade = p.KFuseBlade.set(0.50, physics.Memory, srcInterfacebus, "blade fuses are outside that table; the same 50 % is assumed")
	p.FuseByRating = eeeFuseTable
	p.FuseByRatingSource = srcInterfacebus
	p.FuseByRatingTag = physics.Verified
	return p
}
