package importers

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"partsieve/catalog/units"
)

// absentWords are cells that mean "no value" (never zero).
var absentWords = map[string]bool{
	"": true, "-": true, "--": true, "---": true, "—": true, "–": true, "‒": true, "−": true,
	"n/a": true, "na": true, "n.a.": true, "n.a": true, "n/v": true, "nv": true, "?": true,
	"tbd": true, "tba": true, "none": true, "null": true, "nil": true, "#n/a": true, "n.v.": true,
	"/": true,
}

// maxAbsentLen is the length in bytes of the longest absentWords entry.
var maxAbsentLen = func() int {
	n := 0
	for w := range absentWords {
		n = max(n, len(w))
	}
	return n
}()

// isAbsent reports a cell that means "no value".
func isAbsent(s string) bool {
	if s != "" && s[0] >= '0' && s[0] <= '9' {
		return false // most cells are numbers, and no absent word starts with a digit
	}
	t := strings.TrimSpace(s)
	if t == "" {
		return true
	}
	if len(t) > maxAbsentLen {
		// lower-casing changes the length of no absent word
		return false
	}
	return absentWords[strings.ToLower(t)]
}

// parseBool reads Yes/No, Y/N, true/false, 1/0, "compliant", "RoHS
// compliant", "non-compliant", "AEC-Q101", "qualified", "✓", "x".
func parseBool(s string) (bool, error) {
	t := strings.TrimSpace(normText(s))
	switch t {
	case "yes", "y", "true", "t", "1", "ja", "j", "oui", "si", "ok", "compliant", "rohs", "rohs compliant",
		"qualified", "aec q101", "aec q200", "aec q", "aec q101 qualified", "aec q200 qualified", "automotive",
		"pb free", "lead free", "x", "rohs3", "rohs 3", "rohs 2", "rohs3 compliant", "rohs 3 compliant", "compliant with rohs":
		return true, nil
	case "no", "n", "false", "f", "0", "nein", "non", "not compliant", "non compliant", "noncompliant",
		"not rohs", "not qualified", "non rohs", "no rohs", "not rohs compliant", "contains lead", "commercial":
		return false, nil
	}
	switch strings.TrimSpace(s) {
	case "✓", "✔", "☑":
		return true, nil
	case "✗", "✘", "☐":
		return false, nil
	}
	if strings.HasPrefix(t, " yes ") || strings.HasPrefix(t, "yes ") {
		return true, nil
	}
	if strings.HasPrefix(t, "no ") || strings.HasPrefix(t, "non ") || strings.HasPrefix(t, "not ") {
		return false, nil
	}
	if strings.Contains(t, "aec q") && !strings.Contains(t, "not") {
		return true, nil
	}
	return false, errors.New("not a yes/no value (use yes, no, true, false, 1, 0 or compliant)")
}

// lifecycleWords maps status words to active, nrnd, obsolete, unknown.
// "Last time buy" and "EOL announced" still sell parts but not for new
// designs (nrnd); "EOL", "end of life", "discontinued" mean obsolete.
var lifecycleWords = map[string]string{
	"active": "active", "in production": "active", "production": "active", "preferred": "active",
	"new": "active", "new product": "active", "mature": "active", "available": "active",
	"released": "active", "mass production": "active", "volume production": "active",
	"preliminary": "active", "sampling": "active", "ramp up": "active", "recommended": "active",
	"nrnd": "nrnd", "not recommended for new designs": "nrnd", "not recommended for new design": "nrnd",
	"not for new designs": "nrnd", "not for new design": "nrnd", "not recommended": "nrnd",
	"last time buy": "nrnd", "ltb": "nrnd", "eol announced": "nrnd", "end of life announced": "nrnd",
	"last buy": "nrnd", "phase out": "nrnd", "phasing out": "nrnd",
	"obsolete": "obsolete", "discontinued": "obsolete", "eol": "obsolete", "end of life": "obsolete",
	"inactive": "obsolete", "withdrawn": "obsolete", "no longer manufactured": "obsolete",
	"obs": "obsolete", "discont": "obsolete", "dead": "obsolete",
	"unknown": "unknown", "unconfirmed": "unknown", "not known": "unknown",
}

// parseLifecycle normalises a status word.
func parseLifecycle(s string) (string, error) {
	t := strings.TrimSpace(normText(s))
	if v, ok := lifecycleWords[t]; ok {
		return v, nil
	}
	// "Active (2024)", "Obsolete - use XY"
	for _, w := range strings.Fields(t) {
		if v, ok := lifecycleWords[w]; ok {
			return v, nil
		}
	}
	return "", errors.New("lifecycle not understood (use active, nrnd, obsolete or unknown, or words such as in production, not recommended for new designs, last time buy, discontinued)")
}

// parseCount reads a whole number of pieces: "12,345", "12 345", "1.234"
// (three-digit groups), "5k", "> 1000" (taken as 1000).
func parseCount(s string) (int64, error) {
	t := strings.TrimSpace(strings.ToLower(s))
	t = strings.TrimLeft(t, "><≥+~ ")
	t = strings.TrimSpace(strings.TrimSuffix(strings.TrimSuffix(strings.TrimSuffix(t, "pcs"), "pieces"), "pc"))
	t = strings.TrimSuffix(t, "+")
	switch t {
	case "0", "none", "out of stock", "no stock", "nil":
		return 0, nil
	}
	if f, err := strconv.ParseFloat(t, 64); err == nil && f == math.Trunc(f) && f >= 0 && f < 1e15 && !strings.ContainsAny(t, ",.") {
		return int64(f), nil
	}
	if n, ok := parseQty(t); ok {
		return n, nil
	}
	// a spreadsheet number written as 1234.0
	if f, err := strconv.ParseFloat(t, 64); err == nil && f == math.Trunc(f) && f >= 0 && f < 1e15 {
		return int64(f), nil
	}
	return 0, errors.New("not a whole number of pieces")
}

// parseNumber reads a cell of a Number field with units.ParseWith and
// rejects negative values where the field cannot be negative. signedOK
// fields (temperatures, P-channel MOSFET voltages and currents stored as
// magnitudes) are left to the field's pick.
func parseNumber(cell string, d units.Dim, pick units.Pick, unit string, signedOK bool) (float64, error) {
	v, err := units.ParseWith(cell, d, pick, unit)
	if err != nil {
		return 0, err
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, errors.New("not a finite number")
	}
	if !signedOK && strings.ContainsAny(cell, "-−±") {
		if lo, err := units.ParseWith(cell, d, units.Lower, unit); err == nil && lo < 0 {
			return 0, errors.New("negative value; this rating cannot be negative")
		}
	}
	return v, nil
}

// cutACDC removes "AC"/"DC" marks from a voltage cell ("32 VDC", "250V
// AC", "125 Vac") and tells which was written.
func cutACDC(s string) (rest string, ac, dc bool) {
	t := s
	lower := asciiLower(t) // same byte offsets as t
	for _, m := range []struct {
		w  string
		ac bool
	}{{"vac", true}, {"vdc", false}, {"v ac", true}, {"v dc", false}, {"a.c.", true}, {"d.c.", false}, {"ac", true}, {"dc", false}} {
		for {
			i := strings.Index(lower, m.w)
			if i < 0 {
				break
			}
			repl := ""
			if strings.HasPrefix(m.w, "v") {
				repl = "V"
			}
			t = t[:i] + repl + t[i+len(m.w):]
			lower = lower[:i] + asciiLower(repl) + lower[i+len(m.w):]
			if m.ac {
				ac = true
			} else {
				dc = true
			}
		}
	}
	return strings.TrimSpace(t), ac, dc
}

// fuseVoltages reads a fuse voltage rating cell: "32 VDC", "250 VAC",
// "125 VAC/VDC", "250VAC / 125VDC", "32 V". The second result says which
// were written; a value with no AC/DC mark comes back as unmarked.
func fuseVoltages(cell, unit string) (ac, dc, plain float64, hasAC, hasDC, hasPlain bool, err error) {
	segs := strings.FieldsFunc(cell, func(r rune) bool { return r == '/' || r == ';' || r == '|' })
	last := math.NaN()
	for _, seg := range segs {
		rest, isAC, isDC := cutACDC(seg)
		var v float64
		if !hasDigit(rest) {
			if math.IsNaN(last) || (!isAC && !isDC) {
				return 0, 0, 0, false, false, false, fmt.Errorf("voltage rating %q not understood", strings.TrimSpace(seg))
			}
			v = last
		} else {
			v, err = parseNumber(rest, units.Voltage, units.Magnitude, unit, false)
			if err != nil {
				return 0, 0, 0, false, false, false, err
			}
		}
		last = v
		switch {
		case isAC && isDC:
			ac, dc, hasAC, hasDC = v, v, true, true
		case isAC:
			ac, hasAC = v, true
		case isDC:
			dc, hasDC = v, true
		default:
			plain, hasPlain = v, true
		}
	}
	if !hasAC && !hasDC && !hasPlain {
		return 0, 0, 0, false, false, false, errors.New("no voltage")
	}
	return ac, dc, plain, hasAC, hasDC, hasPlain, nil
}

// rerateUnits strips the temperature unit from a rerating point.
var rerateUnits = strings.NewReplacer("°C", "", "°", "", "C", "", "c", "")

// parseRerate checks and normalises fuse rerating points "T:factor, ...":
// temperatures in °C (-70 to 300), factors above 0 and at most 2, sorted
// by temperature.
func parseRerate(s string) (string, error) {
	sep := func(r rune) bool { return r == ';' || r == '|' || r == '\n' }
	if !strings.ContainsAny(s, ";|\n") {
		sep = func(r rune) bool { return r == ',' }
	}
	type pt struct{ t, f float64 }
	var pts []pt
	for _, e := range strings.FieldsFunc(s, sep) {
		e = strings.TrimSpace(e)
		if e == "" {
			continue
		}
		i := strings.IndexAny(e, ":=")
		if i < 0 {
			return "", fmt.Errorf("rerating point %q is not T:factor", e)
		}
		tt := strings.TrimSpace(rerateUnits.Replace(e[:i]))
		ff := strings.TrimSpace(strings.ReplaceAll(e[i+1:], ",", "."))
		pct := strings.HasSuffix(ff, "%")
		ff = strings.TrimSuffix(ff, "%")
		t, err1 := strconv.ParseFloat(strings.ReplaceAll(tt, ",", "."), 64)
		f, err2 := strconv.ParseFloat(strings.TrimSpace(ff), 64)
		if err1 != nil || err2 != nil {
			return "", fmt.Errorf("rerating point %q is not T:factor", e)
		}
		if pct {
			f /= 100
		}
		if t < -70 || t > 300 || f <= 0 || f > 2 {
			return "", fmt.Errorf("rerating point %q out of range (T -70..300 °C, factor 0..2)", e)
		}
		pts = append(pts, pt{t, f})
	}
	if len(pts) == 0 {
		return "", errors.New("no rerating points")
	}
	sort.Slice(pts, func(a, b int) bool { return pts[a].t < pts[b].t })
	var b strings.Builder
	for i, p := range pts {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(strconv.FormatFloat(p.t, 'g', -1, 64))
		b.WriteByte(':')
		b.WriteString(strconv.FormatFloat(p.f, 'g', -1, 64))
	}
	return b.String(), nil
}

// asciiLower lower-cases ASCII letters only, keeping byte offsets.
func asciiLower(s string) string {
	b := []byte(s)
	for i, c := range b {
		if c >= 'A' && c <= 'Z' {
			b[i] = c + 'a' - 'A'
		}
	}
	return string(b)
}
