package physics

import (
	"fmt"
	"math"
)

// Gate is one point of a fuse standard's time-current gates: at Multiple ×
// I_n the fuse must not open before Min seconds and must open within Max
// seconds (pre-arcing time for IEC 60127, opening time for UL 248-14). A
// zero bound is absent. Continuous marks "carry indefinitely".
type Gate struct {
	Multiple   float64
	Min, Max   float64
	Continuous bool
	// The gate applies to ratings I_n with InAbove < I_n ≤ InUpTo (A);
	// InUpTo = 0 means no upper limit.
	InAbove, InUpTo float64
	Tag             Tag
	Note            string
}

// Applies reports whether the gate applies to rated current in (A).
func (g Gate) Applies(in float64) bool {
	return in > g.InAbove && (g.InUpTo == 0 || in <= g.InUpTo*(1+1e-9))
}

// Current returns the test current Multiple·I_n in A.
func (g Gate) Current(in float64) float64 { return g.Multiple * in }

// Describe says the gate in words at rating in, e.g. "at 6.75 A (135 % I_n):
// open within 60 min".
func (g Gate) Describe(in float64) string {
	head := fmt.Sprintf("at %.4g A (%.4g %% I_n): ", g.Current(in), g.Multiple*100)
	switch {
	case g.Continuous:
		return head + "carry continuously"
	case g.Min > 0 && g.Max > 0:
		return head + "open between " + fmtDuration(g.Min) + " and " + fmtDuration(g.Max)
	case g.Min > 0:
		return head + "no opening before " + fmtDuration(g.Min)
	case g.Max > 0:
		return head + "open within " + fmtDuration(g.Max)
	}
	return head + "no requirement"
}

func fmtDuration(s float64) string {
	switch {
	case s > 3600 && math.Mod(s, 3600) == 0:
		return fmt.Sprintf("%g h", s/3600)
	case s >= 60 && math.Mod(s, 60) == 0:
		return fmt.Sprintf("%g min", s/60)
	case s >= 1:
		return fmt.Sprintf("%g s", s)
	}
	return fmt.Sprintf("%g ms", s*1000)
}

// GateTable is the time-gate table of one fuse standard (or sheet).
type GateTable struct {
	Name   string // short key: "ul248-14", "iec60127-2/3", ...
	Title  string
	Source string
	Gates  []Gate
	// Breaking capacity rule: at least max(BreakingMin, BreakingTimesIn·I_n)
	// A (0 when the table does not give one).
	BreakingMin, BreakingTimesIn float64
	BreakingNote                 string
	BreakingTag                  Tag
}

// For returns the gates that apply to rated current in (A), in table order.
func (t GateTable) For(in float64) []Gate {
	var out []Gate
	for _, g := range t.Gates {
		if g.Applies(in) {
			out = append(out, g)
		}
	}
	return out
}

// MinBreaking returns the table's minimum rated breaking capacity (A) for
// rating in (A), 0 when the table gives none.
func (t GateTable) MinBreaking(in float64) float64 {
	return math.Max(t.BreakingMin, t.BreakingTimesIn*in)
}

const (
	minute = 60.0
	hour   = 3600.0
)

// UL248_14 is the UL/CSA/ANCE 248-14 table for supplementary fuses
// (≤ 600 V) [V Littelfuse Fuseology Selection Guide, standards page],
// REFERENCE §4.2. Example (check 19): I_n = 5 A carries 5 A, opens within
// 60 min at 6.75 A and within 2 min at 10 A. The MIL-PRF-23419 family asks
// more (5 s at 200 % for ≤ 10 A); that is not UL 248-14.
var UL248_14 = GateTable{
	Name:   "ul248-14",
	Title:  "UL/CSA/ANCE 248-14 supplementary fuses",
	Source: "Littelfuse Fuseology Selection Guide, UL 248-14 requirements (REFERENCE §4.2)",
	Gates: []Gate{
		{Multiple: 1.00, Continuous: true, Tag: Verified, Note: "temperature rise ≤ 75 °C"},
		{Multiple: 1.35, Max: 60 * minute, Tag: Verified},
		{Multiple: 2.00, Max: 2 * minute, InUpTo: 30, Tag: Verified, Note: "ratings 0–30 A"},
		{Multiple: 2.00, Max: 4 * minute, InAbove: 30, InUpTo: 60, Tag: Verified, Note: "ratings 35–60 A"},
	},
	BreakingNote: "≥ 10 000 A AC at 125 V; at 250 V see ULInterrupting250V",
	BreakingTag:  Verified,
}

// ULInterruptingBand is one row of the UL 248-14 minimum interrupting
// ratings at 250 V: ratings up to InUpTo (A) need at least Min (A).
type ULInterruptingBand struct{ InUpTo, Min float64 }

// ULInterrupting250V are the UL 248-14 minimum interrupting ratings at
// 250 V [V Littelfuse]: 35 A (0–1 A), 100 A (1.1–3.5 A), 200 A (3.6–10 A),
// 750 A (10.1–15 A), 1500 A (15.1–30 A).
var ULInterrupting250V = []ULInterruptingBand{{1, 35}, {3.5, 100}, {10, 200}, {15, 750}, {30, 1500}}

// ULInterruptingMin returns the UL 248-14 minimum interrupting rating (A)
// at 250 V for rating in (A), and false above 30 A.
func ULInterruptingMin(in float64) (float64, bool) {
	for _, b := range ULInterrupting250V {
		if in <= b.InUpTo*(1+1e-9) {
			return b.Min, true
		}
	}
	return math.NaN(), false
}

// IEC60127Sheet3 is IEC 60127-2 Sheet 3: 5×20 mm time-lag (T), low
// breaking capacity (L) fuse-links; pre-arcing time gates [V Schurter and
// Littelfuse 5×20 glass time-lag datasheets declaring Sheet 3],
// REFERENCE §4.1. Example (check 20): I_n = 1 A: ≥ 60 min at 1.5 A,
// ≤ 120 s at 2.1 A, 0.6–10 s at 2.75 A, 20–300 ms at 10 A.
var IEC60127Sheet3 = GateTable{
	Name:   "iec60127-2/3",
	Title:  "IEC 60127-2 Sheet 3, time-lag (T), low breaking capacity (L)",
	Source: "Schurter and Littelfuse 5×20 glass time-lag datasheets declaring IEC 60127-2 Sheet 3 (REFERENCE §4.1)",
	Gates: []Gate{
		{Multiple: 1.5, Min: 60 * minute, InUpTo: 6.3, Tag: Verified},
		{Multiple: 1.5, Min: 30 * minute, InAbove: 6.3, InUpTo: 20, Tag: Verified, Note: "8–20 A"},
		{Multiple: 2.1, Max: 120, Tag: Verified},
		{Multiple: 2.75, Min: 0.2, Max: 10, InUpTo: 0.1, Tag: Verified, Note: "0.05–0.1 A"},
		{Multiple: 2.75, Min: 0.6, Max: 10, InAbove: 0.1, InUpTo: 20, Tag: Verified, Note: "0.125–20 A"},
		{Multiple: 4, Min: 0.04, Max: 3, InUpTo: 0.1, Tag: Verified, Note: "0.05–0.1 A"},
		{Multiple: 4, Min: 0.15, Max: 3, InAbove: 0.1, Tag: Verified, Note: "≥ 0.125 A"},
		{Multiple: 10, Min: 0.01, Max: 0.3, InUpTo: 0.1, Tag: Verified, Note: "0.05–0.1 A"},
		{Multiple: 10, Min: 0.02, Max: 0.3, InAbove: 0.1, Tag: Verified, Note: "≥ 0.125 A"},
	},
	BreakingMin: 35, BreakingTimesIn: 10, BreakingTag: Verified,
	BreakingNote: "35 A or 10·I_n, whichever is larger (250 V AC)",
}

// IEC60127Sheet5 is IEC 60127-2 Sheet 5: time-lag (T), high breaking
// capacity (H) [V Schurter ceramic SMD time-lag, Littelfuse and Bel 5×20
// ceramic time-lag datasheets], REFERENCE §4.1. The 1.5·I_n rows above
// 6.3 A are partly maker values outside the sheet.
var IEC60127Sheet5 = GateTable{
	Name:   "iec60127-2/5",
	Title:  "IEC 60127-2 Sheet 5, time-lag (T), high breaking capacity (H)",
	Source: "Schurter, Littelfuse and Bel 5×20 ceramic time-lag datasheets declaring IEC 60127-2 Sheet 5 (REFERENCE §4.1)",
	Gates: []Gate{
		{Multiple: 1.5, Min: 60 * minute, InUpTo: 6.3, Tag: Verified},
		{Multiple: 1.5, Min: 30 * minute, InAbove: 6.3, InUpTo: 10, Tag: Verified, Note: "8–10 A, partly maker values"},
		{Multiple: 1.5, Min: 15 * minute, InAbove: 10, InUpTo: 16, Tag: Verified, Note: "12.5–16 A, partly maker values"},
		{Multiple: 2.1, Max: 30 * minute, Tag: Verified},
		{Multiple: 2.75, Min: 0.25, Max: 80, InUpTo: 0.8, Tag: Verified, Note: "≤ 0.8 A"},
		{Multiple: 2.75, Min: 0.75, Max: 80, InAbove: 0.8, Tag: Verified, Note: "≥ 1 A"},
		{Multiple: 4, Min: 0.05, Max: 5, InUpTo: 0.8, Tag: Verified, Note: "≤ 0.8 A"},
		{Multiple: 4, Min: 0.095, Max: 5, InAbove: 0.8, InUpTo: 3.15, Tag: Verified, Note: "1–3.15 A"},
		{Multiple: 4, Min: 0.15, Max: 5, InAbove: 3.15, Tag: Verified, Note: "≥ 4 A"},
		{Multiple: 10, Min: 0.01, Max: 0.15, InAbove: 0.8, InUpTo: 3.15, Tag: Verified, Note: "1–3.15 A"},
		{Multiple: 10, Min: 0.02, Max: 0.15, InAbove: 3.15, Tag: Verified, Note: "≥ 4 A"},
	},
	BreakingMin: 1500, BreakingTag: Verified, BreakingNote: "1500 A (250 V AC)",
}

// IEC60127Sheet1 is IEC 60127-2 Sheet 1: quick-acting (F), high breaking
// capacity (H). The gate values are from memory [M] and must be checked
// against the standard (REFERENCE §9); the 1500 A breaking capacity is [V].
var IEC60127Sheet1 = GateTable{
	Name:   "iec60127-2/1",
	Title:  "IEC 60127-2 Sheet 1, quick-acting (F), high breaking capacity (H)",
	Source: "from memory, unverified (REFERENCE §4.1); breaking capacity from maker datasheets",
	Gates: []Gate{
		{Multiple: 1.5, Min: 60 * minute, Tag: Memory},
		{Multiple: 2.1, Max: 30 * minute, Tag: Memory},
		{Multiple: 2.75, Min: 0.01, Max: 2, Tag: Memory},
		{Multiple: 4, Min: 0.003, Max: 0.3, Tag: Memory},
		{Multiple: 10, Max: 0.02, Tag: Memory},
	},
	BreakingMin: 1500, BreakingTag: Verified, BreakingNote: "1500 A (maker range 500–1500 A by rating)",
}

// IEC60127Sheet2 is IEC 60127-2 Sheet 2: quick-acting (F), low breaking
// capacity (L). All values from memory [M] (REFERENCE §4.1, §9).
var IEC60127Sheet2 = GateTable{
	Name:   "iec60127-2/2",
	Title:  "IEC 60127-2 Sheet 2, quick-acting (F), low breaking capacity (L)",
	Source: "from memory, unverified (REFERENCE §4.1)",
	Gates: []Gate{
		{Multiple: 1.5, Min: 60 * minute, Tag: Memory},
		{Multiple: 2.1, Max: 30 * minute, Tag: Memory},
		{Multiple: 2.75, Min: 0.01, Max: 0.5, Tag: Memory},
		{Multiple: 4, Min: 0.003, Max: 0.1, Tag: Memory},
		{Multiple: 10, Max: 0.02, Tag: Memory},
	},
	BreakingMin: 35, BreakingTimesIn: 10, BreakingTag: Memory,
	BreakingNote: "35 A or 10·I_n, whichever is larger",
}

// ISO8820Blade holds typical blade-fuse operating-time gates from maker data
// referring to ISO 8820-3 [M, not confirmed: verify against the standard's
// table for each fuse type]; breaking capacity 1000 A [V ISO 8820-3 scope].
var ISO8820Blade = GateTable{
	Name:   "iso8820-3",
	Title:  "ISO 8820-3 blade fuses (types C, E, F), typical maker gates",
	Source: "maker data referring to ISO 8820-3, from memory, unverified (REFERENCE §4.5)",
	Gates: []Gate{
		{Multiple: 1.10, Min: 100 * hour, Tag: Memory},
		{Multiple: 1.35, Min: 0.75, Max: 600, Tag: Memory, Note: "some types up to 1800 s"},
		{Multiple: 2.00, Min: 0.15, Max: 5, Tag: Memory},
		{Multiple: 3.50, Min: 0.08, Max: 0.5, Tag: Memory},
		{Multiple: 6.00, Min: 0.02, Max: 0.1, Tag: Memory},
	},
	BreakingMin: 1000, BreakingTag: Verified, BreakingNote: "1000 A at 32 V or 58 V (ISO 8820-3 scope)",
}

// GateTables lists every table in this package.
var GateTables = []*GateTable{&UL248_14, &IEC60127Sheet1, &IEC60127Sheet2, &IEC60127Sheet3, &IEC60127Sheet5, &ISO8820Blade}
