package topology

import (
	"math"
	"strings"

	"partsieve/catalog"
	"partsieve/query/physics"
)

// Catalog is a set of parts prepared for evaluation: each part's fields
// are read once from the catalog's map into fixed records, so that the
// evaluation of many specs against one catalog (and the evaluation of one
// part in several roles) does not repeat the lookups.
type Catalog struct {
	parts  []catalog.Part
	diodes []diodeRec // rectifier and Schottky diodes
	zeners []diodeRec
	fuses  []fuseRec
	pfets  []fetRec
	nfets  []fetRec
	// skipped counts parts of a kind whose type is missing or not used by
	// any topology (TVS diodes).
	skipped int
}

// NewCatalog prepares parts for evaluation. The slice is kept, not
// copied: do not change it while the Catalog is in use.
func NewCatalog(parts []catalog.Part) *Catalog {
	c := &Catalog{parts: parts}
	for i := range parts {
		p := &parts[i]
		switch p.Kind {
		case catalog.Diode:
			d := newDiodeRec(p)
			switch strings.ToLower(p.Type) {
			case "rectifier", "schottky":
				c.diodes = append(c.diodes, d)
			case "zener":
				c.zeners = append(c.zeners, d)
			default:
				c.skipped++
			}
		case catalog.Fuse:
			c.fuses = append(c.fuses, newFuseRec(p))
		case catalog.MOSFET:
			switch strings.ToLower(p.Type) {
			case "p":
				c.pfets = append(c.pfets, newFETRec(p))
			case "n":
				c.nfets = append(c.nfets, newFETRec(p))
			default:
				c.skipped++
			}
		}
	}
	return c
}

// Len returns the number of parts.
func (c *Catalog) Len() int { return len(c.parts) }

func get(p *catalog.Part, name string) float64 {
	if v, ok := p.Num[name]; ok {
		return v
	}
	return math.NaN()
}

func has(v float64) bool { return !math.IsNaN(v) }

func orDefault(v, def float64) float64 {
	if math.IsNaN(v) {
		return def
	}
	return v
}

type diodeRec struct {
	p        *catalog.Part
	class    physics.DiodeClass
	schottky bool
	vrrm     float64
	ifav     float64
	ifsm     float64
	ifsmT    float64 // s, 8.3 ms when absent
	rth      float64
	tjmax    float64
	pd       float64
	vz       float64
	vzTol    float64
	fwd      physics.ForwardData
	fwdOK    bool
	leak     physics.LeakageData
	leakOK   bool
}

func newDiodeRec(p *catalog.Part) diodeRec {
	d := diodeRec{
		p: p, class: physics.DiodeClassOf(strings.ToLower(p.Type)),
		vrrm: get(p, "vrrm"), ifav: get(p, "ifav"), ifsm: get(p, "ifsm"),
		ifsmT: orDefault(get(p, "ifsm_t"), physics.JEDECSurgeTime),
		rth:   get(p, "rthja"), tjmax: get(p, "tjmax"), pd: get(p, "pd"),
		vz: get(p, "vz"), vzTol: get(p, "vz_tol"),
	}
	d.schottky = d.class == physics.Schottky
	vf, vfi := get(p, "vf"), get(p, "vf_if")
	if has(vf) && has(vfi) && vf > 0 && vfi > 0 {
		d.fwdOK = true
		d.fwd = physics.ForwardData{Class: d.class, VF: vf, IF: vfi, TJ: orDefault(get(p, "vf_tj"), 25)}
		vf2, vf2i := get(p, "vf2"), get(p, "vf2_if")
		if has(vf2) && has(vf2i) && vf2 > 0 && vf2i > 0 {
			d.fwd.Has2 = true
			d.fwd.VF2, d.fwd.IF2, d.fwd.TJ2 = vf2, vf2i, orDefault(get(p, "vf2_tj"), 25)
		}
	}
	ir := get(p, "ir")
	if has(ir) && ir > 0 {
		d.leakOK = true
		d.leak = physics.LeakageData{IR: ir, VR: orDefault(get(p, "ir_vr"), 0), TJ: orDefault(get(p, "ir_tj"), 25)}
		ir2, t2 := get(p, "ir2"), get(p, "ir2_tj")
		if has(ir2) && has(t2) && ir2 > 0 && t2 != d.leak.TJ {
			d.leak.Has2, d.leak.IR2, d.leak.TJ2 = true, ir2, t2
		}
	}
	return d
}

// surgeI2t returns the diode's derated half-sine I²t capability at its
// own rating pulse (A²s): (k·I_FSM)²·t_p/2; NaN without I_FSM.
func (d *diodeRec) surgeI2t(k float64) float64 {
	if !has(d.ifsm) {
		return math.NaN()
	}
	return physics.HalfSineI2t(k*d.ifsm, d.ifsmT)
}

// surgeI2tAt returns the derated I²t capability (A²s) for a half-sine
// pulse of length t (s), converting I_FSM with the rule of REFERENCE §2.1
// (the lower capability of constant I²t and constant I²√t).
func (d *diodeRec) surgeI2tAt(k, t float64) float64 {
	if !has(d.ifsm) || !(t > 0) {
		return math.NaN()
	}
	c := physics.ConvertIFSM(d.ifsm, d.ifsmT, t)
	return physics.HalfSineI2t(k*c.IFSM, t)
}

type fuseRec struct {
	p         *catalog.Part
	in        float64
	undc      float64
	unac      float64
	breaking  float64
	i2t       float64
	i2tClear  float64
	rcold     float64
	std       physics.FuseStd
	stdKnown  bool
	rerate    physics.RerateCurve
	hasRerate bool
	rerateBad bool
}

func newFuseRec(p *catalog.Part) fuseRec {
	f := fuseRec{p: p, in: get(p, "in"), undc: get(p, "un_dc"), unac: get(p, "un_ac"),
		breaking: get(p, "breaking"), i2t: get(p, "i2t"), i2tClear: get(p, "i2t_clear"), rcold: get(p, "rcold")}
	if s, err := physics.ParseFuseStd(p.FuseStd); err == nil && p.FuseStd != "" {
		f.std, f.stdKnown = s, true
	} else {
		f.std = physics.FuseUL // the stricter 75 % rule when the convention is unknown
	}
	if strings.TrimSpace(p.Rerate) != "" {
		if c, err := physics.ParseRerate(p.Rerate); err == nil {
			f.rerate, f.hasRerate = c, true
		} else {
			f.rerateBad = true
		}
	}
	return f
}

// clearing returns the fuse's total-clearing I²t (A²s): the maker's
// value, else the melting I²t × physics.ClearingFactor (estimated).
func (f *fuseRec) clearing() physics.ClearingI2t {
	clear := f.i2tClear
	if !has(clear) {
		clear = 0
	}
	melt := f.i2t
	if !has(melt) {
		return physics.ClearingI2t{Value: math.NaN(), Estimated: true}
	}
	return physics.FuseClearingI2t(melt, clear)
}

type fetRec struct {
	p      *catalog.Part
	vds    float64
	id     float64
	vgsMax float64
	vgsTh  float64
	rth    float64
	tjmax  float64
	pd     float64
	gate   physics.GateRatings
	gateOK bool
}

func newFETRec(p *catalog.Part) fetRec {
	t := fetRec{p: p, vds: get(p, "vds"), id: get(p, "id"), vgsMax: get(p, "vgs_max"), vgsTh: get(p, "vgs_th"),
		rth: get(p, "rthja"), tjmax: get(p, "tjmax"), pd: get(p, "pd")}
	r1, v1 := get(p, "rdson"), get(p, "rdson_vgs")
	if has(r1) && has(v1) {
		t.gate = physics.GateRatings{R1: r1, V1: v1}
		if r2, v2 := get(p, "rdson2"), get(p, "rdson2_vgs"); has(r2) && has(v2) {
			t.gate.Has2, t.gate.R2, t.gate.V2 = true, r2, v2
		}
		t.gateOK = t.gate.Validate() == nil
	}
	return t
}

// ratingsDesc returns the gate drives (V) at which R_DS(on) is rated,
// highest first, into buf.
func (t *fetRec) ratingsDesc(buf *[2]float64) []float64 {
	if !t.gateOK {
		return buf[:0]
	}
	buf[0] = t.gate.V1
	if !t.gate.Has2 {
		return buf[:1]
	}
	buf[1] = t.gate.V2
	if buf[1] > buf[0] {
		buf[0], buf[1] = buf[1], buf[0]
	}
	return buf[:2]
}
