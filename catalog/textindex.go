package catalog

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"time"
	"unicode"

	"github.com/blevesearch/bleve/v2"
	"github.com/blevesearch/bleve/v2/analysis"
	"github.com/blevesearch/bleve/v2/analysis/analyzer/custom"
	"github.com/blevesearch/bleve/v2/analysis/analyzer/standard"
	"github.com/blevesearch/bleve/v2/analysis/token/lowercase"
	"github.com/blevesearch/bleve/v2/analysis/tokenizer/single"
	"github.com/blevesearch/bleve/v2/index/scorch"
	"github.com/blevesearch/bleve/v2/mapping"
	"github.com/blevesearch/bleve/v2/search/query"
	index "github.com/blevesearch/bleve_index_api"
	bolterrors "go.etcd.io/bbolt/errors"
)

// The text index is a bleve (scorch) index in the directory PATH.bleve
// beside the catalog. It is a cache derived from SQLite: one document per
// part, ID = the part id in decimal, nothing stored. Fields:
//
//	text      standard analyzer (unicode words, lower case, English stop
//	          words) over "mfr desc package kind type"
//	mpn, pkg  analyzer "partkey" (whole value as one token, lower case)
//	          over lower(NormKey(value)): "AB-12 34" is "ab1234"
//
// The words of the manufacturer, description, package and class share one
// field because a search costs about 70 ns per posting it scores: with one
// field per source, a word such as "rectifier", in both the description
// and the class of 289,000 of 1,000,000 parts, had twice the postings
// (desc and class) and took 48 ms instead of 20 ms (layout 1).
//
// Numbers stay in SQLite: bleve numeric fields cost 3× index time and size
// and are slower to filter than SQLite's indexes.
//
// The internal key "generation" records the catalog generation the index
// reflects and "layout" the field layout (indexLayout); an index whose
// generation differs from the catalog's, of another layout, or that cannot
// be opened, is rebuilt from SQLite into a temporary directory that then
// replaces it, so a crash mid-rebuild never leaves a half index.

// indexLockTimeout bounds the wait for an index held by another process
// (bolt file lock); without it bleve.Open blocks forever. Tests shorten it.
var indexLockTimeout = 2 * time.Second

// TextCap is the most text-search hits Find considers; broader text
// queries keep the TextCap best and Result.Capped says so.
const TextCap = 200000

const (
	keyAnalyzer = "partkey"
	genKey      = "generation"
	layoutKey   = "layout"
	// indexLayout names the field layout this build writes and reads:
	// "2" the text field; layout 1 (no key) had mfr, desc, package and
	// class fields.
	indexLayout  = "2"
	indexBatch   = 2000
	textFieldSQL = `parts.id, parts."kind", parts."type", parts."mfr", parts."mpn", parts."desc", parts."package"`
)

var errIndexBusy = errors.New("the text index is in use by another process")

func (s *Store) indexDir() string { return s.Path + ".bleve" }

func indexMapping() (mapping.IndexMapping, error) {
	im := bleve.NewIndexMapping()
	err := im.AddCustomAnalyzer(keyAnalyzer, map[string]any{
		"type":          custom.Name,
		"tokenizer":     single.Name,
		"token_filters": []string{lowercase.Name},
	})
	if err != nil {
		return nil, err
	}
	field := func(analyzer string) *mapping.FieldMapping {
		fm := bleve.NewTextFieldMapping()
		fm.Analyzer = analyzer
		fm.Store = false
		fm.IncludeInAll = false
		fm.IncludeTermVectors = false
		fm.DocValues = false
		return fm
	}
	dm := bleve.NewDocumentStaticMapping()
	dm.AddFieldMappingsAt("text", field(standard.Name))
	for _, f := range []string{"mpn", "pkg"} {
		dm.AddFieldMappingsAt(f, field(keyAnalyzer))
	}
	im.DefaultMapping = dm
	im.DefaultAnalyzer = standard.Name
	im.StoreDynamic = false
	im.IndexDynamic = false
	im.DocValuesDynamic = false
	return im, nil
}

// textKey is the form of part numbers and packages in the index and in
// queries on them.
func textKey(s string) string { return strings.ToLower(NormKey(s)) }

func textDoc(kind, typ, mfr, mpn, desc, pkg sql.NullString) map[string]any {
	var words []string
	for _, v := range []sql.NullString{mfr, desc, pkg, kind, typ} {
		if v.String != "" {
			words = append(words, v.String)
		}
	}
	return map[string]any{
		"text": strings.Join(words, " "),
		"mpn":  textKey(mpn.String),
		"pkg":  textKey(pkg.String),
	}
}

// openIndex opens the index at dir. It returns errIndexBusy when another
// process holds it; any other error means missing or unreadable.
func openIndex(dir string, rw bool) (bleve.Index, error) {
	if _, err := os.Stat(dir); err != nil {
		return nil, err
	}
	cfg := map[string]any{"bolt_timeout": indexLockTimeout.String()}
	if !rw {
		cfg["read_only"] = true
	}
	ix, err := bleve.OpenUsing(dir, cfg)
	if err != nil {
		if errors.Is(err, bolterrors.ErrTimeout) || err.Error() == bolterrors.ErrTimeout.Error() {
			return nil, errIndexBusy
		}
		return nil, err
	}
	return ix, nil
}

// indexGeneration returns the catalog generation the index reflects; ok
// is false when it records none or is of another layout than this build's
// (either way it is stale).
func indexGeneration(ix bleve.Index) (int64, bool) {
	if l, err := ix.GetInternal([]byte(layoutKey)); err != nil || string(l) != indexLayout {
		return 0, false
	}
	b, err := ix.GetInternal([]byte(genKey))
	if err != nil || b == nil {
		return 0, false
	}
	g, err := strconv.ParseInt(string(b), 10, 64)
	return g, err == nil
}

// closeIndexLocked closes the open index, if any. s.mu is held.
func (s *Store) closeIndexLocked() {
	if s.ix != nil {
		s.ix.Close()
		s.ix = nil
	}
}

// currentIndexLocked returns an index that reflects catalog generation gen,
// opening or rebuilding it as needed. It returns errIndexBusy when another
// process holds the index. s.mu is held.
func (s *Store) currentIndexLocked(ctx context.Context, gen int64) (bleve.Index, error) {
	if s.ix != nil {
		if g, ok := indexGeneration(s.ix); ok && g == gen {
			return s.ix, nil
		}
		s.closeIndexLocked()
	}
	// A rebuild killed between swapping its new index in and removing the
	// old one leaves PATH.bleve.old-PID beside a current index, which no
	// rebuild would then clean: clean here, on the first use in a process.
	cleanLeftovers(s.indexDir())
	ix, err := openIndex(s.indexDir(), false)
	if errors.Is(err, errIndexBusy) {
		return nil, err
	}
	if err == nil {
		if g, ok := indexGeneration(ix); ok && g == gen {
			s.ix, s.ixRW = ix, false
			return ix, nil
		}
		ix.Close()
	}
	if err := s.rebuildLocked(ctx); err != nil {
		return nil, err
	}
	return s.ix, nil
}

// rebuildLocked builds the index from SQLite into a temporary directory
// and swaps it in, leaving it open read-only. s.mu is held.
func (s *Store) rebuildLocked(ctx context.Context) error {
	s.closeIndexLocked()
	dir := s.indexDir()
	// Hold the old index's write lock (when it opens) so that no other
	// process updates it while we rebuild.
	old, err := openIndex(dir, true)
	if errors.Is(err, errIndexBusy) {
		return err
	}
	if err != nil {
		old = nil
	}
	defer func() {
		if old != nil {
			old.Close()
		}
	}()
	cleanLeftovers(dir)
	tmp, err := os.MkdirTemp(filepath.Dir(dir), filepath.Base(dir)+".tmp-"+strconv.Itoa(os.Getpid())+"-")
	if err != nil {
		return fmt.Errorf("text index: %w", err)
	}
	os.Remove(tmp) // bleve wants to create it
	if _, err := s.buildIndex(ctx, tmp); err != nil {
		os.RemoveAll(tmp)
		return fmt.Errorf("text index: rebuild failed: %w", err)
	}
	if old != nil {
		old.Close()
		old = nil
	}
	trash := dir + ".old-" + strconv.Itoa(os.Getpid())
	os.RemoveAll(trash)
	if _, err := os.Stat(dir); err == nil {
		if err := os.Rename(dir, trash); err != nil {
			os.RemoveAll(tmp)
			return fmt.Errorf("text index: %w", err)
		}
	}
	if err := os.Rename(tmp, dir); err != nil {
		os.RemoveAll(tmp)
		return fmt.Errorf("text index: %w", err)
	}
	os.RemoveAll(trash)
	ix, err := openIndex(dir, false)
	if err != nil {
		return fmt.Errorf("text index: cannot open the rebuilt index: %w", err)
	}
	s.ix, s.ixRW = ix, false
	return nil
}

// cleanLeftovers removes directories left by rebuilds that crashed: old
// indexes always, temporary ones when their process is gone.
func cleanLeftovers(dir string) {
	olds, _ := filepath.Glob(dir + ".old-*")
	for _, o := range olds {
		os.RemoveAll(o)
	}
	removeDeadTemps(dir + ".tmp-")
}

// removeDeadTemps removes the files and directories named prefix + PID +
// "-…" whose process is gone (or whose name holds no PID): what a
// killed rebuild of the text index or the column file leaves.
func removeDeadTemps(prefix string) {
	tmps, _ := filepath.Glob(prefix + "*")
	for _, t := range tmps {
		rest := strings.TrimPrefix(t, prefix)
		pid, err := strconv.Atoi(strings.SplitN(rest, "-", 2)[0])
		if err != nil || !processAlive(pid) {
			os.RemoveAll(t)
		}
	}
}

// buildIndex writes a complete index of the catalog into dir and returns
// the number of documents. Data and generation come from one read
// transaction, so the stamp matches the content.
func (s *Store) buildIndex(ctx context.Context, dir string) (int, error) {
	m, err := indexMapping()
	if err != nil {
		return 0, err
	}
	ix, err := bleve.NewUsing(dir, m, scorch.Name, scorch.Name, map[string]any{"bolt_timeout": indexLockTimeout.String()})
	if err != nil {
		return 0, err
	}
	n, err := s.fillIndex(ctx, ix)
	if cerr := ix.Close(); err == nil {
		err = cerr
	}
	return n, err
}

// fillIndex indexes every part into the new index ix.
func (s *Store) fillIndex(ctx context.Context, ix bleve.Index) (int, error) {
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return 0, err
	}
	defer tx.Rollback()
	gen, err := generation(ctx, tx)
	if err != nil {
		return 0, err
	}
	var total int
	if err := tx.QueryRowContext(ctx, `SELECT count(*) FROM parts`).Scan(&total); err != nil {
		return 0, err
	}
	if total > 20000 {
		s.notify("building the text index of %d parts…", total)
	}
	rows, err := tx.QueryContext(ctx, `SELECT `+textFieldSQL+` FROM parts`)
	if err != nil {
		return 0, err
	}
	defer rows.Close()
	b := ix.NewBatch()
	n := 0
	for rows.Next() {
		var id int64
		var kind, typ, mfr, mpn, desc, pkg sql.NullString
		if err := rows.Scan(&id, &kind, &typ, &mfr, &mpn, &desc, &pkg); err != nil {
			return 0, err
		}
		if err := b.Index(strconv.FormatInt(id, 10), textDoc(kind, typ, mfr, mpn, desc, pkg)); err != nil {
			return 0, err
		}
		n++
		if b.Size() >= indexBatch {
			if err := ix.Batch(b); err != nil {
				return 0, err
			}
			b.Reset()
		}
	}
	if err := rows.Err(); err != nil {
		return 0, err
	}
	b.SetInternal([]byte(genKey), []byte(strconv.FormatInt(gen, 10)))
	b.SetInternal([]byte(layoutKey), []byte(indexLayout))
	return n, ix.Batch(b)
}

// updateIndex brings the index from generation prevGen to newGen after a
// commit: it re-indexes the parts in changed and deletes those in deleted.
// When the index was not at prevGen (stale, missing, unreadable) it is
// rebuilt. Failures leave the index stale (its generation is not advanced)
// and are reported through Notify only: the catalog commit stands.
func (s *Store) updateIndex(ctx context.Context, prevGen, newGen int64, changed, deleted []int64) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if err := s.updateIndexLocked(ctx, prevGen, newGen, changed, deleted); err != nil {
		if errors.Is(err, errIndexBusy) {
			s.notify("text index is in use by another process; it will be brought up to date on its next use")
			return
		}
		s.notify("text index not updated (%v); it will be rebuilt on its next use", err)
	}
}

func (s *Store) updateIndexLocked(ctx context.Context, prevGen, newGen int64, changed, deleted []int64) error {
	if s.ix != nil && !s.ixRW {
		s.closeIndexLocked()
	}
	if s.ix == nil {
		ix, err := openIndex(s.indexDir(), true)
		if errors.Is(err, errIndexBusy) {
			return err
		}
		if err != nil {
			return s.rebuildLocked(ctx)
		}
		s.ix, s.ixRW = ix, true
	}
	g, ok := indexGeneration(s.ix)
	if ok && g >= newGen {
		return nil // someone already indexed a snapshot that includes ours
	}
	if !ok || g != prevGen {
		return s.rebuildLocked(ctx)
	}
	b := s.ix.NewBatch()
	for _, id := range deleted {
		b.Delete(strconv.FormatInt(id, 10))
	}
	for start := 0; start < len(changed); start += indexBatch {
		end := min(start+indexBatch, len(changed))
		if err := s.indexParts(ctx, b, changed[start:end]); err != nil {
			return err
		}
		if b.Size() >= indexBatch {
			if err := s.ix.Batch(b); err != nil {
				return err
			}
			b.Reset()
		}
	}
	b.SetInternal([]byte(genKey), []byte(strconv.FormatInt(newGen, 10)))
	return s.ix.Batch(b)
}

// indexParts adds the current text of parts ids to b; ids no longer in the
// catalog are deleted.
func (s *Store) indexParts(ctx context.Context, b *bleve.Batch, ids []int64) error {
	rows, err := s.db.QueryContext(ctx, `SELECT `+textFieldSQL+` FROM parts WHERE parts.id IN (SELECT value FROM json_each(?))`, idsJSON(ids))
	if err != nil {
		return err
	}
	defer rows.Close()
	seen := make(map[int64]bool, len(ids))
	for rows.Next() {
		var id int64
		var kind, typ, mfr, mpn, desc, pkg sql.NullString
		if err := rows.Scan(&id, &kind, &typ, &mfr, &mpn, &desc, &pkg); err != nil {
			return err
		}
		seen[id] = true
		if err := b.Index(strconv.FormatInt(id, 10), textDoc(kind, typ, mfr, mpn, desc, pkg)); err != nil {
			return err
		}
	}
	if err := rows.Err(); err != nil {
		return err
	}
	for _, id := range ids {
		if !seen[id] {
			b.Delete(strconv.FormatInt(id, 10))
		}
	}
	return nil
}

func idsJSON(ids []int64) string {
	b := make([]byte, 0, 8*len(ids)+2)
	b = append(b, '[')
	for i, id := range ids {
		if i > 0 {
			b = append(b, ',')
		}
		b = strconv.AppendInt(b, id, 10)
	}
	return string(append(b, ']'))
}

// splitTerms splits user text into lower-case terms at white space and
// commas; surrounding punctuation is trimmed.
func splitTerms(text string) []string {
	var out []string
	for _, f := range strings.FieldsFunc(strings.ToLower(text), func(r rune) bool { return unicode.IsSpace(r) || r == ',' || r == ';' }) {
		f = strings.TrimFunc(f, func(r rune) bool { return unicode.IsPunct(r) && r != '%' && r != '.' && r != '/' })
		if f != "" {
			out = append(out, f)
		}
	}
	return out
}

// textQuery builds the bleve query for user text. Every term must match
// (conjunction); a term matches when any of these does:
//
//   - the text field (manufacturer, description, package, kind and type)
//     holds every word of the term as the standard analyser splits it;
//     a word may differ by one edit when the term has 4 or 5 characters,
//     by two when it has 6 or more, so "shotky" finds "Schottky"; only
//     for terms made of letters alone, since a fuzzy part number or
//     package code matches the wrong parts;
//   - the part number or package key is the term's key
//     (lower(NormKey(term))), boost 2;
//   - the part number or package key starts with the term's key, for
//     keys of 3 or more characters (shorter prefixes expand to too many
//     terms).
//
// It returns nil when the text holds no term.
func textQuery(text string) query.Query { return textQueryFor(text, nil) }

// textQueryFor is textQuery for the index ix: it leaves out the part
// number and package clauses that match nothing in ix (a dictionary
// look-up each), and builds a clause of one query without the
// disjunction or conjunction around it. Each such layer handles every
// hit below it, so for a word in 289,000 of 1,000,000 parts this is 27 ms
// instead of 49 ms. With ix nil nothing is left out.
func textQueryFor(text string, ix bleve.Index) query.Query {
	var conj []query.Query
	for _, term := range splitTerms(text) {
		var dis []query.Query
		fuzziness := 0
		switch n := len([]rune(term)); {
		case !allLetters(term): // part numbers and package codes are never fuzzy
		case n >= 6:
			fuzziness = 2
		case n >= 4:
			fuzziness = 1
		}
		var words []query.Query
		for _, tok := range wordAnalyzer().Analyze([]byte(term)) {
			w := string(tok.Term)
			if fuzziness > 0 {
				fq := bleve.NewFuzzyQuery(w)
				fq.SetField("text")
				fq.SetFuzziness(fuzziness)
				words = append(words, fq)
			} else {
				tq := bleve.NewTermQuery(w)
				tq.SetField("text")
				words = append(words, tq)
			}
		}
		if len(words) > 0 {
			dis = append(dis, oneOrAll(words))
		}
		if key := textKey(term); key != "" {
			for _, f := range []string{"mpn", "pkg"} {
				prefix := len([]rune(key)) >= 3
				if prefix && !indexHas(ix, f, key, true) {
					continue // no key starts with it, so none is it
				}
				if indexHas(ix, f, key, false) {
					tq := bleve.NewTermQuery(key)
					tq.SetField(f)
					tq.SetBoost(2)
					dis = append(dis, tq)
				}
				if prefix {
					pq := bleve.NewPrefixQuery(key)
					pq.SetField(f)
					dis = append(dis, pq)
				}
			}
		}
		switch len(dis) {
		case 0:
			conj = append(conj, bleve.NewMatchNoneQuery())
		case 1:
			conj = append(conj, dis[0])
		default:
			conj = append(conj, bleve.NewDisjunctionQuery(dis...))
		}
	}
	if len(conj) == 0 {
		return nil
	}
	return oneOrAll(conj)
}

// oneOrAll is qs[0] alone or the conjunction of qs.
func oneOrAll(qs []query.Query) query.Query {
	if len(qs) == 1 {
		return qs[0]
	}
	return bleve.NewConjunctionQuery(qs...)
}

var (
	wordAnalyzerOnce sync.Once
	wordAnalyzerVal  analysis.Analyzer
)

// wordAnalyzer is the analyser of the text field (standard).
func wordAnalyzer() analysis.Analyzer {
	wordAnalyzerOnce.Do(func() {
		wordAnalyzerVal = bleve.NewIndexMapping().AnalyzerNamed(standard.Name)
	})
	return wordAnalyzerVal
}

// indexHas reports whether field of ix holds the term key (or, with
// prefix, a term starting with key); true when ix is nil or cannot tell.
func indexHas(ix bleve.Index, field, key string, prefix bool) bool {
	if ix == nil {
		return true
	}
	var d index.FieldDict
	var err error
	if prefix {
		d, err = ix.FieldDictPrefix(field, []byte(key))
	} else {
		d, err = ix.FieldDictRange(field, []byte(key), []byte(key))
	}
	if err != nil {
		return true
	}
	defer d.Close()
	e, err := d.Next()
	return err != nil || e != nil && (prefix || e.Term == key)
}

// textSearch returns the ids of the hits ranked [from, from+size) of the
// query of text (textQueryFor), best first when scored, and the total number of hits
// (exact when scored; see textAll otherwise). ok is false when the index
// is held by another process and cannot be brought up to date: the caller
// falls back to a substring search in SQLite.
//
// The cost of a scored search is that of scoring every hit (about 70 ns a
// posting at 1,000,000 parts) plus keeping the best from+size of them, so
// asking for a few more than needed is cheap and asking for TextCap is
// not (about 10× a page of 50).
func (s *Store) textSearch(ctx context.Context, text string, scored bool, from, size int) (ids []int64, total uint64, ok bool, err error) {
	gen, err := generation(ctx, s.db)
	if err != nil {
		return nil, 0, false, err
	}
	s.mu.Lock()
	defer s.mu.Unlock()
	ix, err := s.currentIndexLocked(ctx, gen)
	if errors.Is(err, errIndexBusy) {
		s.notify("text index is in use by another process; using a plain substring search")
		return nil, 0, false, nil
	}
	if err != nil {
		s.notify("text index unavailable (%v); using a plain substring search", err)
		return nil, 0, false, nil
	}
	q := textQueryFor(text, ix)
	if q == nil {
		return nil, 0, true, nil
	}
	req := bleve.NewSearchRequestOptions(q, size, from, false)
	if !scored {
		req.Score = bleve.ScoreNone
	}
	res, err := ix.SearchInContext(ctx, req)
	if err != nil {
		return nil, 0, false, fmt.Errorf("text search: %w", err)
	}
	ids = make([]int64, 0, len(res.Hits))
	for _, h := range res.Hits {
		id, err := strconv.ParseInt(h.ID, 10, 64)
		if err != nil {
			continue // not one of ours; SQLite is the truth
		}
		ids = append(ids, id)
	}
	return ids, res.Total, true, nil
}

// textAll returns the ids of all hits of text, in no particular order, when
// there are at most TextCap, else the TextCap best; total is the number of
// hits. An unscored search stops after the hits it was asked for (its
// total then counts only those), so it asks for TextCap+1: more means
// capped, and a scored search then picks the best and counts them all.
func (s *Store) textAll(ctx context.Context, text string) (ids []int64, total uint64, ok bool, err error) {
	ids, total, ok, err = s.textSearch(ctx, text, false, 0, TextCap+1)
	if err != nil || !ok || len(ids) <= TextCap && total <= uint64(TextCap) {
		return ids, total, ok, err
	}
	return s.textSearch(ctx, text, true, 0, TextCap)
}

// allLetters reports whether s is made of letters only.
func allLetters(s string) bool {
	for _, r := range s {
		if !unicode.IsLetter(r) {
			return false
		}
	}
	return s != ""
}
