package units

import (
	"bufio"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
)

var dimNames = map[string]Dim{
	"none": None, "voltage": Voltage, "current": Current, "power": Power,
	"resistance": Resistance, "temperature": Temperature, "thermal": ThermalRes,
	"i2t": I2t, "charge": Charge, "time": Time, "fraction": Fraction,
}

var pickNames = map[string]Pick{
	"magnitude": Magnitude, "upper": Upper, "lower": Lower, "signed": Signed,
}

// tableRow is one non-comment line of a " | "-separated testdata table.
type tableRow struct {
	line   int
	fields []string
}

// readTable reads a testdata table; a field written in double quotes is
// Go-unquoted.
func readTable(t *testing.T, name string, nfields int) []tableRow {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []tableRow
	sc := bufio.NewScanner(f)
	for n := 1; sc.Scan(); n++ {
		line := sc.Text()
		if strings.TrimSpace(line) == "" || strings.HasPrefix(line, "#") {
			continue
		}
		parts := strings.Split(line, "|")
		if len(parts) != nfields {
			t.Fatalf("%s:%d: %d fields, want %d", name, n, len(parts), nfields)
		}
		for i, p := range parts {
			p = strings.TrimSpace(p)
			if strings.HasPrefix(p, `"`) {
				u, err := strconv.Unquote(p)
				if err != nil {
					t.Fatalf("%s:%d: field %d: %v", name, n, i+1, err)
				}
				p = u
			}
			parts[i] = p
		}
		rows = append(rows, tableRow{n, parts})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return rows
}

func near(a, b, rel float64) bool {
	if a == b {
		return true
	}
	return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b))
}

func TestParseTable(t *testing.T) {
	rows := readTable(t, "parse.txt", 5)
	if len(rows) < 250 {
		t.Fatalf("only %d cases", len(rows))
	}
	for _, r := range rows {
		in, dn, pn, header, want := r.fields[0], r.fields[1], r.fields[2], r.fields[3], r.fields[4]
		d, ok := dimNames[dn]
		if !ok {
			t.Fatalf("parse.txt:%d: unknown dim %q", r.line, dn)
		}
		p, ok := pickNames[pn]
		if !ok {
			t.Fatalf("parse.txt:%d: unknown pick %q", r.line, pn)
		}
		if header == "-" {
			header = ""
		}
		got, err := ParseWith(in, d, p, header)
		switch {
		case want == "empty":
			if !errors.Is(err, ErrEmpty) {
				t.Errorf("parse.txt:%d: ParseWith(%q, %v, %v, %q) = %v, %v; want ErrEmpty", r.line, in, d, p, header, got, err)
			}
		case strings.HasPrefix(want, "error:"):
			frag := strings.TrimSpace(strings.TrimPrefix(want, "error:"))
			var ue *Error
			if !errors.As(err, &ue) {
				t.Errorf("parse.txt:%d: ParseWith(%q, %v, %v, %q) = %v, %v; want *Error containing %q", r.line, in, d, p, header, got, err, frag)
				continue
			}
			if !strings.Contains(err.Error(), frag) {
				t.Errorf("parse.txt:%d: ParseWith(%q) error %q does not contain %q", r.line, in, err, frag)
			}
			if ue.Input != in {
				t.Errorf("parse.txt:%d: Error.Input = %q, want %q", r.line, ue.Input, in)
			}
		default:
			w, perr := strconv.ParseFloat(want, 64)
			if perr != nil {
				t.Fatalf("parse.txt:%d: bad want %q", r.line, want)
			}
			if err != nil {
				t.Errorf("parse.txt:%d: ParseWith(%q, %v, %v, %q): %v; want %g", r.line, in, d, p, header, err, w)
				continue
			}
			if !near(got, w, 1e-12) {
				t.Errorf("parse.txt:%d: ParseWith(%q, %v, %v, %q) = %.17g, want %.17g", r.line, in, d, p, header, got, w)
			}
		}
	}
}

// TestGNUUnits compares Parse with GNU units (Debian package "units",
// version 2.22, https://www.gnu.org/software/units/), the external source
// of the expected values in testdata/gnu_units.txt. The stored values are
// always checked; when the units program is on PATH it is also run for
// every row, so a changed table cannot drift from the reference.
func TestGNUUnits(t *testing.T) {
	rows := readTable(t, "gnu_units.txt", 6)
	if len(rows) < 60 {
		t.Fatalf("only %d conversions; want at least 60", len(rows))
	}
	prog, lookErr := exec.LookPath("units")
	// toTarget converts Parse's result (°C for temperatures) into the GNU
	// units target of the row.
	toTarget := func(v float64, target string) float64 {
		if target == "K" {
			return v + 273.15 // K = °C + 273.15 (SI brochure, 9th ed., 2.3.1)
		}
		return v
	}
	var live []tableRow
	for _, r := range rows {
		in, dn, pn, target, want := r.fields[0], r.fields[1], r.fields[2], r.fields[4], r.fields[5]
		d, p := dimNames[dn], pickNames[pn]
		got, err := Parse(in, d, p)
		if err != nil {
			t.Errorf("gnu_units.txt:%d: Parse(%q, %v, %v): %v", r.line, in, d, p, err)
			continue
		}
		w, err := strconv.ParseFloat(want, 64)
		if err != nil {
			t.Fatalf("gnu_units.txt:%d: bad value %q", r.line, want)
		}
		if g := toTarget(got, target); !near(g, w, 1e-9) {
			t.Errorf("gnu_units.txt:%d: Parse(%q) = %.15g %s, table says %.15g", r.line, in, g, target, w)
		}
		live = append(live, r)
	}
	if lookErr != nil {
		t.Skip("GNU units not on PATH; checked the stored values only")
	}
	// Run units for each row, a few at a time.
	var wg sync.WaitGroup
	sem := make(chan struct{}, 4)
	for _, r := range live {
		wg.Add(1)
		sem <- struct{}{}
		go func(r tableRow) {
			defer wg.Done()
			defer func() { <-sem }()
			in, dn, pn, expr, target := r.fields[0], r.fields[1], r.fields[2], r.fields[3], r.fields[4]
			out, err := exec.Command(prog, "-t", "-d", "15", expr, target).Output()
			if err != nil {
				t.Errorf("gnu_units.txt:%d: units -t %q %q: %v", r.line, expr, target, err)
				return
			}
			ref, err := strconv.ParseFloat(strings.TrimSpace(string(out)), 64)
			if err != nil {
				t.Errorf("gnu_units.txt:%d: units -t %q %q printed %q", r.line, expr, target, out)
				return
			}
			got, _ := Parse(in, dimNames[dn], pickNames[pn])
			if g := toTarget(got, target); !near(g, ref, 1e-9) {
				t.Errorf("gnu_units.txt:%d: Parse(%q) = %.15g %s, GNU units %q says %.15g", r.line, in, g, target, expr, ref)
			}
		}(r)
	}
	wg.Wait()
}

func TestFormat(t *testing.T) {
	cases := []struct {
		v    float64
		d    Dim
		want string
	}{
		{0.045, Resistance, "45 mΩ"},
		{3.2, Current, "3.2 A"},
		{0.0000125, Current, "12.5 µA"},
		{1500, Voltage, "1.5 kV"},
		{150, Temperature, "150 °C"},
		{-40, Temperature, "-40 °C"},
		{26.850000000000023, Temperature, "26.9 °C"},
		{-273.15, Temperature, "-273 °C"},
		{62.5, ThermalRes, "62.5 K/W"},
		{0.05, Fraction, "5 %"},
		{0.0001, Fraction, "0.01 %"},
		{1e-6, Fraction, "1 ppm"},
		{1, Fraction, "100 %"},
		{0, Voltage, "0 V"},
		{math.Copysign(0, -1), Voltage, "0 V"},
		{4700, Resistance, "4.7 kΩ"},
		{2.2e6, Resistance, "2.2 MΩ"},
		{4.7, Resistance, "4.7 Ω"},
		{0.0083, Time, "8.3 ms"},
		{7200, Time, "7200 s"},
		{1.5, Time, "1.5 s"},
		{2.5e-8, Charge, "25 nC"},
		{1.5, I2t, "1.5 A²s"},
		{12000, I2t, "12000 A²s"},
		{2500, None, "2500"},
		{0.5, Power, "500 mW"},
		{0.9997, Voltage, "1 V"},
		{999.7, Voltage, "1 kV"},
		{999.4, Voltage, "999 V"},
		{123456, Voltage, "123 kV"},
		{1.2e12, Voltage, "1200 GV"},
		{1.5e-13, Current, "0.15 pA"},
		{1.5e-20, Current, "1.5e-20 A"},
		{-0.0123, Current, "-12.3 mA"},
		{0.001234, Temperature, "0.00123 °C"},
		{1e-12, Temperature, "1e-12 °C"},
		{math.NaN(), Voltage, "NaN V"},
		{math.Inf(1), Voltage, "+Inf V"},
		{1e-30, Fraction, "1e-24 ppm"},
	}
	for _, c := range cases {
		if got := Format(c.v, c.d); got != c.want {
			t.Errorf("Format(%g, %v) = %q, want %q", c.v, c.d, got, c.want)
		}
	}
	sig := []struct {
		v    float64
		d    Dim
		sig  int
		want string
	}{
		{0.0452, Resistance, 1, "50 mΩ"},
		{0.045678, Resistance, 5, "45.678 mΩ"},
		{1234.5678, Voltage, 6, "1.23457 kV"},
		{1.25, Voltage, 0, "1 V"},
		{1.0 / 3, Voltage, 40, "333.33333333333331 mV"},
	}
	for _, c := range sig {
		if got := FormatSig(c.v, c.d, c.sig); got != c.want {
			t.Errorf("FormatSig(%g, %v, %d) = %q, want %q", c.v, c.d, c.sig, got, c.want)
		}
	}
}

// roundTripTol is the relative error 3 significant digits allow: half a
// unit in the third digit of a mantissa of at least 1.00.
const roundTripTol = 5e-3 * (1 + 1e-9)

// checkRoundTrip reports whether Parse(Format(v, d)) gives back v within
// the rounding of sig significant digits.
func checkRoundTrip(t *testing.T, v float64, d Dim, sig int) {
	t.Helper()
	s := FormatSig(v, d, sig)
	got, err := Parse(s, d, Signed)
	if err != nil {
		t.Errorf("Parse(FormatSig(%.17g, %v, %d) = %q): %v", v, d, sig, s, err)
		return
	}
	tol := 0.5 * math.Pow(10, float64(1-sig)) * (1 + 1e-9)
	// A fraction is multiplied by 100 (or 1e6) before rounding, which adds
	// one floating-point rounding.
	if !near(got, v, tol+1e-15) {
		t.Errorf("Parse(FormatSig(%.17g, %v, %d) = %q) = %.17g", v, d, sig, s, got)
	}
}

func TestFormatRoundTrip(t *testing.T) {
	// A deterministic sweep over 40 decades and every dimension.
	x := uint64(0x9E3779B97F4A7C15)
	next := func() float64 {
		x ^= x << 13
		x ^= x >> 7
		x ^= x << 17
		return float64(x>>11) / (1 << 53)
	}
	for _, d := range AllDims() {
		for i := 0; i < 3000; i++ {
			e := -25 + 39*next() // 1e-25 … 1e14
			v := math.Pow(10, e)
			if next() < 0.5 {
				v = -v
			}
			switch d {
			case Temperature:
				v = -273.15 + math.Abs(v)
			case Fraction:
				// any ratio
			}
			for _, sig := range []int{1, 3, 6} {
				checkRoundTrip(t, v, d, sig)
			}
		}
	}
}

func TestSplitHeaderUnit(t *testing.T) {
	for _, r := range readTable(t, "headers.txt", 4) {
		h, rest, unit, ok := r.fields[0], r.fields[1], r.fields[2], r.fields[3] == "yes"
		gr, gu, gok := SplitHeaderUnit(h)
		if gr != rest || gu != unit || gok != ok {
			t.Errorf("headers.txt:%d: SplitHeaderUnit(%q) = %q, %q, %v; want %q, %q, %v", r.line, h, gr, gu, gok, rest, unit, ok)
		}
		if gok && UnitDim(gu) == nil {
			t.Errorf("headers.txt:%d: UnitDim(%q) = nil for a header unit", r.line, gu)
		}
	}
}

func TestUnitDim(t *testing.T) {
	cases := []struct {
		unit string
		want []Dim
	}{
		{"mΩ", []Dim{Resistance}},
		{"(mOhm)", []Dim{Resistance}},
		{"C", []Dim{Temperature, Charge}},
		{"nC", []Dim{Charge}},
		{"K", []Dim{Temperature}},
		{"K/W", []Dim{ThermalRes}},
		{"°C/W", []Dim{ThermalRes}},
		{"A²s", []Dim{I2t}},
		{"%", []Dim{Fraction}},
		{"pcs", []Dim{None}},
		{"[V]", []Dim{Voltage}},
		{"ms", []Dim{Time}},
		{"VDC", []Dim{Voltage}},
		{"k", nil},
		{"", nil},
		{"max", nil},
		{"pF", nil},
	}
	for _, c := range cases {
		got := UnitDim(c.unit)
		if len(got) != len(c.want) {
			t.Errorf("UnitDim(%q) = %v, want %v", c.unit, got, c.want)
			continue
		}
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("UnitDim(%q) = %v, want %v", c.unit, got, c.want)
			}
		}
	}
}

func TestErrors(t *testing.T) {
	_, err := Parse("3 A", Voltage, Magnitude)
	var ue *Error
	if !errors.As(err, &ue) {
		t.Fatalf("Parse(3 A) error %T, want *Error", err)
	}
	if want := `unit "A" is a current; this field wants a voltage (got "3 A")`; err.Error() != want {
		t.Errorf("message %q, want %q", err, want)
	}
	if _, err := Parse("12 V", Dim(42), Magnitude); err == nil || !strings.Contains(err.Error(), "unknown dimension") {
		t.Errorf("bad Dim: %v", err)
	}
	if _, err := Parse("12 V", Voltage, Pick(9)); err == nil || !strings.Contains(err.Error(), "unknown pick") {
		t.Errorf("bad Pick: %v", err)
	}
	long := strings.Repeat("x", 500)
	_, err = Parse(long, Voltage, Magnitude)
	if err == nil || len(err.Error()) > 200 || !strings.Contains(err.Error(), "…") {
		t.Errorf("long input: message not shortened: %d bytes", len(err.Error()))
	}
	if _, err := Parse("", Voltage, Magnitude); err != ErrEmpty {
		t.Errorf("empty: %v, want ErrEmpty itself", err)
	}
}

func TestDimNames(t *testing.T) {
	for _, d := range AllDims() {
		if d.String() == "" || d.Example() == "" || d.phrase() == "" {
			t.Errorf("dim %d lacks a name or example", d)
		}
		// Every example parses in its own dimension.
		if _, err := Parse(d.Example(), d, Signed); err != nil {
			t.Errorf("Parse(%q, %v): %v", d.Example(), d, err)
		}
		if d != None && d.Symbol() == "" {
			t.Errorf("dim %v has no symbol", d)
		}
		// The symbol Format writes is read back by UnitDim as d.
		if d != None {
			found := false
			for _, x := range UnitDim(d.Symbol()) {
				found = found || x == d
			}
			if !found {
				t.Errorf("UnitDim(%q) does not include %v", d.Symbol(), d)
			}
		}
	}
	for _, p := range []Pick{Magnitude, Upper, Lower, Signed} {
		if _, ok := pickNames[p.String()]; !ok {
			t.Errorf("Pick %d String %q", p, p.String())
		}
	}
}
