package hardening

import (
	"crypto/sha256"
	"database/sql"
	"encoding/binary"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// fileHash returns the SHA-256 of a file's bytes.
func fileHash(t *testing.T, path string) string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		t.Fatal(err)
	}
	return hex.EncodeToString(h.Sum(nil))
}

func sqlExec(t *testing.T, path, q string) {
	t.Helper()
	db, err := sql.Open("sqlite", "file:"+path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if _, err := db.Exec(q); err != nil {
		t.Fatal(err)
	}
}

// expectRefusal runs each command against db and wants exit 1 with every
// one of msgs on stderr.
func expectRefusal(t *testing.T, db string, cmds [][]string, msgs ...string) {
	t.Helper()
	for _, args := range cmds {
		r := cli(t, db, args...)
		ok := r.code == 1
		for _, m := range msgs {
			ok = ok && strings.Contains(r.stderr, m)
		}
		if !ok {
			t.Errorf("partsieve %s: want exit 1 with %q:\n%s", strings.Join(args, " "), msgs, r)
		}
	}
}

// everyCommand lists commands that open the catalog: reads, an import
// and the maintenance commands.
func everyCommand(f *fixture) [][]string {
	return [][]string{
		{"find", "--where", "vrrm>=10V"},
		{"find", mpnOf(3)},
		{"pick", "vehicle-12v-accessory"},
		{"import", f.update},
		{"catalog", "stats"},
		{"catalog", "check"},
		{"catalog", "reindex"},
	}
}

// A catalog written by a newer schema version is refused by every command
// with a message naming both versions, and left byte for byte as it was.
func TestNewerSchemaCatalog(t *testing.T) {
	f := getFixture(t)
	db := filepath.Join(t.TempDir(), "catalog.db")
	copyCatalog(t, f.oldDB, db)
	st := cli(t, db, "catalog", "stats", "--format", "json")
	var ver int
	if _, err := fmt.Sscanf(st.stdout[strings.Index(st.stdout, `"schema_version"`):], `"schema_version": %d`, &ver); err != nil || ver < 1 {
		t.Fatalf("schema version from stats: %v\n%s", err, st)
	}
	sqlExec(t, db, fmt.Sprintf("PRAGMA user_version = %d", ver+1))
	before := fileHash(t, db)
	expectRefusal(t, db, everyCommand(f), fmt.Sprintf("catalog %s was written by a newer partsieve (schema %d; this one knows %d)", db, ver+1, ver))
	if fileHash(t, db) != before {
		t.Error("the refused catalog file was modified")
	}
	sqlExec(t, db, fmt.Sprintf("PRAGMA user_version = %d", ver))
	if got := readState(t, db); got.Hash != f.old.Hash {
		t.Errorf("catalog after the refusals: %v\nwant %v", got, f.old)
	}
	mustCheckClean(t, db, "after restoring the schema version")
}

// pageOf returns the page size and the root page of table in the SQLite
// file at path.
func pageOf(t *testing.T, path, table string) (pageSize, root int64) {
	t.Helper()
	head := make([]byte, 100)
	fh, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := io.ReadFull(fh, head); err != nil {
		t.Fatal(err)
	}
	fh.Close()
	pageSize = int64(binary.BigEndian.Uint16(head[16:18]))
	if pageSize == 1 {
		pageSize = 65536
	}
	db, err := sql.Open("sqlite", "file:"+path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if err := db.QueryRow(`SELECT rootpage FROM sqlite_schema WHERE name = ?`, table).Scan(&root); err != nil {
		t.Fatal(err)
	}
	return pageSize, root
}

func overwrite(t *testing.T, path string, off int64, n int) {
	t.Helper()
	fh, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		t.Fatal(err)
	}
	junk := make([]byte, n)
	for i := range junk {
		junk[i] = byte(0xA5 ^ i)
	}
	if _, err := fh.WriteAt(junk, off); err != nil {
		t.Fatal(err)
	}
	if err := fh.Close(); err != nil {
		t.Fatal(err)
	}
}

// A damaged catalog file gives a clear error or, for catalog check, the
// list of damage; no command panics, hangs, re-seeds, replaces or deletes
// the file, and a refused import leaves it byte for byte as it was.
func TestDamagedCatalog(t *testing.T) {
	f := getFixture(t)
	size := func(t *testing.T, path string) int64 {
		fi, err := os.Stat(path)
		if err != nil {
			t.Fatal(err)
		}
		return fi.Size()
	}
	damaged := "the catalog file is damaged"
	restore := "restore"
	cases := []struct {
		name   string
		damage func(t *testing.T, db string)
		// msgs on stderr of every command (catalog check prints its
		// findings on stdout instead)
		msgs []string
		// check wants these on the stdout of catalog check; nil: check
		// fails like the other commands
		check []string
	}{
		{"parts table root page overwritten", func(t *testing.T, db string) {
			ps, root := pageOf(t, db, "parts")
			overwrite(t, db, (root-1)*ps+8, int(ps)-8) // keep the page type byte area, smash the cells
		}, []string{"damaged", restore}, []string{"problem: sqlite integrity:"}},
		{"middle of the file overwritten", func(t *testing.T, db string) {
			ps, _ := pageOf(t, db, "parts")
			overwrite(t, db, size(t, db)/2/ps*ps, int(2*ps))
		}, nil, []string{"problem: sqlite integrity:"}},
		{"truncated to half", func(t *testing.T, db string) {
			ps, _ := pageOf(t, db, "parts")
			if err := os.Truncate(db, size(t, db)/2/ps*ps); err != nil {
				t.Fatal(err)
			}
		}, []string{"is damaged (database disk image is malformed", restore}, nil},
		{"header overwritten", func(t *testing.T, db string) {
			overwrite(t, db, 0, 100)
		}, []string{"is not a partsieve catalog: not an SQLite database"}, nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			db := filepath.Join(t.TempDir(), "catalog.db")
			copyCatalog(t, f.oldDB, db)
			tc.damage(t, db)
			before, sizeBefore := fileHash(t, db), size(t, db)
			for _, args := range everyCommand(f) {
				r := cli(t, db, args...)
				isCheck := args[0] == "catalog" && args[1] == "check"
				switch {
				case isCheck && tc.check != nil:
					for _, m := range tc.check {
						if r.code != 1 || !strings.Contains(r.stdout, m) || !strings.Contains(r.stderr, "damaged") {
							t.Errorf("catalog check of a damaged catalog: want exit 1 listing %q and a hint about damage:\n%s", m, r)
						}
					}
				case tc.msgs == nil:
					// damage away from what this command reads: it may
					// work; when it fails, it must say the file is damaged
					if r.code != 0 && r.code != 4 && !(r.code == 1 && strings.Contains(r.stderr, damaged)) {
						t.Errorf("partsieve %s: want success or a clear error:\n%s", strings.Join(args, " "), r)
					}
				default:
					ok := r.code == 1
					for _, m := range tc.msgs {
						ok = ok && strings.Contains(r.stderr, m)
					}
					if !ok {
						t.Errorf("partsieve %s: want exit 1 with %q:\n%s", strings.Join(args, " "), tc.msgs, r)
					}
				}
				t.Logf("%-40s exit %d: %s", strings.Join(args[:min(2, len(args))], " "), r.code, firstLine(r.stderr))
				if args[0] == "import" && r.code != 0 && r.code != 3 && fileHash(t, db) != before {
					t.Errorf("the refused import changed the catalog file")
				}
				if _, err := os.Stat(db); err != nil {
					t.Fatalf("partsieve %s removed the damaged catalog: %v", strings.Join(args, " "), err)
				}
			}
			if tc.msgs != nil && (fileHash(t, db) != before || size(t, db) != sizeBefore) {
				t.Errorf("the damaged catalog file was modified (size %d → %d)", sizeBefore, size(t, db))
			}
		})
	}
}

func firstLine(s string) string {
	s, _, _ = strings.Cut(strings.TrimSpace(s), "\n")
	return s
}
