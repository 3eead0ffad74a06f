// Package spec reads the application spec of `partsieve need` and
// `partsieve pick`: a TOML file that describes the supply envelope, the
// load, the ambient temperature range, the budgets, the derating policy
// and the build quantity, once, so that every protection topology can be
// sized from it.
//
// Values are numbers in base SI units (V, A, Ω, W, A²s, s; temperatures in
// °C) or strings with units read by the project's unit parser ("20 mΩ",
// "-40 °C", "60 s"); each key has one dimension and a unit of another is
// refused. Parse collects every problem of a file (unknown keys with a
// suggestion, missing keys, wrong units, values out of range and
// contradictions) and returns them together, each naming the file, the
// line and the key:
//
//	spec.toml:7: load.i_mx: unknown key; did you mean load.i_max?
//	spec.toml:4: supply.v_max: unit "A" is a current; this key wants a voltage (got "16 A")
//
// The keys and their meaning are in Template, which `partsieve need
// --template` prints, and in Keys.
package spec

import (
	"math"
	"strings"

	"partsieve/query/derate"
)

// SupplyKind says what feeds the input. Batteries and vehicles deliver
// large fault currents (hundreds of amps through a few tens of mΩ).
type SupplyKind string

// Supply kinds.
const (
	Battery SupplyKind = "battery"
	Vehicle SupplyKind = "vehicle"
	Adapter SupplyKind = "adapter"
	Bench   SupplyKind = "bench"
	Bus     SupplyKind = "bus"
)

// SupplyKinds lists the accepted kinds.
var SupplyKinds = []SupplyKind{Battery, Vehicle, Adapter, Bench, Bus}

// SteadyReverseTime is the reversal length (s) from which reverse bias is
// judged on the thermal steady state: about five junction-to-ambient time
// constants of small packages (DESIGN "reverse_time"; a tool choice).
const SteadyReverseTime = 10.0

// Spec is a validated application spec. Values are in base SI units,
// temperatures in °C.
type Spec struct {
	// File is the name the spec was read from (used in messages).
	File    string  `json:"file"`
	Supply  Supply  `json:"supply"`
	Load    Load    `json:"load"`
	Ambient Ambient `json:"ambient"`
	Budget  Budget  `json:"budget"`
	Policy  Policy  `json:"policy"`
	Build   Build   `json:"build"`
	// Notes explain defaults taken and soft findings (not errors), e.g.
	// which of the drop budget and the voltage headroom governs.
	Notes []string `json:"notes,omitempty"`
}

// Supply is the [supply] table.
type Supply struct {
	Kind SupplyKind `json:"kind"`
	// VMin, VNom, VMax: lowest, nominal and highest steady input (V).
	VMin float64 `json:"v_min"`
	VNom float64 `json:"v_nom"`
	VMax float64 `json:"v_max"`
	// VTransient is the highest short (clamped) transient (V); 0 when the
	// spec gives none.
	VTransient float64 `json:"v_transient,omitempty"`
	// VReverse is the magnitude of the reversed supply (V).
	VReverse float64 `json:"v_reverse"`
	// ReverseTime is how long the reversal lasts (s); 0 with
	// ReverseContinuous.
	ReverseTime       float64 `json:"reverse_time,omitempty"`
	ReverseContinuous bool    `json:"reverse_continuous,omitempty"`
	// RSource is the source plus wiring resistance (Ω); it sets the
	// fault current.
	RSource float64 `json:"r_source"`
	// Shared is true when other loads share this input.
	Shared bool `json:"shared,omitempty"`
}

// VInMax returns the highest input in normal operation (V): the transient
// when given, else v_max. It applies to every rating that sees the input
// in normal operation (DESIGN "v_transient").
func (s Supply) VInMax() float64 { return math.Max(s.VMax, s.VTransient) }

// SteadyReverse reports whether the reversal is judged on the thermal
// steady state: continuous, or SteadyReverseTime or longer.
func (s Supply) SteadyReverse() bool {
	return s.ReverseContinuous || s.ReverseTime >= SteadyReverseTime
}

// HighFaultCurrent reports whether the source kind delivers large fault
// currents (battery, vehicle).
func (s Supply) HighFaultCurrent() bool { return s.Kind == Battery || s.Kind == Vehicle }

// Load is the [load] table.
type Load struct {
	// IMax is the highest steady load current (A).
	IMax float64 `json:"i_max"`
	// VMin is the lowest input the load works at, after the protection (V).
	VMin float64 `json:"v_min"`
	// VReverseMax is the reverse voltage the load survives (V, magnitude).
	VReverseMax float64 `json:"v_reverse_max"`
	// Backfeed is true when the load side can push current back.
	Backfeed bool `json:"backfeed,omitempty"`
	// VHoldup is the voltage the load side keeps while the input is
	// reversed (V): the spec's value, else supply.v_max with backfeed,
	// else 0.
	VHoldup float64 `json:"v_holdup"`
	// Inrush: I²t of one start-up pulse (A²s), its length (s) and the
	// number of pulses in the product's life; HasInrush when given.
	HasInrush    bool    `json:"has_inrush,omitempty"`
	InrushI2t    float64 `json:"inrush_i2t,omitempty"`
	InrushTime   float64 `json:"inrush_time,omitempty"`
	InrushPulses float64 `json:"inrush_pulses,omitempty"`
}

// Ambient is the [ambient] table (°C).
type Ambient struct {
	TMin float64 `json:"t_min"`
	TMax float64 `json:"t_max"`
}

// Budget is the [budget] table. Budgets cover the whole protection stage.
type Budget struct {
	HasDrop bool    `json:"has_drop,omitempty"`
	DropMax float64 `json:"drop_max,omitempty"` // V
	HasLoss bool    `json:"has_loss,omitempty"`
	LossMax float64 `json:"loss_max,omitempty"` // W
}

// Policy is the [policy] table, resolved.
type Policy struct {
	// Derating is the profile name as written (a built-in or custom name).
	Derating string `json:"derating"`
	// Overrides are the per-factor overrides written under [policy].
	Overrides map[string]float64 `json:"overrides,omitempty"`
	// Profile is the resolved profile: the built-in or custom one with the
	// overrides applied.
	Profile derate.Profile `json:"-"`
}

// Build is the [build] table.
type Build struct {
	Quantity int64  `json:"quantity"`
	Currency string `json:"currency"`
	// Rates convert offer currencies to Currency: 1 unit of the key's
	// currency is worth Rates[key] units of Currency.
	Rates map[string]float64 `json:"rates,omitempty"`
}

// DropLimit returns the largest voltage the protection stage may drop
// (V): supply.v_min − load.v_min, tightened by budget.drop_max when given,
// and which of the two governs.
func (s *Spec) DropLimit() (v float64, governs string) {
	head := s.Supply.VMin - s.Load.VMin
	if s.Budget.HasDrop && s.Budget.DropMax < head {
		return s.Budget.DropMax, "budget.drop_max"
	}
	return head, "supply.v_min − load.v_min"
}

// BackfeedReason returns why a single-MOSFET stage would conduct
// backwards in this application, or "" when nothing back-feeds.
func (s *Spec) BackfeedReason() string {
	var why []string
	if s.Load.Backfeed {
		why = append(why, "the load side can push current back (load.backfeed = true)")
	}
	if s.Supply.Shared {
		why = append(why, "other loads share the input (supply.shared = true)")
	}
	if s.Load.VHoldup > 0 && !s.Load.Backfeed {
		why = append(why, "the load side holds up a voltage while the input is reversed (load.v_holdup)")
	}
	return strings.Join(why, "; ")
}
