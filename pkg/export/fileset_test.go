package export

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A FileSet writes whole files or none: an interruption between files
// lists what was written and what was not; a failure to write one leaves
// the earlier ones whole, no temporary file behind, and says which are
// complete.
func TestFileSet(t *testing.T) {
	dir := t.TempDir()
	var o FileSet
	o.Add(filepath.Join(dir, "a.txt"), []byte("a\n"))
	o.Add(filepath.Join(dir, "b.txt"), []byte("b\n"))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	written, err := o.Commit(ctx)
	var ie *InterruptedError
	if !errors.As(err, &ie) || len(written) != 0 || err.Error() != "interrupted: no file written; not written: "+o.Paths()[0]+", "+o.Paths()[1] {
		t.Errorf("cancelled: written %v, err %v", written, err)
	}

	blocker := filepath.Join(dir, "file")
	if err := os.WriteFile(blocker, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	var p FileSet
	p.Add(filepath.Join(dir, "a.txt"), []byte("a\n"))
	p.Add(filepath.Join(blocker, "b.txt"), []byte("b\n")) // a folder under a file cannot exist
	written, err = p.Commit(context.Background())
	if err == nil || len(written) != 1 || !strings.Contains(err.Error(), "written, complete: "+written[0]) {
		t.Errorf("failure: written %v, err %v", written, err)
	}
	entries, _ := os.ReadDir(dir)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	if strings.Join(names, " ") != "a.txt file" {
		t.Errorf("folder holds %v, want a.txt and file only", names)
	}
}
