package importers

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"partsieve/catalog"
)

// a sheet the recognizer cannot read alone: German headers, the header on
// row 3, no manufacturer column, prices at 100 pieces.
const germanSheet = `Teileliste Dioden;;;;;;
;;;;;;
Bezeichnung;Sperrspannung;Strom;Uf;Interne Nr.;Preis 100;Bemerkung
ALS5-40G;40;5;0,55;X-17;0,21;Lager
ALS5-60G;60;5;0,7;X-18;0,23;
`

const germanMap = `# mapping for the German diode list
header_row = 3
kind = "diode"
type = "schottky"
supplier = "Haendler Nord"
currency = "EUR"
ignore = ["Bemerkung", "Interne Nr."]

[columns]
"Bezeichnung" = "mpn"
"Sperrspannung" = { field = "vrrm", unit = "V" }
"strom" = { field = "ifav", unit = "A" }
"Uf" = { field = "vf", unit = "V", conditions = { vf_if = "5 A" } }
"Preis 100" = { field = "price", qty = 100 }

[constants]
mfr = "Aldor Semiconductor"
tjmax = "150 °C"
rohs = true
`

func writeTemp(t *testing.T, name, data string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestMappingImport(t *testing.T) {
	st := openStore(t)
	sheet := writeTemp(t, "dioden.csv", germanSheet)
	mp := writeTemp(t, "dioden.toml", germanMap)
	// without the mapping there is no header row to find
	if _, err := ImportFile(context.Background(), st, sheet, Options{}); err == nil || !strings.Contains(err.Error(), "no header row") {
		t.Fatalf("without mapping: %v", err)
	}
	s, err := ImportFile(context.Background(), st, sheet, Options{MapFile: mp})
	if err != nil {
		t.Fatal(err)
	}
	if s.Read != 2 || s.Added != 2 || len(s.Unknown) != 0 {
		t.Fatalf("summary %+v", s)
	}
	yes := true
	p := getPart(t, st, "Aldor Semiconductor", "ALS5-40G")
	if p.Kind != catalog.Diode || p.Type != "schottky" || p.RoHS == nil || *p.RoHS != yes {
		t.Errorf("part %+v", p)
	}
	checkNums(t, "ALS5-40G", p, map[string]float64{"vrrm": 40, "ifav": 5, "vf": 0.55, "vf_if": 5, "tjmax": 150})
	if len(p.Offers) != 1 || p.Offers[0].Supplier != "Haendler Nord" || p.Offers[0].Currency != "EUR" ||
		len(p.Offers[0].Breaks) != 1 || p.Offers[0].Breaks[0] != (catalog.PriceBreak{Qty: 100, Price: 0.21}) {
		t.Errorf("offers %+v", p.Offers)
	}
	// --supplier beats the mapping's supplier
	s, err = ImportFile(context.Background(), st, sheet, Options{MapFile: mp, Supplier: "Other", DryRun: true})
	if err != nil || s.Updated != 2 {
		t.Errorf("dry run with other supplier: %+v %v", s, err)
	}
}

func TestMappingWithoutHeader(t *testing.T) {
	data := "KP1,Kestrel,-30,45\nKP2,Kestrel,-20,80\n"
	m := `header_row = 0
kind = "mosfet"
[columns]
A = "mpn"
B = "mfr"
C = "vds"
D = { field = "rdson", unit = "mΩ", conditions = { rdson_vgs = "10 V" } }
`
	st := openStore(t)
	s, err := ImportFile(context.Background(), st, writeTemp(t, "raw.csv", data), Options{MapFile: writeTemp(t, "raw.toml", m)})
	if err != nil {
		t.Fatal(err)
	}
	if s.Read != 2 || s.Added != 2 {
		t.Fatalf("summary %+v", s)
	}
	p := getPart(t, st, "Kestrel", "KP2")
	if p.Type != "p" {
		t.Errorf("type %q", p.Type)
	}
	checkNums(t, "KP2", p, map[string]float64{"vds": 20, "rdson": 0.08, "rdson_vgs": 10})
}

func TestMappingErrors(t *testing.T) {
	for _, tc := range []struct {
		name, toml, want string
	}{
		{"unknown top key", "header_row = 2\nkinds = \"diode\"\n", `m.toml:2: kinds: unknown key`},
		{"unknown key in a column table", "[columns]\n\"Strom\" = { field = \"ifav\", unti = \"A\" }\n", `m.toml:2: columns.Strom.unti: unknown key`},
		{"unknown table", "[colums]\nx = \"vrrm\"\n", `m.toml:1: colums: unknown key`},
		{"unknown field", "[columns]\n\n\"Strom\" = \"ifavg\"\n", `m.toml:3: columns.Strom: unknown field "ifavg"`},
		{"unit of wrong dimension", "[columns]\nStrom = { field = \"ifav\", unit = \"V\" }\n", `m.toml:2: columns.Strom: unit "V" is a voltage, ifav wants a current`},
		{"unknown unit", "[columns]\nStrom = { field = \"ifav\", unit = \"furlong\" }\n", `unknown unit "furlong"`},
		{"bad pick", "[columns]\nUth = { field = \"vgs_th\", pick = \"biggest\" }\n", `pick "biggest"`},
		{"bad kind", "kind = \"resistor\"\n", `m.toml:1: kind: "resistor" is not diode, fuse or mosfet`},
		{"type of another kind", "kind = \"fuse\"\ntype = \"schottky\"\n", `m.toml:2: type: "schottky" is not a type of fuse`},
		{"bad currency", "currency = \"euro dollars\"\n", `m.toml:1: currency`},
		{"bad fuse_std", "fuse_std = \"din\"\n", `fuse_std: "din" is not iec, ul or blade`},
		{"negative header row", "header_row = -1\n", `header_row: must be 0`},
		{"constant of wrong dimension", "[constants]\nrdson_vgs = \"10 A\"\n", `m.toml:2: constants.rdson_vgs:`},
		{"unknown constant", "[constants]\nspeed_class = \"T\"\n", `unknown field "speed_class"`},
		{"kind as constant", "[constants]\nkind = \"diode\"\n", `kind cannot be a constant`},
		{"letters needed without header", "header_row = 0\n[columns]\n\"Part number\" = \"mpn\"\n", `column letters`},
		{"condition of another field", "[columns]\nX = { field = \"vf\", conditions = { rdson_vgs = \"10 V\" } }\n", `not a test condition of vf`},
		{"toml syntax", "kind = \n", `m.toml:1:`},
		{"wrong type", "header_row = \"three\"\n", `m.toml`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseMapping("m.toml", []byte(tc.toml))
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
	if _, err := ImportData(context.Background(), nil, "x.csv", []byte("a,b\n"), Options{MapFile: filepath.Join(t.TempDir(), "none.toml")}); err == nil || !strings.Contains(err.Error(), "none.toml") {
		t.Errorf("missing mapping file: %v", err)
	}
}

func TestMappingDocExample(t *testing.T) {
	// the example in MAPPING.md parses
	data, err := os.ReadFile("MAPPING.md")
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	i := strings.Index(text, "```toml\n")
	j := strings.Index(text[i+8:], "```")
	if i < 0 || j < 0 {
		t.Fatal("no toml example in MAPPING.md")
	}
	if _, err := ParseMapping("MAPPING.md", []byte(text[i+8:i+8+j])); err != nil {
		t.Errorf("MAPPING.md example: %v", err)
	}
}

func TestColumnLetters(t *testing.T) {
	for i, want := range map[int]string{0: "A", 25: "Z", 26: "AA", 27: "AB", 701: "ZZ", 702: "AAA"} {
		if got := columnLetter(i); got != want {
			t.Errorf("columnLetter(%d) = %s, want %s", i, got, want)
		}
		if got, ok := letterIndex(want); !ok || got != i {
			t.Errorf("letterIndex(%s) = %d", want, got)
		}
	}
}
