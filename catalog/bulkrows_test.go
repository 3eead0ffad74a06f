package catalog

import (
	"context"
	"errors"
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// importAll imports ps into s in one transaction, half through Put and
// half prepared ahead as an importer does, and returns the outcomes and
// the counts.
func importAll(t *testing.T, s *Store, ps []*Part) ([]Outcome, Source) {
	t.Helper()
	ctx := context.Background()
	tx, err := s.BeginImport(ctx, Source{Label: "sheet", File: "sheet.csv", SHA256: "abc"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	var pr Preparer
	var pp Prepared
	var outs []Outcome
	for i, p := range ps {
		var o Outcome
		if i%2 == 0 {
			o, _, err = tx.Put(p)
		} else if err = pr.Prepare(p, &pp); err == nil {
			o, _, err = tx.PutPrepared(&pp)
		}
		if err != nil {
			t.Fatalf("part %d: %v", i, err)
		}
		outs = append(outs, o)
	}
	c := tx.Counts()
	if err := tx.Commit(Source{Read: len(ps)}); err != nil {
		t.Fatal(err)
	}
	return outs, c
}

// New parts of an import into an empty catalog are written a batch at a
// time through the virtual table; the catalog is the same, id for id, as
// with one INSERT per part. The file has more than two batches of parts
// and, spread through it, rows of parts met before (which flush the batch
// and take the look-up path). A filter of 64 bits answers "maybe" for
// nearly every key, so that nearly every part goes the slow way after a
// flush of the few before it.
func TestBatchedNewPartsMatchRowPath(t *testing.T) {
	ps := genParts(2*bulkBatch+500, 7)
	rep := bulkParts()[100:] // five rows of parts of genParts(100, 21)…
	base := genParts(100, 21)
	var file []*Part
	for i, p := range ps {
		file = append(file, p)
		if i%997 == 500 {
			file = append(file, base[i%100], rep[i%len(rep)]) // …met again later
		}
	}
	file = append(file, base...)

	run := func(bulk bool, bits int) ([]Outcome, []string) {
		oldBulk, oldBits := bulkImports, keyFilterBits
		bulkImports, keyFilterBits = bulk, bits
		defer func() { bulkImports, keyFilterBits = oldBulk, oldBits }()
		s := openTemp(t)
		outs, _ := importAll(t, s, file)
		if probs, err := s.Check(context.Background()); err != nil || len(probs) != 0 {
			t.Errorf("Check: %q %v", probs, err)
		}
		return outs, dumpCatalog(t, s)
	}
	wantOuts, want := run(false, keyFilterBits)
	added := 0
	for _, o := range wantOuts {
		if o == Added {
			added++
		}
	}
	if added != len(ps)+100 {
		t.Fatalf("row path added %d parts, want %d", added, len(ps)+100)
	}
	for _, c := range []struct {
		name string
		bits int
	}{{"batched", keyFilterBits}, {"batched, filter of 64 bits", 64}} {
		outs, got := run(true, c.bits)
		for i := range outs {
			if outs[i] != wantOuts[i] {
				t.Errorf("%s: row %d: %v, row path %v", c.name, i, outs[i], wantOuts[i])
				break
			}
		}
		sameDump(t, c.name+" vs row path", got, want)
	}
	// every import gave its batches back
	batches.Lock()
	left := len(batches.m)
	batches.Unlock()
	if left != 0 {
		t.Errorf("%d batches still registered after the imports", left)
	}
}

// An import into an empty catalog batches its new parts from the start;
// into a catalog that holds parts it takes the row path at first (see
// TestBatchedAfterARunOfNewParts).
func TestBatchedFromTheStartOnlyIntoEmptyCatalog(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	importParts(t, s, "first", genParts(10, 3)...)
	tx, err := s.BeginImport(ctx, Source{Label: "second"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	if tx.bulk != nil {
		t.Error("an import into a catalog with parts batches its new parts")
	}
	empty := openTemp(t)
	tx2, err := empty.BeginImport(ctx, Source{Label: "first"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx2.Rollback()
	if tx2.bulk == nil {
		t.Error("an import into an empty catalog does not batch its new parts")
	}
}

// A Bloom filter never says "no" for a key it holds, and says "maybe" for
// other keys about as often as (1 − e^(−k·n/m))^k (Bloom 1970; the
// formula as in Broder and Mitzenmacher, "Network applications of Bloom
// filters: a survey", Internet Mathematics 1(4), 2004).
func TestKeyFilter(t *testing.T) {
	for _, c := range []struct{ bits, n int }{{1 << 16, 2000}, {1 << 16, 8000}, {1 << 20, 50000}} {
		old := keyFilterBits
		keyFilterBits = c.bits
		f := newKeyFilter()
		keyFilterBits = old
		for i := range c.n {
			f.add(fmt.Sprintf("PN-%d", i), "maker")
		}
		for i := range c.n {
			if !f.mayHave(fmt.Sprintf("PN-%d", i), "maker") {
				t.Fatalf("%d bits, %d keys: key %d lost", c.bits, c.n, i)
			}
		}
		// the same part number from another maker is another key
		const probes = 200000
		wrong := 0
		for i := range probes {
			if f.mayHave(fmt.Sprintf("PN-%d", i), "other maker") {
				wrong++
			}
		}
		k, n, m := float64(keyFilterProbes), float64(c.n), float64(c.bits)
		want := math.Pow(1-math.Exp(-k*n/m), k)
		// the count of wrong maybes is binomial: within five standard
		// deviations of the formula's (the hash seed is random)
		mean := want * probes
		if sd := math.Sqrt(mean * (1 - want)); math.Abs(float64(wrong)-mean) > 5*sd+3 {
			t.Errorf("%d bits, %d keys: %d wrong maybes in %d, formula %.1f", c.bits, c.n, wrong, probes, mean)
		}
	}
}

// An import into a catalog that had parts turns the batched writing on
// after a long run of new parts (bulkAfter, and an eighth of the parts
// the catalog had), with a filter of every key already stored; the
// catalog is the same as with the row path all along.
func TestBatchedAfterARunOfNewParts(t *testing.T) {
	first := genParts(400, 5)
	later := genParts(3000, 9)
	var file []*Part
	for i, p := range later {
		file = append(file, p)
		if i == 1500 {
			file = append(file, first[7]) // a stored part in the middle
		}
	}
	file = append(file, first[:50]...)

	oldAfter := bulkAfter
	bulkAfter = 200
	defer func() { bulkAfter = oldAfter }()
	run := func(bulk bool, bits int) ([]Outcome, []string, bool) {
		oldBulk, oldBits := bulkImports, keyFilterBits
		bulkImports, keyFilterBits = bulk, bits
		defer func() { bulkImports, keyFilterBits = oldBulk, oldBits }()
		s := openTemp(t)
		importAll(t, s, first)
		ctx := context.Background()
		tx, err := s.BeginImport(ctx, Source{Label: "second", File: "second.csv"})
		if err != nil {
			t.Fatal(err)
		}
		defer tx.Rollback()
		var outs []Outcome
		on := false
		for i, p := range file {
			o, _, err := tx.Put(p)
			if err != nil {
				t.Fatalf("part %d: %v", i, err)
			}
			outs = append(outs, o)
			if i == 100 && tx.bulk != nil {
				t.Errorf("batched after %d new parts, before bulkAfter", i+1)
			}
			on = on || tx.bulk != nil
		}
		if err := tx.Commit(Source{Read: len(file)}); err != nil {
			t.Fatal(err)
		}
		if probs, err := s.Check(ctx); err != nil || len(probs) != 0 {
			t.Errorf("Check: %q %v", probs, err)
		}
		return outs, dumpCatalog(t, s), on
	}
	wantOuts, want, _ := run(false, keyFilterBits)
	// a filter of 64 bits says "maybe" to nearly every key, so most new
	// parts after the start take the row path between batches: their
	// links come from the batches' id ranges and from Commit's (linkNew)
	for _, bits := range []int{keyFilterBits, 64} {
		outs, got, on := run(true, bits)
		if !on {
			t.Errorf("filter of %d bits: the batched writing never started", bits)
		}
		for i := range outs {
			if outs[i] != wantOuts[i] {
				t.Errorf("filter of %d bits: row %d: %v, row path %v", bits, i, outs[i], wantOuts[i])
				break
			}
		}
		sameDump(t, fmt.Sprintf("batched after a run (filter of %d bits) vs row path", bits), got, want)
	}
}

// An import whose context ends part way writes nothing, on the row path
// and on the batched one: the Put that notices returns the context's
// error, Commit refuses, and after the rollback the catalog holds what it
// held before. (database/sql would roll a transaction that watches the
// context back on its own goroutine and keep the connection, and the
// statements the import runs on the connection directly would then each
// commit alone.)
func TestCancelledImportWritesNothing(t *testing.T) {
	for _, c := range []struct {
		name  string
		bulk  bool
		first int // parts in the catalog before
	}{{"row path", false, 5}, {"batched", true, 0}, {"row path, empty catalog", false, 0}} {
		t.Run(c.name, func(t *testing.T) {
			oldBulk := bulkImports
			bulkImports = c.bulk
			defer func() { bulkImports = oldBulk }()
			s := openTemp(t)
			if c.first > 0 {
				importAll(t, s, genParts(c.first, 11))
			}
			before := dumpCatalog(t, s)
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			tx, err := s.BeginImport(ctx, Source{Label: "cancelled"})
			if err != nil {
				t.Fatal(err)
			}
			defer tx.Rollback()
			var putErr error
			for i, p := range genParts(3*bulkBatch, 12) {
				if i == bulkBatch+500 {
					cancel()
					time.Sleep(20 * time.Millisecond) // give a watcher time to act
				}
				if _, _, putErr = tx.Put(p); putErr != nil {
					break
				}
			}
			if !errors.Is(putErr, context.Canceled) {
				t.Errorf("Put after cancel: %v", putErr)
			}
			if err := tx.Commit(Source{}); !errors.Is(err, context.Canceled) {
				t.Errorf("Commit after cancel: %v", err)
			}
			sameDump(t, "after a cancelled import", dumpCatalog(t, s), before)
		})
	}
}

// A batch of new parts is written one statement per run of one kind, and
// that statement names only the kind's fields: kindVariant picks it only
// when every other field of the row is NULL, so no value is left out.
func TestKindVariant(t *testing.T) {
	var pr Preparer
	var pp Prepared
	seen := map[Kind]bool{}
	for _, p := range genParts(60, 3) {
		if err := pr.Prepare(p, &pp); err != nil {
			t.Fatal(err)
		}
		k, _, _ := pp.SortKey()
		if k != p.Kind {
			t.Fatalf("SortKey kind %q, part kind %q", k, p.Kind)
		}
		v := kindVariant(pp.row)
		if v == 0 || Kinds[v-1] != p.Kind || pp.variant != v {
			t.Fatalf("%s %s: variant %d, Prepare's %d", p.Kind, p.MPN, v, pp.variant)
		}
		// Prepare hashes the key for the writer's filter (keyHash)
		if pp.hash != hashKey(normKey(p.MPN), normKey(p.Mfr)) || pp.hash.h2%2 != 1 {
			t.Fatalf("%s %s: Prepare's key hash %+v, want %+v", p.Kind, p.MPN, pp.hash, hashKey(normKey(p.MPN), normKey(p.Mfr)))
		}
		seen[p.Kind] = true
		r := append(row(nil), pp.row...)
		r[notOfKind[v-1][0]] = 1.0 // a value in a field of another kind
		if got := kindVariant(r); got != 0 {
			t.Errorf("%s with a field of another kind: variant %d, want 0", p.Kind, got)
		}
		r = append(row(nil), pp.row...)
		r[kindField] = "relay"
		if got := kindVariant(r); got != 0 {
			t.Errorf("unknown kind: variant %d, want 0", got)
		}
	}
	if len(seen) != len(Kinds) {
		t.Fatalf("genParts gave kinds %v", seen)
	}

	tx := &ImportTx{now: 1}
	tx.startBulk(newKeyFilter(), 1)
	all := tx.bulk.parts.sql("b", 0)
	for _, f := range Fields {
		if !strings.Contains(all, `"`+colName(f.Name)+`"`) {
			t.Errorf("variant 0 lacks %s", f.Name)
		}
	}
	for v, k := range Kinds {
		q := tx.bulk.parts.sql("b", v+1)
		n := 0
		for _, f := range Fields {
			has := strings.Contains(q, `"`+colName(f.Name)+`"`)
			if has != f.AppliesTo(k) {
				t.Errorf("variant %d (%s): names %s: %v", v+1, k, f.Name, has)
			}
			if has {
				n++
			}
		}
		// columns and selected values line up: mfr_key, mpn_key, the
		// fields but the kind, which is the variant's literal, created,
		// updated
		if got := len(regexp.MustCompile(`, c[0-9]+\b`).FindAllString(q, -1)); got != n {
			t.Errorf("variant %d selects %d batch columns after the first, want %d", v+1, got, n)
		}
		if lit := ", '" + string(k) + "', c"; strings.Count(q, lit) != 1 || strings.Contains(q, ", c"+strconv.Itoa(3+kindField)+",") {
			t.Errorf("variant %d does not select its kind as the literal %q:\n%s", v+1, k, q)
		}
	}
}
