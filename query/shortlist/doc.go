// Package shortlist turns a pick into a purchase shortlist
// (`partsieve shortlist`): the chosen designs as order lines with
// quantities, price breaks, costs, stock and suppliers, second sources per
// role, and a workbook (XLSX) or CSV file that purchasing can order from
// and a design review can check.
//
// # Designs and roles
//
// A design is one candidate of topology.Evaluate: a set of roles, one piece
// per board each (series-diode: the diode; shunt-fuse: the fuse and the
// shunt diode; pfet-high and nfet-low: the MOSFET, the Zener clamp and the
// gate resistor). The gate resistor is not a catalog part: it is listed as
// a generic line with its computed value, tolerance, power rating and
// working voltage, to be sourced, without a price. With Options.Parts the
// shortlist lists explicit part numbers instead, each in the role its kind
// and type give, with the checks of every role it can take
// (topology.ExplainCatalog); a part number given twice is listed once. Such
// a list has no stage figures (loss, drop: the parts are not one design)
// and no alternates; each line shows the part's smallest margin and
// junction temperature in the role where it does best.
//
// # Quantities and cost
//
// For every catalog line (Quantity, PlaceOrder):
//
//	needed       = build quantity × parts per board
//	with spares  = ⌈needed × (1 + spares/100)⌉
//	order qty    = max(with spares, MOQ, first price break)   per offer
//	price break  = the largest break quantity ≤ order qty
//	extended     = order qty × break price × rate              (build currency)
//
// The offer with the lowest extended cost is chosen; offers without a
// price, without a currency or in a currency that [build.rates] does not
// convert are listed but not costed. The catalog has no order-multiple
// field (reels): a minimum is all an offer can impose. The stock of the
// chosen offer is compared with its order quantity and a shortfall is
// flagged SHORT. A design's cost is the sum of its part lines' extended
// costs (per board: divided by the build quantity); the overall total sums
// the designs listed, which are alternatives to one another. Alternates and
// the generic gate resistor are not in the sums; a sum with uncosted lines
// says it is incomplete.
//
// # Alternates
//
// Up to Options.Alternates second sources per catalog role, from
// topology.Alternates: parts with which the design, re-evaluated with the
// engine, passes every check while the rest of it is kept; other makers
// first, then the lower unit price. Their checks are in the Checks sheet.
//
// # Files
//
// WriteXLSX writes four sheets (Shortlist, Requirements, Checks,
// Assumptions); WriteCSV writes the Shortlist rows. Numbers are stored as
// numbers in base SI units (V, A, W, Ω, A²s, s; °C; margins and spares as
// fractions) so that machine readers need no unit parsing; in the
// workbook a number format shows the unit ("0.045 Ω", "12.5 %",
// "1,234.00 EUR"). Check and requirement values are rounded to six
// significant digits, as in the JSON output.
//
// Text that came from imported spreadsheets (makers, part numbers,
// packages, suppliers, SKUs) may start with a character that spreadsheet
// programs read as the start of a formula (= + - @, tab, CR, LF). In the
// CSV file every text cell that does gets a leading apostrophe (SafeText).
// In the workbook text is written as a string cell (never a formula
// element) with the text number format "@", and keeps its exact content:
// no program evaluates a string cell, and the text format keeps an edited
// cell text too.
//
// Every output carries the cautions of topology.Cautions (simplified
// models, verify against the datasheet, local codes and licensed practice,
// batteries deliver hundreds of amps).
package shortlist
