package seeddata

import (
	"embed"
	"io/fs"
	"sort"
	"strings"
)

// Specs holds the example application specs: scenarios of our own,
// invented for demonstration (see specs/*.toml for what each describes).
// `partsieve need` and `partsieve pick` accept them, e.g. with
// SpecNames and Spec.
//
//go:embed specs/*.toml
var Specs embed.FS

// SpecNames returns the example spec names (file names without ".toml"),
// sorted: "handheld-2s-liion", "sensor-24v-industrial",
// "vehicle-12v-accessory".
func SpecNames() []string {
	ents, err := fs.ReadDir(Specs, "specs")
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range ents {
		if n := e.Name(); strings.HasSuffix(n, ".toml") && !e.IsDir() {
			out = append(out, strings.TrimSuffix(n, ".toml"))
		}
	}
	sort.Strings(out)
	return out
}

// Spec returns the text of the example spec name (with or without
// ".toml") and the path it is known by ("specs/NAME.toml"); ok is false
// for an unknown name.
func Spec(name string) (data []byte, path string, ok bool) {
	path = "specs/" + strings.TrimSuffix(name, ".toml") + ".toml"
	data, err := Specs.ReadFile(path)
	if err != nil {
		return nil, "", false
	}
	return data, path, true
}
