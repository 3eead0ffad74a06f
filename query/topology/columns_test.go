package topology

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"partsieve/catalog"
	"partsieve/importers"
	"partsieve/seeddata"
	"partsieve/seeddata/synth"
)

// sqlOnly hides the store's column view, so that Pick reads the parts in
// full through SQL (the path before the column file).
type sqlOnly struct{ st *catalog.Store }

func (s sqlOnly) Find(ctx context.Context, q catalog.Query) ([]catalog.Part, error) {
	return s.st.Find(ctx, q)
}

func (s sqlOnly) PartCounts(ctx context.Context) (catalog.Stats, error) { return s.st.PartCounts(ctx) }

// synthStore imports n synthetic rows (copies of the seed families under
// several makers, so many designs tie on every figure) into a new store.
func synthStore(t *testing.T, n int) *catalog.Store {
	t.Helper()
	ctx := context.Background()
	st, err := catalog.Open(ctx, filepath.Join(t.TempDir(), "synth.db"))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	var buf bytes.Buffer
	if err := synth.WriteCSV(&buf, synth.New(7), synth.Canonical, n); err != nil {
		t.Fatal(err)
	}
	sum, err := importers.ImportData(ctx, st, "synth.csv", buf.Bytes(), importers.Options{Source: "synth"})
	if err != nil || sum.Rejected != 0 {
		t.Fatalf("import: %v, %d rejected", err, sum.Rejected)
	}
	return st
}

// TestPickColumnsEqualsSQL checks that Pick through the catalog's column
// file gives exactly the result of Pick reading the parts in full (same
// candidates in the same order, same checks and figures, same
// eliminations), on the seed catalog and on a synthetic one full of ties;
// and that splitting the scans and the record building into chunks
// between processors (forced here on small catalogs: three workers,
// uneven chunks) changes nothing.
func TestPickColumnsEqualsSQL(t *testing.T) {
	ctx := context.Background()
	stores := map[string]*catalog.Store{"seed": seedCatalog(t), "synth": synthStore(t, 2500)}
	for _, split := range []bool{false, true} {
		if split {
			mc, rc, procs := minChunked, recordChunk, runtime.GOMAXPROCS(3)
			minChunked, recordChunk = 1, 7
			defer func() { minChunked, recordChunk = mc, rc; runtime.GOMAXPROCS(procs) }()
		}
		pickColumnsEqualsSQL(t, ctx, stores, split)
	}
}

func pickColumnsEqualsSQL(t *testing.T, ctx context.Context, stores map[string]*catalog.Store, split bool) {
	for name, st := range stores {
		name := fmt.Sprintf("%s (split %v)", name, split)
		for _, sp := range seeddata.SpecNames() {
			s := exampleSpec(t, sp)
			for _, opt := range []Options{{}, {Rank: RankMargin, Top: 12}, {Rank: RankCost, Top: 7}, {Top: 3, Topologies: []Topology{PFETHigh, ShuntFuse}}} {
				fast, err := Pick(ctx, st, s, opt)
				if err != nil {
					t.Fatalf("%s %s: %v", name, sp, err)
				}
				slow, err := Pick(ctx, sqlOnly{st}, s, opt)
				if err != nil {
					t.Fatalf("%s %s: %v", name, sp, err)
				}
				a, _ := json.MarshalIndent(fast, "", " ")
				b, _ := json.MarshalIndent(slow, "", " ")
				if !bytes.Equal(a, b) {
					t.Errorf("%s %s %+v: column pick differs from the SQL pick:\n%s", name, sp, opt, firstDiff(string(a), string(b)))
				}
				q := 0
				for _, tr := range fast.Topologies {
					q += tr.Qualified + len(tr.Candidates)
				}
				if q == 0 {
					t.Errorf("%s %s %+v: nothing qualified; the comparison proves little", name, sp, opt)
				}
			}
		}
	}
}

// firstDiff shows the lines around the first difference of a and b.
func firstDiff(a, b string) string {
	i := 0
	for i < len(a) && i < len(b) && a[i] == b[i] {
		i++
	}
	lo := max(0, i-300)
	return "columns: …" + a[lo:min(len(a), i+200)] + "\nSQL:     …" + b[lo:min(len(b), i+200)]
}

// TestPickColumnsDamagedOffers: when the offers section of the Zeners'
// column set fails its check, the tied Zeners' offers come from SQLite
// and the pick is still exactly the SQL pick. The section is found
// through the file's trailer and directory (layout in catalog/columns.go).
func TestPickColumnsDamagedOffers(t *testing.T) {
	ctx := context.Background()
	st := synthStore(t, 2500)
	path := st.Path + ".cols"
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	le := binary.LittleEndian
	tr := data[len(data)-20:]
	if string(tr[12:]) != "PSCOLEND" {
		t.Fatalf("no trailer: %q", tr[12:])
	}
	dir := data[le.Uint64(tr) : le.Uint64(tr)+uint64(le.Uint32(tr[8:]))]
	pos := 0
	str := func() string {
		n, k := binary.Uvarint(dir[pos:])
		s := string(dir[pos+k : pos+k+int(n)])
		pos += k + int(n)
		return s
	}
	u32 := func() uint32 { v := le.Uint32(dir[pos:]); pos += 4; return v }
	u64 := func() uint64 { v := le.Uint64(dir[pos:]); pos += 8; return v }
	u64()
	u64()
	str()
	hit := false
	for range u32() {
		kind, typ := str(), str()
		u32()
		for range u32() {
			str()
		}
		off, length, _, split, _ := u64(), u64(), u64(), u64(), u64()
		if kind == "diode" && typ == "zener" {
			if length <= split {
				t.Fatal("the Zener set has no offers section")
			}
			data[off+length-1] ^= 0x5a // the last byte of its offers
			hit = true
		}
	}
	if !hit {
		t.Fatal("no Zener set in the column file")
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if state, err := st.ColumnFileState(ctx); err != nil || state != "damaged" {
		t.Fatalf("column file state %q (%v), want damaged", state, err)
	}
	ties := 0
	for _, sp := range seeddata.SpecNames() {
		s := exampleSpec(t, sp)
		fast, err := Pick(ctx, st, s, Options{})
		if err != nil {
			t.Fatalf("%s: %v", sp, err)
		}
		slow, err := Pick(ctx, sqlOnly{st}, s, Options{})
		if err != nil {
			t.Fatalf("%s: %v", sp, err)
		}
		a, _ := json.MarshalIndent(fast, "", " ")
		b, _ := json.MarshalIndent(slow, "", " ")
		if !bytes.Equal(a, b) {
			t.Errorf("%s: column pick with damaged offers differs from the SQL pick:\n%s", sp, firstDiff(string(a), string(b)))
		}
		for _, tr := range fast.Topologies {
			if tr.Topology == PFETHigh || tr.Topology == NFETLow {
				ties += len(tr.Candidates)
			}
		}
	}
	if ties == 0 {
		t.Error("no MOSFET design with a Zener: the offers were never needed")
	}
}
