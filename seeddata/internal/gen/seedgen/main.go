// Command seedgen writes the seed catalog CSV (seeddata/seed.csv).
//
// Run from the seeddata directory through go generate, or directly:
//
//	go run ./internal/gen/seedgen -o seed.csv
package main

import (
	"flag"
	"fmt"
	"os"

	"partsieve/seeddata/internal/gen"
)

func main() {
	out := flag.String("o", "seed.csv", "output file (\"-\" for standard output)")
	flag.Parse()
	data, err := gen.Generate()
	if err != nil {
		fmt.Fprintln(os.Stderr, "seedgen:", err)
		os.Exit(1)
	}
	if *out == "-" {
		_, err = os.Stdout.Write(data)
	} else {
		err = os.WriteFile(*out, data, 0o644)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "seedgen:", err)
		os.Exit(1)
	}
}
