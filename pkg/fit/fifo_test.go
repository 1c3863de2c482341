//go:build unix

package fit

import (
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// A named pipe without a writer reads as an empty table instead of blocking
// in open(2) for ever.
func TestReadCSVFileFIFO(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "table.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skip("mkfifo:", err)
	}
	done := make(chan error, 1)
	go func() {
		_, _, err := ReadCSVFile(fifo)
		done <- err
	}()
	select {
	case err := <-done:
		if err == nil || !strings.Contains(err.Error(), "empty file") {
			t.Errorf("err = %v, want an empty file", err)
		}
	case <-time.After(limitTime):
		t.Fatal("ReadCSVFile on a FIFO without a writer did not return")
	}
}
