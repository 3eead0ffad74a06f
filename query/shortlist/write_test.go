package shortlist

import (
	"archive/zip"
	"bytes"
	"context"
	"encoding/csv"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"

	"partsieve/catalog"
	"partsieve/query/topology"
)

// sheetXML returns every worksheet's XML of the workbook in buf.
func sheetXML(t *testing.T, data []byte) map[string]string {
	t.Helper()
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]string{}
	for _, f := range zr.File {
		if !strings.HasPrefix(f.Name, "xl/worksheets/") && f.Name != "xl/sharedStrings.xml" {
			continue
		}
		r, err := f.Open()
		if err != nil {
			t.Fatal(err)
		}
		b, err := io.ReadAll(r)
		r.Close()
		if err != nil {
			t.Fatal(err)
		}
		out[f.Name] = string(b)
	}
	return out
}

func numericType(ct excelize.CellType) bool {
	// excelize omits the t attribute of numbers: its default is "n"
	// (ECMA-376 §18.3.1.4), which GetCellType reports as unset
	return ct == excelize.CellTypeUnset || ct == excelize.CellTypeNumber
}

// checkSheet compares every cell of a written sheet with the model it
// came from: text as text, numbers as numbers with their number format,
// booleans as booleans.
func checkSheet(t *testing.T, f *excelize.File, sh *sheet) {
	t.Helper()
	for j, h := range sh.headers {
		ref := cellName(j+1, 1)
		if v, _ := f.GetCellValue(sh.name, ref); v != h {
			t.Errorf("%s!%s header = %q, want %q", sh.name, ref, v, h)
		}
	}
	for i, r := range sh.rows {
		for j, c := range r {
			ref := cellName(j+1, i+2)
			raw, err := f.GetCellValue(sh.name, ref, excelize.Options{RawCellValue: true})
			if err != nil {
				t.Fatal(err)
			}
			ct, _ := f.GetCellType(sh.name, ref)
			sid, _ := f.GetCellStyle(sh.name, ref)
			style, _ := f.GetStyle(sid)
			switch c.kind {
			case cEmpty:
				if raw != "" {
					t.Errorf("%s!%s = %q, want empty", sh.name, ref, raw)
				}
			case cText:
				if raw != c.s || ct != excelize.CellTypeSharedString || style == nil || style.NumFmt != 49 {
					t.Errorf("%s!%s = %q (type %v, style %+v), want the text %q with format @", sh.name, ref, raw, ct, style, c.s)
				}
			case cNum:
				v, err := strconv.ParseFloat(raw, 64)
				if err != nil || !numericType(ct) || math.Abs(v-c.f) > 1e-13*math.Max(1, math.Abs(c.f)) {
					t.Errorf("%s!%s = %q (type %v), want the number %v", sh.name, ref, raw, ct, c.f)
				}
				if style == nil || style.CustomNumFmt == nil || *style.CustomNumFmt != c.fmt {
					t.Errorf("%s!%s number format %+v, want %q", sh.name, ref, style, c.fmt)
				}
			case cBool:
				if ct != excelize.CellTypeBool || raw != map[bool]string{true: "1", false: "0"}[c.b] {
					t.Errorf("%s!%s = %q (type %v), want the boolean %v", sh.name, ref, raw, ct, c.b)
				}
			}
		}
	}
	// nothing below the last row
	if v, _ := f.GetCellValue(sh.name, cellName(1, len(sh.rows)+2)); v != "" {
		t.Errorf("%s: a row after the last one: %q", sh.name, v)
	}
	p, err := f.GetPanes(sh.name)
	if err != nil || !p.Freeze || p.YSplit != 1 || p.TopLeftCell != "A2" {
		t.Errorf("%s: panes %+v, %v; want the header row frozen", sh.name, p, err)
	}
}

// The workbook read back with excelize: sheet names, every value and its
// type and number format, frozen header, autofilter, column widths, no
// formula anywhere.
func TestWorkbookReadBack(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s, text := exampleSpec(t, "sensor-24v-industrial")
	sl, err := Build(ctx, st, s, Options{Top: 2, Alternates: 2, SparesPct: 5, SpecText: text})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := sl.WriteXLSX(&buf); err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if got := strings.Join(f.GetSheetList(), ","); got != strings.Join(SheetNames, ",") {
		t.Fatalf("sheets %s, want %s", got, strings.Join(SheetNames, ","))
	}
	sheets := []sheet{sl.shortlistSheet(), sl.requirementsSheet(), sl.checksSheet(), sl.assumptionsSheet()}
	for i := range sheets {
		checkSheet(t, f, &sheets[i])
	}
	// the model rows are the shortlist's: every line, the design totals
	// and the total; checks and requirements complete
	if n := len(sheets[0].rows); n != len(sl.Lines()) {
		t.Errorf("Shortlist has %d rows, want %d", n, len(sl.Lines()))
	}
	nc := 0
	for _, d := range sl.Designs {
		nc += len(d.Checks)
	}
	if len(sheets[2].rows) != nc || nc < 100 {
		t.Errorf("Checks has %d rows, want %d (≥ 100)", len(sheets[2].rows), nc)
	}
	nr := 0
	for _, n := range sl.Needs.Needs {
		nr += len(n.Requirements) + len(n.Hazards)
	}
	if len(sheets[1].rows) != nr {
		t.Errorf("Requirements has %d rows, want %d", len(sheets[1].rows), nr)
	}
	// the spec as entered, line by line, ends the Assumptions sheet
	lines := strings.Split(strings.TrimSuffix(text, "\n"), "\n")
	rows, err := f.GetRows("Assumptions")
	if err != nil {
		t.Fatal(err)
	}
	var spec []string
	var cautions int
	for _, r := range rows {
		if len(r) > 0 && r[0] == "spec as entered" {
			v := ""
			if len(r) > 2 {
				v = r[2]
			}
			spec = append(spec, v)
		}
		if len(r) > 2 && r[0] == "caution" && strings.Contains(r[2], "hundreds of amps") {
			cautions++
		}
	}
	if strings.Join(spec, "\n") != strings.Join(lines, "\n") {
		t.Errorf("spec as entered:\n%s\nwant:\n%s", strings.Join(spec, "\n"), text)
	}
	if cautions != 1 {
		t.Errorf("Assumptions: %d battery cautions, want 1", cautions)
	}
	xml := sheetXML(t, buf.Bytes())
	for name, x := range xml {
		if strings.Contains(x, "<f>") || strings.Contains(x, "<f ") {
			t.Errorf("%s holds a formula element", name)
		}
	}
	for i, sh := range sheets {
		x := xml["xl/worksheets/sheet"+strconv.Itoa(i+1)+".xml"]
		last, _ := excelize.CoordinatesToCellName(len(sh.headers), len(sh.rows)+1, true)
		want := `<autoFilter ref="$A$1:` + last + `"`
		if !strings.Contains(x, want) {
			t.Errorf("%s: no %s", sh.name, want)
		}
	}
	if w, _ := f.GetColWidth("Shortlist", "I"); w < 40 {
		t.Errorf("Key ratings column width %g, want a readable width", w)
	}
	if w, _ := f.GetColWidth("Shortlist", "C"); w < 10 || w > 20 {
		t.Errorf("Line column width %g", w)
	}
	// a value in base SI units with its unit shown: the MOSFET of the
	// first FET design has its loss in W
	ref := ""
	for i, l := range sl.Lines() {
		if l.Kind == KindPart && l.Role == "mosfet" {
			ref = cellName(12, i+2)
			break
		}
	}
	if got, _ := f.GetCellValue("Shortlist", ref); !strings.HasSuffix(got, " W") {
		t.Errorf("loss shown as %q, want a value in W", got)
	}
}

// The CSV file: RFC 4180 with CRLF, the Shortlist columns, numbers in base
// SI units.
func TestCSV(t *testing.T) {
	ctx := context.Background()
	st := seedCatalog(t)
	s, _ := exampleSpec(t, "vehicle-12v-accessory")
	sl, err := Build(ctx, st, s, Options{Top: 1, Alternates: 1, SparesPct: 2.5})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := sl.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	raw := buf.String()
	if !strings.HasSuffix(raw, "\r\n") || strings.Count(raw, "\r\n") < len(sl.Lines())+1 || strings.HasPrefix(raw, "\ufeff") {
		t.Errorf("CSV line ends or BOM wrong:\n%q", raw[:min(200, len(raw))])
	}
	recs, err := csv.NewReader(strings.NewReader(raw)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(recs[0], "|") != strings.Join(ShortlistHeaders("EUR"), "|") {
		t.Errorf("header %v", recs[0])
	}
	lines := sl.Lines()
	if len(recs) != len(lines)+1 {
		t.Fatalf("%d records, want %d", len(recs), len(lines)+1)
	}
	for i, l := range lines {
		for j, c := range lineCells(&l, "EUR") {
			got := recs[i+1][j]
			switch c.kind {
			case cText:
				if got != SafeText(c.s) {
					t.Errorf("row %d col %d = %q, want %q", i+2, j+1, got, SafeText(c.s))
				}
			case cNum:
				v, err := strconv.ParseFloat(got, 64)
				if err != nil || math.Abs(v-c.f) > 1e-12*math.Max(1, math.Abs(c.f)) {
					t.Errorf("row %d col %d = %q, want %v", i+2, j+1, got, c.f)
				}
			case cEmpty:
				if got != "" {
					t.Errorf("row %d col %d = %q, want empty", i+2, j+1, got)
				}
			}
		}
	}
	// a line: 2000 boards + 2.5 % = 2050 pieces, base SI ratings
	first := recs[1]
	col := func(h string) string {
		for j, x := range recs[0] {
			if x == h {
				return first[j]
			}
		}
		t.Fatalf("no column %q", h)
		return ""
	}
	if col("Needed") != "2000" || col("With spares") != "2050" || col("Line") != "part" {
		t.Errorf("first line %v", first)
	}
	if v, err := strconv.ParseFloat(col("Stage drop (V)"), 64); err != nil || v <= 0 || v > 0.6 {
		t.Errorf("stage drop %q: want a value in volts (base SI)", col("Stage drop (V)"))
	}
}

func TestSafeText(t *testing.T) {
	for in, want := range map[string]string{
		"":                  "",
		"plain":             "plain",
		"=1+1":              "'=1+1",
		"+1-2":              "'+1-2",
		"-5":                "'-5",
		"@SUM(A1)":          "'@SUM(A1)",
		"\tTAB":             "'\tTAB",
		"\rCR":              "'\rCR",
		"\nLF":              "'\nLF",
		"a=b":               "a=b",
		" =1":               " =1",
		"'already":          "'already",
		"=HYPERLINK(\"x\")": "'=HYPERLINK(\"x\")",
	} {
		if got := SafeText(in); got != want {
			t.Errorf("SafeText(%q) = %q, want %q", in, got, want)
		}
		if Risky(in) != (want != in) {
			t.Errorf("Risky(%q) = %v", in, Risky(in))
		}
	}
}

// hostileCatalog is the seed catalog with clones of a qualifying Schottky
// diode whose text fields start like formulas.
func hostileCatalog(t *testing.T) *topology.Catalog {
	t.Helper()
	ctx := context.Background()
	st := seedCatalog(t)
	parts, err := st.Find(ctx, catalog.Query{Offers: true})
	if err != nil {
		t.Fatal(err)
	}
	var base *catalog.Part
	for i := range parts {
		if parts[i].MPN == "QPS30-40C" {
			base = &parts[i]
		}
	}
	if base == nil {
		t.Fatal("no QPS30-40C in the seed catalog")
	}
	clone := func(mfr, mpn, pkg, supplier, sku string) catalog.Part {
		p := *base
		p.Mfr, p.MPN, p.Package = mfr, mpn, pkg
		p.Num = map[string]float64{}
		for k, v := range base.Num {
			p.Num[k] = v
		}
		o := base.Offers[0]
		o.Supplier, o.SKU = supplier, sku
		p.Offers = []catalog.Offer{o}
		return p
	}
	parts = append(parts,
		clone(hostileMfr, "+1-2", "=1+1", "@Evil Supply", "-2+3"),
		clone("Plain Devices", "@SUM(A1)", "-SMC", "\tTabbed", "=SUM(1,2)"))
	return topology.NewCatalog(parts)
}

const hostileMfr = `=HYPERLINK("http://attacker.invalid/","click")`

// Hostile text from an imported sheet is text in both files: the exact
// string in a string cell of the workbook (no formula element), an
// apostrophe-prefixed field in the CSV.
func TestHostileText(t *testing.T) {
	s, _ := exampleSpec(t, "sensor-24v-industrial")
	cat := hostileCatalog(t)
	sl, err := FromCatalog(s, cat, Options{Top: 3, Alternates: 2, Topologies: []topology.Topology{topology.SeriesDiode}})
	if err != nil {
		t.Fatal(err)
	}
	hostile := map[string]bool{hostileMfr: true, "+1-2": true, "=1+1": true, "@Evil Supply": true, "-2+3": true,
		"@SUM(A1)": true, "-SMC": true, "\tTabbed": true, "=SUM(1,2)": true}
	// the clones tie with QPS30-40C and sort first by part number
	if sl.Designs[0].Lines[0].MPN != "+1-2" || sl.Designs[1].Lines[0].MPN != "@SUM(A1)" {
		t.Fatalf("designs: %s, %s", sl.Designs[0].Lines[0].MPN, sl.Designs[1].Lines[0].MPN)
	}
	var xb, cb bytes.Buffer
	if err := sl.WriteXLSX(&xb); err != nil {
		t.Fatal(err)
	}
	if err := sl.WriteCSV(&cb); err != nil {
		t.Fatal(err)
	}
	f, err := excelize.OpenReader(bytes.NewReader(xb.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	found := map[string]int{}
	for _, name := range SheetNames {
		rows, err := f.GetRows(name, excelize.Options{RawCellValue: true})
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range rows {
			for j, v := range r {
				if !hostile[v] {
					if strings.HasPrefix(v, "'") && hostile[v[1:]] {
						t.Errorf("%s: %q carries an apostrophe in the workbook", name, v)
					}
					continue
				}
				found[v]++
				ref := cellName(j+1, i+1)
				if ct, _ := f.GetCellType(name, ref); ct != excelize.CellTypeSharedString {
					t.Errorf("%s!%s %q has cell type %v, want a string", name, ref, v, ct)
				}
				if fm, _ := f.GetCellFormula(name, ref); fm != "" {
					t.Errorf("%s!%s has the formula %q", name, ref, fm)
				}
			}
		}
	}
	for h := range hostile {
		if found[h] == 0 {
			t.Errorf("workbook: %q not found as text", h)
		}
	}
	for name, x := range sheetXML(t, xb.Bytes()) {
		if strings.Contains(x, "<f>") || strings.Contains(x, "<f ") {
			t.Errorf("%s holds a formula element", name)
		}
	}
	recs, err := csv.NewReader(bytes.NewReader(cb.Bytes())).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	foundCSV := map[string]int{}
	for _, r := range recs {
		for _, v := range r {
			if hostile[v] {
				t.Errorf("CSV field %q is not neutralised", v)
			}
			if strings.HasPrefix(v, "'") && hostile[v[1:]] {
				foundCSV[v[1:]]++
			}
		}
	}
	for h := range hostile {
		if foundCSV[h] == 0 {
			t.Errorf("CSV: %q not found with an apostrophe", h)
		}
	}
}
