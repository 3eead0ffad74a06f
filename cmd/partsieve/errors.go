package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
)

// Exit codes, documented in the root command's help and in the README.
const (
	exitOK       = 0 // success
	exitError    = 1 // the command failed: unreadable file, catalog problem, bad spec
	exitUsage    = 2 // bad command line: unknown flag, missing argument, bad --where
	exitRejected = 3 // import finished, but some rows were refused (see the reject list)
	exitNoMatch  = 4 // a search or pick found no qualifying part
	exitCanceled = 130
)

const exitCodesHelp = `Exit status:
  0   success
  1   the command failed (unreadable file, catalog problem, bad input)
  2   bad command line (unknown flag or field, missing argument, bad --where)
  3   import finished, but some rows were refused (listed with row and column)
  4   nothing matched (find with no result)
  130 interrupted`

// cliError carries a message, an optional hint printed on a second line
// and the exit code.
type cliError struct {
	err  error
	hint string
	code int
}

func (e *cliError) Error() string { return e.err.Error() }
func (e *cliError) Unwrap() error { return e.err }

func usageErr(err error, hint string) error { return &cliError{err: err, hint: hint, code: exitUsage} }

func withHint(err error, hint string) error { return &cliError{err: err, hint: hint, code: exitError} }

// codeError ends a command with a code but prints nothing more (the output
// already says why).
type codeError struct{ code int }

func (e *codeError) Error() string { return fmt.Sprintf("exit %d", e.code) }

// report prints err on stderr and returns the exit code.
func report(stderr io.Writer, err error) int {
	if err == nil {
		return exitOK
	}
	var ce *codeError
	if errors.As(err, &ce) {
		return ce.code
	}
	if errors.Is(err, context.Canceled) {
		fmt.Fprintln(stderr, "Error: interrupted; the catalog is unchanged by the interrupted step")
		return exitCanceled
	}
	fmt.Fprintf(stderr, "Error: %v\n", err)
	var cl *cliError
	if errors.As(err, &cl) {
		if cl.hint != "" {
			fmt.Fprintf(stderr, "Hint: %s\n", cl.hint)
		}
		return cl.code
	}
	if h := damageHint(err); h != "" {
		fmt.Fprintf(stderr, "Hint: %s\n", h)
	}
	return exitError
}

// damageHint returns advice for an error that says the catalog file is
// damaged, met while reading or writing it rather than when opening it
// (where the message already gives the advice); "" otherwise. SQLite's
// text for SQLITE_CORRUPT is "database disk image is malformed".
func damageHint(err error) string {
	msg := err.Error()
	if strings.Contains(msg, "database disk image is malformed") && !strings.Contains(msg, "restore") {
		return "the catalog file is damaged; 'partsieve catalog check' reports the damage; restore a backup copy, or move it away and import the spreadsheets again"
	}
	return ""
}
