package export

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
)

// FileSet collects the files of one run, rendered in memory, and publishes
// them together at the end (Commit). Before any work a caller reserves the
// folders and files it will write (ReserveFolder, ReserveFile): that checks
// they can be written, refuses targets that are not regular files, and
// locks each folder against a concurrent run. Commit then writes every
// file of a folder into a hidden staging folder inside it and, only when
// all are whole, renames them into place, so a failed or interrupted run
// leaves the folder's previous set as it was; files a previous set of
// FileSet wrote there and this one does not are removed, so a folder never
// holds a mix of two runs.
type FileSet struct {
	paths []string
	data  [][]byte
	locks map[string]string // folder → its lock file
	files map[string]bool   // single files reserved with ReserveFile
	// made lists the folders ReserveFolder created, each with the highest
	// ancestor it created too: Release removes them again while empty.
	made [][2]string
}

// Hidden names FileSet keeps in an output folder.
const (
	lockName  = ".falloff.lock" // held by the run writing into the folder
	setName   = ".falloff-set"  // the names of the set last published there
	stageStem = ".falloff-stage-"
)

// ErrFolderInUse reports an output folder locked by another run.
var ErrFolderInUse = errors.New("export: output folder in use by another run")

// ReserveFolder prepares dir for the run's files before any work: it
// creates the folder if needed, takes its lock (an error wrapping
// ErrFolderInUse if another live run holds it) and checks that a file can
// be written there. Release gives the lock back.
func (s *FileSet) ReserveFolder(dir string) error {
	dir = filepath.Clean(dir)
	if _, ok := s.locks[dir]; ok {
		return nil
	}
	if fi, err := os.Lstat(dir); err == nil && fi.Mode()&fs.ModeSymlink == 0 && !fi.IsDir() {
		return fmt.Errorf("export: output folder %s exists and is not a folder (hint: name a new or existing folder)", dir)
	}
	top := ""
	for d := dir; ; d = filepath.Dir(d) {
		if _, err := os.Lstat(d); err == nil || filepath.Dir(d) == d {
			break
		}
		top = d
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("export: cannot create the output folder: %w (hint: check the path and its permissions)", err)
	}
	if top != "" {
		s.made = append(s.made, [2]string{dir, top})
	}
	lock := filepath.Join(dir, lockName)
	if err := takeLock(lock); err != nil {
		return err
	}
	if s.locks == nil {
		s.locks = map[string]string{}
	}
	s.locks[dir] = lock
	return nil
}

// takeLock creates the lock file exclusively, holding this process's id; a
// lock left by a process that no longer runs is taken over. Creating it
// also proves that the folder is writable.
func takeLock(lock string) error {
	for range 2 {
		f, err := os.OpenFile(lock, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
		if err == nil {
			_, err = f.WriteString(strconv.Itoa(os.Getpid()) + "\n")
			if cerr := f.Close(); err == nil {
				err = cerr
			}
			if err != nil {
				os.Remove(lock)
				return fmt.Errorf("export: cannot write in the output folder: %w", err)
			}
			return nil
		}
		if !errors.Is(err, fs.ErrExist) {
			return fmt.Errorf("export: cannot write in the output folder: %w (hint: check its permissions)", err)
		}
		b, _ := os.ReadFile(lock)
		pid, perr := strconv.Atoi(strings.TrimSpace(string(b)))
		if perr == nil && pid > 0 && alive(pid) {
			return fmt.Errorf("%w: %s is held by process %d (hint: wait for that run, or choose another folder; if no run uses it, delete the lock file)", ErrFolderInUse, lock, pid)
		}
		os.Remove(lock) // left by a run that ended without releasing it
	}
	return fmt.Errorf("%w: cannot take %s (hint: delete the lock file if no run uses the folder)", ErrFolderInUse, lock)
}

// alive reports whether process pid exists.
func alive(pid int) bool {
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}

// ReserveFile checks, before any work, that path can be written as a
// regular file: its folder exists or can be created and is writable, and
// path is absent or a regular file — not a symlink, a device, a fifo or a
// folder, which Commit would otherwise replace or write through.
func (s *FileSet) ReserveFile(path string) error {
	if err := checkTarget(path); err != nil {
		return err
	}
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("export: cannot create the folder of %s: %w", path, err)
	}
	f, err := os.CreateTemp(dir, ".falloff-probe-*")
	if err != nil {
		return fmt.Errorf("export: cannot write %s: %w (hint: check the folder's permissions)", path, err)
	}
	f.Close()
	os.Remove(f.Name())
	if s.files == nil {
		s.files = map[string]bool{}
	}
	s.files[filepath.Clean(path)] = true
	return nil
}

// checkTarget refuses an existing path that is not a regular file.
func checkTarget(path string) error {
	fi, err := os.Lstat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil
	case err != nil:
		return fmt.Errorf("export: %w", err)
	case fi.Mode()&fs.ModeSymlink != 0:
		return fmt.Errorf("export: %s is a symbolic link; output is written only as regular files (hint: remove the link or choose another name)", path)
	case !fi.Mode().IsRegular():
		return fmt.Errorf("export: %s exists and is %s, not a regular file; output is written only as regular files (hint: choose another name)", path, kindOf(fi.Mode()))
	}
	return nil
}

// kindOf names a file type for messages.
func kindOf(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "a folder"
	case m&fs.ModeCharDevice != 0, m&fs.ModeDevice != 0:
		return "a device"
	case m&fs.ModeNamedPipe != 0:
		return "a fifo"
	case m&fs.ModeSocket != 0:
		return "a socket"
	}
	return "a special file"
}

// Add queues data for path.
func (s *FileSet) Add(path string, data []byte) {
	s.paths = append(s.paths, filepath.Clean(path))
	s.data = append(s.data, data)
}

// Data returns the content queued as the i-th path.
func (s *FileSet) Data(i int) []byte { return s.data[i] }

// Paths returns the queued paths in order.
func (s *FileSet) Paths() []string { return append([]string(nil), s.paths...) }

// Release gives back the folder locks, and removes the folders
// ReserveFolder created if they are still empty (a run that stopped before
// writing leaves nothing behind); Commit calls it.
func (s *FileSet) Release() {
	for _, lock := range s.locks {
		os.Remove(lock)
	}
	s.locks = nil
	for _, m := range s.made {
		for d := m[0]; ; d = filepath.Dir(d) {
			if os.Remove(d) != nil || d == m[1] {
				break
			}
		}
	}
	s.made = nil
}

// Commit writes the queued files and returns the paths published. Files in
// a reserved folder are staged there and renamed into place together once
// all are whole; other files are written one by one through a temporary
// file (WriteFileAtomic's way). ctx is checked before each file is staged:
// an interruption (an *InterruptedError) or a failure leaves every folder
// with its previous set. It releases the locks.
func (s *FileSet) Commit(ctx context.Context) ([]string, error) {
	defer s.Release()
	byDir := map[string][]int{}
	var dirs []string
	for i, p := range s.paths {
		if err := checkTarget(p); err != nil {
			return nil, err
		}
		d := filepath.Dir(p)
		if _, ok := s.locks[d]; !ok {
			d = "" // a single file
		}
		if _, ok := byDir[d]; !ok {
			dirs = append(dirs, d)
		}
		byDir[d] = append(byDir[d], i)
	}
	// Stage every folder's files first: nothing is published before all
	// are whole.
	staged := map[string]string{}
	defer func() {
		for _, st := range staged {
			os.RemoveAll(st)
		}
	}()
	for _, d := range dirs {
		if d == "" {
			continue
		}
		st, err := os.MkdirTemp(d, stageStem+"*")
		if err != nil {
			return nil, fmt.Errorf("export: staging in %s: %w (no file written)", d, err)
		}
		staged[d] = st
		for _, i := range byDir[d] {
			if ctx.Err() != nil {
				return nil, &InterruptedError{Pending: s.Paths()}
			}
			if err := writeFileAtomic(filepath.Join(st, filepath.Base(s.paths[i])), s.data[i]); err != nil {
				return nil, fmt.Errorf("%w (no file written)", err)
			}
		}
	}
	if ctx.Err() != nil {
		return nil, &InterruptedError{Pending: s.Paths()}
	}
	var written []string
	for _, d := range dirs {
		if d == "" {
			for _, i := range byDir[d] {
				if err := writeFileAtomic(s.paths[i], s.data[i]); err != nil {
					return written, fmt.Errorf("%w%s", err, writtenNote(written))
				}
				written = append(written, s.paths[i])
			}
			continue
		}
		var names []string
		for _, i := range byDir[d] {
			name := filepath.Base(s.paths[i])
			if err := os.Rename(filepath.Join(staged[d], name), s.paths[i]); err != nil {
				return written, fmt.Errorf("export: %w%s", err, writtenNote(written))
			}
			written = append(written, s.paths[i])
			names = append(names, name)
		}
		removeStale(d, names)
	}
	return written, nil
}

// removeStale deletes the files of the set previously published in dir
// that the new set, names, does not have, and records the new set.
func removeStale(dir string, names []string) {
	list := filepath.Join(dir, setName)
	if b, err := os.ReadFile(list); err == nil {
		for _, old := range strings.Split(strings.TrimSpace(string(b)), "\n") {
			if old == "" || slices.Contains(names, old) || strings.ContainsAny(old, `/\`) || strings.HasPrefix(old, ".") {
				continue
			}
			if fi, err := os.Lstat(filepath.Join(dir, old)); err == nil && fi.Mode().IsRegular() {
				os.Remove(filepath.Join(dir, old))
			}
		}
	}
	_ = writeFileAtomic(list, []byte(strings.Join(names, "\n")+"\n"))
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
