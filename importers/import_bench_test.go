package importers

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"github.com/xuri/excelize/v2"

	"partsieve/catalog"
)

const benchRows = 100_000

// benchHeader is a realistic mixed sheet: symbols with units in headers,
// a category column, test conditions, offers with three price breaks.
var benchHeader = []string{"Category", "Mfr", "Part number", "Description", "Package", "VRRM (V)", "IF(AV) (A)",
	"VF max @ IF (V)", "VDS (V)", "RDS(on) max @ 10V (mΩ)", "ID (A)", "In (A)", "Breaking capacity (A)",
	"Tj max (°C)", "Supplier", "SKU", "Stock", "1+ (EUR)", "10+ (EUR)", "100+ (EUR)"}

func benchRow(i int) []string {
	mfr := fmt.Sprintf("Maker %02d", i%37)
	price := func(f float64) string { return fmt.Sprintf("%.4f", f*(1+float64(i%100)/100)) }
	base := []string{"", mfr, fmt.Sprintf("BP%06d", i), "", "", "", "", "", "", "", "", "", "", "", "Bench Supply", fmt.Sprintf("BS-%06d", i), fmt.Sprint(i % 5000), price(0.2), price(0.15), price(0.1)}
	switch i % 3 {
	case 0:
		base[0], base[3], base[4] = "Schottky", "Schottky rectifier", "SMA"
		base[5], base[6], base[7], base[13] = fmt.Sprint(20+i%180), fmt.Sprint(1+i%10), "0.55", "150"
	case 1:
		base[0], base[3], base[4] = "N-channel MOSFET", "Trench MOSFET", "SOT-23"
		base[8], base[9], base[10], base[13] = fmt.Sprint(20+i%80), fmt.Sprint(3+i%300), fmt.Sprint(1+i%60), "175"
	default:
		base[0], base[3], base[4] = "Fuse, slow-blow", "Cartridge fuse 5x20 IEC 60127", "5x20"
		base[11], base[12] = fmt.Sprint(1+i%20), "1500"
	}
	return base
}

var benchFiles struct {
	once      sync.Once
	csv, xlsx string
	err       error
}

// benchData writes the 100,000-row CSV and XLSX once per test binary.
func benchData(b *testing.B) (csvPath, xlsxPath string) {
	benchFiles.once.Do(func() {
		dir, err := os.MkdirTemp("", "partsieve-bench")
		if err != nil {
			benchFiles.err = err
			return
		}
		var buf bytes.Buffer
		buf.WriteString("Bench price list, generated\n\n")
		writeCSVRow(&buf, benchHeader)
		for i := 0; i < benchRows; i++ {
			writeCSVRow(&buf, benchRow(i))
		}
		benchFiles.csv = filepath.Join(dir, "bench.csv")
		if benchFiles.err = os.WriteFile(benchFiles.csv, buf.Bytes(), 0o644); benchFiles.err != nil {
			return
		}
		f := excelize.NewFile()
		sw, err := f.NewStreamWriter("Sheet1")
		if err != nil {
			benchFiles.err = err
			return
		}
		row := func(n int, cells []string) error {
			vals := make([]any, len(cells))
			for i, c := range cells {
				vals[i] = c
			}
			cell, _ := excelize.CoordinatesToCellName(1, n)
			return sw.SetRow(cell, vals)
		}
		if benchFiles.err = row(1, benchHeader); benchFiles.err != nil {
			return
		}
		for i := 0; i < benchRows; i++ {
			if benchFiles.err = row(i+2, benchRow(i)); benchFiles.err != nil {
				return
			}
		}
		if benchFiles.err = sw.Flush(); benchFiles.err != nil {
			return
		}
		benchFiles.xlsx = filepath.Join(dir, "bench.xlsx")
		benchFiles.err = f.SaveAs(benchFiles.xlsx)
		f.Close()
	})
	if benchFiles.err != nil {
		b.Fatal(benchFiles.err)
	}
	return benchFiles.csv, benchFiles.xlsx
}

func writeCSVRow(buf *bytes.Buffer, cells []string) {
	for i, c := range cells {
		if i > 0 {
			buf.WriteByte(',')
		}
		if bytes.ContainsAny([]byte(c), ",\"\n") {
			fmt.Fprintf(buf, "%q", c)
		} else {
			buf.WriteString(c)
		}
	}
	buf.WriteByte('\n')
}

func benchImport(b *testing.B, path string, intoStore bool) {
	b.ReportAllocs()
	b.ResetTimer()
	var rows int
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		var st *catalog.Store
		if intoStore {
			var err error
			st, err = catalog.Open(context.Background(), filepath.Join(b.TempDir(), "bench.db"))
			if err != nil {
				b.Fatal(err)
			}
		}
		b.StartTimer()
		s, err := ImportFile(context.Background(), st, path, Options{})
		if err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		if s.Added != benchRows || s.Rejected != 0 {
			b.Fatalf("added %d rejected %d (%+v)", s.Added, s.Rejected, s.Rejects[:min(3, len(s.Rejects))])
		}
		rows += s.Read
		if st != nil {
			st.Close()
		}
		b.StartTimer()
	}
	b.ReportMetric(float64(rows)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkImportCSV imports a generated 100,000-row CSV into a new
// catalog (one SQLite transaction plus the text index).
func BenchmarkImportCSV(b *testing.B) {
	csvPath, _ := benchData(b)
	benchImport(b, csvPath, true)
}

// BenchmarkImportXLSX imports the same rows from an XLSX workbook.
func BenchmarkImportXLSX(b *testing.B) {
	_, xlsxPath := benchData(b)
	benchImport(b, xlsxPath, true)
}

// BenchmarkCheckCSV reads, recognises and converts the CSV without a
// store: the importer's own cost.
func BenchmarkCheckCSV(b *testing.B) {
	csvPath, _ := benchData(b)
	benchImport(b, csvPath, false)
}

// BenchmarkCheckXLSX reads, recognises and converts the XLSX without a
// store.
func BenchmarkCheckXLSX(b *testing.B) {
	_, xlsxPath := benchData(b)
	benchImport(b, xlsxPath, false)
}
