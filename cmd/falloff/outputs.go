package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
)

// outputSet collects the files a verb writes, rendered in memory, and writes
// them together at the end (commit), each through a temporary file renamed
// into place (export.WriteFileAtomic): a failure or an interruption leaves
// every file whole or absent, never part-written, and the user is told
// which were written.
type outputSet struct {
	paths []string
	data  [][]byte
}

// add queues data for path.
func (o *outputSet) add(path string, data []byte) {
	o.paths = append(o.paths, path)
	o.data = append(o.data, data)
}

// commit writes the queued files in order, checking ctx before each, and
// returns the paths written. On interruption the error is an
// *interruptedError that lists what was and was not written.
func (o *outputSet) commit(ctx context.Context) ([]string, error) {
	var written []string
	for i, p := range o.paths {
		if ctx.Err() != nil {
			return written, &interruptedError{written: written, pending: o.paths[i:]}
		}
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return written, fmt.Errorf("creating the folder for %s: %w%s", p, err, writtenNote(written))
		}
		if err := export.WriteFileAtomic(p, o.data[i]); err != nil {
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

// interruptedError reports a run stopped by SIGINT or SIGTERM (or a
// cancelled context), with the files completed before it stopped.
type interruptedError struct {
	written, pending []string
}

func (e *interruptedError) Error() string {
	var b strings.Builder
	b.WriteString("interrupted: ")
	if len(e.written) == 0 {
		b.WriteString("no file written")
	} else {
		b.WriteString("wrote " + strings.Join(e.written, ", "))
	}
	if len(e.pending) > 0 {
		b.WriteString("; not written: " + strings.Join(e.pending, ", "))
	}
	return b.String()
}
