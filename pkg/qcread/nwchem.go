package qcread

import (
	"bytes"
	"cmp"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
)

// nwchemBanner opens every NWChem output, followed by the version.
const nwchemBanner = "Northwest Computational Chemistry Package (NWChem)"

// nwchemFreqHeader opens the output of each "task … freq".
const nwchemFreqHeader = "NWChem Nuclear Hessian and Frequency Analysis"

// nwchemSCFModules are the module banners a frequency task of SCF or DFT
// prints (observed in NWChem 7.0.2 with analytic and finite-difference
// Hessians). Any other banner in the task means another theory (MP2, CC,
// …), whose energy the reader does not take.
var nwchemSCFModules = map[string]bool{
	nwchemFreqHeader:                   true,
	"NWChem Analytic Hessian":          true,
	"NWChem Finite-difference Hessian": true,
	"NWChem SCF Module":                true,
	"NWChem DFT Module":                true,
	"NWChem Gradients Module":          true,
	"NWChem DFT Gradient Module":       true,
	"NWChem CPHF Module":               true,
	"NWChem Input Module":              true,
}

// isNWChem reports whether head, the start of a file, is an NWChem output:
// a line that begins with NWChem's banner.
func isNWChem(head []byte) bool {
	if t := bytes.TrimSpace(head); len(t) > 0 && (t[0] == '{' || t[0] == '[') {
		return false
	}
	for line := range bytes.Lines(head) {
		if bytes.HasPrefix(bytes.TrimSpace(line), []byte(nwchemBanner)) {
			return true
		}
	}
	return false
}

// ReadNWChemFile reads the NWChem output at path; see ReadNWChem.
func ReadNWChemFile(path string) (*Frequencies, error) { return readPath(path, ReadNWChem) }

// ReadNWChem reads the output of an NWChem run with one "task scf freq" or
// "task dft freq" (alone or after "task … optimize" or "saddle"); name is
// used in errors. From the frequency task (from "NWChem Nuclear Hessian and
// Frequency Analysis" to its "Task times" line) it reads:
//   - the geometry of the "Atom information" table of the vibrational
//     analysis, in bohr (NWChem's vib module works in atomic units,
//     src/vib/vib_thermo.F; the tests check it against the Å geometry NWChem
//     prints before the task), converted to Å with a0 = BohrAngstrom (CODATA
//     2018; NWChem's own Å printout uses 1/1.889725989 Å, 7e-8 relative
//     more), and the masses, which must be the most abundant isotopes';
//   - the projected frequencies ("P.Frequency", cm⁻¹, all 3N, imaginary
//     ones negative; SetModes drops the six (five) zeros). The unprojected
//     "Frequency" rows are not used;
//   - the rotational constants (cm⁻¹; A = 0 for a linear molecule, then the
//     single B) and the zero-point correction (au = E_h) as printed. NWChem
//     computes the latter with R = 1.9863 cal/(mol K) and hc/k from
//     h = 6.626e-27 erg s, c = 2.998e10 cm/s, k = 1.3807e-16 erg/K
//     (src/vib/vib_wrtfreq.F), so it is 4.9e-4 (relative) below ½Σν with
//     CODATA constants;
//   - the electronic energy, the first "Total SCF energy" or "Total DFT
//     energy" of the task (the undisplaced reference, computed first for
//     analytic and finite-difference Hessians alike, as observed), and the
//     method: the SCF wavefunction (RHF, UHF, ROHF) or the functional
//     ("B3LYP Method XC Potential"; "DFT" when not printed), "/", the basis
//     of the last "ao basis" summary printed up to the task. For another
//     theory Method is "" and the energy is not read.
//
// It refuses, with a *ReadError, an output with an NWChem error (a geometry
// optimisation that ran out of steps stops with "… optimize failed"), one
// with a failed task that was ignored ("!! warning: … failed"), one without
// the closing "Total times" line (truncated), one with no or several
// frequency tasks (which cannot be told apart), and incomplete tables.
func ReadNWChem(r io.Reader, name string) (*Frequencies, error) {
	fail := func(line int, what, hint string) error {
		return &ReadError{File: name, Line: line, What: what, Hint: hint}
	}
	lines, err := outputLines(r, name)
	if err != nil {
		return nil, err
	}
	version, banner := "", -1
	var tasks []int
	errorAt, warnAt, totalTimes := -1, -1, -1
	for i, l := range lines {
		t := strings.TrimSpace(l)
		switch {
		case banner < 0 && strings.HasPrefix(t, nwchemBanner):
			banner = i
			version = strings.TrimSpace(strings.TrimPrefix(t, nwchemBanner))
		case t == nwchemFreqHeader:
			tasks = append(tasks, i)
		case errorAt < 0 && strings.HasPrefix(t, "current input line :"):
			errorAt = i
		case errorAt < 0 && strings.HasPrefix(t, "For further details see manual section:"):
			errorAt = i
		case warnAt < 0 && strings.HasPrefix(t, "!! warning:") && strings.Contains(t, "failed"):
			warnAt = i
		case strings.HasPrefix(t, "Total times  cpu:"):
			totalTimes = i
		}
	}
	if banner < 0 {
		return nil, fail(0, "no NWChem banner ("+nwchemBanner+")", "this is not an NWChem output")
	}
	if errorAt >= 0 {
		msg := flatText(nwchemErrorMessage(lines, errorAt))
		hint := "the calculation failed; fix the cause and rerun"
		if strings.Contains(msg, "optimize failed") || strings.Contains(msg, "saddle failed") {
			hint = "the geometry optimisation did not converge: raise maxiter in the driver block or start closer to the stationary point, then rerun"
		}
		return nil, fail(errorAt+1, "NWChem stopped with an error: "+msg, hint)
	}
	if warnAt >= 0 {
		return nil, fail(warnAt+1, "a task failed and the run went on ("+flatText(lines[warnAt])+")",
			"remove \"ignore\" from the task line and rerun the failed step; frequencies after a failed optimisation are not at a stationary point")
	}
	// Each freq task prints one analysis, but two tasks in one output may
	// be different molecules or levels of theory and nothing says which is
	// wanted: several are refused, not the last taken.
	switch len(tasks) {
	case 0:
		if totalTimes < 0 {
			return nil, fail(0, "no frequency task and no closing \"Total times\" line: the output is truncated", "use the output of a finished run")
		}
		return nil, fail(0, "no frequency task ("+nwchemFreqHeader+")", "run task scf freq or task dft freq")
	case 1:
	default:
		at := make([]string, len(tasks))
		for k, i := range tasks {
			at[k] = strconv.Itoa(i + 1)
		}
		return nil, fail(tasks[1]+1, fmt.Sprintf("%d frequency tasks (lines %s): cannot tell which one is wanted", len(tasks), strings.Join(at, ", ")),
			"run one task … freq per output file")
	}
	if totalTimes < tasks[0] {
		return nil, fail(len(lines), "no closing \"Total times\" line after the frequency task: the output is truncated or NWChem is still running", "use the output of a finished run")
	}
	start, end := tasks[0], totalTimes
	for i := start; i < totalTimes; i++ {
		if strings.HasPrefix(strings.TrimSpace(lines[i]), "Task  times  cpu:") {
			end = i
			break
		}
	}

	out := &Frequencies{Program: "NWChem"}
	if version != "" {
		out.Program = "NWChem " + version
	}
	atomsAt := -1
	for i := start; i < end; i++ {
		if t := strings.TrimSpace(lines[i]); strings.HasPrefix(t, "---") && strings.Contains(t, " Atom information ") {
			atomsAt = i
			break
		}
	}
	if atomsAt < 0 {
		return nil, fail(start+1, "the frequency task has no \"Atom information\" table (the geometry of the frequencies)", "the output is incomplete")
	}
	atoms, err := nwchemAtoms(lines, atomsAt, end, fail)
	if err != nil {
		return nil, err
	}
	out.Atoms = atoms

	freqs, freqLines, err := nwchemModes(lines, start, end, len(atoms), fail)
	if err != nil {
		return nil, err
	}

	otherTheory := false
	theory, xc, wavefunction := "", "", ""
	energyAt := -1
	for i := start; i < end; i++ {
		t := strings.TrimSpace(lines[i])
		switch {
		case strings.HasPrefix(t, "NWChem ") && i+1 < len(lines) && isRule(lines[i+1]):
			if !nwchemSCFModules[t] {
				otherTheory = true
			}
			if theory == "" && (t == "NWChem SCF Module" || t == "NWChem DFT Module") {
				theory = t
			}
		case xc == "" && strings.HasSuffix(t, " Method XC Potential"):
			xc = strings.TrimSpace(strings.TrimSuffix(t, " Method XC Potential"))
		case wavefunction == "" && strings.HasPrefix(t, "wavefunction") && strings.Contains(t, "="):
			wavefunction = strings.TrimSpace(t[strings.Index(t, "=")+1:])
		case energyAt < 0 && (strings.HasPrefix(t, "Total SCF energy =") || strings.HasPrefix(t, "Total DFT energy =")):
			energyAt = i
		case out.Printed.Constants == nil && t == "Rotational Constants":
			c, err := nwchemConstants(lines, i, end)
			if err != nil {
				return nil, fail(i+1, err.Error(), "the output is truncated or damaged")
			}
			out.Printed.Constants = c
		case out.Printed.ZeroPoint == 0 && strings.HasPrefix(t, "Zero-Point correction to Energy"):
			v, err := nwchemAU(t)
			if err != nil {
				return nil, fail(i+1, "zero-point correction: "+err.Error(), "")
			}
			out.Printed.ZeroPoint = v
		}
	}
	if !otherTheory && theory != "" && energyAt >= 0 {
		t := strings.TrimSpace(lines[energyAt])
		v, err := parseNumbers(strings.Fields(t[strings.Index(t, "=")+1:]))
		if err != nil || len(v) != 1 {
			return nil, fail(energyAt+1, fmt.Sprintf("energy line %q: want one number", t), "")
		}
		out.Energy, out.HasEnergy = v[0], true
		method := "DFT"
		switch {
		case theory == "NWChem SCF Module" && wavefunction != "":
			method = wavefunction
		case theory == "NWChem SCF Module":
			method = "SCF"
		case xc != "":
			method = xc
		}
		if basis := nwchemBasis(lines[:end]); basis != "" {
			method += "/" + basis
		}
		out.Method = method
	}
	// The spin multiplicity: the DFT module prints "Spin multiplicity: M",
	// the SCF module "open shells = n" (a closed shell or a high-spin
	// open shell, M = n + 1); the last before the frequencies counts.
	for i := 0; i < end; i++ {
		t := strings.TrimSpace(lines[i])
		if v, ok := strings.CutPrefix(t, "Spin multiplicity:"); ok {
			if n, err := strconv.Atoi(strings.TrimSpace(v)); err == nil && n >= 1 && n <= 20 {
				out.Multiplicity = n
			}
		} else if v, ok := strings.CutPrefix(t, "open shells"); ok {
			if n, err := strconv.Atoi(strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(v), "="))); err == nil && n >= 0 && n < 20 {
				out.Multiplicity = n + 1
			}
		}
	}

	g, err := Analyse(out.Atoms)
	if err != nil {
		return nil, fail(atomsAt+1, fmt.Sprintf("geometry: %v", err), "")
	}
	out.Linear = g.Linear
	if err := out.setModesAt(freqs, freqLines, start+1, fail); err != nil {
		return nil, err
	}
	return out, nil
}

// isRule reports whether l is a rule of dashes (possibly in several
// column-wide pieces), as under banners and table headers.
func isRule(l string) bool {
	t := strings.TrimSpace(l)
	return len(t) >= 3 && t[0] == '-' && strings.Trim(t, "- ") == ""
}

// nwchemErrorMessage returns the message NWChem printed between dashed
// rules above "current input line" (or above "For further details").
func nwchemErrorMessage(lines []string, at int) string {
	for i := at - 1; i >= 0 && i >= at-12; i-- {
		t := strings.TrimSpace(lines[i])
		if t == "" || isRule(t) || strings.HasPrefix(t, "current input line") || strings.HasPrefix(t, "For more information") ||
			strings.HasPrefix(t, "There is an error") || strings.HasPrefix(t, "This type of error") || strings.Contains(t, "task ") && strings.Contains(t, ":") {
			continue
		}
		// "scf optimize failed      0": drop the trailing error code.
		f := strings.Fields(t)
		if len(f) > 1 {
			if _, err := strconv.Atoi(f[len(f)-1]); err == nil {
				f = f[:len(f)-1]
			}
		}
		return strings.Join(f, " ")
	}
	return "no message found"
}

// nwchemAtoms parses the "Atom information" table at lines[at]: a header
// "atom # X Y Z mass", a dashed rule, then "tag index x y z mass" rows (x,
// y, z in bohr, Fortran D exponents) up to the closing rule.
func nwchemAtoms(lines []string, at, end int, fail func(int, string, string) error) ([]Atom, error) {
	i := at + 1
	if i < end && strings.HasPrefix(strings.TrimSpace(lines[i]), "atom") {
		i++
	}
	if i < end && isRule(lines[i]) {
		i++
	}
	var atoms []Atom
	for ; i < end && !isRule(lines[i]); i++ {
		f := strings.Fields(lines[i])
		if len(f) != 6 {
			return nil, fail(i+1, fmt.Sprintf("atom information row %q: want tag, number, x, y, z (bohr) and mass", strings.TrimSpace(lines[i])), "the output is truncated or damaged")
		}
		if n, err := strconv.Atoi(f[1]); err != nil || n != len(atoms)+1 {
			return nil, fail(i+1, fmt.Sprintf("atom information row %q: atom number %q, want %d", strings.TrimSpace(lines[i]), f[1], len(atoms)+1), "the output is damaged")
		}
		v, err := parseNumbers(f[2:])
		if err != nil {
			return nil, fail(i+1, "atom information: "+err.Error(), "")
		}
		a, err := printedAtom(f[0], v, BohrAngstrom)
		if err != nil {
			return nil, fail(i+1, err.Error(), "isotopes other than the most abundant are not carried by the import; remove the mass lines of the freq block")
		}
		atoms = append(atoms, a)
	}
	if i >= end {
		return nil, fail(at+1, "the \"Atom information\" table is not closed", "the output is truncated")
	}
	if len(atoms) == 0 {
		return nil, fail(at+1, "the \"Atom information\" table lists no atoms", "the output is damaged")
	}
	return atoms, nil
}

// nwchemModes reads the "P.Frequency" rows of the projected normal-mode
// table in lines[start:end]; after each comes one row of displacements per
// Cartesian coordinate (3N). It returns the 3N projected frequencies in
// cm⁻¹ and the 1-based line of each.
func nwchemModes(lines []string, start, end, nAtoms int, fail func(int, string, string) error) ([]float64, []int, error) {
	var freqs []float64
	var freqLines []int
	for i := start; i < end; i++ {
		t := strings.TrimSpace(lines[i])
		if !strings.HasPrefix(t, "P.Frequency") {
			continue
		}
		f := strings.Fields(t)[1:]
		if len(f) == 0 {
			return nil, nil, fail(i+1, "a P.Frequency row without frequencies", "the output is damaged")
		}
		v, err := parseNumbers(f)
		if err != nil {
			return nil, nil, fail(i+1, "P.Frequency: "+err.Error(), "")
		}
		for range v {
			freqLines = append(freqLines, i+1)
		}
		freqs = append(freqs, v...)
		// Skip blank lines, then count the displacement rows.
		j := i + 1
		for j < end && strings.TrimSpace(lines[j]) == "" {
			j++
		}
		rows := 0
		for ; j < end; j++ {
			g := strings.Fields(lines[j])
			if len(g) != len(v)+1 {
				break
			}
			if n, err := strconv.Atoi(g[0]); err != nil || n != rows+1 {
				break
			}
			rows++
		}
		if rows != 3*nAtoms {
			return nil, nil, fail(i+1, fmt.Sprintf("projected normal modes have %d coordinate rows, but %d atoms need %d", rows, nAtoms, 3*nAtoms),
				"the output is truncated, or the geometry and the frequencies disagree")
		}
		i = j - 1
	}
	if len(freqs) == 0 {
		return nil, nil, fail(start+1, "the frequency task has no projected frequencies (P.Frequency)", "the output is truncated")
	}
	if len(freqs) != 3*nAtoms {
		return nil, nil, fail(freqLines[len(freqLines)-1], fmt.Sprintf("%d projected frequencies, but the geometry has %d atoms (3N = %d)", len(freqs), nAtoms, 3*nAtoms),
			"the output is truncated, or the geometry and the frequencies disagree")
	}
	return freqs, freqLines, nil
}

// nwchemConstants parses the "A= … cm-1 (… K)" lines after "Rotational
// Constants" at lines[at]. NWChem prints A = 0 for a linear molecule; then
// the single B (= C) is returned.
func nwchemConstants(lines []string, at, end int) ([]float64, error) {
	var vals []float64
	want := []string{"A=", "B=", "C="}
	for i := at + 1; i < end && len(vals) < 3; i++ {
		t := strings.TrimSpace(lines[i])
		if t == "" || isRule(t) {
			continue
		}
		key := want[len(vals)]
		if !strings.HasPrefix(t, key) {
			return nil, fmt.Errorf("rotational constants: line %q, want %s", t, key)
		}
		f := strings.Fields(strings.TrimPrefix(t, key))
		if len(f) < 2 || f[1] != "cm-1" {
			return nil, fmt.Errorf("rotational constants: line %q, want a value in cm-1", t)
		}
		v, err := parseNumbers(f[:1])
		if err != nil || v[0] < 0 {
			return nil, fmt.Errorf("rotational constants: %q is not a number ≥ 0", f[0])
		}
		vals = append(vals, v[0])
	}
	if len(vals) < 3 {
		return nil, errors.New("rotational constants: fewer than three (A, B, C)")
	}
	if vals[0] == 0 {
		if vals[1] != vals[2] || vals[1] <= 0 {
			return nil, fmt.Errorf("rotational constants: A = 0 (linear) but B = %g, C = %g", vals[1], vals[2])
		}
		return vals[1:2], nil
	}
	if vals[1] <= 0 || vals[2] <= 0 {
		return nil, fmt.Errorf("rotational constants: A = %g, B = %g, C = %g", vals[0], vals[1], vals[2])
	}
	slices.SortFunc(vals, func(a, b float64) int { return cmp.Compare(b, a) })
	return vals, nil
}

// nwchemAU returns the number in "(  0.022966 au)" at the end of t.
func nwchemAU(t string) (float64, error) {
	k := strings.LastIndex(t, "(")
	if k < 0 || !strings.HasSuffix(t, "au)") {
		return 0, fmt.Errorf("line %q: no value in au", t)
	}
	f := strings.Fields(strings.TrimSuffix(t[k+1:], "au)"))
	v, err := parseNumbers(f)
	if err != nil || len(v) != 1 {
		return 0, fmt.Errorf("line %q: no value in au", t)
	}
	return v[0], nil
}

// nwchemBasis returns the basis named in the last "Summary of "ao basis""
// table of lines (rows: tag, description, shells, functions, types), or ""
// when there is none or the elements have different bases.
func nwchemBasis(lines []string) string {
	at := -1
	for i := len(lines) - 1; i >= 0; i-- {
		if strings.HasPrefix(strings.TrimSpace(lines[i]), `Summary of "ao basis"`) {
			at = i
			break
		}
	}
	if at < 0 {
		return ""
	}
	basis := ""
	rules := 0
	for i := at + 1; i < len(lines) && rules < 3; i++ {
		t := strings.TrimSpace(lines[i])
		if isRule(t) {
			rules++
			continue
		}
		if rules != 2 {
			continue
		}
		if t == "" {
			break
		}
		f := strings.Fields(t)
		if len(f) < 5 {
			return ""
		}
		d := strings.Join(f[1:len(f)-3], " ")
		if basis != "" && d != basis {
			return ""
		}
		basis = d
	}
	return basis
}
