package topology

import (
	"os"
	"testing"
)

func osMkdirTemp() (string, error) { return os.MkdirTemp("", "partsieve-topology-") }

func TestMain(m *testing.M) {
	code := m.Run()
	if seedStore != nil {
		seedStore.Close()
	}
	if seedDir != "" {
		os.RemoveAll(seedDir)
	}
	os.Exit(code)
}
