package importers

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
)

// MaxCellBytes bounds the text of one XLSX cell or shared string, in
// bytes of XML, and likewise any run of text between two tags (white space
// between rows included: the XML decoder holds that whole too). excelize
// holds a cell's text in memory whole (a 100 MiB cell needs several times
// that while it is decoded), so a longer run is refused with ErrTooLarge
// before excelize reads the part.
var MaxCellBytes int64 = 32 << 20

// errLongText is returned by longestText when a run exceeds the limit.
var errLongText = errors.New("long text")

// longestText reads XML from r to its end and fails with errLongText when
// more than max bytes lie between two markup starts ('<'), counting a
// CDATA section (which may hold '<') with the text around it. row is the
// number of <row elements seen before the failure (the row as numbered in
// a worksheet without gaps). Reading to the end makes archive/zip check
// the part's CRC.
func longestText(r io.Reader, max int64) (row int, err error) {
	br := bufio.NewReaderSize(r, 64<<10)
	var run int64
	inCDATA := false
	var tail [2]byte // last two bytes before a CDATA search chunk
	for {
		if !inCDATA {
			data, err := br.ReadSlice('<')
			run += int64(len(data))
			if run > max {
				return row, errLongText
			}
			switch err {
			case nil:
			case bufio.ErrBufferFull:
				continue
			case io.EOF:
				return row, nil
			default:
				return row, err
			}
			next, _ := br.Peek(8)
			switch {
			case bytes.Equal(next, []byte("![CDATA[")):
				inCDATA, tail = true, [2]byte{}
				br.Discard(8)
				run += 8
			case len(next) >= 4 && bytes.Equal(next[:3], []byte("row")) && isTagNameEnd(next[3]):
				row++
				run = 0
			default:
				run = 0
			}
			continue
		}
		data, err := br.ReadSlice('>')
		run += int64(len(data))
		if run > max {
			return row, errLongText
		}
		switch err {
		case nil:
			all := append(tail[:], data...)
			if bytes.HasSuffix(all, []byte("]]>")) {
				inCDATA = false
				continue
			}
		case bufio.ErrBufferFull:
		case io.EOF:
			return row, nil
		default:
			return row, err
		}
		if n := len(data); n >= 2 {
			tail = [2]byte{data[n-2], data[n-1]}
		} else if n == 1 {
			tail = [2]byte{tail[1], data[0]}
		}
	}
}

// checkText reads an XML part to its end (checking its CRC) and refuses
// it when a cell's text is longer than MaxCellBytes. sheet is "" for the
// shared strings.
func (b *xlsxBook) checkText(part, sheet string) error {
	zf := b.open(part)
	if zf == nil {
		return nil
	}
	rc, err := zf.Open()
	if err != nil {
		return &FileError{File: b.name, Sheet: sheet, Kind: ErrDamaged, Err: fmt.Errorf("%s: %w", part, err)}
	}
	defer rc.Close()
	row, err := longestText(rc, MaxCellBytes)
	switch {
	case errors.Is(err, errLongText):
		where := "a shared string"
		if sheet != "" {
			where = "a cell"
		} else {
			row = 0
		}
		return &FileError{File: b.name, Sheet: sheet, Row: row, Kind: ErrTooLarge,
			Reason: fmt.Sprintf("too large: %s holds more than %d bytes of text", where, MaxCellBytes)}
	case err != nil && sheet != "":
		return &FileError{File: b.name, Sheet: sheet, Kind: ErrDamaged, Err: err}
	case err != nil:
		return b.damaged(fmt.Errorf("%s: %w", part, err))
	}
	return nil
}
