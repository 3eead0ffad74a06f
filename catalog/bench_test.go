package catalog

import (
	"context"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// cpuTime is the user+system CPU time of the process so far; on this
// shared machine it measures the work better than the wall clock.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// genParts makes n invented parts: 40 % diodes, 40 % MOSFETs, 20 % fuses,
// each with the usual ratings, a description, a package and one offer
// with three price breaks.
func genParts(n int, seed uint64) []*Part {
	rng := rand.New(rand.NewPCG(seed, 1))
	makers := []string{"Sable Semi", "Quarry Devices", "Tern Micro", "Harrow Power", "Lumen Fuse", "Kestrel Electronic"}
	pkgs := map[Kind][]string{Diode: {"SMA", "SMB", "SOD-123F", "DO-214AC", "SOD-323"}, MOSFET: {"SOT-23", "DFN5x6", "TO-252", "SO-8"}, Fuse: {"5x20", "1206", "ATO blade"}}
	pick := func(xs []float64) float64 { return xs[rng.IntN(len(xs))] }
	out := make([]*Part, n)
	for i := range out {
		mfr := makers[rng.IntN(len(makers))]
		var p *Part
		switch r := rng.IntN(10); {
		case r < 4:
			typ := []string{"rectifier", "schottky", "zener", "tvs"}[rng.IntN(4)]
			v := pick([]float64{20, 30, 40, 60, 100, 200, 400, 600, 1000})
			a := pick([]float64{0.5, 1, 2, 3, 5})
			p = part(Diode, mfr, fmt.Sprintf("D%s%d-%d", typ[:2], int(v), i), "type", typ,
				"desc", fmt.Sprintf("%s diode %gV %gA", typ, v, a), "vrrm", v, "ifav", a,
				"vf", 0.3+rng.Float64(), "vf_if", a, "ifsm", a*30, "ir", 1e-6*(1+rng.Float64()*100), "ir_vr", v, "tjmax", 150.0, "rthja", 50+rng.Float64()*100)
		case r < 8:
			typ := []string{"n", "p"}[rng.IntN(2)]
			v := pick([]float64{20, 30, 40, 60, 80, 100})
			p = part(MOSFET, mfr, fmt.Sprintf("M%s%d-%d", typ, int(v), i), "type", typ,
				"desc", fmt.Sprintf("%s-channel MOSFET %gV", typ, v), "vds", v, "rdson", 0.001+rng.Float64()*0.1, "rdson_vgs", 10.0,
				"id", 1+rng.Float64()*80, "vgs_max", 20.0, "vgs_th", 1+rng.Float64()*3, "qg", 1e-9*(5+rng.Float64()*80), "tjmax", 150.0, "rthja", 40+rng.Float64()*60)
		default:
			typ := []string{"FF", "F", "M", "T", "TT"}[rng.IntN(5)]
			a := pick([]float64{0.1, 0.25, 0.5, 1, 2, 3.15, 5, 10})
			p = part(Fuse, mfr, fmt.Sprintf("F%s%g-%d", typ, a, i), "type", typ,
				"desc", fmt.Sprintf("fuse %s %gA", typ, a), "in", a, "un_ac", 250.0, "un_dc", pick([]float64{32, 63, 125}), "breaking", 35.0, "i2t", a*a*rng.Float64()*10, "fuse_std", "iec")
		}
		p.Package = pkgs[p.Kind][rng.IntN(len(pkgs[p.Kind]))]
		p.Offers = []Offer{offer("Northwind Parts", fmt.Sprintf("NW-%d", i), int64(rng.IntN(10000)), 1, "EUR",
			PriceBreak{1, 0.5}, PriceBreak{100, 0.3}, PriceBreak{1000, 0.2})}
		out[i] = p
	}
	return out
}

var benchImportN = 50000

// BenchmarkImport measures Put in one transaction: "new" into an empty
// catalog, "same" re-importing identical rows (all unchanged), and
// "commit" the commit with the text index build of the new parts.
func BenchmarkImport(b *testing.B) {
	ctx := context.Background()
	ps := genParts(benchImportN, 7)
	put := func(b *testing.B, s *Store) *ImportTx {
		tx, err := s.BeginImport(ctx, Source{Label: "bench"})
		if err != nil {
			b.Fatal(err)
		}
		for _, p := range ps {
			if _, _, err := tx.Put(p); err != nil {
				b.Fatal(err)
			}
		}
		return tx
	}
	b.Run("new", func(b *testing.B) {
		var d, cpu time.Duration
		for b.Loop() {
			b.StopTimer()
			s := openAt(b, filepath.Join(b.TempDir(), "c.db"))
			b.StartTimer()
			t0, c0 := time.Now(), cpuTime()
			tx := put(b, s)
			d += time.Since(t0)
			cpu += cpuTime() - c0
			b.StopTimer()
			tx.Rollback()
			s.Close()
			b.StartTimer()
		}
		b.ReportMetric(float64(benchImportN*b.N)/d.Seconds(), "rows/s")
		b.ReportMetric(float64(benchImportN*b.N)/cpu.Seconds(), "rows/cpu-s")
	})
	b.Run("same", func(b *testing.B) {
		s := openAt(b, filepath.Join(b.TempDir(), "c.db"))
		tx := put(b, s)
		tx.Commit(Source{})
		var d, cpu time.Duration
		for b.Loop() {
			t0, c0 := time.Now(), cpuTime()
			tx := put(b, s)
			d += time.Since(t0)
			cpu += cpuTime() - c0
			if c := tx.Counts(); c.Unchanged != benchImportN {
				b.Fatalf("counts %+v", c)
			}
			tx.Rollback()
		}
		b.ReportMetric(float64(benchImportN*b.N)/d.Seconds(), "rows/s")
		b.ReportMetric(float64(benchImportN*b.N)/cpu.Seconds(), "rows/cpu-s")
	})
	b.Run("commit", func(b *testing.B) {
		var d, cpu time.Duration
		for b.Loop() {
			b.StopTimer()
			s := openAt(b, filepath.Join(b.TempDir(), "c.db"))
			tx := put(b, s)
			b.StartTimer()
			t0, c0 := time.Now(), cpuTime()
			if err := tx.Commit(Source{}); err != nil {
				b.Fatal(err)
			}
			d += time.Since(t0)
			cpu += cpuTime() - c0
			b.StopTimer()
			s.Close()
			b.StartTimer()
		}
		b.ReportMetric(float64(benchImportN*b.N)/d.Seconds(), "rows/s")
		b.ReportMetric(float64(benchImportN*b.N)/cpu.Seconds(), "rows/cpu-s")
	})
}

// BenchmarkFindParametric runs the typical pre-filter of a MOSFET pick on
// a catalog of 100k parts: kind, three limits, sorted by R_DS(on), top 50.
func BenchmarkFindParametric(b *testing.B) {
	ctx := context.Background()
	s := openAt(b, filepath.Join(b.TempDir(), "c.db"))
	tx, err := s.BeginImport(ctx, Source{Label: "bench"})
	if err != nil {
		b.Fatal(err)
	}
	for _, p := range genParts(100000, 11) {
		if _, _, err := tx.Put(p); err != nil {
			b.Fatal(err)
		}
	}
	if err := tx.Commit(Source{}); err != nil {
		b.Fatal(err)
	}
	queries := map[string]Query{
		"mosfet": {Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 40}, {Field: "rdson", Op: "<=", Num: 0.02}, {Field: "id", Op: ">=", Num: 10}}, Sort: "rdson", Limit: 50},
		"diode":  {Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 100}, {Field: "ifav", Op: ">=", Num: 2}, {Field: "type", Op: "=", Text: "schottky"}}, Sort: "vf", Limit: 50},
		"text":   {Text: "schottky smb", Conds: []Cond{{Field: "vrrm", Op: ">=", Num: 100}}, Sort: "vf", Limit: 50},
	}
	for name, q := range queries {
		b.Run(name, func(b *testing.B) {
			for b.Loop() {
				ps, err := s.Find(ctx, q)
				if err != nil || len(ps) == 0 {
					b.Fatal(len(ps), err)
				}
			}
		})
	}
}
