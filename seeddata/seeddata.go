// Package seeddata holds the seed catalog that a new partsieve catalog is
// loaded with: a few hundred generic diodes (rectifier, Schottky, Zener,
// TVS), MOSFETs (N and P channel) and fuses (IEC 5x20 mm, UL-style
// cartridge and SMD, automotive blade), each with one or two supplier
// offers.
//
// Every part, part number, manufacturer, supplier, SKU, stock level and
// price in it is invented for demonstration. The values are generated from
// documented formulas (see internal/gen) so that they are physically
// consistent with each other, but they describe no real product: do not
// design with them.
//
// The file is a plain CSV: a header row of canonical field names (see
// catalog.Fields), values in base SI units (V, A, W, Ω, K/W, A²s, C, s;
// temperatures in °C; tolerances as fractions; booleans "yes"/"no"),
// then the offer columns supplier, sku, stock, moq, currency and the
// price-break columns "1+", "10+", "100+", "1000+", "5000+" (unit price
// from that quantity up, empty when the supplier has no such break). A part
// sold by two suppliers appears on two rows with the same mfr and mpn.
package seeddata

//go:generate go run ./internal/gen/seedgen -o seed.csv

import (
	"context"
	_ "embed"
	"errors"
)

// CatalogCSV is the seed catalog file.
//
//go:embed seed.csv
var CatalogCSV []byte

// SourceLabel is the source label under which the seed catalog is imported;
// `partsieve catalog remove --source seed` takes it out again.
const SourceLabel = "seed"

// FileName is the name the seed file is imported under (its format is
// recognised from the extension).
const FileName = "seed.csv"

// Seed imports the seed catalog through importFn, which is the caller's
// importer (kept as a parameter so this package does not depend on the
// importer): importFn(ctx, "seed.csv", CatalogCSV, "seed").
func Seed(ctx context.Context, importFn func(ctx context.Context, name string, data []byte, label string) error) error {
	if importFn == nil {
		return errNoImporter
	}
	return importFn(ctx, FileName, CatalogCSV, SourceLabel)
}

var errNoImporter = errors.New("seeddata: no import function given")
