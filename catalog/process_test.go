package catalog

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"
)

// TestHelperImporter is not a test: TestOtherProcessImport runs it in a
// child process to hold an import open.
func TestHelperImporter(t *testing.T) {
	path := os.Getenv("PARTSIEVE_HELPER_DB")
	if path == "" {
		t.Skip("helper process only")
	}
	ctx := context.Background()
	s, err := Open(ctx, path)
	if err != nil {
		fmt.Println("error:", err)
		os.Exit(1)
	}
	tx, err := s.BeginImport(ctx, Source{Label: "child"})
	if err != nil {
		fmt.Println("error:", err)
		os.Exit(1)
	}
	if _, _, err := tx.Put(part(Fuse, "Lumen Fuse", "LF-7A-T", "type", "T", "in", 7, "desc", "time-lag fuse from the child")); err != nil {
		fmt.Println("error:", err)
		os.Exit(1)
	}
	fmt.Println("ready")
	bufio.NewReader(os.Stdin).ReadString('\n')
	if err := tx.Commit(Source{}); err != nil {
		fmt.Println("error:", err)
		os.Exit(1)
	}
	s.Close()
	fmt.Println("committed")
	os.Exit(0)
}

// TestOtherProcessImport checks the locking claims across real processes:
// while a child process holds an import open, this process finds parts
// (old state, text index included) and cannot start a second import; after
// the child commits, the new part is found by parameters and by text.
func TestOtherProcessImport(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a process")
	}
	withBusyTimeout(t, 300*time.Millisecond)
	path := filepath.Join(t.TempDir(), "c.db")
	s := openAt(t, path)
	importParts(t, s, "a", sampleParts()...)
	ctx := context.Background()

	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperImporter$", "-test.count=1")
	cmd.Env = append(os.Environ(), "PARTSIEVE_HELPER_DB="+path)
	stdin, _ := cmd.StdinPipe()
	stdout, _ := cmd.StdoutPipe()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer cmd.Process.Kill()
	out := bufio.NewReader(stdout)
	line, err := out.ReadString('\n')
	if err != nil || strings.TrimSpace(line) != "ready" {
		t.Fatalf("child: %q %v", line, err)
	}

	fuses := Query{Kind: Fuse, Sort: "in"}
	ps, err := s.Find(ctx, fuses)
	if err != nil || !reflect.DeepEqual(mpns(ps), []string{"LF-500M-F", "LF-2A-T"}) {
		t.Errorf("find during the child's import: %v %v", mpns(ps), err)
	}
	if r, err := s.Search(ctx, Query{Text: "time-lag"}); err != nil || !reflect.DeepEqual(mpns(r.Parts), []string{"LF-2A-T"}) {
		t.Errorf("text search during the child's import: %+v %v", r, err)
	}
	if _, err := s.BeginImport(ctx, Source{Label: "parent"}); err == nil || !strings.Contains(err.Error(), "another import is writing") {
		t.Errorf("second import: %v", err)
	}

	fmt.Fprintln(stdin, "go")
	if line, _ := out.ReadString('\n'); strings.TrimSpace(line) != "committed" {
		t.Fatalf("child: %q", line)
	}
	cmd.Wait()
	ps, _ = s.Find(ctx, fuses)
	if !reflect.DeepEqual(mpns(ps), []string{"LF-500M-F", "LF-2A-T", "LF-7A-T"}) {
		t.Errorf("after the child's commit: %v", mpns(ps))
	}
	r, err := s.Search(ctx, Query{Text: "time-lag"})
	if err != nil || r.Fallback || !reflect.DeepEqual(sorted(mpns(r.Parts)), []string{"LF-2A-T", "LF-7A-T"}) {
		t.Errorf("text after the child's commit: %v fallback=%v %v", mpns(r.Parts), r.Fallback, err)
	}
}
