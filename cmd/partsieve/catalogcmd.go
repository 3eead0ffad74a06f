package main

import (
	"fmt"
	"sort"
	"strings"
	"time"

	"github.com/spf13/cobra"
)

func newCatalogCmd(a *app) *cobra.Command {
	c := &cobra.Command{
		Use:   "catalog",
		Short: "Look after the catalog: stats, sources, remove, reindex, check",
	}
	c.AddCommand(newCatalogStatsCmd(a), newCatalogSourcesCmd(a), newCatalogRemoveCmd(a), newCatalogReindexCmd(a), newCatalogCheckCmd(a))
	return c
}

func newCatalogStatsCmd(a *app) *cobra.Command {
	return &cobra.Command{
		Use:   "stats",
		Short: "Count parts, offers and sources by kind and type",
		Args:  args(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := a.checkFormat("table", "json"); err != nil {
				return err
			}
			st, err := a.open(cmd.Context())
			if err != nil {
				return err
			}
			defer st.Close()
			s, err := st.Stats(cmd.Context())
			if err != nil {
				return err
			}
			if a.format == "json" {
				return writeJSON(a.stdout, s)
			}
			fmt.Fprintf(a.stdout, "catalog   %s (schema %d)\n", st.Path, s.Schema)
			fmt.Fprintf(a.stdout, "parts     %d\noffers    %d\nsources   %d\n", s.Parts, s.Offers, s.Sources)
			idx := "current"
			if !s.IndexOK {
				idx = "stale (rebuilt on the next text search, or run 'partsieve catalog reindex')"
			}
			fmt.Fprintf(a.stdout, "index     %s\n\n", idx)
			t := newTable(a.stdout, "KIND", "PARTS")
			for _, k := range sortedKeys(s.ByKind) {
				t.row(k, fmt.Sprint(s.ByKind[k]))
			}
			t.flush()
			fmt.Fprintln(a.stdout)
			t = newTable(a.stdout, "TYPE", "PARTS")
			for _, k := range sortedKeys(s.ByType) {
				label := k
				if label == "" {
					label = "(none)"
				}
				t.row(label, fmt.Sprint(s.ByType[k]))
			}
			return t.flush()
		},
	}
}

func sortedKeys(m map[string]int) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

func newCatalogSourcesCmd(a *app) *cobra.Command {
	return &cobra.Command{
		Use:   "sources",
		Short: "List the imports recorded in the catalog",
		Args:  args(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := a.checkFormat("table", "json", "csv"); err != nil {
				return err
			}
			st, err := a.open(cmd.Context())
			if err != nil {
				return err
			}
			defer st.Close()
			srcs, err := st.Sources(cmd.Context())
			if err != nil {
				return err
			}
			switch a.format {
			case "json":
				return writeJSON(a.stdout, srcs)
			case "csv":
				var rows [][]string
				for _, s := range srcs {
					rows = append(rows, []string{s.Label, s.File, s.SHA256, s.Time.UTC().Format(time.RFC3339),
						fmt.Sprint(s.Read), fmt.Sprint(s.Added), fmt.Sprint(s.Updated), fmt.Sprint(s.Unchanged), fmt.Sprint(s.Rejected)})
				}
				return writeCSV(a.stdout, []string{"label", "file", "sha256", "time", "read", "added", "updated", "unchanged", "rejected"}, rows)
			}
			t := newTable(a.stdout, "LABEL", "FILE", "IMPORTED", "READ", "ADDED", "UPDATED", "UNCHANGED", "REJECTED", "SHA-256")
			for _, s := range srcs {
				sha := s.SHA256
				if len(sha) > 12 {
					sha = sha[:12]
				}
				t.row(s.Label, s.File, s.Time.Local().Format("2006-01-02 15:04"), fmt.Sprint(s.Read), fmt.Sprint(s.Added),
					fmt.Sprint(s.Updated), fmt.Sprint(s.Unchanged), fmt.Sprint(s.Rejected), sha)
			}
			return t.flush()
		},
	}
}

func newCatalogRemoveCmd(a *app) *cobra.Command {
	var label string
	c := &cobra.Command{
		Use:   "remove --source LABEL",
		Short: "Remove what one import brought: its offers, and parts no other import brought",
		Args:  args(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, _ []string) error {
			if label == "" {
				return usageErr(fmt.Errorf("--source is required"), "'partsieve catalog sources' lists the labels")
			}
			st, err := a.open(cmd.Context())
			if err != nil {
				return err
			}
			defer st.Close()
			parts, offers, err := st.RemoveSource(cmd.Context(), label)
			if err != nil {
				return err
			}
			fmt.Fprintf(a.stdout, "removed source %q: %d parts, %d offers\n", label, parts, offers)
			return nil
		},
	}
	c.Flags().StringVar(&label, "source", "", "label of the import to remove")
	return c
}

func newCatalogReindexCmd(a *app) *cobra.Command {
	return &cobra.Command{
		Use:   "reindex",
		Short: "Rebuild the text index from the catalog",
		Args:  args(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, _ []string) error {
			st, err := a.open(cmd.Context())
			if err != nil {
				return err
			}
			defer st.Close()
			start := time.Now()
			if err := st.Reindex(cmd.Context()); err != nil {
				return err
			}
			fmt.Fprintf(a.stdout, "text index rebuilt in %s\n", time.Since(start).Round(time.Millisecond))
			return nil
		},
	}
}

func newCatalogCheckCmd(a *app) *cobra.Command {
	return &cobra.Command{
		Use:   "check",
		Short: "Check the catalog's integrity and the text index against it; tell the column file's state",
		Args:  args(cobra.NoArgs),
		RunE: func(cmd *cobra.Command, _ []string) error {
			st, err := a.open(cmd.Context())
			if err != nil {
				return err
			}
			defer st.Close()
			problems, err := st.Check(cmd.Context())
			if err != nil {
				return err
			}
			// the column file is a cache that the next pick rebuilds when
			// it does not match: its state is told, never a problem
			cols := "column file: unreadable catalog, not checked"
			if state, err := st.ColumnFileState(cmd.Context()); err == nil {
				cols = "column file: " + state
				if state != "current" {
					cols += " (the next pick rebuilds it, or run 'partsieve catalog reindex')"
				}
			}
			if len(problems) == 0 {
				fmt.Fprintln(a.stdout, "catalog ok: integrity check passed, text index matches the catalog")
				fmt.Fprintln(a.stdout, cols)
				return nil
			}
			defer fmt.Fprintln(a.stdout, cols)
			for _, p := range problems {
				fmt.Fprintln(a.stdout, "problem:", p)
			}
			noun := "problems"
			if len(problems) == 1 {
				noun = "problem"
			}
			hint := "a stale text index is fixed by 'partsieve catalog reindex'"
			for _, p := range problems {
				if !strings.HasPrefix(p, "text index:") {
					// reindexing cannot repair the SQLite file itself
					hint = "the catalog file itself is damaged: restore a backup copy, or move it away and import the spreadsheets again"
					break
				}
			}
			return withHint(fmt.Errorf("%d %s found in %s", len(problems), noun, st.Path), hint)
		},
	}
}
