package physics

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// MaxReratePoints is the largest number of points a RerateCurve holds.
const MaxReratePoints = 16

// RerateCurve is a fuse temperature rerating curve: the factor K_T by which
// the fuse's current rating is multiplied at an ambient temperature (°C).
// Rerating is maker- and family-specific, so it is stored per catalog
// record (field rerate) as "T:factor" pairs (REFERENCE §4.3). The value is
// small and fixed-size, so curves are copied without allocation.
type RerateCurve struct {
	n    int
	t, f [MaxReratePoints]float64
}

// RerateError explains why a rerate text was refused. Pair is the 1-based
// number of the "T:factor" pair (0 for the text as a whole).
type RerateError struct {
	Pair   int
	Text   string
	Reason string
}

func (e *RerateError) Error() string {
	if e.Pair == 0 {
		return fmt.Sprintf("rerate %q: %s", e.Text, e.Reason)
	}
	return fmt.Sprintf("rerate pair %d %q: %s", e.Pair, e.Text, e.Reason)
}

// ErrRerate is matched by every *RerateError through errors.Is.
var ErrRerate = errors.New("invalid rerate curve")

// Is makes errors.Is(err, ErrRerate) true.
func (e *RerateError) Is(target error) bool { return target == ErrRerate }

// ParseRerate reads a rerating curve in the catalog's text format:
//
//	"25:1, 65:0.9, 85:0.8"
//
// Pairs are separated by commas or semicolons (empty items are skipped);
// each pair is a temperature in °C (optionally followed by "°C", "C" or
// "degC") and a factor, separated by a colon. The factor is a number or a
// percentage ("90%"); it must be in [0, 2] (0: not to be used at
// that temperature). Temperatures must lie in
// −273.15…500 °C and be distinct; pairs may come in any order. A decimal
// comma is not accepted (the comma separates pairs). At least one and at
// most MaxReratePoints pairs.
func ParseRerate(s string) (RerateCurve, error) {
	var c RerateCurve
	pair := 0
	rest := s
	for {
		item, tail, more := rest, "", false
		if k := strings.IndexAny(rest, ",;"); k >= 0 {
			item, tail, more = rest[:k], rest[k+1:], true
		}
		item = strings.TrimSpace(item)
		if item != "" {
			pair++
			if c.n == MaxReratePoints {
				return RerateCurve{}, &RerateError{Text: s, Reason: fmt.Sprintf("more than %d pairs", MaxReratePoints)}
			}
			t, f, reason := parseReratePair(item)
			if reason != "" {
				return RerateCurve{}, &RerateError{Pair: pair, Text: item, Reason: reason}
			}
			for k := 0; k < c.n; k++ {
				if c.t[k] == t {
					return RerateCurve{}, &RerateError{Pair: pair, Text: item, Reason: "temperature given twice"}
				}
			}
			c.t[c.n], c.f[c.n] = t, f
			c.n++
		}
		if !more {
			break
		}
		rest = tail
	}
	if c.n == 0 {
		return RerateCurve{}, &RerateError{Text: s, Reason: `no "T:factor" pair`}
	}
	c.sort()
	return c, nil
}

func parseReratePair(item string) (t, f float64, reason string) {
	k := strings.IndexByte(item, ':')
	if k < 0 {
		return 0, 0, `want "T:factor" (temperature in °C, colon, factor)`
	}
	ts := strings.TrimSpace(item[:k])
	fs := strings.TrimSpace(item[k+1:])
	for _, suf := range [...]string{"°C", "degC", "C", "°"} {
		if strings.HasSuffix(ts, suf) {
			ts = strings.TrimSpace(strings.TrimSuffix(ts, suf))
			break
		}
	}
	var err error
	t, err = strconv.ParseFloat(ts, 64)
	if err != nil || ts == "" {
		return 0, 0, "temperature is not a number"
	}
	if !finite(t) || t < -273.15 || t > 500 {
		return 0, 0, "temperature outside −273.15…500 °C"
	}
	pct := false
	if strings.HasSuffix(fs, "%") {
		pct = true
		fs = strings.TrimSpace(strings.TrimSuffix(fs, "%"))
	}
	f, err = strconv.ParseFloat(fs, 64)
	if err != nil || fs == "" {
		return 0, 0, "factor is not a number"
	}
	if pct {
		f /= 100
	}
	if !finite(f) || f < 0 || f > 2 {
		return 0, 0, "factor outside 0…2"
	}
	return t, f, ""
}

// sort orders the points by temperature (insertion sort; n ≤ 16).
func (c *RerateCurve) sort() {
	for i := 1; i < c.n; i++ {
		for j := i; j > 0 && c.t[j] < c.t[j-1]; j-- {
			c.t[j], c.t[j-1] = c.t[j-1], c.t[j]
			c.f[j], c.f[j-1] = c.f[j-1], c.f[j]
		}
	}
}

// NewRerateCurve builds a curve from temperatures ts (°C) and factors fs
// with the same checks as ParseRerate.
func NewRerateCurve(ts, fs []float64) (RerateCurve, error) {
	var c RerateCurve
	if len(ts) != len(fs) || len(ts) == 0 || len(ts) > MaxReratePoints {
		return c, &RerateError{Reason: fmt.Sprintf("want 1…%d temperatures with one factor each, got %d and %d", MaxReratePoints, len(ts), len(fs))}
	}
	for k := range ts {
		t, f := ts[k], fs[k]
		item := strconv.FormatFloat(t, 'g', -1, 64) + ":" + strconv.FormatFloat(f, 'g', -1, 64)
		if !finite(t) || t < -273.15 || t > 500 {
			return RerateCurve{}, &RerateError{Pair: k + 1, Text: item, Reason: "temperature outside −273.15…500 °C"}
		}
		if !finite(f) || f < 0 || f > 2 {
			return RerateCurve{}, &RerateError{Pair: k + 1, Text: item, Reason: "factor outside 0…2"}
		}
		for j := 0; j < c.n; j++ {
			if c.t[j] == t {
				return RerateCurve{}, &RerateError{Pair: k + 1, Text: item, Reason: "temperature given twice"}
			}
		}
		c.t[c.n], c.f[c.n] = t, f
		c.n++
	}
	c.sort()
	return c, nil
}

// LinearRerate returns the curve "1.0 up to knee (°C), then falling by
// pctPerK percent per kelvin", e.g. 0.5 %/K above 25 °C (the military
// chip/cartridge rule, REFERENCE §4.3 [V interfacebus; attribution M]) or
// above 40 °C (IEC 60269 industrial fuses [V Lawson]). The factor reaches
// 0 at knee + 100/pctPerK and stays there. pctPerK must be > 0.
func LinearRerate(knee, pctPerK float64) RerateCurve {
	var c RerateCurve
	c.t[0], c.f[0] = knee, 1
	c.n = 1
	if pctPerK > 0 {
		c.t[1], c.f[1] = knee+100/pctPerK, 0
		c.n = 2
	}
	return c
}

// Len returns the number of points.
func (c RerateCurve) Len() int { return c.n }

// Point returns point k (0-based) as temperature (°C) and factor.
func (c RerateCurve) Point(k int) (t, f float64) { return c.t[k], c.f[k] }

// Factor returns the rerating factor K_T at ambient ta (°C) and whether ta
// lies outside the curve's points. Between points it interpolates
// linearly. Below the first point it returns the first factor (clamped:
// fuses carry at least as much when colder, so this is conservative).
// Above the last point it continues the last segment's slope, never above
// the last factor and never below 0: clamping there, as at the cold end,
// would promise more current than the hot end of the curve suggests, so
// the curve is extrapolated instead. A one-point curve is constant. The
// empty curve gives factor 1 and outside = true.
func (c RerateCurve) Factor(ta float64) (f float64, outside bool) {
	if c.n == 0 {
		return 1, true
	}
	if ta <= c.t[0] {
		return c.f[0], ta < c.t[0]
	}
	for k := 1; k < c.n; k++ {
		if ta <= c.t[k] {
			// weights rather than f0 + Δf·u: exact at both points and never
			// outside [f0, f1] by rounding (0.9 + (0−0.9)·84/84 gave −1e−16)
			u := (ta - c.t[k-1]) / (c.t[k] - c.t[k-1])
			f = c.f[k-1]*(1-u) + c.f[k]*u
			return min(max(f, min(c.f[k-1], c.f[k])), max(c.f[k-1], c.f[k])), false
		}
	}
	last := c.f[c.n-1]
	if c.n == 1 {
		return last, true
	}
	slope := (c.f[c.n-1] - c.f[c.n-2]) / (c.t[c.n-1] - c.t[c.n-2])
	if slope > 0 {
		slope = 0
	}
	f = last + slope*(ta-c.t[c.n-1])
	if f < 0 {
		f = 0
	}
	return f, true
}

// String formats the curve in the text format of ParseRerate, with
// shortest round-trip numbers: "25:1, 65:0.9, 85:0.8".
func (c RerateCurve) String() string {
	var b strings.Builder
	for k := 0; k < c.n; k++ {
		if k > 0 {
			b.WriteString(", ")
		}
		b.WriteString(strconv.FormatFloat(c.t[k], 'g', -1, 64))
		b.WriteByte(':')
		b.WriteString(strconv.FormatFloat(c.f[k], 'g', -1, 64))
	}
	return b.String()
}
