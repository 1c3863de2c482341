package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Output safety of rates --out and compare --plot (docs/reliability.md):
// only regular files are written; an unwritable or busy folder is refused
// before any work; a set that cannot be written whole is not published,
// yet the report is still printed; a re-run replaces the earlier set
// without leaving its extra files.
func TestOutputSafety(t *testing.T) {
	base := t.TempDir()
	fifo := filepath.Join(base, "plot.svg")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "compare", "-q", "--plot", fifo, ch3ncFile)
	if code != exitInput || out != "" || !strings.Contains(errs, "is a fifo") {
		t.Errorf("compare --plot FIFO: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	if fi, err := os.Lstat(fifo); err != nil || fi.Mode()&os.ModeNamedPipe == 0 {
		t.Error("the fifo was replaced")
	}

	file := filepath.Join(base, "a-file")
	if err := os.WriteFile(file, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCLI(t, "rates", "-q", "--skip-check", "--out", filepath.Join(file, "out"), ch3ncFile)
	if code != exitInput || out != "" || !strings.Contains(errs, "cannot create the output folder") {
		t.Errorf("unwritable --out: exit %d, stdout %q (want none: refused before the work), stderr %q", code, out, errs)
	}

	dir := filepath.Join(base, "out")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	var busy export.FileSet
	if err := busy.ReserveFolder(dir); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCLI(t, "rates", "-q", "--skip-check", "--out", dir, ch3ncFile)
	if code != exitInput || out != "" || !strings.Contains(errs, "in use by another run") {
		t.Errorf("locked --out: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	busy.Release()

	if err := syscall.Mkfifo(filepath.Join(dir, "grid.csv"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, errs = runCLI(t, "rates", "-q", "--skip-check", "--out", dir, ch3ncFile)
	if code != exitInput || !strings.Contains(out, "k(T,P) / s-1") || !strings.Contains(errs, "grid.csv") {
		t.Errorf("set not writable whole: exit %d, stderr %q; the report must still be printed", code, errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "reactions.yaml")); err == nil {
		t.Error("part of the set was published")
	}
	os.Remove(filepath.Join(dir, "grid.csv"))

	if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--write-failed", "--out", dir, ch3ncFile); code != exitOK {
		t.Fatalf("rates --out: exit %d: %s", code, errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "reactions-plog.yaml")); err != nil {
		t.Fatal(err)
	}
	// The same file with fits: [troe] only: the plog and chebyshev files of
	// the earlier set go.
	text, err := os.ReadFile(ch3ncFile)
	if err != nil {
		t.Fatal(err)
	}
	troeOnly := filepath.Join(base, "troe.yaml")
	src := string(text)
	if i := strings.Index(src, "\nfits:"); i >= 0 {
		j := strings.Index(src[i+1:], "\n")
		src = src[:i+1] + src[i+1+j+1:]
	}
	if err := os.WriteFile(troeOnly, []byte(src+"fits: [troe]\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--write-failed", "--out", dir, troeOnly); code != exitOK {
		t.Fatalf("re-run: exit %d: %s", code, errs)
	}
	for _, gone := range []string{"reactions-plog.yaml", "reactions-chebyshev.txt"} {
		if _, err := os.Stat(filepath.Join(dir, gone)); err == nil {
			t.Errorf("%s of the earlier set is still there", gone)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "reactions-troe.yaml")); err != nil {
		t.Error(err)
	}
}

// panicWriter stands for any defect that panics inside a verb.
type panicWriter struct{}

func (panicWriter) Write([]byte) (int, error) { panic("test defect") }

// A panic inside a verb, or an internal error from a worker goroutine,
// ends with one line and exit code 4, not Go's crash status 2, which is
// the usage code.
func TestInternalErrorExitCode(t *testing.T) {
	var errb strings.Builder
	code := runContext(context.Background(), []string{"example"}, strings.NewReader(""), panicWriter{}, &errb)
	if code != exitInternal || !strings.HasPrefix(errb.String(), "falloff: internal error: test defect") || strings.Count(errb.String(), "\n") != 1 {
		t.Errorf("panic: exit %d, stderr %q", code, errb.String())
	}
	errb.Reset()
	err := fmt.Errorf("x.yaml: master equation: %w", fmt.Errorf("%w at T = 300 K: boom", collision.ErrInternal))
	if code := exitCode(&job.NumericalError{Err: err}, &errb); code != exitInternal {
		t.Errorf("worker panic: exit %d, stderr %q", code, errb.String())
	}
}

// A symbolic link planted at an output name is never written through (the
// set is not published, the link's target stays as it was, the report is
// still printed), and a device given as --plot is refused and left a
// device (as root, /dev/null was once replaced by an SVG file).
func TestOutputSymlinkAndDevice(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "out")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	victim := filepath.Join(t.TempDir(), "victim.txt")
	if err := os.WriteFile(victim, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(victim, filepath.Join(dir, "grid.csv")); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "rates", "-q", "--skip-check", "--skip-held-out", "--out", dir, ch3ncFile)
	if code != exitInput || !strings.Contains(errs, "symbolic link") || !strings.Contains(out, "k(T,P)") {
		t.Errorf("symlink at grid.csv: exit %d, stderr %q", code, errs)
	}
	if b, _ := os.ReadFile(victim); string(b) != "keep" {
		t.Error("written through the symlink")
	}
	if fi, err := os.Stat("/dev/null"); err == nil && fi.Mode()&os.ModeDevice != 0 {
		code, _, errs := runCLI(t, "compare", "-q", "--plot", "/dev/null", ch3ncFile)
		if code != exitInput || !strings.Contains(errs, "is a device") {
			t.Errorf("compare --plot /dev/null: exit %d, stderr %q", code, errs)
		}
		if fi, err := os.Stat("/dev/null"); err != nil || fi.Mode()&os.ModeDevice == 0 {
			t.Fatal("/dev/null is no longer a device")
		}
	}
}
