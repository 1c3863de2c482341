package fit

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"github.com/falloff-kinetics/falloff/pkg/escape"
	"io"
	"math"
	"os"
	"regexp"
	"strconv"
	"strings"
	"syscall"
	"unicode/utf8"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// CSVError reports a problem in a rate table read by ReadCSV, with the
// place and the value that caused it. Line and Column are 1-based; zero
// means the problem has no single place (e.g. too few rows).
type CSVError struct {
	File   string
	Line   int
	Column int    // field number, 1-based
	Header string // the column's header, e.g. "P/atm"
	Value  string // the offending text
	Err    error  // what is wrong
	Hint   string // how to fix it
}

func (e *CSVError) Error() string {
	var b strings.Builder
	b.WriteString(escape.Printable(e.File))
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Column > 0 {
		fmt.Fprintf(&b, ": column %d", e.Column)
		if e.Header != "" {
			fmt.Fprintf(&b, " (%s)", escape.Printable(clip(oneLine(e.Header))))
		}
	}
	if e.Value != "" {
		b.WriteString(": " + quoteClipped(e.Value))
	}
	fmt.Fprintf(&b, ": %s", escape.Printable(oneLine(fmt.Sprint(e.Err))))
	if e.Hint != "" {
		b.WriteString(" (hint: " + escape.Printable(oneLine(e.Hint)) + ")")
	}
	return b.String()
}

// maxQuoted is the longest text, in runes, a message shows whole; a longer
// one (a 5 MB cell, say) is cut to its first clipRunes runes, with an
// ellipsis and its length in bytes.
const (
	maxQuoted = 80
	clipRunes = 60
)

// clip cuts s to clipRunes runes and says how long it was, if it is longer
// than maxQuoted runes.
func clip(s string) string {
	if head, cut := clipHead(s); cut {
		return fmt.Sprintf("%s… (%d bytes)", head, len(s))
	}
	return s
}

// clipHead returns the first clipRunes runes of s if s is longer than
// maxQuoted runes, and whether it cut.
func clipHead(s string) (string, bool) {
	if utf8.RuneCountInString(s) <= maxQuoted {
		return s, false
	}
	n := 0
	for i := range s {
		if n == clipRunes {
			return s[:i], true
		}
		n++
	}
	return s, false
}

// quoteClipped quotes s like %q (control and format characters escaped),
// cut as clip cuts it.
func quoteClipped(s string) string {
	// strconv.Quote leaves U+FFFD as it is (it is printable); Printable
	// then writes it \ufffd, as every other rune a message must not carry.
	if head, cut := clipHead(s); cut {
		return escape.Printable(fmt.Sprintf("%q… (%d bytes)", head, len(s)))
	}
	return escape.Printable(strconv.Quote(s))
}

// maxHeaderLen bounds a column header in bytes: "k/cm3/molecule/s" and
// "uncertainty/%" take 16 and 13.
const maxHeaderLen = 64

func (e *CSVError) Unwrap() error { return e.Err }

// oneLine folds line breaks, which a quoted header may hold, so that a
// message stays on one line.
func oneLine(s string) string {
	if !strings.ContainsAny(s, "\r\n") {
		return s
	}
	return strings.Join(strings.Fields(s), " ")
}

// minCSVRows is the fewest data rows ReadCSV accepts: no form can be fitted
// to fewer than three rate constants.
const minCSVRows = 3

const headerExample = "T/K,P/atm,k/s-1"

// MaxCSVBytes is the largest table ReadCSV and ReadCSVFile accept, 32 MiB:
// about a million rows of T, P and k, hundreds of times any measured or
// computed k(T,P) table (a 30 × 20 grid takes 20 kB). A larger input is the
// wrong file (or a device such as /dev/zero), and the cap bounds the memory
// of reading it.
const MaxCSVBytes = 32 << 20

// tooLarge is the error for a table beyond MaxCSVBytes.
func tooLarge(name string) error {
	return &CSVError{File: name, Err: fmt.Errorf("larger than %d MiB (%d bytes), the limit for a rate table", MaxCSVBytes>>20, MaxCSVBytes),
		Hint: "a k(T,P) table has a few hundred rows: is this the right file?"}
}

// ReadCSVFile reads the rate table in the file at path (ReadCSV, with path
// in messages) and returns it with the file's content, for checksums. An
// error opening or reading the file is an *fs.PathError. A named pipe is
// opened without waiting for a writer (one without reads as empty), and at
// most MaxCSVBytes are read, so that neither a FIFO nor an endless device
// can make it hang or exhaust memory.
func ReadCSVFile(path string) (*Table, []byte, error) {
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	src, err := io.ReadAll(io.LimitReader(f, MaxCSVBytes+1))
	if err != nil {
		return nil, nil, err
	}
	if len(src) > MaxCSVBytes {
		return nil, nil, tooLarge(path)
	}
	t, err := ReadCSV(path, bytes.NewReader(src))
	if err != nil {
		return nil, nil, err
	}
	return t, src, nil
}

// replicateMaxRatio is the largest factor by which replicates (rows with
// the same T and P) may differ in a table without uncertainties: beyond
// a factor of 10 a row is far more likely mistyped (an exponent, a unit)
// than a measurement, and an unweighted fit would average the two.
// (Common practice, no source.)
const replicateMaxRatio = 10.0

// headerRE splits "name/unit", "name [unit]" and "name (unit)".
var headerRE = regexp.MustCompile(`^\s*([A-Za-z_]+)\s*(?:/\s*(.*?)|\[\s*(.*?)\s*\]|\(\s*(.*?)\s*\))?\s*$`)

// column kinds of a rate table.
const (
	colT = iota
	colP
	colK
	colSigma
)

// ReadCSV reads a rate table from comma-separated text: a header naming
// the columns with their units, then one row per rate constant. Lines
// starting with '#' are comments. The columns, in any order:
//
//	T/K        temperature; kelvin only
//	P/<unit>   pressure in Pa, kPa, MPa, hPa, bar, mbar, atm or Torr
//	k/<unit>   rate constant; the unit is kept as text, e.g. s-1, cm3/mol/s
//	sigma      optional relative uncertainty of k as a fraction (0.05), or
//	sigma/%, uncertainty/%  the same in per cent (5)
//
// "name [unit]" and "name (unit)" are accepted too. Rows with the same T
// and P are replicates, all kept; without an uncertainty column they must
// agree within a factor of 10 (replicateMaxRatio). A UTF-8 byte-order mark
// at the start (as spreadsheet programs write) is skipped. Headers are
// printable text of at most 64 bytes, and at most MaxCSVBytes are read, so
// that an endless stream ends at once. name is used in error messages.
// Every error is a *CSVError naming the line and column; its message
// escapes control characters and cuts a long value.
func ReadCSV(name string, r io.Reader) (*Table, error) {
	// Read at most MaxCSVBytes, so that an endless stream ends at once.
	data, err := io.ReadAll(io.LimitReader(r, MaxCSVBytes+1))
	if err != nil {
		return nil, &CSVError{File: name, Err: err}
	}
	if len(data) > MaxCSVBytes {
		return nil, tooLarge(name)
	}
	br := bufio.NewReader(bytes.NewReader(data))
	if b, err := br.Peek(3); err == nil && string(b) == "\ufeff" {
		br.Discard(3)
	}
	cr := csv.NewReader(br)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true

	fail := func(line, col int, header, value string, err error, hint string) error {
		return &CSVError{File: name, Line: line, Column: col, Header: header, Value: value, Err: err, Hint: hint}
	}
	readErr := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return fail(pe.Line, 0, "", "", pe.Err, "check the quoting of that line")
		}
		return fail(0, 0, "", "", err, "")
	}

	head, err := cr.Read()
	if err == io.EOF {
		return nil, fail(0, 0, "", "", errors.New("empty file: no header and no data"), "start with a header such as "+headerExample)
	}
	if err != nil {
		return nil, readErr(err)
	}
	headLine, _ := cr.FieldPos(0)

	kind := make([]int, len(head))
	have := map[int]int{} // column kind → field index
	t := &Table{Name: name}
	pFactor, sigmaFactor := 0.0, 1.0
	for i, h := range head {
		h = strings.TrimSpace(h)
		head[i] = h
		// The header's units are printed in reports and written into
		// mechanism files: no control characters, no essays.
		if strings.ContainsFunc(h, escape.NotPrintable) {
			return nil, fail(headLine, i+1, "", h, errors.New("a control or formatting character in the header"), "write name/unit in plain text, e.g. "+headerExample)
		}
		if len(h) > maxHeaderLen {
			return nil, fail(headLine, i+1, "", h, fmt.Errorf("a column header of %d bytes, more than %d", len(h), maxHeaderLen), "write name/unit, e.g. "+headerExample)
		}
		if _, err := strconv.ParseFloat(h, 64); err == nil {
			return nil, fail(headLine, i+1, "", h, errors.New("missing header: the first line holds numbers"),
				"start with a header naming the columns and their units, e.g. "+headerExample)
		}
		m := headerRE.FindStringSubmatch(h)
		if m == nil {
			return nil, fail(headLine, i+1, "", h, errors.New("cannot read column header"), "write name/unit, e.g. "+headerExample)
		}
		col, unit := strings.ToLower(m[1]), m[2]+m[3]+m[4]
		switch col {
		case "t":
			kind[i] = colT
			if strings.TrimSpace(unit) != "K" {
				return nil, fail(headLine, i+1, "", h, fmt.Errorf("temperature unit %s", quoteClipped(unit)), "write temperatures in kelvin: T/K")
			}
		case "p":
			kind[i] = colP
			f, err := units.Factor(unit, units.Pressure)
			if err != nil {
				return nil, fail(headLine, i+1, "", h, fmt.Errorf("pressure unit %s unknown", quoteClipped(unit)),
					"write P/<unit> with one of Pa, kPa, MPa, hPa, bar, mbar, atm, Torr")
			}
			pFactor = f
		case "k":
			kind[i] = colK
			if strings.TrimSpace(unit) == "" {
				return nil, fail(headLine, i+1, "", h, errors.New("rate constant without units"), "write the units in the header, e.g. k/s-1 or k/cm3/mol/s")
			}
			t.KUnits = strings.TrimSpace(unit)
		case "sigma", "uncertainty":
			kind[i] = colSigma
			switch strings.TrimSpace(unit) {
			case "%":
				sigmaFactor = 0.01
			case "":
				if col == "uncertainty" {
					return nil, fail(headLine, i+1, "", h, errors.New("uncertainty without unit"), "write uncertainty/% (per cent) or sigma (a fraction)")
				}
			default:
				return nil, fail(headLine, i+1, "", h, fmt.Errorf("uncertainty unit %s", quoteClipped(unit)), "write sigma (a fraction) or sigma/% (per cent)")
			}
		default:
			return nil, fail(headLine, i+1, "", h, errors.New("unknown column"), "the columns are T/K, P/<unit>, k/<unit> and optionally sigma or uncertainty/%")
		}
		if j, dup := have[kind[i]]; dup {
			return nil, fail(headLine, i+1, "", h, fmt.Errorf("same quantity as column %d (%s)", j+1, clip(head[j])), "give each of T, P, k once")
		}
		have[kind[i]] = i
	}
	for _, need := range []struct {
		kind int
		what string
	}{{colT, "T/K"}, {colP, "P/<unit>"}, {colK, "k/<unit>"}} {
		if _, ok := have[need.kind]; !ok {
			return nil, fail(headLine, 0, "", strings.Join(head, ","), fmt.Errorf("no %s column", need.what), "the header needs T, P and k with units, e.g. "+headerExample)
		}
	}

	// Replicates (the same T and P on several rows) are kept; without an
	// uncertainty column they must agree within replicateMaxRatio.
	type key struct{ T, P float64 }
	type rep struct {
		lo, hi         float64 // smallest and largest k so far
		loLine, hiLine int
	}
	seen := map[key]*rep{}
	_, weighted := have[colSigma]
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, readErr(err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		if len(rec) != len(head) {
			col := min(len(rec), len(head)) + 1
			return nil, fail(line, col, "", strings.Join(rec, ","), fmt.Errorf("%d fields, the header has %d", len(rec), len(head)),
				"every row needs one value per header column, in the header's units (no units in the rows, no decimal commas)")
		}
		var pt Point
		for i, s := range rec {
			s = strings.TrimSpace(s)
			v, err := strconv.ParseFloat(s, 64)
			if err != nil {
				hint := "write a plain number such as 1.5e-12"
				// A number followed by more text is a value with its unit;
				// a word ("fast") is not a number at all.
				if num, rest := units.SplitNumber(s); rest != "" {
					if _, err := strconv.ParseFloat(num, 64); err == nil {
						hint = "units belong in the header only (" + headerExample + "), not in the rows"
					}
				}
				return nil, fail(line, i+1, head[i], s, errors.New("not a number"), hint)
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fail(line, i+1, head[i], s, errors.New("not a finite number"), "remove the row or give a finite value")
			}
			switch kind[i] {
			case colT:
				if v <= 0 {
					return nil, fail(line, i+1, head[i], s, errors.New("temperature must be positive"), "temperatures are in K")
				}
				pt.T = v
			case colP:
				if v <= 0 {
					return nil, fail(line, i+1, head[i], s, errors.New("pressure must be positive"), "the fits work in log P")
				}
				if pt.P = v * pFactor; math.IsInf(pt.P, 0) {
					return nil, fail(line, i+1, head[i], s, errors.New("pressure beyond the float64 range in Pa"), "check the number and the header's unit")
				}
			case colK:
				if v <= 0 {
					return nil, fail(line, i+1, head[i], s, errors.New("non-positive k"), "the fits work in log k; drop the row or fix its sign")
				}
				pt.K = v
			case colSigma:
				if v <= 0 {
					return nil, fail(line, i+1, head[i], s, errors.New("uncertainty must be positive"), "give every row an uncertainty, or drop the column")
				}
				if pt.Sigma = v * sigmaFactor; !(pt.Sigma > 0) {
					return nil, fail(line, i+1, head[i], s, errors.New("uncertainty too small to represent"), "give a relative uncertainty of at least 1e-300")
				}
			}
		}
		k := key{pt.T, pt.P}
		if r, dup := seen[k]; !dup {
			seen[k] = &rep{pt.K, pt.K, line, line}
		} else {
			if !weighted {
				other, l := r.lo, r.loLine
				if pt.K < r.lo {
					other, l = r.hi, r.hiLine
				}
				if f := math.Max(pt.K/other, other/pt.K); f > replicateMaxRatio {
					return nil, fail(line, 0, "", strings.Join(rec, ","),
						fmt.Errorf("k differs by a factor %.3g from the replicate on line %d (same T and P), more than the %g that replicates without uncertainties may differ", f, l, replicateMaxRatio),
						"check that row's number and units, or add a sigma column so that the fits weigh the scatter")
				}
			}
			if pt.K < r.lo {
				r.lo, r.loLine = pt.K, line
			}
			if pt.K > r.hi {
				r.hi, r.hiLine = pt.K, line
			}
		}
		t.Points = append(t.Points, pt)
	}
	if len(t.Points) < minCSVRows {
		return nil, fail(0, 0, "", "", fmt.Errorf("%w: %d data rows", ErrTooFewData, len(t.Points)),
			fmt.Sprintf("at least %d are needed, and a falloff fit wants several pressures at each of several temperatures", minCSVRows))
	}
	return t, nil
}
