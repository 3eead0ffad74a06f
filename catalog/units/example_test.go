package units_test

import (
	"errors"
	"fmt"

	"partsieve/catalog/units"
)

func ExampleParse() {
	cells := []struct {
		s    string
		d    units.Dim
		pick units.Pick
	}{
		{"45 mΩ", units.Resistance, units.Magnitude},
		{"4R7", units.Resistance, units.Magnitude},
		{"0,33 A", units.Current, units.Magnitude},
		{"±20 V", units.Voltage, units.Magnitude},
		{"-55 to 150 °C", units.Temperature, units.Upper},
		{"1.5 A²s", units.I2t, units.Magnitude},
		{"5 %", units.Fraction, units.Magnitude},
	}
	for _, c := range cells {
		v, err := units.Parse(c.s, c.d, c.pick)
		fmt.Println(c.s, "→", v, err)
	}
	_, err := units.Parse("3 A", units.Voltage, units.Magnitude)
	fmt.Println(err)
	_, err = units.Parse("N/A", units.Voltage, units.Magnitude)
	fmt.Println(errors.Is(err, units.ErrEmpty))
	// Output:
	// 45 mΩ → 0.045 <nil>
	// 4R7 → 4.7 <nil>
	// 0,33 A → 0.33 <nil>
	// ±20 V → 20 <nil>
	// -55 to 150 °C → 150 <nil>
	// 1.5 A²s → 1.5 <nil>
	// 5 % → 0.05 <nil>
	// unit "A" is a current; this field wants a voltage (got "3 A")
	// true
}

func ExampleParseWith() {
	_, unit, _ := units.SplitHeaderUnit("R_DS(on) (mΩ)")
	for _, cell := range []string{"45", "0.05 Ω"} {
		v, _ := units.ParseWith(cell, units.Resistance, units.Magnitude, unit)
		fmt.Println(cell, "→", v)
	}
	// Output:
	// 45 → 0.045
	// 0.05 Ω → 0.05
}

func ExampleSplitHeaderUnit() {
	for _, h := range []string{"R_DS(on) (mΩ)", "Vrrm, V", "Pd in W", "IF(AV)"} {
		rest, unit, ok := units.SplitHeaderUnit(h)
		fmt.Printf("%q %q %v\n", rest, unit, ok)
	}
	// Output:
	// "R_DS(on)" "mΩ" true
	// "Vrrm" "V" true
	// "Pd" "W" true
	// "IF(AV)" "" false
}

func ExampleFormat() {
	fmt.Println(units.Format(0.045, units.Resistance))
	fmt.Println(units.Format(0.0000125, units.Current))
	fmt.Println(units.Format(1500, units.Voltage))
	fmt.Println(units.Format(-40, units.Temperature))
	fmt.Println(units.Format(62.5, units.ThermalRes))
	fmt.Println(units.Format(0.05, units.Fraction))
	// Output:
	// 45 mΩ
	// 12.5 µA
	// 1.5 kV
	// -40 °C
	// 62.5 K/W
	// 5 %
}
