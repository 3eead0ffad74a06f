package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/catalog"
	"partsieve/query/where"
)

type findOptions struct {
	where []string
	kind  string
	sort  string
	limit int
}

func newFindCmd(a *app) *cobra.Command {
	var o findOptions
	c := &cobra.Command{
		Use:   "find [TEXT...]",
		Short: "Search the catalog by text and parameters",
		Long: `Search the catalog. TEXT matches maker, part number, description and
package (terms tolerate a typo; part numbers match by prefix). --where adds
parametric conditions on canonical fields with units, checked against the
field's dimension:

  vds>=40V   rdson<=20m   ifav>=2A   type=schottky   package~SOD
  lifecycle!=obsolete   aecq=yes   tjmax>=150

Conditions may be joined with "and". With no TEXT and no --where, find
lists the catalog. Parts lacking a value never match a condition on it.`,
		Example: `  partsieve find schottky --where "vrrm>=40V" --where "ifav>=3A" --sort vf
  partsieve find --kind mosfet --where "type=p and vds>=30V and rdson<=25m" --format json
  partsieve find kstl40   # part-number prefix`,
		RunE: func(cmd *cobra.Command, text []string) error {
			return runFind(cmd, a, o, text)
		},
	}
	f := c.Flags()
	f.StringArrayVarP(&o.where, "where", "w", nil, "condition FIELD OP VALUE, e.g. vds>=40V (repeatable)")
	f.StringVar(&o.kind, "kind", "", "only this kind: diode, fuse or mosfet")
	f.StringVar(&o.sort, "sort", "", "sort by a field; prefix with - for descending (e.g. -ifav)")
	f.IntVar(&o.limit, "limit", 50, "at most this many parts (0 = all)")
	return c
}

func runFind(cmd *cobra.Command, a *app, o findOptions, text []string) error {
	if err := a.checkFormat("table", "json", "csv"); err != nil {
		return err
	}
	conds, err := where.ParseAll(o.where)
	if err != nil {
		return usageErr(err, "'partsieve fields' lists the fields and their units")
	}
	q := catalog.Query{Text: strings.Join(text, " "), Conds: conds, Offers: true}
	if o.kind != "" {
		q.Kind = catalog.Kind(strings.ToLower(o.kind))
		if q.Kind != catalog.Diode && q.Kind != catalog.Fuse && q.Kind != catalog.MOSFET {
			return usageErr(fmt.Errorf("--kind %q is not a kind", o.kind), "use diode, fuse or mosfet")
		}
	}
	if o.sort != "" {
		name := strings.TrimPrefix(o.sort, "-")
		q.Desc = strings.HasPrefix(o.sort, "-")
		f, ok := catalog.FieldByName(name)
		if !ok {
			return usageErr(fmt.Errorf("--sort %q: unknown field", name), "'partsieve fields' lists the fields")
		}
		q.Sort = f.Name
	}
	if o.limit < 0 {
		return usageErr(fmt.Errorf("--limit %d: must be 0 or more", o.limit), "")
	}
	if o.limit > 0 {
		q.Limit = o.limit + 1 // one more tells whether the list was cut
	}
	ctx := cmd.Context()
	st, err := a.open(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	res, err := st.Search(ctx, q)
	if err != nil {
		return err
	}
	parts := res.Parts
	if res.Capped {
		fmt.Fprintf(a.stderr, "note: the text matched more than %d parts; only the most relevant were filtered further; add terms or --where conditions\n", catalog.TextCap)
	}
	if res.Fallback {
		fmt.Fprintln(a.stderr, "note: the text index is busy or unusable; text was matched as plain substrings (no typo tolerance)")
	}
	cut := false
	if o.limit > 0 && len(parts) > o.limit {
		parts, cut = parts[:o.limit], true
	}
	switch a.format {
	case "json":
		if parts == nil {
			parts = []catalog.Part{}
		}
		if err := writeJSON(a.stdout, parts); err != nil {
			return err
		}
	case "csv":
		if err := writePartsCSV(a.stdout, parts); err != nil {
			return err
		}
	default:
		if len(parts) == 0 {
			fmt.Fprintln(a.stdout, "no part matches")
			break
		}
		t := newTable(a.stdout, "MPN", "MAKER", "TYPE", "PACKAGE", "KEY RATINGS", "FROM", "STOCK")
		for i := range parts {
			p := &parts[i]
			price, stock := bestOffer(p)
			t.row(p.MPN, p.Mfr, p.Label(), p.Package, keyRatings(p), price, stock)
		}
		if err := t.flush(); err != nil {
			return err
		}
		if cut {
			fmt.Fprintf(a.stdout, "(first %d shown; --limit 0 shows all)\n", o.limit)
		}
	}
	if len(parts) == 0 {
		return &codeError{code: exitNoMatch}
	}
	return nil
}

// writePartsCSV writes one row per part with every field that any of the
// parts has, in dictionary order, numbers in base SI units (°C for
// temperatures), plus the offer count, lowest single-piece price and total
// stock.
func writePartsCSV(w interface{ Write([]byte) (int, error) }, parts []catalog.Part) error {
	present := map[string]bool{"kind": true, "mfr": true, "mpn": true}
	for i := range parts {
		for k := range parts[i].Flat() {
			present[k] = true
		}
	}
	var header []string
	for _, f := range catalog.Fields {
		if present[f.Name] {
			header = append(header, f.Name)
		}
	}
	header = append(header, "offers", "best_unit_price", "currency", "stock")
	rows := make([][]string, 0, len(parts))
	for i := range parts {
		p := &parts[i]
		row := make([]string, 0, len(header))
		for _, name := range header[:len(header)-4] {
			f, _ := catalog.FieldByName(name)
			if f.Type == catalog.Number {
				if v, ok := p.Get(name); ok {
					row = append(row, machine(v))
				} else {
					row = append(row, "")
				}
				continue
			}
			row = append(row, p.TextField(name))
		}
		price, cur, stock := bestOfferMachine(p)
		row = append(row, fmt.Sprint(len(p.Offers)), price, cur, stock)
		rows = append(rows, row)
	}
	return writeCSV(w, header, rows)
}

// bestOfferMachine is offerSummary for CSV: the lowest entry price with
// its currency, and the total stock.
func bestOfferMachine(p *catalog.Part) (price, cur, stock string) {
	prices, total, known := offerSummary(p)
	if len(prices) > 0 {
		price, cur = machine(prices[0].Price), prices[0].Currency
	}
	if known {
		stock = fmt.Sprint(total)
	}
	return price, cur, stock
}
