package importers

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"testing"
	"time"
)

// fakeClock advances by step at every reading.
type fakeClock struct {
	t    time.Time
	step time.Duration
}

func (c *fakeClock) now() time.Time {
	c.t = c.t.Add(c.step)
	return c.t
}

func TestProgressBar(t *testing.T) {
	if newProgress(&bytes.Buffer{}, progressMinSize-1) != nil {
		t.Error("bar for a small file")
	}
	if newProgress(nil, 1<<30) != nil {
		t.Error("bar without a terminal")
	}
	var buf bytes.Buffer
	p := newProgress(&buf, progressMinSize)
	clk := &fakeClock{t: time.Unix(0, 0), step: 30 * time.Millisecond}
	p.now = clk.now
	p.update(0.45, 12345)
	if got := buf.String(); got != "\r[##############                ]  45% 12,345 rows" {
		t.Errorf("first draw %q", got)
	}
	buf.Reset()
	p.update(0.46, 12400) // 30 ms later: throttled
	p.update(0.47, 12500) // 60 ms
	p.update(0.48, 12600) // 90 ms
	if buf.Len() != 0 {
		t.Errorf("drawn within 100 ms: %q", buf.String())
	}
	p.update(0.5, 13000) // 120 ms
	if got := buf.String(); got != "\r[###############               ]  50% 13,000 rows" {
		t.Errorf("second draw %q", got)
	}
	buf.Reset()
	clk.step = time.Second
	p.update(-1, 1234567) // unknown share: rows only, the longer old line wiped
	if got := buf.String(); !strings.HasPrefix(got, "\r1,234,567 rows ") || len(got) != len("\r[###############               ]  50% 13,000 rows") {
		t.Errorf("rows-only draw %q", got)
	}
	buf.Reset()
	p.done()
	if got := buf.String(); strings.Trim(got, "\r ") != "" || !strings.HasSuffix(got, "\r") {
		t.Errorf("done %q", got)
	}
	// 100 updates a second apart draw 100 times; 1000 updates 1 ms apart
	// draw at most 11 times
	var n int
	p = newProgress(writerFunc(func([]byte) { n++ }), progressMinSize)
	clk = &fakeClock{t: time.Unix(0, 0), step: time.Millisecond}
	p.now = clk.now
	for i := 0; i < 1000; i++ {
		p.update(float64(i)/1000, i)
	}
	if n < 9 || n > 11 {
		t.Errorf("%d draws in 1 s, want about 10", n)
	}
}

type writerFunc func([]byte)

func (f writerFunc) Write(p []byte) (int, error) { f(p); return len(p), nil }

func TestGroupThousands(t *testing.T) {
	for n, want := range map[int]string{0: "0", 999: "999", 1000: "1,000", 12345: "12,345", 1234567: "1,234,567", -4500: "-4,500"} {
		if got := groupThousands(n); got != want {
			t.Errorf("groupThousands(%d) = %q, want %q", n, got, want)
		}
	}
}

// TestProgressDuringImport: a large CSV draws the bar on the writer and
// clears it at the end.
func TestProgressDuringImport(t *testing.T) {
	var b strings.Builder
	b.WriteString("Mfr,MPN,Type,VRRM (V),IF(AV) (A),Description\n")
	for i := 0; b.Len() < progressMinSize+1000; i++ {
		fmt.Fprintf(&b, "Aldor,P%06d,schottky,40,1,%s\n", i, strings.Repeat("x", 60))
	}
	var out bytes.Buffer
	s, err := ImportData(context.Background(), nil, "big.csv", []byte(b.String()), Options{Progress: &out})
	if err != nil {
		t.Fatal(err)
	}
	if s.Rejected != 0 || s.Added != s.Read {
		t.Fatalf("summary: read %d added %d rejected %d", s.Read, s.Added, s.Rejected)
	}
	got := out.String()
	if !strings.Contains(got, "% ") {
		t.Errorf("no percentage of bytes read for a CSV file: %q", got)
	}
	if !strings.Contains(got, "rows") || !strings.HasPrefix(got, "\r") || !strings.HasSuffix(got, "\r") {
		t.Errorf("progress output %q", got)
	}
}
