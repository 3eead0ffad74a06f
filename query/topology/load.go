package topology

import (
	"context"
	"fmt"
	"math"
	"strings"

	"partsieve/catalog"
	"partsieve/query/spec"
)

// Source is where Pick reads parts; *catalog.Store satisfies it.
type Source interface {
	Find(ctx context.Context, q catalog.Query) ([]catalog.Part, error)
}

// statser is implemented by sources that can count their parts by kind
// and type (*catalog.Store); Pick then reports how many parts the SQL
// pre-filter eliminated.
// partCounter is a Source that counts its parts by kind and type cheaply
// (*catalog.Store does, without opening the text index); preferred over
// statser.
type partCounter interface {
	PartCounts(ctx context.Context) (catalog.Stats, error)
}

type statser interface {
	Stats(ctx context.Context) (catalog.Stats, error)
}

// prefilter is one catalog query on hard limits: the first checks of a
// role, done in SQL so that a large catalog is not loaded whole.
type prefilter struct {
	topos []Topology
	kind  catalog.Kind
	types []string // the types the query covers, for counting
	conds []catalog.Cond
	label string // the checks the conditions stand for
	role  string
}

// prefilters returns the catalog queries for the spec. Each condition
// is implied by a check that every part must pass (with factors ≤ 1 and
// a fuse rerating factor ≤ 2; a fuse's cold resistance is bounded by the
// output-voltage, drop and loss checks), so no part the checks would
// accept is left out; a part without the value (NULL) fails the same
// check for want of data.
func prefilters(s *spec.Spec) []prefilter {
	e := newEngine(s, &Catalog{}, Options{})
	pr := e.pr
	// a little slack so that rounding never excludes a part the checks
	// would accept at the boundary
	lo := func(x float64) float64 { return x * (1 - 1e-9) }
	hi := func(x float64) float64 { return x * (1 + 1e-9) }
	i := s.Load.IMax
	rcMax := e.dropLim / i
	if s.Budget.HasLoss {
		rcMax = math.Min(rcMax, s.Budget.LossMax/(i*i))
	}
	notRect := []catalog.Cond{{Field: "type", Op: "!=", Text: "zener"}, {Field: "type", Op: "!=", Text: "tvs"}}
	return []prefilter{
		{topos: []Topology{SeriesDiode}, kind: catalog.Diode, types: []string{"rectifier", "schottky"}, role: "diode",
			label: "reverse voltage or average forward current (catalog pre-filter)",
			conds: append(append([]catalog.Cond(nil), notRect...),
				catalog.Cond{Field: "vrrm", Op: ">=", Num: lo(e.vrSeries / pr.KVRRM.Value)},
				catalog.Cond{Field: "ifav", Op: ">=", Num: lo(i / pr.KIFAV.Value)})},
		{topos: []Topology{ShuntFuse}, kind: catalog.Diode, types: []string{"rectifier", "schottky"}, role: "shunt-diode",
			label: "reverse voltage in operation (catalog pre-filter)",
			conds: append(append([]catalog.Cond(nil), notRect...),
				catalog.Cond{Field: "vrrm", Op: ">=", Num: lo(e.vShunt / pr.KVRRM.Value)})},
		{topos: []Topology{ShuntFuse}, kind: catalog.Fuse, role: "fuse",
			label: "DC voltage rating, continuous current or cold resistance (catalog pre-filter)",
			conds: []catalog.Cond{{Field: "un_dc", Op: ">=", Num: lo(e.vFuse)}, {Field: "in", Op: ">=", Num: lo(i / 2)},
				{Field: "rcold", Op: "<=", Num: hi(rcMax)}}},
		{topos: []Topology{PFETHigh}, kind: catalog.MOSFET, types: []string{"p"}, role: "mosfet",
			label: "drain-source voltage or drain current (catalog pre-filter)",
			conds: []catalog.Cond{{Field: "type", Op: "=", Text: "p"},
				{Field: "vds", Op: ">=", Num: lo(e.vDS / pr.KVDS.Value)}, {Field: "id", Op: ">=", Num: lo(i / pr.KID.Value)}}},
		{topos: []Topology{NFETLow}, kind: catalog.MOSFET, types: []string{"n"}, role: "mosfet",
			label: "drain-source voltage or drain current (catalog pre-filter)",
			conds: []catalog.Cond{{Field: "type", Op: "=", Text: "n"},
				{Field: "vds", Op: ">=", Num: lo(e.vDS / pr.KVDS.Value)}, {Field: "id", Op: ">=", Num: lo(i / pr.KID.Value)}}},
		{topos: []Topology{PFETHigh, NFETLow}, kind: catalog.Diode, role: "zener",
			conds: []catalog.Cond{{Field: "type", Op: "=", Text: "zener"}}},
	}
}

// loaded is the outcome of reading the catalog for a spec.
type loaded struct {
	parts []catalog.Part
	// per topology, the eliminations done in SQL
	pre map[Topology][]Elimination
}

// load reads the parts the spec's topologies need, with offers, through
// the pre-filters; parts found by several queries are kept once.
func load(ctx context.Context, src Source, s *spec.Spec, opt Options) (*loaded, error) {
	opt = opt.withDefaults()
	var stats *catalog.Stats
	if c, ok := src.(partCounter); ok {
		if v, err := c.PartCounts(ctx); err == nil {
			stats = &v
		}
	} else if st, ok := src.(statser); ok {
		if v, err := st.Stats(ctx); err == nil {
			stats = &v
		}
	}
	out := &loaded{pre: map[Topology][]Elimination{}}
	seen := map[string]int{}
	for _, pf := range prefilters(s) {
		want := false
		for _, t := range pf.topos {
			want = want || opt.wants(t)
		}
		if !want {
			continue
		}
		parts, err := src.Find(ctx, catalog.Query{Kind: pf.kind, Conds: pf.conds, Offers: true})
		if err != nil {
			return nil, fmt.Errorf("pick: reading %s parts: %w", pf.role, err)
		}
		for _, p := range parts {
			key := string(p.Kind) + "\x00" + catalog.NormKey(p.Mfr) + "\x00" + catalog.NormKey(p.MPN)
			if _, ok := seen[key]; ok {
				continue
			}
			seen[key] = len(out.parts)
			out.parts = append(out.parts, p)
		}
	}
	if stats == nil {
		return out, nil
	}
	// parts of a role's kind and types that no query returned failed the
	// role's own pre-filter (every loaded part is evaluated in every role)
	for _, pf := range prefilters(s) {
		if pf.label == "" {
			continue
		}
		want := false
		for _, t := range pf.topos {
			want = want || opt.wants(t)
		}
		if !want {
			continue
		}
		total, have := 0, 0
		if len(pf.types) == 0 {
			total = stats.ByKind[string(pf.kind)]
		} else {
			for _, t := range pf.types {
				total += stats.ByType[t]
			}
		}
		for i := range out.parts {
			if pf.matches(&out.parts[i]) {
				have++
			}
		}
		if n := total - have; n > 0 {
			for _, t := range pf.topos {
				out.pre[t] = append(out.pre[t], Elimination{Check: pf.label, Role: pf.role, Count: n})
			}
		}
	}
	return out, nil
}

// Pick reads the catalog through src and picks candidates for spec s:
// the work of `partsieve pick`. Hard limits are applied in SQL first (and
// the parts they eliminate are counted when src can count its parts),
// then every remaining part is evaluated with the device models.
func Pick(ctx context.Context, src Source, s *spec.Spec, opt Options) (*Result, error) {
	ld, err := load(ctx, src, s, opt)
	if err != nil {
		return nil, err
	}
	r := Evaluate(s, NewCatalog(ld.parts), opt)
	mergePre(r, ld)
	return r, nil
}

// matches reports whether p is of the pre-filter's kind and types.
func (pf *prefilter) matches(p *catalog.Part) bool {
	if p.Kind != pf.kind {
		return false
	}
	if len(pf.types) == 0 {
		return true
	}
	for _, t := range pf.types {
		if strings.EqualFold(p.Type, t) {
			return true
		}
	}
	return false
}

// mergePre adds the pre-filter eliminations to the counts of the checks.
func mergePre(r *Result, ld *loaded) {
	for i := range r.Topologies {
		tr := &r.Topologies[i]
		pre := ld.pre[tr.Topology]
		if len(pre) == 0 {
			continue
		}
		for _, p := range pre {
			tr.Eliminated = append(tr.Eliminated, p)
			tr.Evaluated[p.Role] += p.Count
		}
		sortElims(tr.Eliminated)
		if tr.NoneReason != "" {
			tr.NoneReason = noneReason(tr)
		}
		r.Comparison[i] = compareRow(tr, r.Currency)
	}
}
