#!/bin/sh
# Converts mosfets_lo.csv into ../libreoffice_mosfets.xlsx with LibreOffice,
# so the import tests cover a workbook written by another program than
# excelize (numbers typed by LibreOffice's CSV filter, its own XML layout).
# Run from this directory; needs soffice (Debian package libreoffice-calc).
set -e
out=$(mktemp -d)
soffice --headless --infilter="CSV:44,34,76,1" --convert-to xlsx --outdir "$out" mosfets_lo.csv
mv "$out/mosfets_lo.xlsx" ../libreoffice_mosfets.xlsx
rmdir "$out"
