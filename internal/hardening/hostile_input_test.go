package hardening

import (
	"archive/zip"
	"bytes"
	"compress/flate"
	"context"
	"encoding/csv"

	"errors"
	"fmt"
	"hash/crc32"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/xuri/excelize/v2"
)

// Hostile and broken input through the binary: zip bombs and huge cells
// under a stated address-space limit, a million columns, invalid UTF-8,
// NaN/Inf/absurd magnitudes, symlinked and directory output paths, and
// formula-looking text in every CSV the tool writes.

// memLimitKiB is the address-space limit (ulimit -v) under which the
// binary must refuse a zip bomb or a huge cell with a clear error.
const memLimitKiB = 1 << 20 // 1 GiB

// limitedCLI runs partsieve --db db args... under ulimit -v memLimitKiB
// (Linux with bash only; skips elsewhere).
func limitedCLI(t *testing.T, db string, args ...string) result {
	t.Helper()
	if runtime.GOOS != "linux" {
		t.Skip("ulimit -v test on Linux only")
	}
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("no bash for ulimit")
	}
	bin := partsieve(t)
	script := fmt.Sprintf(`ulimit -v %d && exec "$0" "$@"`, memLimitKiB)
	r, err := runProgram(bash, append([]string{"-c", script, bin, "--db", db}, args...))
	if err != nil {
		t.Fatal(err)
	}
	checkNoPanic(t, args, r)
	return r
}

// runProgram runs name args... like runBin, with the children's
// environment and the hang timeout.
func runProgram(name string, args []string) (result, error) {
	ctx, cancel := context.WithTimeout(context.Background(), cliTimeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, name, args...)
	cmd.Env = cliEnv()
	var out, errb strings.Builder
	cmd.Stdout, cmd.Stderr = &out, &errb
	start := time.Now()
	err := cmd.Run()
	r := result{stdout: out.String(), stderr: errb.String(), took: time.Since(start)}
	if ctx.Err() != nil {
		return r, fmt.Errorf("%s hung (killed after %v)\n%s", strings.Join(args, " "), cliTimeout, r)
	}
	if err != nil {
		var ee *exec.ExitError
		if !errors.As(err, &ee) {
			return r, fmt.Errorf("running %s: %v", strings.Join(args, " "), err)
		}
		r.code = ee.ExitCode()
	}
	return r, nil
}

// flateRun returns the raw DEFLATE blocks of data, byte-aligned and not
// final (a sync flush), so that copies can be concatenated: each run
// refers back only to its own bytes.
func flateRun(t *testing.T, data []byte, final bool) []byte {
	t.Helper()
	var buf bytes.Buffer
	w, err := flate.NewWriter(&buf, flate.BestCompression)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := w.Write(data); err != nil {
		t.Fatal(err)
	}
	if final {
		err = w.Close()
	} else {
		err = w.Flush()
	}
	if err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// bombSheet builds the DEFLATE stream of a worksheet whose cell A2 holds
// mib MiB of the letter A (the header row has mfr, mpn, desc), built from
// a 1 MiB run repeated: 2 GiB packs to about 2 MB. It returns the stream,
// the unpacked size and its CRC-32.
func bombSheet(t *testing.T, mib int) (stream []byte, size uint64, crc uint32) {
	t.Helper()
	prefix := []byte(`<?xml version="1.0" encoding="UTF-8" standalone="yes"?>` +
		`<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>` +
		`<row r="1"><c r="A1" t="inlineStr"><is><t>mfr</t></is></c><c r="B1" t="inlineStr"><is><t>mpn</t></is></c><c r="C1" t="inlineStr"><is><t>desc</t></is></c></row>` +
		`<row r="2"><c r="A2" t="inlineStr"><is><t>Brindle Semi</t></is></c><c r="B2" t="inlineStr"><is><t>BD-1</t></is></c><c r="C2" t="inlineStr"><is><t>`)
	suffix := []byte(`</t></is></c></row></sheetData></worksheet>`)
	chunk := bytes.Repeat([]byte("A"), 1<<20)
	run := flateRun(t, chunk, false)
	var buf bytes.Buffer
	buf.Write(flateRun(t, prefix, false))
	h := crc32.NewIEEE()
	h.Write(prefix)
	for range mib {
		buf.Write(run)
		h.Write(chunk)
	}
	buf.Write(flateRun(t, suffix, true))
	h.Write(suffix)
	return buf.Bytes(), uint64(len(prefix)) + uint64(mib)<<20 + uint64(len(suffix)), h.Sum32()
}

// writeBombBook writes a workbook made by excelize whose first sheet is
// replaced by the given DEFLATE stream, declaring size as its unpacked size.
func writeBombBook(t *testing.T, path string, stream []byte, size uint64, crc uint32) {
	t.Helper()
	f := excelize.NewFile()
	if err := f.SetCellStr("Sheet1", "A1", "placeholder"); err != nil {
		t.Fatal(err)
	}
	var src bytes.Buffer
	if err := f.Write(&src); err != nil {
		t.Fatal(err)
	}
	zr, err := zip.NewReader(bytes.NewReader(src.Bytes()), int64(src.Len()))
	if err != nil {
		t.Fatal(err)
	}
	out, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer out.Close()
	zw := zip.NewWriter(out)
	replaced := false
	for _, zf := range zr.File {
		if zf.Name != "xl/worksheets/sheet1.xml" {
			if err := zw.Copy(zf); err != nil {
				t.Fatal(err)
			}
			continue
		}
		replaced = true
		w, err := zw.CreateRaw(&zip.FileHeader{Name: zf.Name, Method: zip.Deflate, CRC32: crc,
			CompressedSize64: uint64(len(stream)), UncompressedSize64: size})
		if err != nil {
			t.Fatal(err)
		}
		if _, err := w.Write(stream); err != nil {
			t.Fatal(err)
		}
	}
	if !replaced {
		t.Fatal("excelize wrote no xl/worksheets/sheet1.xml")
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
}

// TestHostileZipBomb: a 2 MB workbook whose sheet unpacks to 2 GiB, once
// declaring its true size and once declaring 1 MiB, is refused with exit
// status 1 and a message naming the file, under a 1 GiB address-space limit.
func TestHostileZipBomb(t *testing.T) {
	dir := t.TempDir()
	stream, size, crc := bombSheet(t, 2048)
	t.Logf("bomb: %d bytes packed, %d unpacked (ratio %.0f)", len(stream), size, float64(size)/float64(len(stream)))
	for _, tc := range []struct {
		name     string
		declared uint64
		want     string
	}{
		{"true size", size, "too large"},
		{"declares 1 MiB", 1 << 20, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			book := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "-")+".xlsx")
			writeBombBook(t, book, stream, tc.declared, crc)
			db := filepath.Join(dir, strings.ReplaceAll(tc.name, " ", "-")+".db")
			r := limitedCLI(t, db, "import", book)
			t.Logf("%s", r)
			if r.code != 1 || !strings.Contains(r.stderr, filepath.Base(book)) || !strings.Contains(r.stderr, tc.want) {
				t.Errorf("want exit 1 and an error naming %s (%q):\n%s", filepath.Base(book), tc.want, r)
			}
		})
	}
}

// TestHostileHugeCell: a single 100 MiB cell. In a CSV file it is longer
// than the 16 MiB record limit: refused with exit 1, naming the file and
// the row. In a workbook (100 MiB unpacked, under the 1 GiB unpacked
// limit) it is longer than the 32 MiB cell limit: refused likewise, where
// excelize alone ran out of memory under the 1 GiB address-space limit.
func TestHostileHugeCell(t *testing.T) {
	dir := t.TempDir()
	t.Run("csv", func(t *testing.T) {
		sheet := filepath.Join(dir, "huge-cell.csv")
		f, err := os.Create(sheet)
		if err != nil {
			t.Fatal(err)
		}
		fmt.Fprint(f, "kind,mfr,mpn,desc,vrrm\ndiode,Brindle Semi,BD-1,ok,40\ndiode,Brindle Semi,BD-2,")
		chunk := bytes.Repeat([]byte("A"), 1<<20)
		for range 100 {
			if _, err := f.Write(chunk); err != nil {
				t.Fatal(err)
			}
		}
		fmt.Fprint(f, ",40\n")
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		r := limitedCLI(t, filepath.Join(dir, "csv.db"), "import", sheet)
		t.Logf("%s", r)
		if r.code != 1 || !strings.Contains(r.stderr, "huge-cell.csv") || !strings.Contains(r.stderr, "row 3") || !strings.Contains(r.stderr, "longer than") {
			t.Errorf("want exit 1 and an error naming huge-cell.csv, row 3 and the record limit:\n%s", r)
		}
	})
	t.Run("xlsx", func(t *testing.T) {
		stream, size, crc := bombSheet(t, 100)
		book := filepath.Join(dir, "huge-cell.xlsx")
		writeBombBook(t, book, stream, size, crc)
		r := limitedCLI(t, filepath.Join(dir, "xlsx.db"), "import", book)
		t.Logf("%s", r)
		if r.code != 1 || !strings.Contains(r.stderr, "huge-cell.xlsx") || !strings.Contains(r.stderr, "row 2") || !strings.Contains(r.stderr, "too large") {
			t.Errorf("want exit 1 and an error naming huge-cell.xlsx, row 2 and the cell limit:\n%s", r)
		}
	})
}

// writeFile writes data to dir/name and returns the path.
func writeFile(t *testing.T, dir, name string, data []byte) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestHostileMillionColumns: a header and a data row of a million columns
// are refused at once (more than 16384 columns), naming the row; a million
// trailing empty cells are ignored.
func TestHostileMillionColumns(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("mfr,mpn,vrrm")
	for i := range 1_000_000 {
		fmt.Fprintf(&b, ",note%d", i)
	}
	b.WriteString("\nBrindle Semi,BD-9,40\n")
	wideHead := writeFile(t, dir, "wide-header.csv", []byte(b.String()))
	wideRow := writeFile(t, dir, "wide-row.csv", []byte("mfr,mpn,kind,vrrm\nBrindle Semi,BD-9,diode,40"+strings.Repeat(",x", 1_000_000)+"\n"))
	empties := writeFile(t, dir, "empties.csv", []byte("mfr,mpn,kind,vrrm\nBrindle Semi,BD-9,diode,40"+strings.Repeat(",", 1_000_000)+"\n"))
	for _, tc := range []struct {
		file, want string
		code       int
	}{
		{wideHead, "wide-header.csv, row 1: too large: 1000003 columns", 1},
		{wideRow, "wide-row.csv, row 2: too large: 1000004 columns", 1},
		{empties, "added 1", 0},
	} {
		r := cli(t, filepath.Join(dir, "c.db"), "import", tc.file)
		if r.code != tc.code || !strings.Contains(r.stderr+r.stdout, tc.want) {
			t.Errorf("import %s: want exit %d and %q:\n%s", filepath.Base(tc.file), tc.code, tc.want, r)
		}
	}
}

// TestHostileInvalidUTF8: bytes that are not UTF-8 in headers and cells
// are read as Windows-1252 (the file is imported, nothing panics) and
// everything the tool prints back is valid UTF-8.
func TestHostileInvalidUTF8(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "c.db")
	sheet := writeFile(t, dir, "latin.csv", []byte("kind,mfr,mpn,desc\xff,vrrm (V)\x80,ifav\ndiode,Brindle Semi,BD-\xe96,r\xe9sum\xe9 \x81\x8d\x90\x9d \xc3\x28,40,3\n"))
	r := cli(t, db, "import", sheet)
	if r.code != 0 || !strings.Contains(r.stdout, "added 1") {
		t.Fatalf("import:\n%s", r)
	}
	for _, args := range [][]string{{"find", "--format", "csv", "--where", "mfr = Brindle Semi"}, {"find", "--format", "json", "--where", "mfr = Brindle Semi"}, {"find", "résumé"}, {"find", "--where", "desc\xff = x"}} {
		r := cli(t, db, args...)
		if !utf8.ValidString(r.stdout) || !utf8.ValidString(r.stderr) {
			t.Errorf("%q printed invalid UTF-8:\n%s", args, r)
		}
		if args[1] == "--format" && !strings.Contains(r.stdout, "BD-é6") {
			t.Errorf("%q: BD-é6 (0xE9 read as Windows-1252) missing:\n%s", args, r)
		}
	}
}

// absurd are values no rating can take: refused with a clear message in a
// cell, in --where and in a spec.
var absurd = []struct{ text, want string }{
	{"nan", "NaN and infinity are not values"},
	{"NaN", "NaN and infinity are not values"},
	{"inf", "NaN and infinity are not values"},
	{"-Inf", "NaN and infinity are not values"},
	{"+infinity", "NaN and infinity are not values"},
	{"1e300", "beyond 1e15"},
	{"-1e300", "beyond 1e15"},
	{"1e-300", "below 1e-30"},
}

// TestHostileNumbers: NaN, infinities and absurd magnitudes are refused in
// value cells (the row is rejected naming row, column and reason), in
// --where (exit 2) and in spec values (exit 1, naming the file line).
func TestHostileNumbers(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "c.db")
	var b strings.Builder
	b.WriteString("kind,mfr,mpn,vrrm,ifav\n")
	for i, a := range absurd {
		fmt.Fprintf(&b, "diode,Brindle Semi,BD-%d,%s V,3\n", i, a.text)
	}
	b.WriteString("diode,Brindle Semi,BD-ok,40,3\n")
	rejects := filepath.Join(dir, "rejects.csv")
	r := cli(t, db, "import", "--rejects", rejects, writeFile(t, dir, "absurd.csv", []byte(b.String())))
	if r.code != 3 || !strings.Contains(r.stdout, fmt.Sprintf("added 1, updated 0, unchanged 0, rejected %d", len(absurd))) {
		t.Fatalf("import:\n%s", r)
	}
	recs := readCSVFile(t, rejects)
	if len(recs) != len(absurd)+1 {
		t.Fatalf("rejects file has %d records, want %d", len(recs), len(absurd)+1)
	}
	for i, a := range absurd {
		rec := recs[i+1] // file, sheet, row, column, raw, reason
		if rec[2] != fmt.Sprint(i+2) || rec[3] != "vrrm" || !strings.Contains(rec[5], a.want) {
			t.Errorf("reject of %q: %q, want row %d, column vrrm, %q", a.text, rec, i+2, a.want)
		}
	}
	for _, a := range absurd {
		r := cli(t, db, "find", "--where", "vrrm > "+a.text+" V")
		if r.code != 2 || !strings.Contains(r.stderr, a.want) {
			t.Errorf("--where vrrm > %s V: want exit 2 and %q:\n%s", a.text, a.want, r)
		}
	}
	spec, err := os.ReadFile(filepath.Join("..", "..", "seeddata", "specs", "handheld-2s-liion.toml"))
	if err != nil {
		t.Fatal(err)
	}
	for i, a := range absurd {
		text := strings.Replace(string(spec), `i_max = "1.5 A"`, fmt.Sprintf(`i_max = "%s A"`, a.text), 1)
		if text == string(spec) {
			t.Fatal(`example spec has no i_max = "1.5 A"`)
		}
		p := writeFile(t, dir, fmt.Sprintf("spec%d.toml", i), []byte(text))
		r := cli(t, db, "pick", p)
		if r.code != 1 || !strings.Contains(r.stderr, fmt.Sprintf("spec%d.toml:", i)) || !strings.Contains(r.stderr, "load.i_max") || !strings.Contains(r.stderr, a.want) {
			t.Errorf("spec with i_max %s A: want exit 1 naming the file, line, key and %q:\n%s", a.text, a.want, r)
		}
	}
}

func readCSVFile(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cr := csv.NewReader(f)
	cr.FieldsPerRecord = -1
	recs, err := cr.ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return recs
}

// TestHostileOutputPaths: the files written by import --rejects, shortlist
// --out (CSV and XLSX) and pick --report. A symbolic link is refused and
// its target left alone; a directory is refused; a path through ../ is
// written exactly where it resolves; a missing directory is an error. A
// refused write leaves no file and no temporary file behind.
func TestHostileOutputPaths(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("symbolic links need privileges on Windows")
	}
	dir := t.TempDir()
	db := filepath.Join(dir, "c.db")
	sheet := writeFile(t, dir, "sheet.csv", []byte("kind,mfr,mpn,vrrm\ndiode,Brindle Semi,BD-1,40\ndiode,Brindle Semi,BD-2,nan\n"))
	if r := cli(t, db, "import", sheet); r.code != 3 {
		t.Fatalf("import:\n%s", r)
	}
	commands := []struct {
		name string
		args func(out string) []string
		ok   int // exit status of a successful run
	}{
		{"import --rejects", func(out string) []string { return []string{"import", "--rejects", out, sheet} }, 3},
		{"shortlist --out csv", func(out string) []string { return []string{"shortlist", "vehicle-12v-accessory", "--out", out} }, 0},
		{"shortlist --out xlsx", func(out string) []string { return []string{"shortlist", "vehicle-12v-accessory", "--out", out} }, 0},
		{"pick --report", func(out string) []string { return []string{"pick", "vehicle-12v-accessory", "--report", out} }, 0},
	}
	ext := map[string]string{"import --rejects": ".csv", "shortlist --out csv": ".csv", "shortlist --out xlsx": ".xlsx", "pick --report": ".html"}
	for _, c := range commands {
		t.Run(c.name, func(t *testing.T) {
			work := filepath.Join(dir, strings.NewReplacer(" ", "_", "-", "").Replace(c.name))
			sub := filepath.Join(work, "sub")
			if err := os.MkdirAll(sub, 0o755); err != nil {
				t.Fatal(err)
			}
			victim := writeFile(t, work, "victim.txt", []byte("keep me"))
			link := filepath.Join(sub, "out"+ext[c.name])
			if err := os.Symlink(victim, link); err != nil {
				t.Fatal(err)
			}
			r := cli(t, db, c.args(link)...)
			if r.code != 1 || !strings.Contains(r.stderr, "symbolic link") {
				t.Errorf("symlink: want exit 1 and a message saying it is a symbolic link:\n%s", r)
			}
			if data, err := os.ReadFile(victim); err != nil || string(data) != "keep me" {
				t.Errorf("symlink target changed: %q %v", data, err)
			}
			if fi, err := os.Lstat(link); err != nil || fi.Mode()&os.ModeSymlink == 0 {
				t.Errorf("the link was replaced: %v %v", fi, err)
			}
			os.Remove(link)

			asDir := filepath.Join(sub, "dir"+ext[c.name])
			if err := os.Mkdir(asDir, 0o755); err != nil {
				t.Fatal(err)
			}
			r = cli(t, db, c.args(asDir)...)
			if r.code != 1 || !strings.Contains(r.stderr, "is a directory") {
				t.Errorf("directory: want exit 1 and a message saying it is a directory:\n%s", r)
			}
			os.Remove(asDir)

			r = cli(t, db, c.args(filepath.Join(work, "missing", "out"+ext[c.name]))...)
			if r.code != 1 || !strings.Contains(r.stderr, "missing") {
				t.Errorf("missing directory: want exit 1 naming the path:\n%s", r)
			}

			// written out by hand: filepath.Join would clean the ../ away
			dotdot := sub + string(filepath.Separator) + ".." + string(filepath.Separator) + "up" + ext[c.name]
			r = cli(t, db, c.args(dotdot)...)
			if r.code != c.ok {
				t.Errorf("../ path: want exit %d:\n%s", c.ok, r)
			}
			if fi, err := os.Stat(filepath.Join(work, "up"+ext[c.name])); err != nil || fi.Size() == 0 {
				t.Errorf("../ path not written where it resolves: %v", err)
			}
			for _, d := range []string{work, sub} {
				ents, err := os.ReadDir(d)
				if err != nil {
					t.Fatal(err)
				}
				for _, e := range ents {
					if n := e.Name(); n != "sub" && n != "victim.txt" && n != "up"+ext[c.name] {
						t.Errorf("left behind in %s: %s", d, n)
					}
				}
			}
		})
	}
}

// risky reports whether a spreadsheet program would evaluate cell as a
// formula: it starts with = + - @, tab or CR and is not a plain number.
func risky(cell string) bool {
	if cell == "" || !strings.ContainsRune("=+-@\t\r", rune(cell[0])) {
		return false
	}
	_, err := strconv.ParseFloat(cell, 64)
	return err != nil
}

// TestHostileFormulaExports: formula-looking text from an imported sheet
// comes out neutralised (a leading apostrophe) in the rejects CSV and in
// find --format csv; negative numbers stay numbers. (The shortlist CSV and
// workbook are checked in cmd/partsieve TestShortlistFiles, the HTML report
// in query/report.)
func TestHostileFormulaExports(t *testing.T) {
	dir := t.TempDir()
	db := filepath.Join(dir, "c.db")
	hostile := []string{`=HYPERLINK("http://attacker.invalid/","x")`, "@SUM(A1:A9)", "+cmd|' /C calc'!A0", "-2+3+cmd|' /C calc'!A0", "=1+2"}
	var sheet strings.Builder
	cw := csv.NewWriter(&sheet)
	cw.WriteAll([][]string{
		{"kind", "mfr", "mpn", "desc", "package", "supplier", "sku", "stock", "1+", "vrrm", "ifav"},
		{"diode", hostile[0], hostile[1], hostile[2], hostile[3], hostile[4], "\t=2+3", "10", "0.1", "40", "3"},
		{"diode", "Brindle Semi", "BD-2", "x", "y", "Foo", "s1", "5", "0.2", hostile[0], "3"},
		{"diode", "Brindle Semi", "BD-3", "x", "y", "Foo", "s1", "5", "0.2", "40", hostile[1]},
		{"diode", "Brindle Semi", "BD-4", "x", "y", "Foo", "s1", "5", "0.2", hostile[3], "3"},
	})
	if err := cw.Error(); err != nil {
		t.Fatal(err)
	}
	rejects := filepath.Join(dir, "rejects.csv")
	r := cli(t, db, "import", "--rejects", rejects, writeFile(t, dir, "hostile.csv", []byte(sheet.String())))
	if r.code != 3 || !strings.Contains(r.stdout, "added 1") || !strings.Contains(r.stdout, "rejected 3") {
		t.Fatalf("import:\n%s", r)
	}
	rej := readCSVFile(t, rejects)
	find := cli(t, db, "find", "--format", "csv", "--where", "vrrm = 40 V", "--where", "ifav = 3 A")
	if find.code != 0 {
		t.Fatalf("find:\n%s", find)
	}
	cr := csv.NewReader(strings.NewReader(find.stdout))
	found, err := cr.ReadAll()
	if err != nil {
		t.Fatalf("find --format csv: %v\n%s", err, find.stdout)
	}
	for name, recs := range map[string][][]string{"rejects CSV": rej, "find --format csv": found} {
		seen := map[string]bool{}
		for _, rec := range recs {
			for _, cell := range rec {
				if risky(cell) {
					t.Errorf("%s: cell %q would be evaluated as a formula", name, cell)
				}
				seen[cell] = true
			}
		}
		want := []string{hostile[0], hostile[1], hostile[3]} // the refused raw cells
		if name == "find --format csv" {
			want = hostile[:4] // mfr, mpn, desc, package (the supplier is not a column)
		}
		for _, h := range want {
			if !seen["'"+h] {
				t.Errorf("%s: %q not written as the neutralised text '%s:\n%q", name, h, h, recs)
			}
		}
	}
}
