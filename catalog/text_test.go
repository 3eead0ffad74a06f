package catalog

import (
	"context"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"testing"
)

func sorted(ss []string) []string {
	out := append([]string(nil), ss...)
	sort.Strings(out)
	return out
}

func TestTextSearch(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	cases := []struct {
		name string
		q    Query
		want []string // sorted
	}{
		{"fuzzy one edit", Query{Text: "shottky"}, []string{"SBX1100", "SBX340-13"}},
		{"fuzzy two edits, long word", Query{Text: "shotky"}, []string{"SBX1100", "SBX340-13"}},
		{"digits never fuzzy", Query{Text: "LF-3"}, nil},
		{"word any case", Query{Text: "ZENER"}, []string{"QZ5V1"}},
		{"mfr", Query{Text: "harrow"}, []string{"HPN3020", "HPN4012"}},
		{"mfr fuzzy", Query{Text: "Quary"}, []string{"QR1M", "QZ5V1"}}, // 5 letters: one edit allowed
		{"mpn prefix", Query{Text: "sbx3"}, []string{"SBX340-13"}},
		{"mpn prefix with dash", Query{Text: "LF-2"}, []string{"LF-2A-T"}},
		{"mpn exact normalised", Query{Text: "lf2at"}, []string{"LF-2A-T"}},
		{"short prefix not expanded", Query{Text: "sb"}, nil},
		{"package", Query{Text: "sod-123f"}, []string{"SBX1100"}},
		{"package key prefix", Query{Text: "sod123"}, []string{"SBX1100"}},
		{"class words", Query{Text: "tvs"}, []string{"TV15A"}},
		{"conjunction", Query{Text: "schottky sma"}, []string{"SBX340-13"}},
		{"conjunction no hit", Query{Text: "schottky fuse"}, nil},
		{"with kind and cond", Query{Text: "channel", Kind: MOSFET, Conds: []Cond{{Field: "vds", Op: ">=", Num: 40}}}, []string{"HPN4012", "TNM6008", "TPM4030"}},
		{"punctuation", Query{Text: " (sable), "}, []string{"SBX1100", "SBX340-13"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r, err := s.Search(ctx, c.q)
			if err != nil {
				t.Fatal(err)
			}
			if r.Fallback {
				t.Error("fell back to substring search")
			}
			if got := sorted(mpns(r.Parts)); !reflect.DeepEqual(got, c.want) && !(len(got) == 0 && len(c.want) == 0) {
				t.Errorf("got %v, want %v", got, c.want)
			}
		})
	}
}

func TestTextSearchOrder(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	// relevance: the exact part number outranks a description match
	importParts(t, s, "b", part(Diode, "Acme", "SMA", "desc", "not in an sma package"))
	r, err := s.Search(ctx, Query{Text: "sma"})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Parts) != 3 || r.Parts[0].MPN != "SMA" || r.TextHits != 3 {
		t.Errorf("relevance: %v hits %d", mpns(r.Parts), r.TextHits)
	}
	// a sort field overrides relevance, absent values last
	r, err = s.Search(ctx, Query{Text: "sma", Sort: "vrrm", Desc: true, Limit: 3})
	if err != nil {
		t.Fatal(err)
	}
	if got := mpns(r.Parts); !reflect.DeepEqual(got, []string{"QR1M", "SBX340-13", "SMA"}) {
		t.Errorf("sorted: %v", got)
	}
}

func TestIndexRebuiltWhenMissingOrStale(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	dir := s.indexDir()
	search := func() []string {
		t.Helper()
		r, err := s.Search(ctx, Query{Text: "schottky"})
		if err != nil {
			t.Fatal(err)
		}
		if r.Fallback {
			t.Error("fell back to substring search")
		}
		return sorted(mpns(r.Parts))
	}
	want := []string{"SBX1100", "SBX340-13"}
	if got := search(); !reflect.DeepEqual(got, want) {
		t.Fatalf("first search %v", got)
	}
	check := func(wantProblem string) {
		t.Helper()
		probs, err := s.Check(ctx)
		if err != nil {
			t.Fatal(err)
		}
		if wantProblem == "" && len(probs) != 0 || wantProblem != "" && (len(probs) == 0 || !strings.Contains(strings.Join(probs, "\n"), wantProblem)) {
			t.Errorf("Check = %q, want %q", probs, wantProblem)
		}
	}
	check("")

	// 1. index directory deleted
	s.mu.Lock()
	s.closeIndexLocked()
	s.mu.Unlock()
	os.RemoveAll(dir)
	check("text index: missing")
	s.mu.Lock()
	s.closeIndexLocked()
	s.mu.Unlock()
	if got := search(); !reflect.DeepEqual(got, want) {
		t.Errorf("after deleting the index: %v", got)
	}
	if _, err := os.Stat(dir); err != nil {
		t.Errorf("index not rebuilt: %v", err)
	}
	check("")

	// 2. generation tampered (as if an update had been lost)
	s.mu.Lock()
	s.closeIndexLocked()
	ix, err := openIndex(dir, true)
	if err != nil {
		t.Fatal(err)
	}
	ix.SetInternal([]byte(genKey), []byte("999"))
	ix.Delete("1") // and a document lost
	ix.Close()
	s.mu.Unlock()
	check("text index: it reflects catalog generation 999, the catalog is at 1")
	if got := search(); !reflect.DeepEqual(got, want) {
		t.Errorf("after tampering: %v", got)
	}
	check("")

	// 3. index files damaged (as after a crash)
	s.mu.Lock()
	s.closeIndexLocked()
	s.mu.Unlock()
	if err := os.WriteFile(filepath.Join(dir, "store", "root.bolt"), []byte("garbage"), 0o600); err != nil {
		t.Fatal(err)
	}
	check("text index: unreadable")
	s.mu.Lock()
	s.closeIndexLocked()
	s.mu.Unlock()
	if got := search(); !reflect.DeepEqual(got, want) {
		t.Errorf("after damage: %v", got)
	}
	check("")

	// 4. leftovers of a crashed rebuild are cleaned up
	dead := dir + ".tmp-999999999-1"
	os.MkdirAll(dead, 0o755)
	os.MkdirAll(dir+".old-12", 0o755)
	if err := s.Reindex(ctx); err != nil {
		t.Fatal(err)
	}
	if m, _ := filepath.Glob(dir + ".*"); len(m) != 0 {
		t.Errorf("leftovers: %v", m)
	}
}

// A catalog changed by another Store (process) is detected by generation
// and the index is brought up to date before the search.
func TestIndexFollowsOtherWriter(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	a := openAt(t, path)
	importParts(t, a, "a", sampleParts()...)
	if r, _ := a.Search(context.Background(), Query{Text: "schottky"}); len(r.Parts) != 2 {
		t.Fatalf("%v", mpns(r.Parts))
	}
	// a holds the index read-only; b's update cannot take it and leaves it
	// stale; a notices on its next search
	b := openAt(t, path)
	var notes []string
	b.Notify = func(m string) { notes = append(notes, m) }
	importParts(t, b, "b", part(Diode, "Zeta", "ZS1", "type", "schottky", "desc", "schottky diode"))
	if len(notes) != 1 || !strings.Contains(notes[0], "in use by another process") {
		t.Errorf("notes %q", notes)
	}
	r, err := a.Search(context.Background(), Query{Text: "schottky"})
	if err != nil || r.Fallback || len(r.Parts) != 3 {
		t.Errorf("after another writer: %v fallback=%v %v", mpns(r.Parts), r.Fallback, err)
	}
}

// While another process holds the index for writing, a text search still
// answers, by substring search in SQLite.
func TestTextSearchFallbackWhenIndexBusy(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	s.mu.Lock()
	s.closeIndexLocked()
	s.mu.Unlock()
	other, err := openIndex(s.indexDir(), true)
	if err != nil {
		t.Fatal(err)
	}
	defer other.Close()
	r, err := s.Search(ctx, Query{Text: "Schottky sable", Sort: "vrrm"})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Fallback || !reflect.DeepEqual(mpns(r.Parts), []string{"SBX340-13", "SBX1100"}) {
		t.Errorf("fallback=%v parts %v", r.Fallback, mpns(r.Parts))
	}
	r, _ = s.Search(ctx, Query{Text: "sbx-340"})
	if !reflect.DeepEqual(mpns(r.Parts), []string{"SBX340-13"}) {
		t.Errorf("mpn fallback %v", mpns(r.Parts))
	}
	if err := s.Reindex(ctx); err == nil || !strings.Contains(err.Error(), "in use by another process") {
		t.Errorf("Reindex while busy: %v", err)
	}
	if probs, _ := s.Check(ctx); len(probs) != 1 || !strings.Contains(probs[0], "in use by another process") {
		t.Errorf("Check while busy: %q", probs)
	}
}

// Ids the index returns that SQLite no longer has are ignored.
func TestIndexIDsNotTrustedBlindly(t *testing.T) {
	s := sampleStore(t)
	ctx := context.Background()
	s.Search(ctx, Query{Text: "x"})
	s.mu.Lock()
	s.closeIndexLocked()
	ix, err := openIndex(s.indexDir(), true)
	if err != nil {
		t.Fatal(err)
	}
	ix.Index("424242", map[string]any{"mfr": "Ghost", "desc": "schottky phantom"})
	ix.Close()
	s.mu.Unlock()
	r, err := s.Search(ctx, Query{Text: "phantom"})
	if err != nil || len(r.Parts) != 0 {
		t.Errorf("ghost document returned: %v %v", mpns(r.Parts), err)
	}
	if !reflect.DeepEqual(sorted(mpns(findText(t, s, "schottky"))), []string{"SBX1100", "SBX340-13"}) {
		t.Error("schottky search broken")
	}
	if probs, _ := s.Check(ctx); len(probs) != 1 || probs[0] != "text index: "+strconv.Itoa(12)+" documents for 11 parts" {
		t.Errorf("Check = %q", probs)
	}
}

func findText(t *testing.T, s *Store, text string) []Part {
	t.Helper()
	ps, err := s.Find(context.Background(), Query{Text: text})
	if err != nil {
		t.Fatal(err)
	}
	return ps
}

func TestSplitTermsAndQuery(t *testing.T) {
	got := splitTerms("  Schottky, 40V;SMA (DO-214AC)  ")
	want := []string{"schottky", "40v", "sma", "do-214ac"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("splitTerms = %q", got)
	}
	if textQuery(" ,; ") != nil {
		t.Error("empty text gave a query")
	}
}
