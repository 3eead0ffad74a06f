package main

import (
	"fmt"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/catalog/units"
	"partsieve/query/topology"
	"partsieve/seeddata"
)

type pickOptions struct {
	topos   []string
	top     int
	rank    string
	explain string
	report  string
}

func newPickCmd(a *app) *cobra.Command {
	var o pickOptions
	c := &cobra.Command{
		Use:   "pick SPEC",
		Short: "Rank catalog parts for each protection topology against an application spec",
		Long: `Evaluate the catalog's parts for each reverse-polarity protection topology
at the application's hot and cold corners, and rank the ones that pass every
check. SPEC is a TOML file or the name of an example: ` + exampleNames() + `.

Per topology: the top candidates with part numbers, maker, package, loss,
junction temperature, drop, the smallest margin and its check, unit price at
the build quantity and stock. Then the best design of each topology side by
side, and how many parts each check eliminated. --explain MPN shows every
check of one part in every role it can take.

Exits with status 4 when no design qualifies in any topology, naming the
check that eliminated most parts.`,
		Example: `  partsieve pick vehicle-12v-accessory
  partsieve pick my-input.toml --topology pfet-high,nfet-low --rank cost --top 3
  partsieve pick sensor-24v-industrial --explain QPS30-40C
  partsieve pick handheld-2s-liion --format json > picks.json
  partsieve pick vehicle-12v-accessory --report picks.html`,
		Args: args(cobra.ExactArgs(1)),
		RunE: func(cmd *cobra.Command, argv []string) error {
			return runPick(cmd, a, o, argv[0])
		},
	}
	f := c.Flags()
	f.StringSliceVar(&o.topos, "topology", nil, "only these topologies: series-diode, shunt-fuse, pfet-high, nfet-low")
	f.IntVar(&o.top, "top", 5, "candidates shown per topology")
	f.StringVar(&o.rank, "rank", "loss", "ranking: loss, margin or cost")
	f.StringVar(&o.explain, "explain", "", "show every check of this part number")
	f.StringVar(&o.report, "report", "", "also write a self-contained HTML report (tables and plots) to this file")
	return c
}

func exampleSpecNames() []string { return seeddata.SpecNames() }

func runPick(cmd *cobra.Command, a *app, o pickOptions, specArg string) error {
	if err := a.checkFormat("table", "json"); err != nil {
		return err
	}
	ts, err := parseTopologies(o.topos)
	if err != nil {
		return err
	}
	rank, err := topology.ParseRank(o.rank)
	if err != nil {
		return usageErr(err, "rankings: loss, margin, cost")
	}
	if o.top < 1 {
		return usageErr(fmt.Errorf("--top %d: must be at least 1", o.top), "")
	}
	if o.report != "" && o.explain != "" {
		return usageErr(fmt.Errorf("--report and --explain cannot be used together"), "--report writes the report of a pick")
	}
	s, err := loadSpec(specArg)
	if err != nil {
		return err
	}
	ctx := cmd.Context()
	st, err := a.open(ctx)
	if err != nil {
		return err
	}
	defer st.Close()
	opt := topology.Options{Top: o.top, Rank: rank, Topologies: ts}
	if o.explain != "" {
		ex, err := topology.Explain(ctx, st, s, o.explain, opt)
		if err != nil {
			return &cliError{err: err, hint: "'partsieve find " + o.explain + "' looks for similar part numbers", code: exitNoMatch}
		}
		if a.format == "json" {
			return writeJSON(a.stdout, ex)
		}
		return printExplain(a, ex)
	}
	res, err := topology.Pick(ctx, st, s, opt)
	if err != nil {
		return err
	}
	if a.format == "json" {
		if err := writeJSON(a.stdout, res); err != nil {
			return err
		}
	} else if err := printPick(a, res); err != nil {
		return err
	}
	if o.report != "" {
		if err := writeReport(ctx, a, st, s, specArg, res, o.report); err != nil {
			return err
		}
	}
	if !res.Qualified() {
		if e, t, ok := res.TopEliminator(); ok {
			fmt.Fprintf(a.stderr, "no design qualifies; the check that eliminated most parts: %s (%s, %s: %d parts)\n", e.Check, t, e.Role, e.Count)
		} else {
			fmt.Fprintln(a.stderr, "no design qualifies")
		}
		return &codeError{code: exitNoMatch}
	}
	return nil
}

func partsLabel(c topology.Candidate) string {
	var ps []string
	for _, p := range c.Parts {
		ps = append(ps, fmt.Sprintf("%s %s (%s)", p.Role, p.MPN, p.Mfr))
	}
	if g := c.GateResistor; g != nil {
		ps = append(ps, fmt.Sprintf("R_G %s %s", units.FormatSig(float64(g.Value), units.Resistance, 2), units.Format(float64(g.Rating), units.Power)))
	}
	return strings.Join(ps, " + ")
}

func packages(c topology.Candidate) string {
	var ps []string
	for _, p := range c.Parts {
		if p.Package != "" {
			ps = append(ps, p.Package)
		}
	}
	return strings.Join(ps, ", ")
}

func cost(v topology.Num, cur string) string {
	if math.IsNaN(float64(v)) {
		return "not costed"
	}
	return money(float64(v)) + " " + cur
}

func stock(c topology.Candidate) string {
	if c.Stock == nil {
		return "?"
	}
	return fmt.Sprint(*c.Stock)
}

func margin(c topology.Candidate) string {
	if math.IsNaN(float64(c.MinMargin)) {
		return "?"
	}
	return fmt.Sprintf("%+.0f %% %s", 100*float64(c.MinMargin), c.MinMarginCheck)
}

func printPick(a *app, r *topology.Result) error {
	w := a.stdout
	fmt.Fprintf(w, "Picks for %s: policy %s, ranked by %s, %d boards, prices in %s\n", r.Spec, r.Policy, r.Rank, r.Quantity, r.Currency)
	for _, tr := range r.Topologies {
		fmt.Fprintf(w, "\n%s: %s (%d qualify)\n", tr.Topology, tr.Title, tr.Qualified)
		if tr.Unsafe {
			fmt.Fprintf(w, "  RANKED OUT: %s\n", tr.UnsafeReason)
		}
		for _, h := range tr.Hazards {
			fmt.Fprintf(w, "  hazard: %s\n", h)
		}
		list := tr.Candidates
		if tr.Unsafe && len(list) == 0 {
			list = tr.RankedOut
			if len(list) > 0 {
				fmt.Fprintln(w, "  best designs, shown for comparison only:")
			}
		}
		if len(list) == 0 {
			fmt.Fprintf(w, "  none: %s\n", tr.NoneReason)
		} else {
			t := newTable(w, "  #", "PARTS", "PACKAGE", "LOSS", "T_J HOT", "DROP", "SMALLEST MARGIN", "UNIT COST", "STOCK")
			for _, c := range list {
				t.row(fmt.Sprintf("  %d", c.Rank), partsLabel(c), packages(c), num(c.Loss, "W"), num(c.TjHot, "°C"),
					num(c.Drop, "V")+" "+c.DropCorner, margin(c), cost(c.Cost, c.Currency), stock(c))
			}
			if err := t.flush(); err != nil {
				return err
			}
		}
		if len(tr.Eliminated) > 0 {
			var es []string
			for _, e := range tr.Eliminated {
				es = append(es, fmt.Sprintf("%s (%s) %d", e.Check, e.Role, e.Count))
			}
			for i, l := range wrap("eliminated: "+strings.Join(es, ", "), 96) {
				if i == 0 {
					fmt.Fprintf(w, "  %s\n", l)
				} else {
					fmt.Fprintf(w, "    %s\n", l)
				}
			}
		}
		for _, n := range tr.Notes {
			fmt.Fprintf(w, "  note: %s\n", n)
		}
	}
	fmt.Fprintln(w, "\nBest of each topology:")
	t := newTable(w, "  TOPOLOGY", "STATUS", "PARTS", "LOSS", "DROP", "COST", "SMALLEST MARGIN", "HAZARDS")
	for _, c := range r.Comparison {
		m := "?"
		if !math.IsNaN(float64(c.MinMargin)) {
			m = fmt.Sprintf("%+.0f %%", 100*float64(c.MinMargin))
		}
		loss, drop, cst := "-", "-", "-"
		if c.Status != "none" {
			loss, drop, cst = num(c.Loss, "W"), num(c.Drop, "V"), cost(c.Cost, c.Currency)
		} else {
			m = "-"
		}
		t.row("  "+string(c.Topology), c.Status, c.Parts, loss, drop, cst, m, strings.Join(c.Hazards, "; "))
	}
	if err := t.flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	printLines(a, "Notes:", r.Notes)
	printLines(a, "Caution:", r.Cautions)
	return nil
}

func printExplain(a *app, ex *topology.Explanation) error {
	w := a.stdout
	fmt.Fprintf(w, "Every check of %s for %s (policy %s)\n", ex.MPN, ex.Spec, ex.Policy)
	for _, p := range ex.Parts {
		fmt.Fprintf(w, "\n%s %s (%s %s, %s)\n", p.MPN, p.Mfr, p.Kind, p.Type, p.Package)
		for _, r := range p.Roles {
			verdict := "passes"
			if !r.Pass {
				verdict = "fails at " + r.FirstFail
			}
			fmt.Fprintf(w, "\n  %s as %s: %s\n", r.Topology, r.Role, verdict)
			if len(r.Partners) > 0 {
				var ps []string
				for _, q := range r.Partners {
					ps = append(ps, q.Role+" "+q.MPN)
				}
				fmt.Fprintf(w, "  checked with: %s\n", strings.Join(ps, ", "))
			}
			if r.Note != "" {
				fmt.Fprintf(w, "  note: %s\n", r.Note)
			}
			t := newTable(w, "    CHECK", "CORNER", "VALUE", "LIMIT", "MARGIN", "", "FORMULA", "SOURCE")
			for _, c := range r.Checks {
				m, ok := "?", "FAIL"
				if !math.IsNaN(float64(c.Margin)) {
					m = fmt.Sprintf("%+.0f %%", 100*float64(c.Margin))
				}
				if c.Pass {
					ok = "ok"
				}
				t.row("    "+c.Name, c.Corner, num(c.Value, c.Unit), c.Op+" "+num(c.Limit, c.Unit), m, ok, c.Formula, c.Source)
			}
			if err := t.flush(); err != nil {
				return err
			}
		}
	}
	fmt.Fprintln(w)
	printLines(a, "Caution:", ex.Cautions)
	return nil
}
