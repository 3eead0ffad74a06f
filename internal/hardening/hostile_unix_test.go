//go:build unix

package hardening

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// nobody is the user id the read-only test runs partsieve as when the test
// itself runs as root, for whom file permissions do not apply.
const nobody = 65534

// A catalog file without write permission is refused by every command with
// a message that says so and what to do; the file is left as it was. As
// root, partsieve runs as user nobody (a root process ignores the mode
// bits); the test skips when that is not possible.
func TestReadOnlyCatalogFile(t *testing.T) {
	f := getFixture(t)
	bin := partsieve(t)
	dir := t.TempDir()
	db := filepath.Join(dir, "catalog.db")
	copyCatalog(t, f.oldDB, db)
	if err := os.Chmod(db, 0o444); err != nil {
		t.Fatal(err)
	}
	var cred *syscall.Credential
	if os.Geteuid() == 0 {
		// let nobody reach the binary, the sheets and the catalog's
		// directory (writable: only the file is read-only)
		for _, d := range []string{filepath.Dir(bin), filepath.Dir(f.update), filepath.Dir(dir)} {
			if err := os.Chmod(d, 0o755); err != nil {
				t.Fatal(err)
			}
		}
		if err := os.Chmod(dir, 0o777); err != nil {
			t.Fatal(err)
		}
		cred = &syscall.Credential{Uid: nobody, Gid: nobody}
		probe := exec.Command(bin, "--help")
		probe.SysProcAttr = &syscall.SysProcAttr{Credential: cred}
		if out, err := probe.CombinedOutput(); err != nil {
			t.Skipf("running as root, and partsieve cannot run as user nobody (%v: %s): root ignores the read-only mode", err, out)
		}
	}
	before := fileHash(t, db)
	want := "catalog " + db + " is read-only (permission denied); partsieve needs to write to it: fix its permissions or use another --db"
	for _, args := range everyCommand(f) {
		cmd := exec.Command(bin, append([]string{"--db", db}, args...)...)
		cmd.Env = cliEnv()
		if cred != nil {
			cmd.SysProcAttr = &syscall.SysProcAttr{Credential: cred}
		}
		var out, errb strings.Builder
		cmd.Stdout, cmd.Stderr = &out, &errb
		err := cmd.Run()
		r := result{stdout: out.String(), stderr: errb.String(), code: exitCode(t, err)}
		if r.code != 1 || !strings.Contains(r.stderr, want) {
			t.Errorf("partsieve %s on a read-only catalog: want exit 1 with %q:\n%s", strings.Join(args, " "), want, r)
		}
	}
	if fileHash(t, db) != before {
		t.Error("the read-only catalog changed")
	}
	os.Chmod(db, 0o644)
	if st := readState(t, db); st.Hash != f.old.Hash {
		t.Errorf("catalog after the refusals: %v\nwant %v", st, f.old)
	}
}
