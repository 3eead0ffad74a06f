package catalog

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Result is the answer to a Query with what the caller should tell the
// user about the text part of it.
type Result struct {
	Parts []Part
	// TextHits is the number of parts the text matched before Kind, Conds
	// and Limit applied (0 without Text).
	TextHits int
	// Capped is true when the text matched more than TextCap parts: only
	// the TextCap most relevant were filtered further.
	Capped bool
	// Fallback is true when the text index was held by another process (an
	// import) or unusable: Text was then matched as plain case-insensitive
	// substrings of mfr, mpn, desc, package, kind and type, without fuzzy
	// matching or relevance.
	Fallback bool

	partIDs []int64 // ids of Parts
}

// Find runs q. Parts whose sort field is absent sort last.
func (s *Store) Find(ctx context.Context, q Query) ([]Part, error) {
	r, err := s.Search(ctx, q)
	if err != nil {
		return nil, err
	}
	return r.Parts, nil
}

// Search runs q like Find and also reports on the text search.
//
// Without Text, SQLite alone answers (the text index is not opened). With
// Text, the index returns the matching part ids (see textQuery for the
// term semantics) and SQLite filters, sorts and limits them; with Sort ""
// the order is text relevance. Without Text and Sort the order is
// manufacturer, then part number (normalised keys).
//
// With a Limit, the work is bounded by what the answer needs rather than
// by what the text or the conditions match: the relevance order asks the
// index for pages of hits and stops when Limit parts passed the filters
// (searchRelevance); sorted and default orders pick the ids of the Limit
// parts first (pickIDs chooses the access path) and only then read those
// parts in full.
func (s *Store) Search(ctx context.Context, q Query) (*Result, error) {
	fq, err := compileQuery(q)
	if err != nil {
		return nil, err
	}
	res := &Result{}
	text := len(splitTerms(q.Text)) > 0
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	defer tx.Rollback()
	var ids []int64
	relevance := false
	if text {
		if q.Sort == "" {
			relevance, err = s.searchRelevance(ctx, tx, fq, q.Text, q.Limit, res)
			if err != nil {
				return nil, err
			}
			ids = res.partIDs
		} else {
			hits, total, ok, err := s.textAll(ctx, q.Text)
			if err != nil {
				return nil, err
			}
			if ok {
				fq.ids, fq.nIDs, fq.hasIDs = idsJSON(hits), len(hits), true
				res.TextHits = int(total)
				res.Capped = total > uint64(TextCap)
			}
		}
		if !relevance && !fq.hasIDs {
			fq.like = splitTerms(q.Text)
			res.Fallback = true
		}
	}
	if !relevance {
		if q.Limit > 0 {
			ids, err = fq.pickIDs(ctx, tx, q.Limit)
			if err == nil {
				res.Parts, ids, err = fetchParts(ctx, tx, ids)
			}
		} else {
			res.Parts, ids, err = fq.scanAll(ctx, tx)
		}
		if err != nil {
			return nil, fmt.Errorf("catalog %s: find: %w", s.Path, err)
		}
	}
	if q.Offers {
		if err := loadOffers(ctx, tx, res.Parts, ids); err != nil {
			return nil, fmt.Errorf("catalog %s: offers: %w", s.Path, err)
		}
	}
	return res, nil
}

// relevancePage is the number of hits searchRelevance asks for first when
// conditions filter them, per part of the Limit; each further page is
// relevanceGrowth times the hits asked for so far.
const (
	relevancePage   = 4
	relevanceGrowth = 8
)

// searchRelevance answers a text query in relevance order. It asks the
// index for the best hits a page at a time (Limit hits first without
// conditions, relevancePage×Limit with them, then relevanceGrowth times
// more, up to TextCap) and lets SQLite keep those that pass the kind and
// conditions (and that the catalog still has) until Limit parts are found
// or the hits run out. Without a Limit it asks for TextCap hits at once.
//
// Each page is a new search for the hits ranked [from, from+size): the
// ranking (score, then index order on ties) does not depend on the page
// size, so the parts found are the first Limit of the TextCap best hits
// that pass, exactly as one search of TextCap hits would give. It returns
// false when the index cannot be used (the caller falls back to a
// substring search).
func (s *Store) searchRelevance(ctx context.Context, tx *sql.Tx, fq *findSQL, text string, limit int, res *Result) (bool, error) {
	filtered := len(fq.kinds) > 0 || len(fq.conds) > 0
	want := TextCap
	if limit > 0 {
		want = min(limit, TextCap)
		if filtered {
			want = min(relevancePage*limit, TextCap)
		}
	}
	var found []int64
	seen := map[int64]bool{}
	from := 0
	for {
		traceTextPage(from, want-from)
		hits, total, ok, err := s.textSearch(ctx, text, true, from, want-from)
		if err != nil {
			return false, err
		}
		if !ok {
			return false, nil
		}
		res.TextHits = int(total)
		res.Capped = total > uint64(TextCap)
		page := hits[:0]
		for _, id := range hits {
			if !seen[id] { // pages of one snapshot never overlap; an index updated meanwhile might
				seen[id] = true
				page = append(page, id)
			}
		}
		need := 0
		if limit > 0 {
			need = limit - len(found)
		}
		kept, err := fq.filterIDs(ctx, tx, page, need)
		if err != nil {
			return false, fmt.Errorf("catalog %s: find: %w", s.Path, err)
		}
		found = append(found, kept...)
		end := min(int(total), TextCap)
		if limit > 0 && len(found) >= limit || want >= end || len(hits) < want-from {
			break
		}
		from = want
		want = min(want*relevanceGrowth, end)
	}
	ps, ids, err := fetchParts(ctx, tx, found)
	if err != nil {
		return false, fmt.Errorf("catalog %s: find: %w", s.Path, err)
	}
	res.Parts, res.partIDs = ps, ids
	return true, nil
}

// filterIDs returns, in the order of ids, the first limit (0: all) of ids
// that are parts passing fq's kind and conditions.
func (fq *findSQL) filterIDs(ctx context.Context, tx *sql.Tx, ids []int64, limit int) ([]int64, error) {
	if len(ids) == 0 {
		return nil, nil
	}
	where, args := joinTerms(fq.terms(-1, false))
	stmt := `SELECT parts.id FROM json_each(?) AS t CROSS JOIN parts ON parts.id = t.value` + whereSQL(where) + ` ORDER BY t.key` + limitSQL(limit)
	return queryIDs(ctx, tx, stmt, append([]any{idsJSON(ids)}, args...)...)
}

// fetchParts reads the parts ids in full, in the order of ids; ids no
// longer in the catalog are left out.
func fetchParts(ctx context.Context, q queryer, ids []int64) ([]Part, []int64, error) {
	if len(ids) == 0 {
		return nil, nil, nil
	}
	return scanParts(ctx, q, `SELECT parts.id, `+partJSON()+` FROM json_each(?) AS t CROSS JOIN parts ON parts.id = t.value ORDER BY t.key`, idsJSON(ids))
}

func queryIDs(ctx context.Context, q queryer, stmt string, args ...any) ([]int64, error) {
	rows, err := q.QueryContext(ctx, stmt, args...)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	var ids []int64
	for rows.Next() {
		var id int64
		if err := rows.Scan(&id); err != nil {
			return nil, err
		}
		ids = append(ids, id)
	}
	return ids, rows.Err()
}

// scanAll answers a query without a Limit: every matching part, read in
// full by one statement per phase; SQLite's planner chooses the plan.
func (fq *findSQL) scanAll(ctx context.Context, tx *sql.Tx) ([]Part, []int64, error) {
	var parts []Part
	var ids []int64
	for _, ph := range fq.phases() {
		stmt, args := fq.build(ph, 0)
		ps, pids, err := scanParts(ctx, tx, stmt, args...)
		if err != nil {
			return nil, nil, err
		}
		parts = append(parts, ps...)
		ids = append(ids, pids...)
	}
	return parts, ids, nil
}

// phases lists the statements a query needs: 0 without a sort field, 1
// the rows whose sort field is present (sorted), 2 those where it is
// absent (NULLs last).
func (fq *findSQL) phases() []int {
	if fq.sortExpr == "" {
		return []int{0}
	}
	if fq.sortNotNull {
		return []int{1}
	}
	return []int{1, 2}
}

// ByMPN returns every part whose normalised MPN equals NormKey(mpn), with
// offers (several makers can use the same number).
func (s *Store) ByMPN(ctx context.Context, mpn string) ([]Part, error) {
	key := NormKey(mpn)
	if key == "" {
		return nil, errors.New("no part number given")
	}
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	defer tx.Rollback()
	ps, ids, err := scanParts(ctx, tx, `SELECT parts.id, `+partJSON()+` FROM parts WHERE parts.mpn_key = ? ORDER BY parts.mfr_key`, key)
	if err == nil {
		err = loadOffers(ctx, tx, ps, ids)
	}
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	return ps, nil
}

// findSQL is a validated query ready to become SQL.
type findSQL struct {
	kinds       []Kind // kinds the parts must be (one term each)
	conds       []condSQL
	sortExpr    string // ORDER BY expression of the sort field, "" = none
	sortCol     string // column tested for NULL
	sortField   string // canonical name of the sort field
	sortNotNull bool   // the sort column is NOT NULL (no NULL phase)
	desc        bool
	ids         string // JSON array of text-search ids
	nIDs        int    // number of ids
	hasIDs      bool
	like        []string // fallback substring terms
}

var likeEscaper = strings.NewReplacer(`\`, `\\`, `%`, `\%`, `_`, `\_`)

func likePattern(s string) string { return "%" + likeEscaper.Replace(s) + "%" }

// condSQL is one condition as an SQL term.
type condSQL struct {
	expr  string
	args  []any
	field string // canonical field name
	col   string // the column it tests (unquoted)
	// ranged: a comparison (< <= > >= =) on a number, which a partial
	// index of the field's kind can serve as a range.
	ranged bool
	keyEq  bool // mfr_key or mpn_key = ?
}

// compileQuery validates q and turns its Kind and Conds into SQL terms.
func compileQuery(q Query) (*findSQL, error) {
	fq := &findSQL{desc: q.Desc}
	kinds := map[Kind]bool{}
	if q.Kind != "" {
		k, ok := canonEnum(&Fields[fieldIndex["kind"]], strings.TrimSpace(string(q.Kind)))
		if !ok {
			return nil, fmt.Errorf("unknown kind %q (one of diode, fuse, mosfet)", q.Kind)
		}
		kinds[Kind(k)] = true
	}
	for _, c := range q.Conds {
		cs, implied, err := compileCond(c)
		if err != nil {
			return nil, err
		}
		if implied != "" {
			kinds[implied] = true
		}
		if cs.expr != "" {
			fq.conds = append(fq.conds, cs)
		}
	}
	for _, k := range Kinds {
		if kinds[k] {
			fq.kinds = append(fq.kinds, k)
		}
	}
	if q.Sort != "" {
		f, ok := FieldByName(q.Sort)
		if !ok {
			return nil, fmt.Errorf("cannot sort by %q: no such field (see `partsieve fields`)", q.Sort)
		}
		switch f.Name {
		case "mfr":
			fq.sortExpr, fq.sortNotNull = "parts.mfr_key", true
		case "mpn":
			fq.sortExpr, fq.sortNotNull = "parts.mpn_key", true
		case "kind":
			fq.sortExpr, fq.sortNotNull = qcol("kind"), true
		default:
			fq.sortExpr = qcol(f.Name)
			if f.Type == Text || f.Type == Enum {
				fq.sortExpr += " COLLATE NOCASE"
			}
		}
		fq.sortCol, fq.sortField = qcol(f.Name), f.Name
	}
	return fq, nil
}

func condText(c Cond, f *Field) string {
	v := c.Text
	if f != nil && f.Type == Number || v == "" && f != nil && f.Type == Bool {
		v = strconv.FormatFloat(c.Num, 'g', -1, 64)
	}
	return c.Field + c.Op + v
}

// compileCond turns one condition into an SQL term with its arguments. A
// Number condition on a field of a single kind implies that kind (Put
// never stores a field on a kind it does not apply to), which lets the
// planner use that kind's partial index.
func compileCond(c Cond) (cs condSQL, implied Kind, err error) {
	f, ok := FieldByName(strings.TrimSpace(c.Field))
	if !ok {
		return condSQL{}, "", fmt.Errorf("condition %s: unknown field %q (see `partsieve fields`)", condText(c, nil), c.Field)
	}
	bad := func(format string, a ...any) error {
		return fmt.Errorf("condition %s: %s", condText(c, &f), fmt.Sprintf(format, a...))
	}
	col := qcol(f.Name)
	op := strings.TrimSpace(c.Op)
	term := func(expr string, args ...any) condSQL {
		return condSQL{expr: expr, args: args, field: f.Name, col: colName(f.Name)}
	}
	switch f.Type {
	case Number:
		if math.IsNaN(c.Num) || math.IsInf(c.Num, 0) {
			return condSQL{}, "", bad("the value is not a finite number")
		}
		if len(f.Kinds) == 1 {
			implied = f.Kinds[0]
		}
		switch op {
		case "<", "<=", ">", ">=":
			cs := term(col+" "+op+" ?", c.Num)
			cs.ranged = true
			return cs, implied, nil
		case "=", "==", "!=", "<>":
			tol := relTol * math.Abs(c.Num)
			not := ""
			if op == "!=" || op == "<>" {
				not = "NOT "
			}
			cs := term(col+" "+not+"BETWEEN ? AND ?", c.Num-tol, c.Num+tol)
			cs.ranged = not == ""
			return cs, implied, nil
		}
		return condSQL{}, "", bad("operator %q does not apply to a number (use = != < <= > >=)", op)
	case Bool:
		var b bool
		if t := strings.TrimSpace(c.Text); t != "" {
			switch strings.ToLower(t) {
			case "1", "yes", "y", "true", "t", "on":
				b = true
			case "0", "no", "n", "false", "f", "off":
			default:
				return condSQL{}, "", bad("%q is not yes or no", t)
			}
		} else {
			b = c.Num != 0
		}
		switch op {
		case "=", "==":
			return term(col+" = ?", b2i(b)), "", nil
		case "!=", "<>":
			return term(col+" != ?", b2i(b)), "", nil
		}
		return condSQL{}, "", bad("operator %q does not apply to a yes/no field (use = or !=)", op)
	case Enum, Text:
		t := strings.TrimSpace(c.Text)
		switch op {
		case "~":
			if t == "" {
				return condSQL{}, "", bad("nothing to look for")
			}
			return term(col+` LIKE ? ESCAPE '\'`, likePattern(t)), "", nil
		case "=", "==", "!=", "<>":
			neg := op == "!=" || op == "<>"
			if f.Type == Enum {
				w, ok := canonEnum(&f, t)
				if !ok {
					return condSQL{}, "", bad("%q is not one of %s", t, strings.Join(f.Enum, ", "))
				}
				if f.Name == "kind" && !neg {
					return condSQL{}, Kind(w), nil
				}
				t = w
			}
			cmp := " = "
			if neg {
				cmp = " != "
			}
			switch f.Name {
			case "mfr", "mpn":
				cs := term("parts."+f.Name+"_key"+cmp+"?", NormKey(t))
				cs.col, cs.keyEq = f.Name+"_key", !neg
				return cs, "", nil
			}
			return term(col+cmp+"? COLLATE NOCASE", t), "", nil
		}
		return condSQL{}, "", bad("operator %q does not apply to a text field (use =, != or ~)", op)
	}
	return condSQL{}, "", bad("unsupported field type")
}

// sqlTerm is one WHERE term.
type sqlTerm struct {
	expr string
	args []any
	col  string // the one column it tests, "" for several
}

// terms lists the WHERE terms of phase (-1: none of the phase terms): the
// kinds (as literals, so that the partial indexes WHERE "kind" = 'diode'
// ... apply; kinds are dictionary words), the conditions, the text ids
// when withIDs, the fallback substrings and the phase's NULL test.
func (fq *findSQL) terms(phase int, withIDs bool) []sqlTerm {
	var out []sqlTerm
	for _, k := range fq.kinds {
		out = append(out, sqlTerm{expr: `parts."kind" = '` + string(k) + `'`, col: "kind"})
	}
	for _, c := range fq.conds {
		out = append(out, sqlTerm{expr: c.expr, args: c.args, col: c.col})
	}
	if withIDs && fq.hasIDs {
		out = append(out, sqlTerm{expr: `parts.id IN (SELECT value FROM json_each(?))`, args: []any{fq.ids}})
	}
	for _, t := range fq.like {
		p := likePattern(t)
		var ors []string
		var args []any
		for _, f := range []string{"mfr", "desc", "package", "kind", "type"} {
			ors = append(ors, qcol(f)+` LIKE ? ESCAPE '\'`)
			args = append(args, p)
		}
		ors = append(ors, `parts.mpn_key LIKE ? ESCAPE '\'`)
		args = append(args, likePattern(NormKey(t)))
		out = append(out, sqlTerm{expr: "(" + strings.Join(ors, " OR ") + ")", args: args})
	}
	switch phase {
	case 1:
		out = append(out, sqlTerm{expr: fq.sortCol + " IS NOT NULL", col: colName(fq.sortField)})
	case 2:
		out = append(out, sqlTerm{expr: fq.sortCol + " IS NULL", col: colName(fq.sortField)})
	}
	return out
}

// joinTerms writes terms as one AND expression ("" for none) and their
// arguments.
func joinTerms(ts []sqlTerm) (string, []any) {
	var exprs []string
	var args []any
	for _, t := range ts {
		exprs = append(exprs, t.expr)
		args = append(args, t.args...)
	}
	return strings.Join(exprs, " AND "), args
}

func whereSQL(where string) string {
	if where == "" {
		return ""
	}
	return " WHERE " + where
}

func limitSQL(limit int) string {
	if limit <= 0 {
		return ""
	}
	return " LIMIT " + strconv.Itoa(limit)
}

// orderSQL is the ORDER BY list of phase: the sort field then the id for
// phase 1, else manufacturer then part number.
func (fq *findSQL) orderSQL(phase int) string {
	if phase == 1 {
		dir := " ASC"
		if fq.desc {
			dir = " DESC"
		}
		return fq.sortExpr + dir + ", parts.id" + dir
	}
	return "parts.mfr_key, parts.mpn_key"
}

// build writes the SELECT of ids and partJSON for one phase (see phases),
// for SQLite's planner to choose the plan. Phase 1 sorted on an indexed
// column with a kind term walks a partial index and stops after LIMIT.
// With text ids, phases 0 and 2 read the ids first.
//
// Without a LIMIT, the default order is written +parts.mfr_key,
// +parts.mpn_key (the same values) unless a condition fixes the
// manufacturer or part number: otherwise SQLite reads the order index to
// save the sort, a random row read per part of the kind (at 1,000,000
// parts, 7.8 s for the 300,000 fuses), where reading the table in storage
// order and sorting is cheaper.
func (fq *findSQL) build(phase, limit int) (string, []any) {
	join := fq.hasIDs && phase != 1
	where, args := joinTerms(fq.terms(phase, !join))
	from := `parts`
	if join {
		from = `json_each(?) AS t CROSS JOIN parts ON parts.id = t.value`
		args = append([]any{fq.ids}, args...)
	}
	order := fq.orderSQL(phase)
	if phase != 1 && limit <= 0 && !fq.keyEquality() {
		order = "+parts.mfr_key, +parts.mpn_key"
	}
	return `SELECT parts.id, ` + partJSON() + ` FROM ` + from + whereSQL(where) + ` ORDER BY ` + order + limitSQL(limit), args
}

// keyEquality reports whether a condition fixes the manufacturer or part
// number key.
func (fq *findSQL) keyEquality() bool {
	for _, c := range fq.conds {
		if c.keyEq {
			return true
		}
	}
	return false
}

// orderIndex serves the default order (manufacturer key, part number
// key); its kind column lets a walk skip other kinds without reading
// their rows. See migrateV2.
const orderIndex = "find_order"

// Access-path costs, in units of one part row read by id (a B-tree
// descent in the table; about 1 µs when its page is cached, 10 µs and more
// when it is not, at 1,000,000 parts on the development machine).
// walkProbe and walkPatience are variables for tests.
var (
	// walkProbe is the first budget of rows of a walk, and the size up to
	// which a range is taken without trying a walk.
	walkProbe = 1000
	// walkPatience: a walk that has found no match yet goes on while the
	// rows it read, times walkPatience, cost less than the best other
	// path (see walkOn).
	walkPatience = 32.0
)

const (
	// scanRowCost is the cost of one row of a full table scan (sequential
	// pages; measured 0.3–1.3 µs a row, with its share of the sort, against
	// 2–10 µs a lookup).
	scanRowCost = 1.0 / 4
	// rangeCountCap bounds the count of a range's index entries (index
	// only, about 10 ns an entry).
	rangeCountCap = 1 << 18
)

// pickIDs returns the ids of the first limit (> 0) parts of the query in
// its order, choosing the access path per phase (see pickPhase).
func (fq *findSQL) pickIDs(ctx context.Context, tx *sql.Tx, limit int) ([]int64, error) {
	if len(fq.kinds) > 1 {
		return nil, nil // a part has one kind
	}
	var out []int64
	for _, ph := range fq.phases() {
		need := limit - len(out)
		if need <= 0 {
			break
		}
		ids, err := fq.pickPhase(ctx, tx, ph, need)
		if err != nil {
			return nil, err
		}
		out = append(out, ids...)
	}
	return out, nil
}

// access is a way of answering one phase and its expected cost.
type access struct {
	what string // for tests: the index, "ids" or "scan"
	cost float64
	stmt string
	args []any
}

// pickPhase returns the ids of the first limit parts of one phase. The
// candidate access paths are:
//
//   - walk: read an index that gives the phase's order (the order index
//     for manufacturer and part number, the sort field's partial index),
//     test each row, stop at limit matches. Its cost is about limit/s
//     rows for a fraction s of rows that match, unknown beforehand.
//   - range: read the rows of one condition's range in its field's partial
//     index (cost: the entries, counted in the index without reading
//     rows), sort the matches and keep limit.
//   - ids: read the text-search hits by id, then the same.
//   - mpn: read the rows of a part number given by a condition (the key
//     index), then the same.
//   - scan: read the whole table in order of storage (cost: rows ×
//     scanRowCost), then the same.
//
// A range, ids or mpn path of at most walkProbe rows is taken at once,
// and the cheapest of them and scan when there is no walk. Otherwise
// the walk reads a budget of rows (at least walkProbe), and, while it
// has fewer than limit matches, a budget twice as large after the last
// row read, as long as walkOn expects the rest to cost less than the best
// other path; else that path answers. The parts and their order are the
// same whichever path answers.
func (fq *findSQL) pickPhase(ctx context.Context, tx *sql.Tx, phase, limit int) ([]int64, error) {
	walk, inIndex := fq.walkIndex(phase)
	capCount := walkProbe + 1
	if walk == "" {
		capCount = rangeCountCap
	}
	best, err := fq.bestOther(ctx, tx, phase, limit, capCount)
	if err != nil {
		return nil, err
	}
	if walk == "" || best.cost <= float64(walkProbe) {
		tracePick(phase, best.what, best.cost)
		return queryIDs(ctx, tx, best.stmt, best.args...)
	}
	var idx, filter []sqlTerm
	for _, t := range fq.terms(phase, true) {
		if t.col != "" && inIndex[t.col] {
			idx = append(idx, t)
		} else {
			filter = append(filter, t)
		}
	}
	ok, fargs := "1", []any(nil)
	if len(filter) > 0 {
		ok, fargs = joinTerms(filter)
	}
	keys, cmp := "parts.mfr_key, parts.mpn_key", " > "
	if phase == 1 {
		keys = fq.sortCol + ", parts.id"
		if fq.desc {
			cmp = " < "
		}
	}
	var ids []int64
	var after []any // the keys of the last row read
	n := 0
	for budget := max(walkProbe, 4*limit); ; budget *= 2 {
		ts := idx
		if after != nil {
			ts = append(ts[:len(ts):len(ts)], sqlTerm{expr: "(" + keys + ")" + cmp + "(?, ?)", args: after})
		}
		where, wargs := joinTerms(ts)
		from := ` FROM parts INDEXED BY ` + walk + whereSQL(where) + ` ORDER BY ` + fq.orderSQL(phase)
		// at most budget rows read (the subquery's LIMIT), stopping at
		// the matches still needed (the outer LIMIT)
		more, err := queryIDs(ctx, tx, `SELECT id FROM (SELECT parts.id AS id, `+ok+` AS ok`+from+` LIMIT ?) WHERE ok`+limitSQL(limit-len(ids)),
			append(append(append([]any(nil), fargs...), wargs...), budget)...)
		if err != nil {
			return nil, err
		}
		ids = append(ids, more...)
		if len(ids) == limit {
			tracePick(phase, "walk "+walk, best.cost)
			return ids, nil
		}
		// the keys of the last row read, from the index alone
		last := []any{nil, nil}
		err = tx.QueryRowContext(ctx, `SELECT `+keys+from+` LIMIT 1 OFFSET ?`, append(wargs, budget-1)...).Scan(&last[0], &last[1])
		if errors.Is(err, sql.ErrNoRows) {
			tracePick(phase, "walk "+walk, best.cost)
			return ids, nil // every row read
		}
		if err != nil {
			return nil, err
		}
		n += budget
		if capCount < rangeCountCap {
			capCount = rangeCountCap
			if best, err = fq.bestOther(ctx, tx, phase, limit, capCount); err != nil {
				return nil, err
			}
		}
		traceWalk(n, len(ids), best.cost)
		if !walkOn(n, len(ids), limit, best.cost) {
			break
		}
		after = last
	}
	tracePick(phase, "walk "+walk+", then "+best.what, best.cost)
	return queryIDs(ctx, tx, best.stmt, best.args...)
}

// walkOn decides whether a walk that read n rows and found k < limit
// matches should go on (with twice the budget, so the rows read before
// a wrong guess is given up cost at most twice those of the last try)
// rather than leave the query to a path of cost other. With matches, the
// rest is expected to cost (limit−k)·n/k rows. Without any, the order may
// simply put the non-matching rows first (the part numbers of the lowest
// ratings often sort first): the walk goes on while it has read less than
// other/walkPatience.
func walkOn(n, k, limit int, other float64) bool {
	if k == 0 {
		return float64(n)*walkPatience <= other
	}
	return float64(limit-k)*float64(n)/float64(k) <= other
}

// tracePick, when tests set it, learns the access path of each phase and
// the cost of the best path other than the walk; traceWalk learns each
// decision of a walk (rows read, matches, cost of the other path).
var (
	tracePick = func(phase int, path string, other float64) {}
	traceWalk = func(n, k int, other float64) {}
	// traceTextPage learns each page of text hits searchRelevance asks for.
	traceTextPage = func(from, size int) {}
)

// walkIndex returns the index whose order is that of phase, if any, and
// the columns a term can test from that index alone.
func (fq *findSQL) walkIndex(phase int) (string, map[string]bool) {
	if phase != 1 {
		return orderIndex, map[string]bool{"mfr_key": true, "mpn_key": true, "kind": true}
	}
	if len(fq.kinds) == 1 && hasParamIndex(fq.kinds[0], fq.sortField) {
		return paramIndexName(fq.kinds[0], fq.sortField), map[string]bool{colName(fq.sortField): true, "kind": true}
	}
	return "", nil
}

func hasParamIndex(k Kind, field string) bool {
	for _, ix := range paramIndexes {
		if ix.kind == k && ix.field == field {
			return true
		}
	}
	return false
}

// bestOther returns the cheapest of the range, ids, mpn and scan paths of
// phase (see pickPhase), counting at most capCount entries of a range.
func (fq *findSQL) bestOther(ctx context.Context, tx *sql.Tx, phase, limit, capCount int) (access, error) {
	order := " ORDER BY " + fq.orderSQL(phase) + limitSQL(limit)
	where, args := joinTerms(fq.terms(phase, true))
	var maxID sql.NullInt64
	if err := tx.QueryRowContext(ctx, `SELECT max(id) FROM parts`).Scan(&maxID); err != nil {
		return access{}, err
	}
	best := access{what: "scan", cost: float64(maxID.Int64) * scanRowCost,
		stmt: `SELECT parts.id FROM parts NOT INDEXED` + whereSQL(where) + order, args: args}
	if fq.hasIDs && float64(fq.nIDs) < best.cost {
		w, a := joinTerms(fq.terms(phase, false))
		best = access{what: "ids", cost: float64(fq.nIDs),
			stmt: `SELECT parts.id FROM json_each(?) AS t CROSS JOIN parts ON parts.id = t.value` + whereSQL(w) + order,
			args: append([]any{fq.ids}, a...)}
	}
	for _, c := range fq.conds {
		if c.keyEq && c.col == "mpn_key" {
			// the key index (mpn_key, mfr_key) finds the part number's
			// rows; SQLite's planner takes it for this term
			var n int
			if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM (SELECT 1 FROM parts WHERE `+c.expr+limitSQL(capCount)+`)`, c.args...).Scan(&n); err != nil {
				return access{}, err
			}
			if float64(n) < best.cost {
				best = access{what: "mpn", cost: float64(n), stmt: `SELECT parts.id FROM parts` + whereSQL(where) + order, args: args}
			}
			break
		}
	}
	if len(fq.kinds) != 1 {
		return best, nil
	}
	k := fq.kinds[0]
	kindTerm := fq.terms(-1, false)[0]
	done := map[string]bool{}
	for _, c := range fq.conds {
		if !c.ranged || done[c.field] || !hasParamIndex(k, c.field) || phase == 1 && c.field == fq.sortField {
			continue
		}
		done[c.field] = true
		ix := paramIndexName(k, c.field)
		rng := []sqlTerm{kindTerm}
		for _, d := range fq.conds {
			if d.ranged && d.field == c.field {
				rng = append(rng, sqlTerm{expr: d.expr, args: d.args})
			}
		}
		w, a := joinTerms(rng)
		var n int
		if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM (SELECT 1 FROM parts INDEXED BY `+ix+whereSQL(w)+limitSQL(capCount)+`)`, a...).Scan(&n); err != nil {
			return access{}, err
		}
		if float64(n) < best.cost {
			best = access{what: ix, cost: float64(n), stmt: `SELECT parts.id FROM parts INDEXED BY ` + ix + whereSQL(where) + order, args: args}
		}
	}
	return best, nil
}

// scanParts runs a SELECT of parts.id and partJSON; it returns the parts
// and their ids.
func scanParts(ctx context.Context, q queryer, stmt string, args ...any) ([]Part, []int64, error) {
	rows, err := q.QueryContext(ctx, stmt, args...)
	if err != nil {
		return nil, nil, err
	}
	defer rows.Close()
	var out []Part
	var ids []int64
	for rows.Next() {
		var id int64
		var js string
		if err := rows.Scan(&id, &js); err != nil {
			return nil, nil, err
		}
		r, err := jsonRow(js)
		if err != nil {
			return nil, nil, fmt.Errorf("part %d: %w", id, err)
		}
		out = append(out, toPart(r))
		ids = append(ids, id)
	}
	return out, ids, rows.Err()
}

// loadOffers fills the Offers of parts; ids[i] is the id of parts[i].
func loadOffers(ctx context.Context, q queryer, parts []Part, ids []int64) error {
	if len(parts) == 0 {
		return nil
	}
	at := make(map[int64]int, len(parts))
	for i, id := range ids {
		at[id] = i
	}
	rows, err := q.QueryContext(ctx, `SELECT part_id, supplier, sku, stock, moq, currency, breaks FROM offers
		WHERE part_id IN (SELECT value FROM json_each(?)) ORDER BY part_id, supplier_key, sku`, idsJSON(ids))
	if err != nil {
		return err
	}
	defer rows.Close()
	for rows.Next() {
		var pid int64
		var o Offer
		var stock sql.NullInt64
		var breaks string
		if err := rows.Scan(&pid, &o.Supplier, &o.SKU, &stock, &o.MOQ, &o.Currency, &breaks); err != nil {
			return err
		}
		if stock.Valid {
			v := stock.Int64
			o.Stock = &v
		}
		if o.Breaks, err = decodeBreaks(breaks); err != nil {
			return fmt.Errorf("price breaks of an offer of part %d: %w", pid, err)
		}
		if i, ok := at[pid]; ok {
			parts[i].Offers = append(parts[i].Offers, o)
		}
	}
	return rows.Err()
}
