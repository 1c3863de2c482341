//go:build unix

package input

import (
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// A named pipe without a writer reads as an empty file instead of blocking
// in open(2) for ever.
func TestReadFileFIFO(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "in.yaml")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("mkfifo:", err)
	}
	done := make(chan error, 1)
	go func() {
		_, err := ReadFile(fifo)
		done <- err
	}()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "empty") {
			t.Errorf("err = %v, want the file is empty", err)
		}
	case <-time.After(quickly):
		t.Fatal("ReadFile on a FIFO without a writer did not return")
	}
}
