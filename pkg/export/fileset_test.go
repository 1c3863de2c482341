package export

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
)

// names lists the non-hidden entries of dir.
func names(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range entries {
		if !strings.HasPrefix(e.Name(), ".") {
			out = append(out, e.Name())
		}
	}
	return out
}

// A FileSet publishes a folder's files together: an interruption before
// Commit writes nothing and lists what was not written; a target that
// cannot be written fails Commit before any file is published; a re-run
// with fewer files removes the ones the earlier set wrote and only those;
// no staging or temporary file is left, and the lock is released.
func TestFileSet(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	var o FileSet
	if err := o.ReserveFolder(dir); err != nil {
		t.Fatal(err)
	}
	o.Add(filepath.Join(dir, "a.txt"), []byte("a\n"))
	o.Add(filepath.Join(dir, "b.txt"), []byte("b\n"))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	written, err := o.Commit(ctx)
	var ie *InterruptedError
	if !errors.As(err, &ie) || len(written) != 0 || !strings.HasPrefix(err.Error(), "interrupted: no file written; not written: ") {
		t.Errorf("cancelled: written %v, err %v", written, err)
	}
	if _, err := os.Stat(dir); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("cancelled run left the folder it created: %v", err)
	}

	publish := func(files ...string) error {
		var s FileSet
		if err := s.ReserveFolder(dir); err != nil {
			return err
		}
		for _, f := range files {
			s.Add(filepath.Join(dir, f), []byte(f))
		}
		_, err := s.Commit(context.Background())
		return err
	}
	if err := publish("a.txt", "b.txt"); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "mine.txt"), []byte("user's"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(dir, "c.txt"), 0o755); err != nil { // a folder where a file is due
		t.Fatal(err)
	}
	if err := publish("a.txt", "c.txt"); err == nil {
		t.Error("a folder at an output name was not refused")
	}
	if n := names(t, dir); !slices.Equal(n, []string{"a.txt", "b.txt", "c.txt", "mine.txt"}) {
		t.Errorf("failed re-run changed the folder: %v", n)
	}
	if err := publish("a.txt"); err != nil {
		t.Fatal(err)
	}
	if n := names(t, dir); !slices.Equal(n, []string{"a.txt", "c.txt", "mine.txt"}) {
		t.Errorf("after a smaller set the folder holds %v, want a.txt, c.txt (not ours), mine.txt", n)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), stageStem) || strings.Contains(e.Name(), ".tmp-") || e.Name() == lockName {
			t.Errorf("left behind: %s", e.Name())
		}
	}
}

// Output is written only as regular files: a symbolic link, a fifo or a
// device at an output name is refused before any work and left as it was.
func TestFileSetRefusesNonRegular(t *testing.T) {
	dir := t.TempDir()
	outside := filepath.Join(t.TempDir(), "victim.txt")
	if err := os.WriteFile(outside, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "plot.svg")
	if err := os.Symlink(outside, link); err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(dir, "fifo.svg")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	targets := []string{link, fifo}
	if fi, err := os.Stat("/dev/null"); err == nil && fi.Mode()&os.ModeDevice != 0 {
		targets = append(targets, "/dev/null")
	}
	for _, p := range targets {
		var s FileSet
		if err := s.ReserveFile(p); err == nil || !strings.Contains(err.Error(), p) {
			t.Errorf("%s: ReserveFile gave %v, want a refusal naming it", p, err)
		}
		s.Add(p, []byte("<svg/>"))
		if _, err := s.Commit(context.Background()); err == nil {
			t.Errorf("%s: Commit wrote it", p)
		}
	}
	if b, _ := os.ReadFile(outside); string(b) != "keep" {
		t.Error("the symlink's target was overwritten")
	}
	if fi, err := os.Lstat(fifo); err != nil || fi.Mode()&os.ModeNamedPipe == 0 {
		t.Error("the fifo was replaced")
	}
}

// One run at a time per folder: a second reservation fails with
// ErrFolderInUse naming the lock and the holder; a lock left by a process
// that has ended is taken over.
func TestFileSetLock(t *testing.T) {
	dir := t.TempDir()
	var a, b FileSet
	if err := a.ReserveFolder(dir); err != nil {
		t.Fatal(err)
	}
	err := b.ReserveFolder(dir)
	if !errors.Is(err, ErrFolderInUse) || !strings.Contains(err.Error(), lockName) {
		t.Errorf("second run: %v, want ErrFolderInUse naming the lock", err)
	}
	a.Release()
	// A pid that cannot be running: above the kernel's pid_max (4194304).
	if err := os.WriteFile(filepath.Join(dir, lockName), []byte("999999999\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := b.ReserveFolder(dir); err != nil {
		t.Errorf("stale lock not taken over: %v", err)
	}
	b.Release()
}
