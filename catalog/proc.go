package catalog

import (
	"errors"
	"os"
	"syscall"
)

// processAlive reports whether process pid still runs (used to tell a
// crashed rebuild's temporary directory from one in progress).
func processAlive(pid int) bool {
	if pid == os.Getpid() {
		return true
	}
	p, err := os.FindProcess(pid)
	if err != nil {
		return false
	}
	err = p.Signal(syscall.Signal(0))
	return err == nil || errors.Is(err, syscall.EPERM)
}
