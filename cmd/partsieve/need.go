package main

import (
	"fmt"
	"math"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/catalog/units"
	"partsieve/query/spec"
	"partsieve/query/topology"
)

func newNeedCmd(a *app) *cobra.Command {
	var template bool
	var topos []string
	c := &cobra.Command{
		Use:   "need SPEC",
		Short: "Compute the requirement set of each protection topology from an application spec",
		Long: `Compute, for each reverse-polarity protection topology, what a part must
meet for the application described in SPEC (a TOML file, or the name of an
example: ` + exampleNames() + `), under the spec's derating policy. Each
line gives the bound, the formula, the policy factors with their confidence
and their source. Factors the references give only from memory are marked
"unverified default".

--template prints a commented spec with every key.`,
		Example: `  partsieve need --template > my-input.toml
  partsieve need vehicle-12v-accessory
  partsieve need my-input.toml --topology pfet-high --format json`,
		Args: func(c *cobra.Command, argv []string) error {
			if template {
				return args(cobra.NoArgs)(c, argv)
			}
			return args(cobra.ExactArgs(1))(c, argv)
		},
		RunE: func(cmd *cobra.Command, argv []string) error {
			if template {
				fmt.Fprint(a.stdout, spec.Template())
				return nil
			}
			if err := a.checkFormat("table", "json"); err != nil {
				return err
			}
			ts, err := parseTopologies(topos)
			if err != nil {
				return err
			}
			s, err := loadSpec(argv[0])
			if err != nil {
				return err
			}
			ns := topology.Needs(s, ts...)
			if a.format == "json" {
				return writeJSON(a.stdout, ns)
			}
			return printNeeds(a, ns)
		},
	}
	c.Flags().BoolVar(&template, "template", false, "print a commented example spec and exit")
	c.Flags().StringSliceVar(&topos, "topology", nil, "only these topologies: series-diode, shunt-fuse, pfet-high, nfet-low")
	return c
}

func exampleNames() string {
	return strings.Join(exampleSpecNames(), ", ")
}

func parseTopologies(names []string) ([]topology.Topology, error) {
	var out []topology.Topology
	for _, n := range names {
		t, err := topology.ParseTopology(n)
		if err != nil {
			return nil, usageErr(err, "topologies: series-diode, shunt-fuse, pfet-high, nfet-low")
		}
		out = append(out, t)
	}
	return out, nil
}

// num formats a value with its unit symbol in engineering notation; "?"
// for an unknown value.
func num(v topology.Num, unit string) string {
	f := float64(v)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return "?"
	}
	if d, ok := dimOfSymbol(unit); ok {
		return units.Format(f, d)
	}
	s := units.Format(f, units.None)
	if unit != "" {
		s += " " + unit
	}
	return s
}

// dimOfSymbol maps a unit symbol used in results to its dimension.
func dimOfSymbol(sym string) (units.Dim, bool) {
	for _, d := range units.AllDims() {
		if d != units.None && d.Symbol() == sym {
			return d, true
		}
	}
	switch sym {
	case "%":
		return units.Fraction, true
	case "K":
		return units.None, false
	}
	return units.None, false
}

func printNeeds(a *app, ns *topology.NeedSet) error {
	w := a.stdout
	fmt.Fprintf(w, "Requirements for %s, policy %s (%s)\n", ns.Spec, ns.Policy, ns.PolicyTitle)
	fmt.Fprintf(w, "hot corner:  %s\ncold corner: %s\n", ns.HotCorner, ns.ColdCorner)
	for _, n := range ns.Needs {
		fmt.Fprintf(w, "\n%s: %s\n", n.Topology, n.Title)
		if n.Unsafe {
			fmt.Fprintf(w, "  UNSAFE for this application: %s\n", n.UnsafeReason)
		}
		for _, r := range n.Requirements {
			bound := r.Op + " " + num(r.Value, r.Unit)
			if math.IsNaN(float64(r.Value)) {
				bound = r.Op + " (per part)"
			}
			name := r.Name
			if r.Field != "" {
				name += " [" + r.Field + "]"
			}
			fmt.Fprintf(w, "  %-13s %s %s\n", r.Role, name, bound)
			for _, l := range wrap(r.Formula, 90) {
				fmt.Fprintf(w, "  %-13s   %s\n", "", l)
			}
			var fs []string
			for _, f := range r.Factors {
				s := fmt.Sprintf("%s = %s %s", f.Name, strings.TrimSpace(num(f.Value, f.Unit)), f.Tag)
				if f.Tag == "[M]" {
					s += " (unverified default)"
				}
				fs = append(fs, s)
			}
			src := r.Source
			if len(fs) > 0 {
				src = strings.Join(fs, ", ") + "; " + src
			}
			for _, l := range wrap("source: "+src, 90) {
				fmt.Fprintf(w, "  %-13s   %s\n", "", l)
			}
			if r.Note != "" {
				for _, l := range wrap("note: "+r.Note, 90) {
					fmt.Fprintf(w, "  %-13s   %s\n", "", l)
				}
			}
		}
		for _, h := range n.Hazards {
			fmt.Fprintf(w, "  hazard: %s\n", h)
		}
	}
	fmt.Fprintln(w)
	if len(ns.Unverified) > 0 {
		var names []string
		for _, f := range ns.Unverified {
			names = append(names, fmt.Sprintf("%s=%s", f.Name, strings.TrimSpace(num(f.Value, f.Unit))))
		}
		printLines(a, "Unverified defaults (values from memory; confirm against the standard you hold, or override in [policy]):", []string{strings.Join(names, ", ")})
	}
	printLines(a, "Notes:", ns.Notes)
	printLines(a, "Caution:", ns.Cautions)
	return nil
}
