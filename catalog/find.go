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
func (s *Store) Search(ctx context.Context, q Query) (*Result, error) {
	fq, err := compileQuery(q)
	if err != nil {
		return nil, err
	}
	res := &Result{}
	if strings.TrimSpace(q.Text) != "" {
		if tq := textQuery(q.Text); tq != nil {
			ids, total, ok, err := s.textSearch(ctx, tq, q.Sort == "")
			if err != nil {
				return nil, err
			}
			if ok {
				fq.ids, fq.hasIDs = idsJSON(ids), true
				res.TextHits = int(total)
				res.Capped = total > uint64(TextCap)
			} else {
				fq.like = splitTerms(q.Text)
				res.Fallback = true
			}
		}
	}
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	defer tx.Rollback()
	phases := []int{0}
	if fq.sortExpr != "" {
		phases = []int{1}
		if !fq.sortNotNull {
			phases = append(phases, 2)
		}
	}
	var ids []int64
	for _, ph := range phases {
		limit := 0
		if q.Limit > 0 {
			limit = q.Limit - len(res.Parts)
			if limit <= 0 {
				break
			}
		}
		stmt, args := fq.build(ph, limit)
		ps, pids, err := scanParts(ctx, tx, stmt, args...)
		if err != nil {
			return nil, fmt.Errorf("catalog %s: find: %w", s.Path, err)
		}
		res.Parts = append(res.Parts, ps...)
		ids = append(ids, pids...)
	}
	if q.Offers {
		if err := loadOffers(ctx, tx, res.Parts, ids); err != nil {
			return nil, fmt.Errorf("catalog %s: offers: %w", s.Path, err)
		}
	}
	return res, nil
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
	where       []string
	args        []any
	sortExpr    string // ORDER BY expression of the sort field, "" = none
	sortCol     string // column tested for NULL
	sortNotNull bool   // the sort column is NOT NULL (no NULL phase)
	desc        bool
	ids         string // JSON array of text-search ids
	hasIDs      bool
	like        []string // fallback substring terms
}

var likeEscaper = strings.NewReplacer(`\`, `\\`, `%`, `\%`, `_`, `\_`)

func likePattern(s string) string { return "%" + likeEscaper.Replace(s) + "%" }

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
		expr, args, implied, err := compileCond(c)
		if err != nil {
			return nil, err
		}
		if implied != "" {
			kinds[implied] = true
		}
		if expr != "" {
			fq.where = append(fq.where, expr)
			fq.args = append(fq.args, args...)
		}
	}
	// The kind is written as a literal so that the partial indexes
	// (WHERE "kind" = 'diode' ...) apply. Kinds are dictionary words.
	for _, k := range Kinds {
		if kinds[k] {
			fq.where = append([]string{`parts."kind" = '` + string(k) + `'`}, fq.where...)
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
		fq.sortCol = qcol(f.Name)
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
func compileCond(c Cond) (expr string, args []any, implied Kind, err error) {
	f, ok := FieldByName(strings.TrimSpace(c.Field))
	if !ok {
		return "", nil, "", fmt.Errorf("condition %s: unknown field %q (see `partsieve fields`)", condText(c, nil), c.Field)
	}
	bad := func(format string, a ...any) error {
		return fmt.Errorf("condition %s: %s", condText(c, &f), fmt.Sprintf(format, a...))
	}
	col := qcol(f.Name)
	op := strings.TrimSpace(c.Op)
	switch f.Type {
	case Number:
		if math.IsNaN(c.Num) || math.IsInf(c.Num, 0) {
			return "", nil, "", bad("the value is not a finite number")
		}
		if len(f.Kinds) == 1 {
			implied = f.Kinds[0]
		}
		switch op {
		case "<", "<=", ">", ">=":
			return col + " " + op + " ?", []any{c.Num}, implied, nil
		case "=", "==", "!=", "<>":
			tol := relTol * math.Abs(c.Num)
			not := ""
			if op == "!=" || op == "<>" {
				not = "NOT "
			}
			return col + " " + not + "BETWEEN ? AND ?", []any{c.Num - tol, c.Num + tol}, implied, nil
		}
		return "", nil, "", bad("operator %q does not apply to a number (use = != < <= > >=)", op)
	case Bool:
		var b bool
		if t := strings.TrimSpace(c.Text); t != "" {
			switch strings.ToLower(t) {
			case "1", "yes", "y", "true", "t", "on":
				b = true
			case "0", "no", "n", "false", "f", "off":
			default:
				return "", nil, "", bad("%q is not yes or no", t)
			}
		} else {
			b = c.Num != 0
		}
		switch op {
		case "=", "==":
			return col + " = ?", []any{b2i(b)}, "", nil
		case "!=", "<>":
			return col + " != ?", []any{b2i(b)}, "", nil
		}
		return "", nil, "", bad("operator %q does not apply to a yes/no field (use = or !=)", op)
	case Enum, Text:
		t := strings.TrimSpace(c.Text)
		switch op {
		case "~":
			if t == "" {
				return "", nil, "", bad("nothing to look for")
			}
			return col + ` LIKE ? ESCAPE '\'`, []any{likePattern(t)}, "", nil
		case "=", "==", "!=", "<>":
			neg := op == "!=" || op == "<>"
			if f.Type == Enum {
				w, ok := canonEnum(&f, t)
				if !ok {
					return "", nil, "", bad("%q is not one of %s", t, strings.Join(f.Enum, ", "))
				}
				if f.Name == "kind" && !neg {
					return "", nil, Kind(w), nil
				}
				t = w
			}
			cmp := " = "
			if neg {
				cmp = " != "
			}
			switch f.Name {
			case "mfr":
				return "parts.mfr_key" + cmp + "?", []any{NormKey(t)}, "", nil
			case "mpn":
				return "parts.mpn_key" + cmp + "?", []any{NormKey(t)}, "", nil
			}
			return col + cmp + "? COLLATE NOCASE", []any{t}, "", nil
		}
		return "", nil, "", bad("operator %q does not apply to a text field (use =, != or ~)", op)
	}
	return "", nil, "", bad("unsupported field type")
}

// build writes the SELECT for one phase: 0 without a sort field, 1 the
// rows whose sort field is present (sorted), 2 those where it is absent
// (NULLs last). Phase 1 sorted on an indexed column with a kind term walks
// a partial index and stops after LIMIT.
func (fq *findSQL) build(phase, limit int) (string, []any) {
	var b strings.Builder
	var args []any
	join := fq.hasIDs && phase != 1
	b.WriteString(`SELECT parts.id, ` + partJSON() + ` FROM `)
	if join {
		b.WriteString(`json_each(?) AS t CROSS JOIN parts ON parts.id = t.value`)
		args = append(args, fq.ids)
	} else {
		b.WriteString(`parts`)
	}
	where := append([]string(nil), fq.where...)
	args = append(args, fq.args...)
	if fq.hasIDs && !join {
		where = append(where, `parts.id IN (SELECT value FROM json_each(?))`)
		args = append(args, fq.ids)
	}
	for _, t := range fq.like {
		p := likePattern(t)
		var ors []string
		for _, f := range []string{"mfr", "desc", "package", "kind", "type"} {
			ors = append(ors, qcol(f)+` LIKE ? ESCAPE '\'`)
			args = append(args, p)
		}
		ors = append(ors, `parts.mpn_key LIKE ? ESCAPE '\'`)
		args = append(args, likePattern(NormKey(t)))
		where = append(where, "("+strings.Join(ors, " OR ")+")")
	}
	switch phase {
	case 1:
		where = append(where, fq.sortCol+" IS NOT NULL")
	case 2:
		where = append(where, fq.sortCol+" IS NULL")
	}
	if len(where) > 0 {
		b.WriteString(" WHERE " + strings.Join(where, " AND "))
	}
	switch {
	case phase == 1:
		dir := " ASC"
		if fq.desc {
			dir = " DESC"
		}
		b.WriteString(" ORDER BY " + fq.sortExpr + dir + ", parts.id" + dir)
	case join:
		b.WriteString(" ORDER BY t.key")
	default:
		b.WriteString(" ORDER BY parts.mfr_key, parts.mpn_key")
	}
	if limit > 0 {
		b.WriteString(" LIMIT " + strconv.Itoa(limit))
	}
	return b.String(), args
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
