package importers

import (
	"archive/zip"
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"path"
	"sort"
	"strings"

	"github.com/xuri/excelize/v2"
)

// UnzipSizeLimit bounds the total unpacked size of an XLSX file, as
// declared by its ZIP directory, in bytes. A larger file is refused with
// ErrTooLarge before anything is unpacked.
var UnzipSizeLimit int64 = 1 << 30

// maxDeflateRatio is the largest unpacked/packed size ratio DEFLATE can
// reach (a 258-byte match coded in about 2 bits gives ≈ 1032:1, RFC 1951
// §3.2.5), with some slack. A ZIP entry that declares more is damaged or
// built to exhaust memory.
const maxDeflateRatio = 1100

// maxMerges bounds the merged ranges of one sheet.
const maxMerges = 1 << 20

// maxFillColumn is the last column merged-cell filling reaches: merges
// wider than this (a title row merged across the whole sheet) are filled
// only up to here.
const maxFillColumn = 1024

// partLimit bounds the small XML parts (relationships, workbook) read here.
const partLimit = 16 << 20

// xlsxBook is an XLSX workbook read with excelize.
type xlsxBook struct {
	name   string
	f      *excelize.File
	sheets []string
	parts  map[string]string    // sheet name → worksheet part name
	files  map[string]*zip.File // lower-case part name → ZIP entry
}

// openXLSX checks the ZIP structure, finds the workbook and its sheets, and
// opens the workbook with excelize (raw cell values: number formats are not
// applied, so 0.0085 styled "0.00" reads as "0.0085").
func openXLSX(name string, r io.ReaderAt, size int64) (book Book, err error) {
	defer recoverXLSX(name, "", 0, &err)
	zr, err := zip.NewReader(r, size)
	if err != nil {
		return nil, &FileError{File: name, Kind: ErrDamaged, Err: err}
	}
	b := &xlsxBook{name: name, files: make(map[string]*zip.File, len(zr.File))}
	if err := b.checkEntries(zr); err != nil {
		return nil, err
	}
	wbPath, err := b.workbookPath()
	if err != nil {
		return nil, err
	}
	if b.parts, err = b.sheetParts(wbPath); err != nil {
		return nil, err
	}
	if err := b.checkText("xl/sharedStrings.xml", ""); err != nil {
		return nil, err
	}
	f, err := excelize.OpenReader(io.NewSectionReader(r, 0, size), excelize.Options{
		RawCellValue:   true,
		UnzipSizeLimit: UnzipSizeLimit,
	})
	if err != nil {
		return nil, b.openError(err)
	}
	b.f = f
	b.sheets = f.GetSheetList()
	return b, nil
}

// recoverXLSX turns a panic inside excelize into ErrDamaged: hostile files
// must give an error, never bring the program down.
func recoverXLSX(name, sheet string, row int, err *error) {
	if p := recover(); p != nil {
		*err = &FileError{File: name, Sheet: sheet, Row: row, Kind: ErrDamaged,
			Err: fmt.Errorf("XLSX reader failed: %v", p)}
	}
}

// checkEntries indexes the ZIP entries and refuses archives that declare
// impossible or too large unpacked sizes, so that no hostile archive can
// make the readers allocate more than UnzipSizeLimit.
func (b *xlsxBook) checkEntries(zr *zip.Reader) error {
	var total uint64
	for _, zf := range zr.File {
		u, c := zf.UncompressedSize64, zf.CompressedSize64
		switch zf.Method {
		case zip.Store:
			if u != c {
				return b.damaged(fmt.Errorf("%s: stored size %d differs from its packed size %d", zf.Name, u, c))
			}
		case zip.Deflate:
			if u > c*maxDeflateRatio+1024 {
				return b.damaged(fmt.Errorf("%s: declares %d bytes from %d packed bytes", zf.Name, u, c))
			}
		default:
			return b.damaged(fmt.Errorf("%s: unsupported compression method %d", zf.Name, zf.Method))
		}
		total += u
		if total > uint64(UnzipSizeLimit) {
			return &FileError{File: b.name, Kind: ErrTooLarge,
				Reason: fmt.Sprintf("too large: unpacks to more than %d bytes", UnzipSizeLimit)}
		}
		b.files[strings.ToLower(strings.ReplaceAll(zf.Name, "\\", "/"))] = zf
	}
	return nil
}

func (b *xlsxBook) damaged(err error) error {
	return &FileError{File: b.name, Kind: ErrDamaged, Err: err}
}

// open returns the ZIP entry of an OPC part (part names are
// case-insensitive) or nil.
func (b *xlsxBook) open(part string) *zip.File {
	return b.files[strings.ToLower(strings.TrimPrefix(part, "/"))]
}

// readPart unpacks a small XML part, checking its CRC.
func (b *xlsxBook) readPart(part string) ([]byte, error) {
	zf := b.open(part)
	if zf == nil {
		return nil, nil
	}
	rc, err := zf.Open()
	if err != nil {
		return nil, b.damaged(fmt.Errorf("%s: %w", part, err))
	}
	defer rc.Close()
	data, err := io.ReadAll(io.LimitReader(rc, partLimit))
	if err != nil {
		return nil, b.damaged(fmt.Errorf("%s: %w", part, err))
	}
	return data, nil
}

// opcRels is an OPC relationships part.
type opcRels struct {
	Rels []struct {
		ID     string `xml:"Id,attr"`
		Type   string `xml:"Type,attr"`
		Target string `xml:"Target,attr"`
	} `xml:"Relationship"`
}

// workbookPath finds the workbook part from the package relationships and
// tells other ZIP-based formats apart.
func (b *xlsxBook) workbookPath() (string, error) {
	data, err := b.readPart("_rels/.rels")
	if err != nil {
		return "", err
	}
	var wb string
	if data != nil {
		var rels opcRels
		if err := xml.Unmarshal(data, &rels); err != nil {
			return "", b.damaged(fmt.Errorf("_rels/.rels: %w", err))
		}
		for _, r := range rels.Rels {
			if strings.HasSuffix(r.Type, "/officeDocument") {
				wb = resolvePart("", r.Target)
				break
			}
		}
	}
	if wb == "" && b.open("xl/workbook.xml") != nil {
		wb = "xl/workbook.xml"
	}
	switch {
	case strings.HasSuffix(strings.ToLower(wb), ".bin"):
		return "", &FileError{File: b.name, Kind: ErrNotSpreadsheet,
			Reason: "binary .xlsb workbook: save it as .xlsx or CSV"}
	case wb != "" && b.open(wb) != nil && strings.HasSuffix(strings.ToLower(wb), ".xml"):
		return wb, nil
	}
	if mt, _ := b.readPart("mimetype"); bytes.HasPrefix(mt, []byte("application/vnd.oasis.opendocument.spreadsheet")) {
		return "", &FileError{File: b.name, Kind: ErrNotSpreadsheet,
			Reason: "OpenDocument spreadsheet: save it as .xlsx or CSV"}
	}
	return "", &FileError{File: b.name, Kind: ErrNotSpreadsheet,
		Reason: "not a spreadsheet (a ZIP archive without an XLSX workbook)"}
}

// resolvePart resolves a relationship target against the directory of the
// part that holds the relationship.
func resolvePart(dir, target string) string {
	target = strings.ReplaceAll(target, "\\", "/")
	if strings.HasPrefix(target, "/") {
		return strings.TrimPrefix(path.Clean(target), "/")
	}
	return strings.TrimPrefix(path.Clean(path.Join(dir, target)), "/")
}

// sheetParts maps the workbook's sheet names to their worksheet parts.
func (b *xlsxBook) sheetParts(wbPath string) (map[string]string, error) {
	data, err := b.readPart(wbPath)
	if err != nil {
		return nil, err
	}
	var wb struct {
		Sheets []struct {
			Name string `xml:"name,attr"`
			RID  string `xml:"id,attr"`
		} `xml:"sheets>sheet"`
	}
	if err := xml.Unmarshal(data, &wb); err != nil {
		return nil, b.damaged(fmt.Errorf("%s: %w", wbPath, err))
	}
	dir := path.Dir(wbPath)
	relsPath := path.Join(dir, "_rels", path.Base(wbPath)+".rels")
	data, err = b.readPart(relsPath)
	if err != nil {
		return nil, err
	}
	var rels opcRels
	if data != nil {
		if err := xml.Unmarshal(data, &rels); err != nil {
			return nil, b.damaged(fmt.Errorf("%s: %w", relsPath, err))
		}
	}
	targets := make(map[string]string, len(rels.Rels))
	for _, r := range rels.Rels {
		targets[r.ID] = resolvePart(dir, r.Target)
	}
	parts := make(map[string]string, len(wb.Sheets))
	for _, s := range wb.Sheets {
		if t, ok := targets[s.RID]; ok {
			parts[s.Name] = t
		}
	}
	return parts, nil
}

// openError classifies an error of excelize.OpenReader.
func (b *xlsxBook) openError(err error) error {
	switch {
	case strings.HasPrefix(err.Error(), "unzip size exceeds"):
		return &FileError{File: b.name, Kind: ErrTooLarge, Err: err}
	case errors.Is(err, excelize.ErrWorkbookFileFormat), errors.Is(err, excelize.ErrWorkbookPassword):
		return &FileError{File: b.name, Kind: ErrEncrypted, Err: err}
	}
	return b.damaged(err)
}

// Format implements Book.
func (b *xlsxBook) Format() string { return "xlsx" }

// Sheets implements Book: every sheet in workbook order, hidden ones too.
func (b *xlsxBook) Sheets() []string { return append([]string(nil), b.sheets...) }

// Close implements Book and removes excelize's temporary files.
func (b *xlsxBook) Close() error {
	if b.f == nil {
		return nil
	}
	err := b.f.Close()
	b.f = nil
	return err
}

// sheetName finds a sheet by exact name, then ignoring case as Excel does.
func (b *xlsxBook) sheetName(sheet string) (string, bool) {
	for _, s := range b.sheets {
		if s == sheet {
			return s, true
		}
	}
	for _, s := range b.sheets {
		if strings.EqualFold(s, sheet) {
			return s, true
		}
	}
	return "", false
}

// Table implements Book. It first reads the sheet's merged ranges (and so
// checks the sheet's CRC), then streams its rows with excelize.
func (b *xlsxBook) Table(sheet string) (t Table, err error) {
	if b.f == nil {
		return nil, &FileError{File: b.name, Kind: ErrRead, Reason: "workbook is closed"}
	}
	name, ok := b.sheetName(sheet)
	if !ok {
		quoted := make([]string, len(b.sheets))
		for i, s := range b.sheets {
			quoted[i] = fmt.Sprintf("%q", s)
		}
		return nil, &FileError{File: b.name, Kind: ErrUnknownSheet,
			Reason: fmt.Sprintf("no sheet %q; the sheets are %s", sheet, strings.Join(quoted, ", "))}
	}
	defer recoverXLSX(b.name, name, 0, &err)
	var merges []mergeRange
	if part, ok := b.parts[name]; ok {
		if err := b.checkText(part, name); err != nil {
			return nil, err
		}
		if merges, err = b.scanMerges(name, part); err != nil {
			return nil, err
		}
	}
	rows, err := b.f.Rows(name)
	if err != nil {
		return nil, &FileError{File: b.name, Sheet: name, Kind: ErrDamaged, Err: err}
	}
	return &xlsxTable{book: b, sheet: name, rows: rows, merges: merges}, nil
}

// mergeRange is a merged cell range, 1-based and inclusive, with the value
// of its top-left (anchor) cell once its first row has been read.
type mergeRange struct {
	c1, r1, c2, r2 int
	val            string
}

// scanMerges reads the <mergeCell ref="A1:C1"/> elements of a worksheet
// part. They come after the cell data, so streaming rows cannot see them in
// time. excelize's GetMergeCells loads the whole sheet into memory as a
// tree (and Rows then serialises that tree again): on a 100,000 × 20 sheet
// (113 MB of XML) the process peaked at 2 GB against 51 MB with this scan.
// Instead the part is unpacked once more and scanned as bytes, which took
// 2.5 % of the reading time in BenchmarkReadXLSX and also checks the
// part's CRC. The ranges are returned sorted by first row.
func (b *xlsxBook) scanMerges(sheet, part string) ([]mergeRange, error) {
	zf := b.open(part)
	if zf == nil {
		return nil, &FileError{File: b.name, Sheet: sheet, Kind: ErrDamaged,
			Err: fmt.Errorf("worksheet part %s is missing", part)}
	}
	rc, err := zf.Open()
	if err != nil {
		return nil, &FileError{File: b.name, Sheet: sheet, Kind: ErrDamaged, Err: err}
	}
	defer rc.Close()
	var merges []mergeRange
	err = scanTags(rc, []byte("mergeCell"), func(tag []byte) error {
		ref, ok := attrValue(tag, "ref")
		if !ok {
			return nil
		}
		m, ok := parseRange(ref)
		if !ok {
			return nil
		}
		if len(merges) >= maxMerges {
			return &FileError{File: b.name, Sheet: sheet, Kind: ErrTooLarge,
				Reason: fmt.Sprintf("too large: more than %d merged ranges", maxMerges)}
		}
		merges = append(merges, m)
		return nil
	})
	if err != nil {
		var fe *FileError
		if errors.As(err, &fe) {
			return nil, err
		}
		return nil, &FileError{File: b.name, Sheet: sheet, Kind: ErrDamaged, Err: err}
	}
	sort.SliceStable(merges, func(i, j int) bool { return merges[i].r1 < merges[j].r1 })
	return merges, nil
}

// scanTags calls fn with the text of every start tag named local (with or
// without a namespace prefix) in the XML read from r, from the name to the
// closing '>'. It works on bytes: a literal '<' can only start markup, so
// cell text cannot fake a tag (CDATA sections aside).
func scanTags(r io.Reader, local []byte, fn func(tag []byte) error) error {
	const chunk = 64 << 10
	const maxTag = 4 << 10
	buf := make([]byte, 0, chunk+maxTag+128)
	eof := false
	from := 0 // where to search in buf
	for !eof {
		if cap(buf)-len(buf) < chunk {
			buf = append(make([]byte, 0, len(buf)+chunk), buf...)
		}
		n, err := io.ReadFull(r, buf[len(buf):len(buf)+chunk])
		buf = buf[:len(buf)+n]
		switch err {
		case nil:
		case io.EOF, io.ErrUnexpectedEOF:
			eof = true
		default:
			return err
		}
		var keep int // start of the bytes to keep for the next round
		i := from
		from = 0
		for {
			j := bytes.Index(buf[i:], local)
			if j < 0 {
				keep = max(i, len(buf)-len(local)-64)
				break
			}
			p := i + j
			if !tagStart(buf, p) || p+len(local) >= len(buf) || !isTagNameEnd(buf[p+len(local)]) {
				if p+len(local) >= len(buf) && !eof {
					keep = max(0, p-64)
					from = p - keep
					break
				}
				i = p + len(local)
				continue
			}
			k := bytes.IndexByte(buf[p:], '>')
			if k < 0 {
				if !eof && len(buf)-p < maxTag {
					keep = max(0, p-64)
					from = p - keep
					break
				}
				i = p + len(local)
				continue
			}
			if err := fn(buf[p : p+k]); err != nil {
				return err
			}
			i = p + k + 1
		}
		buf = buf[:copy(buf, buf[keep:])]
	}
	return nil
}

// tagStart reports whether the name at p follows '<' directly or through a
// namespace prefix ("<x:mergeCell").
func tagStart(buf []byte, p int) bool {
	if p > 0 && buf[p-1] == '<' {
		return true
	}
	if p == 0 || buf[p-1] != ':' {
		return false
	}
	for q := p - 2; q >= 0 && q >= p-34; q-- {
		c := buf[q]
		switch {
		case c == '<':
			return q < p-2
		case c == '_' || c == '-' || c == '.' || c >= '0' && c <= '9' || c|0x20 >= 'a' && c|0x20 <= 'z':
		default:
			return false
		}
	}
	return false
}

func isTagNameEnd(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '/' || c == '>'
}

// attrValue returns the value of the attribute name in a start tag.
func attrValue(tag []byte, name string) (string, bool) {
	for i := 0; ; {
		j := bytes.Index(tag[i:], []byte(name))
		if j < 0 {
			return "", false
		}
		p := i + j
		i = p + len(name)
		if p == 0 || !isTagNameEnd(tag[p-1]) {
			continue
		}
		rest := bytes.TrimLeft(tag[i:], " \t\r\n")
		if len(rest) == 0 || rest[0] != '=' {
			continue
		}
		rest = bytes.TrimLeft(rest[1:], " \t\r\n")
		if len(rest) == 0 || rest[0] != '"' && rest[0] != '\'' {
			continue
		}
		end := bytes.IndexByte(rest[1:], rest[0])
		if end < 0 {
			return "", false
		}
		return string(rest[1 : 1+end]), true
	}
}

// parseRange parses "B2:D4" (either corner first, "$" allowed) into a
// normalised range of at least two cells.
func parseRange(ref string) (mergeRange, bool) {
	a, z, ok := strings.Cut(strings.ReplaceAll(ref, "$", ""), ":")
	if !ok {
		return mergeRange{}, false
	}
	c1, r1, err1 := excelize.CellNameToCoordinates(a)
	c2, r2, err2 := excelize.CellNameToCoordinates(z)
	if err1 != nil || err2 != nil {
		return mergeRange{}, false
	}
	m := mergeRange{c1: min(c1, c2), r1: min(r1, r2), c2: max(c1, c2), r2: max(r1, r2)}
	if m.c1 == m.c2 && m.r1 == m.r2 {
		return mergeRange{}, false
	}
	return m, true
}

// xlsxTable streams one worksheet.
type xlsxTable struct {
	book   *xlsxBook
	sheet  string
	rows   *excelize.Rows
	row    int // real row number of the last row read
	merges []mergeRange
	next   int           // first merge not yet started
	active []*mergeRange // merges covering the current row
	err    error
}

// Next implements Table. excelize's Rows iterator steps through every row
// number, including rows missing from the file, so counting its steps gives
// the row numbers a spreadsheet program shows. Rows whose own cells are all
// blank are skipped; every cell of a merged range is then given the
// anchor's value (header cells merged across columns, category cells merged
// down rows), and trailing empty cells are dropped.
func (t *xlsxTable) Next() (cells []string, row int, err error) {
	if t.err != nil {
		return nil, 0, t.err
	}
	defer func() {
		recoverXLSX(t.book.name, t.sheet, t.row, &err)
		if err != nil {
			cells, row, t.err = nil, 0, err
		}
	}()
	for t.rows.Next() {
		t.row++
		cols, err := t.rows.Columns()
		if err != nil {
			return nil, 0, &FileError{File: t.book.name, Sheet: t.sheet, Row: t.row, Kind: ErrDamaged, Err: err}
		}
		blank := true
		for _, c := range cols {
			if strings.TrimSpace(c) != "" {
				blank = false
				break
			}
		}
		if blank {
			continue
		}
		cols = t.fill(cols)
		n := len(cols)
		for n > 0 && cols[n-1] == "" {
			n--
		}
		if n > MaxColumns {
			// cells without a reference are placed one after another,
			// past column XFD
			return nil, 0, &FileError{File: t.book.name, Sheet: t.sheet, Row: t.row, Kind: ErrTooLarge,
				Reason: fmt.Sprintf("too large: %d columns, more than %d (the most a worksheet holds)", n, MaxColumns)}
		}
		return cols[:n], t.row, nil
	}
	if err := t.rows.Error(); err != nil {
		return nil, 0, &FileError{File: t.book.name, Sheet: t.sheet, Row: t.row + 1, Kind: ErrDamaged, Err: err}
	}
	return nil, 0, io.EOF
}

// fill writes the anchor values of the merges covering row t.row into
// cells.
func (t *xlsxTable) fill(cells []string) []string {
	r := t.row
	act := t.active[:0]
	for _, m := range t.active {
		if m.r2 >= r {
			act = append(act, m)
		}
	}
	for ; t.next < len(t.merges) && t.merges[t.next].r1 <= r; t.next++ {
		m := &t.merges[t.next]
		if m.r2 < r {
			continue
		}
		if m.r1 == r && m.c1 <= len(cells) {
			m.val = cells[m.c1-1]
		}
		act = append(act, m)
	}
	t.active = act
	for _, m := range act {
		if m.val == "" || m.c1 > maxFillColumn {
			continue
		}
		last := min(m.c2, maxFillColumn)
		for len(cells) < last {
			cells = append(cells, "")
		}
		for c := m.c1; c <= last; c++ {
			cells[c-1] = m.val
		}
	}
	return cells
}

// Close implements Table.
func (t *xlsxTable) Close() error {
	if t.err == nil {
		t.err = io.EOF
	}
	if t.rows == nil {
		return nil
	}
	err := t.rows.Close()
	t.rows = nil
	return err
}
