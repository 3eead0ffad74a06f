// Package derate holds the derating policies partsieve applies when it
// turns an application into requirements: how far below its rating a part
// may be stressed (reverse voltage, forward current, surge, junction
// temperature, V_DS, V_GS, I_D, power, fuse continuous current, fuse
// temperature rerating, fuse pulse factor, Zener and TVS power) and the
// model defaults the device physics uses (R_DS(on) temperature coefficient,
// V_F temperature coefficient, leakage doubling interval).
//
// Three profiles are built in: "commercial", "industrial" and
// "high-reliability". Each factor carries its value, its source and a
// confidence tag as in REFERENCE.md section 5 ([V] confirmed in the source,
// [D] derived, [M] from memory); [M] factors are shown to users as
// "unverified default" (Factor.Confidence). A spec may override any factor
// by name (Profile.WithOverrides) or define its own profile from a base
// (NewProfile); overridden factors are tagged [U].
//
// Stress ratio S = applied/rated; a factor k is the largest allowed S, so a
// part passes when applied ≤ k·rated. The junction-temperature limit is a
// rule, not a ratio: T_j ≤ min(tj_limit, T_jmax − margin).
//
// How each profile was chosen (the per-factor reasons are in the factor's
// Why text):
//
//   - commercial follows the "commercial / industrial practice" column of
//     REFERENCE §5.1/§5.2 and the makers' own fuse rules (UL 75 %, IEC
//     100 %). Where that column is empty (Zener power, TVS peak power,
//     MOSFET power) it takes the loosest published value or no derating,
//     relying on the junction-temperature limit.
//   - industrial sits between: where a published intermediate exists it is
//     used (MIL-HDBK-338B level II, MIL-DTL-917, ECSS where it is the
//     middle value); otherwise the midpoint, rounded to the conservative
//     side, or the stricter neighbour.
//   - high-reliability follows NASA EEE-INST-002 and ECSS-Q-ST-30-11C and
//     takes the stricter of the two where they differ; fuses follow the
//     EEE-INST-002/MIL-STD-1547-style rating table.
//
// Most of these values are [M] in REFERENCE.md: they must be confirmed
// against the standards before being relied on, and users can replace them.
package derate
