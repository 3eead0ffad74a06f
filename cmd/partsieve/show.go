package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/catalog"
)

func newShowCmd(a *app) *cobra.Command {
	return &cobra.Command{
		Use:   "show MPN",
		Short: "Show every field of a part and every offer",
		Long: `Show every field of a part with its unit and meaning, and every supplier
offer with its price breaks. The part number is compared ignoring case,
spaces and dashes. When several makers use the same number, all are shown.`,
		Args: args(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, argv []string) error {
			if err := a.checkFormat("table", "json"); err != nil {
				return err
			}
			ctx := cmd.Context()
			st, err := a.open(ctx)
			if err != nil {
				return err
			}
			defer st.Close()
			parts, err := st.ByMPN(ctx, argv[0])
			if err != nil {
				return err
			}
			if len(parts) == 0 {
				return &cliError{err: fmt.Errorf("no part %q in the catalog", argv[0]), hint: "try 'partsieve find " + argv[0] + "' for similar numbers", code: exitNoMatch}
			}
			if a.format == "json" {
				if len(parts) == 1 {
					return writeJSON(a.stdout, parts[0])
				}
				return writeJSON(a.stdout, parts)
			}
			for i := range parts {
				if i > 0 {
					fmt.Fprintln(a.stdout)
				}
				if err := printPart(a, &parts[i]); err != nil {
					return err
				}
			}
			return nil
		},
	}
}

func printPart(a *app, p *catalog.Part) error {
	w := a.stdout
	fmt.Fprintf(w, "%s  %s  (%s)\n", p.MPN, p.Mfr, p.Label())
	if p.Desc != "" {
		fmt.Fprintf(w, "%s\n", p.Desc)
	}
	fmt.Fprintln(w)
	t := newTable(w, "FIELD", "VALUE", "MEANING")
	for _, f := range catalog.Fields {
		if !f.AppliesTo(p.Kind) || f.Name == "mpn" || f.Name == "mfr" || f.Name == "desc" {
			continue
		}
		var v string
		if f.Type == catalog.Number {
			v = eng(p, f.Name)
		} else {
			v = p.TextField(f.Name)
		}
		if v == "" {
			continue
		}
		t.row(f.Name, v, f.Doc)
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	if len(p.Offers) == 0 {
		fmt.Fprintln(w, "no supplier offers")
		return nil
	}
	t = newTable(w, "SUPPLIER", "SKU", "STOCK", "MOQ", "PRICE BREAKS (qty+: unit price)")
	for _, o := range p.Offers {
		stock := "?"
		if o.Stock != nil {
			stock = fmt.Sprint(*o.Stock)
		}
		moq := ""
		if o.MOQ > 0 {
			moq = fmt.Sprint(o.MOQ)
		}
		var br []string
		for _, b := range o.Breaks {
			br = append(br, fmt.Sprintf("%d+: %s", b.Qty, money(b.Price)))
		}
		prices := strings.Join(br, "  ")
		if o.Currency != "" && prices != "" {
			prices += " " + o.Currency
		}
		t.row(o.Supplier, o.SKU, stock, moq, prices)
	}
	return t.flush()
}
