package importers

import (
	"bufio"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"partsieve/catalog"
)

// TestRecognizeHeader runs the table in testdata/headers.tsv: header text,
// field, unit, qualifier, test conditions and price columns.
func TestRecognizeHeader(t *testing.T) {
	f, err := os.Open("testdata/headers.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	line, cases := 0, 0
	for sc.Scan() {
		line++
		text := sc.Text()
		if strings.HasPrefix(text, "#") || text == "" {
			continue
		}
		cols := strings.Split(text, "\t")
		for len(cols) < 8 {
			cols = append(cols, "")
		}
		cases++
		h := cols[0]
		got := RecognizeHeader(h)
		where := "headers.tsv:" + strconv.Itoa(line) + " " + strconv.Quote(h)
		if got.Field != cols[1] {
			t.Errorf("%s: field %q, want %q", where, got.Field, cols[1])
			continue
		}
		if got.Unit != cols[2] {
			t.Errorf("%s: unit %q, want %q", where, got.Unit, cols[2])
		}
		if got.Qual != cols[3] {
			t.Errorf("%s: qualifier %q, want %q", where, got.Qual, cols[3])
		}
		if c := condString(got.Conds); c != cols[4] {
			t.Errorf("%s: conditions %q, want %q", where, c, cols[4])
		}
		if q := intOrEmpty(got.Qty); q != cols[5] {
			t.Errorf("%s: price qty %q, want %q", where, q, cols[5])
		}
		if p := intOrEmpty(int64(max(got.Pair, 0))); p != cols[6] {
			t.Errorf("%s: break pair %q, want %q", where, p, cols[6])
		}
		if got.Currency != cols[7] {
			t.Errorf("%s: currency %q, want %q", where, got.Currency, cols[7])
		}
	}
	if cases < 60 {
		t.Fatalf("only %d header cases", cases)
	}
}

func intOrEmpty(n int64) string {
	if n == 0 {
		return ""
	}
	return strconv.FormatInt(n, 10)
}

func condString(cs []Condition) string {
	var parts []string
	for _, c := range cs {
		if c.Field == "" {
			continue
		}
		if c.Ref != "" {
			parts = append(parts, c.Field+"=@"+c.Ref)
		} else {
			parts = append(parts, c.Field+"="+strconv.FormatFloat(round9(c.Value), 'g', -1, 64))
		}
	}
	return strings.Join(parts, ",")
}

func round9(v float64) float64 {
	if v == 0 {
		return 0
	}
	e := math.Pow(10, 9-math.Ceil(math.Log10(math.Abs(v))))
	return math.Round(v*e) / e
}

// TestCanonicalNamesRecognised: every catalog field name is a header.
func TestCanonicalNamesRecognised(t *testing.T) {
	for _, f := range catalog.Fields {
		if got := RecognizeHeader(f.Name).Field; got != f.Name {
			t.Errorf("canonical %q recognised as %q", f.Name, got)
		}
		if got := RecognizeHeader(strings.ToUpper(f.Name)).Field; got != f.Name {
			t.Errorf("canonical %q in upper case recognised as %q", f.Name, got)
		}
	}
	for _, f := range ExtraFields {
		if got := RecognizeHeader(f.Name).Field; got != f.Name {
			t.Errorf("extra field %q recognised as %q", f.Name, got)
		}
	}
}

// TestHeaderWords: every word listed for a field is recognised as that
// field, and the list starts with the canonical name.
func TestHeaderWords(t *testing.T) {
	targets := []string{}
	for _, f := range catalog.Fields {
		targets = append(targets, f.Name)
	}
	for _, f := range ExtraFields {
		targets = append(targets, f.Name)
	}
	for _, target := range targets {
		words := HeaderWords(target)
		if len(words) == 0 || words[0] != target {
			t.Errorf("HeaderWords(%q) = %q, want the canonical name first", target, words)
			continue
		}
		for _, w := range words {
			if got := RecognizeHeader(w).Field; got != target {
				t.Errorf("HeaderWords(%q) lists %q, which is recognised as %q", target, w, got)
			}
		}
	}
	if HeaderWords("nonsense") != nil {
		t.Error("HeaderWords of an unknown field is not nil")
	}
	if n := len(HeaderWords("vrrm")); n < 10 {
		t.Errorf("vrrm has only %d header words", n)
	}
}

// TestSynonymTableClean: no normalised synonym is empty, and the index
// maps each to one target (the package panics at init otherwise).
func TestSynonymTableClean(t *testing.T) {
	keys := make([]string, 0, len(headerIndex))
	for k := range headerIndex {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if k == "" {
			t.Error("empty synonym key")
		}
		if !knownTarget(headerIndex[k]) {
			t.Errorf("synonym %q maps to unknown target %q", k, headerIndex[k])
		}
	}
}

func TestParseQty(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want int64
		ok   bool
	}{
		{"1", 1, true}, {"100", 100, true}, {"1k", 1000, true}, {"1,000", 1000, true},
		{"1.000", 1000, true}, {"10 000", 10000, true}, {"2.5k", 2500, true}, {"1,5", 0, false},
		{"", 0, false}, {"abc", 0, false},
	} {
		got, ok := parseQty(tc.in)
		if got != tc.want || ok != tc.ok {
			t.Errorf("parseQty(%q) = %d, %v; want %d, %v", tc.in, got, ok, tc.want, tc.ok)
		}
	}
}

// FuzzRecognizeHeader: any text gives a Column without panic; a
// recognised column names a known target, its conditions name fields of
// the column's field, and recognition is stable.
func FuzzRecognizeHeader(f *testing.F) {
	for _, s := range []string{"VRRM (V)", "RDS(on) max @ 10V (mΩ)", "IR @ VR, 125°C", "Unit price 1+ (EUR)",
		"Break 1 qty", "100-999", "Price @ 1k", "θJA", "I²t in A²s", "@", "((", "[)", "V_F @ I_F (A)", "Qty 10",
		"Tj (°C)", "\x00\xff", "RDS(on) @ VGS=4.5V, Tj=25°C", "1+ (€)", "price break qty 3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, h string) {
		c := RecognizeHeader(h)
		if c.Header != h {
			t.Fatalf("Header %q, want %q", c.Header, h)
		}
		if c.Field != "" && !knownTarget(c.Field) {
			t.Fatalf("%q: unknown target %q", h, c.Field)
		}
		for _, k := range c.Conds {
			if k.Field != "" && condTarget(c.Field, k.Dim) != k.Field && k.Ref == "" {
				t.Fatalf("%q: condition %+v does not belong to %s", h, k, c.Field)
			}
			if math.IsNaN(k.Value) {
				t.Fatalf("%q: NaN condition", h)
			}
		}
		if c.Qty < 0 {
			t.Fatalf("%q: negative qty", h)
		}
		again := RecognizeHeader(h)
		if again.Field != c.Field || again.Unit != c.Unit || again.Qual != c.Qual {
			t.Fatalf("%q: not stable", h)
		}
		if utf8.ValidString(h) && c.Field != "" && c.Unit != "" && !strings.Contains(h, c.Unit) {
			t.Fatalf("%q: unit %q not in the header", h, c.Unit)
		}
	})
}
