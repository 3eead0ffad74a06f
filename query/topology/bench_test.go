package topology

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"partsieve/catalog"
)

// genParts generates n invented parts with plausible, mutually consistent
// values (deterministic for a seed): 30 % rectifier and Schottky diodes,
// 8 % Zeners, 27 % fuses, 35 % MOSFETs (half P, half N). Each part has
// one offer.
func genParts(n int, seed uint64) []catalog.Part {
	r := rand.New(rand.NewPCG(seed, seed^0x9e3779b97f4a7c15))
	logU := func(lo, hi float64) float64 { return lo * math.Exp(r.Float64()*math.Log(hi/lo)) }
	pick := func(xs ...float64) float64 { return xs[r.IntN(len(xs))] }
	parts := make([]catalog.Part, 0, n)
	for i := 0; i < n; i++ {
		var p catalog.Part
		u := r.Float64()
		mpn := fmt.Sprintf("G%07d", i)
		switch {
		case u < 0.30:
			sch := r.IntN(2) == 0
			typ := "rectifier"
			vrrm := pick(50, 100, 200, 400, 600, 1000)
			vf := 0.9 + 0.3*r.Float64()
			if sch {
				typ = "schottky"
				vrrm = pick(20, 30, 40, 45, 60, 100, 150)
				vf = 0.35 + vrrm/400 + 0.1*r.Float64()
			}
			ifav := pick(0.5, 1, 2, 3, 5, 8, 10, 15, 20, 30)
			ir := logU(1e-7, 1e-4)
			p = mk(catalog.Diode, typ, mpn, "vrrm", vrrm, "ifav", ifav, "ifsm", ifav*logU(20, 35), "ifsm_t", pick(0.0083, 0.01),
				"vf", vf, "vf_if", ifav, "vf_tj", 25, "vf2", vf-0.07-0.1*r.Float64(), "vf2_if", ifav, "vf2_tj", 125,
				"ir", ir, "ir_vr", vrrm, "ir_tj", 25, "ir2", ir*logU(50, 500), "ir2_tj", 100,
				"rthja", logU(20, 200), "tjmax", pick(125, 150, 175))
		case u < 0.38:
			vz := pick(3.3, 4.7, 5.6, 6.8, 8.2, 10, 12, 13, 15, 18, 20, 24)
			p = mk(catalog.Diode, "zener", mpn, "vz", vz, "vz_tol", pick(0.02, 0.05), "pd", pick(0.25, 0.5, 1, 3),
				"tjmax", 150, "rthja", logU(40, 500))
		case u < 0.65:
			in := pick(0.5, 1, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8, 10, 15, 20, 30)
			std := []string{"iec", "ul", "blade"}[r.IntN(3)]
			i2t := in * in * logU(0.1, 10)
			p = mk(catalog.Fuse, pick2(r, "F", "T", "M"), mpn, "in", in, "un_dc", pick(32, 48, 63, 125), "breaking", pick(35, 50, 100, 300, 1000, 1500),
				"i2t", i2t, "rcold", 0.07/math.Pow(in, 0.9)*logU(0.7, 1.4), "fuse_std", std, "rerate", "25:1, 70:0.88, 100:0.76")
			if r.IntN(3) == 0 {
				p.Num["i2t_clear"] = i2t * logU(1.2, 1.8)
			}
		default:
			typ := "n"
			if r.IntN(2) == 0 {
				typ = "p"
			}
			vds := pick(20, 30, 40, 60, 80, 100)
			rds := logU(0.002, 0.3)
			vgs := pick(8, 12, 20, 20, 20)
			v1 := 10.0
			if vgs < 20 {
				v1 = 4.5
			}
			p = mk(catalog.MOSFET, typ, mpn, "vds", vds, "id", math.Min(150, 0.3/rds*logU(0.5, 2)), "vgs_max", vgs, "vgs_th", pick(1, 2.5, 4),
				"rdson", rds, "rdson_vgs", v1, "rthja", logU(30, 160), "tjmax", pick(150, 175), "pd", logU(0.5, 4))
			if r.IntN(3) > 0 {
				p.Num["rdson2"], p.Num["rdson2_vgs"] = rds*1.45, v1/1.8
			}
		}
		parts = append(parts, withOffer(p, "Benchmark Supply", pick2(r, "EUR", "USD"), int64(r.IntN(50000)), 1, logU(0.05, 3), 1000, logU(0.02, 2)))
	}
	return parts
}

func pick2(r *rand.Rand, xs ...string) string { return xs[r.IntN(len(xs))] }

// BenchmarkPick evaluates the example specs against a generated
// 100,000-part catalog held in memory (the catalog is prepared once;
// BenchmarkNewCatalog measures that step).
func BenchmarkPick(b *testing.B) {
	benchPick(b, 100_000)
}

// BenchmarkPick1M is BenchmarkPick at 1,000,000 parts; it needs about
// 2 GB of memory, so it runs only with PARTSIEVE_BENCH_1M=1.
func BenchmarkPick1M(b *testing.B) {
	if os.Getenv("PARTSIEVE_BENCH_1M") == "" {
		b.Skip("set PARTSIEVE_BENCH_1M=1 to run the 1,000,000-part benchmark")
	}
	benchPick(b, 1_000_000)
}

func benchPick(b *testing.B, n int) {
	cat := NewCatalog(genParts(n, 1))
	for _, name := range exampleNames {
		s := exampleSpec(b, name)
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			var q int
			for b.Loop() {
				r := Evaluate(s, cat, Options{})
				q = 0
				for _, t := range r.Topologies {
					q += t.Qualified
				}
			}
			b.ReportMetric(float64(q), "qualified")
		})
	}
}

func BenchmarkNewCatalog(b *testing.B) {
	parts := genParts(100_000, 1)
	b.ReportAllocs()
	for b.Loop() {
		NewCatalog(parts)
	}
}

// TestScanDoesNotAllocate checks that evaluating a part in fast mode
// (the catalog scan) allocates nothing, for every role.
func TestScanDoesNotAllocate(t *testing.T) {
	cat := NewCatalog(genParts(2000, 7))
	for _, name := range exampleNames {
		s := exampleSpec(t, name)
		e := newEngine(s, cat, Options{})
		e.runFET(false) // fill the Zener window cache, as the scan does before
		e.runFET(true)
		var c checker
		allocs := testing.AllocsPerRun(10, func() {
			for i := range cat.diodes {
				c.reset(false, s.Ambient.TMax)
				e.seriesDiode(&cat.diodes[i], &c)
				c.reset(false, s.Ambient.TMax)
				e.shuntDiode(&cat.diodes[i], &c)
			}
			for i := range cat.fuses {
				c.reset(false, s.Ambient.TMax)
				e.fuse(&cat.fuses[i], &c)
			}
			for i := range cat.pfets {
				c.reset(false, s.Ambient.TMax)
				e.fet(&cat.pfets[i], false, &c)
			}
			for i := range cat.nfets {
				c.reset(false, s.Ambient.TMax)
				e.fet(&cat.nfets[i], true, &c)
			}
		})
		if allocs != 0 {
			t.Errorf("%s: scan allocates %.0f times per pass", name, allocs)
		}
	}
}

// TestGeneratedCatalogQualifies keeps the benchmark honest: on the
// generated catalog every topology of the sensor spec has candidates, so
// the benchmark exercises the full physics, the pairing and the ranking.
func TestGeneratedCatalogQualifies(t *testing.T) {
	r := Evaluate(exampleSpec(t, "sensor-24v-industrial"), NewCatalog(genParts(20_000, 1)), Options{})
	for _, tr := range r.Topologies {
		if tr.Qualified == 0 {
			t.Errorf("%s: nothing qualifies (%s)", tr.Topology, tr.NoneReason)
		}
	}
}

// BenchmarkPickStore runs Pick through a SQLite catalog of 100,000
// generated parts: the SQL pre-filters, loading the remaining parts with
// offers, then the evaluation. Building the catalog takes a while, so it
// runs only with PARTSIEVE_BENCH_STORE=1.
func BenchmarkPickStore(b *testing.B) {
	if os.Getenv("PARTSIEVE_BENCH_STORE") == "" {
		b.Skip("set PARTSIEVE_BENCH_STORE=1 to build a 100,000-part SQLite catalog and run Pick on it")
	}
	ctx := context.Background()
	st, err := catalog.Open(ctx, filepath.Join(b.TempDir(), "bench.db"))
	if err != nil {
		b.Fatal(err)
	}
	defer st.Close()
	tx, err := st.BeginImport(ctx, catalog.Source{Label: "bench", File: "generated"})
	if err != nil {
		b.Fatal(err)
	}
	parts := genParts(100_000, 1)
	for i := range parts {
		if _, _, err := tx.Put(&parts[i]); err != nil {
			b.Fatal(err)
		}
	}
	if err := tx.Commit(catalog.Source{Read: len(parts)}); err != nil {
		b.Fatal(err)
	}
	for _, name := range exampleNames {
		s := exampleSpec(b, name)
		b.Run(name, func(b *testing.B) {
			var q int
			for b.Loop() {
				r, err := Pick(ctx, st, s, Options{})
				if err != nil {
					b.Fatal(err)
				}
				q = 0
				for _, t := range r.Topologies {
					q += t.Qualified
				}
			}
			b.ReportMetric(float64(q), "qualified")
		})
	}
}
