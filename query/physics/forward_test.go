package physics_test

import (
	"errors"
	"math"
	"testing"

	"partsieve/query/physics"
)

func TestNewForwardModel(t *testing.T) {
	type probe struct{ i, tj, want float64 } // A, °C, V
	cases := []struct {
		name       string
		d          physics.ForwardData
		fit        physics.FitKind
		tcFrom     physics.TCSource
		tc         float64 // V/K
		translated bool
		note       bool // a Note is expected
		probes     []probe
	}{
		{
			// single point, PN class default −2 mV/K [V textbook]; bound: 0.8·V1 + 0.2·V1·I/I1 below I1, V1·I/I1 above
			name: "single point PN",
			d:    physics.ForwardData{Class: physics.SiliconPN, VF: 1.0, IF: 2, TJ: 25},
			fit:  physics.SinglePointBound, tcFrom: physics.TCClassDefault, tc: -2e-3,
			probes: []probe{{2, 25, 1.0}, {1, 25, 0.9}, {0, 25, 0}, {4, 25, 2.0}, {2, 125, 0.8}, {1, -40, 0.9 + 0.13}},
		},
		{
			// same current, two temperatures: [D] REFERENCE §1.3 pair 0.51 → 0.46 V at 0.5 A over 25 → 100 °C (−0.67 mV/K)
			name: "two temperatures, one current",
			d:    physics.ForwardData{Class: physics.Schottky, VF: 0.51, IF: 0.5, TJ: 25, Has2: true, VF2: 0.46, IF2: 0.5, TJ2: 100},
			fit:  physics.SinglePointBound, tcFrom: physics.TCFromData, tc: -0.05 / 75,
			probes: []probe{{0.5, 25, 0.51}, {0.5, 100, 0.46}, {0.5, 62.5, 0.485}},
		},
		{
			// two points at one temperature: ST AN604 line (check 5)
			name: "two currents, one temperature",
			d:    physics.ForwardData{Class: physics.Schottky, VF: 0.57, IF: 16, TJ: 125, Has2: true, VF2: 0.40, IF2: 8, TJ2: 125},
			fit:  physics.TwoPointLine, tcFrom: physics.TCClassDefault, tc: -0.8e-3,
			probes: []probe{{8, 125, 0.40}, {16, 125, 0.57}, {8, 25, 0.48}},
		},
		{
			// different current and temperature: point 2 moved with the Schottky default −0.8 mV/K:
			// V2' = 0.70 + 0.08 = 0.78 V at 3 A, 25 °C → r_d 0.115 Ω, V_T0 0.435 V; point 2 itself is reproduced
			name: "different current and temperature",
			d:    physics.ForwardData{Class: physics.Schottky, VF: 0.55, IF: 1, TJ: 25, Has2: true, VF2: 0.70, IF2: 3, TJ2: 125},
			fit:  physics.TwoPointLine, tcFrom: physics.TCClassDefault, tc: -0.8e-3, translated: true, note: true,
			probes: []probe{{1, 25, 0.55}, {3, 125, 0.70}, {3, 25, 0.78}},
		},
		{
			// user override wins over the data's own coefficient
			name: "override beats data",
			d:    physics.ForwardData{Class: physics.Schottky, VF: 0.51, IF: 0.5, TJ: 25, Has2: true, VF2: 0.46, IF2: 0.5, TJ2: 100, TC: -1e-3, TCOverride: true},
			fit:  physics.SinglePointBound, tcFrom: physics.TCOverride, tc: -1e-3,
			probes: []probe{{0.5, 125, 0.41}},
		},
		{
			// a profile value replaces the class default (not an override)
			name: "profile coefficient",
			d:    physics.ForwardData{Class: physics.SiliconPN, VF: 1.1, IF: 1, TJ: 25, TC: -1.5e-3},
			fit:  physics.SinglePointBound, tcFrom: physics.TCClassDefault, tc: -1.5e-3,
			probes: []probe{{1, 125, 0.95}},
		},
		{
			// moved point gives a negative slope → single-point bound through point 1, with a note
			name: "translated negative slope falls back",
			d:    physics.ForwardData{Class: physics.Schottky, VF: 0.6, IF: 1, TJ: 25, Has2: true, VF2: 0.3, IF2: 2, TJ2: 125},
			fit:  physics.SinglePointBound, tcFrom: physics.TCClassDefault, tc: -0.8e-3, note: true,
			probes: []probe{{1, 25, 0.6}},
		},
		{
			name: "duplicate point keeps the higher V_F",
			d:    physics.ForwardData{Class: physics.SiliconPN, VF: 0.9, IF: 1, TJ: 25, Has2: true, VF2: 0.95, IF2: 1, TJ2: 25.2},
			fit:  physics.SinglePointBound, tcFrom: physics.TCClassDefault, tc: -2e-3, note: true,
			probes: []probe{{1, 25, 0.95}},
		},
	}
	const tol = 1e-9 // V; the probes are exact arithmetic on the model
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := mustForward(t, c.d)
			if m.Fit != c.fit || m.TCFrom != c.tcFrom || m.Translated != c.translated || (m.Note != "") != c.note {
				t.Errorf("model %v: fit %v, tc source %v, translated %v, note %q", m.String(), m.Fit, m.TCFrom, m.Translated, m.Note)
			}
			if math.Abs(m.TC-c.tc) > 1e-12 {
				t.Errorf("TC = %g V/K, want %g", m.TC, c.tc)
			}
			for _, p := range c.probes {
				if got := m.VF(p.i, p.tj); math.Abs(got-p.want) > tol {
					t.Errorf("VF(%g A, %g °C) = %.9g V, want %g", p.i, p.tj, got, p.want)
				}
			}
		})
	}
}

func TestNewForwardModelErrors(t *testing.T) {
	cases := []struct {
		name string
		d    physics.ForwardData
		want error
	}{
		{"zero V_F", physics.ForwardData{VF: 0, IF: 1, TJ: 25}, physics.ErrBadPoint},
		{"negative current", physics.ForwardData{VF: 0.5, IF: -1, TJ: 25}, physics.ErrBadPoint},
		{"NaN temperature", physics.ForwardData{VF: 0.5, IF: 1, TJ: math.NaN()}, physics.ErrBadPoint},
		{"bad second point", physics.ForwardData{VF: 0.5, IF: 1, TJ: 25, Has2: true, VF2: math.Inf(1), IF2: 2, TJ2: 25}, physics.ErrBadPoint},
		{"falling V_F at one temperature", physics.ForwardData{VF: 0.5, IF: 1, TJ: 25, Has2: true, VF2: 0.4, IF2: 2, TJ2: 25}, physics.ErrInconsistentF},
		{"absurd override", physics.ForwardData{VF: 0.5, IF: 1, TJ: 25, TC: 1, TCOverride: true}, physics.ErrBadPoint},
	}
	for _, c := range cases {
		if _, err := physics.NewForwardModel(c.d); !errors.Is(err, c.want) {
			t.Errorf("%s: err %v, want %v", c.name, err, c.want)
		}
	}
}

// models used by the property tests
func propertyModels(t *testing.T) map[string]physics.ForwardModel {
	return map[string]physics.ForwardModel{
		"line":   mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.40, IF: 8, TJ: 125, Has2: true, VF2: 0.57, IF2: 16, TJ2: 125}),
		"single": mustForward(t, physics.ForwardData{Class: physics.SiliconPN, VF: 1.0, IF: 1, TJ: 25}),
		"2temp":  mustForward(t, physics.ForwardData{Class: physics.Schottky, VF: 0.39, IF: 1, TJ: 25, Has2: true, VF2: 0.34, IF2: 1, TJ2: 85}),
	}
}

// Property: loss grows with current, at every temperature, for DC and for
// waveforms (REFERENCE §1.6: P = V_T0·I_AV + r_d·I_RMS², V_T0, r_d ≥ 0).
func TestLossGrowsWithCurrent(t *testing.T) {
	for name, m := range propertyModels(t) {
		for _, tj := range []float64{-40, 25, 85, 150} {
			prevDC, prevHS := -1.0, -1.0
			for i := 0.01; i < 40; i *= 1.1 {
				dc := m.DCLoss(i, tj)
				hs := m.Loss(physics.Waveform{Shape: physics.HalfSine, Peak: i, Duty: 0.5}, tj)
				if !(dc > prevDC) || !(hs > prevHS) {
					t.Fatalf("%s at %g °C: loss not increasing at %g A (DC %g after %g, half-sine %g after %g)", name, tj, i, dc, prevDC, hs, prevHS)
				}
				if d := m.Loss(physics.DCCurrent(i), tj); math.Abs(d-dc) > 1e-12*math.Max(1, dc) {
					t.Fatalf("%s: Loss(DC %g A) = %g, DCLoss = %g", name, i, d, dc)
				}
				prevDC, prevHS = dc, hs
			}
		}
	}
}

// Property: the AN604 constants of Linear bound the model from above over
// 0…I_pk, so waveform losses stay upper bounds.
func TestLinearBoundsModel(t *testing.T) {
	for name, m := range propertyModels(t) {
		for _, tj := range []float64{-40, 25, 125} {
			for _, ipk := range []float64{0.2, 1, 3, 8, 20} {
				vt0, rd := m.Linear(tj, ipk)
				for k := 1; k <= 50; k++ {
					i := ipk * float64(k) / 50
					if line, v := vt0+rd*i, m.VF(i, tj); line < v-1e-12 {
						t.Fatalf("%s %g °C ipk %g: line %g < V_F(%g A) = %g", name, tj, ipk, line, i, v)
					}
				}
			}
		}
	}
}

func TestWaveformValidate(t *testing.T) {
	good := []physics.Waveform{physics.DCCurrent(3), {Shape: physics.Trapezoid, Peak: 2, Min: 1, Duty: 0.3}, {Shape: physics.Triangle, Peak: 1, Duty: 1}}
	bad := []physics.Waveform{{Shape: physics.DC, Peak: -1}, {Shape: physics.HalfSine, Peak: 1, Duty: 0}, {Shape: physics.Trapezoid, Peak: 1, Min: 2, Duty: 0.5}, {Shape: 42, Peak: 1, Duty: 0.5}}
	for _, w := range good {
		if err := w.Validate(); err != nil {
			t.Errorf("%+v: %v", w, err)
		}
	}
	for _, w := range bad {
		if err := w.Validate(); err == nil {
			t.Errorf("%+v: no error", w)
		}
	}
	// AN604 form-factor limit: peak below ≈3× average [V]
	if !(physics.Waveform{Shape: physics.Rectangular, Peak: 20, Duty: 0.5}).FormFactorOK() {
		t.Error("δ = 0.5 rectangle should be within the AN604 form-factor limit")
	}
	if (physics.Waveform{Shape: physics.Rectangular, Peak: 20, Duty: 0.2}).FormFactorOK() {
		t.Error("δ = 0.2 rectangle (peak 5× average) should be outside the limit")
	}
	// half-sine at δ = 1 has I_AV = 2/π·I_M and I_RMS² = I_M²/2 [V AN604]
	hs := physics.Waveform{Shape: physics.HalfSine, Peak: math.Pi, Duty: 1}
	if math.Abs(hs.Average()-2) > 1e-12 || math.Abs(hs.RMS2()-math.Pi*math.Pi/2) > 1e-12 {
		t.Errorf("half-sine: avg %g, rms² %g", hs.Average(), hs.RMS2())
	}
}

func TestShockley(t *testing.T) {
	// synthetic part: n = 1.05, I_S = 1 µA, R_S = 20 mΩ at 25 °C; points span 3 decades
	truth := physics.Shockley{N: 1.05, IS: 1e-6, RS: 0.02, TRef: 25}
	var pts []physics.Point
	for _, i := range []float64{0.01, 0.1, 1, 5} {
		pts = append(pts, physics.Point{I: i, V: truth.VF(i, 25)})
	}
	s, err := physics.FitShockley3(pts, 25, physics.Schottky)
	if err != nil {
		t.Fatal(err)
	}
	// the synthetic points hold ln(I/I_S + 1), the fit ln(I/I_S): relative 1e-4 covers that
	checkApprox(t, []approxCase{
		{"n", s.N, 1.05, 1e-4},
		{"R_S Ω", s.RS, 0.02, 1e-5},
		{"I_S µA", s.IS * 1e6, 1, 1e-3},
	})
	for _, p := range pts {
		if got := s.VF(p.I, 25); math.Abs(got-p.V) > 1e-5 {
			t.Errorf("fitted VF(%g) = %g, want %g", p.I, got, p.V)
		}
	}
	// two points, pure exponential (R_S = 0): recovers n exactly
	ex := physics.Shockley{N: 1.8, IS: 1e-9, TRef: 25}
	s2, err := physics.FitShockley2(physics.Point{I: 0.01, V: ex.VF(0.01, 25)}, physics.Point{I: 0.1, V: ex.VF(0.1, 25)}, 25, physics.SiliconPN)
	if err != nil {
		t.Fatal(err)
	}
	checkApprox(t, []approxCase{{"2-point n", s2.N, 1.8, 1e-6}})
	// a decade is n·V_T·ln10 = 59.159 mV·n at 25 °C [D] (check 2)
	if d := s2.VF(1, 25) - s2.VF(0.1, 25); math.Abs(d-1.8*0.059159) > 1e-5 {
		t.Errorf("decade step %g V, want %g", d, 1.8*0.059159)
	}
	// SPICE temperature law: silicon, n = 1, ~0.6 V at 1 mA → dV/dT ≈ −2 mV/K
	// [V textbook −2 mV/K; range −1.8…−2.2 M], tolerance ±0.3 mV/K
	si := physics.Shockley{N: 1, IS: 1e-3 / math.Exp(0.6/physics.ThermalVoltageC(25)), TRef: 25}
	si.XTI, si.EG = physics.SPICETemperatureParams(physics.SiliconPN)
	tc := (si.VF(1e-3, 35) - si.VF(1e-3, 15)) / 20
	if tc > -1.7e-3 || tc < -2.3e-3 {
		t.Errorf("silicon dV/dT = %g V/K, want ≈ −2 mV/K", tc)
	}
	// points with no ohmic bend (concave-down residual) refit with R_S = 0
	flat := []physics.Point{{I: 0.01, V: 0.30}, {I: 0.1, V: 0.37}, {I: 1, V: 0.43}}
	if f, err := physics.FitShockley3(flat, 25, physics.Schottky); err != nil || f.RS != 0 {
		t.Errorf("flat fit: R_S %g, err %v; want R_S = 0", f.RS, err)
	}
	if _, err := physics.FitShockley3(pts[:2], 25, physics.Schottky); err == nil {
		t.Error("FitShockley3 with 2 points: no error")
	}
	if _, err := physics.FitShockley2(physics.Point{I: 1, V: 0.5}, physics.Point{I: 2, V: 0.4}, 25, physics.Schottky); !errors.Is(err, physics.ErrInconsistentF) {
		t.Errorf("falling V_F: err %v", err)
	}
}

func TestDiodeClassOf(t *testing.T) {
	for typ, want := range map[string]physics.DiodeClass{"schottky": physics.Schottky, " Schottky ": physics.Schottky, "rectifier": physics.SiliconPN, "zener": physics.SiliconPN, "tvs": physics.SiliconPN} {
		if got := physics.DiodeClassOf(typ); got != want {
			t.Errorf("DiodeClassOf(%q) = %v", typ, got)
		}
	}
}
