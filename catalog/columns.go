package catalog

import (
	"bufio"
	"context"
	"database/sql"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"sync"
	"unsafe"
)

// The column file: a typed, columnar copy of the catalog's number fields,
// for the scans that read every part of a kind (`partsieve pick`). Reading
// a million rows through SQLite costs seconds (each row is a wide record
// of the parts table, read and converted column by column); the same
// numbers read from a packed file cost a small fraction of that.
//
// The file, <catalog>.cols, is a cache: SQLite stays the truth. It
// records the catalog state it reflects: the generation (meta), the
// largest part id and the time of the latest import (so that a catalog
// deleted and built again, or another catalog file copied in its place,
// does not match by chance), and is used only while all three match the
// reading transaction;
// otherwise the reader rebuilds it from that transaction (and saves it
// when it can). An import refreshes it after its commit, like the text
// index. It is written to a temporary file and renamed, so a reader
// sees a whole old or a whole new file; a damaged file fails its
// checksums and is rebuilt.
//
// Layout (little-endian):
//
//	magic "PSCOLS08"
//	payloads, one per set, rows in the catalog's canonical order
//	(normalised part number, then maker: the order of the identity
//	index), column by column:
//	    id int64 × rows, ord uint32 × rows (position in that order over
//	    the whole catalog),
//	    per field of the directory: float64 × rows (NaN where absent),
//	    mfr, fuse_std, rerate: a dictionary (uvarint count, then each
//	    string as uvarint length + bytes) and uint32 × rows indexes,
//	    mpn: uint32 × rows end offsets, then the bytes,
//	    offers: uint32 × rows end offsets, then the bytes: per part a
//	    digest of its offers in catalog order (supplier, SKU): uvarint
//	    count, then per offer its currency and its price breaks as
//	    stored (JSON), each as uvarint length + bytes
//	directory: gen int64, maxID int64, stamp (string), nsets uint32,
//	    per set: kind, type (strings), rows uint32, nfields uint32, field
//	    names (strings), offset uint64, length uint64, checksum uint64 of
//	    the payload up to the offers section (see colSum), the offset of
//	    that section in the payload uint64, its checksum uint64 (checked
//	    when a part's offers are first read: a pick reads a few)
//	trailer: directory offset uint64, directory length uint32,
//	    "PSCOLEND"
//
// A set holds the parts of one kind and type; its fields are the Number
// fields of the kind that at least one of its parts has. Writing streams
// the rows into one spill file per set, then turns each set into columns
// in turn, so memory stays at one set.

var colsMagic = []byte("PSCOLS08")

var colsTrailer = []byte("PSCOLEND")

// colSum is the payload check of a set: h ← h·P + w (mod 2⁶⁴) over the
// payload's little-endian 64-bit words (a partial tail word zero-padded),
// then h ← h·P + length. P is odd, so P is invertible mod 2⁶⁴ and a change
// of any single word always changes h; a truncated or shifted payload
// changes it with overwhelming likelihood. It runs at memory speed, which
// a CRC does not (CRC-32C measured 0.18 s for 136 MB here, this 0.02 s).
// It is computed as the payload is written (write, then result).
type colSum struct {
	h    uint64
	part [8]byte
	np   int
}

const colSumP = 0x9E3779B97F4A7C15 // odd (2⁶⁴/φ, common practice as a multiplier)

func (c *colSum) write(b []byte) {
	if c.np > 0 {
		k := copy(c.part[c.np:], b)
		c.np += k
		b = b[k:]
		if c.np < 8 {
			return
		}
		c.h = c.h*colSumP + binary.LittleEndian.Uint64(c.part[:])
		c.np = 0
	}
	for len(b) >= 8 {
		c.h = c.h*colSumP + binary.LittleEndian.Uint64(b)
		b = b[8:]
	}
	c.np = copy(c.part[:], b)
}

// result returns the check of the n bytes written.
func (c *colSum) result(n uint64) uint64 {
	h := c.h
	if c.np > 0 {
		var t [8]byte
		copy(t[:], c.part[:c.np])
		h = h*colSumP + binary.LittleEndian.Uint64(t[:])
	}
	return h*colSumP + n
}

// checksum returns the colSum of b.
func checksum(b []byte) uint64 {
	var c colSum
	c.write(b)
	return c.result(uint64(len(b)))
}

// ColumnSet holds the parts of one kind and type in canonical order:
// normalised part number, then normalised maker (NormKey). Its slices may
// point into the mapped column file: they are valid until the Columns
// they came from is closed.
type ColumnSet struct {
	Kind Kind
	Type string
	ID   []int64
	// Ord is each part's position in the canonical order over all sets,
	// for merging sets.
	Ord []uint32
	// Fields are the Number fields present in at least one row; Num[k][i]
	// is field Fields[k] of row i, NaN when absent.
	Fields []string
	Num    [][]float64

	mfr, fstd, rer dictCol
	mpnEnds        []byte // uint32 end offsets into mpnBlob
	mpnBlob        string
	// the offers section, in the mapped file (valid until Close),
	// checked and split into ends and bytes on first use
	offSec  []byte
	offSum  uint64
	offOnce sync.Once
	offErr  error
	offEnds []byte // uint32 end offsets into offBlob
	offBlob []byte
}

// openOffers checks the offers section and splits it.
func (cs *ColumnSet) openOffers() error {
	cs.offOnce.Do(func() {
		b, n := cs.offSec, len(cs.ID)
		if checksum(b) != cs.offSum || len(b) < 4*n {
			cs.offErr = errStale
			return
		}
		ends, blob := b[:4*n], b[4*n:]
		prev := uint32(0)
		for i := 0; i < n; i++ {
			end := binary.LittleEndian.Uint32(ends[4*i:])
			if end < prev {
				cs.offErr = errStale
				return
			}
			prev = end
		}
		if uint64(prev) != uint64(len(blob)) {
			cs.offErr = errStale
			return
		}
		cs.offEnds, cs.offBlob = ends, blob
	})
	return cs.offErr
}

// dictCol is a text column: a dictionary and one uint32 index per row.
type dictCol struct {
	words []string
	idx   []byte
}

func (d *dictCol) at(i int) string {
	if d.words == nil {
		return ""
	}
	return d.words[binary.LittleEndian.Uint32(d.idx[4*i:])]
}

// Len returns the number of parts of the set.
func (cs *ColumnSet) Len() int { return len(cs.ID) }

// Mfr returns the maker of row i.
func (cs *ColumnSet) Mfr(i int) string { return cs.mfr.at(i) }

// FuseStd returns the fuse rating convention of row i ("" for other kinds).
func (cs *ColumnSet) FuseStd(i int) string { return cs.fstd.at(i) }

// Rerate returns the fuse rerating points of row i ("" for other kinds).
func (cs *ColumnSet) Rerate(i int) string { return cs.rer.at(i) }

// MPN returns the part number of row i.
func (cs *ColumnSet) MPN(i int) string {
	start := uint32(0)
	if i > 0 {
		start = binary.LittleEndian.Uint32(cs.mpnEnds[4*(i-1):])
	}
	return cs.mpnBlob[start:binary.LittleEndian.Uint32(cs.mpnEnds[4*i:])]
}

// Offers returns what the catalog's offers of row i say about price:
// each offer's currency and price breaks, in catalog order (supplier,
// SKU); supplier, SKU, stock and minimum order are not kept here. Valid
// until the Columns is closed.
func (cs *ColumnSet) Offers(i int) ([]Offer, error) {
	offs, _, err := cs.OffersInto(i, nil, nil)
	return offs, err
}

// OffersInto is Offers appending to dst, with the price breaks appended
// to brk (the offers' Breaks point into the returned breaks slice): for a
// caller that reads many parts' offers one after the other and reuses
// both buffers.
func (cs *ColumnSet) OffersInto(i int, dst []Offer, brk []PriceBreak) ([]Offer, []PriceBreak, error) {
	if err := cs.openOffers(); err != nil {
		return nil, nil, err
	}
	start := uint32(0)
	if i > 0 {
		start = binary.LittleEndian.Uint32(cs.offEnds[4*(i-1):])
	}
	b := cs.offBlob[start:binary.LittleEndian.Uint32(cs.offEnds[4*i:])]
	cnt, k := binary.Uvarint(b)
	if k <= 0 || cnt > uint64(len(b)) {
		return nil, nil, errStale
	}
	b = b[k:]
	text := func() ([]byte, bool) {
		l, k := binary.Uvarint(b)
		if k <= 0 || l > uint64(len(b)-k) {
			return nil, false
		}
		t := b[k : k+int(l)]
		b = b[k+int(l):]
		return t, true
	}
	// the breaks of all offers go into brk first; the offers take their
	// slices after, as appending may move brk
	type span struct{ lo, hi int }
	var spans [8]span
	sp := spans[:0]
	first := len(dst)
	for range cnt {
		cur, ok1 := text()
		br, ok2 := text()
		if !ok1 || !ok2 {
			return nil, nil, errStale
		}
		lo := len(brk)
		var ok bool
		if brk, ok = appendCanonicalBreaks(brk, br); !ok {
			breaks, err := decodeBreaks(string(br))
			if err != nil {
				return nil, nil, fmt.Errorf("price breaks of an offer of part %s: %w", cs.MPN(i), err)
			}
			brk = append(brk[:lo], breaks...)
		}
		sp = append(sp, span{lo, len(brk)})
		dst = append(dst, Offer{Currency: string(cur)})
	}
	if len(b) != 0 {
		return nil, nil, errStale
	}
	for k, s := range sp {
		if s.hi > s.lo {
			dst[first+k].Breaks = brk[s.lo:s.hi:s.hi]
		}
	}
	return dst, brk, nil
}

// appendCanonicalBreaks reads price breaks in the text the catalog
// stores ([[qty,price],…], spaces allowed) without allocating, appending
// them to dst; ok is false for any other shape (the caller then uses
// decodeBreaks). Numbers are read with strconv.ParseFloat as encoding/json
// reads them, so the values are the same.
func appendCanonicalBreaks(dst []PriceBreak, b []byte) ([]PriceBreak, bool) {
	s := unsafe.String(unsafe.SliceData(b), len(b)) // read only here
	i := 0
	space := func() {
		for i < len(s) && (s[i] == ' ' || s[i] == '\t' || s[i] == '\n' || s[i] == '\r') {
			i++
		}
	}
	expect := func(c byte) bool {
		space()
		if i < len(s) && s[i] == c {
			i++
			return true
		}
		return false
	}
	number := func() (float64, bool) {
		space()
		j := i
		for i < len(s) {
			c := s[i]
			if c == '-' || c == '+' || c == '.' || c == 'e' || c == 'E' || c >= '0' && c <= '9' {
				i++
				continue
			}
			break
		}
		if j == i || s[j] != '-' && (s[j] < '0' || s[j] > '9') {
			return 0, false
		}
		f, err := strconv.ParseFloat(s[j:i], 64)
		return f, err == nil
	}
	n := len(dst)
	if !expect('[') {
		return dst[:n], false
	}
	if expect(']') {
		space()
		return dst, i == len(s)
	}
	for {
		if !expect('[') {
			return dst[:n], false
		}
		q, ok1 := number()
		if !ok1 || !expect(',') {
			return dst[:n], false
		}
		p, ok2 := number()
		if !ok2 || !expect(']') {
			return dst[:n], false
		}
		dst = append(dst, PriceBreak{Qty: int64(q), Price: p})
		if expect(']') {
			space()
			if i != len(s) {
				return dst[:n], false
			}
			return dst, true
		}
		if !expect(',') {
			return dst[:n], false
		}
	}
}

// Col returns the column of a Number field, nil when no part of the set
// has it.
func (cs *ColumnSet) Col(name string) []float64 {
	for k, f := range cs.Fields {
		if f == name {
			return cs.Num[k]
		}
	}
	return nil
}

// Columns is a columnar copy of some sets of the catalog at generation
// Gen. Close it when done (it may hold the column file mapped).
type Columns struct {
	Gen   int64
	Sets  []*ColumnSet
	close func()
}

// Close releases the column file; the sets' slices are invalid after it.
func (c *Columns) Close() {
	if c.close != nil {
		c.close()
		c.close = nil
	}
	c.Sets = nil
}

// setInfo is one entry of the file's directory.
type setInfo struct {
	kind    Kind
	typ     string
	rows    uint32
	fields  []string // the kind's Number fields
	present []uint32 // per field: rows that have it
	offset  uint64
	length  uint64
	sum     uint64 // of the payload up to the offers (length split)
	split   uint64
	osum    uint64 // of the offers section (from split to length)
}

// kindNumFields returns the Number fields of kind k, in dictionary order.
func kindNumFields(k Kind) []string {
	var out []string
	for i := range Fields {
		f := &Fields[i]
		if f.Type == Number && f.AppliesTo(k) {
			out = append(out, f.Name)
		}
	}
	return out
}

func (s *Store) colsPath() string { return s.Path + ".cols" }

// View is a consistent read of the catalog: one read transaction, for
// callers that read the column file and then some parts in full.
type View struct {
	s   *Store
	tx  *sql.Tx
	Gen int64
	st  colStamp
}

// colStamp is the catalog state a column file reflects.
type colStamp struct {
	gen, maxID int64
	sources    string // time of the latest import
}

// View begins a read transaction. Close it when done.
func (s *Store) View(ctx context.Context) (*View, error) {
	tx, err := s.db.BeginTx(ctx, &sql.TxOptions{ReadOnly: true})
	if err != nil {
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	v := &View{s: s, tx: tx}
	if v.Gen, err = generation(ctx, tx); err == nil {
		var m sql.NullInt64
		var t sql.NullString
		err = tx.QueryRowContext(ctx, `SELECT (SELECT max(id) FROM parts), (SELECT max(time) FROM sources)`).Scan(&m, &t)
		v.st = colStamp{gen: v.Gen, maxID: m.Int64, sources: t.String}
	}
	if err != nil {
		tx.Rollback()
		return nil, fmt.Errorf("catalog %s: %w", s.Path, err)
	}
	return v, nil
}

// Close ends the view's transaction.
func (v *View) Close() error { return v.tx.Rollback() }

// Parts returns the parts with the given ids, in full with their offers,
// in the order of ids; ids not in the catalog are left out.
func (v *View) Parts(ctx context.Context, ids []int64) ([]Part, []int64, error) {
	if len(ids) == 0 {
		return nil, nil, nil
	}
	ps, got, err := scanParts(ctx, v.tx, `SELECT parts.id, `+partJSON()+` FROM json_each(?) AS t CROSS JOIN parts ON parts.id = t.value ORDER BY t.key`, idsJSON(ids))
	if err == nil {
		err = loadOffers(ctx, v.tx, ps, got)
	}
	if err != nil {
		return nil, nil, fmt.Errorf("catalog %s: %w", v.s.Path, err)
	}
	return ps, got, nil
}

// Offers returns the offers of the parts with the given ids, by id.
func (v *View) Offers(ctx context.Context, ids []int64) (map[int64][]Offer, error) {
	out := make(map[int64][]Offer, len(ids))
	if len(ids) == 0 {
		return out, nil
	}
	ps := make([]Part, len(ids))
	if err := loadOffers(ctx, v.tx, ps, ids); err != nil {
		return nil, fmt.Errorf("catalog %s: offers: %w", v.s.Path, err)
	}
	for i := range ps {
		if len(ps[i].Offers) > 0 {
			out[ids[i]] = ps[i].Offers
		}
	}
	return out, nil
}

// Columns returns the column sets that want accepts (nil: all), from the
// column file when it matches the view, else rebuilt from the view's
// transaction (and saved for the next reader when possible).
func (v *View) Columns(ctx context.Context, want func(k Kind, typ string) bool) (*Columns, error) {
	if c, err := readColumns(v.s.colsPath(), v.st, want); err == nil {
		return c, nil
	}
	path, err := v.s.writeColumns(ctx, v.tx, v.st)
	if err != nil {
		return nil, fmt.Errorf("catalog %s: column file: %w", v.s.Path, err)
	}
	c, err := readColumns(path, v.st, want)
	if path != v.s.colsPath() {
		os.Remove(path)
	}
	if err != nil {
		return nil, fmt.Errorf("catalog %s: column file: %w", v.s.Path, err)
	}
	return c, nil
}

// RefreshColumns rewrites the column file from the current catalog when
// it does not match it. Failure leaves the file stale (rebuilt by its next
// reader); the error says why.
func (s *Store) RefreshColumns(ctx context.Context) error {
	v, err := s.View(ctx)
	if err != nil {
		return err
	}
	defer v.Close()
	if _, err := readColumnsHeader(s.colsPath(), v.st); err == nil {
		return nil
	}
	path, err := s.writeColumns(ctx, v.tx, v.st)
	if err != nil {
		return err
	}
	if path != s.colsPath() {
		os.Remove(path)
		return errors.New("the column file could not be saved")
	}
	return nil
}

// ColumnFileState says whether the column file reflects the catalog:
// "current", "missing", "stale" (it reflects another state of the
// catalog, or its directory is unreadable) or "damaged" (a section fails
// its check). The file is a cache: in the last three cases the next pick
// rebuilds it (or `partsieve catalog reindex` does).
func (s *Store) ColumnFileState(ctx context.Context) (string, error) {
	v, err := s.View(ctx)
	if err != nil {
		return "", err
	}
	defer v.Close()
	if _, err := os.Stat(s.colsPath()); errors.Is(err, fs.ErrNotExist) {
		return "missing", nil
	}
	if _, err := readColumnsHeader(s.colsPath(), v.st); err != nil {
		return "stale", nil
	}
	c, err := readColumns(s.colsPath(), v.st, nil)
	if err != nil {
		return "damaged", nil
	}
	defer c.Close()
	for _, cs := range c.Sets {
		if cs.openOffers() != nil {
			return "damaged", nil
		}
	}
	return "current", nil
}

// refreshColumnsAfterChange brings the column file up to date after a
// committed change; a failure only leaves it stale (its next reader
// rebuilds it), so it is reported, not returned.
func (s *Store) refreshColumnsAfterChange(ctx context.Context) {
	if err := s.RefreshColumns(ctx); err != nil && ctx.Err() == nil {
		s.notify("column file not refreshed (%v); the next pick rebuilds it", err)
	}
}

// cleanColumnLeftovers removes temporary column files of processes that
// are gone.
func cleanColumnLeftovers(path string) { removeDeadTemps(path + ".tmp-") }

// colChunkRows is how many rows of a set are held in memory while the
// file is written: full chunks go to the set's spill file column by
// column, and the file is then assembled column by column from the
// chunks, so memory stays at a chunk per set whatever the catalog's size.
const colChunkRows = 2048

// refreshCacheKiB is the SQLite page cache (KiB) of the connection that
// reads the catalog for the column file. The read walks the identity
// index and jumps to each row and its offers: a cache cannot hold a large
// catalog anyway (the pages come from the operating system's file cache),
// and the default 64 MiB one cost ~130 MB of resident memory at a
// million parts (measured). Tool choice.
const refreshCacheKiB = 8192

// dictBuilder gives each distinct string an index, in order of first
// appearance.
type dictBuilder struct {
	at    map[string]uint32
	words []string
}

func (d *dictBuilder) index(s string) uint32 {
	if k, ok := d.at[s]; ok {
		return k
	}
	if d.at == nil {
		d.at = map[string]uint32{}
	}
	k := uint32(len(d.words))
	d.at[s] = k
	d.words = append(d.words, s)
	return k
}

// The blocks of a spilled chunk, in the order they are written: ids,
// ords, one per field of the kind, the three dictionary indexes, the
// part-number ends and bytes, the offer ends and bytes.
const (
	blkID = iota
	blkOrd
	blkNum // first number field; the dictionary blocks follow the fields
)

// setSpill is one set while the file is written.
type setSpill struct {
	info   setInfo // fields: all Number fields of the kind
	f      *os.File
	w      *bufio.Writer
	size   int64
	chunks [][]int64 // per chunk: the offset of each block, then the end

	dicts              [3]dictBuilder // mfr, fuse_std, rerate
	mpnTotal, offTotal uint64
	id                 []int64
	ord                []uint32
	num                [][]float64
	dix                [3][]uint32
	mpnEnd, offEnd     []uint32 // ends within the chunk
	mpn, offers        []byte
	enc                []byte
}

func newSetSpill(f *os.File, k Kind, typ string, fields []string) *setSpill {
	sp := &setSpill{info: setInfo{kind: k, typ: typ, fields: fields, present: make([]uint32, len(fields))},
		f: f, w: bufio.NewWriterSize(f, 1<<16), num: make([][]float64, len(fields))}
	return sp
}

// add appends a part to the chunk (its offers follow with setOffers).
func (sp *setSpill) add(id int64, ord uint32, nums []sql.NullFloat64, numIdx []int, mfr, mpn, fstd, rer string) error {
	if len(sp.id) == colChunkRows {
		if err := sp.flush(); err != nil {
			return err
		}
	}
	sp.id = append(sp.id, id)
	sp.ord = append(sp.ord, ord)
	for j, c := range numIdx {
		v := math.NaN()
		if nums[c].Valid {
			v = nums[c].Float64
			sp.info.present[j]++
		}
		sp.num[j] = append(sp.num[j], v)
	}
	for d, t := range [3]string{mfr, fstd, rer} {
		sp.dix[d] = append(sp.dix[d], sp.dicts[d].index(t))
	}
	sp.mpn = append(sp.mpn, mpn...)
	sp.mpnEnd = append(sp.mpnEnd, uint32(len(sp.mpn)))
	sp.mpnTotal += uint64(len(mpn))
	sp.info.rows++
	return nil
}

// setOffers records the offers digest of the part added last.
func (sp *setSpill) setOffers(digest []byte) {
	sp.offers = append(sp.offers, digest...)
	sp.offEnd = append(sp.offEnd, uint32(len(sp.offers)))
	sp.offTotal += uint64(len(digest))
}

// flush writes the chunk to the spill, block by block.
func (sp *setSpill) flush() error {
	n := len(sp.id)
	if n == 0 {
		return nil
	}
	offs := make([]int64, 0, blkNum+len(sp.num)+8)
	put := func(b []byte) error {
		offs = append(offs, sp.size)
		_, err := sp.w.Write(b)
		sp.size += int64(len(b))
		return err
	}
	e := sp.enc[:0]
	for _, v := range sp.id {
		e = binary.LittleEndian.AppendUint64(e, uint64(v))
	}
	mark := []int{len(e)}
	for _, v := range sp.ord {
		e = binary.LittleEndian.AppendUint32(e, v)
	}
	mark = append(mark, len(e))
	for _, col := range sp.num {
		for _, v := range col {
			e = binary.LittleEndian.AppendUint64(e, math.Float64bits(v))
		}
		mark = append(mark, len(e))
	}
	for _, ix := range sp.dix {
		for _, v := range ix {
			e = binary.LittleEndian.AppendUint32(e, v)
		}
		mark = append(mark, len(e))
	}
	for _, v := range sp.mpnEnd {
		e = binary.LittleEndian.AppendUint32(e, v)
	}
	mark = append(mark, len(e))
	e = append(e, sp.mpn...)
	mark = append(mark, len(e))
	for _, v := range sp.offEnd {
		e = binary.LittleEndian.AppendUint32(e, v)
	}
	mark = append(mark, len(e))
	e = append(e, sp.offers...)
	mark = append(mark, len(e))
	prev := 0
	for _, m := range mark {
		if err := put(e[prev:m]); err != nil {
			return err
		}
		prev = m
	}
	offs = append(offs, sp.size)
	sp.enc = e
	sp.chunks = append(sp.chunks, offs)
	sp.id, sp.ord, sp.mpnEnd, sp.offEnd = sp.id[:0], sp.ord[:0], sp.mpnEnd[:0], sp.offEnd[:0]
	sp.mpn, sp.offers = sp.mpn[:0], sp.offers[:0]
	for j := range sp.num {
		sp.num[j] = sp.num[j][:0]
	}
	for d := range sp.dix {
		sp.dix[d] = sp.dix[d][:0]
	}
	return nil
}

// payloadWriter writes a set's payload, keeping its length and checksum.
type payloadWriter struct {
	w     *bufio.Writer
	n     uint64
	sum   colSum
	err   error
	split uint64 // where the offers section starts
	sum1  uint64 // the check of the payload before it
}

// startOffers ends the first checked section: the offers section is
// checked apart, when first read.
func (p *payloadWriter) startOffers() {
	p.split, p.sum1 = p.n, p.sum.result(p.n)
	p.sum = colSum{}
}

func (p *payloadWriter) write(b []byte) {
	if p.err != nil {
		return
	}
	_, p.err = p.w.Write(b)
	p.sum.write(b)
	p.n += uint64(len(b))
}

func (p *payloadWriter) pad(k uint64) {
	var z [8]byte
	if r := p.n % k; r != 0 {
		p.write(z[:k-r])
	}
}

// assemble writes the set's payload (the layout above) from its chunks.
func (sp *setSpill) assemble(p *payloadWriter) error {
	if err := sp.flush(); err != nil {
		return err
	}
	if err := sp.w.Flush(); err != nil {
		return err
	}
	if sp.mpnTotal > math.MaxUint32 || sp.offTotal > math.MaxUint32 {
		return fmt.Errorf("a set of %d parts has more than 4 GiB of part numbers or offers", sp.info.rows)
	}
	var buf []byte
	block := func(c []int64, b int) []byte {
		if p.err != nil {
			return nil
		}
		l := int(c[b+1] - c[b])
		buf = slices.Grow(buf[:0], l)[:l]
		if _, err := sp.f.ReadAt(buf, c[b]); err != nil {
			p.err = fmt.Errorf("column spill: %w", err)
			return nil
		}
		return buf
	}
	copyBlocks := func(b int) {
		for _, c := range sp.chunks {
			p.write(block(c, b))
		}
	}
	nf := len(sp.num)
	dictBlk := blkNum + nf
	mpnEndBlk := dictBlk + 3
	copyBlocks(blkID)
	copyBlocks(blkOrd)
	p.pad(8)
	for j := range nf {
		if sp.info.present[j] > 0 {
			copyBlocks(blkNum + j)
		}
	}
	for d := range sp.dicts {
		words := sp.dicts[d].words
		if len(words) == 0 {
			words = []string{""}
		}
		h := binary.AppendUvarint(nil, uint64(len(words)))
		for _, w := range words {
			h = appendString(h, w)
		}
		p.write(h)
		p.pad(4)
		copyBlocks(dictBlk + d)
	}
	// ends run over the whole set: each chunk's are shifted by what the
	// chunks before it hold
	ends := func(b int) {
		base := uint32(0)
		for _, c := range sp.chunks {
			e := block(c, b)
			last := uint32(0)
			for i := 0; i+4 <= len(e); i += 4 {
				last = binary.LittleEndian.Uint32(e[i:])
				binary.LittleEndian.PutUint32(e[i:], last+base)
			}
			p.write(e)
			base += last
		}
	}
	ends(mpnEndBlk)
	copyBlocks(mpnEndBlk + 1)
	p.startOffers()
	ends(mpnEndBlk + 2)
	copyBlocks(mpnEndBlk + 3)
	return p.err
}

// appendOfferDigest appends one offer to a part's offers digest: its
// currency and its price breaks as stored (JSON text, decoded on use).
func appendOfferDigest(b []byte, currency, breaks string) []byte {
	return appendString(appendString(b, currency), breaks)
}

// offerDigests is the spill of every part's offers digest (see the
// layout), read back by part id.
type offerDigests struct {
	f   *os.File
	at  []digestAt         // by part id (dense ids)
	atM map[int64]digestAt // the same when ids are sparse
}

// digestAt is where a part's digest is in the spill; n is 0 when the
// part has no offers.
type digestAt struct {
	off int64
	n   uint32
}

// noOffers is the digest of a part without offers: a count of 0.
var noOffers = []byte{0}

// spillOfferDigests reads the offers in key order (part id, supplier,
// SKU: the order they were written in, so the reads are sequential) and
// writes each part's digest to a temporary file.
func spillOfferDigests(ctx context.Context, q queryer, dir, prefix string, maxID int64) (*offerDigests, error) {
	f, err := os.CreateTemp(dir, prefix+"offers-")
	if err != nil {
		return nil, err
	}
	d := &offerDigests{f: f}
	ok := false
	defer func() {
		if !ok {
			d.close()
		}
	}()
	var nParts int64
	if err := q.QueryRowContext(ctx, `SELECT count(*) FROM parts`).Scan(&nParts); err != nil {
		return nil, err
	}
	if maxID >= 0 && maxID <= 4*nParts+1024 {
		d.at = make([]digestAt, maxID+1)
	} else {
		d.atM = map[int64]digestAt{}
	}
	rows, err := q.QueryContext(ctx, `SELECT part_id, currency, breaks FROM offers ORDER BY part_id, supplier_key, sku`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	w := bufio.NewWriterSize(f, 1<<16)
	var size int64
	var pid, last int64
	var cur, breaks string
	n := 0
	var entries, digest []byte
	flush := func() error {
		if n == 0 {
			return nil
		}
		digest = binary.AppendUvarint(digest[:0], uint64(n))
		digest = append(digest, entries...)
		if len(digest) > math.MaxUint32 {
			return fmt.Errorf("the offers of part %d exceed 4 GiB", last)
		}
		at := digestAt{off: size, n: uint32(len(digest))}
		if d.at != nil {
			if last < 0 || last >= int64(len(d.at)) {
				return fmt.Errorf("offer of part %d beyond the largest part id %d", last, maxID)
			}
			d.at[last] = at
		} else {
			d.atM[last] = at
		}
		_, err := w.Write(digest)
		size += int64(len(digest))
		n, entries = 0, entries[:0]
		return err
	}
	for rows.Next() {
		if err := rows.Scan(&pid, &cur, &breaks); err != nil {
			return nil, err
		}
		if n > 0 && pid != last {
			if err := flush(); err != nil {
				return nil, err
			}
		}
		last = pid
		n++
		entries = appendOfferDigest(entries, cur, breaks)
	}
	if err := rows.Err(); err != nil {
		return nil, err
	}
	if err := flush(); err != nil {
		return nil, err
	}
	if err := w.Flush(); err != nil {
		return nil, err
	}
	ok = true
	return d, nil
}

// get appends the digest of part id to b.
func (d *offerDigests) get(id int64, b []byte) ([]byte, error) {
	var at digestAt
	if d.at != nil {
		if id >= 0 && id < int64(len(d.at)) {
			at = d.at[id]
		}
	} else {
		at = d.atM[id]
	}
	if at.n == 0 {
		return append(b, noOffers...), nil
	}
	b = slices.Grow(b, int(at.n))
	out := b[len(b) : len(b)+int(at.n)]
	if _, err := d.f.ReadAt(out, at.off); err != nil {
		return nil, err
	}
	return b[:len(b)+int(at.n)], nil
}

func (d *offerDigests) close() {
	d.f.Close()
	os.Remove(d.f.Name())
}

// writeColumns writes the column file of the catalog as seen by q (one
// transaction at generation gen) to a temporary file and renames it into
// place. It returns the path of the file written: the column file, or
// the temporary file when it could not be renamed (the caller reads and
// removes it).
func (s *Store) writeColumns(ctx context.Context, q queryer, st colStamp) (string, error) {
	final := s.colsPath()
	cleanColumnLeftovers(final)
	tmpDir := filepath.Dir(final)
	prefix := filepath.Base(final) + ".tmp-" + strconv.Itoa(os.Getpid()) + "-"
	if e, ok := q.(interface {
		ExecContext(context.Context, string, ...any) (sql.Result, error)
	}); ok {
		if _, err := e.ExecContext(ctx, fmt.Sprintf("PRAGMA cache_size = -%d", refreshCacheKiB)); err == nil {
			defer e.ExecContext(context.WithoutCancel(ctx), fmt.Sprintf("PRAGMA cache_size = -%d", storeCacheKiB))
		}
	}
	kindFields := map[Kind][]string{}
	kindIdx := map[Kind][]int{}
	var cols []string
	numIdx := map[string]int{}
	for i := range Fields {
		if Fields[i].Type == Number {
			numIdx[Fields[i].Name] = len(cols)
			cols = append(cols, qcol(Fields[i].Name))
		}
	}
	for _, k := range Kinds {
		kindFields[k] = kindNumFields(k)
		for _, name := range kindFields[k] {
			kindIdx[k] = append(kindIdx[k], numIdx[name])
		}
	}
	var order []*setSpill
	defer func() {
		for _, sp := range order {
			sp.f.Close()
			os.Remove(sp.f.Name())
		}
	}()
	// the offers first, in their own order (sequential reads), into a
	// spill of digests by part id; the parts then come in canonical
	// order, each finding its digest there
	digests, err := spillOfferDigests(ctx, q, tmpDir, prefix, st.maxID)
	if err != nil {
		return "", err
	}
	defer digests.close()
	stmt := `SELECT parts.id, parts."kind", parts."type", parts."mfr", parts."mpn", parts."fuse_std", parts."rerate", ` +
		strings.Join(cols, ", ") + ` FROM parts ORDER BY parts.mpn_key, parts.mfr_key`
	rows, err := q.QueryContext(ctx, stmt)
	if err != nil {
		return "", err
	}
	defer rows.Close()
	sets := map[string]*setSpill{}
	var id int64
	var kind, typ, mfr, mpn, fstd, rer sql.NullString
	nums := make([]sql.NullFloat64, len(cols))
	dest := []any{&id, &kind, &typ, &mfr, &mpn, &fstd, &rer}
	for i := range nums {
		dest = append(dest, &nums[i])
	}
	var ord uint32
	var digest []byte
	for rows.Next() {
		if err := rows.Scan(dest...); err != nil {
			return "", err
		}
		k := Kind(kind.String)
		fields, ok := kindFields[k]
		if !ok {
			continue // not a kind of the dictionary; Put never stores one
		}
		key := kind.String + "\x00" + typ.String
		sp := sets[key]
		if sp == nil {
			f, err := os.CreateTemp(tmpDir, prefix+"set-")
			if err != nil {
				return "", err
			}
			sp = newSetSpill(f, k, typ.String, fields)
			sets[key] = sp
			order = append(order, sp)
		}
		if err := sp.add(id, ord, nums, kindIdx[k], mfr.String, mpn.String, fstd.String, rer.String); err != nil {
			return "", fmt.Errorf("column spill: %w", err)
		}
		ord++
		if digest, err = digests.get(id, digest[:0]); err != nil {
			return "", fmt.Errorf("offers spill: %w", err)
		}
		sp.setOffers(digest)
	}
	if err := rows.Err(); err != nil {
		return "", err
	}
	slices.SortFunc(order, func(a, b *setSpill) int {
		if c := strings.Compare(string(a.info.kind), string(b.info.kind)); c != 0 {
			return c
		}
		return strings.Compare(a.info.typ, b.info.typ)
	})
	out, err := os.CreateTemp(tmpDir, prefix)
	if err != nil {
		return "", err
	}
	ok := false
	defer func() {
		if !ok {
			out.Close()
			os.Remove(out.Name())
		}
	}()
	w := bufio.NewWriterSize(out, 1<<16)
	if _, err := w.Write(colsMagic); err != nil {
		return "", err
	}
	off := uint64(len(colsMagic))
	infos := make([]setInfo, len(order))
	for i, sp := range order {
		// one set at a time, column by column from its chunks
		if p := off % 8; p != 0 {
			if _, err := w.Write(make([]byte, 8-p)); err != nil {
				return "", err
			}
			off += 8 - p
		}
		pw := &payloadWriter{w: w}
		if err := sp.assemble(pw); err != nil {
			return "", err
		}
		var fields []string
		for j, name := range sp.info.fields {
			if sp.info.present[j] > 0 {
				fields = append(fields, name)
			}
		}
		infos[i] = setInfo{kind: sp.info.kind, typ: sp.info.typ, rows: sp.info.rows, fields: fields,
			offset: off, length: pw.n, sum: pw.sum1, split: pw.split, osum: pw.sum.result(pw.n - pw.split)}
		off += pw.n
		sp.f.Close()
		os.Remove(sp.f.Name())
	}
	dir := encodeDir(st, infos)
	tr := binary.LittleEndian.AppendUint64(nil, off)
	tr = binary.LittleEndian.AppendUint32(tr, uint32(len(dir)))
	tr = append(tr, colsTrailer...)
	if _, err := w.Write(append(dir, tr...)); err != nil {
		return "", err
	}
	if err := w.Flush(); err != nil {
		return "", err
	}
	if err := out.Close(); err != nil {
		return "", err
	}
	ok = true
	mode := os.FileMode(0o644)
	if st, err := os.Stat(s.Path); err == nil {
		mode = st.Mode().Perm()
	}
	os.Chmod(out.Name(), mode)
	// a reader whose transaction is older than the catalog (an import
	// committed meanwhile) keeps its file to itself: the newer state's
	// file, written by that import, must not be replaced by an older one
	if g, err := generation(ctx, s.db); err != nil || g != st.gen {
		return out.Name(), nil
	}
	if err := os.Rename(out.Name(), final); err != nil {
		return out.Name(), nil
	}
	return final, nil
}

func appendString(b []byte, s string) []byte {
	b = binary.AppendUvarint(b, uint64(len(s)))
	return append(b, s...)
}

func encodeDir(st colStamp, infos []setInfo) []byte {
	var b []byte
	b = binary.LittleEndian.AppendUint64(b, uint64(st.gen))
	b = binary.LittleEndian.AppendUint64(b, uint64(st.maxID))
	b = appendString(b, st.sources)
	b = binary.LittleEndian.AppendUint32(b, uint32(len(infos)))
	for _, in := range infos {
		b = appendString(b, string(in.kind))
		b = appendString(b, in.typ)
		b = binary.LittleEndian.AppendUint32(b, in.rows)
		b = binary.LittleEndian.AppendUint32(b, uint32(len(in.fields)))
		for _, f := range in.fields {
			b = appendString(b, f)
		}
		b = binary.LittleEndian.AppendUint64(b, in.offset)
		b = binary.LittleEndian.AppendUint64(b, in.length)
		b = binary.LittleEndian.AppendUint64(b, in.sum)
		b = binary.LittleEndian.AppendUint64(b, in.split)
		b = binary.LittleEndian.AppendUint64(b, in.osum)
	}
	return b
}

// errStale means the column file is missing, damaged or of another
// catalog state.
var errStale = errors.New("column file missing, damaged or stale")

// reader decodes the header with bounds checks.
type hreader struct {
	r   *bufio.Reader
	err error
}

func (h *hreader) u32() uint32 {
	var b [4]byte
	if h.err == nil {
		_, h.err = io.ReadFull(h.r, b[:])
	}
	return binary.LittleEndian.Uint32(b[:])
}

func (h *hreader) u64() uint64 {
	var b [8]byte
	if h.err == nil {
		_, h.err = io.ReadFull(h.r, b[:])
	}
	return binary.LittleEndian.Uint64(b[:])
}

func (h *hreader) str() string {
	if h.err != nil {
		return ""
	}
	n, err := binary.ReadUvarint(h.r)
	if err != nil || n > 1<<16 {
		h.err = errStale
		return ""
	}
	b := make([]byte, n)
	_, h.err = io.ReadFull(h.r, b)
	return string(b)
}

// readColumnsHeader opens path and checks its directory against the
// catalog state st.
func readColumnsHeader(path string, st colStamp) ([]setInfo, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, errStale
	}
	defer f.Close()
	return readDir(f, st)
}

// readDir reads the directory of an open column file through its
// trailer and checks it against st and the file's size.
func readDir(f *os.File, st colStamp) ([]setInfo, error) {
	fi, err := f.Stat()
	if err != nil {
		return nil, errStale
	}
	size := fi.Size()
	tl := int64(12 + len(colsTrailer))
	if size < int64(len(colsMagic))+tl {
		return nil, errStale
	}
	head := make([]byte, len(colsMagic))
	tr := make([]byte, tl)
	if _, err := f.ReadAt(head, 0); err != nil || string(head) != string(colsMagic) {
		return nil, errStale
	}
	if _, err := f.ReadAt(tr, size-tl); err != nil || string(tr[12:]) != string(colsTrailer) {
		return nil, errStale
	}
	dOff, dLen := binary.LittleEndian.Uint64(tr), int64(binary.LittleEndian.Uint32(tr[8:]))
	if dOff < uint64(len(colsMagic)) || dOff > uint64(size-tl) || int64(dOff)+dLen != size-tl {
		return nil, errStale
	}
	h := &hreader{r: bufio.NewReader(io.NewSectionReader(f, int64(dOff), dLen))}
	g, m, src, n := int64(h.u64()), int64(h.u64()), h.str(), h.u32()
	if h.err != nil || g != st.gen || m != st.maxID || src != st.sources || n > 1<<12 {
		return nil, errStale
	}
	infos := make([]setInfo, n)
	for i := range infos {
		in := &infos[i]
		in.kind = Kind(h.str())
		in.typ = h.str()
		in.rows = h.u32()
		nf := h.u32()
		if h.err != nil || nf > 64 {
			return nil, errStale
		}
		for range nf {
			in.fields = append(in.fields, h.str())
		}
		in.offset, in.length, in.sum, in.split, in.osum = h.u64(), h.u64(), h.u64(), h.u64(), h.u64()
		if h.err != nil || in.offset < uint64(len(colsMagic)) || in.offset > dOff || in.length > dOff-in.offset || in.split > in.length {
			return nil, errStale
		}
	}
	return infos, nil
}

// readColumns reads the sets want accepts from the column file at path,
// which must match the catalog state st. The file is mapped into memory
// where the system allows (the sets' number columns then point into the
// page cache: no copy, no fresh memory) and read otherwise.
func readColumns(path string, st colStamp, want func(Kind, string) bool) (*Columns, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, errStale
	}
	defer f.Close()
	infos, err := readDir(f, st)
	if err != nil {
		return nil, err
	}
	fi, err := f.Stat()
	if err != nil {
		return nil, errStale
	}
	data, unmap, err := mapFile(f, fi.Size())
	if err != nil {
		return nil, errStale
	}
	var sel []*setInfo
	for i := range infos {
		if want == nil || want(infos[i].kind, infos[i].typ) {
			sel = append(sel, &infos[i])
		}
	}
	// sets are checked and decoded in parallel
	sets := make([]*ColumnSet, len(sel))
	errs := make([]error, len(sel))
	next := make(chan int, len(sel))
	for i := range sel {
		next <- i
	}
	close(next)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(sel)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				in := sel[i]
				sets[i], errs[i] = readSet(data[in.offset:in.offset+in.length], in)
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			unmap()
			return nil, err
		}
	}
	return &Columns{Gen: st.gen, Sets: sets, close: unmap}, nil
}

// littleEndian is true on the usual hosts: number columns are then used
// in place; elsewhere they are decoded into fresh slices.
var littleEndian = binary.NativeEndian.Uint16([]byte{1, 0}) == 1

// leView returns b as little-endian values of T: in place where the host
// is little-endian and b suitably aligned, else decoded by dec (a value
// from its first bytes) into a fresh slice.
func leView[T int64 | uint32 | float64](b []byte, dec func([]byte) T) []T {
	size := int(unsafe.Sizeof(*new(T)))
	n := len(b) / size
	if littleEndian && n > 0 && uintptr(unsafe.Pointer(&b[0]))%uintptr(size) == 0 {
		return unsafe.Slice((*T)(unsafe.Pointer(&b[0])), n)
	}
	out := make([]T, n)
	for i := range out {
		out[i] = dec(b[size*i:])
	}
	return out
}

// int64s returns b (8·n bytes) as n little-endian int64s.
func int64s(b []byte) []int64 {
	return leView(b, func(b []byte) int64 { return int64(binary.LittleEndian.Uint64(b)) })
}

// uint32s returns b (4·n bytes) as n little-endian uint32s.
func uint32s(b []byte) []uint32 { return leView(b, binary.LittleEndian.Uint32) }

// float64s returns b (8·n bytes) as n little-endian float64s.
func float64s(b []byte) []float64 {
	return leView(b, func(b []byte) float64 { return math.Float64frombits(binary.LittleEndian.Uint64(b)) })
}

// readSet checks and decodes one set's payload (buf, which starts at an
// offset that is a multiple of 8 in the file) without copying its
// numbers.
func readSet(buf []byte, in *setInfo) (*ColumnSet, error) {
	n := int(in.rows)
	if uint64(n)*(12+8*uint64(len(in.fields))+16) > uint64(len(buf)) {
		return nil, errStale
	}
	if checksum(buf[:in.split]) != in.sum {
		return nil, errStale
	}
	offSec := buf[in.split:]
	buf = buf[:in.split]
	cs := &ColumnSet{Kind: in.kind, Type: in.typ, Fields: in.fields}
	pos := 0
	take := func(k, align int) []byte {
		for pos%align != 0 {
			pos++
		}
		if k < 0 || pos > len(buf) || k > len(buf)-pos {
			return nil
		}
		b := buf[pos : pos+k]
		pos += k
		return b
	}
	ids, ords := take(8*n, 8), take(4*n, 4)
	if ids == nil || ords == nil {
		return nil, errStale
	}
	cs.ID, cs.Ord = int64s(ids), uint32s(ords)
	cs.Num = make([][]float64, len(in.fields))
	for k := range cs.Num {
		b := take(8*n, 8)
		if b == nil {
			return nil, errStale
		}
		cs.Num[k] = float64s(b)
	}
	dict := func(d *dictCol) bool {
		cnt, k := binary.Uvarint(buf[min(pos, len(buf)):])
		if k <= 0 || cnt == 0 || cnt > uint64(n)+1 {
			return false
		}
		pos += k
		d.words = make([]string, cnt)
		for w := range d.words {
			l, k := binary.Uvarint(buf[pos:])
			if k <= 0 || l > uint64(len(buf)-pos-k) {
				return false
			}
			d.words[w] = string(buf[pos+k : pos+k+int(l)])
			pos += k + int(l)
		}
		if d.idx = take(4*n, 4); d.idx == nil {
			return false
		}
		for i := 0; i < n; i++ {
			if uint64(binary.LittleEndian.Uint32(d.idx[4*i:])) >= cnt {
				return false
			}
		}
		return true
	}
	if !dict(&cs.mfr) || !dict(&cs.fstd) || !dict(&cs.rer) {
		return nil, errStale
	}
	// ends, then the bytes they end in (monotonic, the last one the length)
	blob := func(last bool) (ends, b []byte, ok bool) {
		if ends = take(4*n, 1); ends == nil {
			return nil, nil, false
		}
		prev := uint32(0)
		for i := 0; i < n; i++ {
			end := binary.LittleEndian.Uint32(ends[4*i:])
			if end < prev {
				return nil, nil, false
			}
			prev = end
		}
		if b = take(int(prev), 1); b == nil || last && pos != len(buf) {
			return nil, nil, false
		}
		return ends, b, true
	}
	mpnEnds, mpnBlob, ok := blob(true)
	if !ok {
		return nil, errStale
	}
	cs.offSec, cs.offSum = offSec, in.osum
	cs.mpnBlob = string(mpnBlob)                 // a copy: part numbers outlive the mapping
	cs.mpnEnds = append([]byte(nil), mpnEnds...) // small; survives the mapping too
	if in.kind != Fuse {
		cs.fstd, cs.rer = dictCol{}, dictCol{}
	}
	return cs, nil
}

// readWhole reads the file into memory (mapFile's fallback).
func readWhole(f *os.File, size int64) ([]byte, func(), error) {
	if size <= 0 || size > 1<<40 {
		return nil, nil, errStale
	}
	b := make([]byte, size)
	if _, err := f.ReadAt(b, 0); err != nil {
		return nil, nil, err
	}
	return b, func() {}, nil
}
