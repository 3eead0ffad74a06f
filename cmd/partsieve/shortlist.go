package main

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/query/shortlist"
	"partsieve/query/topology"
	"partsieve/seeddata"
)

type shortlistOptions struct {
	out        string
	top        int
	topos      []string
	alternates int
	spares     float64
	rank       string
	parts      []string
}

func newShortlistCmd(a *app) *cobra.Command {
	var o shortlistOptions
	c := &cobra.Command{
		Use:   "shortlist SPEC --out FILE.xlsx|FILE.csv",
		Short: "Write a purchase shortlist (XLSX workbook or CSV) for an application spec",
		Long: `Write a purchase shortlist for the best designs of each topology (as pick
ranks them): per design its parts, one per board in each role, with the order
quantity for the build (plus --spares percent, raised to the offer's minimum
order and first price break), the price break that applies, unit and extended
cost in the build currency, stock against the order (short stock flagged),
supplier and SKU, and up to --alternates second sources per role that pass
every check of the design. The gate resistor of a MOSFET stage is a generic
line (value, tolerance, power) to be sourced. --parts lists given part
numbers instead of the pick.

The file type follows the --out extension. An .xlsx workbook has the sheets
Shortlist, Requirements, Checks (every check of every listed part) and
Assumptions (the spec as entered, the policy and its factors, the cautions);
numbers are stored in base SI units with number formats that show the unit.
A .csv file holds the Shortlist rows. SPEC is a TOML file or the name of an
example: ` + exampleNames() + `.

Exits with status 4 when no design qualifies (nothing is written).`,
		Example: `  partsieve shortlist vehicle-12v-accessory --out vehicle.xlsx
  partsieve shortlist my-input.toml --out order.csv --top 2 --spares 5 --alternates 3
  partsieve shortlist sensor-24v-industrial --out picked.xlsx --parts QPS30-40C,QPS10-40A`,
		Args: args(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, argv []string) error {
			return runShortlist(cmd, a, o, argv[0])
		},
	}
	f := c.Flags()
	f.StringVar(&o.out, "out", "", "file to write: FILE.xlsx (workbook) or FILE.csv (required)")
	f.IntVar(&o.top, "top", 1, "designs per topology")
	f.StringSliceVar(&o.topos, "topology", nil, "only these topologies: series-diode, shunt-fuse, pfet-high, nfet-low")
	f.IntVar(&o.alternates, "alternates", 2, "second sources listed per role")
	f.Float64Var(&o.spares, "spares", 0, "spares in percent added to every line")
	f.StringVar(&o.rank, "rank", "loss", "ranking of the designs: loss, margin or cost")
	f.StringSliceVar(&o.parts, "parts", nil, "list these part numbers (MPN,MPN,...) instead of the pick")
	return c
}

func runShortlist(cmd *cobra.Command, a *app, o shortlistOptions, specArg string) error {
	if err := a.checkFormat("table"); err != nil {
		return err
	}
	if o.out == "" {
		return usageErr(errors.New("--out FILE is required"), "give a file ending in .xlsx (workbook) or .csv")
	}
	ext := strings.ToLower(filepath.Ext(o.out))
	if ext != ".xlsx" && ext != ".csv" {
		return usageErr(fmt.Errorf("--out %s: the file type is unknown", o.out), "give a file ending in .xlsx (workbook) or .csv")
	}
	if len(o.parts) > 0 {
		for _, name := range []string{"top", "alternates", "rank"} {
			if cmd.Flags().Changed(name) {
				return usageErr(fmt.Errorf("--%s does not apply with --parts", name), "--parts lists the given parts instead of the pick")
			}
		}
	}
	if o.top < 1 {
		return usageErr(fmt.Errorf("--top %d: must be at least 1", o.top), "")
	}
	if o.alternates < 0 {
		return usageErr(fmt.Errorf("--alternates %d: must not be negative", o.alternates), "")
	}
	if !(o.spares >= 0 && o.spares <= shortlist.MaxSparesPct) || math.IsInf(o.spares, 0) {
		return usageErr(fmt.Errorf("--spares %g: want a percentage from 0 to %d", o.spares, shortlist.MaxSparesPct), "")
	}
	ts, err := parseTopologies(o.topos)
	if err != nil {
		return err
	}
	rank, err := topology.ParseRank(o.rank)
	if err != nil {
		return usageErr(err, "rankings: loss, margin, cost")
	}
	s, err := loadSpec(specArg)
	if err != nil {
		return err
	}
	text, err := specText(specArg)
	if err != nil {
		return err
	}
	ctx := cmd.Context()
	st, err := a.open(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	sl, err := shortlist.Build(ctx, st, s, shortlist.Options{Top: o.top, Alternates: o.alternates, SparesPct: o.spares,
		Rank: rank, Topologies: ts, Parts: o.parts, SpecText: text})
	switch {
	case errors.Is(err, shortlist.ErrNothing):
		fmt.Fprintf(a.stderr, "%v\nnothing written\n", err)
		return &codeError{code: exitNoMatch}
	case errors.Is(err, shortlist.ErrNoPart):
		return &cliError{err: err, hint: "'partsieve find TEXT' looks for similar part numbers", code: exitNoMatch}
	case err != nil:
		return err
	}
	var buf bytes.Buffer
	if ext == ".xlsx" {
		err = sl.WriteXLSX(&buf)
	} else {
		err = sl.WriteCSV(&buf)
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", o.out, err)
	}
	if err := writeFileAtomic(o.out, buf.Bytes()); err != nil {
		return fmt.Errorf("writing --out: %w", err)
	}
	printShortlist(a, sl, o.out)
	return nil
}

// specText returns the spec as entered, from the file or the embedded
// example of that name (as loadSpec finds it).
func specText(arg string) (string, error) {
	data, err := os.ReadFile(arg)
	if errors.Is(err, fs.ErrNotExist) {
		if d, _, ok := seeddata.Spec(strings.TrimSuffix(arg, ".toml")); ok {
			return string(d), nil
		}
	}
	if err != nil {
		return "", fmt.Errorf("spec %s: %w", arg, err)
	}
	return string(data), nil
}

func printShortlist(a *app, sl *shortlist.Shortlist, out string) {
	w := a.stdout
	parts, alts, generic := sl.CatalogLines()
	fmt.Fprintf(w, "Wrote %s: %d design(s) for %s, %d boards, policy %s\n", out, len(sl.Designs), sl.Spec, sl.Quantity, sl.Policy)
	fmt.Fprintf(w, "  lines: %d catalog part(s), %d generic, %d alternate(s)\n", parts, generic, alts)
	t := newTable(w, "  DESIGN", "PARTS", "TOTAL", "PER BOARD", "SHORT STOCK", "")
	for _, d := range sl.Designs {
		var mpns []string
		for _, l := range d.Lines {
			if l.Kind == shortlist.KindPart {
				mpns = append(mpns, l.MPN)
			}
		}
		note := ""
		if d.Cost.Uncosted > 0 {
			note = fmt.Sprintf("incomplete: %d line(s) not costed", d.Cost.Uncosted)
		}
		t.row("  "+d.Label, strings.Join(mpns, " + "), total(d.Cost.Extended)+" "+sl.Currency,
			money(d.Cost.PerBoard)+" "+sl.Currency, fmt.Sprint(d.Cost.Short), note)
	}
	t.flush()
	fmt.Fprintf(w, "  total over the designs listed: %s %s (%s %s per board)", total(sl.Total.Extended), sl.Currency, money(sl.Total.PerBoard), sl.Currency)
	if sl.Total.Uncosted > 0 {
		fmt.Fprintf(w, ", incomplete: %d line(s) not costed", sl.Total.Uncosted)
	}
	fmt.Fprintf(w, "; %d line(s) short of stock\n", sl.Total.Short)
	fmt.Fprintln(w)
	printLines(a, "Notes:", sl.Notes)
	printLines(a, "Caution:", sl.Cautions)
}

// total writes an amount with two decimals ("1515.65").
func total(v float64) string { return strconv.FormatFloat(v, 'f', 2, 64) }
