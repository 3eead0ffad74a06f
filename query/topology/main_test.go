package topology

import (
	"os"
	"testing"
)

func TestMain(m *testing.M) {
	code := m.Run()
	seed.Close()
	os.Exit(code)
}
