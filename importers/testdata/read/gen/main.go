// Command gen writes the reader test fixtures of package importers: CSV/TSV
// files in several encodings and delimiters, and an XLSX workbook made with
// excelize. Run it from importers/testdata/read (make.sh does, then builds
// the LibreOffice fixtures). The expected contents live in the tests, not
// here, so that the tests check the files independently.
package main

import (
	"fmt"
	"log"
	"os"
	"time"

	"github.com/xuri/excelize/v2"
	"golang.org/x/text/encoding"
	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/encoding/unicode"
)

// textFixture is one delimited text file.
type textFixture struct {
	name string
	enc  encoding.Encoding // nil = UTF-8
	bom  []byte            // written before the encoded text
	text string
}

var (
	bomUTF8    = []byte{0xEF, 0xBB, 0xBF}
	bomUTF16LE = []byte{0xFF, 0xFE}
	bomUTF16BE = []byte{0xFE, 0xFF}
)

var texts = []textFixture{
	{name: "utf8.csv", text: "MPN,Description,V_RRM,I_F,T_j max\r\n" +
		"DX-100,\"Schottky 40 V, 1 A\",40V,1A,125 °C\r\n" +
		"DX-200,Rectifier µ-pack,200 V,1.5 A,150°C\r\n" +
		"DX-300,R_DS(on) 8.5 mΩ,30V,60A,175 °C\r\n"},
	{name: "utf8_bom.csv", bom: bomUTF8, text: "Artikel;Spannung (V);Strom (A);Preis\r\n" +
		"DS-1;40;1,5;0,12\r\n" +
		"DS-2;60;2,25;0,30\r\n"},
	{name: "utf16le.txt", enc: unicode.UTF16(unicode.LittleEndian, unicode.IgnoreBOM), bom: bomUTF16LE,
		text: "MPN\tV_DS\tR_DS(on)\tPackage\r\n" +
			"QN-30\t30 V\t8,5 mΩ\tSOT-23\r\n" +
			"QP-20\t-20 V\t45 mΩ\tSOT-23\r\n"},
	{name: "utf16be.csv", enc: unicode.UTF16(unicode.BigEndian, unicode.IgnoreBOM), bom: bomUTF16BE,
		text: "MPN,Rating,I²t\n" +
			"FT-500,500 mA,0.25 A²s\n" +
			"FT-1000,1 A,1.1 A²s\n"},
	{name: "cp1252.csv", enc: charmap.Windows1252,
		text: "Teil;Beschreibung;Strom;Temperatur\r\n" +
			"F-1;Sicherung träge;500 mA;-55…125 °C\r\n" +
			"F-2;µ-Sicherung ± 10 %;2 A;85°C\r\n"},
	{name: "tab.tsv", text: "mpn\tdescription\tvrrm\n" +
		"DX-1\tSchottky, 40 V, SMA\t40\n" +
		"DX-2\tRectifier, 1000 V\t1000\n"},
	{name: "pipe.csv", text: "mpn|vds|rdson\n" +
		"Q-1|30|0.0085\n" +
		"Q-2|60|0.012\n"},
	{name: "decimal_comma.csv", text: "mpn;vf;if\n" +
		"D1;0,55;1,5\n" +
		"D2;0,62;2,0\n"},
	{name: "quoted.csv", text: "mpn,description,note\n" +
		"DX-1,\"Schottky, 40 V\",\"line one\nline two\"\n" +
		"DX-2,\"He said \"\"fast\"\"\",plain\n" +
		"DX-3,5\" reel,\"tape \"\"and\"\" reel\"\n" +
		"DX-4,last,\"a,b\"\n"},
	{name: "ragged.csv", text: "Supplier price list (invented),,,\n" +
		"\n" +
		"mpn,vrrm,if,package,note\n" +
		"DX-1,40,1\n" +
		"DX-2,60,2,SMB,extra,more\n" +
		",,,,\n" +
		"DX-3,,3,,\n" +
		"   ,  ,\n" +
		"\n" +
		"DX-4,100,1,SMA\n"},
	{name: "cr_only.csv", text: "a,b\r1,2\r3,4\r"},
	{name: "single.tsv", text: "mpn\nDX-1\nDX-2\n"},
	{name: "blank.csv", bom: bomUTF8, text: " \r\n\t\n   \n"},
}

func main() {
	log.SetFlags(0)
	for _, tf := range texts {
		data := []byte(tf.text)
		if tf.enc != nil {
			var err error
			if data, err = tf.enc.NewEncoder().Bytes(data); err != nil {
				log.Fatalf("%s: %v", tf.name, err)
			}
		}
		if err := os.WriteFile(tf.name, append(append([]byte(nil), tf.bom...), data...), 0o644); err != nil {
			log.Fatal(err)
		}
	}
	if err := writeExcelize("excelize.xlsx"); err != nil {
		log.Fatalf("excelize.xlsx: %v", err)
	}
}

// writeExcelize writes a workbook with merged header cells (across columns
// and down rows), a category merged down three rows, a number stored as
// text, a number whose format would round it, a formula without a cached
// value, a date, a gap row, a hidden sheet, an empty sheet and a sheet
// reaching the last row.
func writeExcelize(name string) error {
	f := excelize.NewFile()
	defer f.Close()
	const s = "Diodes"
	if err := f.SetSheetName("Sheet1", s); err != nil {
		return err
	}
	twoDP, err := f.NewStyle(&excelize.Style{NumFmt: 2}) // "0.00"
	if err != nil {
		return err
	}
	dateFmt, err := f.NewStyle(&excelize.Style{NumFmt: 14}) // "mm-dd-yy"
	if err != nil {
		return err
	}
	set := func(cell string, v any) {
		if err == nil {
			err = f.SetCellValue(s, cell, v)
		}
	}
	set("A1", "MPN")
	set("B1", "Ratings")
	set("D1", "Package")
	set("B2", "V_RRM (V)")
	set("C2", "I_F (A)")
	set("A3", "DX-100")
	set("B3", 40)
	set("C3", 1.5)
	set("D3", "SMA")
	set("A4", "DX-200")
	set("B4", "60") // a number stored as text
	set("C4", 0.0085)
	set("D4", "SMB")
	set("A6", "DX-300")
	set("C6", 3)
	set("D6", "  padded  ")
	set("A8", "Schottky")
	for i, r := range [][]any{{20, 1, "SOD-123"}, {30, 2, "SOD-123"}, {40, 3, "SMA"}} {
		set(fmt.Sprintf("B%d", 8+i), r[0])
		set(fmt.Sprintf("C%d", 8+i), r[1])
		set(fmt.Sprintf("D%d", 8+i), r[2])
	}
	set("A12", time.Date(2024, 3, 5, 0, 0, 0, 0, time.UTC))
	if err != nil {
		return err
	}
	for _, st := range []struct {
		cell  string
		style int
	}{{"C4", twoDP}, {"A12", dateFmt}} {
		if err := f.SetCellStyle(s, st.cell, st.cell, st.style); err != nil {
			return err
		}
	}
	if err := f.SetCellFormula(s, "B6", "B3*2"); err != nil {
		return err
	}
	for _, m := range [][2]string{{"A1", "A2"}, {"B1", "C1"}, {"D1", "D2"}, {"A8", "A10"}} {
		if err := f.MergeCell(s, m[0], m[1]); err != nil {
			return err
		}
	}

	if _, err := f.NewSheet("Hidden"); err != nil {
		return err
	}
	if err := f.SetCellValue("Hidden", "A1", "secret"); err != nil {
		return err
	}
	if err := f.SetSheetVisible("Hidden", false); err != nil {
		return err
	}
	if _, err := f.NewSheet("Empty"); err != nil {
		return err
	}
	if _, err := f.NewSheet("Edge"); err != nil {
		return err
	}
	for cell, v := range map[string]string{"A1": "Price list", "C3": "c3", "A1048576": "last"} {
		if err := f.SetCellValue("Edge", cell, v); err != nil {
			return err
		}
	}
	if err := f.MergeCell("Edge", "A1", "F1"); err != nil {
		return err
	}
	return f.SaveAs(name)
}
