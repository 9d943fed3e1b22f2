package main

import (
	"os"
	"path/filepath"
	"testing"
)

// TestMain removes the binary the replica tests build, once every test of
// the process has run.
func TestMain(m *testing.M) {
	code := m.Run()
	if binPath != "" {
		os.RemoveAll(filepath.Dir(binPath))
	}
	os.Exit(code)
}
