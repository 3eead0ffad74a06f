package catalog

import (
	"context"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

// colsOf reads every set of the column file through a view.
func colsOf(t testing.TB, s *Store) *Columns {
	t.Helper()
	v, err := s.View(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	defer v.Close()
	c, err := v.Columns(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(c.Close)
	return c
}

// TestColumnsMatchCatalog checks that the column file holds every part's
// number fields exactly as Find returns them (NaN where absent), grouped
// by kind and type, in canonical order, with the fuse texts.
func TestColumnsMatchCatalog(t *testing.T) {
	s := openTemp(t)
	ps := sampleParts()
	// two offers, given out of supplier order, for the offers digest
	ps[1].Offers = []Offer{
		offer("Zephyr Stock", "ZS-9", 40, 1, "usd", PriceBreak{1, 1.5}, PriceBreak{1000, 0.75}),
		offer("Alder Components", "AC-1", 0, 10, "gbp", PriceBreak{10, 0.9}),
	}
	importParts(t, s, "sample", ps...)
	c := colsOf(t, s)
	all, err := s.Find(context.Background(), Query{Offers: true})
	if err != nil {
		t.Fatal(err)
	}
	byKey := map[string]Part{}
	for _, p := range all {
		byKey[p.Mfr+"|"+p.MPN] = p
	}
	n, priced := 0, 0
	var ords []uint32
	for _, cs := range c.Sets {
		for i := 0; i < cs.Len(); i++ {
			n++
			ords = append(ords, cs.Ord[i])
			p, ok := byKey[cs.Mfr(i)+"|"+cs.MPN(i)]
			if !ok {
				t.Fatalf("set %s/%s row %d: %s %s is not in the catalog", cs.Kind, cs.Type, i, cs.Mfr(i), cs.MPN(i))
			}
			if p.Kind != cs.Kind || p.Type != cs.Type {
				t.Errorf("%s: set %s/%s, part %s/%s", p.MPN, cs.Kind, cs.Type, p.Kind, p.Type)
			}
			for _, name := range kindNumFields(cs.Kind) {
				want, has := p.Num[name]
				col := cs.Col(name)
				got := math.NaN()
				if col != nil {
					got = col[i]
				}
				if has && got != want || !has && !math.IsNaN(got) {
					t.Errorf("%s %s: column %v, catalog %v (present %v)", p.MPN, name, got, want, has)
				}
			}
			// the offers digest: currency and breaks of each offer, in
			// the catalog's order
			offs, err := cs.Offers(i)
			if err != nil {
				t.Fatalf("%s: offers: %v", p.MPN, err)
			}
			if len(offs) != len(p.Offers) {
				t.Errorf("%s: %d offers in the columns, %d in the catalog", p.MPN, len(offs), len(p.Offers))
			} else {
				for k := range offs {
					if offs[k].Currency != p.Offers[k].Currency || !slices.Equal(offs[k].Breaks, p.Offers[k].Breaks) {
						t.Errorf("%s offer %d: columns %+v, catalog %+v", p.MPN, k, offs[k], p.Offers[k])
					}
				}
			}
			if len(p.Offers) > 0 {
				priced++
			}
			if cs.Kind == Fuse && (cs.FuseStd(i) != p.FuseStd || cs.Rerate(i) != p.Rerate) {
				t.Errorf("%s: fuse texts %q %q, catalog %q %q", p.MPN, cs.FuseStd(i), cs.Rerate(i), p.FuseStd, p.Rerate)
			}
		}
		for i := 1; i < cs.Len(); i++ {
			if NormKey(cs.MPN(i-1)) > NormKey(cs.MPN(i)) {
				t.Errorf("set %s/%s: %s before %s, not in part-number order", cs.Kind, cs.Type, cs.MPN(i-1), cs.MPN(i))
			}
		}
	}
	if n != len(all) {
		t.Errorf("%d parts in the column file, %d in the catalog", n, len(all))
	}
	if priced != 2 {
		t.Errorf("%d parts with offers seen, want 2", priced)
	}
	slices.Sort(ords)
	for i, o := range ords {
		if o != uint32(i) {
			t.Fatalf("orders are not 0..n-1: %v", ords)
		}
	}
	// TVS fields only in the TVS set: absent columns are left out
	for _, cs := range c.Sets {
		if cs.Type == "rectifier" && cs.Col("vbr") != nil {
			t.Errorf("rectifier set has a vbr column")
		}
	}
}

// TestColumnsFollowChanges checks that the file follows imports and
// removals (refreshed after the commit), that a stale, damaged or foreign
// file is never used, and that a reader rebuilds it.
func TestColumnsFollowChanges(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	ps := sampleParts()
	importParts(t, s, "a", ps[:4]...)
	count := func() int {
		n := 0
		for _, cs := range colsOf(t, s).Sets {
			n += cs.Len()
		}
		return n
	}
	if got := count(); got != 4 {
		t.Fatalf("after the first import: %d parts in the columns, want 4", got)
	}
	st1, err := os.Stat(s.colsPath())
	if err != nil {
		t.Fatalf("no column file after an import: %v", err)
	}
	importParts(t, s, "b", ps[4:]...)
	if got := count(); got != len(ps) {
		t.Fatalf("after the second import: %d, want %d", got, len(ps))
	}
	// the import itself refreshed the file (the reader did not need to)
	v, _ := s.View(ctx)
	if _, err := readColumnsHeader(s.colsPath(), v.st); err != nil {
		t.Errorf("column file stale right after an import: %v", err)
	}
	v.Close()
	if _, _, err := s.RemoveSource(ctx, "a"); err != nil {
		t.Fatal(err)
	}
	if got := count(); got != len(ps)-4 {
		t.Fatalf("after removing source a: %d, want %d", got, len(ps)-4)
	}
	// damage: flip a byte in a payload; the reader rebuilds
	data, err := os.ReadFile(s.colsPath())
	if err != nil {
		t.Fatal(err)
	}
	data[len(data)-3] ^= 0x55
	if err := os.WriteFile(s.colsPath(), data, 0o644); err != nil {
		t.Fatal(err)
	}
	v, _ = s.View(ctx)
	if _, err := readColumns(s.colsPath(), v.st, nil); err == nil {
		t.Errorf("a damaged column file was read without error")
	}
	v.Close()
	if got := count(); got != len(ps)-4 {
		t.Fatalf("after damage: %d, want %d", got, len(ps)-4)
	}
	// a file of another catalog state (copied from elsewhere) is stale
	other := openAt(t, filepath.Join(t.TempDir(), "other.db"))
	importParts(t, other, "x", ps[:2]...)
	raw, err := os.ReadFile(other.colsPath())
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(s.colsPath(), raw, 0o644); err != nil {
		t.Fatal(err)
	}
	if got := count(); got != len(ps)-4 {
		t.Fatalf("with another catalog's file: %d, want %d", got, len(ps)-4)
	}
	if st1.Mode().Perm() != 0o644 {
		t.Errorf("column file mode %v, want the catalog's 0644", st1.Mode().Perm())
	}
	// leftovers of a dead writer are removed on the next write
	left := s.colsPath() + ".tmp-999999999-x"
	os.WriteFile(left, []byte("x"), 0o644)
	importParts(t, s, "c", part(Diode, "Quarry Devices", "QR9X", "type", "rectifier", "vrrm", 50))
	if _, err := os.Stat(left); err == nil {
		t.Errorf("leftover %s not removed", left)
	}
}

// FuzzReadColumns feeds arbitrary bytes as a column file: every input is
// refused or read, never a panic.
func FuzzReadColumns(f *testing.F) {
	s := openTemp(f)
	importParts(f, s, "sample", sampleParts()...)
	v, err := s.View(context.Background())
	if err != nil {
		f.Fatal(err)
	}
	stamp := v.st
	v.Close()
	good, err := os.ReadFile(s.colsPath())
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add(good[:len(good)/2])
	f.Add([]byte("PSCOLS08"))
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, data []byte) {
		path := filepath.Join(dir, "cols")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		c, err := readColumns(path, stamp, nil)
		if err == nil {
			for _, cs := range c.Sets {
				if len(cs.ID) != len(cs.Ord) {
					t.Fatalf("inconsistent set lengths")
				}
				for i := 0; i < cs.Len(); i++ {
					_ = cs.MPN(i) + cs.Mfr(i) + cs.FuseStd(i) + cs.Rerate(i)
					cs.Offers(i) // a result or an error, never a panic
					for _, col := range cs.Num {
						_ = col[i]
					}
				}
			}
			c.Close()
		}
	})
}

// TestColumnsOtherCatalogSameShape: a catalog built again with other
// parts but the same generation and ids must not use the column file of
// the one it replaced.
func TestColumnsOtherCatalogSameShape(t *testing.T) {
	dir := t.TempDir()
	ps := sampleParts()
	a := openAt(t, filepath.Join(dir, "a.db"))
	importParts(t, a, "x", ps[0], ps[1])
	saved, err := os.ReadFile(a.colsPath())
	if err != nil {
		t.Fatal(err)
	}
	b := openAt(t, filepath.Join(dir, "b.db"))
	importParts(t, b, "x", ps[2], ps[3])
	if err := os.WriteFile(b.colsPath(), saved, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, cs := range colsOf(t, b).Sets {
		for i := 0; i < cs.Len(); i++ {
			if m := cs.MPN(i); m != ps[2].MPN && m != ps[3].MPN {
				t.Errorf("column file of another catalog used: %s", m)
			}
		}
	}
}

// TestColumnsOldReaderKeepsItsFile: a reader whose transaction predates
// an import builds its columns for its own state and does not put that
// older file in place of the import's.
func TestColumnsOldReaderKeepsItsFile(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	ps := sampleParts()
	importParts(t, s, "a", ps[:3]...)
	v, err := s.View(ctx) // the old state: 3 parts
	if err != nil {
		t.Fatal(err)
	}
	defer v.Close()
	importParts(t, s, "b", ps[3:]...)
	os.Remove(s.colsPath()) // as if the import's refresh had not happened yet
	c, err := v.Columns(ctx, nil)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, cs := range c.Sets {
		n += cs.Len()
	}
	if n != 3 {
		t.Errorf("old view sees %d parts, want 3", n)
	}
	if _, err := os.Stat(s.colsPath()); err == nil {
		t.Errorf("the old view saved its file as the catalog's column file")
	}
	if left, _ := filepath.Glob(s.colsPath() + ".tmp-*"); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
	if got := colsOf(t, s); len(got.Sets) == 0 || got.Gen == v.Gen {
		t.Errorf("a new view should see the new generation, got %d (old %d)", got.Gen, v.Gen)
	}
}

// TestOfferDigestsDenseAndSparse checks that the spill of offer digests
// gives the same digest for every part id whether it is indexed by a
// dense array (ids close to the part count) or a map (sparse ids).
func TestOfferDigestsDenseAndSparse(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	ps := sampleParts()
	ps[1].Offers = []Offer{offer("Zephyr Stock", "ZS-9", 40, 1, "usd", PriceBreak{1, 1.5})}
	importParts(t, s, "sample", ps...)
	var maxID int64
	if err := s.db.QueryRow(`SELECT max(id) FROM parts`).Scan(&maxID); err != nil {
		t.Fatal(err)
	}
	dense, err := spillOfferDigests(ctx, s.db, t.TempDir(), "d-", maxID)
	if err != nil {
		t.Fatal(err)
	}
	defer dense.close()
	sparse, err := spillOfferDigests(ctx, s.db, t.TempDir(), "s-", 1<<40)
	if err != nil {
		t.Fatal(err)
	}
	defer sparse.close()
	if dense.at == nil || sparse.atM == nil {
		t.Fatalf("index kinds: dense %v, sparse %v", dense.at != nil, sparse.atM != nil)
	}
	priced := 0
	for id := int64(-1); id <= maxID+1; id++ {
		a, err1 := dense.get(id, nil)
		b, err2 := sparse.get(id, nil)
		if err1 != nil || err2 != nil || !slices.Equal(a, b) {
			t.Fatalf("part %d: dense %v %v, sparse %v %v", id, a, err1, b, err2)
		}
		if !slices.Equal(a, noOffers) {
			priced++
		}
	}
	if priced != 2 {
		t.Errorf("%d parts with an offers digest, want 2", priced)
	}
}

// TestColumnsDamagedOffers checks that damage in a set's offers section
// is found when its offers are first read (the section is checked apart,
// so a pick need not read every offer), and that the numbers stay usable.
func TestColumnsDamagedOffers(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	importParts(t, s, "sample", sampleParts()...)
	v, err := s.View(ctx)
	if err != nil {
		t.Fatal(err)
	}
	infos, err := readColumnsHeader(s.colsPath(), v.st)
	v.Close()
	if err != nil {
		t.Fatal(err)
	}
	// the set of the part with an offer (sampleParts()[0])
	var hit *setInfo
	c := colsOf(t, s)
	for k, cs := range c.Sets {
		for i := 0; i < cs.Len(); i++ {
			if o, err := cs.Offers(i); err == nil && len(o) > 0 {
				hit = &infos[k]
			}
		}
	}
	c.Close()
	if hit == nil {
		t.Fatal("no set with offers")
	}
	f, err := os.OpenFile(s.colsPath(), os.O_RDWR, 0)
	if err != nil {
		t.Fatal(err)
	}
	last := make([]byte, 1)
	at := int64(hit.offset + hit.length - 1) // the last byte of its offers
	if _, err := f.ReadAt(last, at); err != nil {
		t.Fatal(err)
	}
	last[0] ^= 0x5a
	if _, err := f.WriteAt(last, at); err != nil {
		t.Fatal(err)
	}
	f.Close()
	c = colsOf(t, s)
	bad := 0
	for _, cs := range c.Sets {
		if cs.Kind == hit.kind && cs.Type == hit.typ {
			if cs.Len() == 0 || len(cs.Num) == 0 {
				t.Fatalf("set %s/%s lost its numbers", cs.Kind, cs.Type)
			}
			for i := 0; i < cs.Len(); i++ {
				if _, err := cs.Offers(i); err == errStale {
					bad++
				}
			}
		} else {
			for i := 0; i < cs.Len(); i++ {
				if _, err := cs.Offers(i); err != nil {
					t.Errorf("set %s/%s row %d: %v", cs.Kind, cs.Type, i, err)
				}
			}
		}
	}
	if bad == 0 {
		t.Error("damaged offers section not found")
	}
}

// FuzzOffersDigest feeds arbitrary bytes to the offers digest decoder
// (one part whose digest is data, with a valid section check): a result
// or an error, never a panic.
func FuzzOffersDigest(f *testing.F) {
	f.Add([]byte{0})
	f.Add(appendOfferDigest([]byte{1}, "EUR", "[[1,0.32],[100,0.21]]"))
	f.Add(appendOfferDigest(appendOfferDigest([]byte{2}, "USD", "[]"), "", "[[10,1e300]]"))
	f.Add([]byte{5, 3, 'E', 'U'})
	f.Fuzz(func(t *testing.T, data []byte) {
		sec := binary.LittleEndian.AppendUint32(nil, uint32(len(data)))
		sec = append(sec, data...)
		cs := &ColumnSet{ID: []int64{1}, Ord: []uint32{0}, offSec: sec, offSum: checksum(sec),
			mpnEnds: binary.LittleEndian.AppendUint32(nil, 2), mpnBlob: "P1"}
		offs, err := cs.Offers(0)
		if err != nil {
			return
		}
		if len(offs) > len(data) {
			t.Fatalf("%d offers from %d bytes", len(offs), len(data))
		}
	})
}

// TestColumnFileState checks what `catalog check` reports of the column
// file: current after an import, stale when it reflects an older state,
// damaged when a section fails its check, missing when deleted.
func TestColumnFileState(t *testing.T) {
	ctx := context.Background()
	s := openTemp(t)
	ps := sampleParts()
	state := func() string {
		t.Helper()
		st, err := s.ColumnFileState(ctx)
		if err != nil {
			t.Fatal(err)
		}
		return st
	}
	importParts(t, s, "a", ps[:3]...)
	if got := state(); got != "current" {
		t.Fatalf("after an import: %s, want current", got)
	}
	old, err := os.ReadFile(s.colsPath())
	if err != nil {
		t.Fatal(err)
	}
	importParts(t, s, "b", ps[3:]...)
	if got := state(); got != "current" {
		t.Fatalf("after a second import: %s, want current", got)
	}
	good, err := os.ReadFile(s.colsPath())
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(s.colsPath(), old, 0o644); err != nil {
		t.Fatal(err)
	}
	if got := state(); got != "stale" {
		t.Errorf("with the file of the first import: %s, want stale", got)
	}
	bad := slices.Clone(good)
	bad[len(colsMagic)+3] ^= 0x01 // inside the first set's ids
	if err := os.WriteFile(s.colsPath(), bad, 0o644); err != nil {
		t.Fatal(err)
	}
	if got := state(); got != "damaged" {
		t.Errorf("with a flipped bit: %s, want damaged", got)
	}
	os.Remove(s.colsPath())
	if got := state(); got != "missing" {
		t.Errorf("deleted: %s, want missing", got)
	}
}

// FuzzCanonicalBreaks: wherever decodeBreaks (encoding/json) reads a
// breaks text, the allocation-free reader gives the same breaks (or
// declines, and the caller falls back to decodeBreaks); it never
// changes what it was given to append to.
func FuzzCanonicalBreaks(f *testing.F) {
	for _, s := range []string{"[]", "[[1,0.32],[100,0.21]]", "[[10, 1e-3] , [1000,5E2]]", "[[1]]", "[[1,2,3]]", `[["1",2]]`, "[[1.9,-0]]", "[[9e18,1]]", "null", "[[1,0.1]", " [ ] ", "[[01,2]]"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		pre := []PriceBreak{{7, 0.5}}
		got, ok := appendCanonicalBreaks(slices.Clone(pre), []byte(s))
		if !slices.Equal(got[:1], pre) {
			t.Fatalf("%q: the prefix changed: %v", s, got)
		}
		want, err := decodeBreaks(s)
		if err != nil || !ok {
			if !ok && len(got) != 1 {
				t.Fatalf("%q: declined but appended %v", s, got)
			}
			return
		}
		if !slices.Equal(got[1:], want) {
			t.Fatalf("%q: fast %v, json %v", s, got[1:], want)
		}
	})
}

// TestLEViewMisaligned: a payload that is not aligned for its values is
// decoded into a fresh slice with the same values as the in-place view.
func TestLEViewMisaligned(t *testing.T) {
	want := []float64{1.5, -2e-9, math.Inf(1), 0}
	raw := make([]byte, 1, 1+8*len(want))
	for _, v := range want {
		raw = binary.LittleEndian.AppendUint64(raw, math.Float64bits(v))
	}
	aligned := append([]byte(nil), raw[1:]...)
	for name, b := range map[string][]byte{"misaligned": raw[1:], "aligned": aligned} {
		if got := float64s(b); !slices.Equal(got, want) {
			t.Errorf("%s float64s: %v, want %v", name, got, want)
		}
		if got := int64s(b); got[1] != int64(math.Float64bits(want[1])) {
			t.Errorf("%s int64s: %x", name, got[1])
		}
		if got := uint32s(b); len(got) != 2*len(want) || got[0] != uint32(math.Float64bits(want[0])) {
			t.Errorf("%s uint32s: %x", name, got)
		}
	}
}
