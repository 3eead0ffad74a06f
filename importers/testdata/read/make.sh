#!/bin/sh
# Regenerates the reader fixtures in this directory:
#   - CSV/TSV files and excelize.xlsx from gen/main.go;
#   - lo_workbook.xlsx and lo_workbook.ods from src/lo_workbook.fods (flat ODS
#     written by hand: merged cells, numbers stored as text, formulas with
#     cached values, a hidden sheet), and lo_csv.xlsx from utf8.csv, all
#     converted by LibreOffice.
# Run from anywhere: sh importers/testdata/read/make.sh
set -eu
cd "$(dirname "$0")"
go run ./gen
profile=$(mktemp -d)
trap 'rm -rf "$profile"' EXIT
lo() {
	soffice -env:UserInstallation="file://$profile" --headless "$@" >/dev/null 2>&1
}
lo --convert-to xlsx --outdir . src/lo_workbook.fods
lo --convert-to ods --outdir . src/lo_workbook.fods
# CSV filter options: comma (44), double quote (34), UTF-8 (76), from line 1.
lo --infilter=CSV:44,34,76,1 --convert-to xlsx:"Calc MS Excel 2007 XML" --outdir tmp.lo utf8.csv
mv tmp.lo/utf8.xlsx lo_csv.xlsx
rmdir tmp.lo
chmod 644 ./*.xlsx ./*.ods
ls -l
