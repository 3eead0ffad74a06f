// Package hardening holds the crash-safety, concurrency and hostile-catalog
// tests of partsieve. They build the real partsieve binary once
// (CGO_ENABLED=0) and run it in child processes against throw-away
// catalogs made from generated supplier sheets (1000 base rows; an update
// of those rows plus 4000 new ones):
//
//   - TestCrashDuringImport (Unix) kills an import with SIGKILL at random,
//     seeded moments, and the text index rebuild that follows when the
//     index was left stale, and checks every time that `partsieve catalog
//     check` passes (or reports only a stale text index, which the next
//     text search rebuilds) and that the catalog holds exactly the old state
//     or exactly the complete import.
//   - TestInterruptDuringImport (Unix) sends SIGINT part way through an
//     import: exit code 130, and the catalog is the old or the new state.
//   - TestReadersDuringImport runs find and pick in other processes while
//     an import runs; TestTwoImports and TestSecondImportFailsWhileLocked
//     start a second writer during an import.
//   - TestReadOnlyCatalogFile, TestReadOnlyFileSystem, TestNewerSchemaCatalog,
//     TestDamagedCatalog and TestFullDisk open hostile catalogs; the
//     read-only file system and the full disk mount a small tmpfs (Linux,
//     root), and skip when that is not allowed.
//
// Long runs: PARTSIEVE_CRASH_RUNS sets the number of kills (default 50, 12
// with -short), PARTSIEVE_CRASH_SEED the seed of the delays (logged), and
// PARTSIEVE_CRASH_ROWS the new rows of the update (the update's import
// switches to batched writes of its new parts after 2,048 of them in a
// row, so kills land on both the row path and the batched one). For
// example:
//
//	PARTSIEVE_CRASH_RUNS=500 go test -timeout 0 -run Crash -v ./internal/hardening/
//
// The package has no code of its own besides this comment.
package hardening
