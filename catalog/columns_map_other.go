//go:build !unix

package catalog

import "os"

// mapFile reads the whole file where mapping is not available.
func mapFile(f *os.File, size int64) (data []byte, unmap func(), err error) {
	return readWhole(f, size)
}
