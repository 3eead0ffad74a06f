package units

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// addTableSeeds adds the inputs of the testdata tables as fuzz seeds.
func addTableSeeds(f *testing.F) {
	for _, name := range []string{"parse.txt", "gnu_units.txt", "headers.txt"} {
		data, err := os.ReadFile(filepath.Join("testdata", name))
		if err != nil {
			f.Fatal(err)
		}
		for _, line := range strings.Split(string(data), "\n") {
			if line == "" || strings.HasPrefix(line, "#") {
				continue
			}
			fields := strings.Split(line, "|")
			header := ""
			if name == "parse.txt" && len(fields) == 5 {
				header = strings.TrimSpace(fields[3])
			}
			f.Add(strings.TrimSpace(fields[0]), header)
		}
	}
}

// FuzzParse feeds any text and header unit to ParseWith for every Dim and
// Pick. It must never panic; an error is ErrEmpty or an *Error; a value is
// finite and within the magnitude limits; and Format writes it so that
// Parse reads it back within the 3-digit rounding.
func FuzzParse(f *testing.F) {
	addTableSeeds(f)
	for _, s := range []string{
		"", " ", "±", "+/-", "-", "--5", "1e", "1e+", "4R", "R", "RR7", "4R7R", "..", "...5", "5...",
		"1,", ",5", "1''000", "1'000'", "\xff", "5 \xffV", "5 V\x00", "1" + strings.Repeat("0", 400),
		"0." + strings.Repeat("0", 400) + "1", "1e-400", "1e400", "-0", "−", "−−5", "5 to to 6",
		"5 ~", "~", "~~5", "<", "<=", "≤", "5 V~ to 6 V~", "-273.15", "-273.16 °C", "0 K", "1 K to -1 K",
		"2.5k", "1,000,000", "12 kA²s", "4k7 kΩ", "5 %", "5 ppm", "1 min", "8.3m",
	} {
		f.Add(s, "")
	}
	f.Add("45", "mΩ")
	f.Add("45", "(°C)")
	f.Add("45", "\xff")
	picks := []Pick{Magnitude, Upper, Lower, Signed}
	f.Fuzz(func(t *testing.T, s, header string) {
		for _, d := range AllDims() {
			for _, p := range picks {
				v, err := ParseWith(s, d, p, header)
				if err != nil {
					var ue *Error
					if !errors.Is(err, ErrEmpty) && !errors.As(err, &ue) {
						t.Fatalf("ParseWith(%q, %v, %v, %q): error of type %T: %v", s, d, p, header, err, err)
					}
					if ue != nil && ue.Reason == "" {
						t.Fatalf("ParseWith(%q, %v, %v, %q): empty reason", s, d, p, header)
					}
					continue
				}
				if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > maxMagnitude || v != 0 && math.Abs(v) < minMagnitude {
					t.Fatalf("ParseWith(%q, %v, %v, %q) = %g: out of range", s, d, p, header, v)
				}
				if d == Temperature && v < absZeroC-1e-9 && p != Magnitude {
					t.Fatalf("ParseWith(%q, %v, %v, %q) = %g: below absolute zero", s, d, p, header, v)
				}
				if p == Magnitude && v < 0 {
					t.Fatalf("ParseWith(%q, %v, Magnitude) = %g < 0", s, d, v)
				}
				out := Format(v, d)
				back, err := Parse(out, d, Signed)
				if err != nil {
					t.Fatalf("Parse(Format(%.17g, %v) = %q): %v (input %q)", v, d, out, err, s)
				}
				if !near(back, v, roundTripTol) {
					t.Fatalf("Parse(Format(%.17g, %v) = %q) = %.17g (input %q)", v, d, out, back, s)
				}
			}
		}
		rest, unit, ok := SplitHeaderUnit(s)
		if ok {
			if UnitDim(unit) == nil {
				t.Fatalf("SplitHeaderUnit(%q) unit %q unknown to UnitDim", s, unit)
			}
			if len(rest) >= len(s) {
				t.Fatalf("SplitHeaderUnit(%q) rest %q not shorter", s, rest)
			}
		}
	})
}

// FuzzFormat checks Format → Parse for any finite value within the limits.
func FuzzFormat(f *testing.F) {
	for _, v := range []float64{0, 1, -1, 0.045, 1.25e-5, 1500, 150, -40, 62.5, 0.05, 1e15, 1e-30, -273.15, 999.5, 0.9995, 123456789} {
		f.Add(v, uint8(0), uint8(3))
	}
	f.Fuzz(func(t *testing.T, v float64, dn, sig uint8) {
		d := AllDims()[int(dn)%len(AllDims())]
		if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > maxMagnitude || v != 0 && math.Abs(v) < minMagnitude {
			return
		}
		if d == Temperature && v < absZeroC {
			return
		}
		n := 1 + int(sig)%17
		s := FormatSig(v, d, n)
		back, err := Parse(s, d, Signed)
		if err != nil {
			t.Fatalf("Parse(FormatSig(%.17g, %v, %d) = %q): %v", v, d, n, s, err)
		}
		tol := 0.5*math.Pow(10, float64(1-n))*(1+1e-9) + 1e-15
		if !near(back, v, tol) {
			t.Fatalf("Parse(FormatSig(%.17g, %v, %d) = %q) = %.17g", v, d, n, s, back)
		}
	})
}
