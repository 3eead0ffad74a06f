package importers

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
)

// MaxRecordBytes bounds one CSV record (after decoding to UTF-8). A longer
// record is refused with ErrTooLarge rather than held in memory; it is
// almost always an opening quote that is never closed, which would make the
// rest of the file one field.
var MaxRecordBytes int64 = 16 << 20

// MaxColumns bounds the columns of one CSV record or XLSX row, up to the
// last non-empty cell: 16384 is the most an XLSX worksheet holds (column
// XFD). A wider row is refused with ErrTooLarge naming it.
var MaxColumns = 16384

// sniffRecords is how many records the delimiter sniffer looks at.
const sniffRecords = 50

// delimiters the sniffer chooses among, in order of preference for ties.
var delimiters = []byte{',', ';', '\t', '|'}

// textBook is a delimited text file: a single, unnamed sheet.
type textBook struct {
	name   string
	r      io.ReaderAt
	size   int64
	enc    textEncoding
	bomLen int
	comma  rune
	crOnly bool // old Mac line ends: lone carriage returns end the lines
}

// openText prepares a delimited text file: it detects the encoding from the
// byte order mark or the bytes, refuses binary data and blank files, and
// sniffs the delimiter and the line ends from the first records.
func openText(name string, r io.ReaderAt, size int64, head []byte, tsv bool) (Book, error) {
	complete := int64(len(head)) == size
	enc, bomLen := detectEncoding(head, complete)
	text := decodeHead(enc, head[bomLen:])
	if looksBinary(text) {
		return nil, &FileError{File: name, Kind: ErrNotSpreadsheet,
			Reason: "not a spreadsheet (binary data, not text)"}
	}
	if isMarkup(text) {
		return nil, &FileError{File: name, Kind: ErrNotSpreadsheet,
			Reason: "not a spreadsheet (an HTML or XML document): save it as .xlsx or CSV"}
	}
	b := &textBook{name: name, r: r, size: size, enc: enc, bomLen: bomLen}
	if isBlankText(text) {
		blank, err := b.blankToEnd(int64(len(head)))
		if err != nil {
			return nil, err
		}
		if blank {
			return nil, &FileError{File: name, Kind: ErrEmpty}
		}
	}
	if bytes.IndexByte(text, '\n') < 0 && bytes.IndexByte(text, '\r') >= 0 {
		b.crOnly = true
		text = bytes.ReplaceAll(text, []byte{'\r'}, []byte{'\n'})
	}
	if !complete {
		// Drop the last line, which the 64 KiB cut may have split.
		if i := bytes.LastIndexByte(text, '\n'); i >= 0 {
			text = text[:i+1]
		}
	}
	def := byte(',')
	if tsv {
		def = '\t'
	}
	b.comma = rune(sniffDelimiter(text, def))
	return b, nil
}

// isMarkup reports whether text starts like an HTML page or an XML file
// (some systems save HTML tables or XML spreadsheets under a spreadsheet
// name).
func isMarkup(text []byte) bool {
	text = bytes.TrimLeft(text, " \t\r\n\ufeff")
	head := strings.ToLower(string(text[:min(len(text), 16)]))
	for _, p := range []string{"<?xml", "<!doctype html", "<html", "<table"} {
		if strings.HasPrefix(head, p) {
			return true
		}
	}
	return false
}

// blankToEnd reports whether the file holds only white space after the
// first from bytes, which were blank.
func (b *textBook) blankToEnd(from int64) (bool, error) {
	if from >= b.size {
		return true, nil
	}
	dec := newFileDecoder(b.enc, b.r, int64(b.bomLen), b.size-int64(b.bomLen))
	buf := make([]byte, 32<<10)
	for {
		n, err := dec.Read(buf)
		if !isBlankText(buf[:n]) {
			return false, nil
		}
		if err == io.EOF {
			return true, nil
		}
		if err != nil {
			return false, &FileError{File: b.name, Kind: ErrRead, Err: err}
		}
	}
}

// Format implements Book.
func (b *textBook) Format() string {
	if b.comma == '\t' {
		return "tsv"
	}
	return "csv"
}

// Sheets implements Book: a text file has one unnamed sheet.
func (b *textBook) Sheets() []string { return []string{""} }

// Close implements Book.
func (b *textBook) Close() error { return nil }

// Table implements Book. Each call reads the file again from its start.
func (b *textBook) Table(sheet string) (Table, error) {
	if sheet != "" {
		return nil, &FileError{File: b.name, Kind: ErrUnknownSheet,
			Reason: fmt.Sprintf("no sheet %q: a %s file has a single unnamed sheet", sheet, strings.ToUpper(b.Format()))}
	}
	src := newFileDecoder(b.enc, b.r, int64(b.bomLen), b.size-int64(b.bomLen))
	if b.crOnly {
		src = crReader{src}
	}
	lim := &recordLimiter{r: src, max: MaxRecordBytes}
	cr := csv.NewReader(bufio.NewReaderSize(lim, 64<<10))
	cr.Comma = b.comma
	cr.LazyQuotes = true
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	return &textTable{book: b, cr: cr, lim: lim}, nil
}

// textTable streams the records of a delimited text file.
type textTable struct {
	book *textBook
	cr   *csv.Reader
	lim  *recordLimiter
	last int      // line of the last record returned
	err  error    // sticky error
	slab []string // block the returned rows are carved from
	// reuse: Next returns the reader's own slice, valid until the next
	// call (see reuseRows)
	reuse bool
}

// reuseRows lets Next return each row in the slice the CSV reader reuses
// for the next record instead of a copy: for a caller that is done with a
// row before it asks for the next one (the importer once it has the
// header; the rows it buffered while looking for it were copies). The
// copies were 1 GB of garbage at a million rows of 62 columns. The cell
// strings themselves are never reused.
func (t *textTable) reuseRows() { t.reuse = true }

// Next implements Table. The row number is the physical line on which the
// record starts (blank lines count), which is the row a spreadsheet program
// shows as long as no quoted field holds a line break. Records whose cells
// are all blank are skipped, and trailing empty cells are dropped.
func (t *textTable) Next() ([]string, int, error) {
	if t.err != nil {
		return nil, 0, t.err
	}
	for {
		t.lim.start = t.cr.InputOffset()
		rec, err := t.cr.Read()
		if err != nil {
			t.err = t.wrap(err, rec)
			return nil, 0, t.err
		}
		if len(rec) == 0 {
			continue
		}
		line, _ := t.cr.FieldPos(0)
		t.last = line
		n := len(rec)
		for n > 0 && rec[n-1] == "" {
			n--
		}
		blank := true
		for _, c := range rec[:n] {
			if strings.TrimSpace(c) != "" {
				blank = false
				break
			}
		}
		if blank {
			continue
		}
		if n > MaxColumns {
			t.err = &FileError{File: t.book.name, Row: line, Kind: ErrTooLarge,
				Reason: fmt.Sprintf("too large: %d columns, more than %d (the most a spreadsheet holds)", n, MaxColumns)}
			return nil, 0, t.err
		}
		if t.reuse {
			return rec[:n:n], line, nil
		}
		return t.copyOut(rec[:n]), line, nil
	}
}

// copyOut copies a record out of the csv.Reader's reused slice. Rows are
// carved from a shared block to save an allocation per row; the capacity
// is clipped so that appending to a row cannot overwrite the next one.
func (t *textTable) copyOut(rec []string) []string {
	if len(rec) > cap(t.slab)-len(t.slab) {
		t.slab = make([]string, 0, max(4096, len(rec)))
	}
	i := len(t.slab)
	t.slab = append(t.slab, rec...)
	return t.slab[i:len(t.slab):len(t.slab)]
}

// wrap turns a read error into a *FileError.
func (t *textTable) wrap(err error, rec []string) error {
	if err == io.EOF {
		return io.EOF
	}
	row := 0
	if len(rec) > 0 {
		row, _ = t.cr.FieldPos(0)
	}
	if errors.Is(err, errRecordTooLong) {
		where := fmt.Sprintf("a record after row %d", t.last)
		if row > 0 {
			where = "the record"
		}
		return &FileError{File: t.book.name, Row: row, Kind: ErrTooLarge,
			Reason: fmt.Sprintf("%s is longer than %d bytes (a quote that is never closed?)", where, MaxRecordBytes)}
	}
	return &FileError{File: t.book.name, Row: row, Kind: ErrRead, Err: err}
}

// Close implements Table.
func (t *textTable) Close() error {
	if t.err == nil {
		t.err = io.EOF
	}
	return nil
}

var errRecordTooLong = errors.New("record too long")

// recordLimiter fails a read once the CSV reader has pulled more than max
// bytes past the start of the record it is reading.
type recordLimiter struct {
	r     io.Reader
	n     int64 // bytes delivered so far
	start int64 // offset of the record being read
	max   int64
}

func (l *recordLimiter) Read(p []byte) (int, error) {
	if l.n-l.start > l.max {
		return 0, errRecordTooLong
	}
	n, err := l.r.Read(p)
	l.n += int64(n)
	return n, err
}

// crReader turns carriage returns into line feeds, for files with old Mac
// line ends.
type crReader struct{ r io.Reader }

func (c crReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	for i, b := range p[:n] {
		if b == '\r' {
			p[i] = '\n'
		}
	}
	return n, err
}

// sniffDelimiter picks the delimiter of a text sample: for each candidate
// it counts the fields of the first sniffRecords non-blank records, with
// quotes handled as encoding/csv with LazyQuotes does, and takes the
// candidate whose most common field count (above 1) covers the largest share
// of the records: a header and its data rows split alike only at the true
// delimiter, while decimal commas or commas in text come and go. Ties go to
// a default tab (a .tsv file), then to the larger field count, then to the
// order of delimiters. With no candidate above one field it returns def.
func sniffDelimiter(sample []byte, def byte) byte {
	best, bestShare, bestMode := def, 0.0, 0
	prefer := func(d byte) int { // lower is better
		if d == def {
			return -1
		}
		return bytes.IndexByte(delimiters, d)
	}
	tabFirst := func(d byte) bool { return def == '\t' && d == '\t' }
	for _, d := range delimiters {
		counts := fieldCounts(sample, d, sniffRecords)
		if len(counts) == 0 {
			continue
		}
		mode, freq := modeOf(counts)
		if mode <= 1 {
			continue
		}
		share := float64(freq) / float64(len(counts))
		better := share > bestShare || share == bestShare &&
			(tabFirst(d) || !tabFirst(best) && (mode > bestMode || mode == bestMode && prefer(d) < prefer(best)))
		if better {
			best, bestShare, bestMode = d, share, mode
		}
	}
	return best
}

// modeOf returns the most common value of counts (the larger on a tie) and
// how often it occurs.
func modeOf(counts []int) (mode, freq int) {
	seen := make(map[int]int, 8)
	for _, c := range counts {
		seen[c]++
	}
	for c, f := range seen {
		if f > freq || f == freq && c > mode {
			mode, freq = c, f
		}
	}
	return mode, freq
}

// fieldCounts returns the number of fields of each of the first max
// non-blank records of sample when split at d. Quoted fields may hold the
// delimiter, line breaks and doubled quotes; as in encoding/csv with
// LazyQuotes, a quote inside a quoted field that is not followed by the
// delimiter or a line end is taken literally.
func fieldCounts(sample []byte, d byte, max int) []int {
	var counts []int
	fields, inQuotes, fieldStart, blank := 1, false, true, true
	endRecord := func() {
		if !blank {
			counts = append(counts, fields)
		}
		fields, fieldStart, blank = 1, true, true
	}
	for i := 0; i < len(sample) && len(counts) < max; i++ {
		c := sample[i]
		if inQuotes {
			if c != '"' {
				continue
			}
			next := byte('\n')
			if i+1 < len(sample) {
				next = sample[i+1]
			}
			switch {
			case next == '"':
				i++
			case next == d || next == '\n' || next == '\r':
				inQuotes = false
			}
			continue
		}
		switch c {
		case '"':
			if fieldStart {
				inQuotes = true
			}
			fieldStart, blank = false, false
		case d:
			fields++
			fieldStart, blank = true, false
		case '\n':
			endRecord()
		case '\r':
		case ' ':
			fieldStart = false
		default:
			fieldStart, blank = false, false
		}
	}
	if len(counts) < max {
		endRecord()
	}
	return counts
}
