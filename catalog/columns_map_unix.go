//go:build unix

package catalog

import (
	"os"
	"syscall"
)

// mapFile maps the whole file read-only; unmap releases it.
func mapFile(f *os.File, size int64) (data []byte, unmap func(), err error) {
	if size <= 0 || int64(int(size)) != size {
		return nil, nil, errStale
	}
	b, err := syscall.Mmap(int(f.Fd()), 0, int(size), syscall.PROT_READ, syscall.MAP_SHARED)
	if err != nil {
		return readWhole(f, size)
	}
	return b, func() { syscall.Munmap(b) }, nil
}
