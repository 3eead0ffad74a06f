package sheetsafe

import "testing"

func TestTextAndCell(t *testing.T) {
	tests := []struct{ in, text, cell string }{
		{"", "", ""},
		{"plain", "plain", "plain"},
		{"=HYPERLINK(\"x\")", "'=HYPERLINK(\"x\")", "'=HYPERLINK(\"x\")"},
		{"+1-2", "'+1-2", "'+1-2"},
		{"@SUM(A1)", "'@SUM(A1)", "'@SUM(A1)"},
		{"\tx", "'\tx", "'\tx"},
		{"\rx", "'\rx", "'\rx"},
		{"\nx", "'\nx", "'\nx"},
		{"-40", "'-40", "-40"},
		{"-0.5", "'-0.5", "-0.5"},
		{"a=b", "a=b", "a=b"},
	}
	for _, tt := range tests {
		if got := Text(tt.in); got != tt.text {
			t.Errorf("Text(%q) = %q, want %q", tt.in, got, tt.text)
		}
		if got := Cell(tt.in); got != tt.cell {
			t.Errorf("Cell(%q) = %q, want %q", tt.in, got, tt.cell)
		}
	}
}
