package physics_test

import (
	"testing"

	"partsieve/query/physics"
)

var sink float64

func benchModels(b testing.TB) (physics.ForwardModel, physics.Leakage) {
	m, err := physics.NewForwardModel(physics.ForwardData{Class: physics.Schottky, VF: 0.40, IF: 8, TJ: 125, Has2: true, VF2: 0.57, IF2: 16, TJ2: 125})
	if err != nil {
		b.Fatal(err)
	}
	return m, physics.Leakage{IR0: 0.1e-3, T0: 25, VR0: 11, A: 0.07675}
}

// The hot paths run for every catalog part in pick: they must not allocate.
func TestHotPathsDoNotAllocate(t *testing.T) {
	m, leak := benchModels(t)
	g := physics.GateRatings{R1: 0.010, V1: 10, Has2: true, R2: 0.014, V2: 4.5}
	rer, _ := physics.ParseRerate("25:1, 65:0.9, 85:0.8")
	fns := map[string]func(){
		"VF":            func() { sink = m.VF(5, 100) },
		"Loss":          func() { sink = m.Loss(physics.Waveform{Shape: physics.HalfSine, Peak: 10, Duty: 0.5}, 100) },
		"DiodeTj":       func() { sink = physics.DiodeTj(&m, 5, 85, 60, physics.SolveOptions{}).Tj },
		"FETTj":         func() { sink = physics.FETTj(0.01, 0.4, 5, 85, 50, physics.SolveOptions{}).Tj },
		"ReverseBiasTj": func() { sink = physics.ReverseBiasTj(leak, 11, 60, 25, 0, physics.SolveOptions{}).Tj },
		"closure": func() {
			sink = physics.SolveTj(25, 10, physics.PowerFunc(func(tj float64) float64 { return 0.01 * tj }), physics.SolveOptions{}).Tj
		},
		"RdsonAt":      func() { r, _, _ := g.RdsonAt(6); sink = r },
		"RerateFactor": func() { f, _ := rer.Factor(70); sink = f },
		"ParseRerate":  func() { c, _ := physics.ParseRerate("25:1, 65:0.9, 85:0.8"); sink = float64(c.Len()) },
		"PulseFactor":  func() { f, _ := physics.LittelfusePulseTable.Factor(3e4); sink = f },
	}
	for name, fn := range fns {
		if a := testing.AllocsPerRun(100, fn); a != 0 {
			t.Errorf("%s: %g allocations per call", name, a)
		}
	}
}

func BenchmarkVF(b *testing.B) {
	m, _ := benchModels(b)
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		sink = m.VF(5+float64(i&7), 100)
	}
}

func BenchmarkDiodeTj(b *testing.B) {
	m, _ := benchModels(b)
	b.ReportAllocs()
	for b.Loop() {
		sink = physics.DiodeTj(&m, 5, 85, 60, physics.SolveOptions{}).Tj
	}
}

func BenchmarkFETTj(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		sink = physics.FETTj(0.010, 0.4, 5, 85, 50, physics.SolveOptions{}).Tj
	}
}

func BenchmarkReverseBiasTj(b *testing.B) {
	_, leak := benchModels(b)
	b.Run("ta=60", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			sink = physics.ReverseBiasTj(leak, 11, 60, 25, 0, physics.SolveOptions{}).Tj
		}
	})
	b.Run("near-critical", func(b *testing.B) {
		ta := leak.Runaway(11, 25, 0).TaMax - 0.3
		b.ReportAllocs()
		for b.Loop() {
			sink = physics.ReverseBiasTj(leak, 11, ta, 25, 0, physics.SolveOptions{}).Tj
		}
	})
	b.Run("runaway", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			sink = physics.ReverseBiasTj(leak, 11, 100, 25, 0, physics.SolveOptions{}).Tj
		}
	})
}

func BenchmarkParseRerate(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		c, _ := physics.ParseRerate("25:1, 65:0.9, 85:0.8")
		sink = float64(c.Len())
	}
}
