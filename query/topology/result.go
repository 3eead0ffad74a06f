package topology

import (
	"fmt"
	"strings"
)

// Topology names a reverse-polarity protection topology.
type Topology string

// The four topologies (names are partsieve's own).
const (
	SeriesDiode Topology = "series-diode" // rectifier or Schottky in series
	ShuntFuse   Topology = "shunt-fuse"   // series fuse, shunt diode across the input behind it
	PFETHigh    Topology = "pfet-high"    // high-side P-MOSFET, Zener gate clamp, gate resistor
	NFETLow     Topology = "nfet-low"     // low-side N-MOSFET in the ground return
)

// Topologies lists every topology in display order.
var Topologies = []Topology{SeriesDiode, ShuntFuse, PFETHigh, NFETLow}

// Title describes the topology in words.
func (t Topology) Title() string {
	switch t {
	case SeriesDiode:
		return "series diode (rectifier or Schottky)"
	case ShuntFuse:
		return "series fuse with a shunt diode across the input (crowbar)"
	case PFETHigh:
		return "high-side P-MOSFET with Zener gate clamp and gate resistor"
	case NFETLow:
		return "low-side N-MOSFET in the ground return, Zener gate clamp and gate resistor"
	}
	return string(t)
}

// ParseTopology reads a topology name.
func ParseTopology(s string) (Topology, error) {
	w := strings.ToLower(strings.TrimSpace(s))
	for _, t := range Topologies {
		if string(t) == w {
			return t, nil
		}
	}
	names := make([]string, len(Topologies))
	for i, t := range Topologies {
		names[i] = string(t)
	}
	return "", fmt.Errorf("unknown topology %q (one of %s)", s, strings.Join(names, ", "))
}

// RankBy orders the candidates of a topology.
type RankBy string

// Rankings.
const (
	RankLoss   RankBy = "loss"   // lowest stage loss first
	RankMargin RankBy = "margin" // largest smallest-margin first
	RankCost   RankBy = "cost"   // lowest unit cost at the build quantity first; uncosted last
)

// ParseRank reads a ranking name.
func ParseRank(s string) (RankBy, error) {
	switch RankBy(strings.ToLower(strings.TrimSpace(s))) {
	case RankLoss, "":
		return RankLoss, nil
	case RankMargin:
		return RankMargin, nil
	case RankCost:
		return RankCost, nil
	}
	return "", fmt.Errorf("unknown ranking %q (one of loss, margin, cost)", s)
}

// Options tune a pick.
type Options struct {
	// Top is the number of candidates shown per topology (default 5).
	Top int
	// Rank orders the candidates (default RankLoss).
	Rank RankBy
	// Topologies restricts the pick; nil means all four.
	Topologies []Topology
	// PairsPerFuse is how many shunt diodes are kept per qualifying fuse
	// (default 2): the best by the ranking among those whose surge rating
	// covers the fuse's clearing I²t.
	PairsPerFuse int
}

func (o Options) withDefaults() Options {
	if o.Top <= 0 {
		o.Top = 5
	}
	if o.Rank == "" {
		o.Rank = RankLoss
	}
	if len(o.Topologies) == 0 {
		o.Topologies = Topologies
	}
	if o.PairsPerFuse <= 0 {
		o.PairsPerFuse = 2
	}
	return o
}

func (o Options) wants(t Topology) bool {
	for _, x := range o.Topologies {
		if x == t {
			return true
		}
	}
	return false
}

// PartRef is one catalog part of a candidate, with its role and the best
// offer at the build quantity.
type PartRef struct {
	Role    string `json:"role"`
	Mfr     string `json:"mfr"`
	MPN     string `json:"mpn"`
	Type    string `json:"type,omitempty"`
	Package string `json:"package,omitempty"`
	// UnitPrice is in the build currency (null when not costed).
	UnitPrice Num    `json:"unit_price"`
	Supplier  string `json:"supplier,omitempty"`
	// Stock is the chosen offer's stock (absent when unknown).
	Stock     *int64 `json:"stock,omitempty"`
	PriceNote string `json:"price_note,omitempty"`
}

// GateResistor is the computed gate resistor of a MOSFET stage.
type GateResistor struct {
	// Value is the E12 resistance (Ω).
	Value Num `json:"value"`
	// Power is the dissipation at the highest input (transient, or the
	// reversed supply for nfet-low), PowerSteady at v_max (W).
	Power       Num `json:"power"`
	PowerSteady Num `json:"power_steady"`
	// Rating is the resistor power rating assumed (W).
	Rating Num `json:"rating"`
	// Quiescent is the current drawn through the clamp at v_nom (A).
	Quiescent Num `json:"quiescent_current"`
}

// Candidate is one qualifying design of a topology.
type Candidate struct {
	Rank         int           `json:"rank"`
	Parts        []PartRef     `json:"parts"`
	GateResistor *GateResistor `json:"gate_resistor,omitempty"`
	// Loss is the whole stage's dissipation at its worse corner (W): the
	// hot corner for MOSFETs and fuses, usually the cold one for a series
	// diode (V_F falls with temperature).
	Loss Num `json:"loss"`
	// Drop is the stage's voltage drop at its worse corner (V), named by
	// DropCorner ("hot" or "cold").
	Drop       Num    `json:"drop"`
	DropCorner string `json:"drop_corner"`
	// TjHot is the hottest junction at the hot corner (°C); for the
	// shunt-fuse stage, the shunt diode's junction in operation.
	TjHot Num `json:"tj_hot"`
	// FaultCurrent and ClampVoltage (shunt-fuse only) are the reversed
	// supply's current through the shunt diode and the reverse voltage the
	// load then sees.
	FaultCurrent Num `json:"fault_current,omitempty"`
	ClampVoltage Num `json:"clamp_voltage,omitempty"`
	// MinMargin is the smallest margin over all checks, MinMarginCheck the
	// check that has it.
	MinMargin      Num    `json:"min_margin"`
	MinMarginCheck string `json:"min_margin_check"`
	// Cost is the sum of the parts' unit prices in Currency (null when a
	// part is not costed); the gate resistor is not included.
	Cost     Num    `json:"cost"`
	Currency string `json:"currency"`
	// Stock is the smallest stock among the parts' chosen offers.
	Stock   *int64   `json:"stock,omitempty"`
	Unsafe  bool     `json:"unsafe,omitempty"`
	Hazards []string `json:"hazards,omitempty"`
	Checks  []Check  `json:"checks"`
}

// Elimination counts the parts a check eliminated: each part counts once,
// under the first check it failed (checks run in a fixed order).
type Elimination struct {
	Check string `json:"check"`
	Role  string `json:"role"`
	Count int    `json:"count"`
}

// TopologyResult is the pick of one topology.
type TopologyResult struct {
	Topology Topology `json:"topology"`
	Title    string   `json:"title"`
	// Unsafe is set when the topology is ranked out for the application
	// (back-feed), with the reason.
	Unsafe       bool   `json:"unsafe,omitempty"`
	UnsafeReason string `json:"unsafe_reason,omitempty"`
	// Hazards are cautions that hold for every design of the topology here.
	Hazards []string `json:"hazards,omitempty"`
	// Evaluated counts the parts evaluated per role.
	Evaluated map[string]int `json:"evaluated"`
	// Qualified is the number of qualifying candidates before the top-N cut.
	Qualified  int         `json:"qualified"`
	Candidates []Candidate `json:"candidates"`
	// RankedOut holds the best designs that pass every part check but are
	// unsafe for the application (back-feed).
	RankedOut  []Candidate   `json:"ranked_out,omitempty"`
	Eliminated []Elimination `json:"eliminated"`
	// NoneReason says why nothing qualifies, naming the check that
	// eliminated most parts.
	NoneReason string   `json:"none_reason,omitempty"`
	Notes      []string `json:"notes,omitempty"`
}

// CompareRow is one line of the side-by-side comparison: the best
// candidate of a topology.
type CompareRow struct {
	Topology Topology `json:"topology"`
	// Status is "ok", "unsafe" (best design shown, ranked out) or "none".
	Status    string   `json:"status"`
	Parts     string   `json:"parts,omitempty"`
	Loss      Num      `json:"loss"`
	Drop      Num      `json:"drop"`
	Cost      Num      `json:"cost"`
	Currency  string   `json:"currency"`
	MinMargin Num      `json:"min_margin"`
	Hazards   []string `json:"hazards,omitempty"`
}

// Result is the outcome of a pick.
type Result struct {
	Spec       string           `json:"spec"`
	Policy     string           `json:"policy"`
	Rank       RankBy           `json:"rank"`
	Top        int              `json:"top"`
	Quantity   int64            `json:"quantity"`
	Currency   string           `json:"currency"`
	Topologies []TopologyResult `json:"topologies"`
	Comparison []CompareRow     `json:"comparison"`
	// Notes repeat the spec's notes (defaults taken, soft findings).
	Notes []string `json:"notes,omitempty"`
	// Cautions end every result.
	Cautions []string `json:"cautions"`
}

// Qualified reports whether any topology has a qualifying (safe)
// candidate; the pick command exits with its "none qualifies" code when
// it does not.
func (r *Result) Qualified() bool {
	for _, t := range r.Topologies {
		if len(t.Candidates) > 0 {
			return true
		}
	}
	return false
}

// TopEliminator returns the check that eliminated most parts over all
// topologies of the result.
func (r *Result) TopEliminator() (Elimination, Topology, bool) {
	var best Elimination
	var bt Topology
	for _, t := range r.Topologies {
		for _, e := range t.Eliminated {
			if e.Count > best.Count {
				best, bt = e, t.Topology
			}
		}
	}
	return best, bt, best.Count > 0
}

// Cautions are printed at the end of every result.
var Cautions = []string{
	"Simplified models: datasheet maximum values combined with typical temperature factors; results are estimates, not guarantees.",
	"Verify every pick against the maker's datasheet and test it in the application.",
	"Follow the electrical codes and licensed practice that apply where the product is built and used.",
	"Batteries and vehicle supplies can deliver hundreds of amps into a short: size wiring, fuses and shunt diodes for the real fault current.",
	"Values marked [M] are unverified defaults from memory; replace them with the figures of the standard you hold.",
}
