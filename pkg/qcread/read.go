package qcread

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strings"
)

// MaxFileBytes bounds the size of a file the readers take: a frequency
// output of a molecule of a few hundred atoms is tens of MB; a bigger file
// is not one calculation's output (common practice, no source).
const MaxFileBytes = 256 << 20

// headBytes is how much of a file format detection looks at.
const headBytes = 64 << 10

// format is one reader: its name, a test on a file's first bytes, and the
// reader.
type format struct {
	name  string
	is    func(head []byte) bool
	read  func(r io.Reader, name string) (*Frequencies, error)
	about string
}

var formats = []format{
	{"qcschema", isQCSchema, ReadQCSchema, "QCSchema AtomicResult JSON of a Hessian calculation"},
	{"xtb", isXtb, ReadXtb, "xtb standard output of an --ohess run (optimisation and Hessian)"},
	{"psi4", isPsi4, ReadPsi4, "Psi4 output of a frequency() run (after optimize() or alone)"},
	{"nwchem", isNWChem, ReadNWChem, "NWChem output of a freq task (after optimize or alone)"},
	{"molden", isMolden, ReadMolden, "Molden file with [FREQ] and [FR-COORD] sections"},
}

// Formats returns the names of the formats ReadFile reads, in the order
// auto-detection tries them, with a phrase each.
func Formats() (names, about []string) {
	for _, f := range formats {
		names = append(names, f.name)
		about = append(about, f.about)
	}
	return names, about
}

// isMolden recognises a Molden file by a [FREQ] or [Molden Format] header
// at the start of a line.
func isMolden(head []byte) bool {
	for _, l := range bytes.Split(head, []byte("\n")) {
		t := strings.ToUpper(strings.TrimSpace(string(l)))
		if strings.HasPrefix(t, "[MOLDEN FORMAT]") || strings.HasPrefix(t, "[FREQ]") || strings.HasPrefix(t, "[FR-COORD]") {
			return true
		}
	}
	return false
}

// ReadFile reads the frequency calculation in the file at path with the
// reader of the named format, or, when format is "" or "auto", the first
// whose test recognises the file's start. It returns the format used. A
// file that is not a regular file, is larger than MaxFileBytes, or that no
// reader recognises is a *ReadError.
func ReadFile(path, formatName string) (*Frequencies, string, error) {
	fi, err := os.Stat(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return nil, "", &ReadError{File: path, What: "no such file", Hint: "check the name"}
	case err != nil:
		return nil, "", &ReadError{File: path, What: err.Error(), Hint: "check the file's permissions"}
	case !fi.Mode().IsRegular():
		return nil, "", &ReadError{File: path, What: "not a regular file", Hint: "give the output file of a frequency calculation"}
	case fi.Size() > MaxFileBytes:
		return nil, "", &ReadError{File: path, What: fmt.Sprintf("%d MB, more than the %d MB a frequency output is allowed", fi.Size()>>20, MaxFileBytes>>20), Hint: "give the output of one frequency calculation"}
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, "", &ReadError{File: path, What: err.Error(), Hint: "check the file's permissions"}
	}
	var f *format
	names, _ := Formats()
	switch formatName {
	case "", "auto":
		head := data
		if len(head) > headBytes {
			head = head[:headBytes]
		}
		for i := range formats {
			if formats[i].is(head) {
				f = &formats[i]
				break
			}
		}
		if f == nil {
			return nil, "", &ReadError{File: path, What: "not recognised as the output of a frequency calculation in any known format",
				Hint: "formats read: " + strings.Join(names, ", ") + "; name one with --format if the file is one of them"}
		}
	default:
		for i := range formats {
			if formats[i].name == formatName {
				f = &formats[i]
			}
		}
		if f == nil {
			return nil, "", fmt.Errorf("unknown format %q (hint: one of auto, %s)", formatName, strings.Join(names, ", "))
		}
	}
	out, err := f.read(bytes.NewReader(data), path)
	if err != nil {
		return nil, f.name, err
	}
	return out, f.name, nil
}

// readPath opens path and reads it with read, path naming the file in
// errors.
func readPath(path string, read func(io.Reader, string) (*Frequencies, error)) (*Frequencies, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("qcread: %w", err)
	}
	defer f.Close()
	return read(f, path)
}
