package units

import "testing"

// benchCells are typical spreadsheet cells with their field dimensions.
var benchCells = []struct {
	s    string
	d    Dim
	pick Pick
	unit string
}{
	{"45 mΩ", Resistance, Magnitude, ""},
	{"4R7", Resistance, Magnitude, ""},
	{"100", Voltage, Magnitude, ""},
	{"8.5", Resistance, Magnitude, "mΩ"},
	{"0,33 A", Current, Magnitude, ""},
	{"-55 to 150 °C", Temperature, Upper, ""},
	{"1.5 kV", Voltage, Magnitude, ""},
	{"±20 V", Voltage, Magnitude, ""},
	{"12.5 µA", Current, Magnitude, ""},
	{"N/A", Voltage, Magnitude, ""},
}

func BenchmarkParse(b *testing.B) {
	for _, c := range benchCells {
		b.Run(c.s, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				_, _ = ParseWith(c.s, c.d, c.pick, c.unit)
			}
		})
	}
}

func BenchmarkFormat(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		_ = Format(0.045, Resistance)
	}
}
