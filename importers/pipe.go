package importers

import "partsieve/catalog"

// rowItem is one data row on its way from the reading goroutine to the
// writing one: a converted part (with the catalog's checks done when a
// store takes it), or the reason the row is refused.
type rowItem struct {
	row  int
	part *catalog.Part
	prep catalog.Prepared // part in the store's form (preparedSink only)
	perr error            // the catalog refused the part (ErrInvalidPart)
	rej  *rowReject       // the row was refused while converting
}

// Pipe sizes: rows per batch, and batches in flight. A batch of 256
// converted rows is some 100 KB, so the pipe holds well under 1 MB.
const (
	pipeBatch = 256
	pipeDepth = 4
)

type rowBatch struct {
	items []rowItem
	n     int   // items filled
	err   error // the rows end here with this error
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

// drain runs put on every item in order on the writer's goroutine and
// returns the first error, of put or of the reader (fail). It returns
// only after the reader has ended, so nothing reads the sheet afterwards.
func (p *rowPipe) drain(put func(*rowItem) error) error {
	var err error
	for b := range p.full {
		if err == nil {
			for i := range b.items[:b.n] {
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
