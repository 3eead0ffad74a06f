package importers

import (
	"archive/zip"
	"bytes"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"os"
	"reflect"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// TestReadXLSXFixtures reads every sheet of the XLSX fixtures and checks
// the sheet list, cells and row numbers. excelize.xlsx is written by
// excelize (gen/main.go); lo_workbook.xlsx and lo_csv.xlsx by LibreOffice
// from src/lo_workbook.fods and utf8.csv (make.sh).
func TestReadXLSXFixtures(t *testing.T) {
	tests := []struct {
		file   string
		sheets []string
		want   map[string][]readRow
	}{
		{"excelize.xlsx", []string{"Diodes", "Hidden", "Empty", "Edge"}, map[string][]readRow{
			"Diodes": {
				// A1:A2 and D1:D2 merged down, B1:C1 merged across.
				{1, []string{"MPN", "Ratings", "Ratings", "Package"}},
				{2, []string{"MPN", "V_RRM (V)", "I_F (A)", "Package"}},
				{3, []string{"DX-100", "40", "1.5", "SMA"}},
				// "60" is text; 0.0085 is formatted "0.00" but read raw.
				{4, []string{"DX-200", "60", "0.0085", "SMB"}},
				// Row 5 is empty. B6 is a formula excelize saved without a
				// cached value.
				{6, []string{"DX-300", "", "3", "  padded  "}},
				// A8:A10 merged down.
				{8, []string{"Schottky", "20", "1", "SOD-123"}},
				{9, []string{"Schottky", "30", "2", "SOD-123"}},
				{10, []string{"Schottky", "40", "3", "SMA"}},
				// 2024-03-05 as a date serial.
				{12, []string{"45356"}},
			},
			"Hidden": {{1, []string{"secret"}}},
			"Empty":  nil,
			"Edge": {
				{1, []string{"Price list", "Price list", "Price list", "Price list", "Price list", "Price list"}},
				{3, []string{"", "", "c3"}},
				{1048576, []string{"last"}},
			},
		}},
		{"lo_workbook.xlsx", []string{"Diodes", "Fuses", "Notes", "MOSFETs & Co"}, map[string][]readRow{
			"Diodes": {
				{1, []string{"Part number", "Ratings", "Ratings", "Notes"}},
				{2, []string{"Part number", "V_RRM (V)", "I_F (A)"}},
				{3, []string{"DX-100", "40", "1.5", "  padded  "}},
				{4, []string{"DX-200", "60", "0.0085", "µ-pack 200 °C"}},
				// Formulas with the values LibreOffice cached: =B3*2,
				// =C3+C4, =CONCATENATE(A3,"-T").
				{7, []string{"DX-300", "80", "1.5085", "DX-100-T"}},
				// A date serial, a formula on another sheet, TRUE.
				{8, []string{"DX-400", "45356", "315 mA", "1"}},
			},
			"Fuses": {
				{1, []string{"Type", "MPN", "Rating"}},
				{2, []string{"Time-lag", "FT-1", "500 mA"}},
				{3, []string{"Time-lag", "FT-2", "1 A"}},
				{4, []string{"Time-lag", "FT-3", "2 A"}},
				{5, []string{"Fast", "FF-1", "315 mA"}},
			},
			"Notes": {{1, []string{"internal"}}},
			"MOSFETs & Co": {
				{1, []string{"MPN", "V_DS"}},
				{2, []string{"Q-1", "30"}},
				{13, []string{"Q-2", "60"}},
			},
		}},
		{"lo_csv.xlsx", []string{"utf8"}, map[string][]readRow{
			"utf8": {
				{1, []string{"MPN", "Description", "V_RRM", "I_F", "T_j max"}},
				{2, []string{"DX-100", "Schottky 40 V, 1 A", "40V", "1A", "125 °C"}},
				{3, []string{"DX-200", "Rectifier µ-pack", "200 V", "1.5 A", "150°C"}},
				{4, []string{"DX-300", "R_DS(on) 8.5 mΩ", "30V", "60A", "175 °C"}},
			},
		}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			b, sheets := readSheets(t, tt.file, readFixture(t, tt.file))
			if b.Format() != "xlsx" {
				t.Errorf("Format() = %q", b.Format())
			}
			if got := b.Sheets(); !reflect.DeepEqual(got, tt.sheets) {
				t.Errorf("Sheets() = %q, want %q", got, tt.sheets)
			}
			for name, want := range tt.want {
				readCompare(t, name, sheets[name], want)
			}
		})
	}
}

// TestReadXLSXSheetLookup: sheet names match exactly, then ignoring case;
// an unknown name gives an error listing the sheets.
func TestReadXLSXSheetLookup(t *testing.T) {
	b, err := readOpen("lo_workbook.xlsx", readFixture(t, "lo_workbook.xlsx"))
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	rows, err := readTable(b, "fuses")
	if err != nil || len(rows) != 5 {
		t.Errorf(`Table("fuses"): %d rows, %v; want 5 rows`, len(rows), err)
	}
	_, err = b.Table("Resistors")
	readWantErr(t, err, "lo_workbook.xlsx", ErrUnknownSheet)
	want := `lo_workbook.xlsx: no sheet "Resistors"; the sheets are "Diodes", "Fuses", "Notes", "MOSFETs & Co"`
	if err.Error() != want {
		t.Errorf("error %q, want %q", err, want)
	}
}

// TestReadXLSXByContent: the content decides the format, not the name.
func TestReadXLSXByContent(t *testing.T) {
	data := readFixture(t, "excelize.xlsx")
	for _, name := range []string{"parts.csv", "parts", "parts.txt"} {
		b, err := readOpen(name, data)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if b.Format() != "xlsx" {
			t.Errorf("%s: Format() = %q, want xlsx", name, b.Format())
		}
		b.Close()
	}
	// And a CSV named .xlsx is read as CSV.
	b, err := readOpen("parts.xlsx", readFixture(t, "pipe.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if b.Format() != "csv" {
		t.Errorf("CSV named parts.xlsx: Format() = %q, want csv", b.Format())
	}
}

// readZip builds a ZIP archive from name/content pairs.
func readZip(t *testing.T, files ...string) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for i := 0; i+1 < len(files); i += 2 {
		w, err := zw.Create(files[i])
		if err != nil {
			t.Fatal(err)
		}
		if _, err := io.WriteString(w, files[i+1]); err != nil {
			t.Fatal(err)
		}
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// readRewrite copies a ZIP archive, letting edit change (or drop, by
// returning nil) the content of each entry.
func readRewrite(t *testing.T, data []byte, edit func(name string, content []byte) []byte) []byte {
	t.Helper()
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, zf := range zr.File {
		rc, err := zf.Open()
		if err != nil {
			t.Fatal(err)
		}
		content, err := io.ReadAll(rc)
		rc.Close()
		if err != nil {
			t.Fatal(err)
		}
		if content = edit(zf.Name, content); content == nil {
			continue
		}
		w, err := zw.Create(zf.Name)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := w.Write(content); err != nil {
			t.Fatal(err)
		}
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// readRawZip builds a one-entry ZIP whose directory declares the given
// sizes and method for the given raw (already compressed) bytes.
func readRawZip(t *testing.T, name string, method uint16, raw []byte, usize uint64) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	w, err := zw.CreateRaw(&zip.FileHeader{Name: name, Method: method, CRC32: crc32.ChecksumIEEE(raw),
		CompressedSize64: uint64(len(raw)), UncompressedSize64: usize})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := w.Write(raw); err != nil {
		t.Fatal(err)
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// readBadCRC copies a ZIP archive entry by entry without unpacking, giving
// one entry a wrong CRC-32: its data still inflates, but does not check.
func readBadCRC(t *testing.T, data []byte, bad string) []byte {
	t.Helper()
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, zf := range zr.File {
		raw, err := zf.OpenRaw()
		if err != nil {
			t.Fatal(err)
		}
		fh := zf.FileHeader
		if fh.Name == bad {
			fh.CRC32 ^= 0xFFFF
		}
		w, err := zw.CreateRaw(&fh)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := io.Copy(w, raw); err != nil {
			t.Fatal(err)
		}
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// TestReadXLSXBroken checks hostile and broken files: each gives a typed
// error that names the file, at OpenBook or at Table.
func TestReadXLSXBroken(t *testing.T) {
	good := readFixture(t, "excelize.xlsx")
	cfb := append([]byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1}, make([]byte, 1024)...)
	// Flip bytes in the middle of the first worksheet's packed data: the
	// directory is intact, the sheet's DEFLATE stream is not.
	corrupt := append([]byte(nil), good...)
	zr, err := zip.NewReader(bytes.NewReader(good), int64(len(good)))
	if err != nil {
		t.Fatal(err)
	}
	for _, zf := range zr.File {
		if zf.Name == "xl/worksheets/sheet1.xml" {
			off, err := zf.DataOffset()
			if err != nil {
				t.Fatal(err)
			}
			for i := off + int64(zf.CompressedSize64)/2; i < off+int64(zf.CompressedSize64)/2+8; i++ {
				corrupt[i] ^= 0x55
			}
		}
	}
	tests := []struct {
		name  string
		data  []byte
		kind  error
		sheet string // "" = the error comes from OpenBook, else from Table(sheet)
		msg   string // whole message, when fixed
	}{
		{name: "half.xlsx", data: good[:len(good)/2], kind: ErrDamaged,
			msg: "half.xlsx: truncated or damaged XLSX (zip: not a valid zip file)"},
		{name: "head.xlsx", data: good[:4], kind: ErrDamaged},
		{name: "secret.xlsx", data: cfb, kind: ErrEncrypted,
			msg: "secret.xlsx: encrypted or legacy .xls workbook: save it as .xlsx or CSV"},
		{name: "empty.xlsx", data: nil, kind: ErrEmpty, msg: "empty.xlsx: empty"},
		{name: "emptyzip.xlsx", data: readZip(t), kind: ErrNotSpreadsheet,
			msg: "emptyzip.xlsx: not a spreadsheet (a ZIP archive without an XLSX workbook)"},
		{name: "notes.xlsx", data: readZip(t, "notes.txt", "hello", "word/document.xml", "<w/>"), kind: ErrNotSpreadsheet},
		{name: "lo_workbook.ods", data: readFixture(t, "lo_workbook.ods"), kind: ErrNotSpreadsheet,
			msg: "lo_workbook.ods: OpenDocument spreadsheet: save it as .xlsx or CSV"},
		{name: "binary.xlsb", data: readZip(t, "_rels/.rels",
			`<Relationships><Relationship Id="r1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.bin"/></Relationships>`,
			"xl/workbook.bin", "x"), kind: ErrNotSpreadsheet,
			msg: "binary.xlsb: binary .xlsb workbook: save it as .xlsx or CSV"},
		{name: "bomb.xlsx", data: readRawZip(t, "xl/workbook.xml", zip.Deflate, []byte{3, 0}, 1<<40), kind: ErrDamaged},
		{name: "stored.xlsx", data: readRawZip(t, "xl/workbook.xml", zip.Store, []byte("<workbook/>"), 1<<20), kind: ErrDamaged},
		{name: "method.xlsx", data: readRawZip(t, "xl/workbook.xml", 99, []byte("x"), 1), kind: ErrDamaged},
		{name: "badxml.xlsx", data: readRewrite(t, good, func(name string, c []byte) []byte {
			if name == "xl/workbook.xml" {
				return c[:len(c)/2]
			}
			return c
		}), kind: ErrDamaged},
		{name: "nosheet.xlsx", data: readRewrite(t, good, func(name string, c []byte) []byte {
			if name == "xl/worksheets/sheet1.xml" {
				return nil
			}
			return c
		}), kind: ErrDamaged, sheet: "Diodes"},
		{name: "flate.xlsx", data: corrupt, kind: ErrDamaged},
		{name: "crc.xlsx", data: readBadCRC(t, good, "xl/worksheets/sheet1.xml"), kind: ErrDamaged, sheet: "Diodes",
			msg: `crc.xlsx, sheet "Diodes": truncated or damaged XLSX (zip: checksum error)`},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			b, err := readOpen(tt.name, tt.data)
			if tt.sheet != "" {
				if err != nil {
					t.Fatalf("OpenBook: %v", err)
				}
				defer b.Close()
				_, err = readTable(b, tt.sheet)
			}
			fe := readWantErr(t, err, tt.name, tt.kind)
			if tt.msg != "" && fe.Error() != tt.msg {
				t.Errorf("error %q, want %q", fe, tt.msg)
			}
			if tt.sheet != "" && fe.Sheet != tt.sheet {
				t.Errorf("error %q does not name sheet %q", fe, tt.sheet)
			}
		})
	}
}

// TestReadXLSXTooLarge: UnzipSizeLimit bounds the unpacked size.
func TestReadXLSXTooLarge(t *testing.T) {
	defer func(old int64) { UnzipSizeLimit = old }(UnzipSizeLimit)
	UnzipSizeLimit = 4 << 10
	_, err := readOpen("big.xlsx", readFixture(t, "excelize.xlsx"))
	readWantErr(t, err, "big.xlsx", ErrTooLarge)
}

// TestReadXLSXLargeSheet: a worksheet over excelize's 16 MiB in-memory
// limit is unpacked to a temporary file, read the same, and the file is
// removed on Close. The sheet is padded with white space between rows, so
// the workbook stays small.
func TestReadXLSXLargeSheet(t *testing.T) {
	tmp := t.TempDir()
	t.Setenv("TMPDIR", tmp)
	pad := bytes.Repeat([]byte(" "), 17<<20)
	data := readRewrite(t, readFixture(t, "excelize.xlsx"), func(name string, c []byte) []byte {
		if name == "xl/worksheets/sheet1.xml" {
			i := bytes.Index(c, []byte("</sheetData>"))
			return append(append(append([]byte(nil), c[:i]...), pad...), c[i:]...)
		}
		return c
	})
	b, err := readOpen("padded.xlsx", data)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := readTable(b, "Diodes")
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 9 || rows[8].Row != 12 || rows[7].Cells[0] != "Schottky" {
		t.Errorf("padded sheet read as %v", rows)
	}
	if ents, _ := os.ReadDir(tmp); len(ents) == 0 {
		t.Errorf("no temporary file in %s while open", tmp)
	}
	if err := b.Close(); err != nil {
		t.Fatal(err)
	}
	if ents, _ := os.ReadDir(tmp); len(ents) != 0 {
		t.Errorf("Close left temporary files: %v", ents)
	}
}

// TestReadXLSXMerges covers merge filling corner cases on a workbook built
// here: a merge whose anchor is empty, a merge whose anchor row is blank,
// a merge wider than maxFillColumn, and a vertical merge crossing a
// missing row.
func TestReadXLSXMerges(t *testing.T) {
	f := excelize.NewFile()
	defer f.Close()
	const s = "Sheet1"
	cells := map[string]any{
		"B1": "x", "C1": "hdr", // A1:A3 merged, anchor empty
		"B2": "y",
		"A4": "kind", "B4": 1, // A4:A7 merged, row 6 missing
		"B5":  2,
		"B7":  3,
		"C9":  "wide", // C9:ZZ9 merged; row 8 blank
		"A10": "z",    // in no merge
		"G12": "g",    // F11:F12 merged; row 11 blank
	}
	for c, v := range cells {
		if err := f.SetCellValue(s, c, v); err != nil {
			t.Fatal(err)
		}
	}
	far, err := excelize.ColumnNumberToName(maxFillColumn + 100)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range [][2]string{{"A1", "A3"}, {"A4", "A7"}, {"C9", far + "9"}, {"F11", "F12"}} {
		if err := f.MergeCell(s, m[0], m[1]); err != nil {
			t.Fatal(err)
		}
	}
	var buf bytes.Buffer
	if err := f.Write(&buf); err != nil {
		t.Fatal(err)
	}
	_, sheets := readSheets(t, "merges.xlsx", buf.Bytes())
	wide := []string{"", "", "wide"}
	for len(wide) < maxFillColumn {
		wide = append(wide, "wide")
	}
	want := []readRow{
		{1, []string{"", "x", "hdr"}},
		{2, []string{"", "y"}},
		{4, []string{"kind", "1"}},
		{5, []string{"kind", "2"}},
		{7, []string{"kind", "3"}},
		{9, wide},
		{10, []string{"z"}},
		{12, []string{"", "", "", "", "", "", "g"}},
	}
	readCompare(t, "merges.xlsx", sheets[s], want)
}

// TestReadScanTags checks the byte scanner for <mergeCell> tags across
// chunk boundaries, with namespace prefixes and look-alikes.
func TestReadScanTags(t *testing.T) {
	var xml bytes.Buffer
	xml.WriteString(`<worksheet><sheetData><row r="1"><c r="A1" t="inlineStr"><is><t>mergeCell ref="Z1:Z9"/&gt; &lt;mergeCell ref="Y1:Y2"/&gt;</t></is></c></row></sheetData>`)
	var want []string
	for i := 1; i <= 6000; i++ {
		ref := fmt.Sprintf("A%d:C%d", i, i+1)
		want = append(want, ref)
		switch i % 4 {
		case 0:
			fmt.Fprintf(&xml, `<mergeCell ref="%s"/>`, ref)
		case 1:
			fmt.Fprintf(&xml, "<x:mergeCell\n  ref='%s' />", ref)
		case 2:
			fmt.Fprintf(&xml, `<mergeCell other="1" ref="%s"></mergeCell>%s`, ref, strings.Repeat(" ", i%97))
		case 3:
			fmt.Fprintf(&xml, `<mergeCells count="1"><mergeCell ref = "%s"/></mergeCells>`, ref)
		}
	}
	xml.WriteString(`</worksheet>`)
	var got []string
	err := scanTags(bytes.NewReader(xml.Bytes()), []byte("mergeCell"), func(tag []byte) error {
		ref, ok := attrValue(tag, "ref")
		if !ok {
			return fmt.Errorf("no ref in %q", tag)
		}
		got = append(got, ref)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != len(want) {
		t.Fatalf("found %d tags, want %d", len(got), len(want))
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("tag %d: %q, want %q", i, got[i], want[i])
		}
	}
}

// TestReadParseRange checks merge reference parsing.
func TestReadParseRange(t *testing.T) {
	tests := []struct {
		ref  string
		want mergeRange
		ok   bool
	}{
		{"A1:C2", mergeRange{c1: 1, r1: 1, c2: 3, r2: 2}, true},
		{"$B$3:$A$1", mergeRange{c1: 1, r1: 1, c2: 2, r2: 3}, true},
		{"XFD1048576:XFC1048575", mergeRange{c1: 16383, r1: 1048575, c2: 16384, r2: 1048576}, true},
		{"A1:A1", mergeRange{}, false},
		{"A1", mergeRange{}, false},
		{"A0:B1", mergeRange{}, false},
		{"1A:B2", mergeRange{}, false},
		{"A1:XFE1", mergeRange{}, false},
		{"", mergeRange{}, false},
	}
	for _, tt := range tests {
		got, ok := parseRange(tt.ref)
		if ok != tt.ok || got != tt.want {
			t.Errorf("parseRange(%q) = %+v, %v; want %+v, %v", tt.ref, got, ok, tt.want, tt.ok)
		}
	}
}

// TestReadErrorFormat checks the message layout of FileError.
func TestReadErrorFormat(t *testing.T) {
	err := &FileError{File: "parts.xlsx", Sheet: "Diodes", Row: 12, Column: 3, Kind: ErrDamaged, Err: io.ErrUnexpectedEOF}
	want := `parts.xlsx, sheet "Diodes", row 12, column 3: truncated or damaged XLSX (unexpected EOF)`
	if err.Error() != want {
		t.Errorf("got %q, want %q", err, want)
	}
	if !errors.Is(err, ErrDamaged) || !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Error("errors.Is does not see the kind and the cause")
	}
}
