// Package importers reads supplier spreadsheets (CSV, TSV, XLSX), recognises
// their headers, units and part kinds, validates each row and writes the
// parts into the catalog in one transaction per file.
//
// The header row need not be the first: the first 30 non-empty rows are
// scored by how many cells name a field (see RecognizeHeader and
// HeaderWords), and the best row naming the part number and at least one
// more field is taken; a group header above sub-headers ("V_F" over "max"
// and "@ I_F") is joined with them. Titles above the header, blank rows,
// notes with a single cell, repeated header rows and footers ("Total",
// "Prices subject to change", anything after a blank gap that does not
// look like a part) are skipped and never counted.
//
// Each data row becomes one catalog.Part or one Reject naming the sheet row,
// the column as written in the sheet, the raw cell and the reason; a bad
// row is refused whole and the rest of the file is imported. A file that
// cannot be read to its end leaves the catalog as it was.
package importers

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"partsieve/internal/sheetsafe"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	"partsieve/catalog"
)

// Options control one import.
type Options struct {
	Kind     catalog.Kind // "" = decided per row (category column, type words)
	MapFile  string       // TOML mapping file, "" = recognise headers alone
	Sheet    string       // XLSX sheet name, "" = every sheet with a header row
	Source   string       // source label, "" = file base name
	Supplier string       // supplier when the sheet has no supplier column
	DryRun   bool         // run everything, then roll back
	Progress io.Writer    // progress bar target (a terminal), nil = none
}

// Reject is one refused row: the sheet row number (1-based, as the
// spreadsheet program shows it), the column header, the raw cell text and
// the reason.
type Reject struct {
	File   string `json:"file"`
	Sheet  string `json:"sheet,omitempty"`
	Row    int    `json:"row"`
	Column string `json:"column"`
	Raw    string `json:"raw"`
	Reason string `json:"reason"`
}

// Summary reports one imported file. Read counts data rows (not titles,
// headers, blank rows, notes or footers); Read = Added + Updated +
// Unchanged + Rejected.
type Summary struct {
	File      string           `json:"file"`
	Read      int              `json:"read"`
	Added     int              `json:"added"`
	Updated   int              `json:"updated"`
	Unchanged int              `json:"unchanged"`
	Rejected  int              `json:"rejected"`
	Unknown   []string         `json:"unknown_columns"`
	Rejects   []Reject         `json:"rejects"`
	Changes   []catalog.Change `json:"changes,omitempty"`
	DryRun    bool             `json:"dry_run,omitempty"`
	// Sheets lists the sheets imported; Skipped the sheets without a
	// header row ("" is the only sheet of a CSV file).
	Sheets  []string `json:"sheets,omitempty"`
	Skipped []string `json:"skipped_sheets,omitempty"`
	// Ignored lists recognised columns that were not used, with the reason
	// (a typical value beside a maximum, a unit of the wrong dimension, a
	// field that does not apply to the rows' kind).
	Ignored []string `json:"ignored_columns,omitempty"`
}

// sink receives the parts of one import: the store's transaction, or a
// check-only stand-in when there is no store.
type sink interface {
	Put(p *catalog.Part) (catalog.Outcome, []catalog.Change, error)
	Commit(counts catalog.Source) error
	Rollback() error
}

// preparedSink is a sink that takes parts the catalog's Preparer checked
// on the reading goroutine (the store's transaction).
type preparedSink interface {
	sink
	PutPrepared(pp *catalog.Prepared) (catalog.Outcome, []catalog.Change, error)
}

// ImportFile imports the spreadsheet at path into st. A file that cannot be
// read at all returns an error naming the file and the reason, and the
// catalog is left exactly as it was. st may be nil: the file is then read
// and checked as if imported into an empty catalog, and nothing is
// written.
func ImportFile(ctx context.Context, st *catalog.Store, path string, opt Options) (*Summary, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, unwrapPath(err))
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, unwrapPath(err))
	}
	if fi.IsDir() {
		return nil, fmt.Errorf("%s: is a directory, not a spreadsheet", path)
	}
	// The file's SHA-256 is computed while it is imported (it is needed
	// only by the commit): a read of the whole file less before the first
	// row.
	type result struct {
		sum string
		err error
	}
	done := make(chan result, 1)
	go func() {
		h := sha256.New()
		_, err := io.Copy(h, io.NewSectionReader(f, 0, fi.Size()))
		done <- result{hex.EncodeToString(h.Sum(nil)), err}
	}()
	var res *result
	hash := func() (string, error) {
		if res == nil {
			r := <-done
			res = &r
		}
		if res.err != nil {
			return "", fmt.Errorf("%s: %w", path, unwrapPath(res.err))
		}
		return res.sum, nil
	}
	defer hash() // the file stays open until the hash is done
	return importAt(ctx, st, path, f, fi.Size(), hash, opt)
}

// ImportData imports a spreadsheet held in memory; name gives the format
// (by extension) and appears in messages. st may be nil as in ImportFile.
func ImportData(ctx context.Context, st *catalog.Store, name string, data []byte, opt Options) (*Summary, error) {
	sum := sha256.Sum256(data)
	hash := func() (string, error) { return hex.EncodeToString(sum[:]), nil }
	return importAt(ctx, st, name, bytes.NewReader(data), int64(len(data)), hash, opt)
}

func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// run is one import in progress.
type run struct {
	ctx   context.Context
	name  string
	opt   Options
	m     *Mapping
	label string
	sum   *Summary
	out   sink
	prog  *progress
	cr    *countingReaderAt
	size  int64
	rows  int // rows read, for progress
	multi bool
	begin func() (sink, error)
}

// importAt imports the spreadsheet r of the given size; hash returns its
// SHA-256 in hex (it may wait for it).
func importAt(ctx context.Context, st *catalog.Store, name string, r io.ReaderAt, size int64, hash func() (string, error), opt Options) (*Summary, error) {
	if opt.Kind != "" && !validKind(opt.Kind) {
		return nil, fmt.Errorf("kind %q is not diode, fuse or mosfet", opt.Kind)
	}
	var m *Mapping
	if opt.MapFile != "" {
		var err error
		if m, err = LoadMapping(opt.MapFile); err != nil {
			return nil, err
		}
	}
	label := opt.Source
	if label == "" {
		label = filepath.Base(name)
	}
	cr := &countingReaderAt{r: r}
	book, err := openBook(name, cr, size)
	if err != nil {
		return nil, nameErr(name, err)
	}
	defer book.Close()

	rn := &run{ctx: ctx, name: name, opt: opt, m: m, label: label, cr: cr, size: size,
		sum:  &Summary{File: name, Unknown: []string{}, Rejects: []Reject{}, DryRun: opt.DryRun || st == nil},
		prog: newProgress(opt.Progress, size)}
	defer rn.prog.done()
	src := catalog.Source{Label: label, File: name, Time: time.Now().UTC()}
	rn.begin = func() (sink, error) {
		if st == nil {
			return &checkSink{seen: map[string]string{}}, nil
		}
		return st.BeginImport(ctx, src)
	}

	sheets := book.Sheets()
	rn.multi = len(sheets) > 1
	want := opt.Sheet
	if want == "" && m != nil {
		want = m.Sheet
	}
	if want != "" {
		found := false
		for _, s := range sheets {
			if s == want {
				found = true
			}
		}
		if !found {
			if len(sheets) == 1 && sheets[0] == "" {
				return nil, fmt.Errorf("%s: sheet %q asked for, but a %s file has no sheets", name, want, book.Format())
			}
			return nil, fmt.Errorf("%s: no sheet %q (sheets: %s)", name, want, quoteList(sheets))
		}
		sheets = []string{want}
	}

	fail := func(err error) (*Summary, error) {
		if rn.out != nil {
			_ = rn.out.Rollback()
		}
		return nil, err
	}
	for _, sh := range sheets {
		if err := ctx.Err(); err != nil {
			return fail(fmt.Errorf("%s: import stopped: %w", name, err))
		}
		tbl, err := book.Table(sh)
		if err != nil {
			return fail(nameErr(name, err))
		}
		ok, err := rn.sheet(sh, tbl)
		tbl.Close()
		if err != nil {
			return fail(err)
		}
		if ok {
			rn.sum.Sheets = append(rn.sum.Sheets, sh)
		} else {
			rn.sum.Skipped = append(rn.sum.Skipped, sh)
		}
	}
	if len(rn.sum.Sheets) == 0 {
		where := ""
		if rn.multi || want != "" {
			where = " in sheets " + quoteList(sheets)
		}
		return fail(fmt.Errorf("%s: no header row found%s: a header needs a part number column and at least one more recognised column (see `partsieve fields`, or give a mapping file with --map)", name, where))
	}
	s := rn.sum
	s.Rejected = len(s.Rejects)
	counts := src
	counts.Read, counts.Added, counts.Updated, counts.Unchanged, counts.Rejected = s.Read, s.Added, s.Updated, s.Unchanged, s.Rejected
	if s.DryRun {
		if err := rn.out.Rollback(); err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
		return s, nil
	}
	sum, err := hash()
	if err != nil {
		return fail(err)
	}
	counts.SHA256 = sum
	if err := rn.out.Commit(counts); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return s, nil
}

// nameErr makes sure an error names the file.
func nameErr(name string, err error) error {
	if strings.Contains(err.Error(), name) {
		return err
	}
	return fmt.Errorf("%s: %w", name, err)
}

func quoteList(ss []string) string {
	q := make([]string, len(ss))
	for i, s := range ss {
		q[i] = fmt.Sprintf("%q", s)
	}
	return strings.Join(q, ", ")
}

// bufRow is a row read ahead while looking for the header.
type bufRow struct {
	cells []string
	row   int
}

// headerScan is how many non-empty rows are searched for the header.
const headerScan = 30

// sheet imports one sheet; ok is false when it has no header row.
func (rn *run) sheet(name string, tbl Table) (ok bool, err error) {
	rec := rn.m.recognizer()
	var buf []bufRow
	lastRow := 0
	next := func() ([]string, int, error) {
		cells, row, err := tbl.Next()
		if err == nil {
			rn.rows++
			lastRow = row
		}
		return cells, row, err
	}
	readErr := func(err error) error {
		if !strings.Contains(err.Error(), rn.name) {
			where := rn.name
			if name != "" {
				where += fmt.Sprintf(", sheet %q", name)
			}
			err = fmt.Errorf("%s: %w", where, err)
		}
		if lastRow == 0 {
			return fmt.Errorf("%w; nothing was written", err)
		}
		return fmt.Errorf("%w; the import stopped after row %d and nothing was written", err, lastRow)
	}

	// read ahead to the header
	noHeader := rn.m != nil && rn.m.HasRow && rn.m.HeaderRow == 0
	fixedRow := 0
	if rn.m != nil && rn.m.HasRow {
		fixedRow = rn.m.HeaderRow
	}
	for !noHeader {
		if fixedRow == 0 && len(buf) >= headerScan {
			break
		}
		cells, row, err := next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return false, readErr(err)
		}
		if blank(cells) {
			continue
		}
		buf = append(buf, bufRow{cells, row})
		if fixedRow > 0 && row >= fixedRow {
			break
		}
	}

	var lo *layout
	start := 0 // index in buf of the first data row
	switch {
	case noHeader:
		width := 0
		for k := range rn.m.columns {
			if i, ok := letterIndex(k); ok && i+1 > width {
				width = i + 1
			}
		}
		headers := make([]string, width)
		for i := range headers {
			headers[i] = columnLetter(i)
		}
		lo = buildLayout(headers, rec)
	case fixedRow > 0:
		idx := -1
		for i, b := range buf {
			if b.row == fixedRow {
				idx = i
			}
		}
		if idx < 0 {
			return false, nil
		}
		lo = buildLayout(buf[idx].cells, rec)
		start = idx + 1
	default:
		headers, used, found := findHeader(buf, rec)
		if !found {
			return false, nil
		}
		lo = buildLayout(headers, rec)
		start = used
	}
	if !lo.hasMPN {
		return false, nil
	}
	if rn.out == nil {
		out, err := rn.begin()
		if err != nil {
			return false, fmt.Errorf("%s: %w", rn.name, err)
		}
		rn.out = out
	}
	rn.noteColumns(name, lo)

	cv := rn.converter(lo)
	var headerCells []string
	if !noHeader && start > 0 {
		headerCells = buf[start-1].cells
	}
	prevRow := 0
	if start > 0 {
		prevRow = buf[start-1].row
	}
	// Reading, recognising and converting the rows (and the catalog's own
	// checks of each part) run on a goroutine of their own, ahead of the
	// writes on this one; batches of rows pass through a bounded channel
	// and come back for reuse, so memory stays flat whatever the file's
	// size. Rows, rejects and counts keep the sheet's order.
	if r, ok := tbl.(rowReuser); ok {
		// from here on, each row is done with before the next is read
		r.reuseRows()
	}
	ps, prepared := rn.out.(preparedSink)
	pipe := newRowPipe()
	go func() {
		defer pipe.close()
		var pr *catalog.Preparer
		var scratch catalog.Part
		if prepared {
			pr = &catalog.Preparer{}
		}
		gap := false
		handle := func(cells []string, row int) bool {
			if row > prevRow+1 && prevRow > 0 {
				gap = true
			}
			prevRow = row
			if blank(cells) {
				gap = true
				return true
			}
			switch classify(cells, lo, headerCells, gap) {
			case rowNote:
				if g := wordsGuess(onlyCell(cells), ""); g.kind != "" {
					cv.section = g
				}
				return true
			case rowSkip:
				return true
			}
			gap = false
			it := pipe.item()
			if it == nil {
				return false // the writer stopped
			}
			it.row = row
			if pr != nil {
				// the writer takes the prepared form only: one part
				// serves every row (see rowItem.part)
				p, rej := cv.convertInto(cells, &scratch)
				if rej != nil {
					it.rej = rej
					return true
				}
				it.perr = pr.Prepare(p, &it.prep)
				return true
			}
			p, rej := cv.convertInto(cells, &it.buf)
			if rej != nil {
				it.rej = rej
				return true
			}
			it.part = p
			return true
		}
		for _, b := range buf[start:] {
			if !handle(b.cells, b.row) {
				return
			}
		}
		if fixedRow > 0 && len(buf) > 0 && buf[len(buf)-1].row < fixedRow {
			return
		}
		for {
			cells, row, err := next()
			if err == io.EOF {
				return
			}
			if err != nil {
				pipe.fail(readErr(err))
				return
			}
			if !handle(cells, row) {
				return
			}
			if rn.rows%256 == 0 {
				if err := rn.ctx.Err(); err != nil {
					pipe.fail(fmt.Errorf("%s: import stopped: %w", rn.name, err))
					return
				}
				rn.progress(tbl)
			}
		}
	}()
	err = pipe.drain(func(it *rowItem) error {
		if prepared && it.rej == nil && it.perr == nil {
			return rn.dataRow(name, it, func() (catalog.Outcome, []catalog.Change, error) { return ps.PutPrepared(&it.prep) })
		}
		return rn.dataRow(name, it, func() (catalog.Outcome, []catalog.Change, error) { return rn.out.Put(it.part) })
	})
	if err != nil {
		return false, err
	}
	rn.sum.Ignored = append(rn.sum.Ignored, rn.prefix(name, cv.notApplicableNotes())...)
	return true, nil
}

// rowReuser is a Table that can hand out each row in a buffer it reuses
// for the next (textTable.reuseRows).
type rowReuser interface{ reuseRows() }

func (rn *run) prefix(sheet string, items []string) []string {
	if !rn.multi {
		return items
	}
	out := make([]string, len(items))
	for i, s := range items {
		out[i] = sheet + ": " + s
	}
	return out
}

func (rn *run) noteColumns(sheet string, lo *layout) {
	rn.sum.Unknown = append(rn.sum.Unknown, rn.prefix(sheet, lo.unknown)...)
	rn.sum.Ignored = append(rn.sum.Ignored, rn.prefix(sheet, lo.ignored)...)
}

func (rn *run) progress(tbl Table) {
	if rn.prog == nil {
		return
	}
	frac := -1.0
	if t, ok := tbl.(RowTotaler); ok && t.TotalRows() > 0 {
		frac = float64(rn.rows) / float64(t.TotalRows())
	} else if h := rn.cr.high.Load(); h > 0 && h < rn.size {
		frac = float64(h) / float64(rn.size)
	}
	rn.prog.update(frac, rn.rows)
}

// converter sets up the row converter of a sheet from the options and the
// mapping file.
func (rn *run) converter(lo *layout) *converter {
	cv := &converter{lo: lo, fixed: rn.opt.Kind, supplier: rn.opt.Supplier}
	if m := rn.m; m != nil {
		if cv.fixed == "" {
			cv.fixed = m.Kind
		}
		cv.fixedType, cv.currency, cv.fuseStd, cv.consts = m.Type, m.Currency, m.FuseStd, m.consts
		if cv.supplier == "" {
			cv.supplier = m.Supplier
		}
	}
	if cv.fixedType != "" && cv.fixed != "" && !validType(cv.fixed, cv.fixedType) {
		cv.fixedType = ""
	}
	if cv.supplier == "" {
		cv.supplier = rn.label
	}
	return cv
}

// dataRow counts and stores one converted data row; put writes its part.
func (rn *run) dataRow(sheet string, it *rowItem, put func() (catalog.Outcome, []catalog.Change, error)) error {
	s := rn.sum
	s.Read++
	row := it.row
	if rej := it.rej; rej != nil {
		s.Rejects = append(s.Rejects, Reject{File: rn.name, Sheet: sheet, Row: row, Column: rej.column, Raw: rej.raw, Reason: rej.reason})
		return nil
	}
	err := it.perr
	var out catalog.Outcome
	var changes []catalog.Change
	if err == nil {
		out, changes, err = put()
	}
	if err != nil {
		// The store refuses an invalid part before writing anything: a
		// reject. Any other failure ends the import.
		if errors.Is(err, catalog.ErrInvalidPart) {
			s.Rejects = append(s.Rejects, Reject{File: rn.name, Sheet: sheet, Row: row, Column: "", Raw: "",
				Reason: "the catalog refused the part: " + err.Error()})
			return nil
		}
		where := rn.name
		if sheet != "" {
			where += fmt.Sprintf(", sheet %q", sheet)
		}
		return fmt.Errorf("%s, row %d: %w", where, row, err)
	}
	switch out {
	case catalog.Added:
		s.Added++
	case catalog.Updated:
		s.Updated++
		s.Changes = append(s.Changes, changes...)
	default:
		s.Unchanged++
	}
	return nil
}

func blank(cells []string) bool {
	for _, c := range cells {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

func onlyCell(cells []string) string {
	for _, c := range cells {
		if t := strings.TrimSpace(c); t != "" {
			return t
		}
	}
	return ""
}

// row classes below the header
const (
	rowData = iota
	rowNote // a note or section title: one non-empty cell of prose
	rowSkip // a footer, or the header repeated
)

// footerWords start rows that are never parts.
var footerWords = []string{"total", "sum", "subtotal", "grand total", "prices subject", "price subject",
	"note", "notes", "remark", "remarks", "disclaimer", "page ", "source:", "e&oe", "e & oe", "all prices",
	"prices are", "prices in", "valid until", "generated", "printed", "copyright", "©", "(c)", "* ", "footnote"}

// classify tells a data row from notes and footers: a row with one
// non-empty cell (or one text repeated, a merged title) is a note unless that cell is a part number in the part
// number column; a row starting with "Total", "Note", "Prices subject
// to change"... is a footer; after a blank gap a row that does not look
// like a part (a part number and one more recognised cell) is a footer;
// the header row repeated is skipped.
func classify(cells []string, lo *layout, header []string, afterGap bool) int {
	n, firstIdx, same := 0, -1, true
	for i, c := range cells {
		if t := strings.TrimSpace(c); t != "" {
			n++
			if firstIdx < 0 {
				firstIdx = i
			} else if t != strings.TrimSpace(cells[firstIdx]) {
				same = false
			}
		}
	}
	if n > 1 && same && !looksLikePartNumber(cells[firstIdx]) {
		// a title merged across the row, its text copied into every cell
		return rowNote
	}
	first := strings.ToLower(strings.TrimSpace(cells[firstIdx]))
	mpnCols := lo.byField["mpn"]
	inMPN := false
	for _, i := range mpnCols {
		if i == firstIdx {
			inMPN = true
		}
	}
	if n == 1 && !(inMPN && looksLikePartNumber(cells[firstIdx])) {
		return rowNote
	}
	for _, w := range footerWords {
		if strings.HasPrefix(first, w) && !(inMPN && looksLikePartNumber(cells[firstIdx]) && !strings.Contains(first, " ")) {
			return rowSkip
		}
	}
	if header != nil && sameRow(cells, header) {
		return rowSkip
	}
	if afterGap {
		r := row{cells: cells, lo: lo}
		mpn, _ := r.first("mpn")
		if mpn == "" {
			return rowSkip
		}
		recognised := 0
		for i, c := range lo.cols {
			if c.Field != "" && i < len(cells) && !isAbsent(cells[i]) {
				recognised++
			}
		}
		if recognised < 3 && !(recognised >= 2 && looksLikePartNumber(mpn)) {
			return rowSkip
		}
	}
	return rowData
}

// looksLikePartNumber: one word with a digit or an upper-case letter, at
// most 40 characters.
func looksLikePartNumber(s string) bool {
	t := strings.TrimSpace(s)
	if t == "" || len(t) > 40 || strings.ContainsAny(t, " \t") {
		return false
	}
	return strings.ContainsAny(t, "0123456789")
}

func sameRow(a, b []string) bool {
	n := max(len(a), len(b))
	for i := 0; i < n; i++ {
		var x, y string
		if i < len(a) {
			x = strings.TrimSpace(a[i])
		}
		if i < len(b) {
			y = strings.TrimSpace(b[i])
		}
		if !strings.EqualFold(x, y) {
			return false
		}
	}
	return true
}

// findHeader picks the header among the rows read ahead: the row (or two
// rows, a group header over sub-headers) naming the most fields, among
// those naming the part number and at least one more field. It returns the
// header cells and the index in buf of the first row after it.
func findHeader(buf []bufRow, rec recognizer) ([]string, int, bool) {
	bestN, bestIdx, bestPair := 0, -1, false
	for i, b := range buf {
		if n, mpn := score(b.cells, rec); mpn && n >= 2 && n > bestN {
			bestN, bestIdx, bestPair = n, i, false
		}
		if i+1 < len(buf) && buf[i+1].row == b.row+1 {
			joined := joinHeaderRows(b.cells, buf[i+1].cells)
			if n, mpn := score(joined, rec); mpn && n >= 2 && n > bestN {
				n1, _ := score(b.cells, rec)
				n2, _ := score(buf[i+1].cells, rec)
				if n > max(n1, n2) {
					bestN, bestIdx, bestPair = n, i, true
				}
			}
		}
	}
	switch {
	case bestIdx < 0:
		return nil, 0, false
	case bestPair:
		return joinHeaderRows(buf[bestIdx].cells, buf[bestIdx+1].cells), bestIdx + 2, true
	}
	return buf[bestIdx].cells, bestIdx + 1, true
}

// joinHeaderRows joins a group header row with the sub-header row below
// it: a group ("V_F" merged over two columns) carries over the columns to
// its right that have a sub-header and no group of their own; "V_F" over
// "max (V)" gives "V_F max (V)", over "@ I_F (A)" gives "V_F I_F (A)" (the
// test-current column of V_F), over "@ 125°C" gives "V_F @ 125°C".
func joinHeaderRows(top, sub []string) []string {
	n := max(len(top), len(sub))
	out := make([]string, n)
	group := ""
	for i := 0; i < n; i++ {
		var t, s string
		if i < len(top) {
			t = strings.TrimSpace(top[i])
		}
		if i < len(sub) {
			s = strings.TrimSpace(sub[i])
		}
		switch {
		case t != "" && s == "":
			out[i], group = t, ""
		case t != "" && strings.EqualFold(t, s):
			out[i], group = t, ""
		case t != "":
			out[i], group = joinGroup(t, s), t
		case s != "" && group != "":
			out[i] = joinGroup(group, s)
		default:
			out[i] = s
		}
	}
	return out
}

func joinGroup(group, sub string) string {
	if strings.HasPrefix(sub, "@") {
		rest := strings.TrimSpace(sub[1:])
		// "@ I_F (A)": no number, the column holds the condition itself
		if main, _ := splitUnitSuffix(rest); !hasDigit(main) {
			return group + " " + rest
		}
	}
	return group + " " + sub
}

// splitUnitSuffix separates a trailing bracketed unit: "I_F (A)" gives
// "I_F" and "(A)".
func splitUnitSuffix(s string) (string, string) {
	if i := strings.LastIndexAny(s, "(["); i > 0 && (strings.HasSuffix(s, ")") || strings.HasSuffix(s, "]")) {
		return strings.TrimSpace(s[:i]), s[i:]
	}
	return s, ""
}

// checkSink stands in for the store when there is none: it counts a part
// as added the first time its (manufacturer, MPN) is seen in the file, as
// unchanged when an identical row repeats it and as updated otherwise.
type checkSink struct {
	seen map[string]string
}

func (c *checkSink) Put(p *catalog.Part) (catalog.Outcome, []catalog.Change, error) {
	key := catalog.NormKey(p.Mfr) + "\x00" + catalog.NormKey(p.MPN)
	fp := fingerprint(p)
	prev, ok := c.seen[key]
	c.seen[key] = fp
	switch {
	case !ok:
		return catalog.Added, nil, nil
	case prev == fp:
		return catalog.Unchanged, nil, nil
	}
	return catalog.Updated, nil, nil
}

// fingerprint writes everything Put would store of p.
func fingerprint(p *catalog.Part) string {
	var b strings.Builder
	for _, s := range []string{string(p.Kind), p.Type, p.Mfr, p.MPN, p.Desc, p.Package, p.Datasheet, p.Lifecycle,
		deref(p.RoHS), deref(p.AECQ), p.FuseStd, p.Rerate} {
		b.WriteString(s)
		b.WriteByte(0)
	}
	names := make([]string, 0, len(p.Num))
	for k := range p.Num {
		names = append(names, k)
	}
	sort.Strings(names)
	for _, k := range names {
		b.WriteString(k)
		b.WriteByte('=')
		b.WriteString(strconv.FormatFloat(p.Num[k], 'g', -1, 64))
		b.WriteByte(0)
	}
	for _, o := range p.Offers {
		fmt.Fprintf(&b, "%s|%s|%s|%d|%s|%v\x00", o.Supplier, o.SKU, deref64(o.Stock), o.MOQ, o.Currency, o.Breaks)
	}
	return b.String()
}

func deref64(n *int64) string {
	if n == nil {
		return "-"
	}
	return strconv.FormatInt(*n, 10)
}

func deref(b *bool) string {
	if b == nil {
		return "-"
	}
	return fmt.Sprint(*b)
}

func (c *checkSink) Commit(catalog.Source) error { return nil }
func (c *checkSink) Rollback() error             { return nil }

// WriteRejectsCSV writes rejects as RFC 4180 CSV with the header
// file,sheet,row,column,raw,reason. Text that a spreadsheet program would
// take for a formula (starting with = + - @, a tab or a carriage return)
// is prefixed with ' so that opening the file runs nothing.
func WriteRejectsCSV(w io.Writer, rejects []Reject) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"file", "sheet", "row", "column", "raw", "reason"}); err != nil {
		return err
	}
	for _, r := range rejects {
		rec := []string{sheetsafe.Text(r.File), sheetsafe.Text(r.Sheet), fmt.Sprint(r.Row), sheetsafe.Text(r.Column), sheetsafe.Text(r.Raw), sheetsafe.Text(r.Reason)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// openBook opens spreadsheets; tests replace it to feed failing readers.
var openBook = OpenBook
