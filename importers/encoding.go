package importers

import (
	"bufio"
	"bytes"
	"io"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
	xunicode "golang.org/x/text/encoding/unicode"
	"golang.org/x/text/transform"
)

// textEncoding is the character encoding of a delimited text file.
type textEncoding int

// Encodings the text reader recognises.
const (
	encUTF8        textEncoding = iota // UTF-8, invalid bytes read as Windows-1252
	encUTF16LE                         // UTF-16 little endian
	encUTF16BE                         // UTF-16 big endian
	encWindows1252                     // Windows-1252 (a superset of ISO 8859-1 printable range)
)

func (e textEncoding) String() string {
	switch e {
	case encUTF16LE:
		return "UTF-16LE"
	case encUTF16BE:
		return "UTF-16BE"
	case encWindows1252:
		return "Windows-1252"
	}
	return "UTF-8"
}

// Byte order marks.
var (
	bomUTF8    = []byte{0xEF, 0xBB, 0xBF}
	bomUTF16LE = []byte{0xFF, 0xFE}
	bomUTF16BE = []byte{0xFE, 0xFF}
)

// detectEncoding decides the encoding of a text file from its first bytes.
// complete reports whether head is the whole file. It returns the encoding
// and the length of the byte order mark to skip.
//
// Order of evidence: a byte order mark (UTF-8, UTF-16 LE/BE); then UTF-16
// without a mark, recognised by NUL bytes in every other position (ASCII
// text in UTF-16); then UTF-8 if head is valid UTF-8 or holds more valid
// multi-byte sequences than invalid bytes; Windows-1252 otherwise.
// A UTF-8 file whose first 64 KiB are plain ASCII but which has
// Windows-1252 bytes later is still read correctly, because the UTF-8
// decoder reads each invalid byte as Windows-1252 (see utf8Fallback).
func detectEncoding(head []byte, complete bool) (textEncoding, int) {
	switch {
	case bytes.HasPrefix(head, bomUTF8):
		return encUTF8, len(bomUTF8)
	case bytes.HasPrefix(head, bomUTF16LE):
		return encUTF16LE, len(bomUTF16LE)
	case bytes.HasPrefix(head, bomUTF16BE):
		return encUTF16BE, len(bomUTF16BE)
	}
	if enc, ok := sniffUTF16(head); ok {
		return enc, 0
	}
	if validUTF8Head(head, complete) {
		return encUTF8, 0
	}
	if multi, invalid := utf8Census(head); multi > invalid {
		// Mostly UTF-8 with some stray bytes, as when UTF-8 and
		// Windows-1252 exports were pasted together: the UTF-8 decoder
		// reads the stray bytes as Windows-1252.
		return encUTF8, 0
	}
	return encWindows1252, 0
}

// utf8Census counts the valid multi-byte UTF-8 sequences and the bytes that
// are not valid UTF-8 in b. Windows-1252 text seldom forms valid
// multi-byte sequences; UTF-8 text is made of them.
func utf8Census(b []byte) (multi, invalid int) {
	for len(b) > 0 {
		if b[0] < utf8.RuneSelf {
			b = b[1:]
			continue
		}
		r, size := utf8.DecodeRune(b)
		if r == utf8.RuneError && size == 1 {
			invalid++
		} else {
			multi++
		}
		b = b[size:]
	}
	return multi, invalid
}

// sniffUTF16 recognises UTF-16 text without a byte order mark: in the first
// 1 KiB at least 40 % of the code units have a zero high byte and (almost)
// none has a zero low byte, as for Latin text.
func sniffUTF16(head []byte) (textEncoding, bool) {
	n := min(len(head), 1024) &^ 1
	if n < 4 {
		return 0, false
	}
	var even, odd int // NUL bytes at even and odd offsets
	for i := 0; i < n; i += 2 {
		if head[i] == 0 {
			even++
		}
		if head[i+1] == 0 {
			odd++
		}
	}
	units := n / 2
	switch {
	case odd*10 >= units*4 && even*20 <= units:
		return encUTF16LE, true
	case even*10 >= units*4 && odd*20 <= units:
		return encUTF16BE, true
	}
	return 0, false
}

// validUTF8Head reports whether head is valid UTF-8, ignoring a multi-byte
// sequence cut off at its end when head is not the whole file.
func validUTF8Head(head []byte, complete bool) bool {
	if !complete {
		for i := len(head) - 1; i >= 0 && i >= len(head)-utf8.UTFMax; i-- {
			if utf8.RuneStart(head[i]) {
				if !utf8.FullRune(head[i:]) {
					head = head[:i]
				}
				break
			}
		}
	}
	return utf8.Valid(head)
}

// newDecoder returns a reader giving UTF-8 text from r, which holds text in
// enc without its byte order mark.
func newDecoder(enc textEncoding, r io.Reader) io.Reader {
	switch enc {
	case encUTF16LE:
		return transform.NewReader(r, xunicode.UTF16(xunicode.LittleEndian, xunicode.IgnoreBOM).NewDecoder())
	case encUTF16BE:
		return transform.NewReader(r, xunicode.UTF16(xunicode.BigEndian, xunicode.IgnoreBOM).NewDecoder())
	case encWindows1252:
		return transform.NewReader(r, charmap.Windows1252.NewDecoder())
	}
	return transform.NewReader(r, utf8Fallback{})
}

// newFileDecoder is newDecoder over a region of a file, read in 64 KiB
// blocks rather than the decoder's 4 KiB.
func newFileDecoder(enc textEncoding, r io.ReaderAt, off, n int64) io.Reader {
	return newDecoder(enc, bufio.NewReaderSize(io.NewSectionReader(r, off, n), 64<<10))
}

// decodeHead decodes the sniffed start of a file for delimiter sniffing.
// A sequence cut off at the end may decode to U+FFFD; the caller drops the
// last, incomplete line anyway.
func decodeHead(enc textEncoding, head []byte) []byte {
	out, err := io.ReadAll(newDecoder(enc, bytes.NewReader(head)))
	if err != nil {
		return head
	}
	return out
}

// utf8Fallback is a transform.Transformer that copies valid UTF-8 and reads
// every byte that is not part of a valid UTF-8 sequence as Windows-1252.
// Supplier files are sometimes assembled from UTF-8 and Windows-1252
// pieces; this reads both without a replacement character. A Windows-1252
// text is only misread where two or three of its non-ASCII bytes happen to
// form a valid UTF-8 sequence (such as "Â°"), which real text rarely does.
type utf8Fallback struct{ transform.NopResetter }

// Transform implements transform.Transformer.
func (utf8Fallback) Transform(dst, src []byte, atEOF bool) (nDst, nSrc int, err error) {
	// Fast path: a chunk of valid UTF-8 (ending on a rune boundary) is
	// copied whole; utf8.Valid checks ASCII eight bytes at a time.
	chunk := src[:min(len(src), len(dst))]
	for i := len(chunk) - 1; i >= 0 && i >= len(chunk)-utf8.UTFMax; i-- {
		if utf8.RuneStart(chunk[i]) {
			if !utf8.FullRune(chunk[i:]) {
				chunk = chunk[:i]
			}
			break
		}
	}
	if utf8.Valid(chunk) {
		nDst = copy(dst, chunk)
		nSrc = nDst
	}
	for nSrc < len(src) {
		// Copy the longest run of valid UTF-8 that fits into dst.
		i := nSrc
		for i < len(src) && i-nSrc < len(dst)-nDst {
			c := src[i]
			if c < utf8.RuneSelf {
				i++
				continue
			}
			r, size := utf8.DecodeRune(src[i:])
			if r == utf8.RuneError && size == 1 {
				break
			}
			if i+size-nSrc > len(dst)-nDst {
				break
			}
			i += size
		}
		nDst += copy(dst[nDst:], src[nSrc:i])
		nSrc = i
		if nSrc == len(src) {
			break
		}
		c := src[nSrc]
		if c < utf8.RuneSelf || utf8.FullRune(src[nSrc:]) && !isInvalidAt(src[nSrc:]) {
			// A valid rune that did not fit.
			return nDst, nSrc, transform.ErrShortDst
		}
		if !atEOF && !utf8.FullRune(src[nSrc:]) {
			// A sequence that may continue in the next chunk.
			return nDst, nSrc, transform.ErrShortSrc
		}
		// An invalid byte: read it as Windows-1252.
		r := charmap.Windows1252.DecodeByte(c)
		if utf8.RuneLen(r) > len(dst)-nDst {
			return nDst, nSrc, transform.ErrShortDst
		}
		nDst += utf8.EncodeRune(dst[nDst:], r)
		nSrc++
	}
	return nDst, nSrc, nil
}

// isInvalidAt reports whether b starts with a byte that is not the start of
// a valid UTF-8 sequence. b must hold a full rune (utf8.FullRune).
func isInvalidAt(b []byte) bool {
	r, size := utf8.DecodeRune(b)
	return r == utf8.RuneError && size == 1
}

// looksBinary reports whether decoded text is binary data rather than a
// delimited text file: it holds a NUL, or more than 1 % of its bytes (at
// least two) are control characters other than tab, line feed, carriage
// return, form feed, vertical tab and the DOS end-of-file mark 0x1A.
func looksBinary(text []byte) bool {
	if bytes.IndexByte(text, 0) >= 0 {
		return true
	}
	ctl := 0
	for _, c := range text {
		if c < 0x20 {
			switch c {
			case '\t', '\n', '\r', '\f', '\v', 0x1A:
			default:
				ctl++
			}
		}
	}
	return ctl >= 2 && ctl*100 > len(text)
}

// isBlankText reports whether text holds only white space and byte order
// marks (U+FEFF).
func isBlankText(text []byte) bool {
	for len(text) > 0 {
		r, size := utf8.DecodeRune(text)
		if !unicode.IsSpace(r) && r != '\uFEFF' {
			return false
		}
		text = text[size:]
	}
	return true
}
