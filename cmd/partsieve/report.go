package main

import (
	"bytes"
	"context"
	"fmt"
	"time"

	htmlreport "partsieve/query/report"
	"partsieve/query/spec"
	"partsieve/query/topology"
)

// writeReport writes the HTML report of the pick res for spec s (given on
// the command line as specArg) to path, through a temporary file renamed
// into place, and says so on stderr.
func writeReport(ctx context.Context, a *app, src topology.Source, s *spec.Spec, specArg string, res *topology.Result, path string) error {
	text, err := specText(specArg) // shortlist.go: the file as written
	if err != nil {
		return err
	}
	parts, err := topology.CandidateParts(ctx, src, res)
	if err != nil {
		return fmt.Errorf("--report %s: %w", path, err)
	}
	var buf bytes.Buffer
	in := htmlreport.Input{Spec: s, SpecText: []byte(text), Result: res, Parts: parts, Generated: time.Now()}
	if err := htmlreport.Write(&buf, in); err != nil {
		return fmt.Errorf("--report %s: %w", path, err)
	}
	if err := writeFileAtomic(path, buf.Bytes()); err != nil {
		return fmt.Errorf("writing --report: %w", err)
	}
	fmt.Fprintf(a.stderr, "report written to %s\n", path)
	return nil
}
