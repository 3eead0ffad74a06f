package catalog

import (
	"context"
	"path/filepath"
	"reflect"
	"testing"
	"time"
)

// withBusyTimeout opens Stores with a short busy timeout.
func withBusyTimeout(t *testing.T, d time.Duration) {
	saved := busyTimeout
	busyTimeout = d
	t.Cleanup(func() { busyTimeout = saved })
}

// A reader (another Store: another connection pool, as another process
// would be) finds parts while an import is open, sees the committed state
// only, and sees the import once committed.
func TestReaderDuringImport(t *testing.T) {
	withBusyTimeout(t, 500*time.Millisecond)
	path := filepath.Join(t.TempDir(), "c.db")
	w := openAt(t, path)
	importParts(t, w, "a", sampleParts()...)
	r := openAt(t, path)
	ctx := context.Background()

	tx, err := w.BeginImport(ctx, Source{Label: "b"})
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback()
	if _, _, err := tx.Put(part(Fuse, "Lumen Fuse", "LF-3A-T", "type", "T", "in", 3, "desc", "time-lag fuse")); err != nil {
		t.Fatal(err)
	}
	q := Query{Kind: Fuse, Sort: "in"}
	ps, err := r.Find(ctx, q)
	if err != nil {
		t.Fatalf("Find during import: %v", err)
	}
	if got := mpns(ps); !reflect.DeepEqual(got, []string{"LF-500M-F", "LF-2A-T"}) {
		t.Errorf("during import: %v", got)
	}
	res, err := r.Search(ctx, Query{Text: "time-lag"})
	if err != nil || res.Fallback || !reflect.DeepEqual(mpns(res.Parts), []string{"LF-2A-T"}) {
		t.Errorf("text during import: %v %+v", err, res)
	}
	if err := tx.Commit(Source{}); err != nil {
		t.Fatal(err)
	}
	ps, _ = r.Find(ctx, q)
	if got := mpns(ps); !reflect.DeepEqual(got, []string{"LF-500M-F", "LF-2A-T", "LF-3A-T"}) {
		t.Errorf("after commit: %v", got)
	}
	res, err = r.Search(ctx, Query{Text: "time-lag"})
	if err != nil || res.Fallback || !reflect.DeepEqual(sorted(mpns(res.Parts)), []string{"LF-2A-T", "LF-3A-T"}) {
		t.Errorf("text after commit: %v %+v", err, mpns(res.Parts))
	}
}

// Two imports into one catalog: the second fails with a clear message
// when the first outlasts its busy timeout, and waits and succeeds when
// the first commits in time.
func TestSecondImportWaitsOrFails(t *testing.T) {
	path := filepath.Join(t.TempDir(), "c.db")
	ctx := context.Background()
	withBusyTimeout(t, 200*time.Millisecond)
	a := openAt(t, path)
	b := openAt(t, path)
	busyTimeout = 10 * time.Second
	c := openAt(t, path)

	tx, err := a.BeginImport(ctx, Source{Label: "a"})
	if err != nil {
		t.Fatal(err)
	}
	tx.Put(part(Diode, "Acme", "D1", "vrrm", 40))

	_, err = b.BeginImport(ctx, Source{Label: "b"})
	want := "another import is writing to catalog " + path + "; try again when it finishes"
	if err == nil || err.Error() != want {
		t.Fatalf("second import: %v\nwant %s", err, want)
	}
	if _, _, err := b.RemoveSource(ctx, "a"); err == nil || err.Error() != want {
		t.Errorf("RemoveSource during import: %v", err)
	}

	done := make(chan error, 1)
	go func() {
		tx2, err := c.BeginImport(ctx, Source{Label: "c"})
		if err != nil {
			done <- err
			return
		}
		if _, _, err := tx2.Put(part(Diode, "Acme", "D2", "vrrm", 60)); err != nil {
			tx2.Rollback()
			done <- err
			return
		}
		done <- tx2.Commit(Source{})
	}()
	time.Sleep(100 * time.Millisecond)
	select {
	case err := <-done:
		t.Fatalf("second import did not wait: %v", err)
	default:
	}
	if err := tx.Commit(Source{}); err != nil {
		t.Fatal(err)
	}
	if err := <-done; err != nil {
		t.Fatalf("waiting import: %v", err)
	}
	if got := mpns(findAll(t, a)); !reflect.DeepEqual(got, []string{"D1", "D2"}) {
		t.Errorf("parts %v", got)
	}
	if g := gen(t, a); g != 2 {
		t.Errorf("generation %d", g)
	}
}
