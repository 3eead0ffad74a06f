package catalog

import (
	"bufio"
	"context"
	"database/sql"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"math/bits"
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
//	magic "PSCOLS07"
//	payloads, one per set, rows in the catalog's canonical order
//	(normalised part number, then maker: the order of the identity
//	index), column by column:
//	    id int64 × rows, ord uint32 × rows (position in that order over
//	    the whole catalog),
//	    per field of the directory: float64 × rows (NaN where absent),
//	    mfr, fuse_std, rerate: a dictionary (uvarint count, then each
//	    string as uvarint length + bytes) and uint32 × rows indexes,
//	    mpn: uint32 × rows end offsets, then the bytes
//	directory: gen int64, maxID int64, stamp (string), nsets uint32,
//	    per set: kind, type (strings), rows uint32, nfields uint32, field
//	    names (strings), offset uint64, length uint64, checksum uint64 of
//	    the payload (see checksum)
//	trailer: directory offset uint64, directory length uint32,
//	    "PSCOLEND"
//
// A set holds the parts of one kind and type; its fields are the Number
// fields of the kind that at least one of its parts has. Writing streams
// the rows into one spill file per set, then turns each set into columns
// in turn, so memory stays at one set.

var colsMagic = []byte("PSCOLS07")

var colsTrailer = []byte("PSCOLEND")

// checksum is the payload check of a set: h ← h·P + w (mod 2⁶⁴) over the
// payload's little-endian 64-bit words (the tail zero-padded), with the
// length mixed in. P is odd, so P is invertible mod 2⁶⁴ and a change of any
// single word always changes h; a truncated or shifted payload changes
// it with overwhelming likelihood. It runs at memory speed, which a CRC
// does not (CRC-32C measured 0.18 s for 136 MB here, this 0.02 s).
func checksum(b []byte) uint64 {
	const p = 0x9E3779B97F4A7C15 // odd (2⁶⁴/φ, common practice as a multiplier)
	h := uint64(len(b))
	for len(b) >= 8 {
		h = h*p + binary.LittleEndian.Uint64(b)
		b = b[8:]
	}
	var t [8]byte
	copy(t[:], b)
	return h*p + binary.LittleEndian.Uint64(t[:])
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

// rowsData is a set on the writing side: rows decoded from a spill.
type rowsData struct {
	kind                Kind
	typ                 string
	id                  []int64
	ord                 []uint32
	fields              []string
	num                 [][]float64
	mfr, mpn, fstd, rer []string
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
	sum     uint64
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

// spill is one set's rows while the file is written (row by row: id,
// ord, mask of the kind's fields present, those values, then mfr, mpn,
// fuse_std and rerate as uvarint length + bytes).
type spill struct {
	info setInfo
	f    *os.File
	w    *bufio.Writer
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
	kindFields := map[Kind][]string{}
	var cols []string
	for _, k := range Kinds {
		kindFields[k] = kindNumFields(k)
	}
	numIdx := map[string]int{}
	for i := range Fields {
		if Fields[i].Type == Number {
			numIdx[Fields[i].Name] = len(cols)
			cols = append(cols, qcol(Fields[i].Name))
		}
	}
	stmt := `SELECT parts.id, parts."kind", parts."type", parts."mfr", parts."mpn", parts."fuse_std", parts."rerate", ` +
		strings.Join(cols, ", ") + ` FROM parts ORDER BY parts.mpn_key, parts.mfr_key`
	rows, err := q.QueryContext(ctx, stmt)
	if err != nil {
		return "", err
	}
	defer rows.Close()
	sets := map[string]*spill{}
	var order []*spill
	defer func() {
		for _, sp := range order {
			sp.f.Close()
			os.Remove(sp.f.Name())
		}
	}()
	var id int64
	var kind, typ, mfr, mpn, fstd, rer sql.NullString
	nums := make([]sql.NullFloat64, len(cols))
	dest := []any{&id, &kind, &typ, &mfr, &mpn, &fstd, &rer}
	for i := range nums {
		dest = append(dest, &nums[i])
	}
	var buf []byte
	var ord uint32
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
			sp = &spill{info: setInfo{kind: k, typ: typ.String, fields: fields, present: make([]uint32, len(fields))}, f: f}
			sp.w = bufio.NewWriterSize(f, 1<<16)
			sets[key] = sp
			order = append(order, sp)
		}
		buf = buf[:0]
		buf = binary.LittleEndian.AppendUint64(buf, uint64(id))
		buf = binary.LittleEndian.AppendUint32(buf, ord)
		ord++
		var mask uint64
		for j, name := range fields {
			if nums[numIdx[name]].Valid {
				mask |= 1 << j
				sp.info.present[j]++
			}
		}
		buf = binary.LittleEndian.AppendUint64(buf, mask)
		for j, name := range fields {
			if mask&(1<<j) != 0 {
				buf = binary.LittleEndian.AppendUint64(buf, math.Float64bits(nums[numIdx[name]].Float64))
			}
		}
		for _, t := range [4]string{mfr.String, mpn.String, fstd.String, rer.String} {
			buf = appendString(buf, t)
		}
		if _, err := sp.w.Write(buf); err != nil {
			return "", err
		}
		sp.info.rows++
		sp.info.length += uint64(len(buf))
	}
	if err := rows.Err(); err != nil {
		return "", err
	}
	slices.SortFunc(order, func(a, b *spill) int {
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
		// one set at a time: rows back into columns, then written
		if err := sp.w.Flush(); err != nil {
			return "", err
		}
		raw, err := os.ReadFile(sp.f.Name())
		if err != nil {
			return "", err
		}
		cs, err := decodeRows(raw, &sp.info)
		if err != nil {
			return "", fmt.Errorf("column spill: %w", err)
		}
		payload := encodeSet(cs)
		if p := off % 8; p != 0 {
			if _, err := w.Write(make([]byte, 8-p)); err != nil {
				return "", err
			}
			off += 8 - p
		}
		in := setInfo{kind: cs.kind, typ: cs.typ, rows: uint32(len(cs.id)), fields: cs.fields,
			offset: off, length: uint64(len(payload)), sum: checksum(payload)}
		if _, err := w.Write(payload); err != nil {
			return "", err
		}
		off += in.length
		infos[i] = in
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
	}
	return b
}

// encodeSet writes a set column by column (the payload layout above;
// the caller starts it at an offset that is a multiple of 8, and every
// number column stays 8-aligned, index columns 4-aligned).
func encodeSet(cs *rowsData) []byte {
	n := len(cs.id)
	size := n*16 + len(cs.num)*n*8 + n*16 + 64
	for _, m := range cs.mpn {
		size += len(m)
	}
	b := make([]byte, 0, size)
	pad := func(k int) {
		for len(b)%k != 0 {
			b = append(b, 0)
		}
	}
	for _, id := range cs.id {
		b = binary.LittleEndian.AppendUint64(b, uint64(id))
	}
	for _, o := range cs.ord {
		b = binary.LittleEndian.AppendUint32(b, o)
	}
	pad(8)
	for _, col := range cs.num {
		for _, v := range col {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
		}
	}
	empty := make([]string, n)
	dict := func(vals []string) {
		if vals == nil {
			vals = empty
		}
		at := map[string]uint32{}
		var words []string
		idx := make([]uint32, n)
		for i, v := range vals {
			k, ok := at[v]
			if !ok {
				k = uint32(len(words))
				at[v] = k
				words = append(words, v)
			}
			idx[i] = k
		}
		b = binary.AppendUvarint(b, uint64(len(words)))
		for _, w := range words {
			b = appendString(b, w)
		}
		pad(4)
		for _, k := range idx {
			b = binary.LittleEndian.AppendUint32(b, k)
		}
	}
	dict(cs.mfr)
	dict(cs.fstd)
	dict(cs.rer)
	end := uint32(0)
	for _, m := range cs.mpn {
		end += uint32(len(m))
		b = binary.LittleEndian.AppendUint32(b, end)
	}
	for _, m := range cs.mpn {
		b = append(b, m...)
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
		in.offset, in.length, in.sum = h.u64(), h.u64(), h.u64()
		if h.err != nil || in.offset < uint64(len(colsMagic)) || in.offset > dOff || in.length > dOff-in.offset {
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

// int64s returns b (8·n bytes) as n little-endian int64s.
func int64s(b []byte) []int64 {
	n := len(b) / 8
	if littleEndian && n > 0 && uintptr(unsafe.Pointer(&b[0]))%8 == 0 {
		return unsafe.Slice((*int64)(unsafe.Pointer(&b[0])), n)
	}
	out := make([]int64, n)
	for i := range out {
		out[i] = int64(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return out
}

// uint32s returns b (4·n bytes) as n little-endian uint32s.
func uint32s(b []byte) []uint32 {
	n := len(b) / 4
	if littleEndian && n > 0 && uintptr(unsafe.Pointer(&b[0]))%4 == 0 {
		return unsafe.Slice((*uint32)(unsafe.Pointer(&b[0])), n)
	}
	out := make([]uint32, n)
	for i := range out {
		out[i] = binary.LittleEndian.Uint32(b[4*i:])
	}
	return out
}

// float64s returns b (8·n bytes) as n little-endian float64s.
func float64s(b []byte) []float64 {
	n := len(b) / 8
	if littleEndian && n > 0 && uintptr(unsafe.Pointer(&b[0]))%8 == 0 {
		return unsafe.Slice((*float64)(unsafe.Pointer(&b[0])), n)
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return out
}

// readSet checks and decodes one set's payload (buf, which starts at an
// offset that is a multiple of 8 in the file) without copying its
// numbers.
func readSet(buf []byte, in *setInfo) (*ColumnSet, error) {
	n := int(in.rows)
	if uint64(n)*(12+8*uint64(len(in.fields))+16) > uint64(len(buf)) {
		return nil, errStale
	}
	if checksum(buf) != in.sum {
		return nil, errStale
	}
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
	if cs.mpnEnds = take(4*n, 1); cs.mpnEnds == nil {
		return nil, errStale
	}
	cs.mpnBlob = string(buf[pos:]) // a copy: part numbers outlive the mapping
	prev := uint32(0)
	for i := 0; i < n; i++ {
		end := binary.LittleEndian.Uint32(cs.mpnEnds[4*i:])
		if end < prev || uint64(end) > uint64(len(cs.mpnBlob)) {
			return nil, errStale
		}
		prev = end
	}
	if int(prev) != len(cs.mpnBlob) {
		return nil, errStale
	}
	cs.mpnEnds = append([]byte(nil), cs.mpnEnds...) // small; survives the mapping too
	if in.kind != Fuse {
		cs.fstd, cs.rer = dictCol{}, dictCol{}
	}
	return cs, nil
}

// decodeRows turns a set's spill (rows, see spill) into columns; only
// the fields some row has get a column.
func decodeRows(buf []byte, in *setInfo) (*rowsData, error) {
	n := int(in.rows)
	if uint64(n)*20 > uint64(len(buf)) {
		return nil, errStale
	}
	cs := &rowsData{kind: in.kind, typ: in.typ, id: make([]int64, n), ord: make([]uint32, n), mfr: make([]string, n), mpn: make([]string, n)}
	isFuse := in.kind == Fuse
	if isFuse {
		cs.fstd, cs.rer = make([]string, n), make([]string, n)
	}
	// columns only for fields some row has; slot[j] is the column of
	// file field j, -1 when none
	slot := make([]int, len(in.fields))
	for j, name := range in.fields {
		slot[j] = -1
		if in.present[j] > 0 {
			slot[j] = len(cs.fields)
			cs.fields = append(cs.fields, name)
			col := make([]float64, n)
			for i := range col {
				col[i] = math.NaN()
			}
			cs.num = append(cs.num, col)
		}
	}
	intern := map[string]string{}
	internStr := func(b []byte) string {
		if s, ok := intern[string(b)]; ok {
			return s
		}
		s := string(b)
		if len(intern) < 1<<14 {
			intern[s] = s
		}
		return s
	}
	// part numbers share one string per set
	mpnAll := make([]byte, 0, n*12)
	mpnEnd := make([]int, n)
	pos := 0
	text := func() ([]byte, bool) {
		l, k := binary.Uvarint(buf[pos:])
		if k <= 0 || l > uint64(len(buf)-pos-k) {
			return nil, false
		}
		t := buf[pos+k : pos+k+int(l)]
		pos += k + int(l)
		return t, true
	}
	for i := 0; i < n; i++ {
		if len(buf)-pos < 20 {
			return nil, errStale
		}
		cs.id[i] = int64(binary.LittleEndian.Uint64(buf[pos:]))
		cs.ord[i] = binary.LittleEndian.Uint32(buf[pos+8:])
		mask := binary.LittleEndian.Uint64(buf[pos+12:])
		pos += 20
		if bits.Len64(mask) > len(in.fields) || len(buf)-pos < 8*bits.OnesCount64(mask) {
			return nil, errStale
		}
		for m := mask; m != 0; m &= m - 1 {
			j := bits.TrailingZeros64(m)
			if slot[j] < 0 {
				return nil, errStale
			}
			cs.num[slot[j]][i] = math.Float64frombits(binary.LittleEndian.Uint64(buf[pos:]))
			pos += 8
		}
		t, ok := text()
		if !ok {
			return nil, errStale
		}
		cs.mfr[i] = internStr(t)
		if t, ok = text(); !ok {
			return nil, errStale
		}
		mpnAll = append(mpnAll, t...)
		mpnEnd[i] = len(mpnAll)
		if t, ok = text(); !ok {
			return nil, errStale
		}
		if isFuse {
			cs.fstd[i] = internStr(t)
		}
		if t, ok = text(); !ok {
			return nil, errStale
		}
		if isFuse {
			cs.rer[i] = internStr(t)
		}
	}
	if pos != len(buf) {
		return nil, errStale // longer than its rows
	}
	all := string(mpnAll)
	start := 0
	for i, end := range mpnEnd {
		cs.mpn[i] = all[start:end]
		start = end
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
