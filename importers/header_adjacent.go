package importers

import (
	"strings"

	"partsieve/catalog/units"
)

// Two layouts that a single header cannot reveal, settled with the
// neighbouring columns:
//
//   - a test-condition column right after the value it qualifies: "VF (V)"
//     followed by "@ IF (A)" or "at IR", "RDS(on)" followed by "@ VGS (V)";
//     the condition column fills the value's condition field (vf_if,
//     ir_vr, rdson_vgs, or the *_tj field for a temperature);
//   - a maker's "catalogue number" in a sheet that has a manufacturer
//     column and no part-number column: fuse and diode makers call their
//     part number that, while distributors use the same words for their
//     own order code (so with a part-number column present it stays sku).

// conditionColumn reads an unrecognised header as the test condition of
// the column before it: "@ IF (A)", "at VR [V]", "@ Tj (°C)", "test
// current (A)". prev is the preceding recognised column.
func conditionColumn(h string, prev Column) (Column, bool) {
	t := strings.TrimSpace(h)
	lower := strings.ToLower(t)
	var rest string
	switch {
	case strings.HasPrefix(lower, "@"):
		rest = t[1:]
	case strings.HasPrefix(lower, "at "):
		rest = t[3:]
	case strings.HasPrefix(lower, "test "), strings.HasPrefix(lower, "cond"):
		rest = t
	default:
		return Column{}, false
	}
	body, unit, ok := units.SplitHeaderUnit(rest)
	key := strings.ToLower(strings.NewReplacer("_", "", " ", "", "(", "", ")", "", "-", "").Replace(body))
	var d units.Dim
	switch {
	case ok && len(units.UnitDim(unit)) == 1:
		d = units.UnitDim(unit)[0]
	case strings.HasPrefix(key, "if") || strings.Contains(key, "current"):
		d = units.Current
	case strings.HasPrefix(key, "vr") || strings.HasPrefix(key, "vgs") || strings.Contains(key, "voltage"):
		d = units.Voltage
	case strings.HasPrefix(key, "tj") || strings.HasPrefix(key, "ta") || strings.Contains(key, "temp"):
		d = units.Temperature
	default:
		return Column{}, false
	}
	f := condTarget(prev.Field, d)
	if f == "" {
		return Column{}, false
	}
	return Column{Header: h, Field: f, Unit: unit}, true
}

// catalogueWords are the headers read as a maker's part number when the
// sheet has a manufacturer column and no part-number column.
var catalogueWords = map[string]bool{
	"catalogue number": true, "catalog number": true, "catalogue no.": true, "catalogue no": true,
	"catalog no.": true, "catalog no": true, "cat. no.": true, "cat no": true, "catalogue #": true, "catalog #": true,
	"type designation": true, "type": false,
}

func isCatalogueHeader(h string) bool {
	body, _, _ := units.SplitHeaderUnit(h)
	return catalogueWords[headerKey(body)]
}

// adjacentPass applies both rules to a layout's columns in place.
func adjacentPass(headers []string, cols []Column) {
	hasMPN, hasMfr := false, false
	for _, c := range cols {
		switch c.Field {
		case "mpn":
			hasMPN = true
		case "mfr":
			hasMfr = true
		}
	}
	if !hasMPN && hasMfr {
		for i, c := range cols {
			if (c.Field == fSKU || c.Field == "") && isCatalogueHeader(headers[i]) && !c.mapped {
				cols[i] = Column{Header: headers[i], Field: "mpn"}
				break
			}
		}
	}
	for i := 1; i < len(cols); i++ {
		if cols[i].Field != "" || cols[i-1].Field == "" {
			continue
		}
		if c, ok := conditionColumn(headers[i], cols[i-1]); ok {
			cols[i] = c
		}
	}
}
