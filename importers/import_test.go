package importers

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math/rand"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"
	"testing"

	"partsieve/catalog"
)

func openStore(t testing.TB) *catalog.Store {
	t.Helper()
	st, err := catalog.Open(context.Background(), filepath.Join(t.TempDir(), "catalog.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st
}

func importFile(t *testing.T, st *catalog.Store, name string, opt Options) *Summary {
	t.Helper()
	s, err := ImportFile(context.Background(), st, filepath.Join("testdata", "import", name), opt)
	if err != nil {
		t.Fatalf("import %s: %v", name, err)
	}
	if s.Read != s.Added+s.Updated+s.Unchanged+s.Rejected {
		t.Errorf("%s: read %d != added %d + updated %d + unchanged %d + rejected %d", name, s.Read, s.Added, s.Updated, s.Unchanged, s.Rejected)
	}
	return s
}

func getPart(t *testing.T, st *catalog.Store, mfr, mpn string) *catalog.Part {
	t.Helper()
	ps, err := st.ByMPN(context.Background(), mpn)
	if err != nil {
		t.Fatal(err)
	}
	for i := range ps {
		if catalog.NormKey(ps[i].Mfr) == catalog.NormKey(mfr) {
			return &ps[i]
		}
	}
	t.Fatalf("part %s %s not in the catalog", mfr, mpn)
	return nil
}

// wantPart is the expected content of one imported part, values in base SI
// units (°C for temperatures).
type wantPart struct {
	mfr, mpn  string
	kind      catalog.Kind
	typ       string
	pkg       string
	fuseStd   string
	lifecycle string
	nums      map[string]float64
	offer     *catalog.Offer // the offer of the file's supplier; nil = none
}

func checkPart(t *testing.T, st *catalog.Store, w wantPart) {
	t.Helper()
	p := getPart(t, st, w.mfr, w.mpn)
	name := w.mfr + " " + w.mpn
	if p.Kind != w.kind || p.Type != w.typ {
		t.Errorf("%s: kind/type %s/%s, want %s/%s", name, p.Kind, p.Type, w.kind, w.typ)
	}
	if p.Package != w.pkg || p.FuseStd != w.fuseStd || p.Lifecycle != w.lifecycle {
		t.Errorf("%s: package/fuse_std/lifecycle %q/%q/%q, want %q/%q/%q", name, p.Package, p.FuseStd, p.Lifecycle, w.pkg, w.fuseStd, w.lifecycle)
	}
	checkNums(t, name, p, w.nums)
	if w.offer == nil {
		if len(p.Offers) != 0 {
			t.Errorf("%s: offers %+v, want none", name, p.Offers)
		}
		return
	}
	for _, o := range p.Offers {
		if o.Supplier == w.offer.Supplier {
			if !reflect.DeepEqual(o, *w.offer) {
				t.Errorf("%s: offer\n got %+v\nwant %+v", name, o, *w.offer)
			}
			return
		}
	}
	t.Errorf("%s: no offer from %s in %+v", name, w.offer.Supplier, p.Offers)
}

func breaks(qp ...float64) []catalog.PriceBreak {
	var out []catalog.PriceBreak
	for i := 0; i+1 < len(qp); i += 2 {
		out = append(out, catalog.PriceBreak{Qty: int64(qp[i]), Price: qp[i+1]})
	}
	return out
}

// TestImportSpreadsheets imports each fixture into a new catalog and checks
// the counts and every recognisable value of sample parts in SI units.
func TestImportSpreadsheets(t *testing.T) {
	cases := []struct {
		file    string
		opt     Options
		read    int
		added   int
		rejects []int // sheet rows refused
		sheets  []string
		skipped []string
		parts   []wantPart
	}{
		{
			file: "diodes_symbols.csv", opt: Options{Supplier: "Nordhafen Parts"}, read: 4, added: 4, sheets: []string{""},
			parts: []wantPart{
				{mfr: "Aldor Semiconductor", mpn: "ASB340", kind: catalog.Diode, typ: "schottky", pkg: "SMC",
					nums:  map[string]float64{"vrrm": 40, "ifav": 3, "ifsm": 80, "vf": 0.5, "vf_if": 3, "ir": 500e-6, "ir_vr": 40, "tjmax": 125},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", Stock: ptr(int64(1200)), Currency: "EUR", Breaks: breaks(1, 0.32, 10, 0.25, 100, 0.18)}},
				{mfr: "Brightwater Devices", mpn: "BU4006", kind: catalog.Diode, typ: "rectifier", pkg: "DO-201AD",
					nums:  map[string]float64{"vrrm": 600, "ifav": 4, "ifsm": 150, "vf": 1.3, "vf_if": 4, "ir": 10e-6, "ir_vr": 600, "tjmax": 175},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", Stock: ptr(int64(0)), Currency: "EUR", Breaks: breaks(1, 0.22, 10, 0.18, 100, 0.14)}},
			},
		},
		{
			file: "mosfets_words.csv", read: 4, added: 4, sheets: []string{""},
			parts: []wantPart{
				{mfr: "Kestrel Microsystems", mpn: "KM30P06", kind: catalog.MOSFET, typ: "p", pkg: "SOT-23", lifecycle: "active",
					nums: map[string]float64{"vds": 30, "vgs_max": 20, "vgs_th": 2.5, "rdson": 0.06, "rdson_vgs": 10, "rdson2": 0.085, "rdson2_vgs": 4.5, "id": 3.6, "qg": 8.5e-9}},
				{mfr: "Kestrel Microsystems", mpn: "KM20N03L", kind: catalog.MOSFET, typ: "n", pkg: "SOT-23", lifecycle: "nrnd",
					nums: map[string]float64{"vds": 20, "vgs_max": 12, "vgs_th": 1, "rdson": 0.025, "rdson_vgs": 10, "rdson2": 0.032, "rdson2_vgs": 4.5, "id": 6, "qg": 5e-9}},
				{mfr: "Orchard Electronics", mpn: "OE40P20", kind: catalog.MOSFET, typ: "p", pkg: "DPAK", lifecycle: "obsolete",
					nums: map[string]float64{"vds": 40, "vgs_max": 20, "vgs_th": 3, "rdson": 0.02, "rdson_vgs": 10, "id": 30, "qg": 45e-9}},
			},
		},
		{
			file: "fuses_semicolon.csv", opt: Options{Supplier: "Nordhafen Parts"}, read: 5, added: 5, sheets: []string{""},
			parts: []wantPart{
				{mfr: "Lumen Fuseworks", mpn: "LF520-T2A", kind: catalog.Fuse, typ: "T", fuseStd: "iec",
					nums:  map[string]float64{"in": 2, "un_ac": 250, "breaking": 1500, "i2t": 12.5, "rcold": 0.048},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", Stock: ptr(int64(4500)), Currency: "EUR", Breaks: breaks(1, 0.21, 10, 0.17)}},
				{mfr: "Lumen Fuseworks", mpn: "LB-ATO-15", kind: catalog.Fuse, fuseStd: "blade",
					nums:  map[string]float64{"in": 15, "un_dc": 32, "breaking": 1000, "i2t": 260, "rcold": 0.0049},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", Stock: ptr(int64(800)), Currency: "EUR", Breaks: breaks(1, 0.09, 10, 0.07)}},
				{mfr: "Lumen Fuseworks", mpn: "LU-3AG-5", kind: catalog.Fuse, typ: "F", fuseStd: "ul",
					nums:  map[string]float64{"in": 5, "un_ac": 125, "un_dc": 125, "breaking": 10000, "i2t": 9.8, "rcold": 0.022},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", Stock: ptr(int64(0)), Currency: "EUR", Breaks: breaks(1, 0.35, 10, 0.29)}},
				{mfr: "Lumen Fuseworks", mpn: "LF520-M1", kind: catalog.Fuse, typ: "M", fuseStd: "iec",
					nums:  map[string]float64{"in": 1, "un_ac": 250, "breaking": 35, "i2t": 1.1, "rcold": 0.21},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", Stock: ptr(int64(2000)), Currency: "EUR", Breaks: breaks(1, 0.19, 10, 0.16)}},
			},
		},
		{
			file: "mixed_kinds.csv", read: 6, added: 5, rejects: []int{7}, sheets: []string{""},
			parts: []wantPart{
				{mfr: "Aldor Semiconductor", mpn: "ASB340", kind: catalog.Diode, typ: "schottky", nums: map[string]float64{"vrrm": 40, "ifav": 3},
					offer: &catalog.Offer{Supplier: "Quillfield Supply", MOQ: 1, Currency: "USD", Breaks: breaks(1, 0.35, 100, 0.21)}},
				{mfr: "Aldor Semiconductor", mpn: "AZ5V1", kind: catalog.Diode, typ: "zener", nums: map[string]float64{"vz": 5.1, "pd": 0.5},
					offer: &catalog.Offer{Supplier: "Quillfield Supply", MOQ: 10, Currency: "USD", Breaks: breaks(10, 0.04, 1000, 0.02)}},
				{mfr: "Orchard Electronics", mpn: "OT15A", kind: catalog.Diode, typ: "tvs", nums: map[string]float64{"vrwm": 15, "ppk": 600},
					offer: &catalog.Offer{Supplier: "Quillfield Supply", MOQ: 1, Currency: "USD", Breaks: breaks(1, 0.30)}},
				{mfr: "Kestrel Microsystems", mpn: "KM30P06", kind: catalog.MOSFET, typ: "p", nums: map[string]float64{"vds": 30, "id": 3.6, "pd": 1.4},
					offer: &catalog.Offer{Supplier: "Quillfield Supply", MOQ: 1, Currency: "USD", Breaks: breaks(1, 0.15, 1000, 0.06)}},
				{mfr: "Lumen Fuseworks", mpn: "LF520-T2A", kind: catalog.Fuse, typ: "T", nums: map[string]float64{"un_ac": 250, "in": 2},
					offer: &catalog.Offer{Supplier: "Quillfield Supply", MOQ: 10, Currency: "USD", Breaks: breaks(10, 0.25, 100, 0.19)}},
			},
		},
		{
			file: "breaks_cell.csv", read: 2, added: 2, sheets: []string{""},
			parts: []wantPart{
				{mfr: "Aldor Semiconductor", mpn: "AR1004", kind: catalog.Diode, typ: "rectifier", nums: map[string]float64{"vrrm": 400, "ifav": 1, "vf": 1.1, "vf_if": 1},
					offer: &catalog.Offer{Supplier: "Nordhafen Parts", SKU: "NP-AR1004", Stock: ptr(int64(31000)), Currency: "EUR", Breaks: breaks(1, 0.05, 10, 0.04, 100, 0.028)}},
			},
		},
		{
			file: "bad_rows.csv", read: 10, added: 2, rejects: []int{3, 4, 5, 6, 7, 8, 9, 10}, sheets: []string{""},
			parts: []wantPart{
				{mfr: "Aldor Semiconductor", mpn: "GOOD2", kind: catalog.Diode, typ: "rectifier", nums: map[string]float64{"vrrm": 100, "ifav": 1, "vf": 1, "tjmax": 150},
					offer: &catalog.Offer{Supplier: "bad_rows.csv", Currency: "EUR", Breaks: breaks(1, 0.05)}},
			},
		},
		{
			file: "excelize_book.xlsx", read: 6, added: 6, sheets: []string{"Diodes", "Fuses"}, skipped: []string{"Read me"},
			parts: []wantPart{
				{mfr: "Brightwater Devices", mpn: "BS560", kind: catalog.Diode, typ: "schottky", pkg: "SMC",
					nums:  map[string]float64{"vrrm": 60, "ifav": 5, "vf": 0.7, "vf_if": 5, "ir": 200e-6, "ir_vr": 60},
					offer: &catalog.Offer{Supplier: "excelize_book.xlsx", Currency: "USD", Breaks: breaks(1, 0.38, 100, 0.21)}},
				{mfr: "Brightwater Devices", mpn: "BZ12", kind: catalog.Diode, typ: "zener", pkg: "SOD-123",
					nums:  map[string]float64{"vz": 12, "vf": 0.9, "vf_if": 0.01},
					offer: &catalog.Offer{Supplier: "excelize_book.xlsx", Currency: "USD", Breaks: breaks(1, 0.03, 100, 0.015)}},
				{mfr: "Lumen Fuseworks", mpn: "LS1206-3", kind: catalog.Fuse, typ: "FF",
					nums:  map[string]float64{"in": 3, "un_dc": 63, "breaking": 50, "i2t": 0.35},
					offer: &catalog.Offer{Supplier: "excelize_book.xlsx", Stock: ptr(int64(5000))}},
				{mfr: "Lumen Fuseworks", mpn: "LS1206-1", kind: catalog.Fuse, typ: "F",
					nums:  map[string]float64{"in": 1, "un_dc": 63, "breaking": 50, "i2t": 0.042},
					offer: &catalog.Offer{Supplier: "excelize_book.xlsx", Stock: ptr(int64(12000))}},
			},
		},
		{
			file: "libreoffice_mosfets.xlsx", read: 3, added: 3, sheets: []string{"mosfets_lo"},
			parts: []wantPart{
				{mfr: "Kestrel Microsystems", mpn: "KM100N08", kind: catalog.MOSFET, typ: "n", pkg: "TO-220",
					nums: map[string]float64{"vds": 100, "vgs_max": 20, "vgs_th": 4, "rdson": 0.008, "rdson_vgs": 10, "id": 80, "qg": 68e-9, "tjmax": 175}},
				{mfr: "Kestrel Microsystems", mpn: "KM30P06", kind: catalog.MOSFET, typ: "p", pkg: "SOT-23",
					nums: map[string]float64{"vds": 30, "vgs_max": 20, "vgs_th": 2.5, "rdson": 0.06, "rdson_vgs": 10, "rdson2": 0.085, "rdson2_vgs": 4.5, "id": 3.6, "qg": 8.5e-9, "tjmax": 150}},
				{mfr: "Kestrel Microsystems", mpn: "KM40N02L", kind: catalog.MOSFET, typ: "n", pkg: "PowerPAK 5x6",
					nums: map[string]float64{"vds": 40, "vgs_max": 12, "vgs_th": 1.2, "rdson": 0.0035, "rdson_vgs": 10, "rdson2": 0.0049, "rdson2_vgs": 4.5, "id": 120, "qg": 41e-9, "tjmax": 175}},
			},
		},
	}
	for _, tc := range cases {
		t.Run(tc.file, func(t *testing.T) {
			st := openStore(t)
			s := importFile(t, st, tc.file, tc.opt)
			if s.Read != tc.read || s.Added != tc.added || s.Rejected != len(tc.rejects) {
				t.Errorf("read/added/rejected %d/%d/%d, want %d/%d/%d; rejects %+v", s.Read, s.Added, s.Rejected, tc.read, tc.added, len(tc.rejects), s.Rejects)
			}
			var rows []int
			for _, r := range s.Rejects {
				rows = append(rows, r.Row)
				if r.File == "" || r.Reason == "" || r.Column == "" {
					t.Errorf("incomplete reject %+v", r)
				}
			}
			if !reflect.DeepEqual(rows, tc.rejects) && len(tc.rejects)+len(rows) > 0 {
				t.Errorf("rejected rows %v, want %v", rows, tc.rejects)
			}
			if len(s.Unknown) != 0 {
				t.Errorf("unknown columns %q", s.Unknown)
			}
			if !reflect.DeepEqual(s.Sheets, tc.sheets) || !reflect.DeepEqual(s.Skipped, tc.skipped) {
				t.Errorf("sheets %q skipped %q, want %q %q", s.Sheets, s.Skipped, tc.sheets, tc.skipped)
			}
			for _, w := range tc.parts {
				checkPart(t, st, w)
			}
			stats, err := st.Stats(context.Background())
			if err != nil {
				t.Fatal(err)
			}
			if stats.Parts != tc.added {
				t.Errorf("catalog holds %d parts, want %d", stats.Parts, tc.added)
			}
		})
	}
}

func TestReimportIsUnchanged(t *testing.T) {
	st := openStore(t)
	for _, f := range []string{"diodes_symbols.csv", "excelize_book.xlsx"} {
		first := importFile(t, st, f, Options{})
		again := importFile(t, st, f, Options{})
		if again.Added != 0 || again.Updated != 0 || again.Unchanged != first.Read-first.Rejected || len(again.Changes) != 0 {
			t.Errorf("%s again: added %d updated %d unchanged %d changes %v, want all %d unchanged", f, again.Added, again.Updated, again.Unchanged, again.Changes, first.Read)
		}
	}
}

func TestDuplicateRowIsUnchanged(t *testing.T) {
	data := "Mfr,MPN,Type,VRRM\nAldor,D1,schottky,40\nAldor,D1,schottky,40\nAldor,D-1,Schottky,40 V\n"
	st := openStore(t)
	s, err := ImportData(context.Background(), st, "dup.csv", []byte(data), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Read != 3 || s.Added != 1 || s.Unchanged != 2 {
		t.Errorf("read/added/unchanged %d/%d/%d, want 3/1/2", s.Read, s.Added, s.Unchanged)
	}
}

func TestSecondSupplierAddsOffer(t *testing.T) {
	st := openStore(t)
	importFile(t, st, "diodes_symbols.csv", Options{Supplier: "Nordhafen Parts"})
	s := importFile(t, st, "mixed_kinds.csv", Options{})
	if s.Updated != 1 || s.Added != 4 {
		t.Errorf("updated %d added %d, want ASB340 updated (a new offer) and 4 added", s.Updated, s.Added)
	}
	p := getPart(t, st, "Aldor Semiconductor", "ASB340")
	var sup []string
	for _, o := range p.Offers {
		sup = append(sup, o.Supplier)
	}
	sort.Strings(sup)
	if !reflect.DeepEqual(sup, []string{"Nordhafen Parts", "Quillfield Supply"}) {
		t.Errorf("ASB340 offers from %q, want both suppliers", sup)
	}
	// the first file's values are kept
	checkNums(t, "ASB340", p, map[string]float64{"vrrm": 40, "ifav": 3, "ifsm": 80, "vf": 0.5, "vf_if": 3, "ir": 500e-6, "ir_vr": 40, "tjmax": 125})
}

func TestUpdatedValuesAreReported(t *testing.T) {
	st := openStore(t)
	importFile(t, st, "diodes_symbols.csv", Options{Source: "list"})
	s := importFile(t, st, "diodes_symbols_v2.csv", Options{Source: "list"})
	if s.Updated != 1 || s.Unchanged != 3 {
		t.Fatalf("updated %d unchanged %d, want 1 and 3", s.Updated, s.Unchanged)
	}
	got := map[string]bool{}
	for _, c := range s.Changes {
		if c.MPN != "ASB340" {
			t.Errorf("change on %s: %+v", c.MPN, c)
		}
		got[c.Field] = true
	}
	for _, f := range []string{"ifsm", "vf", "tjmax"} {
		if !got[f] {
			t.Errorf("change of %s not reported (changes %+v)", f, s.Changes)
		}
	}
	p := getPart(t, st, "Aldor Semiconductor", "ASB340")
	checkNums(t, "ASB340", p, map[string]float64{"vrrm": 40, "ifav": 3, "ifsm": 100, "vf": 0.48, "vf_if": 3, "ir": 500e-6, "ir_vr": 40, "tjmax": 150})
}

// catalogState captures what a test can see of the catalog.
func catalogState(t *testing.T, st *catalog.Store) (catalog.Stats, []catalog.Part, []catalog.Source) {
	t.Helper()
	ctx := context.Background()
	stats, err := st.Stats(ctx)
	if err != nil {
		t.Fatal(err)
	}
	parts, err := st.Find(ctx, catalog.Query{Sort: "mpn", Offers: true})
	if err != nil {
		t.Fatal(err)
	}
	srcs, err := st.Sources(ctx)
	if err != nil {
		t.Fatal(err)
	}
	return stats, parts, srcs
}

func sameState(t *testing.T, st *catalog.Store, stats catalog.Stats, parts []catalog.Part, srcs []catalog.Source) {
	t.Helper()
	s2, p2, src2 := catalogState(t, st)
	s2.IndexOK, stats.IndexOK = true, true
	if !reflect.DeepEqual(stats, s2) {
		t.Errorf("stats changed: %+v -> %+v", stats, s2)
	}
	if !reflect.DeepEqual(parts, p2) {
		t.Errorf("parts changed: %d -> %d parts", len(parts), len(p2))
	}
	if !reflect.DeepEqual(srcs, src2) {
		t.Errorf("sources changed: %+v -> %+v", srcs, src2)
	}
}

func TestDryRunChangesNothing(t *testing.T) {
	st := openStore(t)
	importFile(t, st, "diodes_symbols.csv", Options{})
	stats, parts, srcs := catalogState(t, st)
	s := importFile(t, st, "mixed_kinds.csv", Options{DryRun: true})
	if !s.DryRun || s.Added != 4 || s.Updated != 1 || s.Rejected != 1 {
		t.Errorf("dry run: dry %v added %d updated %d rejected %d, want true 4 1 1", s.DryRun, s.Added, s.Updated, s.Rejected)
	}
	sameState(t, st, stats, parts, srcs)
}

// TestBrokenFiles: a file that cannot be read fails with an error naming
// the file and leaves the catalog exactly as it was.
func TestBrokenFiles(t *testing.T) {
	good, err := os.ReadFile("testdata/import/excelize_book.xlsx")
	if err != nil {
		t.Fatal(err)
	}
	rnd := make([]byte, 4096)
	rand.New(rand.NewSource(1)).Read(rnd)
	st := openStore(t)
	importFile(t, st, "diodes_symbols.csv", Options{})
	stats, parts, srcs := catalogState(t, st)
	for _, tc := range []struct {
		name string
		data []byte
		want string
	}{
		{"truncated.xlsx", good[:len(good)/2], "truncated.xlsx"},
		{"random.xlsx", rnd, "random.xlsx"},
		{"random.csv", rnd, "random.csv"},
		{"empty.csv", nil, "empty"},
		{"spaces.csv", []byte("  \n\n \r\n"), "spaces.csv"},
		{"no_header.csv", []byte("a,b,c\n1,2,3\n"), "no header row"},
		{"title_only.csv", []byte("Price list 2024\n"), "no header row"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), tc.name)
			if err := os.WriteFile(path, tc.data, 0o644); err != nil {
				t.Fatal(err)
			}
			_, err := ImportFile(context.Background(), st, path, Options{})
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.Contains(err.Error(), tc.name) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not name the file and %q", err, tc.want)
			}
			sameState(t, st, stats, parts, srcs)
		})
	}
	if _, err := ImportFile(context.Background(), st, filepath.Join(t.TempDir(), "missing.csv"), Options{}); err == nil || !strings.Contains(err.Error(), "missing.csv") {
		t.Errorf("missing file: %v", err)
	}
}

// failingBook serves rows and then a read error, as a file cut short in
// the middle does.
type failingBook struct{ rows [][]string }

func (b *failingBook) Format() string   { return "csv" }
func (b *failingBook) Sheets() []string { return []string{""} }
func (b *failingBook) Close() error     { return nil }
func (b *failingBook) Table(string) (Table, error) {
	return &failingTable{rows: b.rows}, nil
}

type failingTable struct {
	rows [][]string
	i    int
}

func (t *failingTable) Next() ([]string, int, error) {
	if t.i >= len(t.rows) {
		return nil, 0, &FileError{File: "cut.csv", Row: t.i + 1, Kind: ErrRead, Err: io.ErrUnexpectedEOF}
	}
	t.i++
	return t.rows[t.i-1], t.i, nil
}
func (t *failingTable) Close() error { return nil }

func TestReadErrorMidFileRollsBack(t *testing.T) {
	st := openStore(t)
	importFile(t, st, "diodes_symbols.csv", Options{})
	stats, parts, srcs := catalogState(t, st)
	defer func(f func(string, io.ReaderAt, int64) (Book, error)) { openBook = f }(openBook)
	openBook = func(string, io.ReaderAt, int64) (Book, error) {
		return &failingBook{rows: [][]string{{"Mfr", "MPN", "VRRM"}, {"Aldor", "NEW1", "40"}, {"Aldor", "NEW2", "50"}}}, nil
	}
	_, err := ImportData(context.Background(), st, "cut.csv", []byte("x"), Options{Kind: catalog.Diode})
	if err == nil || !strings.Contains(err.Error(), "cut.csv") || !strings.Contains(err.Error(), "after row 3") {
		t.Fatalf("error %v, want one naming cut.csv and row 3", err)
	}
	if !errors.Is(err, ErrRead) {
		t.Errorf("error %v does not wrap the reader's kind", err)
	}
	sameState(t, st, stats, parts, srcs)
}

func TestSheetOption(t *testing.T) {
	st := openStore(t)
	s := importFile(t, st, "excelize_book.xlsx", Options{Sheet: "Fuses"})
	if s.Read != 2 || !reflect.DeepEqual(s.Sheets, []string{"Fuses"}) {
		t.Errorf("read %d sheets %q, want 2 rows of Fuses", s.Read, s.Sheets)
	}
	_, err := ImportFile(context.Background(), st, "testdata/import/excelize_book.xlsx", Options{Sheet: "Nope"})
	if err == nil || !strings.Contains(err.Error(), `"Nope"`) || !strings.Contains(err.Error(), `"Diodes"`) {
		t.Errorf("unknown sheet: %v", err)
	}
}

func TestRejectsCSV(t *testing.T) {
	s, err := ImportFile(context.Background(), nil, "testdata/import/bad_rows.csv", Options{})
	if err != nil {
		t.Fatal(err)
	}
	s.Rejects = append(s.Rejects, Reject{File: "x.csv", Row: 99, Column: "=cmd", Raw: "+1", Reason: "@SUM(A1)"}, Reject{File: "x.csv", Row: 100, Column: "a,b", Raw: "say \"hi\"\nthere", Reason: "-"})
	var buf bytes.Buffer
	if err := WriteRejectsCSV(&buf, s.Rejects); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(recs[0], []string{"file", "sheet", "row", "column", "raw", "reason"}) {
		t.Errorf("header %q", recs[0])
	}
	if len(recs) != len(s.Rejects)+1 {
		t.Fatalf("%d records for %d rejects", len(recs), len(s.Rejects))
	}
	if got := recs[1]; got[0] != "testdata/import/bad_rows.csv" || got[2] != "3" || got[3] != "VRRM (V)" || got[4] != "3 A" || !strings.Contains(got[5], "voltage") {
		t.Errorf("first reject %q", got)
	}
	n := len(recs)
	if got := recs[n-2]; !reflect.DeepEqual(got, []string{"x.csv", "", "99", "'=cmd", "'+1", "'@SUM(A1)"}) {
		t.Errorf("formula cells not neutralised: %q", got)
	}
	if got := recs[n-1]; !reflect.DeepEqual(got, []string{"x.csv", "", "100", "a,b", "say \"hi\"\nthere", "'-"}) {
		t.Errorf("quoting: %q", got)
	}
}

// TestCheckOnly: without a store the file is checked and counted, and
// identical repeated rows are unchanged.
func TestCheckOnly(t *testing.T) {
	s := importFileNil(t, "mixed_kinds.csv")
	if !s.DryRun || s.Read != 6 || s.Added != 5 || s.Rejected != 1 {
		t.Errorf("check only: %+v", s)
	}
}

func importFileNil(t *testing.T, name string) *Summary {
	t.Helper()
	s, err := ImportFile(context.Background(), nil, filepath.Join("testdata", "import", name), Options{})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// FuzzImportCSV: arbitrary bytes through ImportData (check only) never
// panic; the counts add up and every reject names a row and a reason.
func FuzzImportCSV(f *testing.F) {
	for _, name := range []string{"diodes_symbols.csv", "mosfets_words.csv", "fuses_semicolon.csv", "mixed_kinds.csv", "bad_rows.csv", "breaks_cell.csv"} {
		data, err := os.ReadFile(filepath.Join("testdata", "import", name))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte("Mfr,MPN,VRRM\n,,\n\"a\"\"b\",c,-\n"))
	f.Add([]byte("\xef\xbb\xbfMfr;MPN;Type;VF @ 1A\nA;B;schottky;0,5\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ImportData(context.Background(), nil, "fuzz.csv", data, Options{})
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.csv") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		if s.Read != s.Added+s.Updated+s.Unchanged+s.Rejected || s.Rejected != len(s.Rejects) {
			t.Fatalf("counts do not add up: %+v", s)
		}
		for _, r := range s.Rejects {
			if r.Row < 1 || r.Reason == "" {
				t.Fatalf("bad reject %+v", r)
			}
		}
	})
}

// refusingSink refuses every part as the store refuses an invalid one.
type refusingSink struct{ *checkSink }

func (refusingSink) Put(*catalog.Part) (catalog.Outcome, []catalog.Change, error) {
	return 0, nil, fmt.Errorf("part X: %w", catalog.ErrInvalidPart)
}

// failingSink fails as a broken database does.
type failingSink struct{ *checkSink }

func (failingSink) Put(*catalog.Part) (catalog.Outcome, []catalog.Change, error) {
	return 0, nil, errors.New("catalog c.db: disk I/O error")
}

func TestStoreRefusals(t *testing.T) {
	data, err := os.ReadFile("testdata/import/diodes_symbols.csv")
	if err != nil {
		t.Fatal(err)
	}
	run := func(out sink) (*Summary, error) {
		rn, err := sheetRun(t, context.Background(), "d.csv", data, out)
		return rn.sum, err
	}
	s, err := run(refusingSink{&checkSink{}})
	if err != nil || len(s.Rejects) != 4 || !strings.Contains(s.Rejects[0].Reason, "the catalog refused the part") {
		t.Errorf("refused parts: %v %+v", err, s)
	}
	if _, err := run(failingSink{&checkSink{}}); err == nil || !strings.Contains(err.Error(), "d.csv, row 5") || !strings.Contains(err.Error(), "disk I/O") {
		t.Errorf("database failure: %v", err)
	}
}
