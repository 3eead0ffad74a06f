//go:build linux

package hardening

import (
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// mountTmpfs mounts a tmpfs of size bytes at a new directory and unmounts
// it when the test ends. It skips the test when mounting is not allowed
// (it needs root, or CAP_SYS_ADMIN).
func mountTmpfs(t *testing.T, size int64) string {
	t.Helper()
	dir := t.TempDir()
	out, err := exec.Command("mount", "-t", "tmpfs", "-o", fmt.Sprintf("size=%d,mode=0755", size), "tmpfs", dir).CombinedOutput()
	if err != nil {
		t.Skipf("cannot mount a tmpfs (%v: %s): this test needs root on Linux", err, strings.TrimSpace(string(out)))
	}
	t.Cleanup(func() {
		for i := 0; i < 50; i++ {
			if exec.Command("umount", dir).Run() == nil {
				return
			}
			time.Sleep(100 * time.Millisecond)
		}
		exec.Command("umount", "-l", dir).Run()
	})
	return dir
}

// treeSize is the number of bytes of the files under path.
func treeSize(t *testing.T, path string) int64 {
	t.Helper()
	var n int64
	err := filepath.WalkDir(path, func(_ string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if !d.IsDir() {
			fi, err := d.Info()
			if err != nil {
				return err
			}
			n += (fi.Size() + 4095) / 4096 * 4096
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// A catalog on a file system mounted read-only is refused by every
// command with the same message as a read-only file.
func TestReadOnlyFileSystem(t *testing.T) {
	f := getFixture(t)
	dir := mountTmpfs(t, 64<<20)
	db := filepath.Join(dir, "catalog.db")
	copyCatalog(t, f.oldDB, db)
	if out, err := exec.Command("mount", "-o", "remount,ro", dir).CombinedOutput(); err != nil {
		t.Skipf("cannot remount the tmpfs read-only (%v: %s)", err, out)
	}
	before := fileHash(t, db)
	expectRefusal(t, db, everyCommand(f), "catalog "+db+" is read-only (read-only file system); partsieve needs to write to it")
	if fileHash(t, db) != before {
		t.Error("the catalog changed")
	}
	// a new catalog in a read-only directory
	expectRefusal(t, filepath.Join(dir, "new.db"), [][]string{{"find", "x"}}, "directory "+dir+" is not writable")
}

// A full disk: an import bigger than the free space fails with a message
// that says the disk is full and that nothing was written; the catalog
// keeps its contents and passes its check. With the disk filled to the
// last byte, opening the catalog fails with a message that names the
// full disk, and once space is freed everything works again.
func TestFullDisk(t *testing.T) {
	f := getFixture(t)
	// room for the catalog and its side files, not for the update (which
	// grows the catalog by several MB)
	need := treeSize(t, f.oldDB) + treeSize(t, f.oldDB+".bleve")
	growth := treeSize(t, f.newDB) + treeSize(t, f.newDB+".bleve") - need
	spare := min(growth/4, 512<<10)
	if spare < 64<<10 {
		t.Skipf("the update grows the catalog by only %d bytes: too little to fill a disk", growth)
	}
	dir := mountTmpfs(t, need+spare)
	db := filepath.Join(dir, "catalog.db")
	copyCatalog(t, f.oldDB, db)

	r := cli(t, db, "import", f.update)
	if r.code != 1 || !strings.Contains(r.stderr, "the disk is full") || !strings.Contains(r.stderr, "nothing of") {
		t.Errorf("import onto a full disk: want exit 1 saying the disk is full and nothing was written:\n%s", r)
	}
	mustCheckClean(t, db, "after the import that filled the disk")
	if st := readState(t, db); st.Hash != f.old.Hash {
		t.Errorf("catalog after the failed import: %v\nwant %v", st, f.old)
	}
	if r := cli(t, db, "find", mpnOf(3), "--format", "csv"); r.code != 0 || !strings.Contains(r.stdout, mpnOf(3)) {
		t.Errorf("find after the failed import:\n%s", r)
	}

	// fill the last bytes: the catalog cannot even get its -shm file
	filler := filepath.Join(dir, "filler")
	fh, err := os.Create(filler)
	if err != nil {
		t.Fatal(err)
	}
	block := make([]byte, 64<<10)
	for {
		if _, err := fh.Write(block); err != nil {
			break
		}
	}
	for n := 4096; n > 0; n /= 2 {
		for {
			if _, err := fh.Write(block[:n]); err != nil {
				break
			}
		}
	}
	fh.Close()
	before := fileHash(t, db)
	expectRefusal(t, db, [][]string{{"find", mpnOf(3)}, {"import", f.update}, {"catalog", "check"}}, "the disk is", "full")
	if fileHash(t, db) != before {
		t.Error("the catalog changed on the full disk")
	}
	if err := os.Remove(filler); err != nil {
		t.Fatal(err)
	}
	mustCheckClean(t, db, "once space was freed")
	if st := readState(t, db); st.Hash != f.old.Hash {
		t.Errorf("catalog after the full disk: %v\nwant %v", st, f.old)
	}
}
