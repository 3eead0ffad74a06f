package importers

import (
	"bytes"
	"errors"
	"io"
	"strings"
	"testing"
	"testing/iotest"
)

func TestLongestText(t *testing.T) {
	long := strings.Repeat("x", 100)
	for _, tc := range []struct {
		name, xml string
		row       int
		tooLong   bool
	}{
		{"short cells", `<sheetData><row r="1"><c><v>12</v></c></row><row r="2"><c><is><t>abc</t></is></c></row></sheetData>`, 2, false},
		{"long cell in row 2", `<sheetData><row r="1"><c><v>1</v></c></row><row r="2"><c><is><t>` + long + `</t></is></c></row></sheetData>`, 2, true},
		{"long cell of > signs", `<row r="1"><c><is><t>` + strings.Repeat(">", 100) + `</t></is></c></row>`, 1, true},
		{"long attribute", `<row r="1"><c r="` + long + `"/></row>`, 1, true},
		{"CDATA hiding markup", `<row r="1"><c><is><t><![CDATA[` + strings.Repeat("<a>xxxxx", 12) + `]]></t></is></c></row>`, 1, true},
		{"short CDATA", `<row r="1"><c><is><t><![CDATA[<a>]]></t></is></c></row><row r="2"/>`, 2, false},
		{"rows element is not a row", `<rows><rowBreaks/></rows>`, 0, false},
		{"empty", ``, 0, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			for _, r := range []func(string) *strings.Reader{strings.NewReader} {
				row, err := longestText(iotest.OneByteReader(r(tc.xml)), 64)
				if tc.tooLong != errors.Is(err, errLongText) || (!tc.tooLong && err != nil) {
					t.Fatalf("err %v, want too long %v", err, tc.tooLong)
				}
				if row != tc.row {
					t.Errorf("row %d, want %d", row, tc.row)
				}
				row2, err2 := longestText(r(tc.xml), 64)
				if row2 != row || errors.Is(err2, errLongText) != errors.Is(err, errLongText) {
					t.Errorf("whole reads: row %d err %v; byte reads: row %d err %v", row2, err2, row, err)
				}
			}
		})
	}
}

// TestReadTooManyColumns: a CSV record wider than MaxColumns is refused
// naming its row; trailing empty cells do not count.
func TestReadTooManyColumns(t *testing.T) {
	wide := "mfr,mpn\nA,B" + strings.Repeat(",x", MaxColumns) + "\n"
	b, err := readOpen("wide.csv", []byte(wide))
	if err != nil {
		t.Fatal(err)
	}
	_, err = readTable(b, "")
	readWantErr(t, err, "wide.csv", ErrTooLarge)
	if err == nil || !strings.Contains(err.Error(), "wide.csv, row 2: too large: 16386 columns") {
		t.Errorf("error %v", err)
	}
	empty := "mfr,mpn\nA,B" + strings.Repeat(",", 2*MaxColumns) + "\n"
	if b, err = readOpen("empty.csv", []byte(empty)); err == nil {
		_, err = readTable(b, "")
	}
	if err != nil {
		t.Errorf("trailing empty cells: %v", err)
	}
}

// naiveLongestText is longestText written plainly on a whole buffer, the
// reference for FuzzLongestText.
func naiveLongestText(data []byte, max int64) (int, bool) {
	row, run, cdata := 0, int64(0), false
	for i := 0; i < len(data); i++ {
		run++
		if run > max {
			return row, true
		}
		if cdata {
			if data[i] == '>' && i >= 2 && data[i-1] == ']' && data[i-2] == ']' && run >= 3+8 {
				cdata = false
			}
			continue
		}
		if data[i] != '<' {
			continue
		}
		rest := data[i+1:]
		switch {
		case len(rest) >= 8 && string(rest[:8]) == "![CDATA[":
			if run+8 > max {
				return row, true
			}
			cdata, run, i = true, run+8, i+8
			continue
		case len(rest) >= 4 && string(rest[:3]) == "row" && isTagNameEnd(rest[3]):
			row++
		}
		run = 0
	}
	return row, false
}

// FuzzLongestText: the streaming scan agrees with the plain one, whatever
// the bytes and however the reader splits them.
func FuzzLongestText(f *testing.F) {
	for _, s := range []string{"", "<row r=\"1\"><c><v>1</v></c></row>", "<![CDATA[<<<>>>]]>xx", "<row><![CDATA[]]]]>", "]]><![CDATA[", "<row\t/><row>" + strings.Repeat("a", 40)} {
		f.Add([]byte(s), uint8(16), false)
	}
	f.Fuzz(func(t *testing.T, data []byte, max uint8, oneByte bool) {
		var r io.Reader = bytes.NewReader(data)
		if oneByte {
			r = iotest.OneByteReader(r)
		}
		row, err := longestText(r, int64(max))
		if err != nil && !errors.Is(err, errLongText) {
			t.Fatal(err)
		}
		wantRow, wantLong := naiveLongestText(data, int64(max))
		if errors.Is(err, errLongText) != wantLong || row != wantRow {
			t.Fatalf("longestText = row %d, %v; plain scan row %d, too long %v", row, err, wantRow, wantLong)
		}
	})
}

// TestReadXLSXTooManyColumns: cells without a reference are placed one
// after another; a row that runs past MaxColumns is refused naming it.
func TestReadXLSXTooManyColumns(t *testing.T) {
	defer func(old int) { MaxColumns = old }(MaxColumns)
	MaxColumns = 100
	data := readRewrite(t, readFixture(t, "excelize.xlsx"), func(name string, c []byte) []byte {
		if name == "xl/worksheets/sheet1.xml" {
			i := bytes.Index(c, []byte("<sheetData>")) + len("<sheetData>")
			j := bytes.Index(c, []byte("</sheetData>"))
			row := `<row r="1"><c t="inlineStr"><is><t>mfr</t></is></c>` + strings.Repeat(`<c t="inlineStr"><is><t>n</t></is></c>`, 100) + `</row>`
			return append(append(append([]byte(nil), c[:i]...), row...), c[j:]...)
		}
		return c
	})
	b, err := readOpen("wide.xlsx", data)
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	_, err = readTable(b, "Diodes")
	readWantErr(t, err, "wide.xlsx", ErrTooLarge)
	if err == nil || !strings.Contains(err.Error(), `wide.xlsx, sheet "Diodes", row 1: too large: 101 columns`) {
		t.Errorf("error %v", err)
	}
}
