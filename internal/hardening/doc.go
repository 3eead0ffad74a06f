// Package hardening holds the crash-safety, concurrency and hostile-catalog
// tests of partsieve. They build the real partsieve binary once and run it
// in child processes against throw-away catalogs:
//
//   - TestCrashDuringImport kills an import with SIGKILL at random (seeded)
//     moments and checks, every time, that `partsieve catalog check` passes
//     (or reports a text index that is only stale and is rebuilt by the next
//     text search) and that the catalog holds exactly the old state or
//     exactly the complete import. PARTSIEVE_CRASH_RUNS sets the number of
//     kills (default 50, 12 with -short), PARTSIEVE_CRASH_SEED the seed,
//     PARTSIEVE_CRASH_ROWS the size of the killed import.
//   - TestReadersDuringImport and TestTwoImports run find, pick and a second
//     import while an import runs in another process.
//   - TestHostileCatalog covers a read-only catalog, a catalog from a newer
//     schema, a damaged catalog file and a full disk (a small tmpfs, when
//     the test may mount one).
//
// The package has no code of its own besides this comment.
package hardening
