//go:build !linux

package topology

// hugeMake returns make([]T, 0, n) (huge pages are advised on Linux only).
func hugeMake[T any](n int) []T { return make([]T, 0, n) }
