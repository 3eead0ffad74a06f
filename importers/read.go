package importers

import (
	"errors"
	"io"
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

// OpenBook opens a spreadsheet. name is used for the format (extension,
// then content sniffing) and in error messages, which always name the file
// and the reason ("not a spreadsheet", "truncated", "encrypted", "empty").
func OpenBook(name string, r io.ReaderAt, size int64) (Book, error) {
	return nil, errors.New("not implemented")
}
