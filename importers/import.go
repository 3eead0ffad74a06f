// Package importers reads supplier spreadsheets (CSV, TSV, XLSX), recognises
// their headers, units and part kinds, validates each row and writes the
// parts into the catalog in one transaction per file.
package importers

import (
	"context"
	"errors"
	"io"

	"partsieve/catalog"
)

var errTODO = errors.New("not implemented")

// Options control one import.
type Options struct {
	Kind     catalog.Kind // "" = decided per row (category column, type words)
	MapFile  string       // TOML mapping file, "" = recognise headers alone
	Sheet    string       // XLSX sheet name, "" = every sheet with a header row
	Source   string       // source label, "" = file base name
	Supplier string       // supplier when the sheet has no supplier column
	DryRun   bool         // run everything, then roll back
	Progress io.Writer    // progress bar target (a terminal), nil = none
}

// Reject is one refused row: the sheet row number (1-based, as the
// spreadsheet program shows it), the column header, the raw cell text and
// the reason.
type Reject struct {
	File   string `json:"file"`
	Sheet  string `json:"sheet,omitempty"`
	Row    int    `json:"row"`
	Column string `json:"column"`
	Raw    string `json:"raw"`
	Reason string `json:"reason"`
}

// Summary reports one imported file.
type Summary struct {
	File      string           `json:"file"`
	Read      int              `json:"read"`
	Added     int              `json:"added"`
	Updated   int              `json:"updated"`
	Unchanged int              `json:"unchanged"`
	Rejected  int              `json:"rejected"`
	Unknown   []string         `json:"unknown_columns"`
	Rejects   []Reject         `json:"rejects"`
	Changes   []catalog.Change `json:"changes,omitempty"`
	DryRun    bool             `json:"dry_run,omitempty"`
}

// ImportFile imports the spreadsheet at path into st. A file that cannot be
// read at all returns an error naming the file and the reason, and the
// catalog is left exactly as it was.
func ImportFile(ctx context.Context, st *catalog.Store, path string, opt Options) (*Summary, error) {
	return nil, errTODO
}

// ImportData imports a spreadsheet held in memory; name gives the format
// (by extension) and appears in messages.
func ImportData(ctx context.Context, st *catalog.Store, name string, data []byte, opt Options) (*Summary, error) {
	return nil, errTODO
}

// HeaderWords returns the header words recognised for a canonical field,
// for `partsieve fields`.
func HeaderWords(field string) []string { return nil }
