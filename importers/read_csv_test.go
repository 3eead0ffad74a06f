package importers

import (
	"bytes"
	"fmt"
	"io"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
	xunicode "golang.org/x/text/encoding/unicode"
	"golang.org/x/text/transform"
)

// TestReadTextFixtures reads each text fixture (testdata/read, written by
// gen/main.go) and checks format, cells and row numbers.
func TestReadTextFixtures(t *testing.T) {
	tests := []struct {
		file   string
		format string
		want   []readRow
	}{
		{"utf8.csv", "csv", []readRow{
			{1, []string{"MPN", "Description", "V_RRM", "I_F", "T_j max"}},
			{2, []string{"DX-100", "Schottky 40 V, 1 A", "40V", "1A", "125 °C"}},
			{3, []string{"DX-200", "Rectifier µ-pack", "200 V", "1.5 A", "150°C"}},
			{4, []string{"DX-300", "R_DS(on) 8.5 mΩ", "30V", "60A", "175 °C"}},
		}},
		// UTF-8 with a byte order mark, semicolons and decimal commas.
		{"utf8_bom.csv", "csv", []readRow{
			{1, []string{"Artikel", "Spannung (V)", "Strom (A)", "Preis"}},
			{2, []string{"DS-1", "40", "1,5", "0,12"}},
			{3, []string{"DS-2", "60", "2,25", "0,30"}},
		}},
		// UTF-16LE with BOM and tabs, as spreadsheet "Unicode text" exports.
		{"utf16le.txt", "tsv", []readRow{
			{1, []string{"MPN", "V_DS", "R_DS(on)", "Package"}},
			{2, []string{"QN-30", "30 V", "8,5 mΩ", "SOT-23"}},
			{3, []string{"QP-20", "-20 V", "45 mΩ", "SOT-23"}},
		}},
		{"utf16be.csv", "csv", []readRow{
			{1, []string{"MPN", "Rating", "I²t"}},
			{2, []string{"FT-500", "500 mA", "0.25 A²s"}},
			{3, []string{"FT-1000", "1 A", "1.1 A²s"}},
		}},
		// Windows-1252: µ is 0xB5, ° 0xB0, ± 0xB1, ä 0xE4, … 0x85.
		{"cp1252.csv", "csv", []readRow{
			{1, []string{"Teil", "Beschreibung", "Strom", "Temperatur"}},
			{2, []string{"F-1", "Sicherung träge", "500 mA", "-55…125 °C"}},
			{3, []string{"F-2", "µ-Sicherung ± 10 %", "2 A", "85°C"}},
		}},
		// Commas in the text do not beat the tabs.
		{"tab.tsv", "tsv", []readRow{
			{1, []string{"mpn", "description", "vrrm"}},
			{2, []string{"DX-1", "Schottky, 40 V, SMA", "40"}},
			{3, []string{"DX-2", "Rectifier, 1000 V", "1000"}},
		}},
		{"pipe.csv", "csv", []readRow{
			{1, []string{"mpn", "vds", "rdson"}},
			{2, []string{"Q-1", "30", "0.0085"}},
			{3, []string{"Q-2", "60", "0.012"}},
		}},
		// Decimal commas give three comma fields on data lines, but the
		// header has none: the semicolon is the consistent delimiter.
		{"decimal_comma.csv", "csv", []readRow{
			{1, []string{"mpn", "vf", "if"}},
			{2, []string{"D1", "0,55", "1,5"}},
			{3, []string{"D2", "0,62", "2,0"}},
		}},
		// Embedded line break (the next record starts on line 4), doubled
		// quotes, a bare quote in an unquoted field, a quoted delimiter.
		{"quoted.csv", "csv", []readRow{
			{1, []string{"mpn", "description", "note"}},
			{2, []string{"DX-1", "Schottky, 40 V", "line one\nline two"}},
			{4, []string{"DX-2", `He said "fast"`, "plain"}},
			{5, []string{"DX-3", `5" reel`, `tape "and" reel`}},
			{6, []string{"DX-4", "last", "a,b"}},
		}},
		// Title line, blank lines, short and long rows, rows of empty or
		// blank cells (skipped), trailing empty cells (dropped).
		{"ragged.csv", "csv", []readRow{
			{1, []string{"Supplier price list (invented)"}},
			{3, []string{"mpn", "vrrm", "if", "package", "note"}},
			{4, []string{"DX-1", "40", "1"}},
			{5, []string{"DX-2", "60", "2", "SMB", "extra", "more"}},
			{7, []string{"DX-3", "", "3"}},
			{10, []string{"DX-4", "100", "1", "SMA"}},
		}},
		// Old Mac line ends (carriage return only).
		{"cr_only.csv", "csv", []readRow{
			{1, []string{"a", "b"}},
			{2, []string{"1", "2"}},
			{3, []string{"3", "4"}},
		}},
		// One column: a .tsv file stays tab-separated.
		{"single.tsv", "tsv", []readRow{
			{1, []string{"mpn"}},
			{2, []string{"DX-1"}},
			{3, []string{"DX-2"}},
		}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			b, sheets := readSheets(t, tt.file, readFixture(t, tt.file))
			if got := b.Format(); got != tt.format {
				t.Errorf("Format() = %q, want %q", got, tt.format)
			}
			if got := b.Sheets(); len(got) != 1 || got[0] != "" {
				t.Errorf("Sheets() = %q, want one unnamed sheet", got)
			}
			readCompare(t, tt.file, sheets[""], tt.want)
		})
	}
}

// TestReadTextTwice checks that each Table call reads the file from the
// start again.
func TestReadTextTwice(t *testing.T) {
	b, err := readOpen("pipe.csv", readFixture(t, "pipe.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	first, err := readTable(b, "")
	if err != nil {
		t.Fatal(err)
	}
	second, err := readTable(b, "")
	if err != nil {
		t.Fatal(err)
	}
	readCompare(t, "second pass", second, first)
	if len(first) != 3 {
		t.Errorf("got %d rows, want 3", len(first))
	}
}

// TestReadTextUnknownSheet: a text file has only the unnamed sheet.
func TestReadTextUnknownSheet(t *testing.T) {
	b, err := readOpen("pipe.csv", readFixture(t, "pipe.csv"))
	if err != nil {
		t.Fatal(err)
	}
	_, err = b.Table("Diodes")
	fe := readWantErr(t, err, "pipe.csv", ErrUnknownSheet)
	if !strings.Contains(fe.Error(), `no sheet "Diodes"`) {
		t.Errorf("error %q does not name the sheet", fe)
	}
}

// TestReadLateWindows1252 checks a file whose first 64 KiB are ASCII and
// which has Windows-1252 bytes only further on: the UTF-8 decoder reads
// those bytes as Windows-1252 instead of producing invalid text.
func TestReadLateWindows1252(t *testing.T) {
	var buf bytes.Buffer
	buf.WriteString("mpn;note\n")
	n := 0
	for buf.Len() < 100<<10 {
		n++
		fmt.Fprintf(&buf, "P-%d;plain ascii text\n", n)
	}
	buf.WriteString("P-last;\xb5A at 85\xb0C\n")
	rows := readAllRows(t, "late.csv", buf.Bytes())
	last := rows[len(rows)-1]
	want := readRow{n + 2, []string{"P-last", "µA at 85°C"}}
	readCompare(t, "late.csv", []readRow{last}, []readRow{want})
	for _, r := range rows {
		for _, c := range r.Cells {
			if !utf8.ValidString(c) {
				t.Fatalf("row %d: invalid UTF-8 %q", r.Row, c)
			}
		}
	}
}

// readAllRows opens data and reads its single sheet.
func readAllRows(t *testing.T, name string, data []byte) []readRow {
	t.Helper()
	_, sheets := readSheets(t, name, data)
	return sheets[""]
}

// TestReadTextEncodings checks encoding detection on small inputs,
// including UTF-16 without a byte order mark.
func TestReadTextEncodings(t *testing.T) {
	const text = "mpn,desc\nD-1,40 V µ°\n"
	want := []readRow{{1, []string{"mpn", "desc"}}, {2, []string{"D-1", "40 V µ°"}}}
	u16 := func(o xunicode.Endianness, bom xunicode.BOMPolicy) []byte {
		b, err := xunicode.UTF16(o, bom).NewEncoder().Bytes([]byte(text))
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	cp, err := charmap.Windows1252.NewEncoder().Bytes([]byte(text))
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		data []byte
		enc  textEncoding
	}{
		{"utf8", []byte(text), encUTF8},
		{"utf8-bom", append([]byte{0xEF, 0xBB, 0xBF}, text...), encUTF8},
		{"utf16le-bom", u16(xunicode.LittleEndian, xunicode.UseBOM), encUTF16LE},
		{"utf16be-bom", u16(xunicode.BigEndian, xunicode.UseBOM), encUTF16BE},
		{"utf16le-nobom", u16(xunicode.LittleEndian, xunicode.IgnoreBOM), encUTF16LE},
		{"utf16be-nobom", u16(xunicode.BigEndian, xunicode.IgnoreBOM), encUTF16BE},
		{"windows-1252", cp, encWindows1252},
	}
	// Mostly UTF-8 with one stray Windows-1252 byte: read as UTF-8, the
	// stray byte as Windows-1252.
	mixed := []byte("mpn,desc\nD-1,40 V µ°\nD-2,Ω \xb5A\n")
	if got, _ := detectEncoding(mixed, true); got != encUTF8 {
		t.Errorf("mixed: detectEncoding = %v, want UTF-8", got)
	}
	readCompare(t, "mixed", readAllRows(t, "mixed.csv", mixed), append(want, readRow{3, []string{"D-2", "Ω µA"}}))
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got, _ := detectEncoding(tt.data, true); got != tt.enc {
				t.Errorf("detectEncoding = %v, want %v", got, tt.enc)
			}
			readCompare(t, tt.name, readAllRows(t, tt.name+".csv", tt.data), want)
		})
	}
}

// TestReadUTF8Fallback drives the UTF-8/Windows-1252 transformer through
// every split of its input, so sequences cut between chunks are handled.
func TestReadUTF8Fallback(t *testing.T) {
	tests := []struct{ in, want string }{
		{"plain", "plain"},
		{"µΩ°", "µΩ°"},
		{"\xb5A \xb0C", "µA °C"},
		{"mixed µ and \xb5", "mixed µ and µ"},
		{"cut \xe2\x82", "cut â‚"},         // an incomplete sequence at the end
		{"\xe2\x82\xac", "€"},              // a complete one
		{"\xed\xa0\x80", "í\u00a0€"},       // a UTF-16 surrogate is not valid UTF-8
		{"\xf0\x9f\x94\x8c", "\U0001F50C"}, // four bytes
		{"\x81\x8d", "\ufffd\ufffd"},       // undefined in Windows-1252
	}
	for _, tt := range tests {
		got, _, err := transform.String(utf8Fallback{}, tt.in)
		if err != nil || got != tt.want {
			t.Errorf("%q: got %q, %v; want %q", tt.in, got, err, tt.want)
		}
		// Through a reader fed one byte at a time.
		r := transform.NewReader(&readOneByte{s: tt.in}, utf8Fallback{})
		var sb strings.Builder
		buf := make([]byte, 3)
		for {
			n, err := r.Read(buf)
			sb.Write(buf[:n])
			if err != nil {
				break
			}
		}
		if sb.String() != tt.want {
			t.Errorf("%q byte by byte: got %q, want %q", tt.in, sb.String(), tt.want)
		}
	}
}

// readOneByte is a reader that returns one byte per call.
type readOneByte struct {
	s string
	i int
}

func (r *readOneByte) Read(p []byte) (int, error) {
	if r.i >= len(r.s) {
		return 0, io.EOF
	}
	if len(p) == 0 {
		return 0, nil
	}
	p[0] = r.s[r.i]
	r.i++
	return 1, nil
}

// TestReadSniffDelimiter checks the delimiter sniffer on samples.
func TestReadSniffDelimiter(t *testing.T) {
	tests := []struct {
		name   string
		sample string
		def    byte
		want   byte
	}{
		{"comma", "a,b,c\n1,2,3\n", ',', ','},
		{"semicolon", "a;b;c\n1;2;3\n", ',', ';'},
		{"tab", "a\tb\n1\t2\n", ',', '\t'},
		{"pipe", "a|b\n1|2\n", ',', '|'},
		{"decimal comma", "a;b;c\n1,5;2,5;3\n4,5;5,5;6\n", ',', ';'},
		{"quoted commas", "a;b\n\"x, y, z\";2\n\"p, q\";3\n", ',', ';'},
		{"quoted newline", "a;b\n\"x;\ny;z\";2\n3;4\n", ',', ';'},
		{"single column csv", "mpn\nD1\nD2\n", ',', ','},
		{"single column tsv", "mpn\nD1\nD2\n", '\t', '\t'},
		{"tsv tie prefers tab", "a,b\tc,d\n1,2\t3,4\n", '\t', '\t'},
		{"more columns win a tie", "a,b;c,d,e\n1,2;3,4,5\n", ',', ','},
		{"blank lines ignored", "\n\na,b\n\n1,2\n", ',', ','},
		{"ragged but mostly consistent", "title\n\nmpn;v;i;pkg\nD1;1;2;x\nD2;3;4\nD3;5;6;y\n", ',', ';'},
		{"empty", "", ',', ','},
	}
	for _, tt := range tests {
		if got := sniffDelimiter([]byte(tt.sample), tt.def); got != tt.want {
			t.Errorf("%s: sniffDelimiter = %q, want %q", tt.name, got, tt.want)
		}
	}
}

// TestReadFieldCounts checks the quote-aware field counter.
func TestReadFieldCounts(t *testing.T) {
	tests := []struct {
		sample string
		want   []int
	}{
		{"a,b,c\n1,2\n", []int{3, 2}},
		{"\"a,b\",c\n", []int{2}},
		{"\"a\"\"b,c\",d\n", []int{2}},
		{"\"a\nb,c\",d\ne\n", []int{2, 1}},
		{"a \"b,c\",d\n", []int{3}},     // a quote inside an unquoted field is literal
		{"\"a\"b,c\",d\n", []int{2}},    // lazy: the quote after a is literal
		{"\n\n,\n", []int{2}},           // blank lines do not count
		{"a,b\r\nc,d\r\n", []int{2, 2}}, // CRLF
		{"a,b", []int{2}},               // no final line end
	}
	for _, tt := range tests {
		got := fieldCounts([]byte(tt.sample), ',', 50)
		if fmt.Sprint(got) != fmt.Sprint(tt.want) {
			t.Errorf("fieldCounts(%q) = %v, want %v", tt.sample, got, tt.want)
		}
	}
	if got := fieldCounts([]byte(strings.Repeat("a,b\n", 100)), ',', 50); len(got) != 50 {
		t.Errorf("fieldCounts kept %d records, want 50", len(got))
	}
}

// TestReadRecordTooLong: an opening quote that is never closed makes the
// rest of the file one field; the reader stops at MaxRecordBytes with a
// clear error instead of holding the file in memory.
func TestReadRecordTooLong(t *testing.T) {
	defer func(old int64) { MaxRecordBytes = old }(MaxRecordBytes)
	MaxRecordBytes = 1 << 10
	data := "mpn,desc\nD-1,ok\nD-2,\"never closed\n" + strings.Repeat("filler line\n", 1000)
	b, err := readOpen("quote.csv", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	rows, err := readTable(b, "")
	fe := readWantErr(t, err, "quote.csv", ErrTooLarge)
	if fe.Row != 3 {
		t.Errorf("error row = %d, want 3: %v", fe.Row, fe)
	}
	if len(rows) != 2 {
		t.Errorf("read %d rows before the error, want 2", len(rows))
	}
	// Also when the first field is the unterminated one.
	b, err = readOpen("quote.csv", []byte("a,b\n\"open\n"+strings.Repeat("x\n", 2000)))
	if err != nil {
		t.Fatal(err)
	}
	_, err = readTable(b, "")
	fe = readWantErr(t, err, "quote.csv", ErrTooLarge)
	if fe.Row != 2 {
		t.Errorf("error row = %d, want 2: %v", fe.Row, fe)
	}
}

// TestReadTextErrors checks files that are not delimited text.
func TestReadTextErrors(t *testing.T) {
	random := make([]byte, 4096)
	x := uint32(2463534242)
	for i := range random { // xorshift32: fixed pseudo-random bytes
		x ^= x << 13
		x ^= x >> 17
		x ^= x << 5
		random[i] = byte(x)
	}
	tests := []struct {
		name string
		data []byte
		kind error
		msg  string
	}{
		{"empty.csv", nil, ErrEmpty, "empty.csv: empty"},
		{"blank.csv", readFixture(t, "blank.csv"), ErrEmpty, "blank.csv: empty"},
		{"bom.csv", []byte{0xEF, 0xBB, 0xBF}, ErrEmpty, "bom.csv: empty"},
		{"bom16.csv", []byte{0xFF, 0xFE, ' ', 0, '\n', 0}, ErrEmpty, "bom16.csv: empty"},
		{"spaces.csv", bytes.Repeat([]byte(" \n"), 50<<10), ErrEmpty, "spaces.csv: empty"},
		{"random.csv", random, ErrNotSpreadsheet, "random.csv: not a spreadsheet (binary data, not text)"},
		{"nul.csv", []byte("mpn,v\nD1,\x00\x00\n"), ErrNotSpreadsheet, "nul.csv: not a spreadsheet (binary data, not text)"},
		{"old.xls", append([]byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1}, make([]byte, 504)...), ErrEncrypted,
			"old.xls: encrypted or legacy .xls workbook: save it as .xlsx or CSV"},
		{"page.xls", []byte("\r\n<!DOCTYPE html><html><table><tr><td>mpn</td></tr></table></html>"), ErrNotSpreadsheet,
			"page.xls: not a spreadsheet (an HTML or XML document): save it as .xlsx or CSV"},
		{"xml2003.xls", []byte("\xef\xbb\xbf<?xml version=\"1.0\"?>\n<Workbook/>"), ErrNotSpreadsheet, ""},
		{"gzip.csv", []byte{0x1f, 0x8b, 0x08, 0x00, 0x00, 0x00, 0x00, 0x00, 0x00, 0x03, 0x01, 0x02}, ErrNotSpreadsheet, ""},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := readOpen(tt.name, tt.data)
			readWantErr(t, err, tt.name, tt.kind)
			if tt.msg != "" && err.Error() != tt.msg {
				t.Errorf("error %q, want %q", err, tt.msg)
			}
		})
	}
}

// TestReadBlankAfterHead: white space past the sniffed 64 KiB, then text,
// is not empty.
func TestReadBlankAfterHead(t *testing.T) {
	data := append(bytes.Repeat([]byte("\n"), 70<<10), "mpn,v\nD1,2\n"...)
	rows := readAllRows(t, "late.csv", data)
	want := []readRow{{70<<10 + 1, []string{"mpn", "v"}}, {70<<10 + 2, []string{"D1", "2"}}}
	readCompare(t, "late.csv", rows, want)
}

// TestReadTextReuseRows: after reuseRows a text table hands out each row
// in the CSV reader's own slice (no copy: the next row lands in the same
// array) with the same cells as the copying reader, and rows returned
// before the switch are copies that later reads leave alone.
func TestReadTextReuseRows(t *testing.T) {
	data := readFixture(t, "pipe.csv")
	b, err := readOpen("pipe.csv", data)
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	want, err := readTable(b, "")
	if err != nil {
		t.Fatal(err)
	}
	if len(want) < 3 {
		t.Fatalf("fixture has %d rows, want at least 3", len(want))
	}
	tbl, err := b.Table("")
	if err != nil {
		t.Fatal(err)
	}
	defer tbl.Close()
	r, ok := tbl.(rowReuser)
	if !ok {
		t.Fatalf("%T cannot reuse its rows", tbl)
	}
	first, _, err := tbl.Next()
	if err != nil {
		t.Fatal(err)
	}
	kept := slices.Clone(first)
	r.reuseRows()
	var prev []string
	for i := 1; i < len(want); i++ {
		cells, row, err := tbl.Next()
		if err != nil {
			t.Fatalf("row %d: %v", i, err)
		}
		if row != want[i].Row || !slices.Equal(cells, want[i].Cells) {
			t.Errorf("row %d: got %d %q, want %d %q", i, row, cells, want[i].Row, want[i].Cells)
		}
		if prev != nil && &cells[0] != &prev[0] {
			t.Errorf("row %d is in a new slice, want the reader's reused one", i)
		}
		prev = cells
	}
	if !slices.Equal(first, kept) {
		t.Errorf("the row read before reuseRows changed: %q, was %q", first, kept)
	}
}
