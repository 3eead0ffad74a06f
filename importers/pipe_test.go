package importers

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"

	"partsieve/catalog"
)

// pipeCSV is a sheet of n Schottky rows (header on row 1, so data row i is
// sheet row i+2); every bad-th row has a V_RRM that is not a number, and
// the last repeat rows list the first parts again, every other one with
// another stock figure when flip is set.
func pipeCSV(n, bad, repeat int, flip bool) []byte {
	var b bytes.Buffer
	b.WriteString("Category,Mfr,Part number,VRRM (V),IF(AV) (A),Supplier,SKU,Stock,1+ (EUR),100+ (EUR)\n")
	row := func(i, stock int) {
		v := fmt.Sprint(20 + i%200)
		if bad > 0 && i%bad == bad-1 {
			v = "forty"
		}
		fmt.Fprintf(&b, "Schottky,Maker %d,PP%05d,%s,%d,Pipe Supply,PS-%d,%d,0.25,0.%02d\n", i%7, i, v, 1+i%5, i, stock, 10+i%80)
	}
	for i := range n {
		row(i, i%1000)
	}
	for i := range repeat {
		stock := i % 1000
		if flip && i%2 == 1 {
			stock++
		}
		row(i, stock)
	}
	return b.Bytes()
}

// A sheet larger than many batches keeps its order through the pipe:
// rejects in row order, the same counts with a store as without one, and
// repeated parts counted where they fall.
func TestPipeKeepsRowOrder(t *testing.T) {
	const n, bad, repeat = 3000, 97, 40
	data := pipeCSV(n, bad, repeat, true)
	var wantRows []int
	for i := range n + repeat {
		j := i
		if i >= n {
			j = i - n
		}
		if j%bad == bad-1 {
			wantRows = append(wantRows, i+2)
		}
	}
	ctx := context.Background()
	for _, withStore := range []bool{true, false} {
		var st *catalog.Store
		if withStore {
			st = openStore(t)
		}
		s, err := ImportData(ctx, st, "pipe.csv", data, Options{})
		if err != nil {
			t.Fatal(err)
		}
		var gotRows []int
		for _, r := range s.Rejects {
			gotRows = append(gotRows, r.Row)
			if r.Column != "VRRM (V)" || r.Raw != "forty" {
				t.Errorf("reject %+v", r)
			}
		}
		if fmt.Sprint(gotRows) != fmt.Sprint(wantRows) {
			t.Errorf("store %v: rejected rows %v, want %v", withStore, gotRows, wantRows)
		}
		badRepeats := len(wantRows) - n/bad
		if s.Read != n+repeat || s.Added != n-n/bad || s.Updated != repeat/2 || s.Unchanged != repeat-repeat/2-badRepeats {
			t.Errorf("store %v: counts %+v", withStore, s)
		}
	}
}

// plainSink hides PutPrepared: the writer then converts nothing ahead and
// calls Put, as for a sink that is not the store.
type plainSink struct{ tx *catalog.ImportTx }

func (p plainSink) Put(pt *catalog.Part) (catalog.Outcome, []catalog.Change, error) {
	return p.tx.Put(pt)
}
func (p plainSink) Commit(c catalog.Source) error { return p.tx.Commit(c) }
func (p plainSink) Rollback() error               { return p.tx.Rollback() }

// Parts checked on the reading goroutine (Preparer) and written through
// PutPrepared give the same catalog as Put on the writing goroutine.
func TestPreparedMatchesPut(t *testing.T) {
	data := pipeCSV(1500, 211, 30, true)
	ctx := context.Background()
	prepared := openStore(t)
	s1, err := ImportData(ctx, prepared, "pipe.csv", data, Options{})
	if err != nil {
		t.Fatal(err)
	}
	plain := openStore(t)
	tx, err := plain.BeginImport(ctx, catalog.Source{Label: "pipe.csv"})
	if err != nil {
		t.Fatal(err)
	}
	rn, err := sheetRun(t, ctx, "pipe.csv", data, plainSink{tx})
	if err != nil {
		t.Fatal(err)
	}
	if err := tx.Commit(catalog.Source{}); err != nil {
		t.Fatal(err)
	}
	s2 := rn.sum
	if s1.Added != s2.Added || s1.Updated != s2.Updated || s1.Unchanged != s2.Unchanged || len(s1.Rejects) != len(s2.Rejects) {
		t.Errorf("counts prepared %+v, plain %+v", s1, s2)
	}
	for i := range 1500 {
		mpn := fmt.Sprintf("PP%05d", i)
		a, err1 := prepared.ByMPN(ctx, mpn)
		b, err2 := plain.ByMPN(ctx, mpn)
		ja, _ := json.Marshal(a)
		jb, _ := json.Marshal(b)
		if err1 != nil || err2 != nil || !bytes.Equal(ja, jb) {
			t.Fatalf("%s: prepared %s (%v), plain %s (%v)", mpn, ja, err1, jb, err2)
		}
	}
	// a file that repeats parts without contradicting itself: importing
	// it a second time changes nothing
	again := pipeCSV(1500, 211, 30, false)
	for i, want := range []int{1500 - 1500/211, 0} {
		s, err := ImportData(ctx, openStoreOnce(t, &prepared, i), "again.csv", again, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if s.Added != want || s.Updated != 0 || s.Unchanged != s.Read-s.Rejected-want || s.Rejected != 1500/211 {
			t.Errorf("import %d of a self-consistent file: %+v", i+1, s)
		}
	}
}

// openStoreOnce replaces *st by a new store on the first call (i == 0)
// and returns it.
func openStoreOnce(t *testing.T, st **catalog.Store, i int) *catalog.Store {
	if i == 0 {
		*st = openStore(t)
	}
	return *st
}

// failAfter fails the n-th Put as a database would.
type failAfter struct {
	checkSink
	n, puts int
}

func (f *failAfter) Put(p *catalog.Part) (catalog.Outcome, []catalog.Change, error) {
	if f.puts++; f.puts == f.n {
		return 0, nil, errors.New("catalog c.db: disk I/O error")
	}
	return f.checkSink.Put(p)
}

// When the writer fails, the reader stops soon after (it does not read the
// rest of the file) and has ended when sheet returns.
func TestPipeStopsReaderOnWriteFailure(t *testing.T) {
	n := 300 + (pipeDepth+3)*pipeBatch + 20000 // more than the reader may read past the failure
	data := pipeCSV(n, 0, 0, false)
	before := runtime.NumGoroutine()
	sk := &failAfter{checkSink: checkSink{seen: map[string]string{}}, n: 300}
	rn, err := sheetRun(t, context.Background(), "p.csv", data, sk)
	if err == nil || !strings.Contains(err.Error(), "p.csv, row 301: catalog c.db: disk I/O error") {
		t.Errorf("error %v", err)
	}
	if limit := 300 + (pipeDepth+3)*pipeBatch; rn.rows > limit {
		t.Errorf("the reader read %d rows after the writer failed at 300 (limit %d)", rn.rows, limit)
	}
	for i := 0; runtime.NumGoroutine() > before && i < 100; i++ {
		time.Sleep(10 * time.Millisecond)
	}
	if g := runtime.NumGoroutine(); g > before {
		t.Errorf("%d goroutines after the import, %d before", g, before)
	}
}

// cancelAfter cancels the import's context at its n-th Put.
type cancelAfter struct {
	checkSink
	n, puts int
	cancel  func()
}

func (c *cancelAfter) Put(p *catalog.Part) (catalog.Outcome, []catalog.Change, error) {
	if c.puts++; c.puts == c.n {
		c.cancel()
	}
	return c.checkSink.Put(p)
}

// A cancelled import stops: the reader sees it between rows and the
// writer reports it.
func TestPipeCancel(t *testing.T) {
	data := pipeCSV(20000, 0, 0, false)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	sk := &cancelAfter{checkSink: checkSink{seen: map[string]string{}}, n: 100, cancel: cancel}
	rn, err := sheetRun(t, ctx, "p.csv", data, sk)
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "p.csv: import stopped") {
		t.Errorf("error %v", err)
	}
	if rn.sum.Read >= 20000 {
		t.Errorf("read all %d rows despite the cancel", rn.sum.Read)
	}
}

// The file's SHA-256, computed while the rows are imported, is the one
// recorded for the source.
func TestImportFileRecordsHash(t *testing.T) {
	data := pipeCSV(700, 0, 0, false)
	path := filepath.Join(t.TempDir(), "hash.csv")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	st := openStore(t)
	if _, err := ImportFile(context.Background(), st, path, Options{}); err != nil {
		t.Fatal(err)
	}
	srcs, err := st.Sources(context.Background())
	if err != nil || len(srcs) != 1 {
		t.Fatalf("sources %+v %v", srcs, err)
	}
	want := sha256.Sum256(data)
	if srcs[0].SHA256 != hex.EncodeToString(want[:]) || srcs[0].Read != 700 {
		t.Errorf("source %+v, want sha256 %x", srcs[0], want)
	}
}

// sheetRun imports the first sheet of the CSV data named name into out
// through the import's run (reader and writer goroutines), as ImportData
// does, and returns the run with its summary and the sheet's error.
func sheetRun(t *testing.T, ctx context.Context, name string, data []byte, out sink) (*run, error) {
	t.Helper()
	rn := &run{ctx: ctx, name: name, label: name, cr: &countingReaderAt{r: bytes.NewReader(data)},
		sum: &Summary{Unknown: []string{}, Rejects: []Reject{}}, begin: func() (sink, error) { return out, nil }}
	book, err := OpenBook(name, bytes.NewReader(data), int64(len(data)))
	if err != nil {
		t.Fatal(err)
	}
	tbl, err := book.Table("")
	if err != nil {
		t.Fatal(err)
	}
	_, err = rn.sheet("", tbl)
	return rn, err
}

// drain puts each batch's refused rows first, in row order, then its
// parts in identity-key order (normalised part number, then maker),
// keeping two rows of one key in row order; batches keep their order.
func TestDrainSortsBatchByKey(t *testing.T) {
	p := newRowPipe()
	var pr catalog.Preparer
	type in struct {
		mpn, mfr string
		refused  bool
	}
	batches := [][]in{
		{{"ZX-2", "Acme", false}, {"", "", true}, {"ab-1", "Zed", false}, {"AB-1", "Alpha", false}, {"ab-1", "zed", false}, {"", "", true}, {"M7", "Acme", false}},
		{{"A0", "Acme", false}},
	}
	row := 2
	go func() {
		defer p.close()
		for _, b := range batches {
			for _, x := range b {
				it := p.item()
				it.row = row
				row++
				if x.refused {
					it.rej = &rowReject{column: "V_RRM", reason: "not a number"}
					continue
				}
				it.part = &catalog.Part{Kind: catalog.Diode, Type: "schottky", Mfr: x.mfr, MPN: x.mpn}
				if err := pr.Prepare(it.part, &it.prep); err != nil {
					t.Error(err)
				}
			}
			p.send()
		}
	}()
	var got []int
	if err := p.drain(func(it *rowItem) error {
		got = append(got, it.row)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	// rows 2..8 in the first batch: refused 3 and 7, then AB-1/Alpha (5),
	// ab-1/Zed (4) before ab-1/zed (6, same key, later row), M7 (8), ZX-2 (2)
	want := []int{3, 7, 5, 4, 6, 8, 2, 9}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("put order %v, want %v", got, want)
	}
}

// The writer's order within a batch: refused rows first in row order,
// then parts grouped by kind and by identity key within a kind; rows with
// one key stay in row order in the group of the first one's kind, even
// when a later row gives the part another kind.
func TestSortItems(t *testing.T) {
	keys := []sortKey{
		{},                                 // 0 refused
		{kind: "fuse", pk: "b", mk: "m"},   // 1
		{kind: "diode", pk: "a", mk: "m"},  // 2
		{kind: "diode", pk: "b", mk: "m"},  // 3 same key as 1, another kind
		{},                                 // 4 refused
		{kind: "mosfet", pk: "a", mk: "z"}, // 5
		{kind: "diode", pk: "a", mk: "m"},  // 6 same key as 2
		{kind: "fuse", pk: "c", mk: "m"},   // 7
		{kind: "fuse", pk: "b", mk: "m"},   // 8 same key as 1 and 3
	}
	ord := make([]int, len(keys))
	for i := range ord {
		ord[i] = i
	}
	sortItems(ord, keys)
	if got, want := fmt.Sprint(ord), "[0 4 2 6 1 3 8 7 5]"; got != want {
		t.Errorf("order %s, want %s", got, want)
	}
}
