package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/catalog"
	"partsieve/importers"
)

type fieldInfo struct {
	Name    string   `json:"name"`
	Kinds   []string `json:"kinds"`
	Unit    string   `json:"unit"`
	Meaning string   `json:"meaning"`
	Headers []string `json:"header_words"`
	Values  []string `json:"values,omitempty"`
}

func newFieldsCmd(a *app) *cobra.Command {
	return &cobra.Command{
		Use:   "fields",
		Short: "List the catalog fields, their units and the header words recognised for each",
		Long: `List the canonical fields: the kinds they apply to, the unit values are
stored in (base SI units; temperatures in °C), what they mean, and the
spreadsheet header words the importer recognises for each. The canonical
names are used by --where, --sort, mapping files and JSON output.`,
		Args: args(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := a.checkFormat("table", "json", "csv"); err != nil {
				return err
			}
			var infos []fieldInfo
			for _, f := range catalog.Fields {
				fi := fieldInfo{Name: f.Name, Unit: f.Dim.Symbol(), Meaning: f.Doc, Headers: importers.HeaderWords(f.Name), Values: f.Enum}
				if f.Type != catalog.Number {
					fi.Unit = ""
				}
				if f.Type == catalog.Bool {
					fi.Values = []string{"yes", "no"}
				}
				if f.Kinds == nil {
					fi.Kinds = []string{"all"}
				}
				for _, k := range f.Kinds {
					fi.Kinds = append(fi.Kinds, string(k))
				}
				infos = append(infos, fi)
			}
			for _, e := range importers.ExtraFields {
				infos = append(infos, fieldInfo{Name: e.Name, Kinds: []string{"import"}, Meaning: e.Doc, Headers: importers.HeaderWords(e.Name)})
			}
			switch a.format {
			case "json":
				return writeJSON(a.stdout, infos)
			case "csv":
				var rows [][]string
				for _, fi := range infos {
					rows = append(rows, []string{fi.Name, strings.Join(fi.Kinds, " "), fi.Unit, fi.Meaning, strings.Join(fi.Headers, "; ")})
				}
				return writeCSV(a.stdout, []string{"field", "kinds", "unit", "meaning", "header_words"}, rows)
			}
			fmt.Fprintln(a.stdout, "Headers match ignoring case, spaces, underscores, dashes and subscript\nparentheses (V_RRM, Vrrm and VRRM are the same), with the unit in the header\nor the cells; a test condition in the header (\"RDS(on) max @ 10V\") fills the\ncondition field. Canonical names always work as headers. Fields of kind\n\"import\" are read from spreadsheets (offers, kind words, ratings resolved by\nthe row's kind) but are not catalog fields.")
			fmt.Fprintln(a.stdout)
			for _, fi := range infos {
				unit := fi.Unit
				if unit == "" {
					unit = "-"
				}
				meaning := fi.Meaning
				if len(fi.Values) > 0 && fi.Name != "type" {
					meaning += " (" + strings.Join(fi.Values, "|") + ")"
				}
				fmt.Fprintf(a.stdout, "%-11s %-5s %-18s %s\n", fi.Name, unit, strings.Join(fi.Kinds, ","), meaning)
				if len(fi.Headers) > 0 {
					for _, line := range wrap("headers: "+strings.Join(fi.Headers, ", "), 88) {
						fmt.Fprintf(a.stdout, "%12s%s\n", "", line)
					}
				}
			}
			return nil
		},
	}
}

// wrap breaks s into lines of at most width runes at spaces.
func wrap(s string, width int) []string {
	var lines []string
	var cur []string
	n := 0
	for _, w := range strings.Fields(s) {
		l := len([]rune(w))
		if n > 0 && n+1+l > width {
			lines = append(lines, strings.Join(cur, " "))
			cur, n = nil, 0
		}
		if n > 0 {
			n++
		}
		cur = append(cur, w)
		n += l
	}
	if len(cur) > 0 {
		lines = append(lines, strings.Join(cur, " "))
	}
	return lines
}
