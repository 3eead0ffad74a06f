package shortlist

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"

	"partsieve/catalog"
	"partsieve/catalog/units"
	"partsieve/query/derate"
	"partsieve/query/spec"
	"partsieve/query/topology"
)

// ErrNothing is returned (wrapped, with the reasons) when no design
// qualifies for the shortlist.
var ErrNothing = errors.New("no design qualifies")

// Options tune a shortlist.
type Options struct {
	// Top is the number of designs per topology (at least 1).
	Top int
	// Alternates is the number of second sources listed per role (0: none).
	Alternates int
	// SparesPct is the percentage of spares added to every line (0 to
	// MaxSparesPct).
	SparesPct float64
	// Rank orders the designs of a topology (default loss).
	Rank topology.RankBy
	// Topologies restricts the designs; nil means all four.
	Topologies []topology.Topology
	// Parts, when not empty, replaces the pick: the shortlist lists these
	// part numbers, each in the role its kind and type give, with the
	// checks of every role it can take.
	Parts []string
	// SpecText is the spec as entered (TOML), for the Assumptions sheet.
	SpecText string
}

// Line kinds.
const (
	KindPart      = "part"         // a catalog part of a design
	KindGeneric   = "generic"      // a generic part to be sourced (gate resistor)
	KindAlternate = "alternate"    // a second source for a role
	KindSubtotal  = "design total" // the cost roll-up of a design
	KindTotal     = "total"        // the roll-up over every design listed
)

// Line is one row of the shortlist.
type Line struct {
	Design   string
	Topology topology.Topology
	Kind     string
	Role     string
	Mfr      string
	MPN      string
	Type     string
	Package  string
	// Ratings summarises the part's key ratings in words ("V_DS 60 V,
	// R_DS(on) 16 mΩ @ 10 V, ..."); VRating and IRating are its main
	// voltage and current ratings (V, A; NaN when none).
	Ratings string
	VRating float64
	IRating float64
	// Loss and Drop are the stage's (W, V) with this line's part in its
	// role; Tj is the part's junction temperature at its operating corner
	// (°C); Margin is the smallest margin of the part's own checks, named
	// by MarginCheck. NaN when not applicable.
	Loss        float64
	Drop        float64
	Tj          float64
	Margin      float64
	MarginCheck string
	// PerBoard is the number of pieces per board.
	PerBoard int64
	Order    Order
	// PerBoardCost is Extended / build quantity (build currency).
	PerBoardCost float64
	Note         string
}

// CheckRow is one check of a listed part, for the Checks sheet.
type CheckRow struct {
	Design   string
	Topology topology.Topology
	// Evaluation says which evaluation the check belongs to: "design", or
	// "alternate <role> <MPN>" for a design re-evaluated with an
	// alternate in place, or "<role>" for a part of a --parts list.
	Evaluation string
	// Part is the part number the check is about (several joined by " + "
	// for pair and stage checks).
	Part  string
	Check topology.Check
}

// Cost is a roll-up in the build currency.
type Cost struct {
	// Extended is the sum of the costed lines' extended costs.
	Extended float64
	// PerBoard is Extended divided by the build quantity.
	PerBoard float64
	// Uncosted counts catalog lines without a cost (the sum is then
	// incomplete); Short counts lines short of stock.
	Uncosted int
	Short    int
}

// Design is one design of the shortlist with its lines.
type Design struct {
	Label    string
	Topology topology.Topology
	Title    string
	Rank     int
	// Loss, Drop, TjHot and MinMargin are the stage's figures as in the
	// pick (NaN for a --parts list).
	Loss           float64
	Drop           float64
	TjHot          float64
	MinMargin      float64
	MinMarginCheck string
	Hazards        []string
	// Lines holds the parts, the generic gate resistor, then the
	// alternates; Cost rolls up the parts (alternates are not counted).
	Lines  []Line
	Checks []CheckRow
	Cost   Cost
}

// Shortlist is a purchase shortlist: designs with their order lines,
// the requirement set, every check and the assumptions.
type Shortlist struct {
	Spec        string
	Policy      string
	PolicyTitle string
	Quantity    int64
	Currency    string
	Rates       map[string]float64
	Options     Options
	Rank        topology.RankBy
	Designs     []Design
	Total       Cost
	Needs       *topology.NeedSet
	Factors     []derate.Factor
	// Notes are the spec's notes and what the pick left out (ranked-out
	// topologies, topologies where nothing qualifies).
	Notes    []string
	Cautions []string
}

// Lines returns every row of the shortlist in order: per design its lines
// and its total, then the overall total.
func (sl *Shortlist) Lines() []Line {
	var out []Line
	for i := range sl.Designs {
		d := &sl.Designs[i]
		out = append(out, d.Lines...)
		out = append(out, d.totalLine())
	}
	out = append(out, sl.totalLine())
	return out
}

// CatalogLines counts the lines of catalog parts and alternates, and the
// generic lines.
func (sl *Shortlist) CatalogLines() (parts, alternates, generic int) {
	for _, d := range sl.Designs {
		for _, l := range d.Lines {
			switch l.Kind {
			case KindPart:
				parts++
			case KindAlternate:
				alternates++
			case KindGeneric:
				generic++
			}
		}
	}
	return
}

func nan() float64 { return math.NaN() }

// Build makes the shortlist for spec s from the catalog src: the parts
// are read as by topology.Pick (the same SQL pre-filters), then FromCatalog
// does the work.
func Build(ctx context.Context, src topology.Source, s *spec.Spec, opt Options) (*Shortlist, error) {
	cat, err := topology.LoadCatalog(ctx, src, s, topology.Options{Topologies: opt.Topologies}, opt.Parts...)
	if err != nil {
		return nil, err
	}
	return FromCatalog(s, cat, opt)
}

// FromCatalog makes the shortlist for spec s from a prepared catalog:
//
//   - without Parts: the top designs of each topology (topology.Evaluate),
//     each a set of roles (series-diode: diode; shunt-fuse: fuse and
//     shunt diode; pfet-high and nfet-low: MOSFET, Zener and the generic
//     gate resistor), one piece per board each, with up to
//     opt.Alternates second sources per catalog role (topology.Alternates);
//   - with Parts: one design "parts list" holding each part (every maker
//     that uses the part number), its checks from topology.ExplainCatalog.
//
// Every catalog line is ordered by PlaceOrder. It returns an error
// wrapping ErrNothing when no design qualifies.
func FromCatalog(s *spec.Spec, cat *topology.Catalog, opt Options) (*Shortlist, error) {
	if opt.Top < 1 {
		opt.Top = 1
	}
	if opt.Alternates < 0 {
		return nil, fmt.Errorf("alternates %d: must not be negative", opt.Alternates)
	}
	if _, _, err := Quantity(s.Build.Quantity, 1, opt.SparesPct); err != nil {
		return nil, err
	}
	if opt.Rank == "" {
		opt.Rank = topology.RankLoss
	}
	pr := s.Policy.Profile
	if pr.Name == "" {
		pr, _ = derate.Lookup("commercial")
	}
	sl := &Shortlist{Spec: s.File, Policy: pr.Name, PolicyTitle: pr.Title, Quantity: s.Build.Quantity,
		Currency: s.Build.Currency, Rates: s.Build.Rates, Options: opt, Rank: opt.Rank,
		Needs: topology.Needs(s, opt.Topologies...), Factors: pr.Factors(),
		Notes: append([]string(nil), s.Notes...), Cautions: topology.Cautions}
	b := builder{s: s, cat: cat, sl: sl, topt: topology.Options{Top: opt.Top, Rank: opt.Rank, Topologies: opt.Topologies}}
	var err error
	if len(opt.Parts) > 0 {
		err = b.parts(opt.Parts)
	} else {
		err = b.pick()
	}
	if err != nil {
		return nil, err
	}
	for i := range sl.Designs {
		d := &sl.Designs[i]
		d.rollUp(sl.Quantity)
		sl.Total.Extended += d.Cost.Extended
		sl.Total.Uncosted += d.Cost.Uncosted
		sl.Total.Short += d.Cost.Short
	}
	sl.Total.PerBoard = sl.Total.Extended / float64(sl.Quantity)
	return sl, nil
}

type builder struct {
	s    *spec.Spec
	cat  *topology.Catalog
	sl   *Shortlist
	topt topology.Options
}

// pick lists the top designs of each topology with their alternates.
func (b *builder) pick() error {
	r := topology.Evaluate(b.s, b.cat, b.topt)
	var none []string
	for _, tr := range r.Topologies {
		switch {
		case tr.Unsafe:
			b.sl.Notes = append(b.sl.Notes, fmt.Sprintf("%s is not listed: %s", tr.Topology, tr.UnsafeReason))
			none = append(none, fmt.Sprintf("%s ranked out (%s)", tr.Topology, tr.UnsafeReason))
			continue
		case len(tr.Candidates) == 0:
			b.sl.Notes = append(b.sl.Notes, fmt.Sprintf("%s: %s", tr.Topology, tr.NoneReason))
			none = append(none, fmt.Sprintf("%s: %s", tr.Topology, tr.NoneReason))
			continue
		}
		for ci := range tr.Candidates {
			c := &tr.Candidates[ci]
			d, err := b.design(&tr, c)
			if err != nil {
				return err
			}
			b.sl.Designs = append(b.sl.Designs, d)
		}
	}
	if len(b.sl.Designs) == 0 {
		return fmt.Errorf("%w for %s: %s", ErrNothing, b.s.File, strings.Join(none, "; "))
	}
	return nil
}

// partChecks returns the smallest margin among checks of role, the check
// that has it and the junction temperature of the part (NaN when none).
func partChecks(checks []topology.Check, role string) (margin float64, name string, tj float64) {
	margin, tj = nan(), nan()
	for _, c := range checks {
		if c.Role != role {
			continue
		}
		m := float64(c.Margin)
		if math.IsNaN(m) {
			if c.Pass {
				continue
			}
			m = math.Inf(-1) // a missing value fails
		}
		if math.IsNaN(margin) || m < margin {
			margin, name = m, c.Name
		}
		if math.IsNaN(tj) && c.Unit == "°C" && strings.HasPrefix(c.Name, "junction temperature") {
			tj = float64(c.Value)
		}
	}
	return margin, name, tj
}

// design builds the lines and checks of one candidate.
func (b *builder) design(tr *topology.TopologyResult, c *topology.Candidate) (Design, error) {
	d := Design{Label: fmt.Sprintf("%s #%d", tr.Topology, c.Rank), Topology: tr.Topology, Title: tr.Title, Rank: c.Rank,
		Loss: float64(c.Loss), Drop: float64(c.Drop), TjHot: float64(c.TjHot), MinMargin: float64(c.MinMargin),
		MinMarginCheck: c.MinMarginCheck, Hazards: append(append([]string(nil), tr.Hazards...), c.Hazards...)}
	for _, ref := range c.Parts {
		p := b.cat.Part(ref.Mfr, ref.MPN)
		if p == nil {
			return d, fmt.Errorf("shortlist: part %s %s of %s is not in the catalog", ref.Mfr, ref.MPN, d.Label)
		}
		l, err := b.line(&d, KindPart, ref.Role, p, c)
		if err != nil {
			return d, err
		}
		d.Lines = append(d.Lines, l)
	}
	if g := c.GateResistor; g != nil {
		l, err := b.gateLine(&d, g, c)
		if err != nil {
			return d, err
		}
		d.Lines = append(d.Lines, l)
	}
	d.Checks = append(d.Checks, checkRows(&d, "design", c)...)
	for _, ref := range c.Parts {
		alts, err := topology.Alternates(b.s, b.cat, b.topt, tr.Topology, c, ref.Role, b.sl.Options.Alternates)
		if err != nil {
			return d, err
		}
		for _, a := range alts {
			l, err := b.line(&d, KindAlternate, ref.Role, a.Part, &a.Design)
			if err != nil {
				return d, err
			}
			what := "same maker as " + ref.MPN
			if a.OtherMaker {
				what = "another maker than " + ref.MPN
			}
			l.Note = joinNotes(fmt.Sprintf("second source for %s %s (%s); the design passes every check with it", ref.Role, ref.MPN, what), l.Note)
			d.Lines = append(d.Lines, l)
			d.Checks = append(d.Checks, checkRows(&d, fmt.Sprintf("alternate %s %s", ref.Role, a.Part.MPN), &a.Design)...)
		}
	}
	return d, nil
}

// line builds the order line of catalog part p in role of design c.
func (b *builder) line(d *Design, kind, role string, p *catalog.Part, c *topology.Candidate) (Line, error) {
	l := Line{Design: d.Label, Topology: d.Topology, Kind: kind, Role: role, Mfr: p.Mfr, MPN: p.MPN,
		Type: p.Label(), Package: p.Package, PerBoard: 1, Loss: nan(), Drop: nan()}
	l.Ratings, l.VRating, l.IRating = ratings(p)
	if c != nil {
		l.Loss, l.Drop = float64(c.Loss), float64(c.Drop)
		l.Margin, l.MarginCheck, l.Tj = partChecks(c.Checks, role)
	} else {
		l.Margin, l.Tj = nan(), nan()
	}
	needed, want, err := Quantity(b.s.Build.Quantity, l.PerBoard, b.sl.Options.SparesPct)
	if err != nil {
		return l, err
	}
	l.Order = PlaceOrder(p, needed, want, b.s.Build.Currency, b.s.Build.Rates)
	l.PerBoardCost = l.Order.Extended / float64(b.s.Build.Quantity)
	l.Note = l.Order.Note
	return l, nil
}

// gateLine is the generic gate resistor of a MOSFET stage.
func (b *builder) gateLine(d *Design, g *topology.GateResistor, c *topology.Candidate) (Line, error) {
	l := Line{Design: d.Label, Topology: d.Topology, Kind: KindGeneric, Role: "gate-resistor", Type: "resistor",
		PerBoard: 1, Loss: float64(c.Loss), Drop: float64(c.Drop), Tj: nan(), VRating: nan(), IRating: nan(),
		PerBoardCost: nan()}
	l.Margin, l.MarginCheck, _ = partChecks(c.Checks, "gate-resistor")
	vmax := b.s.Supply.VInMax()
	if d.Topology == topology.NFETLow {
		vmax = math.Max(vmax, b.s.Supply.VReverse)
	}
	l.Ratings = GateResistorText(float64(g.Value), float64(g.Rating), vmax)
	l.VRating = vmax
	needed, want, err := Quantity(b.s.Build.Quantity, l.PerBoard, b.sl.Options.SparesPct)
	if err != nil {
		return l, err
	}
	l.Order = Generic(needed, want)
	l.Note = fmt.Sprintf("generic part to be sourced, not costed: dissipates %s at the highest input and %s at v_max; quiescent current %s at v_nom",
		units.Format(float64(g.Power), units.Power), units.Format(float64(g.PowerSteady), units.Power), units.Format(float64(g.Quiescent), units.Current))
	return l, nil
}

// GateResistorTolerance is the tolerance asked of the generic gate
// resistor (a tool choice: the sizing uses the nominal value and keeps
// the resistor at 50 % of its rating, so a 1 % part moves its dissipation
// by about 1 %).
const GateResistorTolerance = 0.01

// GateResistorText describes the generic gate resistor to source: value,
// tolerance, power rating, package and working voltage ("10 kΩ ±1 %,
// 0.125 W, 0805 or larger, ≥ 35 V working").
func GateResistorText(r, rating, vmax float64) string {
	return fmt.Sprintf("%s ±%s, %s W, 0805 or larger, ≥ %s working", units.FormatSig(r, units.Resistance, 3),
		units.Format(GateResistorTolerance, units.Fraction), trimFloat(rating), units.Format(vmax, units.Voltage))
}

func trimFloat(v float64) string { return fmt.Sprintf("%g", v) }

// checkRows lists the checks of candidate c, naming the part each is about.
func checkRows(d *Design, eval string, c *topology.Candidate) []CheckRow {
	byRole := map[string]string{}
	var all []string
	for _, p := range c.Parts {
		byRole[p.Role] = p.MPN
		all = append(all, p.MPN)
	}
	if g := c.GateResistor; g != nil {
		byRole["gate-resistor"] = "R_G " + units.FormatSig(float64(g.Value), units.Resistance, 3)
	}
	rows := make([]CheckRow, 0, len(c.Checks))
	for _, ch := range c.Checks {
		part, ok := byRole[ch.Role]
		if !ok {
			part = strings.Join(all, " + ")
		}
		rows = append(rows, CheckRow{Design: d.Label, Topology: d.Topology, Evaluation: eval, Part: part, Check: ch})
	}
	return rows
}

// parts lists explicit part numbers as one design.
func (b *builder) parts(mpns []string) error {
	d := Design{Label: "parts list", Title: "parts given with --parts", Loss: nan(), Drop: nan(), TjHot: nan(), MinMargin: nan()}
	seen := map[string]bool{}
	for _, mpn := range mpns {
		mpn = strings.TrimSpace(mpn)
		if mpn == "" || seen[catalog.NormKey(mpn)] {
			continue
		}
		seen[catalog.NormKey(mpn)] = true
		ex, err := topology.ExplainCatalog(b.s, b.cat, mpn, b.topt)
		if err != nil {
			return fmt.Errorf("%w: %v", ErrNoPart, err)
		}
		if len(ex.Parts) > 1 {
			var ms []string
			for _, p := range ex.Parts {
				ms = append(ms, p.Mfr)
			}
			b.sl.Notes = append(b.sl.Notes, fmt.Sprintf("%s is made by %d makers (%s): each is listed; order only the one you mean", mpn, len(ex.Parts), strings.Join(ms, ", ")))
		}
		for _, ep := range ex.Parts {
			p := b.cat.Part(ep.Mfr, ep.MPN)
			if p == nil {
				return fmt.Errorf("shortlist: part %s %s is not in the catalog", ep.Mfr, ep.MPN)
			}
			l, err := b.line(&d, KindPart, roleOf(p), p, nil)
			if err != nil {
				return err
			}
			primary, pass, fail := primaryRole(ep.Roles)
			for _, r := range ep.Roles {
				eval := r.Role
				if r.Topology != "" {
					eval = string(r.Topology) + " " + r.Role
				}
				for _, ch := range r.Checks {
					part := p.MPN
					if ch.Role != r.Role {
						ps := []string{p.MPN}
						for _, q := range r.Partners {
							ps = append(ps, q.MPN)
						}
						part = strings.Join(ps, " + ")
					}
					d.Checks = append(d.Checks, CheckRow{Design: d.Label, Topology: r.Topology, Evaluation: eval, Part: part, Check: ch})
				}
			}
			if primary >= 0 {
				r := ep.Roles[primary]
				l.Topology = r.Topology
				l.Margin, l.MarginCheck, l.Tj = partChecks(r.Checks, r.Role)
			}
			var notes []string
			if len(pass) > 0 {
				notes = append(notes, "passes as "+strings.Join(pass, ", "))
			} else {
				notes = append(notes, "passes in no role")
			}
			if len(fail) > 0 {
				notes = append(notes, "not as "+strings.Join(fail, ", "))
			}
			l.Note = joinNotes(strings.Join(notes, "; "), l.Note)
			d.Lines = append(d.Lines, l)
		}
	}
	if len(d.Lines) == 0 {
		return fmt.Errorf("%w: --parts lists no part number", ErrNoPart)
	}
	b.sl.Designs = append(b.sl.Designs, d)
	return nil
}

// ErrNoPart is returned (wrapped) when a part number of a --parts list is
// not in the catalog.
var ErrNoPart = errors.New("part not found")

// primaryRole returns the report that stands for a part of a --parts
// list (the passing role with the largest smallest margin; when none
// passes, the role with the largest smallest margin; -1 when no report
// has checks) and the roles it passes and fails in words.
func primaryRole(roles []topology.RoleReport) (primary int, pass, fail []string) {
	primary = -1
	best, bestPass := math.Inf(-1), false
	for i, r := range roles {
		label := r.Role
		if r.Topology != "" {
			label = string(r.Topology) + " " + r.Role
		}
		switch {
		case r.Pass && len(r.Checks) > 0:
			pass = append(pass, label)
		case r.FirstFail != "":
			fail = append(fail, label+" (fails "+r.FirstFail+")")
		case r.Note != "":
			fail = append(fail, label+" ("+r.Note+")")
		}
		if len(r.Checks) == 0 {
			continue
		}
		m, _, _ := partChecks(r.Checks, r.Role)
		if math.IsNaN(m) {
			m = math.Inf(-1)
		}
		ok := r.Pass
		if primary < 0 || ok && !bestPass || ok == bestPass && m > best {
			primary, best, bestPass = i, m, ok
		}
	}
	return primary, pass, fail
}

// roleOf names the role a part takes by its kind and type.
func roleOf(p *catalog.Part) string {
	switch p.Kind {
	case catalog.Fuse:
		return "fuse"
	case catalog.MOSFET:
		return "mosfet"
	case catalog.Diode:
		switch strings.ToLower(p.Type) {
		case "zener":
			return "zener"
		case "tvs":
			return "tvs"
		}
		return "diode"
	}
	return string(p.Kind)
}

func joinNotes(a, b string) string {
	switch {
	case a == "":
		return b
	case b == "":
		return a
	}
	return a + "; " + b
}

// rollUp sums the costed part lines of the design (alternates and generic
// lines are not counted).
func (d *Design) rollUp(build int64) {
	d.Cost = Cost{}
	for _, l := range d.Lines {
		if l.Kind != KindPart {
			continue
		}
		if l.Order.Costed {
			d.Cost.Extended += l.Order.Extended
		} else {
			d.Cost.Uncosted++
		}
		if l.Order.StockStatus == StockShort {
			d.Cost.Short++
		}
	}
	d.Cost.PerBoard = d.Cost.Extended / float64(build)
}

// totalLine is the design's roll-up row.
func (d *Design) totalLine() Line {
	l := Line{Design: d.Label, Topology: d.Topology, Kind: KindSubtotal, Loss: d.Loss, Drop: d.Drop, Tj: d.TjHot,
		Margin: d.MinMargin, MarginCheck: d.MinMarginCheck, VRating: nan(), IRating: nan(),
		Order: Order{Unit: nan(), Extended: d.Cost.Extended, OfferPrice: nan(), Rate: nan()}, PerBoardCost: d.Cost.PerBoard}
	l.Ratings = d.Title
	var notes []string
	if d.Cost.Uncosted > 0 {
		notes = append(notes, fmt.Sprintf("incomplete: %d line(s) not costed", d.Cost.Uncosted))
	}
	if d.Cost.Short > 0 {
		l.Order.StockStatus = StockShort
		notes = append(notes, fmt.Sprintf("%d line(s) short of stock", d.Cost.Short))
	}
	notes = append(notes, "alternates and generic lines are not in the sum")
	for _, h := range d.Hazards {
		notes = append(notes, "hazard: "+h)
	}
	l.Note = strings.Join(notes, "; ")
	return l
}

// totalLine is the roll-up over every design listed.
func (sl *Shortlist) totalLine() Line {
	l := Line{Design: "all designs", Kind: KindTotal, Loss: nan(), Drop: nan(), Tj: nan(), Margin: nan(),
		VRating: nan(), IRating: nan(),
		Order: Order{Unit: nan(), Extended: sl.Total.Extended, OfferPrice: nan(), Rate: nan()}, PerBoardCost: sl.Total.PerBoard}
	notes := []string{fmt.Sprintf("sum over the %d design(s) listed, for %d boards", len(sl.Designs), sl.Quantity)}
	if len(sl.Designs) > 1 {
		notes = append(notes, "the designs are alternatives: order one of them")
	}
	if sl.Total.Uncosted > 0 {
		notes = append(notes, fmt.Sprintf("incomplete: %d line(s) not costed", sl.Total.Uncosted))
	}
	if sl.Total.Short > 0 {
		l.Order.StockStatus = StockShort
		notes = append(notes, fmt.Sprintf("%d line(s) short of stock", sl.Total.Short))
	}
	l.Note = strings.Join(notes, "; ")
	return l
}
