// Command gen_excelize writes the excelize-made import fixture
// excelize_book.xlsx: a notes sheet without a header, a diode sheet with a
// title row and a two-row header (group headers merged over sub-headers,
// "Part number" merged down two rows), numbers stored as numbers and as
// text, and a fuse sheet with a plain header. Run from the repository root:
//
//	go run ./importers/testdata/import/gen_excelize
package main

import (
	"log"

	"github.com/xuri/excelize/v2"
)

func main() {
	f := excelize.NewFile()
	defer f.Close()
	must := func(err error) {
		if err != nil {
			log.Fatal(err)
		}
	}
	must(f.SetSheetName("Sheet1", "Read me"))
	must(f.SetCellValue("Read me", "A1", "Brightwater Devices stock list"))
	must(f.SetCellValue("Read me", "A3", "Diodes and fuses are on the next sheets."))

	// Diodes: title, blank row, two-row header, data, footer
	d := "Diodes"
	_, err := f.NewSheet(d)
	must(err)
	must(f.SetCellValue(d, "A1", "Brightwater Devices - diodes (values at 25 °C unless stated)"))
	must(f.SetSheetRow(d, "A3", &[]any{"Part number", "Manufacturer", "Type", "VRRM (V)", "IF(AV) (A)", "V_F", "", "I_R", "", "Package", "Unit price 1+ (USD)", "Unit price 100+ (USD)"}))
	must(f.SetSheetRow(d, "A4", &[]any{"", "", "", "", "", "max (V)", "@ I_F (A)", "max (µA)", "@ V_R (V)", "", "", ""}))
	for _, r := range []string{"A3:A4", "B3:B4", "C3:C4", "D3:D4", "E3:E4", "F3:G3", "H3:I3", "J3:J4", "K3:K4", "L3:L4"} {
		must(f.MergeCell(d, r[:2], r[3:]))
	}
	rows := [][]any{
		{"BS560", "Brightwater Devices", "Schottky", 60, 5, 0.7, 5, 200, 60, "SMC", 0.38, 0.21},
		{"BS1100", "Brightwater Devices", "Schottky", 100, 1, 0.85, 1, 50, 100, "SMA", 0.12, 0.06},
		{"BR3010", "Brightwater Devices", "Rectifier", 1000, 3, 1.2, 3, 5, 1000, "DO-201AD", 0.09, 0.05},
		{"BZ12", "Brightwater Devices", "Zener", "", "", 0.9, 0.01, "", "", "SOD-123", 0.03, 0.015},
	}
	for i, r := range rows {
		cell, _ := excelize.CoordinatesToCellName(1, 5+i)
		must(f.SetSheetRow(d, cell, &r))
	}
	// the Zener's V_Z in a column of its own, written as text with its unit
	must(f.SetCellValue(d, "M3", "VZ"))
	must(f.SetCellValue(d, "M8", "12 V"))
	must(f.SetCellValue(d, "A10", "Prices in USD, subject to change."))

	// Fuses: plain header in row 1, one value stored as text
	u := "Fuses"
	_, err = f.NewSheet(u)
	must(err)
	must(f.SetSheetRow(u, "A1", &[]any{"Mfr", "MPN", "Description", "In (A)", "Un DC (V)", "Breaking capacity (A)", "I2t (A2s)", "Speed", "Stock"}))
	must(f.SetSheetRow(u, "A2", &[]any{"Lumen Fuseworks", "LS1206-3", "SMD fuse 1206, very fast-acting", 3, 63, 50, 0.35, "FF", 5000}))
	must(f.SetSheetRow(u, "A3", &[]any{"Lumen Fuseworks", "LS1206-1", "SMD fuse 1206, fast-acting", 1, 63, 50, "0.042", "F", 12000}))
	f.SetActiveSheet(1)
	must(f.SaveAs("importers/testdata/import/excelize_book.xlsx"))
}
