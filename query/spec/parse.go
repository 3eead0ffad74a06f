package spec

import (
	"errors"
	"fmt"
	"math"
	"os"
	"partsieve/internal/suggest"
	"sort"
	"strings"

	"github.com/BurntSushi/toml"

	"partsieve/catalog/units"
	"partsieve/query/derate"
)

// Problem is one thing wrong with a spec file.
type Problem struct {
	File string `json:"file"`
	// Line is 1-based; 0 when the problem has no single line (a missing
	// table).
	Line int `json:"line"`
	// Key is the dotted key ("load.i_max"); "" for syntax errors.
	Key string `json:"key,omitempty"`
	Msg string `json:"message"`
}

// Error formats the problem as "file:line: key: message".
func (p Problem) Error() string {
	var b strings.Builder
	b.WriteString(p.File)
	if p.Line > 0 {
		fmt.Fprintf(&b, ":%d", p.Line)
	}
	b.WriteString(": ")
	if p.Key != "" {
		b.WriteString(p.Key)
		b.WriteString(": ")
	}
	b.WriteString(p.Msg)
	return b.String()
}

// Error is every problem found in one spec file, in line order.
type Error struct {
	Problems []Problem `json:"problems"`
}

// Error lists the problems, one per line.
func (e *Error) Error() string {
	lines := make([]string, len(e.Problems))
	for i, p := range e.Problems {
		lines[i] = p.Error()
	}
	return strings.Join(lines, "\n")
}

// valKind is the TOML shape a key takes.
type valKind int

const (
	kNumber   valKind = iota // number or string with unit
	kBool                    // true/false
	kWord                    // string from a fixed set or free
	kDuration                // duration with unit, or "continuous"
	kTable                   // a table of further keys
)

// KeyDoc documents one key of the spec.
type KeyDoc struct {
	Key      string    `json:"key"`
	Dim      units.Dim `json:"-"`
	Unit     string    `json:"unit,omitempty"`
	Required bool      `json:"required"`
	Doc      string    `json:"doc"`
	kind     valKind
	pick     units.Pick
}

func k(key string, kind valKind, d units.Dim, pick units.Pick, req bool, doc string) KeyDoc {
	return KeyDoc{Key: key, Dim: d, Unit: d.Symbol(), Required: req, Doc: doc, kind: kind, pick: pick}
}

// schema lists the fixed keys in template order.
var schema = []KeyDoc{
	k("supply.kind", kWord, units.None, 0, true, "battery | vehicle | adapter | bench | bus (batteries and vehicles deliver large fault currents)"),
	k("supply.v_min", kNumber, units.Voltage, units.Signed, true, "lowest steady input (cranking, undervoltage)"),
	k("supply.v_nom", kNumber, units.Voltage, units.Signed, true, "nominal input"),
	k("supply.v_max", kNumber, units.Voltage, units.Signed, true, "highest steady input"),
	k("supply.v_transient", kNumber, units.Voltage, units.Signed, false, "highest short, clamped transient (e.g. centrally clamped load dump); applies to every rating that sees the input in normal operation"),
	k("supply.v_reverse", kNumber, units.Voltage, units.Magnitude, true, "magnitude of the reversed supply"),
	k("supply.reverse_time", kDuration, units.Time, units.Signed, true, `how long the reversal lasts ("60 s") or "continuous"; 10 s or more is judged on the thermal steady state`),
	k("supply.r_source", kNumber, units.Resistance, units.Signed, true, "source plus wiring resistance; sets the fault current"),
	k("supply.shared", kBool, units.None, 0, false, "true when other loads share this input (a single MOSFET would back-feed them)"),
	k("load.i_max", kNumber, units.Current, units.Signed, true, "highest steady load current"),
	k("load.v_min", kNumber, units.Voltage, units.Signed, true, "lowest input the load works at, after the protection"),
	k("load.v_reverse_max", kNumber, units.Voltage, units.Magnitude, true, "reverse voltage the load survives"),
	k("load.backfeed", kBool, units.None, 0, false, "true when the load side can push current back (battery, supercapacitor, motor)"),
	k("load.v_holdup", kNumber, units.Voltage, units.Signed, false, "voltage the load side keeps while the input is reversed; default 0, or supply.v_max when backfeed = true"),
	k("load.inrush_i2t", kNumber, units.I2t, units.Signed, false, "I²t of one start-up (inrush) pulse"),
	k("load.inrush_time", kNumber, units.Time, units.Signed, false, "length of the inrush pulse (required with inrush_i2t)"),
	k("load.inrush_pulses", kNumber, units.None, units.Signed, false, "number of inrush pulses in the product's life (required with inrush_i2t)"),
	k("ambient.t_min", kNumber, units.Temperature, units.Signed, true, "lowest ambient (cold corner)"),
	k("ambient.t_max", kNumber, units.Temperature, units.Signed, true, "highest ambient (hot corner)"),
	k("budget.drop_max", kNumber, units.Voltage, units.Signed, false, "largest voltage drop of the whole protection stage"),
	k("budget.loss_max", kNumber, units.Power, units.Signed, false, "largest dissipation of the whole protection stage"),
	k("policy.derating", kWord, units.None, 0, false, `"commercial" (default), "industrial", "high-reliability", or a profile defined under [policy.profiles.NAME]`),
	k("policy.profiles", kTable, units.None, 0, false, "custom profiles: [policy.profiles.NAME] with base = a built-in name and factor overrides"),
	k("build.quantity", kNumber, units.None, units.Signed, false, "build quantity; unit prices are taken at this quantity (default 1)"),
	k("build.currency", kWord, units.None, 0, false, "currency of cost ranking and totals, e.g. EUR (default EUR)"),
	k("build.rates", kTable, units.None, 0, false, "[build.rates] USD = 0.92 converts offers in USD; offers in another currency without a rate are not costed"),
}

var tables = []string{"supply", "load", "ambient", "budget", "policy", "build"}

// Keys returns the documentation of every fixed key, in template order,
// followed by the policy factor names (which take plain numbers).
func Keys() []KeyDoc {
	out := append([]KeyDoc(nil), schema...)
	p, _ := derate.Lookup("commercial")
	for _, n := range derate.FactorNames() {
		doc := "derating factor override"
		if f, ok := p.Factor(n); ok {
			doc = f.Label
		} else if n == "vf_tc" {
			doc = "sets vf_tc_pn and vf_tc_schottky"
		} else if n == "tj_margin" {
			doc = "sets tj_margin_diode and tj_margin_fet"
		}
		out = append(out, KeyDoc{Key: "policy." + n, Doc: doc})
	}
	return out
}

func schemaKey(key string) (KeyDoc, bool) {
	for _, d := range schema {
		if d.Key == key {
			return d, true
		}
	}
	return KeyDoc{}, false
}

func isFactor(name string) bool {
	for _, n := range derate.FactorNames() {
		if n == name {
			return true
		}
	}
	return false
}

// ReadFile reads and parses the spec file at path.
func ReadFile(path string) (*Spec, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("spec: %w", err)
	}
	return Parse(path, data)
}

// parser collects problems while reading one file.
type parser struct {
	file     string
	lines    map[string]int
	problems []Problem
}

func (p *parser) line(key string) int {
	for key != "" {
		if ln, ok := p.lines[key]; ok {
			return ln
		}
		i := strings.LastIndexByte(key, '.')
		if i < 0 {
			break
		}
		key = key[:i]
	}
	return 0
}

func (p *parser) add(key, format string, args ...any) {
	p.problems = append(p.problems, Problem{File: p.file, Line: p.line(key), Key: key, Msg: fmt.Sprintf(format, args...)})
}

// Parse reads a spec from data; name is used in messages. Every problem
// found is returned in one *Error, in line order.
func Parse(name string, data []byte) (*Spec, error) {
	if name == "" {
		name = "spec"
	}
	p := &parser{file: name}
	var raw map[string]any
	md, err := toml.Decode(string(data), &raw)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			msg := pe.Message
			return nil, &Error{Problems: []Problem{{File: name, Line: pe.Position.Line, Msg: "TOML syntax: " + msg}}}
		}
		return nil, &Error{Problems: []Problem{{File: name, Msg: "TOML: " + err.Error()}}}
	}
	p.lines = keyLines(string(data))
	for _, key := range md.Keys() {
		p.known(key)
	}
	s := &Spec{File: name}
	p.read(raw, s)
	if len(p.problems) > 0 {
		sort.SliceStable(p.problems, func(i, j int) bool {
			a, b := p.problems[i].Line, p.problems[j].Line
			if a == 0 || b == 0 {
				return a != 0 && b == 0
			}
			return a < b
		})
		return nil, &Error{Problems: p.problems}
	}
	return s, nil
}

// known reports a key that the spec does not define, with a suggestion.
func (p *parser) known(key toml.Key) {
	full := joinKey(key)
	switch len(key) {
	case 1:
		for _, t := range tables {
			if key[0] == t {
				return
			}
		}
		p.add(full, "unknown %s%s", kindWord(len(key)), p.suggest(key[0], true))
		return
	case 2:
		if _, ok := schemaKey(full); ok {
			return
		}
		if key[0] == "policy" && isFactor(key[1]) {
			return
		}
		if !isTable(key[0]) {
			return // reported at the table
		}
		p.add(full, "unknown key%s", p.suggest(full, false))
	case 3:
		if key[0] == "policy" && key[1] == "profiles" {
			return
		}
		if key[0] == "build" && key[1] == "rates" {
			return
		}
		if _, ok := schemaKey(joinKey(key[:2])); ok || !isTable(key[0]) {
			return // a value used as a table is reported when read
		}
		p.add(full, "unknown key%s", p.suggest(full, false))
	case 4:
		if key[0] == "policy" && key[1] == "profiles" {
			if key[3] == "base" || isFactor(key[3]) {
				return
			}
			p.add(full, "unknown key in a custom profile (base or a factor name)%s", suggestFrom(key[3], append([]string{"base"}, derate.FactorNames()...)))
		}
	}
}

func kindWord(n int) string {
	if n == 1 {
		return "table or key"
	}
	return "key"
}

func isTable(name string) bool {
	for _, t := range tables {
		if t == name {
			return true
		}
	}
	return false
}

// suggest proposes the closest known key (or table when top).
func (p *parser) suggest(name string, top bool) string {
	var cands []string
	if top {
		cands = append(cands, tables...)
		for _, d := range schema {
			cands = append(cands, d.Key)
		}
		// a bare key written outside its table: match the last part
		for _, d := range schema {
			if strings.HasSuffix(d.Key, "."+name) {
				return fmt.Sprintf("; keys belong in a table: did you mean %s?", d.Key)
			}
		}
	} else {
		for _, d := range schema {
			cands = append(cands, d.Key)
		}
		for _, n := range derate.FactorNames() {
			cands = append(cands, "policy."+n)
		}
	}
	return suggestFrom(name, cands)
}

func suggestFrom(name string, cands []string) string {
	best, bestD := "", 1<<30
	for _, c := range cands {
		d := suggest.Distance(strings.ToLower(name), c)
		if d < bestD {
			best, bestD = c, d
		}
	}
	// the part after the table may be close even when the table is wrong
	if i := strings.IndexByte(name, '.'); i >= 0 {
		last := name[i+1:]
		for _, c := range cands {
			j := strings.LastIndexByte(c, '.')
			if j >= 0 && c[j+1:] == last && bestD > 0 {
				best, bestD = c, 1
			}
		}
	}
	if best == "" || bestD > max(2, len(name)/3) {
		return ""
	}
	return "; did you mean " + best + "?"
}

// tableOf returns raw[name] as a table; absent gives nil, a value that is
// not a table is a problem.
func (p *parser) tableOf(raw map[string]any, name string, required bool) map[string]any {
	v, ok := raw[name]
	if !ok {
		if required {
			p.problems = append(p.problems, Problem{File: p.file, Key: name, Msg: "missing table [" + name + "]"})
		}
		return nil
	}
	t, ok := v.(map[string]any)
	if !ok {
		p.add(name, "want a table [%s], got %s", name, typeWord(v))
		return nil
	}
	return t
}

func typeWord(v any) string {
	switch v.(type) {
	case bool:
		return "a boolean"
	case int64, float64:
		return "a number"
	case string:
		return "a string"
	case map[string]any:
		return "a table"
	case []any, []map[string]any:
		return "an array"
	}
	return fmt.Sprintf("a %T", v)
}

// value reads one fixed key from its table t (nil when the table is
// absent). ok is false when the key is absent or invalid; invalid and
// missing required keys are recorded.
func (p *parser) num(t map[string]any, key string) (float64, bool) {
	d, _ := schemaKey(key)
	name := key[strings.IndexByte(key, '.')+1:]
	v, present := t[name]
	if !present {
		if d.Required && t != nil {
			p.missing(key)
		}
		return 0, false
	}
	switch x := v.(type) {
	case int64:
		return p.finite(key, float64(x), d)
	case float64:
		return p.finite(key, x, d)
	case string:
		f, err := units.Parse(x, d.Dim, d.pick)
		if err != nil {
			var ue *units.Error
			if errors.As(err, &ue) {
				p.add(key, "%s (got %q)", strings.Replace(ue.Reason, "this field", "this key", 1), x)
			} else {
				p.add(key, "no value (got %q); write %s", x, example(d.Dim))
			}
			return 0, false
		}
		return f, true
	default:
		p.add(key, "want a number or a value with unit such as %q, got %s", example(d.Dim), typeWord(v))
		return 0, false
	}
}

func example(d units.Dim) string {
	if d == units.None {
		return "2000"
	}
	return d.Example()
}

func (p *parser) finite(key string, f float64, d KeyDoc) (float64, bool) {
	if math.IsNaN(f) || math.IsInf(f, 0) {
		p.add(key, "not a finite number")
		return 0, false
	}
	if d.pick == units.Magnitude {
		f = math.Abs(f)
	}
	return f, true
}

// missing records a required key that is absent; tables pending keys of
// an absent table are reported once as the table.
func (p *parser) missing(key string) {
	d, _ := schemaKey(key)
	table := key[:strings.IndexByte(key, '.')]
	p.problems = append(p.problems, Problem{File: p.file, Line: p.line(table), Key: key,
		Msg: fmt.Sprintf("missing required key (%s)", d.Doc)})
}

func (p *parser) boolean(t map[string]any, key string) bool {
	name := key[strings.IndexByte(key, '.')+1:]
	v, ok := t[name]
	if !ok {
		return false
	}
	b, ok := v.(bool)
	if !ok {
		p.add(key, "want true or false, got %s", typeWord(v))
	}
	return b
}

func (p *parser) word(t map[string]any, key string) (string, bool) {
	name := key[strings.IndexByte(key, '.')+1:]
	v, ok := t[name]
	if !ok {
		if d, _ := schemaKey(key); d.Required && t != nil {
			p.missing(key)
		}
		return "", false
	}
	s, ok := v.(string)
	if !ok {
		p.add(key, "want a string, got %s", typeWord(v))
		return "", false
	}
	return strings.TrimSpace(s), true
}

// positive records a value that must be above zero.
func (p *parser) positive(key string, v float64, ok bool) {
	if ok && !(v > 0) {
		p.add(key, "must be above zero (got %s)", fmtv(key, v))
	}
}

func fmtv(key string, v float64) string {
	d, _ := schemaKey(key)
	return units.Format(v, d.Dim)
}

func (p *parser) read(raw map[string]any, s *Spec) {
	sup := p.tableOf(raw, "supply", true)
	ld := p.tableOf(raw, "load", true)
	amb := p.tableOf(raw, "ambient", true)
	bud := p.tableOf(raw, "budget", false)
	pol := p.tableOf(raw, "policy", false)
	bld := p.tableOf(raw, "build", false)

	// [supply]
	if w, ok := p.word(sup, "supply.kind"); ok {
		s.Supply.Kind = SupplyKind(strings.ToLower(w))
		valid := false
		var names []string
		for _, k := range SupplyKinds {
			names = append(names, string(k))
			valid = valid || k == s.Supply.Kind
		}
		if !valid {
			p.add("supply.kind", "unknown supply kind %q (one of %s)%s", w, strings.Join(names, ", "), suggestFrom(strings.ToLower(w), names))
		}
	}
	var okMin, okNom, okMax, okTr bool
	s.Supply.VMin, okMin = p.num(sup, "supply.v_min")
	s.Supply.VNom, okNom = p.num(sup, "supply.v_nom")
	s.Supply.VMax, okMax = p.num(sup, "supply.v_max")
	s.Supply.VTransient, okTr = p.num(sup, "supply.v_transient")
	p.positive("supply.v_min", s.Supply.VMin, okMin)
	p.positive("supply.v_nom", s.Supply.VNom, okNom)
	p.positive("supply.v_max", s.Supply.VMax, okMax)
	p.positive("supply.v_transient", s.Supply.VTransient, okTr)
	var okRev, okRs bool
	s.Supply.VReverse, okRev = p.num(sup, "supply.v_reverse")
	p.positive("supply.v_reverse", s.Supply.VReverse, okRev)
	p.reverseTime(sup, s)
	s.Supply.RSource, okRs = p.num(sup, "supply.r_source")
	p.positive("supply.r_source", s.Supply.RSource, okRs)
	s.Supply.Shared = p.boolean(sup, "supply.shared")

	// [load]
	var okI, okLV, okRM, okHold bool
	s.Load.IMax, okI = p.num(ld, "load.i_max")
	p.positive("load.i_max", s.Load.IMax, okI)
	s.Load.VMin, okLV = p.num(ld, "load.v_min")
	if okLV && s.Load.VMin < 0 {
		p.add("load.v_min", "must not be negative (got %s)", fmtv("load.v_min", s.Load.VMin))
	}
	s.Load.VReverseMax, okRM = p.num(ld, "load.v_reverse_max")
	_ = okRM
	s.Load.Backfeed = p.boolean(ld, "load.backfeed")
	s.Load.VHoldup, okHold = p.num(ld, "load.v_holdup")
	if okHold && s.Load.VHoldup < 0 {
		p.add("load.v_holdup", "must not be negative (got %s)", fmtv("load.v_holdup", s.Load.VHoldup))
	}
	if !okHold && s.Load.Backfeed && okMax {
		s.Load.VHoldup = s.Supply.VMax
		s.Notes = append(s.Notes, fmt.Sprintf("load.v_holdup defaults to supply.v_max = %s because load.backfeed = true", units.Format(s.Supply.VMax, units.Voltage)))
	}
	p.inrush(ld, s)

	// [ambient]
	var okTmin, okTmax bool
	s.Ambient.TMin, okTmin = p.num(amb, "ambient.t_min")
	s.Ambient.TMax, okTmax = p.num(amb, "ambient.t_max")

	// [budget]
	var okD, okL bool
	s.Budget.DropMax, okD = p.num(bud, "budget.drop_max")
	s.Budget.LossMax, okL = p.num(bud, "budget.loss_max")
	p.positive("budget.drop_max", s.Budget.DropMax, okD)
	p.positive("budget.loss_max", s.Budget.LossMax, okL)
	s.Budget.HasDrop, s.Budget.HasLoss = okD && s.Budget.DropMax > 0, okL && s.Budget.LossMax > 0

	p.policy(pol, s)
	p.build(bld, s)

	// contradictions between keys
	if okMin && okNom && s.Supply.VMin > s.Supply.VNom {
		p.add("supply.v_min", "supply.v_min (%s) is above supply.v_nom (%s)", fmtv("supply.v_min", s.Supply.VMin), fmtv("supply.v_nom", s.Supply.VNom))
	}
	if okNom && okMax && s.Supply.VNom > s.Supply.VMax {
		p.add("supply.v_nom", "supply.v_nom (%s) is above supply.v_max (%s)", fmtv("supply.v_nom", s.Supply.VNom), fmtv("supply.v_max", s.Supply.VMax))
	}
	if okMin && okMax && !okNom && s.Supply.VMin > s.Supply.VMax {
		p.add("supply.v_min", "supply.v_min (%s) is above supply.v_max (%s)", fmtv("supply.v_min", s.Supply.VMin), fmtv("supply.v_max", s.Supply.VMax))
	}
	if okTr && okMax && s.Supply.VTransient < s.Supply.VMax {
		p.add("supply.v_transient", "supply.v_transient (%s) is below supply.v_max (%s); a transient lies above the steady maximum (leave it out when there is none)",
			fmtv("supply.v_transient", s.Supply.VTransient), fmtv("supply.v_max", s.Supply.VMax))
	}
	if okTmin && okTmax && s.Ambient.TMin > s.Ambient.TMax {
		p.add("ambient.t_min", "ambient.t_min (%s) is above ambient.t_max (%s)", fmtv("ambient.t_min", s.Ambient.TMin), fmtv("ambient.t_max", s.Ambient.TMax))
	}
	if okLV && okMin {
		head := s.Supply.VMin - s.Load.VMin
		switch {
		case head < 0:
			p.add("load.v_min", "load.v_min (%s) is above supply.v_min (%s): no protection stage delivers more than its input; the load must work at supply.v_min minus the stage's drop",
				fmtv("load.v_min", s.Load.VMin), fmtv("supply.v_min", s.Supply.VMin))
		case head == 0:
			p.add("load.v_min", "load.v_min equals supply.v_min (%s): that leaves no voltage for the protection stage to drop; the load must work at supply.v_min minus the stage's drop",
				fmtv("supply.v_min", s.Supply.VMin))
		case okD && s.Budget.DropMax > head:
			s.Notes = append(s.Notes, fmt.Sprintf("budget.drop_max (%s) is looser than the headroom supply.v_min − load.v_min = %s; the headroom governs",
				units.Format(s.Budget.DropMax, units.Voltage), units.Format(head, units.Voltage)))
		case !okD:
			s.Notes = append(s.Notes, fmt.Sprintf("no budget.drop_max: the stage may drop up to the headroom supply.v_min − load.v_min = %s", units.Format(head, units.Voltage)))
		}
	}
	if okRev && okRM && s.Load.VReverseMax >= s.Supply.VReverse {
		s.Notes = append(s.Notes, fmt.Sprintf("load.v_reverse_max (%s) covers the whole reversed supply (%s): the load survives reversal by itself",
			units.Format(s.Load.VReverseMax, units.Voltage), units.Format(s.Supply.VReverse, units.Voltage)))
	}
	if okRs && s.Supply.HighFaultCurrent() && s.Supply.RSource > 0.5 {
		s.Notes = append(s.Notes, fmt.Sprintf("supply.r_source = %s is high for a %s; a low value is the worst case for fault currents",
			units.Format(s.Supply.RSource, units.Resistance), s.Supply.Kind))
	}
}

func (p *parser) reverseTime(sup map[string]any, s *Spec) {
	const key = "supply.reverse_time"
	v, ok := sup["reverse_time"]
	if !ok {
		if sup != nil {
			p.missing(key)
		}
		return
	}
	if str, isStr := v.(string); isStr {
		w := strings.ToLower(strings.TrimSpace(str))
		if w == "continuous" || w == "cont" || w == "permanent" {
			s.Supply.ReverseContinuous = true
			return
		}
	}
	t, ok := p.num(sup, key)
	if !ok {
		if _, isStr := v.(string); isStr {
			// num recorded the unit problem; say what else is allowed
			last := &p.problems[len(p.problems)-1]
			last.Msg += `; or write "continuous"`
		}
		return
	}
	if !(t > 0) {
		p.add(key, `must be above zero, or "continuous"`)
		return
	}
	s.Supply.ReverseTime = t
}

func (p *parser) inrush(ld map[string]any, s *Spec) {
	i2t, okA := p.num(ld, "load.inrush_i2t")
	tp, okB := p.num(ld, "load.inrush_time")
	n, okC := p.num(ld, "load.inrush_pulses")
	p.positive("load.inrush_i2t", i2t, okA)
	p.positive("load.inrush_time", tp, okB)
	if okC && !(n >= 1) {
		p.add("load.inrush_pulses", "must be at least 1 (got %g)", n)
	}
	_, hasA := ld["inrush_i2t"]
	_, hasB := ld["inrush_time"]
	_, hasC := ld["inrush_pulses"]
	if hasA || hasB || hasC {
		for _, m := range []struct {
			has  bool
			name string
		}{{hasA, "load.inrush_i2t"}, {hasB, "load.inrush_time"}, {hasC, "load.inrush_pulses"}} {
			if !m.has {
				p.problems = append(p.problems, Problem{File: p.file, Line: p.line("load"), Key: m.name,
					Msg: "missing: inrush_i2t, inrush_time and inrush_pulses go together"})
			}
		}
	}
	if okA && okB && okC && i2t > 0 && tp > 0 && n >= 1 {
		s.Load.HasInrush = true
		s.Load.InrushI2t, s.Load.InrushTime, s.Load.InrushPulses = i2t, tp, n
	}
}

// factorValue reads one policy factor: a plain number (in the factor's
// unit as `need` prints it), or for temperature factors a string with °C.
func (p *parser) factorValue(key, name string, v any) (float64, bool) {
	switch x := v.(type) {
	case int64:
		return float64(x), true
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			p.add(key, "not a finite number")
			return 0, false
		}
		return x, true
	case string:
		pr, _ := derate.Lookup("commercial")
		if f, ok := pr.Factor(name); ok && f.Unit == "°C" {
			t, err := units.Parse(x, units.Temperature, units.Signed)
			if err == nil {
				return t, true
			}
			p.add(key, "%v", err)
			return 0, false
		}
		p.add(key, "want a plain number in the unit `partsieve need` shows for %s (got %q)", name, x)
		return 0, false
	}
	p.add(key, "want a number, got %s", typeWord(v))
	return 0, false
}

func (p *parser) policy(pol map[string]any, s *Spec) {
	name := "commercial"
	if w, ok := p.word(pol, "policy.derating"); ok && w != "" {
		name = w
	} else if !ok {
		s.Notes = append(s.Notes, `no policy.derating: the "commercial" profile is used`)
	}
	s.Policy.Derating = name
	ov := map[string]float64{}
	for key, v := range pol {
		if key == "derating" || key == "profiles" || !isFactor(key) {
			continue
		}
		if f, ok := p.factorValue("policy."+key, key, v); ok {
			ov[key] = f
		}
	}
	// custom profiles
	custom := map[string]derate.Profile{}
	if pr, ok := pol["profiles"]; ok {
		tab, ok := pr.(map[string]any)
		if !ok {
			p.add("policy.profiles", "want tables [policy.profiles.NAME], got %s", typeWord(pr))
		}
		names := make([]string, 0, len(tab))
		for n := range tab {
			names = append(names, n)
		}
		sort.Strings(names)
		for _, n := range names {
			pkey := "policy.profiles." + joinKey([]string{n})
			body, ok := tab[n].(map[string]any)
			if !ok {
				p.add(pkey, "want a table with base and factor overrides, got %s", typeWord(tab[n]))
				continue
			}
			base := "commercial"
			if b, ok := body["base"]; ok {
				if bs, ok := b.(string); ok {
					base = bs
				} else {
					p.add(pkey+".base", "want a built-in profile name, got %s", typeWord(b))
				}
			} else {
				p.add(pkey, "missing base (the built-in profile this one starts from: %s)", strings.Join(derate.Names(), ", "))
			}
			pov := map[string]float64{}
			for fk, fv := range body {
				if fk == "base" || !isFactor(fk) {
					continue
				}
				if f, ok := p.factorValue(pkey+"."+fk, fk, fv); ok {
					pov[fk] = f
				}
			}
			prof, err := derate.NewProfile(n, base, pov)
			if err != nil {
				p.overrideErrors(pkey, err)
				continue
			}
			custom[strings.ToLower(n)] = prof
		}
	}
	var prof derate.Profile
	if c, ok := custom[strings.ToLower(name)]; ok {
		prof = c
	} else {
		b, err := derate.Lookup(name)
		if err != nil {
			var cn []string
			for n := range custom {
				cn = append(cn, n)
			}
			sort.Strings(cn)
			msg := err.Error()
			if len(cn) > 0 {
				msg += "; profiles defined in this file: " + strings.Join(cn, ", ")
			}
			p.add("policy.derating", "%s", msg)
			// still check the overrides, against the default profile
			prof, _ = derate.Lookup("commercial")
			if _, err := prof.WithOverrides(ov); err != nil {
				p.overrideErrors("policy", err)
			}
			return
		}
		prof = b
	}
	if len(ov) > 0 {
		q, err := prof.WithOverrides(ov)
		if err != nil {
			p.overrideErrors("policy", err)
			return
		}
		prof = q
		s.Policy.Overrides = ov
	}
	s.Policy.Profile = prof
}

// overrideErrors turns derate's joined *OverrideError into problems on
// the keys under prefix.
func (p *parser) overrideErrors(prefix string, err error) {
	var list []error
	var ae interface{ Unwrap() []error }
	if errors.As(err, &ae) {
		list = ae.Unwrap()
	} else {
		list = []error{err}
	}
	for _, e := range list {
		var oe *derate.OverrideError
		if errors.As(e, &oe) {
			p.add(prefix+"."+oe.Name, "%g: %s", oe.Value, oe.Reason)
			continue
		}
		p.add(prefix, "%v", e)
	}
}

func (p *parser) build(bld map[string]any, s *Spec) {
	s.Build.Quantity = 1
	if q, ok := p.num(bld, "build.quantity"); ok {
		if q < 1 || q != math.Trunc(q) || q > 1e12 {
			p.add("build.quantity", "want a whole number of at least 1 (got %g)", q)
		} else {
			s.Build.Quantity = int64(q)
		}
	} else if bld == nil || bld["quantity"] == nil {
		s.Notes = append(s.Notes, "no build.quantity: unit prices are taken at quantity 1")
	}
	s.Build.Currency = "EUR"
	if c, ok := p.word(bld, "build.currency"); ok {
		if !isCurrency(c) {
			p.add("build.currency", "want a three-letter currency code such as EUR or USD (got %q)", c)
		} else {
			s.Build.Currency = strings.ToUpper(c)
		}
	} else if bld == nil || bld["currency"] == nil {
		s.Notes = append(s.Notes, "no build.currency: costs are given in EUR")
	}
	r, ok := bld["rates"]
	if !ok {
		return
	}
	tab, ok := r.(map[string]any)
	if !ok {
		p.add("build.rates", "want a table [build.rates] of CURRENCY = rate, got %s", typeWord(r))
		return
	}
	s.Build.Rates = map[string]float64{}
	for c, v := range tab {
		key := "build.rates." + joinKey([]string{c})
		if !isCurrency(c) {
			p.add(key, "want a three-letter currency code as key (got %q)", c)
			continue
		}
		var f float64
		switch x := v.(type) {
		case int64:
			f = float64(x)
		case float64:
			f = x
		default:
			p.add(key, "want a number (units of %s per %s), got %s", s.Build.Currency, strings.ToUpper(c), typeWord(v))
			continue
		}
		if !(f > 0) || math.IsInf(f, 0) {
			p.add(key, "must be a positive number (got %g)", f)
			continue
		}
		s.Build.Rates[strings.ToUpper(c)] = f
	}
}

func isCurrency(c string) bool {
	if len(c) != 3 {
		return false
	}
	for _, r := range c {
		if !(r >= 'A' && r <= 'Z' || r >= 'a' && r <= 'z') {
			return false
		}
	}
	return true
}
