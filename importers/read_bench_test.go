package importers

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/xuri/excelize/v2"
)

// readBenchRows and readBenchCols size the benchmark sheets.
const (
	readBenchRows = 100_000
	readBenchCols = 20
)

// readBenchRow returns row i (0 = header) of the benchmark sheet: text,
// values with units and plain numbers, like a supplier list.
func readBenchRow(i int) []any {
	if i == 0 {
		row := make([]any, readBenchCols)
		for c := range row {
			row[c] = fmt.Sprintf("Column %d (unit)", c+1)
		}
		return row
	}
	row := []any{
		fmt.Sprintf("BX%06d-T", i), "Invented Semi Ltd", "Schottky rectifier, low V_F",
		"SOD-123", fmt.Sprintf("%d V", 20+i%180), fmt.Sprintf("%d.%d A", 1+i%5, i%10),
		0.35 + float64(i%40)/100, float64(i%7) * 1e-6, 125 + i%50, "-55 to 150 °C",
		fmt.Sprintf("%d mΩ", 5+i%90), "tape & reel", 3000, 0.0123 + float64(i%100)/1000,
		"EUR", i % 250000, "RoHS", "active", "batch 2025-06", strconv.Itoa(i),
	}
	return row[:readBenchCols]
}

// readBenchFile opens a benchmark file and reads every row, returning the
// number of rows.
func readBenchFile(b *testing.B, path string) int {
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		b.Fatal(err)
	}
	book, err := OpenBook(filepath.Base(path), f, st.Size())
	if err != nil {
		b.Fatal(err)
	}
	defer book.Close()
	t, err := book.Table(book.Sheets()[0])
	if err != nil {
		b.Fatal(err)
	}
	defer t.Close()
	n := 0
	for {
		cells, _, err := t.Next()
		if err == io.EOF {
			return n
		}
		if err != nil {
			b.Fatal(err)
		}
		if len(cells) != readBenchCols {
			b.Fatalf("row %d has %d cells", n+1, len(cells))
		}
		n++
	}
}

// BenchmarkReadCSV reads a 100,000-row × 20-column CSV file (about 16 MB)
// generated at the start.
func BenchmarkReadCSV(b *testing.B) {
	path := filepath.Join(b.TempDir(), "bench.csv")
	f, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	w := bufio.NewWriter(f)
	for i := 0; i <= readBenchRows; i++ {
		for c, v := range readBenchRow(i) {
			if c > 0 {
				w.WriteByte(',')
			}
			s := fmt.Sprint(v)
			if strings.ContainsAny(s, ",\"") {
				s = `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
			}
			w.WriteString(s)
		}
		w.WriteString("\r\n")
	}
	if err := w.Flush(); err != nil {
		b.Fatal(err)
	}
	if err := f.Close(); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	runs := 0
	for b.Loop() {
		if n := readBenchFile(b, path); n != readBenchRows+1 {
			b.Fatalf("read %d rows, want %d", n, readBenchRows+1)
		}
		runs++
	}
	b.ReportMetric(float64(runs*(readBenchRows+1))/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkReadXLSX reads a 100,000-row × 20-column workbook written with
// excelize's StreamWriter at the start (inline strings, one merged header
// range).
func BenchmarkReadXLSX(b *testing.B) {
	path := filepath.Join(b.TempDir(), "bench.xlsx")
	x := excelize.NewFile()
	sw, err := x.NewStreamWriter("Sheet1")
	if err != nil {
		b.Fatal(err)
	}
	for i := 0; i <= readBenchRows; i++ {
		cell, err := excelize.CoordinatesToCellName(1, i+1)
		if err != nil {
			b.Fatal(err)
		}
		if err := sw.SetRow(cell, readBenchRow(i)); err != nil {
			b.Fatal(err)
		}
	}
	if err := sw.MergeCell("A1", "B1"); err != nil {
		b.Fatal(err)
	}
	if err := sw.Flush(); err != nil {
		b.Fatal(err)
	}
	if err := x.SaveAs(path); err != nil {
		b.Fatal(err)
	}
	if err := x.Close(); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	runs := 0
	for b.Loop() {
		if n := readBenchFile(b, path); n != readBenchRows+1 {
			b.Fatalf("read %d rows, want %d", n, readBenchRows+1)
		}
		runs++
	}
	b.ReportMetric(float64(runs*(readBenchRows+1))/b.Elapsed().Seconds(), "rows/s")
}
