package export

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
)

// FileSet collects the files of one run, rendered in memory, and writes them
// together at the end (Commit), each through a temporary file renamed into
// place (writeFileAtomic): a failure or an interruption leaves every file
// whole or absent, never part-written, and the caller is told which were
// written.
type FileSet struct {
	paths []string
	data  [][]byte
}

// Add queues data for path.
func (s *FileSet) Add(path string, data []byte) {
	s.paths = append(s.paths, path)
	s.data = append(s.data, data)
}

// Paths returns the queued paths in order.
func (s *FileSet) Paths() []string { return append([]string(nil), s.paths...) }

// Commit writes the queued files in order, checking ctx before each, and
// returns the paths written. If ctx is cancelled the error is an
// *InterruptedError listing what was and was not written; after a failure
// to write, the error says which files are complete.
func (s *FileSet) Commit(ctx context.Context) ([]string, error) {
	var written []string
	for i, p := range s.paths {
		if ctx.Err() != nil {
			return written, &InterruptedError{Written: written, Pending: s.paths[i:]}
		}
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return written, fmt.Errorf("creating the folder for %s: %w%s", p, err, writtenNote(written))
		}
		if err := writeFileAtomic(p, s.data[i]); err != nil {
			return written, fmt.Errorf("%w%s", err, writtenNote(written))
		}
		written = append(written, p)
	}
	return written, nil
}

// writtenNote tells, after a failure, which files are complete.
func writtenNote(written []string) string {
	if len(written) == 0 {
		return " (no file written)"
	}
	return " (written, complete: " + strings.Join(written, ", ") + ")"
}

// InterruptedError reports a run stopped by a cancelled context (SIGINT or
// SIGTERM in the command), with the files completed before it stopped and
// those not written.
type InterruptedError struct {
	Written, Pending []string
}

func (e *InterruptedError) Error() string {
	var b strings.Builder
	b.WriteString("interrupted: ")
	if len(e.Written) == 0 {
		b.WriteString("no file written")
	} else {
		b.WriteString("wrote " + strings.Join(e.Written, ", "))
	}
	if len(e.Pending) > 0 {
		b.WriteString("; not written: " + strings.Join(e.Pending, ", "))
	}
	return b.String()
}

// Unwrap makes an interruption match context.Canceled.
func (e *InterruptedError) Unwrap() error { return context.Canceled }
