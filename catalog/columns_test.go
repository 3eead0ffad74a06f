package catalog

import (
	"context"
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
	importParts(t, s, "sample", sampleParts()...)
	c := colsOf(t, s)
	all, err := s.Find(context.Background(), Query{})
	if err != nil {
		t.Fatal(err)
	}
	byKey := map[string]Part{}
	for _, p := range all {
		byKey[p.Mfr+"|"+p.MPN] = p
	}
	n := 0
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
	f.Add([]byte("PSCOLS07"))
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
