// Package topology turns an application spec into requirements and
// ranked part picks for the four reverse-polarity protection topologies:
//
//	series-diode  a rectifier or Schottky diode in series (REFERENCE T1)
//	shunt-fuse    a series fuse with a shunt diode across the input behind
//	              it, a crowbar (T2); candidates are fuse + diode pairs
//	pfet-high     a high-side P-MOSFET with Zener gate clamp and gate
//	              resistor (T3); candidates are MOSFET + Zener + resistor
//	nfet-low      a low-side N-MOSFET in the ground return, its mirror
//	              image (T4)
//
// Needs computes the requirement set of each topology from the spec and
// its derating policy (`partsieve need`). Pick reads the catalog through
// SQL pre-filters on hard limits, evaluates every remaining part with the
// device models of query/physics at the operating corners, and ranks the
// survivors (`partsieve pick`); Evaluate does the same over a prepared
// in-memory Catalog. Explain shows every check of one part in every role
// it can take (`partsieve pick --explain`).
//
// # Corners and checks
//
// The hot corner is (t_max, i_max): losses, junction temperatures (found
// by fixed-point iteration with runaway detection) and leakage. The cold
// corner is (t_min, v_min, i_max) with self-heating: gate drive and the
// output voltage. Drop and loss are taken at the worse of the two corners
// (a diode's V_F is highest cold, a MOSFET's R_DS(on) highest hot).
// Budgets cover the whole stage: the fuse and the shunt diode's leakage,
// or the MOSFET with its Zener and gate resistor at v_max.
//
// Every check carries its value, limit, margin, pass, formula and source
// (type Check). Checks of a part run in a fixed order; in the scan of the
// catalog the first failure ends a part's evaluation and is counted as
// the check that eliminated it. Only the top candidates are evaluated
// again with every check recorded, so the scan allocates nothing per part.
//
// # Pairs
//
// Pairs are never formed as a cross product: fuses and shunt diodes are
// first checked on their own, then diodes are sorted by derated surge
// I²t capability, and each fuse takes, by binary search, the diodes able
// to cover its clearing I²t, trying the best few by the ranking first.
// For the MOSFET stages the Zener depends only on the window (rated V_GS,
// k_vgs·V_GS,max), so it is chosen once per window and cached.
//
// # Back-feed
//
// When load.backfeed or supply.shared is set, or the load holds up a
// voltage while reversed, both MOSFET topologies are marked unsafe (a
// channel conducts both ways) and ranked out: their best designs are
// listed as RankedOut, not as candidates.
//
// # Limits of the models
//
// The models are simplified (REFERENCE §9): datasheet maximum values at
// the test point combined with typical temperature factors; diode V_F
// from one or two datasheet points (far above the test current, as at the
// crowbar fault, the single-point bound is very conservative); fuse
// clearing I²t estimated as twice the melting I²t when the maker gives
// none; reversals shorter than 10 s still judged on the thermal steady
// state. Every result carries the cautions of Cautions.
package topology
