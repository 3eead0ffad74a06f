// Command partsieve imports supplier spreadsheets of diodes, fuses and
// MOSFETs into a local catalog and searches it, to choose reverse-polarity
// protection parts for a DC power input.
package main

import (
	"context"
	"os"
	"os/signal"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}
