//go:build unix

package hardening

import (
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestCrashDuringImport starts `partsieve import` of the update sheet on a
// copy of the old catalog and kills it with SIGKILL after a random delay
// (uniform over 0 to 1.1 times the duration of a complete import, so kills
// land in start-up, reading, the SQLite transaction, the commit, the text
// index update and after the end). After every kill:
//
//   - `partsieve catalog check` passes, or reports only a text index marked
//     stale (another generation, missing, unreadable);
//   - the catalog is exactly the old state or exactly the complete import
//     (parts with every field, offers, provenance, sources, meta, schema);
//   - text searches agree with that state: a part only in the update is
//     found exactly in the new state, and the word only in revised
//     descriptions finds every revised part there and nothing in the old;
//     neither search falls back to the plain substring search;
//   - when the index was stale, the first text search (which rebuilds
//     it) is killed too at a random moment; the check still passes or
//     reports a stale index;
//   - after those searches `catalog check` is clean, and no directory of
//     a killed rebuild is left beside the index.
//
// PARTSIEVE_CRASH_RUNS sets the number of kills (default 50, 12 with
// -short), PARTSIEVE_CRASH_SEED the seed of the delays.
func TestCrashDuringImport(t *testing.T) {
	t.Parallel() // overlaps TestSecondImportFailsWhileLocked, which mostly waits
	runs := 50
	if testing.Short() {
		runs = 12
	}
	if v := os.Getenv("PARTSIEVE_CRASH_RUNS"); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 1 {
			t.Fatalf("PARTSIEVE_CRASH_RUNS=%q: want a positive number", v)
		}
		runs = n
	}
	seed := uint64(20261201)
	if v := os.Getenv("PARTSIEVE_CRASH_SEED"); v != "" {
		n, err := strconv.ParseUint(v, 10, 64)
		if err != nil {
			t.Fatalf("PARTSIEVE_CRASH_SEED=%q: want a number", v)
		}
		seed = n
	}
	f := getFixture(t)
	bin := partsieve(t)
	window := f.importTime * 11 / 10
	t.Logf("%d kills, seed %d, delays uniform in [0, %v) (a complete import of %d rows took %v)",
		runs, seed, window.Round(time.Millisecond), f.nBase+f.nNew, f.importTime.Round(time.Millisecond))
	rng := rand.New(rand.NewPCG(seed, 0x70617274))

	db := filepath.Join(t.TempDir(), "catalog.db")
	newOnly := mpnOf(f.nBase + f.nNew - 1) // the last row: in the last index batch
	var nCompleted, nOld, nNew, nStale, nRebuildKills int
	start := time.Now()
	for run := 1; run <= runs; run++ {
		copyCatalog(t, f.oldDB, db)
		rebuildKillsBefore := nRebuildKills
		delay := time.Duration(rng.Int64N(int64(window)))
		runStart := time.Now()
		killed, out := runAndKill(t, bin, db, delay, "import", f.update)
		what := "killed"
		if !killed {
			what = "finished first"
			nCompleted++
			if out.code != 0 {
				t.Fatalf("run %d (seed %d): the import was not killed and failed:\n%s", run, seed, out)
			}
		}

		chk := cli(t, db, "catalog", "check")
		stale := false
		if chk.code != 0 {
			if !staleOnly(problems(chk.stdout)) {
				t.Fatalf("run %d (seed %d, kill after %v): catalog check failed:\n%s", run, seed, delay, chk)
			}
			stale = true
			nStale++
		}

		if stale {
			// kill the text search that rebuilds the stale index, too
			delay2 := time.Duration(rng.Int64N(int64(window)))
			if killed, _ := runAndKill(t, bin, db, delay2, "find", newOnly); killed {
				nRebuildKills++
				if chk := cli(t, db, "catalog", "check"); chk.code != 0 && !staleOnly(problems(chk.stdout)) {
					t.Fatalf("run %d (seed %d): catalog check after killing a text index rebuild after %v:\n%s", run, seed, delay2, chk)
				}
			}
		}

		st := readState(t, db)
		var isNew bool
		switch st.Hash {
		case f.old.Hash:
			nOld++
		case f.new.Hash:
			isNew = true
			nNew++
		default:
			t.Fatalf("run %d (seed %d, kill after %v): the catalog is neither the old nor the new state:\n got %v\n old %v\n new %v",
				run, seed, delay, st, f.old, f.new)
		}

		r := cli(t, db, "find", newOnly, "--format", "csv")
		if isNew && (r.code != 0 || !strings.Contains(r.stdout, newOnly)) || !isNew && r.code != 4 {
			t.Fatalf("run %d (seed %d): text search for %s in the %s state:\n%s", run, seed, newOnly, stateName(isNew), r)
		}
		noFallback(t, run, r)
		r = cli(t, db, "find", revToken, "--limit", "0", "--format", "csv")
		want := 0
		if isNew {
			want = f.nBase
		}
		if got := strings.Count(r.stdout, "\n") - 1; isNew && (r.code != 0 || got != want) || !isNew && r.code != 4 {
			t.Fatalf("run %d (seed %d): text search %q in the %s state found %d parts, want %d:\n%s", run, seed, revToken, stateName(isNew), got, want, r)
		}
		noFallback(t, run, r)
		if stale {
			mustCheckClean(t, db, "after a text search rebuilt the stale index (run "+strconv.Itoa(run)+")")
		}
		if left, _ := filepath.Glob(db + ".bleve.*"); len(left) > 0 {
			t.Fatalf("run %d (seed %d): directories of killed index rebuilds left behind after a rebuild: %v", run, seed, left)
		}
		index := "current"
		if stale {
			index = "stale, rebuilt by find"
		}
		if stale && nRebuildKills > rebuildKillsBefore {
			index = "stale, rebuild killed, rebuilt by the next find"
		}
		t.Logf("run %2d: kill after %4dms: %s; catalog %s, text index %s (%v)", run, delay.Milliseconds(), what, stateName(isNew), index, time.Since(runStart).Round(time.Millisecond))
	}
	t.Logf("%d runs in %v: %d killed, %d finished before the kill; catalog old %d, new %d, never partial; text index stale after %d kills, rebuilt each time (%d rebuilds killed too)",
		runs, time.Since(start).Round(time.Millisecond), runs-nCompleted, nCompleted, nOld, nNew, nStale, nRebuildKills)
	if runs >= 20 && (nOld == 0 || nNew == 0) {
		t.Errorf("the kills never hit one of the states (old %d, new %d): the delays do not cover the import", nOld, nNew)
	}
}

func stateName(isNew bool) string {
	if isNew {
		return "new"
	}
	return "old"
}

func noFallback(t *testing.T, run int, r result) {
	t.Helper()
	if strings.Contains(r.stderr, "substring search") {
		t.Fatalf("run %d: the text search fell back to a substring search with no other process running:\n%s", run, r)
	}
}

// runAndKill runs partsieve args and sends SIGKILL after delay. It reports
// whether the signal killed the process (false: it exited first).
func runAndKill(t *testing.T, bin, db string, delay time.Duration, args ...string) (bool, result) {
	t.Helper()
	cmd := exec.Command(bin, append([]string{"--db", db}, args...)...)
	cmd.Env = cliEnv()
	var out, errb strings.Builder
	cmd.Stdout, cmd.Stderr = &out, &errb
	start := time.Now()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	timer := time.NewTimer(delay)
	defer timer.Stop()
	var err error
	select {
	case err = <-done:
	case <-timer.C:
		cmd.Process.Signal(syscall.SIGKILL)
		err = <-done
	}
	r := result{stdout: out.String(), stderr: errb.String(), took: time.Since(start)}
	if ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); ok && ws.Signaled() && ws.Signal() == syscall.SIGKILL {
		return true, r
	}
	r.code = exitCode(t, err)
	checkNoPanic(t, args, r)
	return false, r
}

// TestInterruptDuringImport sends SIGINT (Ctrl-C) to `partsieve import` of
// the update sheet part way: the command stops with exit code 130 and the
// catalog is exactly the old state (or the new one when the import
// finished first), never part of the import, and passes catalog check.
// Before the import's transaction stopped watching the context,
// database/sql rolled it back on another goroutine at the interrupt and
// the row path's statements then committed one by one on the same
// connection.
func TestInterruptDuringImport(t *testing.T) {
	t.Parallel()
	f := getFixture(t)
	bin := partsieve(t)
	db := filepath.Join(t.TempDir(), "catalog.db")
	runs := 6
	if testing.Short() {
		runs = 3
	}
	nOld := 0
	for run := 1; run <= runs; run++ {
		copyCatalog(t, f.oldDB, db)
		// spread over the middle of the import: past the opening, before
		// the commit
		delay := f.importTime * time.Duration(2+run) / time.Duration(runs+4)
		cmd := exec.Command(bin, "--db", db, "import", f.update)
		cmd.Env = cliEnv()
		var out, errb strings.Builder
		cmd.Stdout, cmd.Stderr = &out, &errb
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		var err error
		interrupted := false
		select {
		case err = <-done:
		case <-time.After(delay):
			cmd.Process.Signal(syscall.SIGINT)
			interrupted = true
			err = <-done
		}
		r := result{stdout: out.String(), stderr: errb.String()}
		r.code = exitCode(t, err)
		checkNoPanic(t, []string{"import", f.update}, r)
		st := readState(t, db)
		switch {
		case st.Hash == f.old.Hash:
			nOld++
			if r.code != 130 {
				t.Errorf("run %d (SIGINT after %v): the catalog is unchanged but the exit code is %d:\n%s", run, delay, r.code, r)
			}
		case st.Hash == f.new.Hash:
			if interrupted && r.code != 0 {
				t.Errorf("run %d: the import committed but exited %d:\n%s", run, r.code, r)
			}
		default:
			t.Fatalf("run %d (SIGINT after %v, exit %d): the catalog is neither the old nor the new state:\n got %v\n old %v\n new %v\n%s",
				run, delay, r.code, st, f.old, f.new, r)
		}
		if chk := cli(t, db, "catalog", "check"); chk.code != 0 && !staleOnly(problems(chk.stdout)) {
			t.Fatalf("run %d: catalog check after SIGINT after %v:\n%s", run, delay, chk)
		}
		t.Logf("run %d: SIGINT after %v: exit %d, catalog %s", run, delay.Round(time.Millisecond), r.code, stateName(st.Hash == f.new.Hash))
	}
	if nOld == 0 {
		t.Errorf("no interrupt landed before the commit: the delays do not cover the import")
	}
}
