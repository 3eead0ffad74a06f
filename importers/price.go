package importers

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode"

	"partsieve/catalog"
)

// cellCurrency finds a currency written in a price cell ("€0.42", "0,42
// EUR", "$1.20", "0.42 €") and returns the cell without it.
func cellCurrency(s string) (rest, cur string) {
	plain := true
	for i := 0; i < len(s); i++ {
		if c := s[i]; !(c >= '0' && c <= '9' || c == '.' || c == ',' || c == ' ' || c == '-' || c == '\'') {
			plain = false
			break
		}
	}
	if plain {
		return strings.TrimSpace(s), ""
	}
	rest = s
	for _, sym := range [...]string{"US$", "CN¥", "€", "$", "£", "¥", "₹", "₩"} {
		if strings.Contains(rest, sym) {
			if cur == "" {
				cur = currencySymbols[strings.ToLower(sym)]
			}
			rest = strings.ReplaceAll(rest, sym, "")
		}
	}
	if m := currencyWordRE.FindStringSubmatchIndex(" " + rest + " "); m != nil {
		code := currencySymbols[strings.ToLower((" " + rest + " ")[m[2]:m[3]])]
		if cur == "" {
			cur = code
		}
		r := " " + rest + " "
		rest = r[:m[2]] + r[m[3]:]
	}
	return strings.TrimSpace(rest), cur
}

// normCurrency reads a currency column cell: an ISO 4217 code, a symbol or
// a currency word.
func normCurrency(s string) (string, error) {
	t := strings.TrimSpace(s)
	if c, ok := currencySymbols[strings.ToLower(t)]; ok {
		return c, nil
	}
	if len(t) == 3 && strings.IndexFunc(t, func(r rune) bool { return r > unicode.MaxASCII || !unicode.IsLetter(r) }) < 0 {
		return strings.ToUpper(t), nil
	}
	return "", errors.New("not a currency (use an ISO 4217 code such as EUR or USD)")
}

// parsePrice reads a unit price: "0.42", "0,42", "€0.42", "0,42 EUR",
// "1,234.50", "1.234,50". With a comma and a dot the last one is the
// decimal mark; a comma alone is a decimal comma. The price must be above
// zero.
func parsePrice(s string) (float64, string, error) {
	rest, cur := cellCurrency(s)
	t := strings.Map(func(r rune) rune {
		if unicode.IsSpace(r) || r == '\'' || r == '\u00a0' || r == '\u202f' {
			return -1
		}
		return r
	}, rest)
	if t == "" {
		return 0, cur, errors.New("no price")
	}
	if strings.HasPrefix(t, "-") || strings.HasPrefix(t, "−") {
		return 0, cur, errors.New("negative price")
	}
	ci, di := strings.LastIndex(t, ","), strings.LastIndex(t, ".")
	switch {
	case ci >= 0 && di >= 0 && ci > di: // 1.234,50
		t = strings.ReplaceAll(t, ".", "")
		t = strings.Replace(t, ",", ".", 1)
	case ci >= 0 && di >= 0: // 1,234.50
		t = strings.ReplaceAll(t, ",", "")
	case ci >= 0:
		if strings.Count(t, ",") > 1 {
			return 0, cur, errors.New("not a price")
		}
		t = strings.Replace(t, ",", ".", 1)
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, cur, errors.New("not a price")
	}
	if v <= 0 {
		return 0, cur, errors.New("price must be above zero")
	}
	return v, cur, nil
}

// breakEntryRE splits one "qty:price" entry: "1:0.50", "10+ 0.42", "100 @
// 0.31", "1-9: €0.50", "1000=0,25".
var breakEntryRE = regexp.MustCompile(`^\s*(\d[\d,.' ]*?k?)\s*(?:-\s*\d[\d,.']*k?)?\s*(?:\+|pcs|pc)?\s*(?::|=|@|→|->|\+|\s)\s*(.+?)\s*$`)

// parseBreaks reads price breaks written in one cell: "1:0.50; 10:0.42;
// 100:0.31", "1+ 0.50 | 10+ 0.42", "1:0,50; 10:0,42". Entries are
// separated by ";", "|" or line breaks, or by commas when no entry uses a
// decimal comma.
func parseBreaks(s string) ([]catalog.PriceBreak, string, error) {
	var entries []string
	if strings.ContainsAny(s, ";|\n") {
		entries = strings.FieldsFunc(s, func(r rune) bool { return r == ';' || r == '|' || r == '\n' })
	} else if strings.Count(s, ":")+strings.Count(s, "=")+strings.Count(s, "@") > 1 && strings.Contains(s, ", ") {
		entries = strings.Split(s, ", ")
	} else if strings.Count(s, ":")+strings.Count(s, "=")+strings.Count(s, "@") > 1 {
		entries = strings.Split(s, ",")
	} else {
		entries = []string{s}
	}
	var out []catalog.PriceBreak
	cur := ""
	for _, e := range entries {
		if strings.TrimSpace(e) == "" {
			continue
		}
		m := breakEntryRE.FindStringSubmatch(e)
		if m == nil {
			return nil, "", fmt.Errorf("price break %q is not quantity:price", strings.TrimSpace(e))
		}
		q, ok := parseQty(m[1])
		if !ok || q < 1 {
			return nil, "", fmt.Errorf("price break %q: quantity must be a whole number of at least 1", strings.TrimSpace(e))
		}
		p, c, err := parsePrice(m[2])
		if err != nil {
			return nil, "", fmt.Errorf("price break %q: %v", strings.TrimSpace(e), err)
		}
		if c != "" {
			if cur != "" && cur != c {
				return nil, "", fmt.Errorf("price breaks in two currencies, %s and %s", cur, c)
			}
			cur = c
		}
		out = append(out, catalog.PriceBreak{Qty: q, Price: p})
	}
	if len(out) == 0 {
		return nil, "", errors.New("no price breaks")
	}
	return out, cur, nil
}

// sortBreaks orders breaks by quantity and drops exact repeats; two prices
// for one quantity are an error.
func sortBreaks(b []catalog.PriceBreak) ([]catalog.PriceBreak, error) {
	if !slices.IsSortedFunc(b, catalog.ByQty) { // sheets list them in order
		slices.SortStableFunc(b, catalog.ByQty)
	}
	out := b[:0]
	for i, x := range b {
		if i > 0 && x.Qty == out[len(out)-1].Qty {
			if x.Price != out[len(out)-1].Price {
				return nil, fmt.Errorf("two prices for %d pieces: %g and %g", x.Qty, out[len(out)-1].Price, x.Price)
			}
			continue
		}
		out = append(out, x)
	}
	return out, nil
}

// offer reads the offer columns of a row. A row with no supplier, SKU,
// stock, MOQ or price gives no offer.
//
// The price breaks are appended to breaks[:0] (a buffer of the caller's
// to reuse, or nil).
func (cv *converter) offer(r row, breaks []catalog.PriceBreak) (*catalog.Offer, *rowReject) {
	lo := cv.lo
	o := catalog.Offer{}
	breaks = breaks[:0]
	var has bool
	if v, _ := r.first(fSupplier); v != "" {
		o.Supplier, has = cleanSpaces(v), true
	}
	if v, _ := r.first(fSKU); v != "" {
		o.SKU, has = cleanSpaces(v), true
	}
	if v, i := r.first(fStock); v != "" {
		n, err := parseCount(v)
		if err != nil {
			return nil, &rowReject{column: lo.header(i, fStock), raw: v, reason: "stock: " + err.Error()}
		}
		o.Stock, has = &n, true
	}
	if v, i := r.first(fMOQ); v != "" {
		n, err := parseCount(v)
		if err != nil {
			return nil, &rowReject{column: lo.header(i, fMOQ), raw: v, reason: "moq: " + err.Error()}
		}
		if n < 1 {
			return nil, &rowReject{column: lo.header(i, fMOQ), raw: v, reason: "moq: the minimum order must be at least 1"}
		}
		o.MOQ, has = n, true
	}

	explicit, curCol := "", -1
	if v, i := r.first(fCurrency); v != "" {
		c, err := normCurrency(v)
		if err != nil {
			return nil, &rowReject{column: lo.header(i, fCurrency), raw: v, reason: "currency: " + err.Error()}
		}
		explicit, curCol = c, i
	}
	written := "" // currency written in price headers or cells
	var writtenAt int
	note := func(cur string, i int, raw string) *rowReject {
		if cur == "" {
			return nil
		}
		if explicit != "" && cur != explicit {
			return &rowReject{column: lo.header(i, fPrice), raw: raw,
				reason: fmt.Sprintf("price in %s but %s says %s", cur, lo.header(curCol, fCurrency), explicit)}
		}
		if written != "" && cur != written {
			return &rowReject{column: lo.header(i, fPrice), raw: raw,
				reason: fmt.Sprintf("prices in two currencies, %s (column %s) and %s", written, lo.header(writtenAt, fPrice), cur)}
		}
		written, writtenAt = cur, i
		return nil
	}
	for _, i := range lo.prices {
		raw := r.at(i)
		if isAbsent(raw) {
			continue
		}
		c := lo.cols[i]
		price, cur, err := parsePrice(raw)
		if err != nil {
			return nil, &rowReject{column: lo.header(i, fPrice), raw: raw, reason: "price: " + err.Error()}
		}
		if cur == "" {
			cur = c.Currency
		}
		if rej := note(cur, i, raw); rej != nil {
			return nil, rej
		}
		qty := c.Qty
		if qty == 0 {
			qty = max(o.MOQ, 1)
		}
		breaks = append(breaks, catalog.PriceBreak{Qty: qty, Price: price})
	}
	for _, pr := range lo.pairs {
		qraw, praw := r.at(pr.qty), r.at(pr.price)
		if isAbsent(praw) {
			continue
		}
		if isAbsent(qraw) {
			return nil, &rowReject{column: lo.header(pr.qty, fQty), raw: praw, reason: "price break without a quantity"}
		}
		q, err := parseCount(qraw)
		if err != nil || q < 1 {
			return nil, &rowReject{column: lo.header(pr.qty, fQty), raw: qraw, reason: "price break quantity must be a whole number of at least 1"}
		}
		price, cur, err := parsePrice(praw)
		if err != nil {
			return nil, &rowReject{column: lo.header(pr.price, fPrice), raw: praw, reason: "price: " + err.Error()}
		}
		if cur == "" {
			cur = lo.cols[pr.price].Currency
		}
		if rej := note(cur, pr.price, praw); rej != nil {
			return nil, rej
		}
		breaks = append(breaks, catalog.PriceBreak{Qty: q, Price: price})
	}
	if v, i := r.first(fBreaks); v != "" {
		bs, cur, err := parseBreaks(v)
		if err != nil {
			return nil, &rowReject{column: lo.header(i, fBreaks), raw: v, reason: err.Error()}
		}
		if cur == "" {
			cur = lo.cols[i].Currency
		}
		if rej := note(cur, i, v); rej != nil {
			return nil, rej
		}
		breaks = append(breaks, bs...)
	}
	if len(breaks) > 0 {
		sorted, err := sortBreaks(breaks)
		if err != nil {
			return nil, &rowReject{column: lo.headerOf(fPrice), reason: err.Error()}
		}
		o.Breaks, has = sorted, true
	}
	if !has {
		return nil, nil
	}
	switch {
	case explicit != "":
		o.Currency = explicit
	case written != "":
		o.Currency = written
	case len(o.Breaks) > 0:
		o.Currency = cv.currency
	}
	if o.Supplier == "" {
		o.Supplier = cv.supplier
	}
	return &o, nil
}
