package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"partsieve/catalog"
	"partsieve/importers"
)

type importOptions struct {
	kind     string
	mapFile  string
	sheet    string
	source   string
	supplier string
	dryRun   bool
	rejects  string
}

func newImportCmd(a *app) *cobra.Command {
	var o importOptions
	c := &cobra.Command{
		Use:   "import FILE...",
		Short: "Import supplier spreadsheets (CSV, TSV, XLSX) into the catalog",
		Long: `Import supplier spreadsheets into the catalog. Each file is one transaction:
it is imported whole (bad rows refused and listed) or, if it cannot be read,
not at all. Headers, units and part kinds are recognised; see 'partsieve
fields' for the header words, and --map for sheets that need help.

Prints, per file: rows read, added, updated, unchanged, rejected, the
unknown columns, and each refused row with its row number, column, raw
value and reason.`,
		Example: `  partsieve import diodes.csv mosfets.xlsx
  partsieve import --sheet Fuses --supplier "Acme Components" stock.xlsx
  partsieve import --dry-run --rejects refused.csv new-list.csv`,
		Args: args(cobra.MinimumNArgs(1)),
		RunE: func(cmd *cobra.Command, files []string) error {
			return runImport(cmd, a, o, files)
		},
	}
	f := c.Flags()
	f.StringVar(&o.kind, "kind", "", "kind of every row: diode, fuse or mosfet (default: decided per row)")
	f.StringVar(&o.mapFile, "map", "", "TOML mapping file for sheets the recogniser cannot read alone")
	f.StringVar(&o.sheet, "sheet", "", "XLSX sheet to import (default: every sheet with a header row)")
	f.StringVar(&o.source, "source", "", "source label recorded for this import (default: the file name)")
	f.StringVar(&o.supplier, "supplier", "", "supplier name when the sheet has no supplier column")
	f.BoolVar(&o.dryRun, "dry-run", false, "read, check and count everything, change nothing")
	f.StringVar(&o.rejects, "rejects", "", "write the refused rows to this CSV file")
	return c
}

func runImport(cmd *cobra.Command, a *app, o importOptions, files []string) error {
	if err := a.checkFormat("table", "json"); err != nil {
		return err
	}
	var kind catalog.Kind
	if o.kind != "" {
		kind = catalog.Kind(strings.ToLower(o.kind))
		if kind != catalog.Diode && kind != catalog.Fuse && kind != catalog.MOSFET {
			return usageErr(fmt.Errorf("--kind %q is not a kind", o.kind), "use diode, fuse or mosfet")
		}
	}
	if o.source != "" && len(files) > 1 {
		return usageErr(errors.New("--source names one import; it cannot label several files"), "import the files one at a time, or leave --source out")
	}
	ctx := cmd.Context()
	st, err := a.open(ctx)
	if err != nil {
		return err
	}
	defer st.Close()

	var sums []*importers.Summary
	var allRejects []importers.Reject
	var failed []error
	var interrupted error
	for _, file := range files {
		opt := importers.Options{
			Kind: kind, MapFile: o.mapFile, Sheet: o.sheet, Source: o.source,
			Supplier: o.supplier, DryRun: o.dryRun,
		}
		if a.isTerminal() {
			opt.Progress = a.stderr
		}
		sum, err := importers.ImportFile(ctx, st, file, opt)
		if err != nil && ctx.Err() != nil {
			// interrupted (Ctrl-C): this file's import was rolled back;
			// the files before it stay imported and are reported below
			interrupted = fmt.Errorf("%s: %w", file, ctx.Err())
			break
		}
		if err != nil {
			failed = append(failed, err)
			fmt.Fprintf(a.stderr, "Error: %v\n", err)
			if h := damageHint(err); h != "" {
				fmt.Fprintf(a.stderr, "Hint: %s\n", h)
			}
			continue
		}
		sums = append(sums, sum)
		allRejects = append(allRejects, sum.Rejects...)
	}
	if o.rejects != "" && len(sums) > 0 {
		var buf bytes.Buffer
		if err := importers.WriteRejectsCSV(&buf, allRejects); err != nil {
			return err
		}
		if err := writeFileAtomic(o.rejects, buf.Bytes()); err != nil {
			return fmt.Errorf("writing --rejects: %w", err)
		}
	}
	switch a.format {
	case "json":
		var v any = sums
		if len(sums) == 1 && len(files) == 1 {
			v = sums[0]
		}
		if err := writeJSON(a.stdout, v); err != nil {
			return err
		}
	default:
		for _, s := range sums {
			printSummary(a.stdout, s, o.rejects)
		}
	}
	if interrupted != nil {
		return interrupted
	}
	if len(failed) > 0 {
		return &codeError{code: exitError}
	}
	for _, s := range sums {
		if s.Rejected > 0 {
			return &codeError{code: exitRejected}
		}
	}
	return nil
}

const maxRejectsShown = 20

func printSummary(w io.Writer, s *importers.Summary, rejectsFile string) {
	verb := "imported"
	if s.DryRun {
		verb = "checked (dry run, nothing changed)"
	}
	fmt.Fprintf(w, "%s %s: read %d, added %d, updated %d, unchanged %d, rejected %d\n",
		s.File, verb, s.Read, s.Added, s.Updated, s.Unchanged, s.Rejected)
	if len(s.Unknown) > 0 {
		fmt.Fprintf(w, "  columns not used: %s\n", strings.Join(s.Unknown, ", "))
	}
	if len(s.Changes) > 0 {
		fmt.Fprintf(w, "  changed values:\n")
		t := newTable(w, "    part", "field", "was", "now")
		for i, c := range s.Changes {
			if i == maxRejectsShown {
				t.row("    …", fmt.Sprintf("%d more", len(s.Changes)-i), "", "")
				break
			}
			t.row("    "+c.Mfr+" "+c.MPN, c.Field, c.Old, c.New)
		}
		t.flush()
	}
	if len(s.Rejects) > 0 {
		fmt.Fprintf(w, "  refused rows:\n")
		t := newTable(w, "    row", "column", "value", "reason")
		for i, r := range s.Rejects {
			if i == maxRejectsShown {
				more := fmt.Sprintf("%d more", len(s.Rejects)-i)
				if rejectsFile == "" {
					more += "; write them all with --rejects FILE"
				}
				t.row("    …", more, "", "")
				break
			}
			row := fmt.Sprintf("%d", r.Row)
			if r.Sheet != "" {
				row = r.Sheet + "!" + row
			}
			t.row("    "+row, r.Column, r.Raw, r.Reason)
		}
		t.flush()
	}
}

// writeFileAtomic writes data to a temporary file beside path and renames
// it into place, so a failure never leaves a half-written file. A path that
// is an existing directory or a symbolic link is refused. The file keeps
// the permissions of the file it replaces, else gets 0644 (the temporary
// file starts private, 0600).
func writeFileAtomic(path string, data []byte) error {
	mode := os.FileMode(0o644)
	if fi, err := os.Lstat(path); err == nil {
		if fi.Mode()&os.ModeSymlink != 0 {
			return fmt.Errorf("%s is a symbolic link; give a plain file path", path)
		}
		if fi.IsDir() {
			return fmt.Errorf("%s is a directory", path)
		}
		if fi.Mode().IsRegular() {
			mode = fi.Mode().Perm()
		}
	}
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return err
	}
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Chmod(mode); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	return nil
}
