package derate

import (
	"errors"
	"fmt"
	"math"
	"partsieve/internal/suggest"
	"sort"
	"strings"

	"partsieve/query/physics"
)

// Factor is one derating factor or model default of a profile.
type Factor struct {
	// Name is the canonical name used in specs and printed by need
	// (k_vrrm, tj_limit, rdson_alpha, ...).
	Name string
	// Label says what the factor limits, in words.
	Label string
	// Unit is "" for ratios, else "°C", "K", "%/K", "V/K" or "× I_n".
	Unit  string
	Value float64
	// Source names the document the value comes from.
	Source string
	Tag    physics.Tag
	// Why says why this value was chosen for this profile.
	Why string
	// Min and Max bound the values an override may set (inclusive).
	Min, Max float64
	// MinOpen makes the lower bound exclusive (ratios must be > 0).
	MinOpen bool
}

// Confidence returns the label shown to users: "unverified default" for a
// value from memory ([M]), "user override" ([U]), "derived" ([D]) or
// "verified" ([V]).
func (f Factor) Confidence() string {
	switch f.Tag {
	case physics.Memory:
		return "unverified default"
	case physics.User:
		return "user override"
	case physics.Derived:
		return "derived"
	case physics.Verified:
		return "verified"
	}
	return "unknown confidence"
}

// Unverified reports whether the factor must be shown as an unverified
// default (tag [M]).
func (f Factor) Unverified() bool { return f.Tag.Unverified() }

// String formats the factor for a requirement listing:
// "k_vrrm = 0.8 [M] unverified default (commercial/industrial practice, REFERENCE §5.1)".
func (f Factor) String() string {
	v := fmt.Sprintf("%s = %g", f.Name, f.Value)
	if f.Unit != "" {
		v += " " + f.Unit
	}
	return fmt.Sprintf("%s %v %s (%s)", v, f.Tag, f.Confidence(), f.Source)
}

func (f Factor) check(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "not a finite number"
	}
	lowOK := v >= f.Min
	if f.MinOpen {
		lowOK = v > f.Min
	}
	if lowOK && v <= f.Max {
		return ""
	}
	lo := "≤"
	if f.MinOpen {
		lo = "<"
	}
	unit := ""
	if f.Unit != "" {
		unit = " " + f.Unit
	}
	return fmt.Sprintf("want %g %s value ≤ %g%s", f.Min, lo, f.Max, unit)
}

// RatingStep is one row of a fuse-rating-dependent continuous-current
// table: fuses rated at least In (A) may carry Factor × I_n (until the next
// row).
type RatingStep struct{ In, Factor float64 }

// Profile is a derating policy.
type Profile struct {
	Name  string
	Title string
	// Base is the built-in profile a custom profile starts from ("" for a
	// built-in one).
	Base string

	// Diodes (REFERENCE §5.1).
	KVRRM   Factor // reverse voltage: V_applied ≤ k·V_RRM
	KIFAV   Factor // forward current: I_F(AV) ≤ k·I_F(AV),rated
	KIFSM   Factor // surge current: I_pk ≤ k·I_FSM (I²t capability (k·I_FSM)²·t_p/2)
	KPZ     Factor // Zener power: P_Z ≤ k·P_Z,rated
	KTVSPpk Factor // TVS peak pulse power: P_pk ≤ k·P_PK

	// Junction temperature rule: T_j ≤ min(TjLimit, T_jmax − margin).
	TjLimit       Factor // absolute cap, °C
	TjMarginDiode Factor // K below T_jmax, diodes
	TjMarginFET   Factor // K below T_jmax, MOSFETs

	// MOSFETs (REFERENCE §5.2).
	KVDS Factor // V_DS ≤ k·V_DS,rated
	KVGS Factor // |V_GS| ≤ k·V_GS,max
	KID  Factor // I_D ≤ k·I_D,rated
	KPD  Factor // P ≤ k·P_D,rated

	// Fuses (REFERENCE §5.3, §4.3–§4.4).
	KFuseUL    Factor // UL 248-14-style continuous-current factor
	KFuseIEC   Factor // IEC 60127-style continuous-current factor
	KFuseBlade Factor // ISO 8820 blade continuous-current factor
	KFuseOpen  Factor // crowbar fault current ≥ k·I_n so the fuse opens
	FuseTC     Factor // default rerating slope, %/K above FuseTCKnee
	FuseTCKnee Factor // °C
	// FuseByRating, when not nil, further limits the continuous-current
	// factor by the fuse's rating (small fuses derate more).
	FuseByRating       []RatingStep
	FuseByRatingSource string
	FuseByRatingTag    physics.Tag
	// Pulse is the pulse-factor table for repeated inrush.
	Pulse physics.PulseTable

	// Model defaults (overridable as rdson_alpha, vf_tc, ir_doubling).
	RdsonAlpha   Factor // %/K
	VFTCPN       Factor // V/K
	VFTCSchottky Factor // V/K
	IRDoubling   Factor // K
}

// fields returns pointers to every Factor in display order.
func (p *Profile) fields() []*Factor {
	return []*Factor{
		&p.KVRRM, &p.KIFAV, &p.KIFSM, &p.KPZ, &p.KTVSPpk,
		&p.TjLimit, &p.TjMarginDiode, &p.TjMarginFET,
		&p.KVDS, &p.KVGS, &p.KID, &p.KPD,
		&p.KFuseUL, &p.KFuseIEC, &p.KFuseBlade, &p.KFuseOpen, &p.FuseTC, &p.FuseTCKnee,
		&p.RdsonAlpha, &p.VFTCPN, &p.VFTCSchottky, &p.IRDoubling,
	}
}

// Factors returns copies of every factor in display order.
func (p Profile) Factors() []Factor {
	fs := p.fields()
	out := make([]Factor, len(fs))
	for k, f := range fs {
		out[k] = *f
	}
	return out
}

// Factor returns the factor named name (canonical name, case-insensitive).
func (p Profile) Factor(name string) (Factor, bool) {
	name = strings.ToLower(strings.TrimSpace(name))
	for _, f := range p.fields() {
		if f.Name == name {
			return *f, true
		}
	}
	return Factor{}, false
}

// Unverified returns the factors shown as "unverified default".
func (p Profile) Unverified() []Factor {
	var out []Factor
	for _, f := range p.fields() {
		if f.Unverified() {
			out = append(out, *f)
		}
	}
	return out
}

// aliases are override names that set several factors at once.
var aliases = map[string][]string{
	"vf_tc":     {"vf_tc_pn", "vf_tc_schottky"},
	"tj_margin": {"tj_margin_diode", "tj_margin_fet"},
}

// FactorNames returns every name an override may use, sorted: the
// canonical factor names and the aliases vf_tc (both diode classes) and
// tj_margin (diodes and MOSFETs).
func FactorNames() []string {
	p := commercial()
	var out []string
	for _, f := range p.fields() {
		out = append(out, f.Name)
	}
	for a := range aliases {
		out = append(out, a)
	}
	sort.Strings(out)
	return out
}

// OverrideError explains why a factor override was refused.
type OverrideError struct {
	Name    string
	Value   float64
	Reason  string
	Suggest string // a close known name for an unknown one ("" if none)
}

func (e *OverrideError) Error() string {
	msg := fmt.Sprintf("derating factor %q = %g: %s", e.Name, e.Value, e.Reason)
	if e.Suggest != "" {
		msg += fmt.Sprintf(" (did you mean %q?)", e.Suggest)
	}
	return msg
}

// ErrUnknownFactor is matched (errors.Is) by an OverrideError for a name
// that is not a factor.
var ErrUnknownFactor = errors.New("unknown derating factor")

// Is makes errors.Is(err, ErrUnknownFactor) true for unknown names.
func (e *OverrideError) Is(target error) bool {
	return target == ErrUnknownFactor && e.Reason == "unknown factor"
}

// WithOverrides returns a copy of p with the factors in ov replaced
// (names case-insensitive; aliases vf_tc and tj_margin set both members).
// An overridden factor gets tag [U], source "spec override" and a Why
// naming the profile value it replaced. Unknown names (with a suggestion)
// and out-of-range values are refused; all problems are returned at once
// (errors.Join of *OverrideError, in name order), and p is returned
// unchanged with the error.
func (p Profile) WithOverrides(ov map[string]float64) (Profile, error) {
	if len(ov) == 0 {
		return p, nil
	}
	names := make([]string, 0, len(ov))
	for n := range ov {
		names = append(names, n)
	}
	sort.Strings(names)
	q := p
	var errs []error
	for _, raw := range names {
		v := ov[raw]
		name := strings.ToLower(strings.TrimSpace(raw))
		targets := aliases[name]
		if targets == nil {
			targets = []string{name}
		}
		for _, tn := range targets {
			f := q.field(tn)
			if f == nil {
				errs = append(errs, &OverrideError{Name: raw, Value: v, Reason: "unknown factor", Suggest: didYouMean(name)})
				break
			}
			if why := f.check(v); why != "" {
				errs = append(errs, &OverrideError{Name: raw, Value: v, Reason: why})
				break
			}
			f.Why = fmt.Sprintf("set by the spec; the %s profile has %g (%s)", p.Name, f.Value, f.Source)
			f.Value = v
			f.Tag = physics.User
			f.Source = "spec override"
		}
	}
	if len(errs) > 0 {
		return p, errors.Join(errs...)
	}
	return q, nil
}

func (p *Profile) field(name string) *Factor {
	for _, f := range p.fields() {
		if f.Name == name {
			return f
		}
	}
	return nil
}

// didYouMean returns the known factor or alias name closest to name, or "".
func didYouMean(name string) string {
	best, bestD := "", 4
	for _, n := range FactorNames() {
		d := suggest.Distance(name, n)
		if strings.HasPrefix(n, name) && len(name) >= 3 {
			d = 1
		}
		if d < bestD {
			best, bestD = n, d
		}
	}
	return best
}

// builtins maps each built-in profile name to its constructor.
var builtins = []struct {
	name string
	make func() Profile
}{
	{"commercial", commercial},
	{"industrial", industrial},
	{"high-reliability", highReliability},
}

// profileAliases are accepted spellings of built-in names.
var profileAliases = map[string]string{
	"hirel": "high-reliability", "hi-rel": "high-reliability", "high-rel": "high-reliability",
	"highrel": "high-reliability", "high_reliability": "high-reliability", "high reliability": "high-reliability",
}

// Names returns the built-in profile names in order of strictness.
func Names() []string {
	out := make([]string, len(builtins))
	for k, b := range builtins {
		out[k] = b.name
	}
	return out
}

// Builtin returns the built-in profiles in order of strictness.
func Builtin() []Profile {
	out := make([]Profile, len(builtins))
	for k, b := range builtins {
		out[k] = b.make()
	}
	return out
}

// ErrUnknownProfile is matched (errors.Is) when a profile name is unknown.
var ErrUnknownProfile = errors.New("unknown derating profile")

// Lookup returns the built-in profile named name (case-insensitive; also
// "hirel", "high-rel"). An unknown name gives an error listing the built-in
// names and the closest one.
func Lookup(name string) (Profile, error) {
	n := strings.ToLower(strings.TrimSpace(name))
	if a, ok := profileAliases[n]; ok {
		n = a
	}
	for _, b := range builtins {
		if b.name == n {
			return b.make(), nil
		}
	}
	msg := fmt.Sprintf("%v %q (built in: %s", ErrUnknownProfile, name, strings.Join(Names(), ", "))
	best, bestD := "", 4
	for _, b := range builtins {
		if d := suggest.Distance(n, b.name); d < bestD {
			best, bestD = b.name, d
		}
	}
	if best != "" {
		msg += fmt.Sprintf("; did you mean %q?", best)
	}
	return Profile{}, &profileError{msg: msg + ")"}
}

type profileError struct{ msg string }

func (e *profileError) Error() string        { return e.msg }
func (e *profileError) Is(target error) bool { return target == ErrUnknownProfile }

// NewProfile defines a custom profile name from the built-in profile base
// with the factor overrides ov (as WithOverrides). The name must not be
// empty nor shadow a built-in name.
func NewProfile(name, base string, ov map[string]float64) (Profile, error) {
	n := strings.TrimSpace(name)
	if n == "" {
		return Profile{}, errors.New("custom derating profile: empty name")
	}
	low := strings.ToLower(n)
	if _, err := Lookup(low); err == nil {
		return Profile{}, fmt.Errorf("custom derating profile %q: the name is built in; choose another", name)
	}
	b, err := Lookup(base)
	if err != nil {
		return Profile{}, fmt.Errorf("custom derating profile %q: base: %w", name, err)
	}
	p, err := b.WithOverrides(ov)
	if err != nil {
		return Profile{}, fmt.Errorf("custom derating profile %q: %w", name, err)
	}
	p.Base = b.Name
	p.Name = n
	p.Title = fmt.Sprintf("%s (custom, based on %s)", n, b.Name)
	return p, nil
}

// TjLimitDiode returns the junction-temperature limit (°C) for a diode
// rated tjmax (°C): min(tj_limit, T_jmax − tj_margin_diode). An unknown
// rating (NaN or ≤ 0) gives the cap alone; callers should flag it.
func (p Profile) TjLimitDiode(tjmax float64) float64 { return p.tjLimit(tjmax, p.TjMarginDiode.Value) }

// TjLimitFET returns the MOSFET junction-temperature limit (°C):
// min(tj_limit, T_jmax − tj_margin_fet).
func (p Profile) TjLimitFET(tjmax float64) float64 { return p.tjLimit(tjmax, p.TjMarginFET.Value) }

func (p Profile) tjLimit(tjmax, margin float64) float64 {
	if !(tjmax > 0) || math.IsInf(tjmax, 0) {
		return p.TjLimit.Value
	}
	return math.Min(p.TjLimit.Value, tjmax-margin)
}

// FuseContinuousFactor returns the continuous-current factor K_std for a
// fuse of convention std and rating in (A): the convention's factor
// (k_fuse_ul, k_fuse_iec, k_fuse_blade), further limited by the profile's
// rating table when it has one (the factor of the largest listed rating
// not above in; below the first row, the first row's factor).
func (p Profile) FuseContinuousFactor(std physics.FuseStd, in float64) float64 {
	k := p.KFuseIEC.Value
	switch std {
	case physics.FuseUL:
		k = p.KFuseUL.Value
	case physics.FuseBlade:
		k = p.KFuseBlade.Value
	}
	if len(p.FuseByRating) == 0 {
		return k
	}
	r := p.FuseByRating[0].Factor
	for _, s := range p.FuseByRating {
		if in >= s.In*(1-1e-9) {
			r = s.Factor
		}
	}
	return math.Min(k, r)
}

// FuseRerate returns the default fuse temperature rerating curve: 1.0 up
// to fuse_tc_knee, then falling by fuse_tc percent per kelvin. A fuse's own
// catalog curve (field rerate) takes precedence.
func (p Profile) FuseRerate() physics.RerateCurve {
	return physics.LinearRerate(p.FuseTCKnee.Value, p.FuseTC.Value)
}

// RerateFactor returns K_T at ambient ta (°C) from the part's curve when it
// has one, else from the profile default; fromDefault says which, outside
// whether ta lay outside the curve's points.
func (p Profile) RerateFactor(part physics.RerateCurve, ta float64) (kt float64, fromDefault, outside bool) {
	if part.Len() > 0 {
		kt, outside = part.Factor(ta)
		return kt, false, outside
	}
	kt, outside = p.FuseRerate().Factor(ta)
	return kt, true, outside
}

// PulseFactor returns the pulse factor for n pulses from the profile's
// table, and whether n lies outside the table.
func (p Profile) PulseFactor(n float64) (float64, bool) { return p.Pulse.Factor(n) }

// ForwardTC returns the V_F temperature coefficient (V/K) for a diode
// class and whether it is a user override (then it replaces even a
// coefficient from the part's own two temperature points; see
// physics.ForwardData.TCOverride).
func (p Profile) ForwardTC(c physics.DiodeClass) (tc float64, override bool) {
	f := p.VFTCPN
	if c == physics.Schottky {
		f = p.VFTCSchottky
	}
	return f.Value, f.Tag == physics.User
}

// LeakageDoubling returns the leakage doubling interval (K) and whether it
// is a user override (see physics.LeakageData.Override).
func (p Profile) LeakageDoubling() (k float64, override bool) {
	return p.IRDoubling.Value, p.IRDoubling.Tag == physics.User
}
