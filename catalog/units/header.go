package units

import "strings"

// SplitHeaderUnit finds a unit written in a column header and returns the
// header without it and the unit text. ok is false when the header holds no
// recognisable unit; rest is then the trimmed header. Recognised forms:
//
//	"R_DS(on) (mΩ)"  "V_RRM [V]"  "I_D(A)"  "Tj max (C)"  bracketed group
//	"Vrrm, V"                                           after a last comma
//	"Pd in W"                                           after a last " in "
//	"T / °C"                                            after a spaced " / "
//	"Tj °C"  "R mΩ"  "Tol %"                            a last word with °, Ω, µ, ² or %
//
// A bracketed group counts only when its content is a known unit with an
// optional prefix, so the trade's subscripts "RDS(on)", "IF(AV)",
// "VGS(th)", "V_DS(max)" and words "(max)", "(min)", "(typ)" are not
// units; neither is "(s)" written onto a word, as in "Part(s)".
func SplitHeaderUnit(header string) (rest, unit string, ok bool) {
	h := trimSpace(header)
	// Bracketed groups, from the right.
	for end := len(h) - 1; end >= 0; end-- {
		var open byte
		switch h[end] {
		case ')':
			open = '('
		case ']':
			open = '['
		default:
			continue
		}
		// A unit is short: look for the opening bracket nearby only, which
		// keeps long headers linear.
		lo := max(0, end-maxHeaderUnit)
		start := strings.LastIndexByte(h[lo:end], open)
		if start < 0 {
			continue
		}
		start += lo
		content := trimSpace(h[start+1 : end])
		attached := start > 0 && !isSpaceByte(h[start-1]) && h[start-1] != '_'
		if isHeaderUnit(content) && !(attached && content == "s") {
			before := trimHeaderRest(h[:start])
			after := trimSpace(h[end+1:])
			switch {
			case after == "":
				rest = before
			case before == "":
				rest = after
			default:
				rest = before + " " + after
			}
			return rest, content, true
		}
	}
	// "Vrrm, V"
	if i := strings.LastIndexByte(h, ','); i >= 0 {
		if u := trimSpace(h[i+1:]); isHeaderUnit(u) {
			return trimHeaderRest(h[:i]), u, true
		}
	}
	// "Pd in W"
	if i := lastIndexFold(h, " in "); i > 0 {
		if u := trimSpace(h[i+4:]); isHeaderUnit(u) {
			return trimHeaderRest(h[:i]), u, true
		}
	}
	// "T / °C" (quantity / unit, as ISO 80000-1 writes table headings)
	if i := strings.LastIndex(h, " / "); i > 0 {
		if u := trimSpace(h[i+3:]); isHeaderUnit(u) {
			return trimHeaderRest(h[:i]), u, true
		}
	}
	// "Tj °C": a last word that can only be a unit.
	if i := strings.LastIndexByte(h, ' '); i > 0 {
		u := h[i+1:]
		if strings.ContainsAny(u, "°ºΩΩµμ²%℃") && isHeaderUnit(u) {
			return trimHeaderRest(h[:i]), u, true
		}
	}
	return h, "", false
}

// maxHeaderUnit bounds the bytes between the brackets of a header unit.
const maxHeaderUnit = 40

// isHeaderUnit reports whether s is a known unit of some dimension, not a
// bare prefix and not one of the words that qualify a rating.
func isHeaderUnit(s string) bool {
	if s == "" {
		return false
	}
	switch strings.ToLower(s) {
	case "min", "max", "typ", "nom", "avg", "rms", "pk", "on", "off":
		return false
	}
	return unitDims(s) != 0
}

func isSpaceByte(c byte) bool { return c == ' ' || c == '\t' }

// trimHeaderRest trims spaces and a trailing separator left by the unit.
func trimHeaderRest(s string) string {
	s = trimSpace(s)
	for len(s) > 0 {
		switch s[len(s)-1] {
		case ',', ';', ':', '/', '-', ' ', '\t':
			s = s[:len(s)-1]
			continue
		}
		break
	}
	return s
}

// lastIndexFold is strings.LastIndex, ignoring ASCII case.
func lastIndexFold(s, sub string) int {
	for i := len(s) - len(sub); i >= 0; i-- {
		if strings.EqualFold(s[i:i+len(sub)], sub) {
			return i
		}
	}
	return -1
}
