package importers

import (
	"fmt"
	"reflect"
	"strings"
	"testing"

	"partsieve/catalog"
)

func TestWordsGuess(t *testing.T) {
	for _, tc := range []struct {
		text   string
		within catalog.Kind
		kind   catalog.Kind
		typ    string
	}{
		{"Schottky", "", catalog.Diode, "schottky"},
		{"SBD 40V 3A", "", catalog.Diode, "schottky"},
		{"Schottky rectifier", "", catalog.Diode, "schottky"},
		{"General purpose rectifier", "", catalog.Diode, "rectifier"},
		{"Ultrafast recovery diode", "", catalog.Diode, "rectifier"},
		{"Fast recovery rectifier", "", catalog.Diode, "rectifier"},
		{"Zener diode 5V1", "", catalog.Diode, "zener"},
		{"TVS", "", catalog.Diode, "tvs"},
		{"Transient voltage suppressor, unidirectional", "", catalog.Diode, "tvs"},
		{"ESD protection diode", "", catalog.Diode, "tvs"},
		{"Diode", "", catalog.Diode, ""},
		{"MOSFET", "", catalog.MOSFET, ""},
		{"P-channel MOSFET", "", catalog.MOSFET, "p"},
		{"P-Ch", "", catalog.MOSFET, "p"},
		{"PMOS", "", catalog.MOSFET, "p"},
		{"N-ch enhancement", "", catalog.MOSFET, "n"},
		{"NMOS", "", catalog.MOSFET, "n"},
		{"N-channel MOSFET with Schottky body diode", "", catalog.MOSFET, "n"},
		{"Dual N- and P-channel MOSFET", "", catalog.MOSFET, ""},
		{"Fuse", "", catalog.Fuse, ""},
		{"Slow-blow fuse", "", catalog.Fuse, "T"},
		{"Time-lag", "", catalog.Fuse, "T"},
		{"time delay", "", catalog.Fuse, "T"},
		{"Fast-acting", "", catalog.Fuse, "F"},
		{"Quick acting glass fuse", "", catalog.Fuse, "F"},
		{"Very fast-acting", "", catalog.Fuse, "FF"},
		{"Medium time-lag fuse", "", catalog.Fuse, "M"},
		{"Long time-lag fuse", "", catalog.Fuse, "TT"},
		{"fast", catalog.Fuse, catalog.Fuse, "F"},
		{"very fast", catalog.Fuse, catalog.Fuse, "FF"},
		{"fast", catalog.Diode, catalog.Diode, "rectifier"},
		{"fast", "", "", ""},
		{"FF", "", catalog.Fuse, "FF"},
		{"T", "", catalog.Fuse, "T"},
		{"TT", catalog.Fuse, catalog.Fuse, "TT"},
		{"P", "", catalog.MOSFET, "p"},
		{"N", catalog.MOSFET, catalog.MOSFET, "n"},
		{"T", catalog.Diode, "", ""},
		{"Blade fuse ATO", "", catalog.Fuse, ""},
		{"Resistor 1k", "", "", ""},
		{"", "", "", ""},
	} {
		g := wordsGuess(tc.text, tc.within)
		if g.kind != tc.kind || g.typ != tc.typ {
			t.Errorf("wordsGuess(%q, %q) = %s/%s, want %s/%s", tc.text, tc.within, g.kind, g.typ, tc.kind, tc.typ)
		}
	}
}

func TestDecideKind(t *testing.T) {
	txt := func(col, s string, exact bool) kindText {
		return kindText{column: col, text: s, exact: exact, typeCo: col == "Type"}
	}
	for _, tc := range []struct {
		name   string
		facts  kindFacts
		kind   catalog.Kind
		typ    string
		reason string
	}{
		{"--kind wins", kindFacts{fixed: catalog.Fuse, texts: []kindText{txt("Category", "diode", false)}}, catalog.Fuse, "", ""},
		{"--kind with type words", kindFacts{fixed: catalog.Fuse, texts: []kindText{txt("Description", "5x20 slow-blow", false)}}, catalog.Fuse, "T", ""},
		{"kind column", kindFacts{kindCell: "MOSFET", texts: []kindText{txt("Channel", "P", true)}}, catalog.MOSFET, "p", ""},
		{"kind column words", kindFacts{kindCell: "Schottky diodes"}, catalog.Diode, "", ""},
		{"bad kind column", kindFacts{kindCell: "capacitor"}, "", "", "diode, fuse or mosfet"},
		{"category words", kindFacts{texts: []kindText{txt("Category", "Zener diodes", false)}}, catalog.Diode, "zener", ""},
		{"speed letter column", kindFacts{texts: []kindText{txt("Speed", "TT", true)}}, catalog.Fuse, "TT", ""},
		{"letter in a description means nothing", kindFacts{texts: []kindText{txt("Description", "T", false)}, present: map[catalog.Kind][]string{catalog.Diode: {"VRRM"}}}, catalog.Diode, "", ""},
		{"section title", kindFacts{section: guess{catalog.Diode, "tvs"}}, catalog.Diode, "tvs", ""},
		{"fields hint: vds", kindFacts{present: map[catalog.Kind][]string{catalog.MOSFET: {"VDS"}}}, catalog.MOSFET, "", ""},
		{"fields hint: in and breaking", kindFacts{present: map[catalog.Kind][]string{catalog.Fuse: {"In", "Breaking"}}}, catalog.Fuse, "", ""},
		{"fields hint: vrrm", kindFacts{present: map[catalog.Kind][]string{catalog.Diode: {"VRRM"}}}, catalog.Diode, "", ""},
		{"fields tie", kindFacts{present: map[catalog.Kind][]string{catalog.Diode: {"VRRM"}, catalog.Fuse: {"In"}}}, "", "", noKindReason},
		{"nothing", kindFacts{}, "", "", noKindReason},
		{"diode with vz is a Zener", kindFacts{present: map[catalog.Kind][]string{catalog.Diode: {"VZ"}}, hasVZ: true}, catalog.Diode, "zener", ""},
		{"diode with TVS fields", kindFacts{present: map[catalog.Kind][]string{catalog.Diode: {"VRWM"}}, hasTVS: true}, catalog.Diode, "tvs", ""},
		{"negative MOSFET voltages", kindFacts{present: map[catalog.Kind][]string{catalog.MOSFET: {"VDS"}}, negative: true}, catalog.MOSFET, "p", ""},
		{"fuse marking", kindFacts{fixed: catalog.Fuse, desc: "Fuse 5x20 F 500mA L 250V"}, catalog.Fuse, "F", ""},
		{"fuse of unknown speed keeps no type", kindFacts{fixed: catalog.Fuse, desc: "Fuse 5x20 glass"}, catalog.Fuse, "", ""},
		{"mapping type as default", kindFacts{fixed: catalog.Diode, fixedType: "schottky"}, catalog.Diode, "schottky", ""},
		{"row words beat the mapping type", kindFacts{fixed: catalog.Diode, fixedType: "schottky", texts: []kindText{txt("Type", "Zener", true)}}, catalog.Diode, "zener", ""},
		{"words against fields", kindFacts{texts: []kindText{txt("Category", "fuse", false)}, present: map[catalog.Kind][]string{catalog.MOSFET: {"VDS"}}}, "", "", "fills mosfet columns (VDS)"},
		{"type of another kind", kindFacts{kindCell: "diode", texts: []kindText{txt("Type", "P", true)}}, "", "", "type p is a mosfet type"},
	} {
		k, typ, err := decideKind(tc.facts)
		switch {
		case tc.reason != "":
			if err == nil || !strings.Contains(err.reason, tc.reason) {
				t.Errorf("%s: got %s/%s %v, want error %q", tc.name, k, typ, err, tc.reason)
			}
		case err != nil:
			t.Errorf("%s: error %q", tc.name, err.reason)
		case k != tc.kind || typ != tc.typ:
			t.Errorf("%s: %s/%s, want %s/%s", tc.name, k, typ, tc.kind, tc.typ)
		}
	}
}

func TestFuseStd(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{"Cartridge fuse UL 248-14", "ul"},
		{"UL248", "ul"},
		{"IEC 60127-2/3", "iec"},
		{"5x20 mm per EN 60127", "iec"},
		{"UL and IEC 60127 approved", "ul"},
		{"Mini blade fuse", "blade"},
		{"ATO 10A", "blade"},
		{"Automotive fuse 32V", "blade"},
		{"SMD fuse 1206 automotive AEC-Q200", ""},
		{"ISO 8820-3", "blade"},
		{"glass fuse", ""},
	} {
		if got := fuseStd(tc.in); got != tc.want {
			t.Errorf("fuseStd(%q) = %q, want %q", tc.in, got, tc.want)
		}
	}
}

func TestValueWords(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want bool
		ok   bool
	}{
		{"Yes", true, true}, {"Y", true, true}, {"true", true, true}, {"1", true, true}, {"Compliant", true, true},
		{"RoHS compliant", true, true}, {"AEC-Q101", true, true}, {"✓", true, true},
		{"No", false, true}, {"n", false, true}, {"FALSE", false, true}, {"0", false, true}, {"Non-compliant", false, true},
		{"Not compliant", false, true}, {"maybe", false, false},
	} {
		got, err := parseBool(tc.in)
		if (err == nil) != tc.ok || (tc.ok && got != tc.want) {
			t.Errorf("parseBool(%q) = %v, %v; want %v ok %v", tc.in, got, err, tc.want, tc.ok)
		}
	}
	for _, tc := range []struct{ in, want string }{
		{"Active", "active"}, {"In production", "active"}, {"Not recommended for new designs", "nrnd"},
		{"NRND", "nrnd"}, {"Last time buy", "nrnd"}, {"EOL", "obsolete"}, {"Obsolete", "obsolete"},
		{"Discontinued", "obsolete"}, {"unknown", "unknown"}, {"Obsolete - use KM2", "obsolete"}, {"zombie", ""},
	} {
		got, err := parseLifecycle(tc.in)
		if got != tc.want || (err != nil) != (tc.want == "") {
			t.Errorf("parseLifecycle(%q) = %q, %v; want %q", tc.in, got, err, tc.want)
		}
	}
	for _, s := range []string{"", "-", "—", "N/A", "n/a", "NA", " -- "} {
		if !isAbsent(s) {
			t.Errorf("isAbsent(%q) = false", s)
		}
	}
	for _, s := range []string{"0", "x", "none?"} {
		if isAbsent(s) {
			t.Errorf("isAbsent(%q) = true", s)
		}
	}
	for _, tc := range []struct {
		in   string
		want int64
		ok   bool
	}{{"12,345", 12345, true}, {"12 345", 12345, true}, {"4.500", 4500, true}, {"> 1000", 1000, true}, {"5k", 5000, true}, {"0", 0, true}, {"1500.0", 1500, true}, {"lots", 0, false}, {"1,5", 0, false}} {
		got, err := parseCount(tc.in)
		if got != tc.want || (err == nil) != tc.ok {
			t.Errorf("parseCount(%q) = %d, %v; want %d ok %v", tc.in, got, err, tc.want, tc.ok)
		}
	}
	for _, tc := range []struct{ in, want string }{
		{"25:1, 65:0.9, 85:0.8", "25:1, 65:0.9, 85:0.8"},
		{"85:0,8; 25:1; 65:90%", "25:1, 65:0.9, 85:0.8"},
		{"25°C:1", "25:1"},
		{"25:3", ""}, {"hot", ""},
	} {
		got, err := parseRerate(tc.in)
		if got != tc.want || (err != nil) != (tc.want == "") {
			t.Errorf("parseRerate(%q) = %q, %v; want %q", tc.in, got, err, tc.want)
		}
		// the converter's memo gives the same, the second time too
		cv := &converter{}
		for range 2 {
			if got, err := cv.rerate(tc.in); got != tc.want || (err != nil) != (tc.want == "") {
				t.Errorf("converter.rerate(%q) = %q, %v; want %q", tc.in, got, err, tc.want)
			}
		}
	}
	// the memo keeps at most rerateMemo cells and stays right past them
	cv := &converter{}
	for i := range rerateMemo + 50 {
		in := fmt.Sprintf("85:0.8; 25:1; %d:0.9", 26+i%200)
		want, _ := parseRerate(in)
		if got, err := cv.rerate(in); err != nil || got != want || want == "" {
			t.Fatalf("converter.rerate(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	if len(cv.reratec) > rerateMemo {
		t.Errorf("memo holds %d cells, more than %d", len(cv.reratec), rerateMemo)
	}
	if _, err := cv.rerate("25:3"); err == nil {
		t.Error("a refused cell was accepted after the memo filled")
	}
}

func TestPrices(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want float64
		cur  string
		ok   bool
	}{
		{"0.42", 0.42, "", true}, {"0,42", 0.42, "", true}, {"€0.42", 0.42, "EUR", true}, {"0,42 EUR", 0.42, "EUR", true},
		{"$1.20", 1.2, "USD", true}, {"1,234.50", 1234.5, "", true}, {"1.234,50 €", 1234.5, "EUR", true}, {"£ 0.5", 0.5, "GBP", true},
		{"0", 0, "", false}, {"-0.1", 0, "", false}, {"free", 0, "", false}, {"1,2,3", 0, "", false},
	} {
		got, cur, err := parsePrice(tc.in)
		if (err == nil) != tc.ok || (tc.ok && (!near(got, tc.want) || cur != tc.cur)) {
			t.Errorf("parsePrice(%q) = %g %q %v; want %g %q ok %v", tc.in, got, cur, err, tc.want, tc.cur, tc.ok)
		}
	}
	for _, tc := range []struct {
		in   string
		want []catalog.PriceBreak
		cur  string
	}{
		{"1:0.50; 10:0.42; 100:0.31", breaks(1, 0.5, 10, 0.42, 100, 0.31), ""},
		{"1:0,50; 10:0,42", breaks(1, 0.5, 10, 0.42), ""},
		{"1+ 0.50 | 10+ 0.42", breaks(1, 0.5, 10, 0.42), ""},
		{"1-9: €0.50, 10-99: €0.42", breaks(1, 0.5, 10, 0.42), "EUR"},
		{"1000=0.25", breaks(1000, 0.25), ""},
		{"1k @ $0.2", breaks(1000, 0.2), "USD"},
	} {
		got, cur, err := parseBreaks(tc.in)
		if err != nil || cur != tc.cur || len(got) != len(tc.want) {
			t.Errorf("parseBreaks(%q) = %v %q %v; want %v %q", tc.in, got, cur, err, tc.want, tc.cur)
			continue
		}
		for i := range got {
			if got[i].Qty != tc.want[i].Qty || !near(got[i].Price, tc.want[i].Price) {
				t.Errorf("parseBreaks(%q) = %v, want %v", tc.in, got, tc.want)
			}
		}
	}
	for _, bad := range []string{"cheap", "0:0.5", "1:0", "1:€0.5; 10:$0.4"} {
		if _, _, err := parseBreaks(bad); err == nil {
			t.Errorf("parseBreaks(%q) accepted", bad)
		}
	}
	if _, err := sortBreaks(breaks(10, 0.4, 1, 0.5, 10, 0.3)); err == nil {
		t.Error("two prices for one quantity accepted")
	}
	if got, err := sortBreaks(breaks(10, 0.4, 1, 0.5, 10, 0.4)); err != nil || len(got) != 2 || got[0].Qty != 1 {
		t.Errorf("sortBreaks = %v, %v", got, err)
	}
	// in order already (the common case), and out of order
	for _, in := range [][]catalog.PriceBreak{breaks(1, 0.5, 10, 0.42, 100, 0.31), breaks(100, 0.31, 1, 0.5, 10, 0.42)} {
		got, err := sortBreaks(in)
		if want := breaks(1, 0.5, 10, 0.42, 100, 0.31); err != nil || !reflect.DeepEqual(got, want) {
			t.Errorf("sortBreaks = %v, %v; want %v", got, err, want)
		}
	}
	if _, err := sortBreaks(breaks(1, 0.5, 10, 0.4, 10, 0.3)); err == nil {
		t.Error("two prices for one quantity accepted when in order")
	}
}
