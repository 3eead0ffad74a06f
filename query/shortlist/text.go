package shortlist

import (
	"math"
	"partsieve/internal/sheetsafe"
	"strings"

	"partsieve/catalog"
	"partsieve/catalog/units"
)

// SafeText neutralises text that a spreadsheet program would evaluate as a
// formula when it reads a CSV file: a cell starting with '=', '+', '-',
// '@', tab, carriage return or line feed gets a leading apostrophe, which
// spreadsheet programs take as "this is text" (and show, in a CSV file).
// Every text column of the CSV goes through it; numeric columns hold
// numbers written by partsieve and are left alone.
func SafeText(s string) string { return sheetsafe.Text(s) }

// Risky reports whether text would be taken for a formula by a spreadsheet
// program (what SafeText neutralises).
func Risky(s string) bool { return sheetsafe.Risky(s) }

// field formats a field of p ("45 mΩ"), "" when absent.
func field(p *catalog.Part, name string) string {
	v, ok := p.Get(name)
	if !ok {
		return ""
	}
	f, _ := catalog.FieldByName(name)
	return units.Format(v, f.Dim)
}

func num(p *catalog.Part, name string) float64 {
	if v, ok := p.Get(name); ok {
		return v
	}
	return math.NaN()
}

// ratings summarises the ratings that matter for the part's class in
// words, and returns its main voltage and current ratings (V, A; NaN when
// the part has none): V_RRM and I_F(AV) for a rectifier or Schottky, V_Z
// for a Zener, V_RWM and I_PP for a TVS, V_DS and I_D for a MOSFET,
// U_N,DC and I_N for a fuse.
func ratings(p *catalog.Part) (text string, v, i float64) {
	var parts []string
	add := func(label, name string) {
		if s := field(p, name); s != "" {
			parts = append(parts, label+" "+s)
		}
	}
	at := func(label, name, cond string) {
		s := field(p, name)
		if s == "" {
			return
		}
		if c := field(p, cond); c != "" {
			s += " @ " + c
		}
		parts = append(parts, label+" "+s)
	}
	v, i = math.NaN(), math.NaN()
	switch p.Kind {
	case catalog.Diode:
		switch strings.ToLower(p.Type) {
		case "zener":
			s := field(p, "vz")
			if tol, ok := p.Get("vz_tol"); ok && s != "" {
				s += " ±" + units.Format(tol, units.Fraction)
			}
			if s != "" {
				parts = append(parts, "V_Z "+s)
			}
			add("P", "pd")
			v = num(p, "vz")
		case "tvs":
			add("V_RWM", "vrwm")
			add("V_C", "vc")
			add("P_PK", "ppk")
			v, i = num(p, "vrwm"), num(p, "ipp")
		default:
			add("V_RRM", "vrrm")
			add("I_F(AV)", "ifav")
			at("V_F", "vf", "vf_if")
			add("I_FSM", "ifsm")
			v, i = num(p, "vrrm"), num(p, "ifav")
		}
		add("R_thJA", "rthja")
	case catalog.MOSFET:
		add("V_DS", "vds")
		at("R_DS(on)", "rdson", "rdson_vgs")
		add("I_D", "id")
		add("V_GS max", "vgs_max")
		add("R_thJA", "rthja")
		v, i = num(p, "vds"), num(p, "id")
	case catalog.Fuse:
		add("I_N", "in")
		add("U_N DC", "un_dc")
		add("breaking", "breaking")
		add("I²t", "i2t")
		add("R_cold", "rcold")
		v, i = num(p, "un_dc"), num(p, "in")
	}
	return strings.Join(parts, ", "), v, i
}
