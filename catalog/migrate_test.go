package catalog

import (
	"bufio"
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// cur is the schema version of this build, before a test adds one.
var cur = len(migrations)

// withMigrationNext makes this build know schema version cur+1, made by
// m, for the rest of the test.
func withMigrationNext(t *testing.T, m migration) {
	saved := migrations
	t.Cleanup(func() { migrations, schemaVersion = saved, len(saved) })
	migrations = append(append([]migration(nil), saved[:cur]...), m)
	schemaVersion = len(migrations)
}

// curCatalog makes a catalog of this build's schema holding the sample
// parts and returns its path and dump.
func curCatalog(t *testing.T) (string, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "c.db")
	s := openAt(t, path)
	importParts(t, s, "a", sampleParts()...)
	d := dump(t, s)
	s.Close()
	return path, d
}

// dumpAt opens the catalog at path with this build's schema and dumps it.
func dumpAt(t *testing.T, path string) string {
	t.Helper()
	s := openAt(t, path)
	defer s.Close()
	return dump(t, s)
}

func userVersion(t *testing.T, path string) int {
	t.Helper()
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	var v int
	if err := db.QueryRow(`PRAGMA user_version`).Scan(&v); err != nil {
		t.Fatal(err)
	}
	return v
}

// While a migration runs, its backup exists and holds the whole catalog as
// it was; a failing migration leaves the catalog exactly as it was (every
// table) and keeps the backup, also exactly as it was.
func TestMigrationBackupContents(t *testing.T) {
	path, before := curCatalog(t)
	backup := fmt.Sprintf("%s.bak-v%d", path, cur)
	var during string
	withMigrationNext(t, func(ctx context.Context, tx *sql.Tx) error {
		if _, err := os.Stat(backup); err != nil {
			return fmt.Errorf("no backup during the migration: %w", err)
		}
		b, err := sql.Open("sqlite", backup)
		if err != nil {
			return err
		}
		defer b.Close()
		if err := b.QueryRow(`SELECT count(*) || ' parts, version ' || (SELECT user_version FROM pragma_user_version) FROM parts`).Scan(&during); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `ALTER TABLE parts ADD COLUMN trial REAL`); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `DELETE FROM offers`); err != nil {
			return err
		}
		return errors.New("made-up failure after changing the schema and data")
	})
	_, err := Open(context.Background(), path)
	if err == nil || !strings.Contains(err.Error(), "the catalog is unchanged; a copy is in "+backup) {
		t.Fatalf("failing migration: %v", err)
	}
	if want := fmt.Sprintf("%d parts, version %d", len(sampleParts()), cur); during != want {
		t.Errorf("backup during the migration: %q, want %q", during, want)
	}
	if v := userVersion(t, path); v != cur {
		t.Errorf("user_version after the failed migration = %d", v)
	}
	if _, err := os.Stat(backup); err != nil {
		t.Fatalf("backup removed after a failed migration: %v", err)
	}

	// back to this build's schema: the catalog and its backup are the
	// catalog as it was
	migrations, schemaVersion = migrations[:cur], cur
	if got := dumpAt(t, path); got != before {
		t.Errorf("catalog changed by the failed migration:\n%s\nwant\n%s", got, before)
	}
	if got := dumpAt(t, backup); got != before {
		t.Errorf("backup differs from the catalog before the migration:\n%s\nwant\n%s", got, before)
	}
}

// When the backup cannot be written, the migration does not start.
func TestMigrationWithoutBackupRefused(t *testing.T) {
	path, before := curCatalog(t)
	ran := false
	withMigrationNext(t, func(ctx context.Context, tx *sql.Tx) error {
		ran = true
		return nil
	})
	// directories where the backup would go: PATH.bak-vN and, since that
	// exists, PATH.bak-vN-UNIXTIME
	now := time.Now().Unix()
	for _, name := range append([]string{fmt.Sprintf("%s.bak-v%d", path, cur)}, func() []string {
		var out []string
		for sec := now - 1; sec <= now+30; sec++ {
			out = append(out, fmt.Sprintf("%s.bak-v%d-%d", path, cur, sec))
		}
		return out
	}()...) {
		if err := os.Mkdir(name, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	_, err := Open(context.Background(), path)
	if err == nil || !strings.Contains(err.Error(), "cannot write the backup") || !strings.Contains(err.Error(), "before upgrading the schema") {
		t.Fatalf("migration without a backup: %v", err)
	}
	if ran {
		t.Error("the migration ran without a backup")
	}
	if v := userVersion(t, path); v != cur {
		t.Errorf("user_version = %d", v)
	}
	migrations, schemaVersion = migrations[:cur], cur
	if got := dumpAt(t, path); got != before {
		t.Errorf("catalog changed:\n%s\nwant\n%s", got, before)
	}
}

// TestHelperMigrating is not a test: TestMigrationKilled runs it in a
// child process, where it opens a catalog with a migration to version
// cur+1 that never ends.
func TestHelperMigrating(t *testing.T) {
	path := os.Getenv("PARTSIEVE_HELPER_MIGRATE")
	if path == "" {
		t.Skip("helper process only")
	}
	withMigrationNext(t, func(ctx context.Context, tx *sql.Tx) error {
		if _, err := tx.ExecContext(ctx, `ALTER TABLE parts ADD COLUMN trial REAL`); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `UPDATE parts SET trial = 1, "desc" = 'rewritten'`); err != nil {
			return err
		}
		fmt.Println("migrating")
		time.Sleep(time.Minute)
		return nil
	})
	_, err := Open(context.Background(), path)
	fmt.Println("error: the migration ended:", err)
	os.Exit(1)
}

// A process killed in the middle of a migration leaves the catalog as it
// was and the backup in place; the next migration succeeds, removes its
// own backup and keeps the one of the killed attempt.
func TestMigrationKilled(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a process")
	}
	path, before := curCatalog(t)
	cmd := exec.Command(os.Args[0], "-test.run=^TestHelperMigrating$", "-test.count=1")
	cmd.Env = append(os.Environ(), "PARTSIEVE_HELPER_MIGRATE="+path)
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer cmd.Process.Kill()
	line, err := bufio.NewReader(stdout).ReadString('\n')
	if err != nil || strings.TrimSpace(line) != "migrating" {
		t.Fatalf("child: %q %v", line, err)
	}
	if err := cmd.Process.Kill(); err != nil {
		t.Fatal(err)
	}
	cmd.Wait()

	backup := fmt.Sprintf("%s.bak-v%d", path, cur)
	if _, err := os.Stat(backup); err != nil {
		t.Fatalf("no backup after the killed migration: %v", err)
	}
	if v := userVersion(t, path); v != cur {
		t.Errorf("user_version after the killed migration = %d", v)
	}
	if got := dumpAt(t, path); got != before {
		t.Errorf("catalog changed by the killed migration:\n%s\nwant\n%s", got, before)
	}
	if got := dumpAt(t, backup); got != before {
		t.Errorf("backup of the killed migration:\n%s\nwant\n%s", got, before)
	}

	withMigrationNext(t, func(ctx context.Context, tx *sql.Tx) error {
		_, err := tx.ExecContext(ctx, `ALTER TABLE parts ADD COLUMN trial REAL`)
		return err
	})
	s := openAt(t, path)
	s.Close()
	if v := userVersion(t, path); v != cur+1 {
		t.Errorf("user_version after the second migration = %d", v)
	}
	left, _ := filepath.Glob(fmt.Sprintf("%s.bak-v%d*", path, cur))
	if len(left) != 1 || left[0] != backup {
		t.Errorf("backups after the second migration: %v, want only the killed attempt's %s", left, backup)
	}
}
