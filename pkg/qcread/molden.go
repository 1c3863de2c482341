package qcread

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// BohrAngstrom is the Bohr radius a0 in Å (CODATA 2018, Tiesinga et al.,
// Rev. Mod. Phys. 93, 025010, 2021): 0.529177210903 Å.
const BohrAngstrom = 0.529177210903

// ZeroModeCm1 is the largest |ν| (cm⁻¹) of a listed mode that the Molden
// reader takes for a translation or rotation. Programs that list all 3N
// modes print these six (five) within a few tens of cm⁻¹ of zero, below
// nearly every real vibration (common practice, no source); they are dropped
// only when exactly 6 (5) modes lie below it.
const ZeroModeCm1 = 50.0

// ReadError is a file that cannot be read: it names the file, the line (0
// when the problem is the file as a whole), what is wrong, and a hint.
type ReadError struct {
	File string
	Line int
	What string
	Hint string
}

func (e *ReadError) Error() string {
	loc := e.File
	if e.Line > 0 {
		loc = fmt.Sprintf("%s:%d", e.File, e.Line)
	}
	if e.Hint == "" {
		return loc + ": " + e.What
	}
	return loc + ": " + e.What + " (" + e.Hint + ")"
}

// Frequencies is what a frequency calculation's output gives: the geometry
// at which the frequencies were computed and the harmonic modes.
type Frequencies struct {
	Atoms      []Atom    // positions in Å
	Linear     bool      // the geometry is linear (3N−5 modes)
	Vibrations []float64 // real harmonic frequencies, cm⁻¹, in file order
	Imaginary  []float64 // magnitudes of the imaginary frequencies, cm⁻¹
	Dropped    []float64 // translations and rotations removed, cm⁻¹ (signed)

	// Energy is the electronic energy at the geometry, in hartree (E_h),
	// without zero-point energy; HasEnergy says whether the file gave one
	// (the Molden frequency sections carry none).
	Energy    float64
	HasEnergy bool
	// Program names what wrote the file, with its version where printed
	// ("xtb 6.5.1", "Psi4 1.3.2", "Molden file"); Method is the level of
	// theory as printed ("B3LYP/6-31G*", "GFN2-xTB"), "" when not stated.
	Program string
	Method  string
	// Multiplicity is the spin multiplicity 2S+1 of the electronic state
	// (1 singlet, 2 doublet, ...); 0 when the file does not say.
	Multiplicity int
	// Printed holds what the program itself printed from the same
	// calculation, for cross-checks; zero values mean not printed.
	Printed Printed
}

// Printed are values a quantum-chemistry program prints beside its
// frequencies. The import does not use them: it recomputes each from the
// geometry and the frequencies, and the tests compare the two.
type Printed struct {
	ZeroPoint float64   // harmonic zero-point energy, E_h; 0 when not printed
	Constants []float64 // rotational constants, cm⁻¹, A ≥ B ≥ C; nil when not printed
}

// ReadMoldenFile reads the frequency sections of the Molden file at path;
// see ReadMolden.
func ReadMoldenFile(path string) (*Frequencies, error) { return readPath(path, ReadMolden) }

type section struct {
	header string // e.g. "[FREQ]" text after the bracket, like "AU"
	arg    string
	line   int
	lines  []numberedLine
}

type numberedLine struct {
	n    int
	text string
}

// ReadMolden reads the [FREQ], [FR-COORD] (bohr), optional [FR-NORM-COORD]
// and optional [Atoms] (AU or Angs) sections of a Molden file; name is used
// in errors. Frequencies are in cm⁻¹, imaginary ones written as negative.
// The mode count must be 3N−6 (3N−5 for a linear geometry), or 3N with
// exactly 6 (5) modes below ZeroModeCm1 in magnitude, which are dropped;
// any other count, a missing section, or sections that disagree on the
// atoms or the number of modes is a *ReadError.
func ReadMolden(r io.Reader, name string) (*Frequencies, error) {
	fail := func(line int, what, hint string) error {
		return &ReadError{File: name, Line: line, What: what, Hint: hint}
	}
	sections := map[string]*section{}
	var cur *section
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), 1<<20)
	for n := 1; sc.Scan(); n++ {
		text := strings.TrimSpace(sc.Text())
		if strings.HasPrefix(text, "[") {
			end := strings.Index(text, "]")
			if end < 0 {
				return nil, fail(n, fmt.Sprintf("section header %q has no closing ]", text), "a Molden section header looks like [FREQ]")
			}
			key := strings.ToUpper(text[1:end])
			if _, dup := sections[key]; dup {
				return nil, fail(n, fmt.Sprintf("section [%s] appears twice", text[1:end]), "keep one frequency calculation per file")
			}
			cur = &section{header: key, arg: strings.TrimSpace(text[end+1:]), line: n}
			sections[key] = cur
			continue
		}
		if cur != nil && text != "" {
			cur.lines = append(cur.lines, numberedLine{n, text})
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("qcread: %s: %w", name, err)
	}
	freqSec, ok := sections["FREQ"]
	if !ok {
		return nil, fail(0, "no [FREQ] section", "write the Molden file from a frequency calculation, or the file is truncated")
	}
	coordSec, ok := sections["FR-COORD"]
	if !ok {
		return nil, fail(0, "no [FR-COORD] section (the geometry of the frequencies)", "the file is truncated or was written without frequency data")
	}

	out := &Frequencies{}
	for _, l := range coordSec.lines {
		f := strings.Fields(l.text)
		if len(f) != 4 {
			return nil, fail(l.n, fmt.Sprintf("[FR-COORD] line %q: want an element and x y z in bohr", l.text), "one atom per line")
		}
		x, err := parseNumbers(f[1:])
		if err != nil {
			return nil, fail(l.n, fmt.Sprintf("[FR-COORD]: %v", err), "coordinates are numbers in bohr")
		}
		sym := NormalizeSymbol(f[0])
		if _, err := IsotopeMass(sym); err != nil {
			return nil, fail(l.n, fmt.Sprintf("[FR-COORD]: unknown element %q", f[0]), "the isotope table knows H D He Li B C N O F Ne Na Si P S Cl Ar Br I")
		}
		out.Atoms = append(out.Atoms, Atom{sym, [3]float64{x[0] * BohrAngstrom, x[1] * BohrAngstrom, x[2] * BohrAngstrom}})
	}
	nAtoms := len(out.Atoms)
	if nAtoms == 0 {
		return nil, fail(coordSec.line, "[FR-COORD] lists no atoms", "the file is truncated")
	}

	if atomsSec, ok := sections["ATOMS"]; ok {
		if err := checkAtomsSection(atomsSec, out.Atoms, fail); err != nil {
			return nil, err
		}
	}

	var freqs []float64
	var freqLines []int
	for _, l := range freqSec.lines {
		f := strings.Fields(l.text)
		if len(f) != 1 {
			return nil, fail(l.n, fmt.Sprintf("[FREQ] line %q: want one frequency", l.text), "one frequency in cm⁻¹ per line")
		}
		v, err := parseNumbers(f)
		if err != nil {
			return nil, fail(l.n, fmt.Sprintf("[FREQ]: %v", err), "frequencies are numbers in cm⁻¹, imaginary ones negative")
		}
		freqs = append(freqs, v[0])
		freqLines = append(freqLines, l.n)
	}

	g, err := Analyse(out.Atoms)
	if err != nil {
		return nil, fail(coordSec.line, fmt.Sprintf("[FR-COORD]: %v", err), "")
	}
	out.Linear = g.Linear
	if err := out.SetModes(freqs); err != nil {
		if me, ok := err.(*ModeError); ok && me.Index >= 0 {
			return nil, fail(freqLines[me.Index], "[FREQ]: "+me.What, me.Hint)
		}
		me := err.(*ModeError)
		return nil, fail(freqSec.line, "[FREQ]: "+me.What, me.Hint)
	}
	out.Program = "Molden file"
	if normSec, ok := sections["FR-NORM-COORD"]; ok {
		if err := checkNormalModes(normSec, nAtoms, len(freqs), fail); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// checkAtomsSection checks that [Atoms] lists the same elements as
// [FR-COORD], in the same order (lines: name number Z x y z).
func checkAtomsSection(s *section, atoms []Atom, fail func(int, string, string) error) error {
	unit := strings.ToUpper(s.arg)
	if unit != "AU" && unit != "ANGS" && unit != "(AU)" && unit != "(ANGS)" {
		return fail(s.line, fmt.Sprintf("[Atoms] unit %q", s.arg), "the Molden format gives [Atoms] AU or [Atoms] Angs")
	}
	if len(s.lines) != len(atoms) {
		return fail(s.line, fmt.Sprintf("[Atoms] lists %d atoms, [FR-COORD] %d", len(s.lines), len(atoms)), "the two sections must describe the same molecule")
	}
	for i, l := range s.lines {
		f := strings.Fields(l.text)
		if len(f) != 6 {
			return fail(l.n, fmt.Sprintf("[Atoms] line %q: want name, number, atomic number, x y z", l.text), "")
		}
		if _, err := parseNumbers(f[1:]); err != nil {
			return fail(l.n, fmt.Sprintf("[Atoms]: %v", err), "")
		}
		if NormalizeSymbol(f[0]) != atoms[i].Symbol {
			return fail(l.n, fmt.Sprintf("[Atoms] atom %d is %q, [FR-COORD] has %q", i+1, f[0], atoms[i].Symbol), "the two sections must list the atoms in the same order")
		}
	}
	return nil
}

// checkNormalModes checks that [FR-NORM-COORD] has one "vibration k" block
// of nAtoms displacement lines per frequency.
func checkNormalModes(s *section, nAtoms, nModes int, fail func(int, string, string) error) error {
	modes, rows := 0, 0
	closeBlock := func(line int) error {
		if modes > 0 && rows != nAtoms {
			return fail(line, fmt.Sprintf("[FR-NORM-COORD] vibration %d has %d displacement lines, want %d", modes, rows, nAtoms), "the file is truncated")
		}
		return nil
	}
	for _, l := range s.lines {
		f := strings.Fields(l.text)
		if strings.EqualFold(f[0], "vibration") {
			if err := closeBlock(l.n); err != nil {
				return err
			}
			modes++
			rows = 0
			continue
		}
		if modes == 0 || len(f) != 3 {
			return fail(l.n, fmt.Sprintf("[FR-NORM-COORD] line %q", l.text), "want 'vibration k' then one line of dx dy dz per atom")
		}
		if _, err := parseNumbers(f); err != nil {
			return fail(l.n, fmt.Sprintf("[FR-NORM-COORD]: %v", err), "")
		}
		rows++
	}
	end := s.line
	if n := len(s.lines); n > 0 {
		end = s.lines[n-1].n
	}
	if err := closeBlock(end); err != nil {
		return err
	}
	if modes != nModes {
		return fail(s.line, fmt.Sprintf("[FR-NORM-COORD] has %d vibrations, [FREQ] %d", modes, nModes), "the file is truncated or the sections come from different calculations")
	}
	return nil
}

// parseNumbers parses finite floats, accepting Fortran's D exponent.
func parseNumbers(fields []string) ([]float64, error) {
	out := make([]float64, len(fields))
	for i, f := range fields {
		v, err := strconv.ParseFloat(strings.NewReplacer("D", "E", "d", "e").Replace(f), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%q is not a finite number", f)
		}
		out[i] = v
	}
	return out, nil
}
