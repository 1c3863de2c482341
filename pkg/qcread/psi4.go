package qcread

import (
	"bufio"
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"io"
	"regexp"
	"slices"
	"strconv"
	"strings"
)

// psi4Banner is the second line of the box that opens every Psi4 output.
const psi4Banner = "Psi4: An Open-Source Ab Initio Electronic Structure Package"

// printedMassTolerance is how far (u) a mass printed beside an atom may lie from
// the most abundant isotope's mass (mass.go) before the atom counts as
// isotopically substituted. Psi4 prints its masses to 12 decimals and
// NWChem to 8 significant digits (15.994910 for ¹⁶O), both well inside
// 1e-4 u, while ²H − ¹H ≈ 1 u and ¹³C − ¹²C ≈ 1 u (common practice, no source).
const printedMassTolerance = 1e-4

// isPsi4 reports whether head, the start of a file, is a Psi4 text output:
// a line holding the Psi4 banner on its own. A QCSchema JSON document that
// embeds Psi4's output as a string has the banner inside a longer line with
// escaped newlines, so it does not match.
func isPsi4(head []byte) bool {
	if t := bytes.TrimSpace(head); len(t) > 0 && (t[0] == '{' || t[0] == '[') {
		return false
	}
	for line := range bytes.Lines(head) {
		if string(bytes.TrimSpace(line)) == psi4Banner {
			return true
		}
	}
	return false
}

// ReadPsi4File reads the Psi4 output at path; see ReadPsi4.
func ReadPsi4File(path string) (*Frequencies, error) { return readPath(path, ReadPsi4) }

// psi4Call finds the method of a frequency()/hessian() call in the input
// echo, e.g. frequency('scf') or freq("b3lyp", dertype=1).
var psi4Call = regexp.MustCompile(`\b(?:frequency|frequencies|freq|hessian)\s*\(\s*['"]([^'"]+)['"]`)

// ReadPsi4 reads the text output (output.dat) of a Psi4 run that computed
// harmonic frequencies, frequency() alone or after optimize(); name is used
// in errors. It reads, from the frequency step (from the last line
// "hessian() will perform …" before the vibrational analysis):
//   - the geometry printed first in that step, in Å or bohr as its header
//     states. Psi4's hessian() computes the undisplaced reference first for
//     both analytic and finite-difference Hessians (psi4/driver/driver.py,
//     version 1.3.2), so this is the geometry of the frequencies;
//   - the rotational constants (cm⁻¹) printed with that geometry;
//   - the frequencies of "==> Harmonic Vibrational Analysis <==" (cm⁻¹;
//     imaginary ones, printed with a trailing i, become negative);
//   - the electronic energy "Total E0" (E_h) and the vibrational ZPE (E_h)
//     of the thermochemical analysis;
//   - the method from the frequency() call echoed with the input, with the
//     SCF reference (RHF, UHF, ROHF) or the functional for 'scf'/'hf', and
//     the basis printed in the step.
//
// It refuses, with a *ReadError, an output that stopped with an error (a
// geometry optimisation that did not converge raises one), one that does
// not end with "Psi4 exiting successfully" (truncated), one without or with
// several vibrational analyses (several frequency() calls cannot be told
// apart), a partial (single-irrep) analysis, frequencies at a point Psi4
// itself found non-stationary (rotations not projected), atoms with
// non-standard isotope masses, and tables that are incomplete.
func ReadPsi4(r io.Reader, name string) (*Frequencies, error) {
	fail := func(line int, what, hint string) error {
		return &ReadError{File: name, Line: line, What: what, Hint: hint}
	}
	lines, err := outputLines(r, name)
	if err != nil {
		return nil, err
	}

	version, banner := "", -1
	var analyses, steps []int
	exitOK, errorAt, partial, optDone := -1, -1, -1, -1
	for i, l := range lines {
		t := strings.TrimSpace(l)
		switch {
		case t == psi4Banner && banner < 0:
			banner = i
			if i+1 < len(lines) {
				if f := strings.Fields(lines[i+1]); len(f) >= 2 && f[0] == "Psi4" {
					version = f[1]
				}
			}
		case t == "==> Harmonic Vibrational Analysis <==":
			analyses = append(analyses, i)
		case strings.HasPrefix(t, "hessian() will perform"):
			steps = append(steps, i)
		case strings.HasPrefix(t, "**** Optimization is complete!"):
			optDone = i
		case strings.HasPrefix(t, "*** Psi4 exiting successfully"):
			exitOK = i
		case strings.HasPrefix(t, "*** Psi4 encountered an error") && errorAt < 0:
			errorAt = i
		case strings.HasPrefix(t, "Thermochemical analysis skipped for partial frequency calculation"):
			partial = i
		}
	}
	if banner < 0 {
		return nil, fail(0, "no Psi4 banner ("+psi4Banner+")", "this is not a Psi4 text output (output.dat)")
	}
	if errorAt >= 0 {
		msg := flatText(psi4ErrorMessage(lines[:errorAt]))
		hint := "the calculation failed; fix the cause and rerun"
		if strings.Contains(msg, "geometry optimization") {
			hint = "the geometry optimisation did not converge: raise geom_maxiter or start closer to the stationary point, then rerun"
		}
		return nil, fail(errorAt+1, "Psi4 stopped with an error: "+msg, hint)
	}
	// Each frequency() call prints one analysis, but two calls in one
	// output may be different molecules or levels of theory and nothing
	// says which is wanted: several analyses are refused, not the last taken.
	// One case is unambiguous: a transition-state search computes a Hessian
	// at its starting geometry to guide the optimiser, then frequencies at
	// the converged geometry. When exactly one analysis follows the last
	// "Optimization is complete!", it is the one at the stationary point and
	// the earlier ones, at unconverged geometries, are set aside.
	if len(analyses) > 1 && optDone >= 0 {
		var after []int
		for _, a := range analyses {
			if a > optDone {
				after = append(after, a)
			}
		}
		if len(after) == 1 {
			analyses = after
		}
	}
	switch len(analyses) {
	case 0:
		if exitOK < 0 {
			return nil, fail(0, "no harmonic vibrational analysis and no \"Psi4 exiting successfully\" line: the output is truncated", "use the output of a finished frequency() run")
		}
		return nil, fail(0, "no harmonic vibrational analysis (==> Harmonic Vibrational Analysis <==)", "run frequency() (after optimize()) and read its output")
	case 1:
	default:
		at := make([]string, len(analyses))
		for k, i := range analyses {
			at[k] = strconv.Itoa(i + 1)
		}
		return nil, fail(analyses[1]+1, fmt.Sprintf("%d harmonic vibrational analyses (lines %s): cannot tell which one is wanted", len(analyses), strings.Join(at, ", ")),
			"run one frequency() per output file")
	}
	if exitOK < 0 {
		return nil, fail(len(lines), "no \"Psi4 exiting successfully\" line: the output is truncated or Psi4 is still running", "use the output of a finished run")
	}
	if partial >= 0 {
		return nil, fail(partial+1, "a partial (single-irrep) frequency calculation", "compute all irreps: call frequency() without irrep=")
	}
	vib := analyses[0]
	step := -1
	for _, s := range steps {
		if s < vib {
			step = s
		}
	}
	if step < 0 {
		return nil, fail(vib+1, "no \"hessian() will perform …\" line before the vibrational analysis: the geometry of the frequencies cannot be located", "compute the frequencies with frequency() or hessian()")
	}
	// hessian() prints its verdict on the reference gradient just before
	// choosing how to compute the Hessian (psi4/driver/driver.py 1.3.2:
	// rotations are projected only when the gradient rms is below 1e-2).
	for i := step - 1; i >= 0 && i >= step-3; i-- {
		t := strings.TrimSpace(lines[i])
		if strings.HasPrefix(t, "Based on options and gradient") && strings.Contains(t, "not projecting rotations") {
			return nil, fail(i+1, "Psi4 did not project rotations out of the Hessian ("+flatText(strings.TrimSuffix(t, "."))+"): the geometry is not a stationary point, or an external field is on",
				"optimise the geometry at the same level of theory before frequency()")
		}
	}

	out := &Frequencies{Program: "Psi4"}
	if version != "" {
		out.Program = "Psi4 " + version
	}
	geomAt := -1
	for i := step; i < vib; i++ {
		if strings.HasPrefix(strings.TrimSpace(lines[i]), "Geometry (in ") {
			geomAt = i
			break
		}
	}
	if geomAt < 0 {
		return nil, fail(step+1, "no geometry printed in the frequency step", "the output is incomplete; print level too low?")
	}
	atoms, err := psi4Geometry(lines, geomAt, fail)
	if err != nil {
		return nil, err
	}
	out.Atoms = atoms
	// The header reads "Geometry (in Angstrom), charge = 0, multiplicity = 1:".
	if _, m, ok := strings.Cut(lines[geomAt], "multiplicity ="); ok {
		if n, err := strconv.Atoi(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(m), ":"))); err == nil && n >= 1 && n <= 20 {
			out.Multiplicity = n
		}
	}

	var reference, functional, basis string
	for i := step; i < vib; i++ {
		t := strings.TrimSpace(lines[i])
		switch {
		case out.Printed.Constants == nil && i > geomAt && strings.HasPrefix(t, "Rotational constants:") && strings.HasSuffix(t, "[cm^-1]"):
			c, err := psi4Constants(t)
			if err != nil {
				return nil, fail(i+1, err.Error(), "")
			}
			out.Printed.Constants = c
		case reference == "" && strings.HasSuffix(t, " Reference") && len(strings.Fields(t)) == 2:
			reference = strings.Fields(t)[0]
		case functional == "" && strings.HasPrefix(t, "=> Composite Functional:") && strings.HasSuffix(t, "<="):
			functional = strings.TrimSpace(strings.TrimSuffix(strings.TrimPrefix(t, "=> Composite Functional:"), "<="))
		case basis == "" && strings.HasPrefix(t, "Basis Set:"):
			basis = strings.TrimSpace(strings.TrimPrefix(t, "Basis Set:"))
		}
	}
	out.Method = psi4Method(psi4InputEcho(lines[:step]), reference, functional, basis)

	freqs, freqLines, end, err := psi4Modes(lines, vib, len(atoms), fail)
	if err != nil {
		return nil, err
	}
	for i := end; i < len(lines); i++ {
		t := strings.TrimSpace(lines[i])
		switch {
		case strings.HasPrefix(t, "Total E0, Electronic energy at well bottom"):
			v, err := psi4Value(t, "[Eh]")
			if err != nil {
				return nil, fail(i+1, "Total E0: "+err.Error(), "")
			}
			out.Energy, out.HasEnergy = v, true
		case strings.HasPrefix(t, "Vibrational ZPE"):
			v, err := psi4Value(t, "[Eh]")
			if err != nil {
				return nil, fail(i+1, "Vibrational ZPE: "+err.Error(), "")
			}
			out.Printed.ZeroPoint = v
		}
		if out.HasEnergy && out.Printed.ZeroPoint != 0 {
			break
		}
	}

	g, err := Analyse(out.Atoms)
	if err != nil {
		return nil, fail(geomAt+1, fmt.Sprintf("geometry: %v", err), "")
	}
	out.Linear = g.Linear
	if err := out.setModesAt(freqs, freqLines, vib+1, fail); err != nil {
		return nil, err
	}
	return out, nil
}

// outputLines reads all lines of r (used by every text-output reader here);
// a line longer than 1 MiB is a *ReadError.
func outputLines(r io.Reader, name string) ([]string, error) {
	var lines []string
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), 1<<20)
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, &ReadError{File: name, Line: len(lines) + 1, What: "a line longer than 1 MiB", Hint: "this is not a quantum-chemistry text output"}
		}
		return nil, fmt.Errorf("qcread: %s: %w", name, err)
	}
	return lines, nil
}

// flatText makes text taken from a file fit in a one-line error message:
// runs of white space, stray carriage returns included, become one space.
func flatText(s string) string {
	return strings.Join(strings.Fields(strings.ToValidUTF8(s, "?")), " ")
}

// psi4ErrorMessage returns the exception Psi4 printed before "Psi4
// encountered an error": the last "PsiException: …" line, else the last
// unindented "…Error: …" line, else a general phrase.
func psi4ErrorMessage(lines []string) string {
	for i := len(lines) - 1; i >= 0; i-- {
		if t := strings.TrimSpace(lines[i]); strings.HasPrefix(t, "PsiException:") {
			return strings.TrimSpace(strings.TrimPrefix(t, "PsiException:"))
		}
	}
	for i := len(lines) - 1; i >= 0; i-- {
		l := lines[i]
		if l != "" && l[0] != ' ' && l[0] != '\t' {
			if k := strings.Index(l, "Error: "); k > 0 {
				return strings.TrimSpace(l[k+len("Error: "):])
			}
		}
	}
	return "no message found"
}

// psi4Geometry parses the block that starts with "Geometry (in Angstrom|Bohr),
// …" at lines[at]: an optional "Center X Y Z Mass" header and dashes, then
// one atom per line (symbol x y z [mass]) up to a blank line.
func psi4Geometry(lines []string, at int, fail func(int, string, string) error) ([]Atom, error) {
	head := strings.TrimSpace(lines[at])
	scale := 0.0
	switch {
	case strings.HasPrefix(head, "Geometry (in Angstrom)"):
		scale = 1
	case strings.HasPrefix(head, "Geometry (in Bohr)"):
		scale = BohrAngstrom
	default:
		return nil, fail(at+1, fmt.Sprintf("geometry header %q: unknown unit", head), "Psi4 prints geometries in Angstrom or Bohr")
	}
	i := at + 1
	for i < len(lines) && strings.TrimSpace(lines[i]) == "" {
		i++
	}
	if i < len(lines) && strings.HasPrefix(strings.TrimSpace(lines[i]), "Center") {
		i++
	}
	if i < len(lines) && strings.HasPrefix(strings.TrimSpace(lines[i]), "---") {
		i++
	}
	var atoms []Atom
	for ; i < len(lines); i++ {
		f := strings.Fields(lines[i])
		if len(f) == 0 {
			break
		}
		if len(f) != 4 && len(f) != 5 {
			return nil, fail(i+1, fmt.Sprintf("geometry line %q: want symbol, x, y, z and mass", strings.TrimSpace(lines[i])), "the output is truncated or damaged")
		}
		v, err := parseNumbers(f[1:])
		if err != nil {
			return nil, fail(i+1, "geometry: "+err.Error(), "")
		}
		a, err := printedAtom(f[0], v, scale)
		if err != nil {
			return nil, fail(i+1, err.Error(), "isotopes other than the most abundant are not carried by the import; use the default masses")
		}
		atoms = append(atoms, a)
	}
	if len(atoms) == 0 {
		return nil, fail(at+1, "the geometry of the frequency step lists no atoms", "the output is truncated")
	}
	return atoms, nil
}

// printedAtom makes an Atom from a symbol and x, y, z (times scale to Å),
// with an optional fourth number, the mass in u, that must be the most
// abundant isotope's.
func printedAtom(label string, v []float64, scale float64) (Atom, error) {
	sym := NormalizeSymbol(label)
	m, err := IsotopeMass(sym)
	if err != nil {
		return Atom{}, fmt.Errorf("unknown element %q (known: H D He Li B C N O F Ne Na Si P S Cl Ar Br I)", label)
	}
	if len(v) == 4 && (v[3]-m > printedMassTolerance || m-v[3] > printedMassTolerance) {
		return Atom{}, fmt.Errorf("atom %s has mass %.6f u, not the most abundant isotope's %.6f u", label, v[3], m)
	}
	return Atom{sym, [3]float64{v[0] * scale, v[1] * scale, v[2] * scale}}, nil
}

// psi4Constants parses "Rotational constants: A = … B = … C = … [cm^-1]".
// Psi4 prints A as asterisks for a linear molecule (infinite); then the
// single B is returned, which must equal C.
func psi4Constants(t string) ([]float64, error) {
	body := strings.TrimSuffix(strings.TrimPrefix(t, "Rotational constants:"), "[cm^-1]")
	var vals []float64
	starred := false
	for _, key := range []string{"A", "B", "C"} {
		k := strings.Index(body, key+" =")
		if k < 0 {
			return nil, fmt.Errorf("rotational constants line %q: no %s", t, key)
		}
		f := strings.Fields(body[k+len(key)+2:])
		if len(f) == 0 {
			return nil, fmt.Errorf("rotational constants line %q: no value of %s", t, key)
		}
		if strings.Trim(f[0], "*") == "" {
			if key != "A" {
				return nil, fmt.Errorf("rotational constants line %q: %s is not printed", t, key)
			}
			starred = true
			continue
		}
		v, err := parseNumbers(f[:1])
		if err != nil || v[0] <= 0 {
			return nil, fmt.Errorf("rotational constants line %q: %s is not a positive number", t, key)
		}
		vals = append(vals, v[0])
	}
	if starred {
		if vals[0] != vals[1] {
			return nil, fmt.Errorf("rotational constants line %q: A is infinite but B ≠ C", t)
		}
		return vals[:1], nil
	}
	slices.SortFunc(vals, func(a, b float64) int { return cmp.Compare(b, a) })
	return vals, nil
}

// psi4InputEcho returns the input file Psi4 copies into its output, the
// lines between the dashed rules after "==> Input File <==".
func psi4InputEcho(lines []string) []string {
	start := -1
	for i, l := range lines {
		if strings.TrimSpace(l) == "==> Input File <==" {
			start = i
			break
		}
	}
	if start < 0 {
		return nil
	}
	var rules []int
	for i := start + 1; i < len(lines) && len(rules) < 2; i++ {
		if t := strings.TrimSpace(lines[i]); len(t) > 10 && strings.Trim(t, "-") == "" {
			rules = append(rules, i)
		}
	}
	if len(rules) < 2 {
		return nil
	}
	return lines[rules[0]+1 : rules[1]]
}

// psi4Method names the level of theory: the method of the frequency()
// call echoed in the input (upper case), with 'scf' and 'hf' replaced by
// the printed SCF reference (RHF, UHF, ROHF) or, for a Kohn–Sham
// reference, the functional; then "/basis". It is "" when the input echo
// has no such call with a literal method name.
func psi4Method(echo []string, reference, functional, basis string) string {
	token := ""
	for _, l := range echo {
		t := strings.TrimSpace(l)
		if strings.HasPrefix(t, "#") {
			continue
		}
		if m := psi4Call.FindStringSubmatch(t); m != nil {
			token = strings.ToUpper(strings.TrimSpace(m[1]))
		}
	}
	if token == "" {
		return ""
	}
	if token == "SCF" || token == "HF" {
		switch {
		case (reference == "RKS" || reference == "UKS") && functional != "":
			token = functional
		case reference != "" && reference != "RKS" && reference != "UKS":
			token = reference
		}
	}
	if basis == "" {
		return token
	}
	return token + "/" + basis
}

// psi4Modes reads the vibration tables after "==> Harmonic Vibrational
// Analysis <==" at lines[at]: blocks of "Vibration k …", "Freq [cm^-1] …",
// property rows, a dashed line and one displacement row per atom. It
// returns the frequencies (cm⁻¹, imaginary ones negative), the 1-based line
// of each, and the index of the line after the last block.
func psi4Modes(lines []string, at, nAtoms int, fail func(int, string, string) error) ([]float64, []int, int, error) {
	var freqs []float64
	var freqLines []int
	i := at + 1
	for ; i < len(lines); i++ {
		t := strings.TrimSpace(lines[i])
		if strings.HasPrefix(t, "==>") {
			break
		}
		fields := strings.Fields(t)
		if len(fields) == 0 || fields[0] != "Vibration" {
			continue
		}
		idx := fields[1:]
		for _, s := range idx {
			if _, err := strconv.Atoi(s); err != nil {
				return nil, nil, 0, fail(i+1, fmt.Sprintf("vibration header %q: %q is not a mode number", t, s), "the output is damaged")
			}
		}
		i++
		if i >= len(lines) || !strings.HasPrefix(strings.TrimSpace(lines[i]), "Freq [cm^-1]") {
			return nil, nil, 0, fail(i, "a \"Vibration\" row without a \"Freq [cm^-1]\" row after it", "the output is truncated or damaged")
		}
		vals := strings.Fields(strings.TrimPrefix(strings.TrimSpace(lines[i]), "Freq [cm^-1]"))
		if len(vals) != len(idx) || len(vals) == 0 {
			return nil, nil, 0, fail(i+1, fmt.Sprintf("%d mode numbers but %d frequencies", len(idx), len(vals)), "the output is truncated or damaged")
		}
		for _, s := range vals {
			sign := 1.0
			if strings.HasSuffix(s, "i") {
				s, sign = strings.TrimSuffix(s, "i"), -1
			}
			v, err := parseNumbers([]string{s})
			if err != nil || v[0] < 0 {
				return nil, nil, 0, fail(i+1, fmt.Sprintf("frequency %q is not a number (imaginary ones end in i)", s), "")
			}
			freqs = append(freqs, sign*v[0])
			freqLines = append(freqLines, i+1)
		}
		// Property rows, then the dashes, then one row per atom.
		for i++; i < len(lines) && !strings.HasPrefix(strings.TrimSpace(lines[i]), "---"); i++ {
			if strings.TrimSpace(lines[i]) == "" {
				break
			}
		}
		if i >= len(lines) || !strings.HasPrefix(strings.TrimSpace(lines[i]), "---") {
			return nil, nil, 0, fail(i, "a vibration block ends before its normal-mode rows", "the output is truncated")
		}
		rows := 0
		for i++; i < len(lines); i++ {
			f := strings.Fields(lines[i])
			if len(f) == 0 {
				break
			}
			if len(f) != 2+3*len(vals) {
				return nil, nil, 0, fail(i+1, fmt.Sprintf("normal-mode row %q: want atom number, symbol and 3 displacements per mode", strings.TrimSpace(lines[i])), "the output is truncated or damaged")
			}
			rows++
		}
		if rows != nAtoms {
			return nil, nil, 0, fail(i, fmt.Sprintf("a vibration block has %d atom rows but the geometry has %d atoms", rows, nAtoms), "the geometry and the frequencies come from different calculations, or the output is truncated")
		}
	}
	if len(freqs) == 0 {
		return nil, nil, 0, fail(at+1, "the vibrational analysis lists no frequencies", "the output is truncated")
	}
	return freqs, freqLines, i, nil
}

// psi4Value returns the number just before unit (e.g. "[Eh]") in t.
func psi4Value(t, unit string) (float64, error) {
	k := strings.Index(t, unit)
	if k < 0 {
		return 0, fmt.Errorf("no value in %s", unit)
	}
	f := strings.Fields(t[:k])
	if len(f) == 0 {
		return 0, fmt.Errorf("no value in %s", unit)
	}
	v, err := parseNumbers(f[len(f)-1:])
	if err != nil {
		return 0, err
	}
	return v[0], nil
}
