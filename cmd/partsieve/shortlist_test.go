package main

import (
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/xuri/excelize/v2"

	"partsieve/query/shortlist"
)

const hostileMfr = `=HYPERLINK("http://attacker.invalid/","click")`

// TestShortlistFiles writes a shortlist for each example spec and one for
// a part list with hostile text, reads them back with excelize, then
// converts every workbook in one LibreOffice run and checks every sheet
// LibreOffice exports: its numbers are numbers, its text is the literal
// text (a hostile cell is never computed).
func TestShortlistFiles(t *testing.T) {
	db := newDB(t)
	dir := t.TempDir()
	if _, errs, code := runCLI(t, db, "import", filepath.Join("testdata", "shortlist-hostile.csv")); code != 0 {
		t.Fatalf("import hostile parts: code %d: %s", code, errs)
	}
	var books []string
	for _, name := range exampleSpecNames() {
		out := filepath.Join(dir, name+".xlsx")
		stdout, errs, code := runCLI(t, db, "shortlist", name, "--out", out, "--top", "2", "--spares", "5")
		if code != 0 {
			t.Fatalf("shortlist %s: code %d: %s", name, code, errs)
		}
		for _, want := range []string{"Wrote " + out, "design(s)", "total over the designs listed:", "short of stock", "Caution:", "hundreds of amps", "datasheet", "licensed practice"} {
			if !strings.Contains(stdout, want) {
				t.Errorf("shortlist %s output lacks %q:\n%s", name, want, stdout)
			}
		}
		checkBook(t, out, stdout)
		books = append(books, out)
	}
	hostile := filepath.Join(dir, "hostile.xlsx")
	if _, errs, code := runCLI(t, db, "shortlist", "sensor-24v-industrial", "--parts", "+1-2,@SUM(A1),QPS30-40C", "--out", hostile); code != 0 {
		t.Fatalf("shortlist --parts: code %d: %s", code, errs)
	}
	books = append(books, hostile)
	hostileCSV := filepath.Join(dir, "hostile.csv")
	if _, errs, code := runCLI(t, db, "shortlist", "sensor-24v-industrial", "--parts", "+1-2,@SUM(A1),QPS30-40C", "--out", hostileCSV); code != 0 {
		t.Fatalf("shortlist --parts csv: code %d: %s", code, errs)
	}
	checkHostileCSV(t, hostileCSV)
	if fi, err := os.Stat(hostile); err != nil || fi.Mode().Perm() != 0o644 {
		t.Errorf("new workbook mode %v, %v; want 0644", fi.Mode(), err)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("temporary file %s left behind", e.Name())
		}
	}

	t.Run("LibreOffice", func(t *testing.T) {
		exported := libreOfficeCSV(t, books)
		for _, book := range books {
			base := strings.TrimSuffix(filepath.Base(book), ".xlsx")
			f, err := excelize.OpenFile(book)
			if err != nil {
				t.Fatal(err)
			}
			for _, sheet := range shortlist.SheetNames {
				path := filepath.Join(exported, base+"-"+sheet+".csv")
				compareExport(t, f, sheet, path)
			}
			f.Close()
		}
		// the hostile cells are shown as the literal text
		data, err := os.ReadFile(filepath.Join(exported, "hostile-Shortlist.csv"))
		if err != nil {
			t.Fatal(err)
		}
		for _, want := range []string{csvQuote(hostileMfr), csvQuote("+1-2"), csvQuote("@SUM(A1)"), csvQuote("=1+1"),
			csvQuote("@Evil Supply"), csvQuote("-2+3"), csvQuote("=SUM(1,2)"), csvQuote("-SMC"), csvQuote("+Plus Parts")} {
			if !strings.Contains(string(data), want) {
				t.Errorf("LibreOffice export lacks the literal %s:\n%s", want, data)
			}
		}
	})
}

func csvQuote(s string) string { return `"` + strings.ReplaceAll(s, `"`, `""`) + `"` }

// checkBook reads a written workbook with excelize: the sheets, numbers
// stored as numbers, the total row against the command's summary.
func checkBook(t *testing.T, path, stdout string) {
	t.Helper()
	f, err := excelize.OpenFile(path)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	defer f.Close()
	if got := strings.Join(f.GetSheetList(), ","); got != strings.Join(shortlist.SheetNames, ",") {
		t.Errorf("%s: sheets %s", path, got)
	}
	rows, err := f.GetRows("Shortlist", excelize.Options{RawCellValue: true})
	if err != nil {
		t.Fatal(err)
	}
	head := rows[0]
	col := map[string]int{}
	for j, h := range head {
		col[h] = j
	}
	last := rows[len(rows)-1]
	if last[col["Line"]] != "total" {
		t.Fatalf("%s: last row %v, want the total", path, last)
	}
	// the summary's total is the workbook's, to the cent
	ext := head[col["Line"]]
	for h := range col {
		if strings.HasPrefix(h, "Extended cost") {
			ext = h
		}
	}
	total, err := strconv.ParseFloat(last[col[ext]], 64)
	if err != nil {
		t.Fatalf("%s: total %q", path, last[col[ext]])
	}
	if want := fmt.Sprintf("total over the designs listed: %.2f ", total); !strings.Contains(stdout, want) {
		t.Errorf("%s: summary lacks %q:\n%s", path, want, stdout)
	}
	// every numeric column of a part line is a number cell
	sum := 0.0
	for i, r := range rows[1:] {
		if r[col["Line"]] != shortlist.KindPart {
			continue
		}
		for _, h := range []string{"Needed", "With spares", "Order qty", "Stage loss (W)", "Stage drop (V)", "Smallest margin", ext} {
			ref, _ := excelize.CoordinatesToCellName(col[h]+1, i+2)
			ct, _ := f.GetCellType("Shortlist", ref)
			if _, err := strconv.ParseFloat(r[col[h]], 64); err != nil || ct != excelize.CellTypeUnset && ct != excelize.CellTypeNumber {
				t.Errorf("%s!%s (%s) = %q, type %v: want a number", path, ref, h, r[col[h]], ct)
			}
		}
		needed, _ := strconv.Atoi(r[col["Needed"]])
		spares, _ := strconv.Atoi(r[col["With spares"]])
		if spares != int(math.Ceil(float64(needed)*1.05-1e-9)) {
			t.Errorf("%s row %d: %d needed, %d with 5 %% spares", path, i+2, needed, spares)
		}
		if v, err := strconv.ParseFloat(r[col[ext]], 64); err == nil {
			sum += v
		}
	}
	if math.Abs(sum-total) > 1e-6*math.Max(1, total) {
		t.Errorf("%s: part lines sum to %g, total row says %g", path, sum, total)
	}
}

func checkHostileCSV(t *testing.T, path string) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for _, r := range recs {
		for _, v := range r {
			seen[v] = true
		}
	}
	for _, h := range []string{hostileMfr, "+1-2", "@SUM(A1)", "=1+1", "@Evil Supply", "-2+3", "=SUM(1,2)", "-SMC", "+Plus Parts"} {
		if seen[h] || !seen["'"+h] {
			t.Errorf("CSV: %q is not neutralised with an apostrophe", h)
		}
	}
}

var loVersion = regexp.MustCompile(`LibreOffice (\d+)\.(\d+)`)

// libreOfficeCSV converts the workbooks to CSV with LibreOffice in one run,
// every sheet to its own file (FILE-SHEET.csv, LibreOffice 7.2 and later),
// and returns the directory. Text cells are quoted, numbers are not
// (filter option 7), and values are exported as stored, not as shown
// (option 9), except that LibreOffice keeps the % of percent formats.
func libreOfficeCSV(t *testing.T, books []string) string {
	t.Helper()
	bin, err := exec.LookPath("soffice")
	if err != nil {
		t.Skip("soffice (LibreOffice) is not installed")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	ver, err := exec.CommandContext(ctx, bin, "--version").Output()
	if err != nil {
		t.Fatalf("soffice --version: %v", err)
	}
	m := loVersion.FindStringSubmatch(string(ver))
	if m == nil {
		t.Fatalf("soffice --version: %q", ver)
	}
	major, _ := strconv.Atoi(m[1])
	minor, _ := strconv.Atoi(m[2])
	if major < 7 || major == 7 && minor < 2 {
		t.Fatalf("%s: exporting every sheet to CSV needs LibreOffice 7.2 or later", strings.TrimSpace(string(ver)))
	}
	out := t.TempDir()
	profile := t.TempDir()
	// separator ',', quote '"', UTF-8, from line 1, quote all text cells,
	// detect special numbers, values as stored, no formulas, keep spaces,
	// every sheet (-1)
	filter := "csv:Text - txt - csv (StarCalc):44,34,76,1,,0,true,true,false,false,false,-1"
	args := append([]string{"-env:UserInstallation=file://" + filepath.ToSlash(profile), "--headless", "--norestore",
		"--convert-to", filter, "--outdir", out}, books...)
	cmd := exec.CommandContext(ctx, bin, args...)
	if b, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("soffice: %v\n%s", err, b)
	}
	return out
}

// field is one CSV field with whether it was quoted.
type field struct {
	v      string
	quoted bool
}

// readQuoted splits RFC 4180 text into records, keeping whether each
// field was quoted (encoding/csv drops that, and it tells LibreOffice's
// text cells from its numbers here).
func readQuoted(data string) ([][]field, error) {
	var recs [][]field
	var rec []field
	i := 0
	for i < len(data) {
		var f field
		if data[i] == '"' {
			f.quoted = true
			i++
			var b strings.Builder
			for {
				if i >= len(data) {
					return nil, fmt.Errorf("unterminated quote")
				}
				if data[i] == '"' {
					if i+1 < len(data) && data[i+1] == '"' {
						b.WriteByte('"')
						i += 2
						continue
					}
					i++
					break
				}
				b.WriteByte(data[i])
				i++
			}
			f.v = b.String()
		} else {
			j := i
			for j < len(data) && data[j] != ',' && data[j] != '\n' && data[j] != '\r' {
				j++
			}
			f.v, i = data[i:j], j
		}
		rec = append(rec, f)
		if i >= len(data) {
			recs = append(recs, rec)
			break
		}
		switch data[i] {
		case ',':
			i++
		case '\r', '\n':
			if data[i] == '\r' && i+1 < len(data) && data[i+1] == '\n' {
				i++
			}
			i++
			recs = append(recs, rec)
			rec = nil
		default:
			return nil, fmt.Errorf("text after a quoted field at byte %d", i)
		}
	}
	return recs, nil
}

// compareExport checks LibreOffice's export of one sheet against the
// workbook read with excelize: same rows; a number cell is an unquoted
// number of the same value; a text cell is quoted and literally equal; a
// boolean is TRUE/FALSE.
func compareExport(t *testing.T, f *excelize.File, sheet, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Errorf("LibreOffice did not export sheet %s: %v", sheet, err)
		return
	}
	recs, err := readQuoted(string(data))
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	rows, err := f.GetRows(sheet, excelize.Options{RawCellValue: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(rows) {
		t.Fatalf("%s: %d records, the workbook has %d rows", path, len(recs), len(rows))
	}
	numbers := 0
	for i, r := range rows {
		for j, want := range r {
			ref, _ := excelize.CoordinatesToCellName(j+1, i+1)
			var got field
			if j < len(recs[i]) {
				got = recs[i][j]
			}
			ct, _ := f.GetCellType(sheet, ref)
			switch {
			case want == "":
				if got.v != "" {
					t.Errorf("%s %s = %q, want empty", path, ref, got.v)
				}
			case ct == excelize.CellTypeBool:
				if got.quoted || got.v != map[string]string{"1": "TRUE", "0": "FALSE"}[want] {
					t.Errorf("%s %s = %+v, want the boolean %s", path, ref, got, want)
				}
			case ct == excelize.CellTypeUnset || ct == excelize.CellTypeNumber:
				numbers++
				w, _ := strconv.ParseFloat(want, 64)
				v, tol := got.v, 1e-9*math.Max(1, math.Abs(w))
				if p, ok := strings.CutSuffix(v, "%"); ok { // LibreOffice keeps percent formats
					v, tol = p, 5e-4
					if x, err := strconv.ParseFloat(p, 64); err == nil {
						v = strconv.FormatFloat(x/100, 'g', -1, 64)
					}
				}
				g, err := strconv.ParseFloat(v, 64)
				if got.quoted || err != nil || math.Abs(g-w) > tol {
					t.Errorf("%s %s = %+v, want the number %s", path, ref, got, want)
				}
			default:
				if !got.quoted || got.v != want {
					t.Errorf("%s %s = %+v, want the text %q", path, ref, got, want)
				}
			}
		}
	}
	if numbers == 0 {
		t.Errorf("%s: no number cells", path)
	}
}

func TestShortlistErrors(t *testing.T) {
	db := newDB(t)
	dir := t.TempDir()
	out := filepath.Join(dir, "x.xlsx")
	for _, c := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"shortlist", "vehicle-12v-accessory"}, exitUsage, "--out FILE is required"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", filepath.Join(dir, "x.txt")}, exitUsage, "file type is unknown"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", out, "--parts", "QPS30-40C", "--top", "2"}, exitUsage, "--top does not apply with --parts"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", out, "--spares", "-1"}, exitUsage, "--spares -1"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", out, "--top", "0"}, exitUsage, "--top 0"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", out, "--alternates", "-2"}, exitUsage, "--alternates -2"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", out, "--rank", "price"}, exitUsage, "unknown ranking"},
		{[]string{"shortlist", "vehicle-12v-accessory", "--out", out, "--format", "json"}, exitUsage, "not offered"},
		{[]string{"shortlist", "no-such-spec", "--out", out}, exitError, "no such file"},
		{[]string{"shortlist", "handheld-2s-liion", "--out", out, "--topology", "pfet-high,nfet-low"}, exitNoMatch, "no design qualifies"},
		{[]string{"shortlist", "sensor-24v-industrial", "--out", out, "--parts", "QPS30-40C,NO-SUCH-9"}, exitNoMatch, "NO-SUCH-9"},
	} {
		_, errs, code := runCLI(t, db, c.args...)
		if code != c.code || !strings.Contains(errs, c.msg) {
			t.Errorf("%v: code %d, stderr %q; want %d and %q", c.args, code, errs, c.code, c.msg)
		}
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("a failed shortlist wrote its file")
	}
	// --out must not be a directory or a symbolic link
	sub := filepath.Join(dir, "d.xlsx")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	if _, errs, code := runCLI(t, db, "shortlist", "vehicle-12v-accessory", "--out", sub); code != exitError || !strings.Contains(errs, "is a directory") {
		t.Errorf("--out directory: code %d: %s", code, errs)
	}
	target := filepath.Join(dir, "target.csv")
	if err := os.WriteFile(target, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.csv")
	if err := os.Symlink(target, link); err == nil {
		if _, errs, code := runCLI(t, db, "shortlist", "vehicle-12v-accessory", "--out", link); code != exitError || !strings.Contains(errs, "symbolic link") {
			t.Errorf("--out symlink: code %d: %s", code, errs)
		}
		if b, _ := os.ReadFile(target); string(b) != "keep" {
			t.Error("the symlink's target was overwritten")
		}
	}
	// a CSV by extension, in any case; an existing file is replaced
	csvOut := filepath.Join(dir, "Order.CSV")
	if err := os.WriteFile(csvOut, []byte("old"), 0o640); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(csvOut, 0o640); err != nil {
		t.Fatal(err)
	}
	if _, errs, code := runCLI(t, db, "shortlist", "vehicle-12v-accessory", "--out", csvOut, "--alternates", "0"); code != 0 {
		t.Fatalf("csv: code %d: %s", code, errs)
	}
	if fi, err := os.Stat(csvOut); err != nil || fi.Mode().Perm() != 0o640 {
		t.Errorf("replaced file: %v, %v; want its mode 0640 kept", fi.Mode(), err)
	}
	data, _ := os.ReadFile(csvOut)
	if !strings.HasPrefix(string(data), "Design,Topology,Line,") || strings.Contains(string(data), ",alternate,") {
		t.Errorf("csv without alternates:\n%s", data)
	}
}
