package input

import (
	"bytes"
	"errors"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// quickly bounds how long refusing a hostile file may take: each is refused
// after reading at most MaxFileBytes and walking the YAML node tree once,
// well under a second; 10 s leaves room for a slow, loaded CI machine while
// still catching an expansion or an endless read, which take minutes.
const quickly = 10 * time.Second

// A file beyond MaxFileBytes is refused with one line naming the limit,
// from ReadFile (which reads no more than the limit) and from Parse; a file
// of exactly the limit is read and parsed.
func TestReadFileTooLarge(t *testing.T) {
	dir := t.TempDir()
	comment := []byte("# a comment line of the input, repeated to fill the file\n")
	fill := func(n int) []byte {
		return bytes.Repeat(comment, n/len(comment)+1)[:n]
	}
	big := filepath.Join(dir, "big.yaml")
	if err := os.WriteFile(big, fill(MaxFileBytes+1), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := ReadFile(big)
	checkTooLarge(t, big, err)
	_, err = Parse("big.yaml", fill(MaxFileBytes+1))
	checkTooLarge(t, "big.yaml", err)

	atLimit := filepath.Join(dir, "at-limit.yaml")
	if err := os.WriteFile(atLimit, append(fill(MaxFileBytes-len(minimal)), minimal...), 0o644); err != nil {
		t.Fatal(err)
	}
	// The comments end mid-line, so the first line of minimal joins it.
	if _, err := ReadFile(atLimit); err != nil && strings.Contains(err.Error(), "MiB") {
		t.Errorf("a file of exactly %d bytes: %v", MaxFileBytes, err)
	}
}

// checkTooLarge checks the one-line error of a file beyond MaxFileBytes.
func checkTooLarge(t *testing.T, name string, err error) {
	t.Helper()
	var fe *FieldError
	if !errors.As(err, &fe) || fe.File != name || !strings.Contains(err.Error(), "larger than 1 MiB") || strings.Contains(err.Error(), "\n") {
		t.Errorf("err = %v, want one line saying %s is larger than 1 MiB", err, name)
	}
}

// An endless device as input ends at once with the size error.
func TestReadFileDevZero(t *testing.T) {
	if _, err := os.Stat("/dev/zero"); err != nil {
		t.Skip("no /dev/zero")
	}
	start := time.Now()
	_, err := ReadFile("/dev/zero")
	checkTooLarge(t, "/dev/zero", err)
	if d := time.Since(start); d > quickly {
		t.Errorf("took %v", d)
	}
}

// Aliases: a shared value is read; a loop and a bomb are refused quickly,
// before anything is expanded, with the line of the alias.
func TestAliasBombs(t *testing.T) {
	bomb := func(levels int) string {
		var b strings.Builder
		b.WriteString("title: t\nx0: &x0 [a, a, a, a, a, a, a, a, a, a]\n")
		for i := 1; i < levels; i++ {
			b.WriteString("x" + strconv.Itoa(i) + ": &x" + strconv.Itoa(i) + " [")
			for j := range 10 {
				if j > 0 {
					b.WriteString(", ")
				}
				b.WriteString("*x" + strconv.Itoa(i-1))
			}
			b.WriteString("]\n")
		}
		b.WriteString("fits: *x" + strconv.Itoa(levels-1) + "\n")
		return b.String()
	}
	cases := []struct {
		name, doc, want string
	}{
		{"self", "a: &a [*a, *a]\n", "never end"},
		{"mutual", "a: &a [&b [*a]]\n", "never end"},
		{"1e10 values", bomb(10), "would expand"},
		{"1e30 values", bomb(30), "would expand"},
		{"wide", "title: &t [" + strings.Repeat("x, ", 200) + "x]\n" + "l: [" + strings.Repeat("*t, ", 100) + "*t]\n", "would expand"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			start := time.Now()
			_, err := Parse(testFile, []byte(tc.doc))
			var fe *FieldError
			if !errors.As(err, &fe) || !strings.Contains(err.Error(), tc.want) || fe.Line == 0 {
				t.Errorf("err = %v, want a FieldError with a line that says %q", err, tc.want)
			}
			if d := time.Since(start); d > quickly {
				t.Errorf("took %v", d)
			}
		})
	}
	// Sharing within aliasFactor times the file is read as written out.
	doc := strings.Replace(minimal, "vibrations: {unit: cm-1, values: [3000, 1500, 1000]}", "vibrations: &v {unit: cm-1, values: [3000, 1500, 1000]}", 1)
	doc = strings.Replace(doc, "vibrations: {unit: cm-1, values: [2900, 1200]}", "vibrations: *v", 1)
	m, err := Parse(testFile, []byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	if _, ts := m.ReactantAndTS(); len(ts.Vibrations) != 3 || ts.Vibrations[0] != 3000 {
		t.Errorf("ts vibrations %v, want the reactant's", ts.Vibrations)
	}
}

// A file of more values than maxValues, or a mapping of more keys than
// maxKeys, is refused after one parse of the text, before the decoder,
// whose duplicate-key check takes time quadratic in a mapping's size.
func TestTooManyValues(t *testing.T) {
	var many strings.Builder
	many.WriteString("title: t\nmolecules:\n")
	for i := range maxKeys + 1 {
		many.WriteString("  m" + strconv.Itoa(i) + ": {mass: 1 amu}\n")
	}
	flat := "title: [" + strings.Repeat("0,", maxValues) + "0]\n"
	for _, tc := range []struct {
		name, doc, path, want string
	}{
		{"keys", many.String(), "molecules", "keys in one mapping"},
		{"values", flat, "", "values (keys, numbers"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			start := time.Now()
			_, err := Parse(testFile, []byte(tc.doc))
			var fe *FieldError
			if !errors.As(err, &fe) || fe.Path != tc.path || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("err = %v, want a FieldError at %q that says %q", err, tc.path, tc.want)
			}
			if d := time.Since(start); d > quickly {
				t.Errorf("took %v", d)
			}
		})
	}
}

// A message quotes a long value cut to 60 characters with its length, and
// escapes whatever would act on a terminal, in the path as in the value.
func TestFieldErrorClipsAndEscapes(t *testing.T) {
	long := strings.Repeat("9", 500_000)
	_, err := Parse(testFile, edit(t, "mass: 28.05 amu", "mass: "+long+" amu"))
	if err == nil || len(err.Error()) > 400 || !strings.Contains(err.Error(), "… (500004 bytes)") {
		t.Errorf("a 500 kB value: message of %d bytes: %.300s", len(err.Error()), err)
	}
	fe := &FieldError{File: "in\x1b.yaml", Line: 3, Path: "molecules.a\u2028b", Value: "x\u009by", Err: errors.New("bad\x07"), Hint: "h\u202e"}
	msg := fe.Error()
	if strings.ContainsFunc(msg, escape.NotPrintable) {
		t.Errorf("message %q holds a raw control character", msg)
	}
	for _, want := range []string{`in\x1b.yaml`, `molecules.a\u2028b`, `"x\u009by"`, `bad\a`, `h\u202e`} {
		if !strings.Contains(msg, want) {
			t.Errorf("message %q lacks %s", msg, want)
		}
	}
}
