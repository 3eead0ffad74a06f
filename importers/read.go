package importers

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"
)

// Book is an opened spreadsheet file: one sheet for CSV/TSV, any number
// for XLSX.
type Book interface {
	// Format is "csv", "tsv" or "xlsx".
	Format() string
	// Sheets lists sheet names in workbook order ("" for CSV/TSV).
	Sheets() []string
	// Table opens one sheet for streaming.
	Table(sheet string) (Table, error)
	Close() error
}

// Table streams the rows of one sheet.
type Table interface {
	// Next returns the next non-skipped row and its 1-based row number as a
	// spreadsheet program shows it; io.EOF at the end. Rows may have any
	// length (trailing empty cells may be missing).
	Next() (cells []string, row int, err error)
	Close() error
}

// Error kinds of the readers. Every error OpenBook, Book.Table and
// Table.Next return is a *FileError whose Kind is one of these, so callers
// test them with errors.Is(err, ErrEmpty) and get the details with
// errors.As(err, &fe).
var (
	// ErrEmpty: the file has no bytes, or only white space and a byte order
	// mark.
	ErrEmpty = errors.New("empty")
	// ErrNotSpreadsheet: binary data, a ZIP archive that holds no XLSX
	// workbook, or another document format.
	ErrNotSpreadsheet = errors.New("not a spreadsheet")
	// ErrDamaged: an XLSX file that is cut short or whose ZIP or XML
	// structure is broken.
	ErrDamaged = errors.New("truncated or damaged XLSX")
	// ErrEncrypted: an OLE2 compound file, which is either a password
	// protected workbook (Office wraps encrypted XLSX files in one) or a
	// legacy binary .xls workbook; neither can be read.
	ErrEncrypted = errors.New("encrypted or legacy .xls workbook: save it as .xlsx or CSV")
	// ErrTooLarge: an XLSX file that would unpack to more than
	// UnzipSizeLimit bytes, or a CSV record longer than MaxRecordBytes.
	ErrTooLarge = errors.New("too large")
	// ErrUnknownSheet: Book.Table was asked for a sheet the file does not
	// have; the message lists the sheets it has.
	ErrUnknownSheet = errors.New("no such sheet")
	// ErrRead: the underlying reader failed.
	ErrRead = errors.New("read error")
)

// FileError is an error of the spreadsheet readers. It always names the
// file; Sheet, Row and Column are filled in when the error belongs to one
// place in it.
type FileError struct {
	File   string // file name as given to OpenBook
	Sheet  string // sheet name, "" for CSV/TSV or whole-file errors
	Row    int    // 1-based row as a spreadsheet program shows it, 0 = none
	Column int    // 1-based column, 0 = none
	Kind   error  // one of the Err* kinds above
	Reason string // human-readable reason; Kind's text when empty
	Err    error  // underlying cause, may be nil
}

// Error formats the error as
//
//	parts.xlsx, sheet "Diodes", row 12: truncated or damaged XLSX (cause)
func (e *FileError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Sheet != "" {
		fmt.Fprintf(&b, ", sheet %q", e.Sheet)
	}
	if e.Row > 0 {
		fmt.Fprintf(&b, ", row %d", e.Row)
	}
	if e.Column > 0 {
		fmt.Fprintf(&b, ", column %d", e.Column)
	}
	b.WriteString(": ")
	switch {
	case e.Reason != "":
		b.WriteString(e.Reason)
	case e.Kind != nil:
		b.WriteString(e.Kind.Error())
	default:
		b.WriteString("error")
	}
	if e.Err != nil {
		fmt.Fprintf(&b, " (%v)", e.Err)
	}
	return b.String()
}

// Unwrap gives errors.Is and errors.As both the kind and the cause.
func (e *FileError) Unwrap() []error {
	var errs []error
	if e.Kind != nil {
		errs = append(errs, e.Kind)
	}
	if e.Err != nil {
		errs = append(errs, e.Err)
	}
	return errs
}

// sniffSize is how much of the file's start OpenBook reads to decide the
// format, the text encoding and the delimiter.
const sniffSize = 64 << 10

// File signatures.
var (
	sigZip      = []byte("PK\x03\x04")
	sigZipEmpty = []byte("PK\x05\x06") // end of central directory of an empty archive
	sigCFB      = []byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1}
)

// OpenBook opens a spreadsheet. name is used for the format (extension,
// then content sniffing) and in error messages, which always name the file
// and the reason ("not a spreadsheet", "truncated", "encrypted", "empty").
//
// The content decides: a ZIP signature means XLSX whatever the name, an
// OLE2 compound file is refused with ErrEncrypted, and anything else is read
// as delimited text (encoding and delimiter sniffed from the first 64 KiB,
// see openText) unless it looks binary. The extension only breaks ties: a
// ".tsv" file defaults to tab when no delimiter stands out. Both readers
// stream. A text file is read through 64 KiB buffers, one record at a time
// (at most MaxRecordBytes). An XLSX file is unpacked by excelize: the
// packed file and its small parts are held in memory, sheets over 16 MiB
// go to temporary files that Close removes, and UnzipSizeLimit bounds the
// unpacked total.
//
// Rows come from Book.Table; see textTable.Next and xlsxTable.Next for how
// rows are numbered, which rows are skipped and how merged cells are
// filled. Every error is a *FileError.
func OpenBook(name string, r io.ReaderAt, size int64) (Book, error) {
	if size <= 0 {
		return nil, &FileError{File: name, Kind: ErrEmpty}
	}
	head := make([]byte, min(size, sniffSize))
	n, err := r.ReadAt(head, 0)
	if n < len(head) {
		if err == nil || err == io.EOF {
			err = io.ErrUnexpectedEOF
		}
		return nil, &FileError{File: name, Kind: ErrRead, Err: err}
	}
	switch {
	case bytes.HasPrefix(head, sigZip), bytes.HasPrefix(head, sigZipEmpty):
		return openXLSX(name, r, size)
	case bytes.HasPrefix(head, sigCFB):
		return nil, &FileError{File: name, Kind: ErrEncrypted}
	}
	tsv := strings.EqualFold(filepath.Ext(name), ".tsv")
	return openText(name, r, size, head, tsv)
}
