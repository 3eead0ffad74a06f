package importers_test

import (
	"context"
	"os"
	"path/filepath"
	"strconv"
	"sync"
	"testing"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/seeddata/synth"
)

// synthRows is the size of the synthetic CSV of BenchmarkImportSynthCSV;
// PARTSIEVE_BENCH_ROWS overrides it (e.g. 1000000 for the scale).
func synthRows() int {
	if n, err := strconv.Atoi(os.Getenv("PARTSIEVE_BENCH_ROWS")); err == nil && n > 0 {
		return n
	}
	return 100_000
}

var synthFile struct {
	once sync.Once
	path string
	err  error
}

// synthCSV writes the synthetic catalog CSV (canonical headers, the data
// of cmd/partsieve-bench) once per test binary.
func synthCSV(b *testing.B) string {
	synthFile.once.Do(func() {
		dir, err := os.MkdirTemp("", "partsieve-synth-bench")
		if err != nil {
			synthFile.err = err
			return
		}
		synthFile.path = filepath.Join(dir, "parts.csv")
		f, err := os.Create(synthFile.path)
		if err != nil {
			synthFile.err = err
			return
		}
		if err := synth.WriteCSV(f, synth.New(1), synth.Canonical, synthRows()); err != nil {
			f.Close()
			synthFile.err = err
			return
		}
		synthFile.err = f.Close()
	})
	if synthFile.err != nil {
		b.Fatal(synthFile.err)
	}
	return synthFile.path
}

// BenchmarkImportSynthCSV imports the synthetic catalog CSV into a new
// catalog, the import phase of cmd/partsieve-bench at a smaller scale.
// "usable" is the time until the SQLite commit (the parts can be found);
// the text index update after it is reported apart.
func BenchmarkImportSynthCSV(b *testing.B) {
	path := synthCSV(b)
	rows := synthRows()
	var total float64
	for b.Loop() {
		b.StopTimer()
		st, err := catalog.Open(context.Background(), filepath.Join(b.TempDir(), "bench.db"))
		if err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		s, err := importers.ImportFile(context.Background(), st, path, importers.Options{Source: "synth"})
		if err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		if s.Added != rows || s.Rejected != 0 {
			b.Fatalf("added %d rejected %d", s.Added, s.Rejected)
		}
		total += float64(s.Read)
		st.Close()
		b.StartTimer()
	}
	b.ReportMetric(total/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkCheckSynthCSV reads and converts the synthetic CSV without a
// store: the reading side of an import.
func BenchmarkCheckSynthCSV(b *testing.B) {
	path := synthCSV(b)
	var total float64
	for b.Loop() {
		s, err := importers.ImportFile(context.Background(), nil, path, importers.Options{Source: "synth"})
		if err != nil {
			b.Fatal(err)
		}
		total += float64(s.Read)
	}
	b.ReportMetric(total/b.Elapsed().Seconds(), "rows/s")
}
