package importers

import (
	"os"
	"strings"
	"testing"
)

// FuzzParseMapping: arbitrary bytes as a mapping file never panic; an
// error names the file, and a parsed mapping recognises any header cell
// (named, lettered or neither) without panicking.
func FuzzParseMapping(f *testing.F) {
	f.Add([]byte(germanMap))
	f.Add([]byte("header_row = 0\nkind = \"mosfet\"\n[columns]\nA = \"mpn\"\nB = \"mfr\"\nD = { field = \"rdson\", unit = \"mΩ\", conditions = { rdson_vgs = \"10 V\" } }\n"))
	f.Add([]byte("[columns]\nUth = { field = \"vgs_th\", unit = \"V\", pick = \"upper\" }\n\"Preis 100\" = { field = \"price\", qty = 100, currency = \"EUR\" }\n"))
	f.Add([]byte("kind = \"fuse\"\ntype = \"FF\"\nfuse_std = \"iec\"\n[constants]\nin = \"2 A\"\nrohs = true\nun_dc = 1e300\n"))
	f.Add([]byte("header_row = 9223372036854775807\nsheet = \"\\u0000\"\nignore = [\"\", \"\\uFFFD\"]\n"))
	f.Add([]byte("[columns]\nX = { field = \"vf\", qty = -1, conditions = { vf_if = \"nan A\" } }\n"))
	f.Add([]byte("[constants]\nvrrm = \"inf V\"\nifav = nan\n"))
	if data, err := os.ReadFile("MAPPING.md"); err == nil {
		text := string(data)
		if i := strings.Index(text, "```toml\n"); i >= 0 {
			if j := strings.Index(text[i+8:], "```"); j >= 0 {
				f.Add([]byte(text[i+8 : i+8+j]))
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := ParseMapping("fuzz.toml", data)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz.toml") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		if m == nil {
			t.Fatal("nil mapping without an error")
		}
		rec := m.recognizer()
		for i, h := range []string{"", "Strom", "MPN", "VRRM (V)", "\xff\xfe", strings.Repeat("x", 300)} {
			rec(h, i)
		}
		for k := range m.columns {
			if c := rec(k, 0); c.Header != k && !m.HasRow {
				t.Fatalf("mapped header %q recognised as %+v", k, c)
			}
		}
	})
}
