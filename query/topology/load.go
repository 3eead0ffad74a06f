package topology

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"maps"
	"math"
	"runtime"
	"runtime/debug"
	"slices"
	"strings"
	"sync"

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
	for _, pf := range wantedPrefilters(s, opt) {
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
	// canonical order (normalised part number, then maker), the order of
	// the column file, so that ties among equal designs are broken the
	// same way by both ways of reading the catalog
	keys := make([]string, len(out.parts))
	for i := range out.parts {
		keys[i] = catalog.NormKey(out.parts[i].MPN) + "\x00" + catalog.NormKey(out.parts[i].Mfr)
	}
	idx := make([]int, len(out.parts))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int { return strings.Compare(keys[a], keys[b]) })
	sorted := make([]catalog.Part, len(out.parts))
	for i, j := range idx {
		sorted[i] = out.parts[j]
	}
	out.parts = sorted
	if stats == nil {
		return out, nil
	}
	// parts of a role's kind and types that no query returned failed the
	// role's own pre-filter (every loaded part is evaluated in every role)
	for _, pf := range wantedPrefilters(s, opt) {
		if pf.label == "" {
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
	if v, ok := src.(viewer); ok {
		r, err := pickColumns(ctx, v, s, opt)
		if err == nil || ctx.Err() != nil || !errors.Is(err, errColumns) {
			return r, err
		}
		// the column file could not be read or written (a full disk, say):
		// read the parts through SQL instead
	}
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

// viewer is a Source that gives a consistent view of the catalog with its
// number fields in columns (*catalog.Store).
type viewer interface {
	View(ctx context.Context) (*catalog.View, error)
}

// setMatch reports whether the pre-filter applies to the parts of a
// column set: its kind, one of its types, and its conditions on the type
// (compared without case, as SQL's COLLATE NOCASE does).
func (pf *prefilter) setMatch(k catalog.Kind, typ string) bool {
	if k != pf.kind {
		return false
	}
	if len(pf.types) > 0 && !slices.ContainsFunc(pf.types, func(t string) bool { return strings.EqualFold(t, typ) }) {
		return false
	}
	for _, c := range pf.conds {
		if c.Field != "type" {
			continue
		}
		eq := strings.EqualFold(c.Text, typ)
		if c.Op == "=" && !eq || c.Op == "!=" && eq {
			return false
		}
	}
	return true
}

// numCond is a pre-filter condition on a column; a NaN (absent) value
// fails it, as NULL fails the SQL comparison.
type numCond struct {
	col []float64
	ge  bool
	x   float64
}

func (c numCond) holds(i int) bool {
	if c.col == nil {
		return false
	}
	v := c.col[i]
	if c.ge {
		return v >= c.x
	}
	return v <= c.x
}

// numConds resolves the number conditions of pf on the set.
func (pf *prefilter) numConds(cs *catalog.ColumnSet) ([]numCond, error) {
	var out []numCond
	for _, c := range pf.conds {
		if c.Field == "type" {
			continue
		}
		switch c.Op {
		case ">=", "<=":
			out = append(out, numCond{col: cs.Col(c.Field), ge: c.Op == ">=", x: c.Num})
		default:
			return nil, fmt.Errorf("pick: pre-filter operator %q on %s has no column form", c.Op, c.Field)
		}
	}
	return out, nil
}

// loadColumns reads the parts the spec's topologies need from the
// catalog's columns: the pre-filters are applied to the columns in
// memory, the parts that pass become light parts with their records, and
// the full parts of those shown are read later from the same view. The
// result equals load's (same parts, same eliminations). done restores
// the collector and releases the column file: call it when the pick is
// over (the Zeners' offers are read from the file on demand).
func loadColumns(ctx context.Context, view *catalog.View, s *spec.Spec, opt Options) (c *Catalog, pre map[Topology][]Elimination, done func(), err error) {
	done = func() {}
	pfs := wantedPrefilters(s, opt)
	cols, err := view.Columns(ctx, func(k catalog.Kind, typ string) bool {
		for i := range pfs {
			if pfs[i].setMatch(k, typ) {
				return true
			}
		}
		return false
	})
	if err != nil {
		return nil, nil, done, err
	}
	// From here the pick allocates its working set (records, then the
	// evaluation's arrays; about 300 MB at a million parts, measured) in one go and
	// drops it at the end: collections while it grows would only trace it
	// again and again (a third of the CPU time of a pick at a million
	// parts). The collector is off until Pick returns unless the process
	// passes pickMemoryLimit (or a lower GOMEMLIMIT). Not before: a stale
	// column file is rebuilt above, which makes garbage row by row.
	lim := debug.SetMemoryLimit(-1)
	gc := debug.SetGCPercent(-1)
	debug.SetMemoryLimit(min(lim, pickMemoryLimit))
	done = func() {
		cols.Close()
		debug.SetGCPercent(gc)
		debug.SetMemoryLimit(lim)
	}
	// first pass: which rows some pre-filter keeps, and the counts
	keep := make([][]int32, len(cols.Sets))
	for si, cs := range cols.Sets {
		keep[si] = make([]int32, 0, cs.Len()) // pages are touched only as filled
	}
	total, have := make([]int, len(pfs)), make([]int, len(pfs))
	for si, cs := range cols.Sets {
		var conds [][]numCond
		counted := make([]bool, len(pfs))
		for k := range pfs {
			pf := &pfs[k]
			if pf.setMatch(cs.Kind, cs.Type) {
				c, err := pf.numConds(cs)
				if err != nil {
					return nil, nil, done, err
				}
				conds = append(conds, c)
			}
			if pf.label != "" && pf.matches(&catalog.Part{Kind: cs.Kind, Type: cs.Type}) {
				counted[k] = true
				total[k] += cs.Len()
			}
		}
		for i := 0; i < cs.Len(); i++ {
			for _, cc := range conds {
				ok := true
				for _, c := range cc {
					if !c.holds(i) {
						ok = false
						break
					}
				}
				if ok {
					keep[si] = append(keep[si], int32(i))
					break
				}
			}
		}
		for k := range pfs {
			if counted[k] {
				have[k] += len(keep[si])
			}
		}
	}
	// second pass: the records (without parts: their part numbers and
	// catalog ids stand in until the few shown are read in full)
	var nr [5]int
	for si, cs := range cols.Sets {
		if r := roleOf(cs); r >= 0 {
			nr[r] += len(keep[si])
		}
	}
	c = &Catalog{diodes: hugeMake[diodeRec](nr[roleDiode]), zeners: hugeMake[diodeRec](nr[roleZener]),
		fuses: hugeMake[fuseRec](nr[roleFuse]), pfets: hugeMake[fetRec](nr[rolePFET]), nfets: hugeMake[fetRec](nr[roleNFET]), lazy: &lazyParts{
			fetch:  func(ids []int64) ([]catalog.Part, []int64, error) { return view.Parts(ctx, ids) },
			offers: func(ids []int64) (map[int64][]catalog.Offer, error) { return view.Offers(ctx, ids) },
		}}
	// each role's records in canonical order: a merge of its sets by Ord
	rcs := make([][numFields][]float64, len(cols.Sets))
	roles := make([][]int, 5)
	for si, cs := range cols.Sets {
		for f := range numFields {
			rcs[si][f] = cs.Col(numFieldNames[f])
		}
		if r := roleOf(cs); r >= 0 {
			roles[r] = append(roles[r], si)
		} else {
			c.skipped += len(keep[si])
		}
	}
	// each role's rows in canonical order (a merge of its sets by Ord),
	// the roles in parallel; zloc, the Zeners' rows, serves their offers
	locs := make([][]colLoc, len(roles))
	var wg sync.WaitGroup
	for r, sets := range roles {
		wg.Add(1)
		go func() {
			defer wg.Done()
			out := make([]colLoc, 0, nr[r])
			pos := make([]int, len(sets))
			for {
				best, bestOrd := -1, uint32(0)
				for j, si := range sets {
					if pos[j] < len(keep[si]) {
						if o := cols.Sets[si].Ord[keep[si][pos[j]]]; best < 0 || o < bestOrd {
							best, bestOrd = j, o
						}
					}
				}
				if best < 0 {
					break
				}
				out = append(out, colLoc{set: int32(sets[best]), row: keep[sets[best]][pos[best]]})
				pos[best]++
			}
			locs[r] = out
		}()
	}
	wg.Wait()
	zloc := locs[roleZener]
	// then the records, in chunks shared out between the processors (the
	// largest role alone would otherwise set the time)
	c.diodes, c.zeners = c.diodes[:len(locs[roleDiode])], c.zeners[:len(locs[roleZener])]
	c.fuses = c.fuses[:len(locs[roleFuse])]
	c.pfets, c.nfets = c.pfets[:len(locs[rolePFET])], c.nfets[:len(locs[roleNFET])]
	type task struct{ r, lo, hi int }
	var tasks []task
	for r := range locs {
		for lo := 0; lo < len(locs[r]); lo += recordChunk {
			tasks = append(tasks, task{r, lo, min(lo+recordChunk, len(locs[r]))})
		}
	}
	next := make(chan task, len(tasks))
	for _, t := range tasks {
		next <- t
	}
	close(next)
	// ranked by cost, every record carries its unit price, from the
	// offers in the column file (the ranking compares them all)
	costs := opt.Rank == RankCost
	c.units = costs
	var costMu sync.Mutex
	var costErr error
	// priceOf prices row i of cs; pb is the worker's part, its offers and
	// breaks buffers reused from row to row
	priceOf := func(cs *catalog.ColumnSet, i int, pb *pricedBuf) float64 {
		if !costs {
			return math.NaN()
		}
		var err error
		pb.p.Offers, pb.breaks, err = cs.OffersInto(i, pb.p.Offers[:0], pb.breaks[:0])
		if err != nil {
			costMu.Lock()
			costErr = cmp.Or(costErr, err)
			costMu.Unlock()
			return math.NaN()
		}
		return computeCost(&pb.p, s.Build.Quantity, s.Build.Currency, s.Build.Rates).unit
	}
	for range runtime.GOMAXPROCS(0) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			texts := fuseTextCache{}
			var pb pricedBuf
			for t := range next {
				for k := t.lo; k < t.hi; k++ {
					l := locs[t.r][k]
					si, i := int(l.set), int(l.row)
					cs := cols.Sets[si]
					src := colNums{cols: &rcs[si], i: i}
					switch t.r {
					case roleDiode, roleZener:
						d := newDiodeRec(nil, cs.MPN(i), cs.Type, src)
						d.cid, d.unit = cs.ID[i], priceOf(cs, i, &pb)
						if t.r == roleDiode {
							c.diodes[k] = d
						} else {
							c.zeners[k] = d
						}
					case roleFuse:
						f := newFuseRecTexts(nil, cs.MPN(i), texts.get(cs.FuseStd(i), cs.Rerate(i)), src)
						f.cid, f.unit = cs.ID[i], priceOf(cs, i, &pb)
						c.fuses[k] = f
					default:
						ft := newFETRec(nil, cs.MPN(i), src)
						ft.cid, ft.unit = cs.ID[i], priceOf(cs, i, &pb)
						if t.r == rolePFET {
							c.pfets[k] = ft
						} else {
							c.nfets[k] = ft
						}
					}
				}
			}
		}()
	}
	wg.Wait()
	if costErr != nil {
		return nil, nil, done, fmt.Errorf("offers in the column file: %w", costErr)
	}
	// ties between Zeners are broken on cost: their offers come from the
	// column file (thousands of rows can tie in a large catalog, and
	// reading their offers through SQLite cost 0.4–1 s at a million parts)
	var zat map[int64]int32
	c.lazy.offers = func(ids []int64) (map[int64][]catalog.Offer, error) {
		if zat == nil {
			zat = make(map[int64]int32, len(c.zeners))
			for i := range c.zeners {
				zat[c.zeners[i].cid] = int32(i)
			}
		}
		out := make(map[int64][]catalog.Offer, len(ids))
		var rest []int64
		for _, id := range ids {
			i, ok := zat[id]
			if !ok {
				rest = append(rest, id)
				continue
			}
			l := zloc[i]
			offs, err := cols.Sets[l.set].Offers(int(l.row))
			if err != nil { // a damaged section: SQLite has them
				rest = append(rest, id)
				continue
			}
			if len(offs) > 0 {
				out[id] = offs
			}
		}
		if len(rest) > 0 {
			m, err := view.Offers(ctx, rest)
			if err != nil {
				return nil, err
			}
			maps.Copy(out, m)
		}
		return out, nil
	}
	pre = map[Topology][]Elimination{}
	for k := range pfs {
		pf := &pfs[k]
		if pf.label == "" {
			continue
		}
		if d := total[k] - have[k]; d > 0 {
			for _, t := range pf.topos {
				pre[t] = append(pre[t], Elimination{Check: pf.label, Role: pf.role, Count: d})
			}
		}
	}
	return c, pre, done, nil
}

// pricedBuf is a part holding only offers, and the breaks buffer its
// offers point into: reused to price one row after another.
type pricedBuf struct {
	p      catalog.Part
	breaks []catalog.PriceBreak
}

// colLoc is a row of a column set.
type colLoc struct{ set, row int32 }

// recordChunk is how many records a worker builds at a time (a tool
// choice: large enough to keep the hand-out cheap, small enough to
// share a role between processors). A variable for tests.
var recordChunk = 16384

// The record slices of a Catalog, as NewCatalog sorts parts into them.
const (
	roleDiode = iota // rectifier and Schottky
	roleZener
	roleFuse
	rolePFET
	roleNFET
)

// roleOf returns the record slice of a column set's parts, -1 when no
// topology uses them.
func roleOf(cs *catalog.ColumnSet) int {
	typ := strings.ToLower(cs.Type)
	switch cs.Kind {
	case catalog.Diode:
		switch typ {
		case "rectifier", "schottky":
			return roleDiode
		case "zener":
			return roleZener
		}
	case catalog.Fuse:
		return roleFuse
	case catalog.MOSFET:
		switch typ {
		case "p":
			return rolePFET
		case "n":
			return roleNFET
		}
	}
	return -1
}

// errColumns marks a failure of the column file, after which Pick reads
// the parts through SQL.
var errColumns = errors.New("catalog columns unavailable")

// pickMemoryLimit is the memory (bytes) past which the collector runs
// during a pick (see loadColumns): a tool choice, about four times the
// working set of a pick at a million parts.
const pickMemoryLimit = 1536 << 20

// pickColumns is Pick on a catalog's column view.
func pickColumns(ctx context.Context, v viewer, s *spec.Spec, opt Options) (*Result, error) {
	// A pick allocates its working set (about 650 MB at a million parts)
	// in one go and drops it at the end: collections while it grows would
	// only trace it again and again (a third of the CPU time of a pick at
	// a million parts). The collector is off during the pick unless the
	// process passes pickMemoryLimit (or a lower GOMEMLIMIT).
	view, err := v.View(ctx)
	if err != nil {
		return nil, fmt.Errorf("pick: %w", err)
	}
	defer view.Close()
	cat, pre, done, err := loadColumns(ctx, view, s, opt.withDefaults())
	defer done()
	if err != nil {
		return nil, fmt.Errorf("pick: %w: %w", errColumns, err)
	}
	r := Evaluate(s, cat, opt)
	if err := cat.lazy.err; err != nil {
		return nil, fmt.Errorf("pick: reading the parts shown: %w", err)
	}
	mergePre(r, &loaded{pre: pre})
	return r, nil
}

// PrefilterQueries returns the catalog queries Pick starts from for spec
// s (kind and hard-limit conditions per role): for comparisons such as
// the scale benchmark's plain scan.
func PrefilterQueries(s *spec.Spec, opt Options) []catalog.Query {
	var out []catalog.Query
	for _, pf := range wantedPrefilters(s, opt.withDefaults()) {
		out = append(out, catalog.Query{Kind: pf.kind, Conds: append([]catalog.Cond(nil), pf.conds...)})
	}
	return out
}

// wantedPrefilters returns the pre-filters of the topologies opt wants.
func wantedPrefilters(s *spec.Spec, opt Options) []prefilter {
	var out []prefilter
	for _, pf := range prefilters(s) {
		if slices.ContainsFunc(pf.topos, opt.wants) {
			out = append(out, pf)
		}
	}
	return out
}
