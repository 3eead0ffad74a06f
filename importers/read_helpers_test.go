package importers

import (
	"bytes"
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

// readRow is one row as a test expects it.
type readRow struct {
	Row   int
	Cells []string
}

// readDir holds the reader fixtures (see testdata/read/make.sh).
const readDir = "testdata/read"

// readFixture returns the bytes of a fixture file.
func readFixture(t testing.TB, name string) []byte {
	t.Helper()
	data, err := os.ReadFile(filepath.Join(readDir, name))
	if err != nil {
		t.Fatal(err)
	}
	return data
}

// readOpen opens data as a book named name.
func readOpen(name string, data []byte) (Book, error) {
	return OpenBook(name, bytes.NewReader(data), int64(len(data)))
}

// readTable reads every row of one sheet.
func readTable(b Book, sheet string) ([]readRow, error) {
	t, err := b.Table(sheet)
	if err != nil {
		return nil, err
	}
	defer t.Close()
	var rows []readRow
	for {
		cells, row, err := t.Next()
		if err == io.EOF {
			return rows, nil
		}
		if err != nil {
			return rows, err
		}
		rows = append(rows, readRow{row, cells})
	}
}

// readSheets reads every sheet of a file, by sheet name.
func readSheets(t testing.TB, name string, data []byte) (Book, map[string][]readRow) {
	t.Helper()
	b, err := readOpen(name, data)
	if err != nil {
		t.Fatalf("OpenBook(%s): %v", name, err)
	}
	t.Cleanup(func() {
		if err := b.Close(); err != nil {
			t.Errorf("Close(%s): %v", name, err)
		}
	})
	out := map[string][]readRow{}
	for _, s := range b.Sheets() {
		rows, err := readTable(b, s)
		if err != nil {
			t.Fatalf("%s sheet %q: %v", name, s, err)
		}
		out[s] = rows
	}
	return b, out
}

// readCompare reports the differences between two row lists.
func readCompare(t *testing.T, what string, got, want []readRow) {
	t.Helper()
	if reflect.DeepEqual(got, want) {
		return
	}
	for i := 0; i < max(len(got), len(want)); i++ {
		var g, w readRow
		if i < len(got) {
			g = got[i]
		}
		if i < len(want) {
			w = want[i]
		}
		if reflect.DeepEqual(g, w) {
			continue
		}
		if len(g.Cells) > 20 || len(w.Cells) > 20 {
			t.Errorf("%s: row #%d: got row %d with %d cells, want row %d with %d cells",
				what, i, g.Row, len(g.Cells), w.Row, len(w.Cells))
			continue
		}
		t.Errorf("%s: row #%d: got %d %q, want %d %q", what, i, g.Row, g.Cells, w.Row, w.Cells)
	}
}

// readWantErr checks that err is a *FileError of the given kind that names
// the file.
func readWantErr(t *testing.T, err error, file string, kind error) *FileError {
	t.Helper()
	if err == nil {
		t.Fatalf("%s: no error, want %v", file, kind)
	}
	var fe *FileError
	if !errors.As(err, &fe) {
		t.Fatalf("%s: error %T %q is not a *FileError", file, err, err)
	}
	if !errors.Is(err, kind) {
		t.Errorf("%s: error %q is not %q", file, err, kind)
	}
	if fe.File != file || !bytes.HasPrefix([]byte(err.Error()), []byte(file+":")) && !bytes.HasPrefix([]byte(err.Error()), []byte(file+",")) {
		t.Errorf("error %q does not name the file %s", err, file)
	}
	return fe
}
