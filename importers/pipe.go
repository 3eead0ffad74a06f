package importers

import (
	"slices"
	"strings"

	"partsieve/catalog"
)

// rowItem is one data row on its way from the reading goroutine to the
// writing one: a converted part (with the catalog's checks done when a
// store takes it), or the reason the row is refused.
type rowItem struct {
	row int
	// part is the converted part for a sink that takes parts (it points
	// to buf, reused); nil for a preparedSink, which takes prep only,
	// so that an item does not hold a part (with its number map) beside
	// its prepared form.
	part *catalog.Part
	buf  catalog.Part
	prep catalog.Prepared // part in the store's form (preparedSink only)
	perr error            // the catalog refused the part (ErrInvalidPart)
	rej  *rowReject       // the row was refused while converting
}

// Pipe sizes: rows per batch, and batches in flight. The writer puts each
// batch's parts in the order of the catalog's identity key (see order):
// the larger the batch, the closer together its inserts land in that
// index. Measured at a million rows (paired runs): parts usable 37.7 s
// unsorted in batches of 256, 33.7 s sorted in batches of 2,048 with one
// in flight (import peak 257 MB), 32.3 s at 4,096 (320 MB, above the
// import's 300 MB target), 30.9 s at 8,192 with four in flight (719 MB: a
// converted row with its part and prepared form was some 5 KB). Since an
// item of a preparedSink holds its prepared form only (the reader
// converts every row into one part), the import process peaks at 180 MB
// with 2,048 rows a batch, 210 MB with 4,096 and 265–271 MB with 8,192
// (too near the target); 4,096 was 17.2/18.2/16.9 s against 18.1/18.2/
// 18.1 s with 2,048 in alternating runs. With two batches of 4,096 in
// flight instead of one, the writer (the busier side) waited for rows
// 0.46/0.15/0.24 s of an import instead of 0.60/0.41/0.57 s, for some
// 18 MB more (three runs each). Tool choice.
const (
	pipeBatch = 4096
	pipeDepth = 2
)

type rowBatch struct {
	items []rowItem
	n     int       // items filled
	err   error     // the rows end here with this error
	ord   []int     // the order the writer puts items[:n] in (see order)
	keys  []sortKey // order's buffer
}

// order sets b.ord: refused rows first, in row order, then the parts
// grouped by kind, and in each kind in the order of their identity key
// (part number, maker); rows with one key keep their order, and all go in
// the group of the kind of the first of them, so of two rows with one key
// the earlier is still put first whatever their kinds. Inserts next to
// each other in the identity index cost fewer page reads and writes (see
// pipeBatch), and the catalog writes a batch of new parts one statement
// per run of one kind (catalog.Prepared.SortKey). The reader orders each
// batch before it sends it, so that the writer, the busier side of an
// import, does not.
func (b *rowBatch) order() {
	b.ord, b.keys = b.ord[:0], b.keys[:0]
	for i := range b.items[:b.n] {
		it := &b.items[i]
		var k sortKey
		if it.perr == nil && it.rej == nil {
			k.kind, k.pk, k.mk = it.prep.SortKey() // empty when not prepared
		}
		b.ord, b.keys = append(b.ord, i), append(b.keys, k)
	}
	sortItems(b.ord, b.keys)
}

// rowPipe carries batches of rows from one reading goroutine to one
// writing goroutine and the emptied batches back, so that their buffers
// (the prepared rows above all) are reused.
type rowPipe struct {
	full chan *rowBatch // to the writer, in order; closed by the reader
	free chan *rowBatch // back to the reader
	stop chan struct{}  // closed when the writer gives up
	cur  *rowBatch      // reader side: the batch being filled
}

func newRowPipe() *rowPipe {
	return &rowPipe{
		full: make(chan *rowBatch, pipeDepth),
		free: make(chan *rowBatch, pipeDepth+2),
		stop: make(chan struct{}),
	}
}

// item returns the next item for the reader to fill (cleared), sending
// the current batch on when it is full; nil when the writer has stopped.
func (p *rowPipe) item() *rowItem {
	if p.cur != nil && p.cur.n == len(p.cur.items) {
		if !p.send() {
			return nil
		}
	}
	if p.cur == nil {
		select {
		case b := <-p.free:
			p.cur = b
		default:
			p.cur = &rowBatch{items: make([]rowItem, pipeBatch)}
		}
		p.cur.n, p.cur.err = 0, nil
	}
	it := &p.cur.items[p.cur.n]
	p.cur.n++
	it.row, it.part, it.perr, it.rej = 0, nil, nil, nil
	return it
}

// send passes the current batch to the writer; false when the writer has
// stopped.
func (p *rowPipe) send() bool {
	b := p.cur
	p.cur = nil
	b.order()
	select {
	case <-p.stop:
		return false
	default:
	}
	select {
	case p.full <- b:
		return true
	case <-p.stop:
		return false
	}
}

// fail ends the rows with err, after the items already filled.
func (p *rowPipe) fail(err error) {
	if p.cur == nil {
		p.cur = &rowBatch{}
	}
	p.cur.err = err
}

// close sends what is left and ends the rows; the reader defers it.
func (p *rowPipe) close() {
	if p.cur != nil && (p.cur.n > 0 || p.cur.err != nil) {
		p.send()
	}
	close(p.full)
}

// drain runs put on every item on the writer's goroutine, batch after
// batch, each in the order the reader gave it (rowBatch.order), and
// returns the first error, of put or of the reader (fail). It returns
// only after the reader has ended, so nothing reads the sheet afterwards.
func (p *rowPipe) drain(put func(*rowItem) error) error {
	var err error
	for b := range p.full {
		if err == nil {
			for _, i := range b.ord {
				if err = put(&b.items[i]); err != nil {
					break
				}
			}
			if err == nil {
				err = b.err
			}
			if err != nil {
				close(p.stop)
			}
		}
		select {
		case p.free <- b:
		default:
		}
	}
	return err
}

// sortKey is what rowBatch.order orders a batch's items by.
type sortKey struct {
	kind   catalog.Kind
	pk, mk string
	group  catalog.Kind // kind of the first item with this key
}

// sortItems orders ord (indexes into keys): by identity key (stable),
// then, stably, by the kind of the first item of each key (refused items
// have an empty key and kind, so they stay first in row order).
func sortItems(ord []int, keys []sortKey) {
	slices.SortStableFunc(ord, func(x, y int) int {
		if c := strings.Compare(keys[x].pk, keys[y].pk); c != 0 {
			return c
		}
		return strings.Compare(keys[x].mk, keys[y].mk)
	})
	for j, i := range ord {
		k := &keys[i]
		k.group = k.kind
		if j > 0 {
			if prev := &keys[ord[j-1]]; prev.pk == k.pk && prev.mk == k.mk {
				k.group = prev.group
			}
		}
	}
	slices.SortStableFunc(ord, func(x, y int) int {
		return strings.Compare(string(keys[x].group), string(keys[y].group))
	})
}
