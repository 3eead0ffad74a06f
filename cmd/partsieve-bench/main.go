// Command partsieve-bench measures partsieve at scale on a synthetic catalog
// (seeddata/synth) and prints the figures beside the engine references and
// the targets of the scale issue:
//
//	go run ./cmd/partsieve-bench -rows 1000000
//
// It generates the data into a temporary directory, then runs every phase
// as a child process of itself, so that each phase's peak resident memory
// (rusage ru_maxrss of the child) is its own:
//
//	gen       write the CSV (-rows rows, canonical headers) and a 100,000-row
//	          XLSX (plain-word headers, units in cells)
//	import    import the CSV into a new catalog; "parts usable" is when the
//	          commit is visible to another connection (the catalog
//	          generation changes), "text index ready" is when ImportFile
//	          returns (the index is updated after the commit)
//	sqlite3   the C sqlite3 shell's .import of the same CSV into a typed table
//	          with no key and no index (the NULL fix-up of empty cells
//	          timed apart), timed to its commit as seen by another
//	          connection, as parts usable is, and as a whole command (which
//	          also holds the checkpoints after the commit)
//	sqlite3-keyed
//	          the same .import into a table with the catalog's kind of key
//	          and indexes, created before the import: UNIQUE (mpn, mfr), an
//	          index on (mfr, mpn, kind) and the catalog's partial parametric
//	          indexes; the import fails unless every CSV row is in the table.
//	          Its partial indexes also hold the empty cells (imported as
//	          empty strings, not NULL) until the fix-up removes them
//	driver    the .import's work (same typed table, pragmas and text cells,
//	          one transaction) through the pure-Go SQLite driver partsieve
//	          uses: one bound INSERT a row, then batches of 2,048 rows by
//	          INSERT … SELECT from a virtual table (what the driver alone
//	          costs against the C shell)
//	bleve     raw bleve batch indexing (batch 10,000) of mfr, mpn, desc, package
//	xlsx      import of the XLSX into a new catalog
//	find      catalog.Store.Search latencies (p50/p90) of parametric and
//	          text queries, and the same SQL in the sqlite3 shell (.timer)
//	pick      topology.Pick per example spec on the CSV catalog and on the
//	          XLSX one, each in a fresh child process as the command line
//	          runs it (median of three, process start to result), against a
//	          plain in-memory scan of the same columns (Pick's pre-filter
//	          conditions over the catalog's column sets)
//	import-usable, sqlite3-pair
//	          after the phases above, -pairs − 1 more runs of the CSV import
//	          (stopped at the commit) and of the shell's .import alone, one
//	          right after the other: the verdict on parts usable is also
//	          given on the median ratio of the pairs (the first pair is the
//	          import and sqlite3 phases), since the speed of a shared VM
//	          drifts between phases
//
// The figures depend on the machine; the targets are those of the scale
// issue (parts usable ≤ 2× .import, text indexing ≥ 80 % of raw bleve
// speed, find p50 ≤ 50 ms, pick ≤ 1 s per spec, import peak ≤ 300 MB).
package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"syscall"
	"time"
)

func main() {
	rows := flag.Int("rows", 1000000, "rows of the generated CSV")
	xrows := flag.Int("xlsx-rows", 100000, "rows of the generated XLSX")
	seed := flag.Uint64("seed", 1, "generator seed")
	dir := flag.String("dir", "", "work directory (default: a new temporary directory, removed at the end)")
	keep := flag.Bool("keep", false, "keep the work directory")
	phase := flag.String("phase", "", "internal: run one phase in this process")
	reps := flag.Int("reps", 21, "repetitions of each find query")
	pairs := flag.Int("pairs", 3, "runs of the CSV import and of the shell's .import, one right after the other, for the parts-usable ratio")
	flag.Parse()
	if exe, err := os.Executable(); err == nil {
		selfExe = exe
	}
	if *phase != "" {
		res, err := runPhase(*phase, *dir, *rows, *xrows, *seed, *reps)
		if err != nil {
			fmt.Fprintf(os.Stderr, "phase %s: %v\n", *phase, err)
			os.Exit(1)
		}
		json.NewEncoder(os.Stdout).Encode(res)
		return
	}
	if err := parent(*dir, *keep, *rows, *xrows, *seed, *reps, *pairs); err != nil {
		fmt.Fprintln(os.Stderr, "partsieve-bench:", err)
		os.Exit(1)
	}
}

// results maps a figure's name to its value (seconds, counts, MB).
type results map[string]float64

func parent(dir string, keep bool, rows, xrows int, seed uint64, reps, pairs int) error {
	if dir == "" {
		d, err := os.MkdirTemp("", "partsieve-bench-")
		if err != nil {
			return err
		}
		dir = d
		if !keep {
			defer os.RemoveAll(dir)
		}
	}
	xrows = min(xrows, rows)
	self, err := os.Executable()
	if err != nil {
		return err
	}
	all := results{}
	peak := map[string]float64{}
	run := func(ph string) (results, error) {
		// the files earlier phases wrote (a gigabyte and more) are
		// flushed first, so that their write-back does not run beside
		// the phase being timed
		syscall.Sync()
		fmt.Fprintf(os.Stderr, "%s  phase %s ...\n", time.Now().Format("15:04:05"), ph)
		cmd := exec.Command(self, "-phase", ph, "-dir", dir, "-rows", fmt.Sprint(rows),
			"-xlsx-rows", fmt.Sprint(xrows), "-seed", fmt.Sprint(seed), "-reps", fmt.Sprint(reps))
		var out bytes.Buffer
		cmd.Stdout = &out
		cmd.Stderr = os.Stderr
		if err := cmd.Run(); err != nil {
			return nil, fmt.Errorf("phase %s: %w", ph, err)
		}
		var r results
		if err := json.Unmarshal(out.Bytes(), &r); err != nil {
			return nil, fmt.Errorf("phase %s: %w", ph, err)
		}
		if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
			peak[ph] = max(peak[ph], float64(ru.Maxrss)/1024) // Linux: KiB
		}
		return r, nil
	}
	phases := []string{"gen", "import", "sqlite3", "sqlite3-keyed", "driver", "bleve", "xlsx", "find", "pick"}
	for _, ph := range phases {
		r, err := run(ph)
		if err != nil {
			return err
		}
		for k, v := range r {
			all[k] = v
		}
	}
	// This VM's speed drifts by a sixth and more over minutes, so the
	// ratio of parts usable to .import is also taken over pairs of runs
	// one right after the other: the first pair is the import and sqlite3
	// phases above, the others run here (the import stops at the commit,
	// the shell after its .import).
	if _, ok := all["sqlite3_import_s"]; ok && pairs > 1 {
		all[pairKey("usable", 1)], all[pairKey("import", 1)] = all["import_usable_s"], all["sqlite3_import_s"]
		for i := 2; i <= pairs; i++ {
			// the order alternates (shell first in even pairs), so that a
			// steady drift of the machine's speed does not favour one side
			order := []string{"import-usable", "sqlite3-pair"}
			if i%2 == 0 {
				order = []string{"sqlite3-pair", "import-usable"}
			}
			for _, ph := range order {
				r, err := run(ph)
				if err != nil {
					return err
				}
				if ph == "import-usable" {
					if r["import_added"] != all["import_added"] {
						return fmt.Errorf("pair %d: the import committed %v parts, the first import %v", i, r["import_added"], all["import_added"])
					}
					all[pairKey("usable", i)] = r["import_usable_s"]
				} else {
					all[pairKey("import", i)] = r["sqlite3_import_s"]
					all["sqlite3_commit_unseen"] += r["sqlite3_commit_unseen"]
				}
			}
		}
	}
	report(os.Stdout, all, peak, rows, xrows)
	return nil
}

// shellTotal is the note of a shell command's whole time beside the time
// to its commit (shellImport), or "" when it was not measured.
func shellTotal(total float64) string {
	if total <= 0 {
		return ""
	}
	return " to its commit, whole command " + secs(total)
}

// unseenNote warns that a shell time is the whole command's: the poller
// missed the commit (a run shorter than a few polls).
func unseenNote(n float64) string {
	if n <= 0 {
		return ""
	}
	return fmt.Sprintf(" [%.0f run(s): commit not seen, whole command used]", n)
}

// pairKey names the figure of pair i (1, 2, …): "usable" or "import".
func pairKey(what string, i int) string { return fmt.Sprintf("pair%d_%s_s", i, what) }

// pairRatios returns the pairs' figures of parts usable and .import and
// the ratio of each pair, in pair order.
func pairRatios(r results) (usable, imp, ratio []float64) {
	for i := 1; ; i++ {
		u, ok1 := r[pairKey("usable", i)]
		v, ok2 := r[pairKey("import", i)]
		if !ok1 || !ok2 || v <= 0 {
			return usable, imp, ratio
		}
		usable, imp, ratio = append(usable, u), append(imp, v), append(ratio, u/v)
	}
}

// median of xs (not empty), the mean of the middle two for an even count.
func median(xs []float64) float64 {
	s := append([]float64(nil), xs...)
	sort.Float64s(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}

// line is one row of the report.
type line struct {
	what, ours, ref, target, verdict string
}

func report(w io.Writer, r results, peak map[string]float64, rows, xrows int) {
	host, _ := os.Hostname()
	fmt.Fprintf(w, "partsieve-bench: %d CSV rows, %d XLSX rows, %s/%s, %d CPUs, %s, host %s\n\n",
		rows, xrows, runtime.GOOS, runtime.GOARCH, runtime.NumCPU(), runtime.Version(), host)
	var ls []line
	pf := func(ok bool) string {
		if ok {
			return "PASS"
		}
		return "MISS"
	}
	ratePerS := func(n, s float64) string { return fmt.Sprintf("%.0f rows/s", n/s) }
	n := float64(rows)
	usable, ready := r["import_usable_s"], r["import_ready_s"]
	if v, ok := r["sqlite3_import_s"]; ok {
		ls = append(ls, line{"CSV import: parts usable (committed)", secs(usable),
			".import " + secs(v) + shellTotal(r["sqlite3_import_total_s"]) + fmt.Sprintf(" (+%s NULL fix-up)", secs(r["sqlite3_fixup_s"])) + unseenNote(r["sqlite3_commit_unseen"]),
			"≤ 2× .import", pf(usable <= 2*v) + fmt.Sprintf(" (%.2f×)", usable/v)})
		if us, is, rs := pairRatios(r); len(rs) > 1 {
			var each []string
			for i := range rs {
				each = append(each, fmt.Sprintf("%.2f/%.2f s = %.2f×", us[i], is[i], rs[i]))
			}
			m := median(rs)
			ls = append(ls, line{fmt.Sprintf("  the same over %d pairs run one after the other", len(rs)),
				"median " + secs(median(us)), ".import median " + secs(median(is)),
				"≤ 2× .import", pf(m <= 2) + fmt.Sprintf(" (median ratio %.2f×)", m)})
			ls = append(ls, line{"  (info) each pair: parts usable / .import", strings.Join(each, "; "), "", "", ""})
		}
		if k, ok := r["sqlite3_keyed_import_s"]; ok {
			ls = append(ls, line{"  vs .import, same key and indexes as the catalog", secs(usable),
				".import " + secs(k) + shellTotal(r["sqlite3_keyed_import_total_s"]) + fmt.Sprintf(" (+%s NULL fix-up), peak %s", secs(r["sqlite3_keyed_fixup_s"]), mb(r["sqlite3_keyed_peak_mb"])) + unseenNote(r["sqlite3_keyed_commit_unseen"]),
				"≤ 2× .import", pf(usable <= 2*k) + fmt.Sprintf(" (%.2f×)", usable/k)})
		}
	} else {
		ls = append(ls, line{"CSV import: parts usable (committed)", secs(usable), "sqlite3 shell absent", "≤ 2× .import", "n/a"})
	}
	if b, ok := r["driver_bound_s"]; ok {
		ref := ""
		if v, ok := r["sqlite3_import_s"]; ok {
			ref = fmt.Sprintf("%.2f× and %.2f× .import", b/v, r["driver_batched_s"]/v)
		}
		ls = append(ls, line{"  (info) .import's work through the pure-Go driver", "one INSERT a row " + secs(b) + ", batched " + secs(r["driver_batched_s"]), ref, "", ""})
	}
	idx := ready - usable
	braw := r["bleve_s"]
	ls = append(ls, line{"CSV import: text index ready", secs(ready) + " (index " + secs(idx) + ", " + ratePerS(n, idx) + ")",
		"raw bleve " + secs(braw) + " (" + ratePerS(n, braw) + ")", "≥ 80 % of raw bleve",
		pf(braw/idx >= 0.8) + fmt.Sprintf(" (%.0f %%)", 100*braw/idx)})
	ls = append(ls, line{"CSV import: peak RSS", mb(peak["import"]), ".import " + mb(r["sqlite3_peak_mb"]) + ", bleve " + mb(peak["bleve"]),
		"≤ 300 MB", pf(peak["import"] <= 300)})
	ls = append(ls, line{fmt.Sprintf("XLSX import (%d rows)", xrows), secs(r["xlsx_s"]) + ", peak " + mb(peak["xlsx"]), "", "", ""})
	for _, q := range findQueries {
		ref := "n/a"
		if v, ok := r["sh_"+q.name+"_p50"]; ok {
			ref = ms(v) + " / " + ms(r["sh_"+q.name+"_p90"])
		}
		p50 := r["find_"+q.name+"_p50"]
		ls = append(ls, line{"find " + q.name + " p50/p90 (" + fmt.Sprint(r["find_"+q.name+"_n"]) + " hits)",
			ms(p50) + " / " + ms(r["find_"+q.name+"_p90"]), ref, "p50 ≤ 50 ms", pf(p50 <= 0.050)})
	}
	ls = append(ls, line{"find phase peak RSS", mb(peak["find"]), "", "", ""})
	names := []string{}
	for k := range r {
		if strings.HasPrefix(k, "scan_") && strings.HasSuffix(k, "_n") {
			names = append(names, strings.TrimSuffix(strings.TrimPrefix(k, "scan_"), "_n"))
		}
	}
	sort.Strings(names)
	for _, tag := range []string{"x_", ""} {
		parts := r["pick_"+tag+"parts"]
		for _, nm := range names {
			v := r["pick_"+tag+nm+"_s"]
			ref := ""
			if tag == "" {
				ref = fmt.Sprintf("plain scan %s (%.0f pass)", ms(r["scan_"+nm+"_s"]), r["scan_"+nm+"_n"])
			}
			ls = append(ls, line{fmt.Sprintf("pick %s (%.0f parts, %.0f qualify)", nm, parts, r["pick_"+tag+nm+"_qualified"]),
				secs(v) + " (in the process " + secs(r["pick_"+tag+nm+"_in_s"]) + ")", ref, "≤ 1 s", pf(v <= 1)})
		}
	}
	ls = append(ls, line{"pick phase peak RSS", mb(peak["pick"]), "column sets loaded in " + secs(r["scan_load_s"]), "", ""})
	ls = append(ls, line{"generation (CSV + XLSX)", secs(r["gen_s"]) + ", peak " + mb(peak["gen"]), "", "", ""})
	wd := []int{0, 0, 0, 0}
	for _, l := range ls {
		for i, s := range []string{l.what, l.ours, l.ref, l.target} {
			wd[i] = max(wd[i], len([]rune(s)))
		}
	}
	hdr := line{"measure", "partsieve", "reference", "target", "result"}
	for _, l := range append([]line{hdr}, ls...) {
		fmt.Fprintf(w, "%s  %s  %s  %s  %s\n", pad(l.what, wd[0]), pad(l.ours, wd[1]), pad(l.ref, wd[2]), pad(l.target, wd[3]), l.verdict)
	}
}

func pad(s string, n int) string { return s + strings.Repeat(" ", max(0, n-len([]rune(s)))) }
func secs(v float64) string      { return fmt.Sprintf("%.2f s", v) }
func ms(v float64) string        { return fmt.Sprintf("%.1f ms", v*1000) }
func mb(v float64) string        { return fmt.Sprintf("%.0f MB", v) }

// csvPath and friends name the files of the work directory.
func csvPath(dir string) string  { return filepath.Join(dir, "parts.csv") }
func xlsxPath(dir string) string { return filepath.Join(dir, "parts.xlsx") }
func catPath(dir string) string  { return filepath.Join(dir, "catalog.db") }
