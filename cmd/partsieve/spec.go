package main

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"strings"

	"partsieve/query/spec"
	"partsieve/seeddata"
)

// loadSpec reads an application spec from a file, or, when no such file
// exists, one of the embedded example specs by name
// ("vehicle-12v-accessory").
func loadSpec(arg string) (*spec.Spec, error) {
	data, err := os.ReadFile(arg)
	name := arg
	if errors.Is(err, fs.ErrNotExist) {
		if d, path, ok := seeddata.Spec(strings.TrimSuffix(arg, ".toml")); ok {
			data, name, err = d, path, nil
		} else {
			return nil, withHint(fmt.Errorf("spec %s: no such file", arg),
				"give a spec file, or an example: "+strings.Join(seeddata.SpecNames(), ", ")+"; 'partsieve need --template' prints a commented spec")
		}
	}
	if err != nil {
		return nil, fmt.Errorf("spec %s: %w", arg, err)
	}
	s, err := spec.Parse(name, data)
	if err != nil {
		return nil, withHint(err, "'partsieve need --template' prints every key with its meaning and unit")
	}
	return s, nil
}

// printLines prints a titled list of lines, wrapped.
func printLines(a *app, title string, lines []string) {
	if len(lines) == 0 {
		return
	}
	fmt.Fprintln(a.stdout, title)
	for _, l := range lines {
		for i, w := range wrap(l, 96) {
			if i == 0 {
				fmt.Fprintf(a.stdout, "  - %s\n", w)
			} else {
				fmt.Fprintf(a.stdout, "    %s\n", w)
			}
		}
	}
}
