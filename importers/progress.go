package importers

import (
	"io"
	"strconv"
	"strings"
	"sync/atomic"
	"time"
)

// progressMinSize is the file size from which a progress bar is drawn:
// smaller files import in well under a second.
const progressMinSize = 2 << 20

// progressEvery is the least time between two redraws (10 per second).
const progressEvery = 100 * time.Millisecond

// RowTotaler may be implemented by a Table that knows its number of rows
// before reading them (an XLSX sheet's dimension); the progress bar of a
// workbook then shows a percentage of rows.
type RowTotaler interface {
	TotalRows() int
}

// progress draws "\r[#####     ] 45% 12,345 rows" on a terminal.
type progress struct {
	w      io.Writer
	now    func() time.Time
	last   time.Time
	drawn  bool
	width  int
	lineSz int
}

func newProgress(w io.Writer, size int64) *progress {
	if w == nil || size < progressMinSize {
		return nil
	}
	return &progress{w: w, now: time.Now, width: 30}
}

// update redraws the bar when enough time has passed. frac is the share
// done (0..1), or negative when unknown; rows is the number of rows read.
func (p *progress) update(frac float64, rows int) {
	if p == nil {
		return
	}
	t := p.now()
	if p.drawn && t.Sub(p.last) < progressEvery {
		return
	}
	p.last, p.drawn = t, true
	p.draw(frac, rows)
}

func (p *progress) draw(frac float64, rows int) {
	var b strings.Builder
	b.WriteByte('\r')
	if frac >= 0 {
		if frac > 1 {
			frac = 1
		}
		n := int(frac*float64(p.width) + 0.5)
		b.WriteByte('[')
		b.WriteString(strings.Repeat("#", n))
		b.WriteString(strings.Repeat(" ", p.width-n))
		b.WriteString("] ")
		pct := strconv.Itoa(int(frac * 100))
		b.WriteString(strings.Repeat(" ", 3-len(pct)))
		b.WriteString(pct)
		b.WriteString("% ")
	}
	b.WriteString(groupThousands(rows))
	b.WriteString(" rows")
	s := b.String()
	if pad := p.lineSz - len(s); pad > 0 {
		s += strings.Repeat(" ", pad)
	}
	p.lineSz = len(s)
	_, _ = io.WriteString(p.w, s)
}

// done clears the bar so the summary starts on a clean line.
func (p *progress) done() {
	if p == nil || !p.drawn {
		return
	}
	_, _ = io.WriteString(p.w, "\r"+strings.Repeat(" ", p.lineSz-1)+"\r")
}

// groupThousands writes n with commas: 12345 gives "12,345".
func groupThousands(n int) string {
	s := strconv.Itoa(n)
	neg := strings.HasPrefix(s, "-")
	if neg {
		s = s[1:]
	}
	var b strings.Builder
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(r)
	}
	if neg {
		return "-" + b.String()
	}
	return b.String()
}

// countingReaderAt records how far into the file the reader has got, for
// the progress of sequentially read formats (CSV, TSV).
type countingReaderAt struct {
	r    io.ReaderAt
	high atomic.Int64
}

func (c *countingReaderAt) ReadAt(p []byte, off int64) (int, error) {
	n, err := c.r.ReadAt(p, off)
	end := off + int64(n)
	for {
		h := c.high.Load()
		if end <= h || c.high.CompareAndSwap(h, end) {
			break
		}
	}
	return n, err
}
