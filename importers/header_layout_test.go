package importers

import (
	"context"
	"reflect"
	"strings"
	"testing"

	"partsieve/catalog"
)

func rows(lines ...string) []bufRow {
	var out []bufRow
	for i, l := range lines {
		if l == "" {
			continue
		}
		out = append(out, bufRow{cells: strings.Split(l, "|"), row: i + 1})
	}
	return out
}

func TestFindHeader(t *testing.T) {
	rec := (*Mapping)(nil).recognizer()
	for _, tc := range []struct {
		name    string
		rows    []bufRow
		headers string // joined with |
		next    int    // index of the first data row in rows
	}{
		{"first row", rows("MPN|Mfr|VRRM", "A1|Aldor|40"), "MPN|Mfr|VRRM", 1},
		{"titles and blank lines above", rows("Price list", "Valid 2024", "", "Mfr|Part number|VRRM (V)|IF(AV)", "Aldor|A1|40|1"), "Mfr|Part number|VRRM (V)|IF(AV)", 3},
		{"note rows that name one field are not enough", rows("Description: all parts RoHS", "Mfr|MPN|VF", "A|B|1"), "Mfr|MPN|VF", 2},
		{"needs a part number", rows("Mfr|VRRM|IF", "A|1|2"), "", 0},
		{"the best row wins", rows("Mfr|MPN", "Mfr|MPN|VRRM|IFAV|VF", "A|B|1|2|0.5"), "Mfr|MPN|VRRM|IFAV|VF", 2},
		{"two-row header, merges filled",
			rows("Part number|Manufacturer|V_F|V_F|I_R|I_R", "Part number|Manufacturer|max (V)|@ I_F (A)|max (µA)|@ V_R (V)", "B1|Bw|0.7|5|200|60"),
			"Part number|Manufacturer|V_F max (V)|V_F I_F (A)|I_R max (µA)|I_R V_R (V)", 2},
		{"two-row header, merges empty",
			rows("Part number|Manufacturer|V_F||RDS(on)|", "||max (V)|@ 125°C (V)|@ 10V (mΩ)|@ 4.5V (mΩ)", "B1|Bw|0.7|0.6|3|4"),
			"Part number|Manufacturer|V_F max (V)|V_F @ 125°C (V)|RDS(on) @ 10V (mΩ)|RDS(on) @ 4.5V (mΩ)", 2},
	} {
		t.Run(tc.name, func(t *testing.T) {
			h, next, ok := findHeader(tc.rows, rec)
			if tc.headers == "" {
				if ok {
					t.Fatalf("found header %q", h)
				}
				return
			}
			if !ok || strings.Join(h, "|") != tc.headers || next != tc.next {
				t.Errorf("header %q next %d ok %v, want %q next %d", strings.Join(h, "|"), next, ok, tc.headers, tc.next)
			}
		})
	}
}

func TestTwoRowHeaderLayout(t *testing.T) {
	h := joinHeaderRows(strings.Split("Part number|Manufacturer|V_F||I_R|", "|"), strings.Split("||max (V)|@ I_F (A)|max (µA)|@ V_R (V)", "|"))
	lo := buildLayout(h, (*Mapping)(nil).recognizer())
	var got []string
	for _, c := range lo.cols {
		got = append(got, c.Field+":"+c.Unit)
	}
	want := []string{"mpn:", "mfr:", "vf:V", "vf_if:A", "ir:µA", "ir_vr:V"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("fields %q, want %q", got, want)
	}
}

func TestBuildLayout(t *testing.T) {
	lo := buildLayout([]string{"MPN", "Mfr", "RDS(on) typ", "RDS(on) max", "VRRM (A)", "Vgs(th) min", "Colour",
		"Qty 1", "Price 1", "Qty 2", "Price 2", "Price 100", "ID @ 25°C", "ID @ 100°C"}, (*Mapping)(nil).recognizer())
	if lo.cols[2].Field != "" || lo.cols[3].Field != "rdson" {
		t.Errorf("typ/max: %q %q", lo.cols[2].Field, lo.cols[3].Field)
	}
	if lo.cols[4].Field != "" || lo.cols[5].Field != "" {
		t.Errorf("wrong unit / min kept: %q %q", lo.cols[4].Field, lo.cols[5].Field)
	}
	if !reflect.DeepEqual(lo.unknown, []string{"Colour"}) {
		t.Errorf("unknown %q", lo.unknown)
	}
	if len(lo.pairs) != 2 || lo.pairs[0] != (pricePair{qty: 7, price: 8}) || lo.pairs[1] != (pricePair{qty: 9, price: 10}) {
		t.Errorf("pairs %+v", lo.pairs)
	}
	if !reflect.DeepEqual(lo.prices, []int{11}) || lo.cols[11].Qty != 100 {
		t.Errorf("prices %v", lo.prices)
	}
	if lo.cols[12].Field != "id" || lo.cols[13].Field != "" {
		t.Errorf("ID columns: %q %q", lo.cols[12].Field, lo.cols[13].Field)
	}
	joined := strings.Join(lo.ignored, "\n")
	for _, w := range []string{"RDS(on) typ: typical value", `VRRM (A): unit "A"`, "Vgs(th) min: minimum value", "ID @ 100°C: another id column"} {
		if !strings.Contains(joined, w) {
			t.Errorf("ignored list lacks %q:\n%s", w, joined)
		}
	}
	// "Qty 10" alone is a price at 10 pieces
	lo = buildLayout([]string{"MPN", "Mfr", "Qty 1", "Qty 10"}, (*Mapping)(nil).recognizer())
	if len(lo.pairs) != 0 || !reflect.DeepEqual(lo.prices, []int{2, 3}) || lo.cols[3].Qty != 10 {
		t.Errorf("qty columns as prices: pairs %v prices %v", lo.pairs, lo.prices)
	}
	// a lone "Quantity" column is the stock
	lo = buildLayout([]string{"MPN", "Mfr", "Quantity"}, (*Mapping)(nil).recognizer())
	if lo.cols[2].Field != fStock {
		t.Errorf("lone quantity: %q", lo.cols[2].Field)
	}
}

// TestSheetStructure: titles, notes, section titles, repeated headers,
// blank gaps and footers around the data are skipped and never counted.
func TestSheetStructure(t *testing.T) {
	data := strings.Join([]string{
		"Quillfield Supply - stock list,,,",
		"Generated 2024-05-01,,,",
		",,,",
		"Mfr,MPN,VRRM (V),VZ (V)",
		"Zener diodes,,,",
		"Aldor,Z5V1,,5.1",
		"Aldor,Z12,,12",
		"TVS diodes,TVS diodes,TVS diodes,TVS diodes", // a merged title filled by the reader
		"Aldor,T1,,",
		"Mfr,MPN,VRRM (V),VZ (V)",
		"Schottky rectifiers,,,",
		"Aldor,S1,40,",
		",,,",
		"Notes:,,,",
		"1) values at 25 °C,,,",
		"Total,3,,",
		"Prices subject to change,,,",
	}, "\n")
	st := openStore(t)
	s, err := ImportData(context.Background(), st, "structure.csv", []byte(data), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Read != 4 || s.Added != 4 || s.Rejected != 0 {
		t.Fatalf("read %d added %d rejected %d %+v", s.Read, s.Added, s.Rejected, s.Rejects)
	}
	for mpn, typ := range map[string]string{"Z5V1": "zener", "Z12": "zener", "T1": "tvs", "S1": "schottky"} {
		p := getPart(t, st, "Aldor", mpn)
		if p.Kind != catalog.Diode || p.Type != typ {
			t.Errorf("%s: %s/%s, want diode/%s", mpn, p.Kind, p.Type, typ)
		}
	}
}

func TestFooterAfterGapLooksLikeData(t *testing.T) {
	data := "Mfr,MPN,VRRM\nAldor,A1,40\n\nAldor,A2,50\n\nsee also,our catalog,\n"
	s, err := ImportData(context.Background(), nil, "gap.csv", []byte(data), Options{Kind: catalog.Diode})
	if err != nil {
		t.Fatal(err)
	}
	if s.Read != 2 || s.Added != 2 {
		t.Errorf("read %d added %d, want 2 and 2 (the row after the second gap is a footer)", s.Read, s.Added)
	}
}
