// Command partsieve imports supplier spreadsheets of diodes, fuses and
// MOSFETs into a local catalog and searches it, to choose reverse-polarity
// protection parts for a DC power input.
package main

import (
	"context"
	"io"
	"log"
	"os"
	"os/signal"
)

func main() {
	// The text index library logs some internal events through the
	// standard logger, e.g. a benign race between two of its own
	// clean-ups of obsolete segment files ("got err removing file …: no
	// such file or directory"); they mean nothing to a user and would
	// interleave with the command's output. partsieve itself reports
	// through its own messages, never the standard logger.
	log.SetOutput(io.Discard)
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}
