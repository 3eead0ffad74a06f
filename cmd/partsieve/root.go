package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"

	"github.com/spf13/cobra"
	"golang.org/x/term"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/seeddata"
)

// app holds the global flags and the streams of one invocation. Commands
// get it through their constructors; there is no package-level state.
type app struct {
	db     string
	format string
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	// isTerminal reports whether stderr is a terminal (progress bars).
	isTerminal func() bool
}

func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	a := &app{stdin: stdin, stdout: stdout, stderr: stderr, isTerminal: func() bool {
		f, ok := stderr.(*os.File)
		return ok && term.IsTerminal(int(f.Fd()))
	}}
	root := newRootCmd(a)
	root.SetArgs(args)
	root.SetOut(stdout)
	root.SetErr(stderr)
	err := root.ExecuteContext(ctx)
	return report(stderr, err)
}

func newRootCmd(a *app) *cobra.Command {
	root := &cobra.Command{
		Use:   "partsieve",
		Short: "Catalog and choose reverse-polarity protection parts for a DC input",
		Long: `partsieve imports supplier spreadsheets of diodes, fuses and MOSFETs into a
local catalog (SQLite plus a text index) and searches it by parameters and text.

A new catalog is seeded with invented demonstration parts (source "seed").
The catalog lives at --db, else $PARTSIEVE_DB, else ` + defaultDBHelp() + `.

` + exitCodesHelp,
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	root.PersistentFlags().StringVar(&a.db, "db", "", "catalog database file (default $PARTSIEVE_DB, else the user data dir)")
	root.PersistentFlags().StringVar(&a.format, "format", "table", "output format: table, json or csv")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return usageErr(err, fmt.Sprintf("see '%s --help'", c.CommandPath()))
	})
	root.AddCommand(
		newImportCmd(a),
		newFindCmd(a),
		newShowCmd(a),
		newFieldsCmd(a),
		newNeedCmd(a),
		newPickCmd(a),
		newShortlistCmd(a),
		newCatalogCmd(a),
	)
	return root
}

// args wraps a cobra positional-argument check so that its failure is a
// usage error (exit 2).
func args(check cobra.PositionalArgs) cobra.PositionalArgs {
	return func(c *cobra.Command, a []string) error {
		if err := check(c, a); err != nil {
			return usageErr(err, fmt.Sprintf("usage: %s", c.UseLine()))
		}
		return nil
	}
}

// checkFormat validates --format against the formats a command offers.
func (a *app) checkFormat(allowed ...string) error {
	for _, f := range allowed {
		if a.format == f {
			return nil
		}
	}
	return usageErr(fmt.Errorf("--format %q is not offered here", a.format), "use one of: "+strings.Join(allowed, ", "))
}

// dbPath resolves the catalog location: --db, $PARTSIEVE_DB, user data dir.
func (a *app) dbPath() (string, error) {
	if a.db != "" {
		return a.db, nil
	}
	if p := os.Getenv("PARTSIEVE_DB"); p != "" {
		return p, nil
	}
	dir, err := userDataDir()
	if err != nil {
		return "", withHint(err, "set --db or PARTSIEVE_DB")
	}
	return filepath.Join(dir, "partsieve", "catalog.db"), nil
}

func defaultDBHelp() string {
	switch runtime.GOOS {
	case "windows":
		return `%LocalAppData%\partsieve\catalog.db`
	case "darwin":
		return "~/Library/Application Support/partsieve/catalog.db"
	}
	return "$XDG_DATA_HOME/partsieve/catalog.db (~/.local/share/partsieve/catalog.db)"
}

// userDataDir is the per-user data directory: XDG_DATA_HOME or
// ~/.local/share on Unix, LocalAppData on Windows, Application Support on
// macOS.
func userDataDir() (string, error) {
	switch runtime.GOOS {
	case "windows":
		if d := os.Getenv("LocalAppData"); d != "" {
			return d, nil
		}
		return os.UserConfigDir()
	case "darwin":
		return os.UserConfigDir()
	}
	if d := os.Getenv("XDG_DATA_HOME"); d != "" {
		return d, nil
	}
	home, err := os.UserHomeDir()
	if err != nil {
		return "", fmt.Errorf("cannot find the user data directory: %w", err)
	}
	return filepath.Join(home, ".local", "share"), nil
}

// open opens the catalog, seeding a new one from the embedded seed catalog
// through the same importer as user files. If seeding fails, the new file
// is removed so that the next run tries again.
func (a *app) open(ctx context.Context) (*catalog.Store, error) {
	path, err := a.dbPath()
	if err != nil {
		return nil, err
	}
	st, err := catalog.Open(ctx, path)
	if err != nil {
		return nil, err
	}
	st.Notify = func(msg string) { fmt.Fprintln(a.stderr, "note:", msg) }
	if !st.New {
		return st, nil
	}
	err = seeddata.Seed(ctx, func(ctx context.Context, name string, data []byte, label string) error {
		sum, err := importers.ImportData(ctx, st, name, data, importers.Options{Source: label})
		if err != nil {
			return err
		}
		if sum.Rejected > 0 {
			r := sum.Rejects[0]
			return fmt.Errorf("seed catalog: %d rows refused, first at row %d column %q: %s", sum.Rejected, r.Row, r.Column, r.Reason)
		}
		return nil
	})
	if err != nil {
		st.Close()
		for _, suffix := range []string{"", "-wal", "-shm", "-journal"} {
			os.Remove(path + suffix)
		}
		os.RemoveAll(path + ".bleve")
		return nil, fmt.Errorf("seeding the new catalog %s: %w", path, err)
	}
	return st, nil
}
