// Package sheetsafe neutralises text that a spreadsheet program would
// evaluate as a formula when it opens a file partsieve wrote ("CSV
// injection"): a cell starting with '=', '+', '-', '@', tab, carriage return
// or line feed gets a leading apostrophe, which spreadsheet programs take as
// "this is text". Common practice for spreadsheet exports (the characters
// are those spreadsheet programs treat as the start of a formula).
package sheetsafe

import "strconv"

// Text neutralises s unconditionally: use it for text columns, where even a
// "-40" came from an imported sheet and must stay text.
func Text(s string) string {
	if Risky(s) {
		return "'" + s
	}
	return s
}

// Cell neutralises s unless it is a plain number (a "-0.5" written by
// partsieve itself in a numeric column is left alone; a number is never
// evaluated as a formula).
func Cell(s string) string {
	if !Risky(s) {
		return s
	}
	if _, err := strconv.ParseFloat(s, 64); err == nil {
		return s
	}
	return "'" + s
}

// Risky reports whether s starts with a character that makes a spreadsheet
// program read the cell as a formula.
func Risky(s string) bool {
	if s == "" {
		return false
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r', '\n':
		return true
	}
	return false
}
