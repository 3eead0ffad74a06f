package catalog

import (
	"context"
	"database/sql"
	"fmt"
	"path/filepath"
	"sort"
	"strings"
	"testing"
	"time"
)

func init() {
	// keep lock waits short in tests
	indexLockTimeout = 200 * time.Millisecond
}

func openTemp(t testing.TB) *Store {
	t.Helper()
	return openAt(t, filepath.Join(t.TempDir(), "catalog.db"))
}

func openAt(t testing.TB, path string) *Store {
	t.Helper()
	s, err := Open(context.Background(), path)
	if err != nil {
		t.Fatalf("Open(%s): %v", path, err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// part builds a test part: kind, mfr, mpn, then name/value pairs. Values of
// type float64 go to Num, strings to text fields, bools to Bool fields.
func part(kind Kind, mfr, mpn string, kv ...any) *Part {
	p := &Part{Kind: kind, Mfr: mfr, MPN: mpn}
	for i := 0; i+1 < len(kv); i += 2 {
		name := kv[i].(string)
		switch v := kv[i+1].(type) {
		case float64:
			p.Set(name, v)
		case int:
			p.Set(name, float64(v))
		case string:
			setText(p, name, v)
		case bool:
			setBool(p, name, &v)
		default:
			panic(fmt.Sprintf("part: %s has type %T", name, v))
		}
	}
	return p
}

func offer(supplier, sku string, stock int64, moq int64, cur string, breaks ...PriceBreak) Offer {
	return Offer{Supplier: supplier, SKU: sku, Stock: &stock, MOQ: moq, Currency: cur, Breaks: breaks}
}

// importParts imports ps as source label and returns the outcomes.
func importParts(t testing.TB, s *Store, label string, ps ...*Part) []Outcome {
	t.Helper()
	tx, err := s.BeginImport(context.Background(), Source{Label: label, File: label + ".csv", SHA256: "sha-" + label})
	if err != nil {
		t.Fatalf("BeginImport: %v", err)
	}
	defer tx.Rollback()
	var out []Outcome
	for _, p := range ps {
		o, _, err := tx.Put(p)
		if err != nil {
			t.Fatalf("Put %s %s: %v", p.Mfr, p.MPN, err)
		}
		out = append(out, o)
	}
	if err := tx.Commit(Source{Read: len(ps)}); err != nil {
		t.Fatalf("Commit: %v", err)
	}
	return out
}

func gen(t testing.TB, s *Store) int64 {
	t.Helper()
	g, err := generation(context.Background(), s.db)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// rowLines runs query and returns one line per row: label, then
// column=value for each column.
func rowLines(t testing.TB, s *Store, label, query string) []string {
	t.Helper()
	rows, err := s.db.QueryContext(context.Background(), query)
	if err != nil {
		t.Fatalf("%s: %v", label, err)
	}
	defer rows.Close()
	cols, _ := rows.Columns()
	var out []string
	for rows.Next() {
		vals := make([]any, len(cols))
		ptrs := make([]any, len(cols))
		for i := range vals {
			ptrs[i] = &vals[i]
		}
		if err := rows.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		var b strings.Builder
		b.WriteString(label)
		for i, v := range vals {
			fmt.Fprintf(&b, " %s=%v", cols[i], v)
		}
		out = append(out, b.String())
	}
	if err := rows.Err(); err != nil {
		t.Fatal(err)
	}
	return out
}

// dump writes every table of the catalog as sorted text lines.
func dump(t testing.TB, s *Store) string {
	t.Helper()
	var lines []string
	for _, table := range []string{"meta", "sources", "parts", "offers", "part_sources"} {
		lines = append(lines, rowLines(t, s, table, "SELECT * FROM "+table)...)
	}
	sort.Strings(lines)
	return strings.Join(lines, "\n")
}

func mpns(ps []Part) []string {
	out := make([]string, len(ps))
	for i, p := range ps {
		out[i] = p.MPN
	}
	return out
}

func rawExec(t testing.TB, path, q string) {
	t.Helper()
	db, err := sql.Open("sqlite", path)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if _, err := db.Exec(q); err != nil {
		t.Fatal(err)
	}
}

// queryPlan returns SQLite's plan of stmt, its steps joined by "; ".
func queryPlan(t testing.TB, s *Store, stmt string, args ...any) string {
	t.Helper()
	rows, err := s.db.Query("EXPLAIN QUERY PLAN "+stmt, args...)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	var plan []string
	for rows.Next() {
		var id, parent, notused int
		var detail string
		if err := rows.Scan(&id, &parent, &notused, &detail); err != nil {
			t.Fatal(err)
		}
		plan = append(plan, detail)
	}
	return strings.Join(plan, "; ")
}
