package topology

import (
	"fmt"
	"math"
	"strings"
	"sync"

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
	// units: the records of parts not in memory carry their unit price
	// (a column catalog picked by cost, whose ranking needs every price)
	units bool

	// A catalog read from the catalog's columns (Pick on a store) holds
	// light parts: kind, type, maker, part number and the fuse texts, the
	// rest of the numbers being in the records. fetch reads full parts
	// (with offers) by id for the few that are shown or costed; full keeps
	// them, by light part.
	lazy *lazyParts
}

// lazyParts fetches and keeps, by catalog id, the full forms of the parts
// of a catalog read from columns, or only their offers where only a cost
// is needed. The records of such a catalog have no part (p is nil): their
// part numbers are in the records, the rest is fetched for the few parts
// shown or costed.
type lazyParts struct {
	fetch  func(ids []int64) ([]catalog.Part, []int64, error)
	offers func(ids []int64) (map[int64][]catalog.Offer, error)
	mu     sync.Mutex
	full   map[int64]*catalog.Part
	priced map[int64]*catalog.Part // kind, part number and offers only
	err    error
}

// need makes sure the full parts of the given catalog ids are at hand; a
// no-op for catalogs of full parts. A read error is kept for Pick.
func (c *Catalog) need(ids []int64) {
	lz := c.lazy
	if lz == nil {
		return
	}
	lz.mu.Lock()
	defer lz.mu.Unlock()
	want := lz.missing(ids, false)
	if len(want) == 0 {
		return
	}
	got, gotIDs, err := lz.fetch(want)
	if lz.keep(err) {
		return
	}
	if lz.full == nil {
		lz.full = map[int64]*catalog.Part{}
	}
	for i := range got {
		lz.full[gotIDs[i]] = &got[i]
	}
}

// needOffers makes sure the offers of the given catalog ids are at hand
// (for their cost), without reading the parts in full.
func (c *Catalog) needOffers(ids []int64) {
	lz := c.lazy
	if lz == nil {
		return
	}
	lz.mu.Lock()
	defer lz.mu.Unlock()
	want := lz.missing(ids, true)
	if len(want) == 0 {
		return
	}
	got, err := lz.offers(want)
	if lz.keep(err) {
		return
	}
	if lz.priced == nil {
		lz.priced = map[int64]*catalog.Part{}
	}
	for _, id := range want {
		lz.priced[id] = &catalog.Part{Offers: got[id]}
	}
}

// missing returns the ids, once each, that are not read in full yet (nor
// priced, with priced). lz.mu is held.
func (lz *lazyParts) missing(ids []int64, priced bool) []int64 {
	var want []int64
	seen := map[int64]bool{}
	for _, id := range ids {
		if lz.full[id] == nil && !(priced && lz.priced[id] != nil) && !seen[id] {
			seen[id] = true
			want = append(want, id)
		}
	}
	return want
}

// keep records the first read error for Pick and reports whether there
// was one. lz.mu is held.
func (lz *lazyParts) keep(err error) bool {
	if err != nil && lz.err == nil {
		lz.err = err
	}
	return err != nil
}

// part returns the part of a record: p itself in a catalog of full parts,
// else the fetched full part of catalog id cid, else its offers only
// (enough for a cost). Call need or needOffers first.
func (c *Catalog) part(p *catalog.Part, cid int64) *catalog.Part {
	if p != nil || c.lazy == nil {
		return p
	}
	lz := c.lazy
	lz.mu.Lock()
	defer lz.mu.Unlock()
	if fp := lz.full[cid]; fp != nil {
		return fp
	}
	if pp := lz.priced[cid]; pp != nil {
		return pp
	}
	if lz.err == nil {
		lz.err = fmt.Errorf("part %d used before it was read", cid)
	}
	return &catalog.Part{}
}

// NewCatalog prepares parts for evaluation. The slice is kept, not
// copied: do not change it while the Catalog is in use.
func NewCatalog(parts []catalog.Part) *Catalog {
	c := &Catalog{parts: parts}
	for i := range parts {
		p := &parts[i]
		switch p.Kind {
		case catalog.Diode:
			d := newDiodeRec(p, p.MPN, p.Type, partNums{p})
			switch strings.ToLower(p.Type) {
			case "rectifier", "schottky":
				c.diodes = append(c.diodes, d)
			case "zener":
				c.zeners = append(c.zeners, d)
			default:
				c.skipped++
			}
		case catalog.Fuse:
			c.fuses = append(c.fuses, newFuseRec(p, p.MPN, p.FuseStd, p.Rerate, partNums{p}))
		case catalog.MOSFET:
			switch strings.ToLower(p.Type) {
			case "p":
				c.pfets = append(c.pfets, newFETRec(p, p.MPN, partNums{p}))
			case "n":
				c.nfets = append(c.nfets, newFETRec(p, p.MPN, partNums{p}))
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

// numField names a Number field the records read; numSource gives them
// for one part, from its map (partNums) or from catalog columns
// (colNums), without a lookup by name per value.
type numField uint8

const (
	n_vrrm numField = iota
	n_ifav
	n_ifsm
	n_ifsm_t
	n_rthja
	n_tjmax
	n_pd
	n_vz
	n_vz_tol
	n_vf
	n_vf_if
	n_vf_tj
	n_vf2
	n_vf2_if
	n_vf2_tj
	n_ir
	n_ir_vr
	n_ir_tj
	n_ir2
	n_ir2_tj
	n_in
	n_un_dc
	n_un_ac
	n_breaking
	n_i2t
	n_i2t_clear
	n_rcold
	n_vds
	n_id
	n_vgs_max
	n_vgs_th
	n_rdson
	n_rdson_vgs
	n_rdson2
	n_rdson2_vgs
	numFields
)

var numFieldNames = [numFields]string{"vrrm", "ifav", "ifsm", "ifsm_t", "rthja", "tjmax", "pd", "vz", "vz_tol", "vf", "vf_if", "vf_tj", "vf2", "vf2_if", "vf2_tj", "ir", "ir_vr", "ir_tj", "ir2", "ir2_tj", "in", "un_dc", "un_ac", "breaking", "i2t", "i2t_clear", "rcold", "vds", "id", "vgs_max", "vgs_th", "rdson", "rdson_vgs", "rdson2", "rdson2_vgs"}

// numSource gives one part's Number fields; NaN when absent. The record
// constructors take it as a type parameter, so that a column source (a
// small struct) is not boxed on the heap once per record.
type numSource interface{ num(f numField) float64 }

// partNums reads a catalog.Part's map.
type partNums struct{ p *catalog.Part }

func (s partNums) num(f numField) float64 { return get(s.p, numFieldNames[f]) }

// colNums reads row i of resolved columns (nil: no part has the field).
type colNums struct {
	cols *[numFields][]float64
	i    int
}

func (s colNums) num(f numField) float64 {
	if c := s.cols[f]; c != nil {
		return c[s.i]
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
	cid      int64  // catalog id (column catalogs; p is then nil)
	mpn      string // part number (ties are broken on it)
	class    physics.DiodeClass
	schottky bool
	fwdOK    bool
	leakOK   bool
	unit     float64 // unit price at the build quantity when Catalog.units
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
	leak     physics.LeakageData
}

func newDiodeRec[S numSource](p *catalog.Part, mpn, typ string, src S) diodeRec {
	d := diodeRec{
		p: p, mpn: mpn, class: physics.DiodeClassOf(strings.ToLower(typ)),
		vrrm: src.num(n_vrrm), ifav: src.num(n_ifav), ifsm: src.num(n_ifsm),
		ifsmT: orDefault(src.num(n_ifsm_t), physics.JEDECSurgeTime),
		rth:   src.num(n_rthja), tjmax: src.num(n_tjmax), pd: src.num(n_pd),
		vz: src.num(n_vz), vzTol: src.num(n_vz_tol),
	}
	d.schottky = d.class == physics.Schottky
	vf, vfi := src.num(n_vf), src.num(n_vf_if)
	if has(vf) && has(vfi) && vf > 0 && vfi > 0 {
		d.fwdOK = true
		d.fwd = physics.ForwardData{Class: d.class, VF: vf, IF: vfi, TJ: orDefault(src.num(n_vf_tj), 25)}
		vf2, vf2i := src.num(n_vf2), src.num(n_vf2_if)
		if has(vf2) && has(vf2i) && vf2 > 0 && vf2i > 0 {
			d.fwd.Has2 = true
			d.fwd.VF2, d.fwd.IF2, d.fwd.TJ2 = vf2, vf2i, orDefault(src.num(n_vf2_tj), 25)
		}
	}
	ir := src.num(n_ir)
	if has(ir) && ir > 0 {
		d.leakOK = true
		d.leak = physics.LeakageData{IR: ir, VR: orDefault(src.num(n_ir_vr), 0), TJ: orDefault(src.num(n_ir_tj), 25)}
		ir2, t2 := src.num(n_ir2), src.num(n_ir2_tj)
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
	cid       int64
	mpn       string
	unit      float64 // unit price at the build quantity when Catalog.units
	in        float64
	undc      float64
	unac      float64
	breaking  float64
	i2t       float64
	i2tClear  float64
	rcold     float64
	std       physics.FuseStd
	stdKnown  bool
	rerate    *physics.RerateCurve // nil when none; shared, not to be changed
	hasRerate bool
	rerateBad bool
}

// rerateCurve returns the fuse's rerating points (none: the empty curve).
func (f *fuseRec) rerateCurve() physics.RerateCurve {
	if f.rerate == nil {
		return physics.RerateCurve{}
	}
	return *f.rerate
}

func newFuseRec[S numSource](p *catalog.Part, mpn, std, rerate string, src S) fuseRec {
	return newFuseRecTexts(p, mpn, parseFuseTexts(std, rerate), src)
}

// fuseTexts are a fuse's parsed text fields.
type fuseTexts struct {
	std       physics.FuseStd
	stdKnown  bool
	rerate    *physics.RerateCurve // shared between the fuses of one text
	hasRerate bool
	rerateBad bool
}

func parseFuseTexts(std, rerate string) fuseTexts {
	var t fuseTexts
	if s, err := physics.ParseFuseStd(std); err == nil && std != "" {
		t.std, t.stdKnown = s, true
	} else {
		t.std = physics.FuseUL // the stricter 75 % rule when the convention is unknown
	}
	if strings.TrimSpace(rerate) != "" {
		if c, err := physics.ParseRerate(rerate); err == nil {
			t.rerate, t.hasRerate = &c, true
		} else {
			t.rerateBad = true
		}
	}
	return t
}

// fuseTextCache parses each distinct pair of fuse texts once (a column
// catalog has few distinct ones over many parts). Not safe for
// concurrent use.
type fuseTextCache map[[2]string]fuseTexts

func (c fuseTextCache) get(std, rerate string) fuseTexts {
	k := [2]string{std, rerate}
	t, ok := c[k]
	if !ok {
		t = parseFuseTexts(std, rerate)
		if len(c) < 1<<12 {
			c[k] = t
		}
	}
	return t
}

func newFuseRecTexts[S numSource](p *catalog.Part, mpn string, t fuseTexts, src S) fuseRec {
	return fuseRec{p: p, mpn: mpn, in: src.num(n_in), undc: src.num(n_un_dc), unac: src.num(n_un_ac),
		breaking: src.num(n_breaking), i2t: src.num(n_i2t), i2tClear: src.num(n_i2t_clear), rcold: src.num(n_rcold),
		std: t.std, stdKnown: t.stdKnown, rerate: t.rerate, hasRerate: t.hasRerate, rerateBad: t.rerateBad}
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
	cid    int64
	mpn    string
	unit   float64 // unit price at the build quantity when Catalog.units
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

func newFETRec[S numSource](p *catalog.Part, mpn string, src S) fetRec {
	t := fetRec{p: p, mpn: mpn, vds: src.num(n_vds), id: src.num(n_id), vgsMax: src.num(n_vgs_max), vgsTh: src.num(n_vgs_th),
		rth: src.num(n_rthja), tjmax: src.num(n_tjmax), pd: src.num(n_pd)}
	r1, v1 := src.num(n_rdson), src.num(n_rdson_vgs)
	if has(r1) && has(v1) {
		t.gate = physics.GateRatings{R1: r1, V1: v1}
		if r2, v2 := src.num(n_rdson2), src.num(n_rdson2_vgs); has(r2) && has(v2) {
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
