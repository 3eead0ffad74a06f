package importers

import (
	"archive/zip"
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"
)

// readFuzzStrict makes a panic that the XLSX reader recovered from fail the
// fuzz targets, to find such inputs: READ_FUZZ_STRICT=1 go test -fuzz ...
var readFuzzStrict = os.Getenv("READ_FUZZ_STRICT") != ""

// readCheckBook reads every sheet of whatever OpenBook makes of data and
// checks the reader's promises: only *FileError errors, row numbers
// rising within a sheet and within the sheet size, valid UTF-8 cells, no
// blank rows and no trailing empty cells.
func readCheckBook(t *testing.T, name string, data []byte) {
	checkErr := func(err error) {
		t.Helper()
		var fe *FileError
		if !errors.As(err, &fe) {
			t.Fatalf("error %T %q is not a *FileError", err, err)
		}
		if fe.File != name {
			t.Fatalf("error %q does not name the file", err)
		}
		if readFuzzStrict && fe.Err != nil && strings.Contains(fe.Err.Error(), "XLSX reader failed") {
			t.Fatalf("recovered panic: %v", err)
		}
	}
	b, err := readOpen(name, data)
	if err != nil {
		checkErr(err)
		return
	}
	defer func() {
		if err := b.Close(); err != nil {
			t.Fatalf("Close: %v", err)
		}
	}()
	if _, err := b.Table("\x00no such sheet"); err == nil {
		t.Fatal("Table of an unknown sheet gave no error")
	}
	for _, s := range b.Sheets() {
		tb, err := b.Table(s)
		if err != nil {
			checkErr(err)
			continue
		}
		last := 0
		for {
			cells, row, err := tb.Next()
			if err == io.EOF {
				break
			}
			if err != nil {
				checkErr(err)
				if _, _, again := tb.Next(); again == nil {
					t.Fatal("Next succeeded after an error")
				}
				break
			}
			if row <= last || row > 1<<20 {
				t.Fatalf("sheet %q: row %d after row %d", s, row, last)
			}
			last = row
			if len(cells) == 0 || cells[len(cells)-1] == "" {
				t.Fatalf("row %d: blank or trailing empty cell: %q", row, cells)
			}
			blank := true
			for _, c := range cells {
				if !utf8.ValidString(c) {
					t.Fatalf("row %d: invalid UTF-8 %q", row, c)
				}
				if strings.TrimSpace(c) != "" {
					blank = false
				}
			}
			if blank {
				t.Fatalf("row %d: blank row returned: %q", row, cells)
			}
		}
		if err := tb.Close(); err != nil {
			t.Fatalf("Table.Close: %v", err)
		}
	}
}

// readSeeds adds the fixture files whose names match pattern.
func readSeeds(f *testing.F, pattern string) {
	files, err := filepath.Glob(filepath.Join(readDir, pattern))
	if err != nil || len(files) == 0 {
		f.Fatalf("no seeds %s: %v", pattern, err)
	}
	for _, p := range files {
		data, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
}

// FuzzReadCSV feeds arbitrary bytes to the text reader as a .csv file.
func FuzzReadCSV(f *testing.F) {
	readSeeds(f, "*.csv")
	readSeeds(f, "*.tsv")
	readSeeds(f, "*.txt")
	for _, s := range []string{"", "\"", "a,\"b\nc", "\xff\xfe\x00", "\xfe\xff\xd8\x00", "a;b\r\r\n\"", "\xef\xbb\xbf\n\n"} {
		f.Add([]byte(s))
	}
	defer func(old int64) { MaxRecordBytes = old }(MaxRecordBytes)
	MaxRecordBytes = 1 << 16
	f.Fuzz(func(t *testing.T, data []byte) {
		readCheckBook(t, "fuzz.csv", data)
	})
}

// FuzzReadXLSX feeds arbitrary bytes to the reader as an .xlsx file,
// seeded with the XLSX fixtures. The unpacked size is capped at 64 MiB so
// that a mutated directory cannot make one run allocate more.
func FuzzReadXLSX(f *testing.F) {
	readSeeds(f, "*.xlsx")
	readSeeds(f, "*.ods")
	defer func(old int64) { UnzipSizeLimit = old }(UnzipSizeLimit)
	UnzipSizeLimit = 64 << 20
	f.Fuzz(func(t *testing.T, data []byte) {
		readCheckBook(t, "fuzz.xlsx", data)
	})
}

// FuzzReadXLSXParts fuzzes the XML inside a workbook, which FuzzReadXLSX
// seldom reaches because almost every mutation of packed data breaks the
// ZIP checksums. The input is the first worksheet's XML, optionally
// followed by a NUL byte and the shared strings XML; the test packs it into
// the excelize fixture in place of the original parts.
func FuzzReadXLSXParts(f *testing.F) {
	base := readUnzip(f, readFixture(f, "excelize.xlsx"))
	// The "Edge" sheet reaches row 1,048,576, which costs a million
	// iterations per run; the fuzzer gets further with a small sheet.
	base["xl/worksheets/sheet4.xml"] = base["xl/worksheets/sheet2.xml"]
	for _, name := range []string{"excelize.xlsx", "lo_workbook.xlsx", "lo_csv.xlsx"} {
		parts := readUnzip(f, readFixture(f, name))
		f.Add(append(append(parts["xl/worksheets/sheet1.xml"], 0), parts["xl/sharedStrings.xml"]...))
	}
	f.Add([]byte(`<worksheet><sheetData><row r="3"><c r="B3" t="s"><v>7</v></c></row></sheetData>` +
		`<mergeCells><mergeCell ref="A1:XFD1048576"/><mergeCell ref="B3:C9"/></mergeCells></worksheet>`))
	defer func(old int64) { UnzipSizeLimit = old }(UnzipSizeLimit)
	UnzipSizeLimit = 64 << 20
	f.Fuzz(func(t *testing.T, data []byte) {
		sheet, sst, _ := bytes.Cut(data, []byte{0})
		readCheckBook(t, "fuzz.xlsx", readReplaceParts(t, base, map[string][]byte{
			"xl/worksheets/sheet1.xml": sheet,
			"xl/sharedStrings.xml":     sst,
		}))
	})
}

// readUnzip returns the unpacked parts of a ZIP archive by name.
func readUnzip(t testing.TB, data []byte) map[string][]byte {
	t.Helper()
	zr, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	parts := map[string][]byte{}
	for _, zf := range zr.File {
		rc, err := zf.Open()
		if err != nil {
			t.Fatal(err)
		}
		parts[zf.Name], err = io.ReadAll(rc)
		rc.Close()
		if err != nil {
			t.Fatal(err)
		}
	}
	return parts
}

// readReplaceParts packs parts into a ZIP archive, with some of them
// replaced, storing every part uncompressed.
func readReplaceParts(t testing.TB, parts, repl map[string][]byte) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for name, content := range parts {
		if r, ok := repl[name]; ok {
			content = r
		}
		w, err := zw.CreateHeader(&zip.FileHeader{Name: name, Method: zip.Store})
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
