package importers

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"partsieve/catalog"
)

// newConverter builds the converter of a sheet with the given header row.
func newConverter(headers []string, fixed catalog.Kind) *converter {
	lo := buildLayout(headers, (*Mapping)(nil).recognizer())
	return &converter{lo: lo, fixed: fixed, supplier: "sheet-label"}
}

func near(a, b float64) bool {
	return math.Abs(a-b) <= 1e-9*math.Max(math.Abs(a), math.Abs(b))
}

// checkNums compares p.Num with want exactly in keys and within 1e-9 in
// values.
func checkNums(t *testing.T, name string, p *catalog.Part, want map[string]float64) {
	t.Helper()
	for k, v := range want {
		got, ok := p.Num[k]
		if !ok {
			t.Errorf("%s: %s missing, want %g", name, k, v)
			continue
		}
		if !near(got, v) {
			t.Errorf("%s: %s = %g, want %g", name, k, got, v)
		}
	}
	for k, v := range p.Num {
		if _, ok := want[k]; !ok {
			t.Errorf("%s: unexpected %s = %g", name, k, v)
		}
	}
}

func TestConvertGoodRows(t *testing.T) {
	yes, no := true, false
	cases := []struct {
		name    string
		headers []string
		cells   []string
		kind    catalog.Kind // --kind
		want    catalog.Part // Kind, Type, Mfr, MPN, text fields
		nums    map[string]float64
		offer   *catalog.Offer
	}{
		{
			name:    "schottky with units in headers and test conditions",
			headers: []string{"Mfr", "Part number", "Description", "VRRM (V)", "IF(AV) (A)", "VF max @ 1A (V)", "IR @ VR (µA)", "Tj (°C)", "Package"},
			cells:   []string{"Aldor Semi", "ALS1-40X", "Schottky barrier rectifier 1 A 40 V", "40", "1", "0.55", "500", "-55 to 125", "DO-41"},
			want:    catalog.Part{Kind: catalog.Diode, Type: "schottky", Mfr: "Aldor Semi", MPN: "ALS1-40X", Desc: "Schottky barrier rectifier 1 A 40 V", Package: "DO-41"},
			nums:    map[string]float64{"vrrm": 40, "ifav": 1, "vf": 0.55, "vf_if": 1, "ir": 500e-6, "ir_vr": 40, "tjmax": 125},
		},
		{
			name:    "units in cells, decimal comma, VF @ IF takes the rated current",
			headers: []string{"Hersteller / Manufacturer", "MPN", "Type", "Vrrm", "Io", "VF @ IF", "IFSM"},
			cells:   []string{"Brightwater", "UF4004-B", "Ultrafast", "400 V", "1,0 A", "1,7 V", "30A"},
			want:    catalog.Part{Kind: catalog.Diode, Type: "rectifier", Mfr: "Brightwater", MPN: "UF4004-B"},
			nums:    map[string]float64{"vrrm": 400, "ifav": 1, "vf": 1.7, "vf_if": 1, "ifsm": 30},
		},
		{
			name:    "P-channel MOSFET written negative is stored as magnitudes",
			headers: []string{"Maker", "Part no.", "Channel", "VDS (V)", "VGS (V)", "VGS(th) (V)", "ID (A)", "RDS(on) max @ 10V (mΩ)", "RDS(on) max @ 4.5V (mΩ)", "Qg (nC)"},
			cells:   []string{"Kestrel Devices", "KP3401", "P-ch", "-30", "±20", "-1 to -2.5", "-4.2", "45", "62", "12,5"},
			want:    catalog.Part{Kind: catalog.MOSFET, Type: "p", Mfr: "Kestrel Devices", MPN: "KP3401"},
			nums:    map[string]float64{"vds": 30, "vgs_max": 20, "vgs_th": 2.5, "id": 4.2, "rdson": 0.045, "rdson_vgs": 10, "rdson2": 0.062, "rdson2_vgs": 4.5, "qg": 12.5e-9},
		},
		{
			name:    "negative voltages alone tell a P-channel part",
			headers: []string{"Mfr", "MPN", "Vds", "Rdson (Ω)", "Id"},
			cells:   []string{"Kestrel Devices", "KP2", "-20 V", "0.05", "-3 A"},
			want:    catalog.Part{Kind: catalog.MOSFET, Type: "p", Mfr: "Kestrel Devices", MPN: "KP2"},
			nums:    map[string]float64{"vds": 20, "rdson": 0.05, "id": 3},
		},
		{
			name:    "a rdson_vgs column wins over the header condition",
			headers: []string{"mfr", "mpn", "kind", "RDS(on) @ 10V (mΩ)", "rdson_vgs"},
			cells:   []string{"Kestrel Devices", "KN1", "mosfet", "8", "4.5"},
			want:    catalog.Part{Kind: catalog.MOSFET, Mfr: "Kestrel Devices", MPN: "KN1"},
			nums:    map[string]float64{"rdson": 0.008, "rdson_vgs": 4.5},
		},
		{
			name:    "Zener told by V_Z; absent markers stay absent",
			headers: []string{"Manufacturer", "Part Number", "VZ (V)", "Tolerance", "Pd (W)", "IR (µA)", "Tj max"},
			cells:   []string{"Corvane", "ZD5V1", "5.1", "±5 %", "0.5", "N/A", "—"},
			want:    catalog.Part{Kind: catalog.Diode, Type: "zener", Mfr: "Corvane", MPN: "ZD5V1"},
			nums:    map[string]float64{"vz": 5.1, "vz_tol": 0.05, "pd": 0.5},
		},
		{
			name:    "TVS from its fields, generic power goes to ppk",
			headers: []string{"Mfr", "MPN", "Category", "VRWM", "VBR min", "VC", "IPP", "Power rating (W)"},
			cells:   []string{"Orchard", "TV5V0A", "Transient voltage suppressor", "5", "6.4", "9.2", "43.5", "400"},
			want:    catalog.Part{Kind: catalog.Diode, Type: "tvs", Mfr: "Orchard", MPN: "TV5V0A"},
			nums:    map[string]float64{"vrwm": 5, "vbr": 6.4, "vc": 9.2, "ipp": 43.5, "ppk": 400},
		},
		{
			name:    "fuse: generic ratings, AC/DC marks, speed letter, UL standard from the description",
			headers: []string{"Brand", "Part #", "Description", "Rated current", "Voltage rating", "Breaking capacity", "Speed", "Melting I²t (A²s)", "Cold resistance (mΩ)"},
			cells:   []string{"Lumen Fuse", "LF-2A5", "Cartridge fuse 5x20 UL 248-14", "2.5 A", "250 VAC / 125 VDC", "100 A", "T", "12.5", "45"},
			want:    catalog.Part{Kind: catalog.Fuse, Type: "T", Mfr: "Lumen Fuse", MPN: "LF-2A5", Desc: "Cartridge fuse 5x20 UL 248-14", FuseStd: "ul"},
			nums:    map[string]float64{"in": 2.5, "un_ac": 250, "un_dc": 125, "breaking": 100, "i2t": 12.5, "rcold": 0.045},
		},
		{
			name:    "blade fuse: an unmarked voltage is DC",
			headers: []string{"Mfr", "MPN", "Category", "Current rating (A)", "Max voltage (V)", "Interrupting rating"},
			cells:   []string{"Lumen Fuse", "LB-10", "Mini blade fuse, fast-acting", "10", "32", "1 kA"},
			want:    catalog.Part{Kind: catalog.Fuse, Type: "F", Mfr: "Lumen Fuse", MPN: "LB-10", FuseStd: "blade"},
			nums:    map[string]float64{"in": 10, "un_dc": 32, "breaking": 1000},
		},
		{
			name:    "IEC marking in the description gives the speed",
			headers: []string{"Mfr", "MPN", "Description", "In"},
			cells:   []string{"Lumen Fuse", "LF-T2", "Glass fuse T2AL250V IEC 60127", "2"},
			want:    catalog.Part{Kind: catalog.Fuse, Type: "T", Mfr: "Lumen Fuse", MPN: "LF-T2", Desc: "Glass fuse T2AL250V IEC 60127", FuseStd: "iec"},
			nums:    map[string]float64{"in": 2},
		},
		{
			name:    "booleans and lifecycle words",
			headers: []string{"Mfr", "MPN", "RoHS", "AEC-Q101", "Status", "VRRM"},
			cells:   []string{"Aldor", "R1", "Compliant", "Y", "Not recommended for new designs", "1000"},
			kind:    catalog.Diode,
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R1", RoHS: &yes, AECQ: &yes, Lifecycle: "nrnd"},
			nums:    map[string]float64{"vrrm": 1000},
		},
		{
			name:    "false booleans, obsolete",
			headers: []string{"Mfr", "MPN", "RoHS", "Automotive", "Lifecycle"},
			cells:   []string{"Aldor", "R2", "No", "0", "Discontinued"},
			kind:    catalog.Diode,
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R2", RoHS: &no, AECQ: &no, Lifecycle: "obsolete"},
			nums:    map[string]float64{},
		},
		{
			name:    "two VF columns: the hot one is vf2",
			headers: []string{"Mfr", "MPN", "VRRM", "VF @ 1A, 25°C (V)", "VF @ 1A, 125°C (V)", "IR @ 25°C (µA)", "IR @ 125°C (µA)"},
			cells:   []string{"Aldor", "S2", "100", "0.85", "0.7", "5", "200"},
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "S2"},
			nums:    map[string]float64{"vrrm": 100, "vf": 0.85, "vf_if": 1, "vf_tj": 25, "vf2": 0.7, "vf2_if": 1, "vf2_tj": 125, "ir": 5e-6, "ir_tj": 25, "ir2": 200e-6, "ir2_tj": 125},
		},
		{
			name:    "typical column ignored beside the maximum",
			headers: []string{"Mfr", "MPN", "RDS(on) typ (mΩ)", "RDS(on) max (mΩ)", "VDS"},
			cells:   []string{"Kestrel", "KN3", "3.1", "4.0", "40"},
			want:    catalog.Part{Kind: catalog.MOSFET, Mfr: "Kestrel", MPN: "KN3"},
			nums:    map[string]float64{"rdson": 0.004, "vds": 40},
		},
		{
			name:    "offer: price breaks in three styles, currency from header and cell",
			headers: []string{"Mfr", "MPN", "VRRM", "Supplier", "SKU", "Stock", "MOQ", "1+ (EUR)", "Price @100", "1000-4999"},
			cells:   []string{"Aldor", "R3", "50", "Nordhafen Parts", "NP-1", "12,345", "1", "0,50", "€0,31", "0,25"},
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R3"},
			nums:    map[string]float64{"vrrm": 50},
			offer:   &catalog.Offer{Supplier: "Nordhafen Parts", SKU: "NP-1", Stock: ptr(int64(12345)), MOQ: 1, Currency: "EUR", Breaks: []catalog.PriceBreak{{Qty: 1, Price: 0.5}, {Qty: 100, Price: 0.31}, {Qty: 1000, Price: 0.25}}},
		},
		{
			name:    "offer: break pairs and a currency column, supplier from the sheet label",
			headers: []string{"Mfr", "MPN", "VRRM", "Currency", "Break 1 qty", "Break 1 price", "Break 2 qty", "Break 2 price"},
			cells:   []string{"Aldor", "R4", "50", "usd", "10", "0.42", "1", "0.50"},
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R4"},
			nums:    map[string]float64{"vrrm": 50},
			offer:   &catalog.Offer{Supplier: "sheet-label", Currency: "USD", Breaks: []catalog.PriceBreak{{Qty: 1, Price: 0.5}, {Qty: 10, Price: 0.42}}},
		},
		{
			name:    "offer: breaks in one cell; plain price at the MOQ",
			headers: []string{"Mfr", "MPN", "VRRM", "Price breaks"},
			cells:   []string{"Aldor", "R5", "50", "1:0.50; 10:0.42; 100:0.31"},
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R5"},
			nums:    map[string]float64{"vrrm": 50},
			offer:   &catalog.Offer{Supplier: "sheet-label", Breaks: []catalog.PriceBreak{{Qty: 1, Price: 0.5}, {Qty: 10, Price: 0.42}, {Qty: 100, Price: 0.31}}},
		},
		{
			name:    "offer: plain price column applies at the MOQ",
			headers: []string{"Mfr", "MPN", "VRRM", "MOQ", "Unit price ($)"},
			cells:   []string{"Aldor", "R6", "50", "250", "0.12"},
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R6"},
			nums:    map[string]float64{"vrrm": 50},
			offer:   &catalog.Offer{Supplier: "sheet-label", MOQ: 250, Currency: "USD", Breaks: []catalog.PriceBreak{{Qty: 250, Price: 0.12}}},
		},
		{
			name:    "no offer data gives no offer",
			headers: []string{"Mfr", "MPN", "VRRM", "1+", "Stock"},
			cells:   []string{"Aldor", "R7", "50", "", "-"},
			want:    catalog.Part{Kind: catalog.Diode, Mfr: "Aldor", MPN: "R7"},
			nums:    map[string]float64{"vrrm": 50},
		},
		{
			name:    "a field of another kind is dropped, not stored",
			headers: []string{"Mfr", "MPN", "Category", "In", "Pd (W)"},
			cells:   []string{"Lumen", "F1", "fuse", "1", "0.5"},
			want:    catalog.Part{Kind: catalog.Fuse, Mfr: "Lumen", MPN: "F1"},
			nums:    map[string]float64{"in": 1},
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			cv := newConverter(tc.headers, tc.kind)
			p, rej := cv.convert(tc.cells)
			if rej != nil {
				t.Fatalf("rejected: column %q raw %q: %s", rej.column, rej.raw, rej.reason)
			}
			if p.Kind != tc.want.Kind || p.Type != tc.want.Type || p.Mfr != tc.want.Mfr || p.MPN != tc.want.MPN {
				t.Errorf("kind/type/mfr/mpn = %s/%s/%s/%s, want %s/%s/%s/%s", p.Kind, p.Type, p.Mfr, p.MPN, tc.want.Kind, tc.want.Type, tc.want.Mfr, tc.want.MPN)
			}
			if p.Desc != tc.want.Desc || p.Package != tc.want.Package || p.Lifecycle != tc.want.Lifecycle || p.FuseStd != tc.want.FuseStd {
				t.Errorf("desc/package/lifecycle/fuse_std = %q/%q/%q/%q, want %q/%q/%q/%q", p.Desc, p.Package, p.Lifecycle, p.FuseStd, tc.want.Desc, tc.want.Package, tc.want.Lifecycle, tc.want.FuseStd)
			}
			if !reflect.DeepEqual(p.RoHS, tc.want.RoHS) || !reflect.DeepEqual(p.AECQ, tc.want.AECQ) {
				t.Errorf("rohs/aecq = %v/%v, want %v/%v", deref(p.RoHS), deref(p.AECQ), deref(tc.want.RoHS), deref(tc.want.AECQ))
			}
			checkNums(t, tc.name, p, tc.nums)
			// the same row converted into a part that held another row
			// gives the same part (convertInto clears what it reuses)
			stale := &catalog.Part{Kind: catalog.Fuse, Type: "T", Mfr: "Old", MPN: "O1", Desc: "stale", Package: "P", Datasheet: "d",
				Lifecycle: "eol", RoHS: ptr(false), AECQ: ptr(true), FuseStd: "ul", Rerate: "25:1",
				Num:    map[string]float64{"vrrm": 1, "in": 3, "pd": 99},
				Offers: []catalog.Offer{{Supplier: "stale", SKU: "S", MOQ: 7, Breaks: breaks(5, 9, 50, 8, 500, 7, 5000, 6)}, {Supplier: "stale2"}}}
			if q, rej := cv.convertInto(tc.cells, stale); rej != nil {
				t.Errorf("into a used part: rejected: %s", rej.reason)
			} else if q != stale || !reflect.DeepEqual(*q, *p) {
				t.Errorf("into a used part:\n got %+v\nwant %+v", *q, *p)
			}
			switch {
			case tc.offer == nil && len(p.Offers) > 0:
				t.Errorf("offer %+v, want none", p.Offers[0])
			case tc.offer != nil && len(p.Offers) != 1:
				t.Errorf("%d offers, want 1", len(p.Offers))
			case tc.offer != nil && !reflect.DeepEqual(p.Offers[0], *tc.offer):
				t.Errorf("offer\n got %+v\nwant %+v", p.Offers[0], *tc.offer)
			}
		})
	}
}

func ptr[T any](v T) *T { return &v }

// TestConvertRejects covers every bad-row case: the reject names the
// column as written, the raw cell and a reason.
func TestConvertRejects(t *testing.T) {
	diode := []string{"Mfr", "MPN", "Type", "VRRM (V)", "IF(AV) (A)", "VF (V)", "Tj (°C)", "Tolerance", "VZ"}
	fet := []string{"Mfr", "MPN", "Channel", "VDS (V)", "VGS max (V)", "VGS(th) (V)", "RDS(on) (mΩ)", "rdson_vgs"}
	tvs := []string{"Mfr", "MPN", "Type", "VRWM", "VBR", "VC"}
	fuse := []string{"Mfr", "MPN", "Type", "In (A)", "Breaking capacity (A)"}
	offer := []string{"Mfr", "MPN", "Type", "Currency", "MOQ", "1+", "10+"}
	cases := []struct {
		name    string
		headers []string
		cells   []string
		column  string
		raw     string
		reason  string
	}{
		{"missing mpn", diode, []string{"Aldor", "", "rectifier", "100"}, "MPN", "", "no part number"},
		{"missing manufacturer", diode, []string{"", "R1", "rectifier", "100"}, "Mfr", "", "no manufacturer"},
		{"wrong dimension", diode, []string{"Aldor", "R1", "rectifier", "3 A"}, "VRRM (V)", "3 A", "voltage"},
		{"not a number", diode, []string{"Aldor", "R1", "rectifier", "high"}, "VRRM (V)", "high", "vrrm"},
		{"negative rating", diode, []string{"Aldor", "R1", "rectifier", "100", "-1"}, "IF(AV) (A)", "-1", "negative"},
		{"zero rating", diode, []string{"Aldor", "R1", "rectifier", "100", "0"}, "IF(AV) (A)", "0", "above zero"},
		{"VF above VRRM", diode, []string{"Aldor", "R1", "rectifier", "1", "1", "1.2"}, "VF (V)", "1.2", "above V_RRM"},
		{"tjmax out of range", diode, []string{"Aldor", "R1", "rectifier", "100", "1", "", "400"}, "Tj (°C)", "400", "-70..300"},
		{"tolerance out of range", diode, []string{"Aldor", "Z1", "zener", "", "", "", "", "60 %", "5.1"}, "Tolerance", "60 %", "0..0.5"},
		{"zener without vz", diode, []string{"Aldor", "Z2", "Zener", "", "", "", "150"}, "Type", "Zener", "needs V_Z"},
		{"rdson_vgs above vgs_max", fet, []string{"Kestrel", "K1", "N", "30", "8", "1", "10", "10"}, "rdson_vgs", "10", "above V_GS(max)"},
		{"vgs_th above vgs_max", fet, []string{"Kestrel", "K1", "N", "30", "8", "9"}, "VGS(th) (V)", "9", "above V_GS(max)"},
		{"negative rdson", fet, []string{"Kestrel", "K1", "N", "30", "20", "2", "-5"}, "RDS(on) (mΩ)", "-5", "negative"},
		{"tvs vbr below vrwm", tvs, []string{"Orchard", "T1", "TVS", "5", "4.5", "9"}, "VBR", "4.5", "below V_RWM"},
		{"tvs vc below vbr", tvs, []string{"Orchard", "T1", "TVS", "5", "6.4", "6"}, "VC", "6", "below V_BR"},
		{"breaking below in", fuse, []string{"Lumen", "F1", "fuse", "10", "5"}, "Breaking capacity (A)", "5", "below the rated current"},
		{"negative breaking", fuse, []string{"Lumen", "F1", "fuse", "10", "-50"}, "Breaking capacity (A)", "-50", "negative"},
		{"kind unknown", []string{"Mfr", "MPN", "Description"}, []string{"Aldor", "X1", "small part"}, "kind", "small part", "cannot tell whether this row is a diode, fuse or MOSFET"},
		{"type word against the fields", diode, []string{"Aldor", "R1", "T", "100"}, "Type", "T", "says fuse here, but fills diode columns (VRRM (V))"},
		{"type of another kind", []string{"Mfr", "MPN", "Kind", "Type"}, []string{"Aldor", "R1", "diode", "TT"}, "Type", "TT", "type TT is a fuse type, but the row is a diode"},
		{"bad kind column", []string{"Mfr", "MPN", "Kind"}, []string{"Aldor", "X1", "resistor"}, "Kind", "resistor", "diode, fuse or mosfet"},
		{"bad boolean", []string{"Mfr", "MPN", "Type", "RoHS"}, []string{"Aldor", "R1", "schottky", "maybe"}, "RoHS", "maybe", "yes/no"},
		{"bad lifecycle", []string{"Mfr", "MPN", "Type", "Lifecycle"}, []string{"Aldor", "R1", "schottky", "zombie"}, "Lifecycle", "zombie", "lifecycle"},
		{"zero price", offer, []string{"Aldor", "R1", "schottky", "EUR", "1", "0"}, "1+", "0", "above zero"},
		{"negative price", offer, []string{"Aldor", "R1", "schottky", "EUR", "1", "-0.1"}, "1+", "-0.1", "negative"},
		{"moq zero", offer, []string{"Aldor", "R1", "schottky", "EUR", "0", "0.1"}, "MOQ", "0", "at least 1"},
		{"currency conflict", offer, []string{"Aldor", "R1", "schottky", "USD", "1", "€0.10"}, "1+", "€0.10", "says USD"},
		{"bad currency", offer, []string{"Aldor", "R1", "schottky", "dollars?", "1", "0.10"}, "Currency", "dollars?", "currency"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			cv := newConverter(tc.headers, "")
			p, rej := cv.convert(tc.cells)
			if rej == nil {
				t.Fatalf("accepted: %+v", p)
			}
			if rej.column != tc.column || rej.raw != tc.raw || !strings.Contains(rej.reason, tc.reason) {
				t.Errorf("reject column %q raw %q reason %q\nwant column %q raw %q reason containing %q", rej.column, rej.raw, rej.reason, tc.column, tc.raw, tc.reason)
			}
		})
	}
}

// FuzzConvertRow: a random header row and data row never panic; an
// accepted part passes validation, has a known kind and type and only
// fields of its kind, with finite values; a reject has a reason.
func FuzzConvertRow(f *testing.F) {
	f.Add("Mfr|MPN|VRRM (V)|IF(AV)|VF @ 1A", "Aldor|R1|100|1|0.9")
	f.Add("Maker|Part no.|Channel|VDS|RDS(on) @ 10V (mΩ)|1+ (EUR)", "K|KP1|P|-30|45|0,12")
	f.Add("mfr|mpn|kind|type|in|breaking|speed", "L|F1|fuse|T|2|100|T")
	f.Add("Mfr|MPN|Price breaks|Currency", "A|B|1:0.5; 10:0.4|EUR")
	f.Add("Mfr|MPN|Voltage rating|Category", "L|F2|32 VDC|blade fuse")
	f.Fuzz(func(t *testing.T, header, cells string) {
		cv := newConverter(strings.Split(header, "|"), "")
		p, rej := cv.convert(strings.Split(cells, "|"))
		// converting into a part that held another row decides alike
		stale := &catalog.Part{Kind: catalog.MOSFET, Type: "n", Mfr: "Old", MPN: "O1", Desc: "stale", RoHS: ptr(true),
			FuseStd: "iec", Num: map[string]float64{"vds": 30, "in": 2}, Offers: []catalog.Offer{{Supplier: "stale", Breaks: breaks(5, 9, 50, 8)}}}
		q, rej2 := cv.convertInto(strings.Split(cells, "|"), stale)
		if (rej == nil) != (rej2 == nil) || rej != nil && *rej != *rej2 || rej == nil && !reflect.DeepEqual(*p, *q) {
			t.Fatalf("convert and convertInto a used part differ:\n%+v %+v\n%+v %+v", p, rej, q, rej2)
		}
		if rej != nil {
			if rej.reason == "" {
				t.Fatal("reject without a reason")
			}
			return
		}
		if !validKind(p.Kind) {
			t.Fatalf("kind %q", p.Kind)
		}
		if p.Type != "" && !validType(p.Kind, p.Type) {
			t.Fatalf("type %q for %s", p.Type, p.Kind)
		}
		if p.Mfr == "" || p.MPN == "" {
			t.Fatal("accepted without mfr or mpn")
		}
		for k, v := range p.Num {
			if !appliesTo(k, p.Kind) {
				t.Fatalf("%s stored on a %s", k, p.Kind)
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%s = %v", k, v)
			}
		}
		if field, reason := validatePart(p); reason != "" {
			t.Fatalf("accepted part fails validation: %s: %s", field, reason)
		}
		for _, o := range p.Offers {
			if o.Supplier == "" {
				t.Fatal("offer without supplier")
			}
			for i, b := range o.Breaks {
				if b.Qty < 1 || !(b.Price > 0) || (i > 0 && b.Qty <= o.Breaks[i-1].Qty) {
					t.Fatalf("bad breaks %+v", o.Breaks)
				}
			}
		}
	})
}

// validatePart skips numberReason for values in (0, 300] of every field
// but vz_tol: for each number field alone, it must refuse exactly what
// numberReason refuses.
func TestValidatePartNumberFastPath(t *testing.T) {
	vals := []float64{math.Inf(-1), -100, -70, -1, 0, 1e-12, 0.3, 0.5, 0.51, 1, 150, 299.9, 300, 300.1, 1e300, math.Inf(1), math.NaN()}
	for _, f := range catalog.Fields {
		if f.Type != catalog.Number {
			continue
		}
		for _, v := range vals {
			p := &catalog.Part{Kind: catalog.Diode, Num: map[string]float64{f.Name: v}}
			field, reason := validatePart(p)
			want := numberReason(f.Name, v)
			if reason != want || (want != "" && field != f.Name) {
				t.Errorf("%s = %g: validatePart %q %q, numberReason %q", f.Name, v, field, reason, want)
			}
		}
	}
}
