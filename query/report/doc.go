// Package report writes the visual report of a pick (`partsieve pick SPEC
// --report FILE.html`): one self-contained HTML file a design review can
// open offline.
//
// The page holds the spec (key values with units and the file as
// written), the derating policy with the confidence of every factor
// ("unverified default" for [M]), the side-by-side comparison of the
// topologies, and per topology the candidates table, three plots and
// every check of the best design, then the same cautions as the terminal
// output. The plots are drawn with gonum.org/v1/plot and embedded as
// inline SVG:
//
//   - stage loss against load current, 0 to 1.5 × i_max at t_max, for the
//     top designs (topology.Sweep); solid where every check passes,
//     dashed where one fails, with i_max and the loss budget marked;
//   - hottest junction temperature against ambient, t_min to t_max at
//     i_max, with the policy limit tj_limit (and a part's own lower limit
//     T_jmax − margin, dotted);
//   - the margin of every check of the best design as horizontal bars,
//     cut at ±100 %, red when the check fails.
//
// Nothing is loaded from elsewhere: the CSS is inline, the plot font
// (Liberation Sans, SIL Open Font License, the face gonum/plot measures
// text with) is embedded once as a data URL, and a content security
// policy forbids scripts and remote loads. Every text from the catalog
// (maker, part number, description, package, supplier, datasheet
// reference) is escaped by html/template; the SVG from gonum/plot is
// parsed and rebuilt from an allow-list of elements and attributes with
// its text escaped again, so a hostile part number can only appear as
// text. Datasheet references are shown as text, never as links.
package report
