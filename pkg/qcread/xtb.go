package qcread

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
)

// XtbGradientLimit is the gradient norm (E_h/a0) above which xtb flags the
// geometry of a Hessian as not a stationary point ("!! INCOMPLETELY
// OPTIMIZED GEOMETRY !!", xtb source, hessian.F90: res%gnorm > 0.002). The
// readers refuse such an output.
const XtbGradientLimit = 0.002

// xtbMaxAtoms bounds the atom table of an output the readers take.
const xtbMaxAtoms = 100000

// xtbBenignWarnings are the runtime warnings of xtb that say nothing about
// the frequencies: GFN-FF writes its topology file when it cannot read one,
// which is the normal first run. Any other [WARNING] is refused.
var xtbBenignWarnings = []string{
	"gfnff_setup: Could not read topology file.",
}

// ReadXtbFile reads the stdout of an xtb --ohess run saved in the file at
// path; see ReadXtb.
func ReadXtbFile(path string) (*Frequencies, error) { return readPath(path, ReadXtb) }

// ReadXtb reads the standard output of an xtb frequency calculation
// (Bannwarth et al., WIREs Comput. Mol. Sci. 11, e01493, 2021), observed for
// xtb 6.5.1 with `xtb mol.xyz --ohess > mol.out`; name is used in errors.
//
// Of the two frequency runs only --ohess prints the geometry at which the
// Hessian was computed: the "final structure" of the optimisation, in the
// format of the input file (an .xyz file gives Å, a Turbomole coord file
// gives bohr; other input formats are refused). A --hess run prints no
// coordinates at all, so ReadXtb refuses it and names the coordinate file
// it ran on: read such a run with ReadXtbWithXYZ, which takes that file as
// a second, explicit argument. (xtb turns the molecule by at most 3e-4°
// before the finite differences; a rigid rotation changes neither the
// frequencies nor the moments of inertia.)
//
// xtb lists all 3N modes in its "projected vibrational frequencies (cm⁻¹)"
// block, six per "eigval :" line, imaginary ones negative, and puts the 6
// translations and rotations (5 for a molecule it takes as linear, under
// the heading "vibrational frequencies") first, as 0.00 (xtb source,
// hessian.F90: modes below 0.01 cm⁻¹ are moved to the front). These are
// dropped by that marking, not by a threshold, so soft real modes of a few
// cm⁻¹ are kept; a list whose first 6 (5) are not all zero, or with a zero
// further on (xtb found more near-zero modes than it expected), is refused.
// xtb prints the list twice, after the Hessian and again in its frequency
// printout; the copies must agree.
//
// Energy is the TOTAL ENERGY xtb prints at the end (E_h, at the final
// geometry; with implicit solvation it includes the solvation free energy).
// Method is the Hamiltonian of the setup box ("GFN2-xTB",
// "GFN1-xTB", "GFN-FF"), with the implicit solvation appended when used
// ("GFN2-xTB/ALPB(water)"). Printed.ZeroPoint is the "zero point energy"
// of xtb's thermochemistry (real modes only) and Printed.Constants the
// "rotational constants/cm⁻¹" of its geometry summary, which xtb computes
// with isotope-averaged atomic masses (molecular mass of H2O 18.0153 u),
// not the single-isotope masses of Analyse.
//
// Refused, with a *ReadError: an output without "* finished run" (truncated
// or crashed), one with an [ERROR] block or "abnormal termination", an
// optimisation that xtb reports as "FAILED TO CONVERGE" (xtb then computes
// the Hessian anyway), a Hessian xtb flags as on an incompletely optimised
// geometry (gradient norm above XtbGradientLimit), any [WARNING] but the
// harmless ones xtbBenignWarnings lists, a biased Hessian (--bhess), a
// Hessian with frozen atoms, a run without frequencies, several final
// structures, and geometry, atom table and mode count that disagree.
func ReadXtb(r io.Reader, name string) (*Frequencies, error) {
	o, err := scanXtb(r, name)
	if err != nil {
		return nil, err
	}
	if err := o.check(); err != nil {
		return nil, err
	}
	switch len(o.finals) {
	case 0:
		coord := "the coordinate file it names"
		if o.coordFile != "" {
			coord = fmt.Sprintf("%q, the coordinate file it ran on", o.coordFile)
		}
		return nil, o.fail(o.freqs[0].line, "no geometry: a --hess run does not print the coordinates of its Hessian",
			"read the output together with "+coord+", or run xtb --ohess, whose output carries the optimised geometry")
	case 1:
	default:
		return nil, o.fail(o.finals[1].line, fmt.Sprintf("%d final structures", len(o.finals)), "keep one xtb run per file")
	}
	return o.assemble(o.finals[0].atoms, o.finals[0].line, name)
}

// ReadXtbWithXYZFile reads the stdout of an xtb --hess run saved at outPath
// with the .xyz file at xyzPath that the run was given; see ReadXtbWithXYZ.
func ReadXtbWithXYZFile(outPath, xyzPath string) (*Frequencies, error) {
	out, err := os.Open(outPath)
	if err != nil {
		return nil, fmt.Errorf("qcread: %w", err)
	}
	defer out.Close()
	xyz, err := os.Open(xyzPath)
	if err != nil {
		return nil, fmt.Errorf("qcread: %w", err)
	}
	defer xyz.Close()
	return ReadXtbWithXYZ(out, outPath, xyz, xyzPath)
}

// ReadXtbWithXYZ reads the standard output of an xtb --hess run (`xtb
// mol.xyz --hess > mol.out`; outName is used in errors) together with the
// .xyz file (Å) it ran on (xyzName), since such a run prints no
// coordinates; everything else is as in ReadXtb. The geometry is never
// looked for: the caller names the file, and it must be the one xtb reports
// as its "coordinate file" (same base name), list the same elements in the
// same order as xtb's atom table, and hold one structure. An output that
// prints its own final structure (--ohess) is refused here: read it with
// ReadXtb. Whether the file was changed after the run cannot be seen; keep
// the two together.
func ReadXtbWithXYZ(out io.Reader, outName string, xyz io.Reader, xyzName string) (*Frequencies, error) {
	o, err := scanXtb(out, outName)
	if err != nil {
		return nil, err
	}
	if err := o.check(); err != nil {
		return nil, err
	}
	if len(o.finals) > 0 {
		return nil, o.fail(o.finals[0].line, "the output prints its own final structure (an --opt/--ohess run)", "read it with ReadXtb, without a coordinate file")
	}
	if o.coordFile == "" {
		return nil, o.fail(0, "no \"coordinate file\" line: the output does not say which geometry it ran on", "the file is not a complete xtb output")
	}
	if filepath.Base(o.coordFile) != filepath.Base(xyzName) {
		return nil, o.fail(o.coordLine, fmt.Sprintf("xtb ran on coordinate file %q, not on %q", o.coordFile, filepath.Base(xyzName)),
			"give the .xyz file the --hess run was started with")
	}
	atoms, line, err := readXtbXYZ(xyz, xyzName)
	if err != nil {
		return nil, err
	}
	return o.assemble(atoms, line, xyzName)
}

// isXtb recognises xtb's standard output by its banner and version line.
func isXtb(head []byte) bool {
	return bytes.Contains(head, []byte("x T B")) && bytes.Contains(head, []byte("* xtb version "))
}

// xtbLine is a line of an xtb output, trimmed, with its number.
type xtbLine struct {
	n    int
	text string
}

// xtbGeom is a "final structure" block: its atoms (Å) and line.
type xtbGeom struct {
	atoms []Atom
	line  int
}

// xtbFreqs is one printed list of frequencies.
type xtbFreqs struct {
	line   int  // heading
	linear bool // heading "vibrational frequencies": xtb took the molecule as linear
	values []float64
	lines  []int // line of each value
}

// xtbNote is a message of an [ERROR] or [WARNING] block.
type xtbNote struct {
	line int
	msgs []string
}

// xtbOutput is what scanXtb collects from an xtb stdout.
type xtbOutput struct {
	name       string
	program    string
	coordFile  string
	coordLine  int
	idTable    map[int]string // atom number → element, from the "ID Z sym. atoms" table
	idLine     int
	method     string
	solvModel  string
	solvent    string
	finals     []xtbGeom
	freqs      []xtbFreqs
	constants  [][]float64
	constLine  int
	zpe        float64
	hasZPE     bool
	energy     float64
	hasEnergy  bool
	finished   bool
	failedOpt  int // line of FAILED TO CONVERGE, 0 if none
	incomplete int // line of INCOMPLETELY OPTIMIZED GEOMETRY
	gnorm      string
	biased     int
	frozen     int // line of a non-zero frozen-atom count
	abnormal   int
	errs       []xtbNote
	warnings   []xtbNote
}

func (o *xtbOutput) fail(line int, what, hint string) error {
	return &ReadError{File: o.name, Line: line, What: what, Hint: hint}
}

// xtbSymmetryChatter reports the two lines of xtb's point-group finder,
// which is written through a separate buffer and lands between other
// lines anywhere in a redirected stdout.
func xtbSymmetryChatter(t string) bool {
	return strings.HasPrefix(t, "Molecule has the following symmetry elements") || strings.HasPrefix(t, "It seems to be the ")
}

// scanXtb reads an xtb stdout line by line and collects what the readers
// use; it fails only on lines it cannot parse.
func scanXtb(r io.Reader, name string) (*xtbOutput, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("qcread: %s: %w", name, err)
	}
	o := &xtbOutput{name: name}
	var lines []xtbLine
	for i, l := range strings.Split(string(data), "\n") {
		t := strings.TrimSpace(l)
		if xtbSymmetryChatter(t) {
			continue
		}
		lines = append(lines, xtbLine{i + 1, t})
	}
	for i := 0; i < len(lines); i++ {
		n, t := lines[i].n, lines[i].text
		f := strings.Fields(t)
		switch {
		case strings.HasPrefix(t, "* xtb version ") && len(f) >= 4:
			o.program = "xtb " + f[3]
		case strings.HasPrefix(t, "coordinate file") && strings.Contains(t, ":"):
			o.coordFile = strings.TrimSpace(t[strings.Index(t, ":")+1:])
			o.coordLine = n
		case slices.Equal(f, []string{"ID", "Z", "sym.", "atoms"}):
			// Rows "ID Z element atoms", the atoms as "1, 3" or "2-4"; a
			// row ending in a comma goes on in the next line.
			o.idLine = n
			o.idTable = map[int]string{}
			cont, sym := false, ""
			for i+1 < len(lines) && lines[i+1].text != "" {
				i++
				row := strings.Fields(lines[i].text)
				list := row
				if !cont {
					if len(row) < 4 {
						return nil, o.fail(lines[i].n, fmt.Sprintf("atom table row %q", lines[i].text), "want: ID, Z, element, atom numbers")
					}
					sym, list = NormalizeSymbol(row[2]), row[3:]
				}
				joined := strings.Join(list, "")
				cont = strings.HasSuffix(joined, ",")
				if err := o.addIDs(strings.TrimSuffix(joined, ","), sym, lines[i].n); err != nil {
					return nil, err
				}
			}
		case strings.HasPrefix(t, "|") && strings.HasSuffix(t, "|") && strings.HasPrefix(strings.ReplaceAll(strings.Trim(t, "| "), " ", ""), "GFN"):
			m := strings.ReplaceAll(strings.Trim(t, "| "), " ", "")
			if o.method != "" && o.method != m {
				return nil, o.fail(n, fmt.Sprintf("method %q after %q", m, o.method), "keep one xtb run per file")
			}
			o.method = m
		case strings.HasPrefix(t, "* Solvation model:") && len(f) >= 4:
			o.solvModel = f[3]
		case o.solvModel != "" && o.solvent == "" && len(f) == 2 && f[0] == "Solvent":
			o.solvent = f[1]
		case strings.Contains(t, "FAILED TO CONVERGE GEOMETRY OPTIMIZATION"):
			o.failedOpt = n
		case t == "final structure:":
			g, next, err := o.finalStructure(lines[i+1:], n)
			if err != nil {
				return nil, err
			}
			o.finals = append(o.finals, g)
			i += next
		case strings.HasPrefix(t, "frozen atoms in %") && len(f) >= 2 && f[len(f)-1] != "0":
			o.frozen = n
		case strings.HasPrefix(t, "RMS gradient") && strings.Contains(t, "INCOMPLETELY OPTIMIZED GEOMETRY"):
			o.incomplete = n
			if len(f) >= 4 {
				if v, err := parseNumbers(f[3:4]); err == nil {
					o.gnorm = fmt.Sprintf(" of %g E_h/a0,", v[0])
				}
			}
		case strings.HasPrefix(t, "|") && strings.Contains(t, "Biased Numerical Hessian"):
			o.biased = n
		case strings.HasPrefix(t, "projected vibrational frequencies") || strings.HasPrefix(t, "vibrational frequencies"):
			b := xtbFreqs{line: n, linear: strings.HasPrefix(t, "vibrational")}
			for i+1 < len(lines) && strings.HasPrefix(lines[i+1].text, "eigval") {
				i++
				l := lines[i]
				c := strings.Index(l.text, ":")
				if c < 0 {
					return nil, o.fail(l.n, fmt.Sprintf("frequency line %q", l.text), "want eigval : and frequencies in cm⁻¹")
				}
				v, err := parseNumbers(strings.Fields(l.text[c+1:]))
				if err != nil {
					return nil, o.fail(l.n, fmt.Sprintf("frequencies: %v", err), "the output is damaged")
				}
				for range v {
					b.lines = append(b.lines, l.n)
				}
				b.values = append(b.values, v...)
			}
			o.freqs = append(o.freqs, b)
		case strings.HasPrefix(t, "rotational constants/cm") && strings.Contains(t, ":"):
			v, err := parseNumbers(strings.Fields(t[strings.Index(t, ":")+1:]))
			if err != nil || len(v) != 3 {
				return nil, o.fail(n, fmt.Sprintf("rotational constants line %q", t), "want three constants in cm⁻¹")
			}
			o.constants = append(o.constants, v)
			o.constLine = n
		case strings.HasPrefix(t, ":: zero point energy") && len(f) >= 6:
			v, err := parseNumbers(f[4:5])
			if err != nil {
				return nil, o.fail(n, fmt.Sprintf("zero point energy: %v", err), "the output is damaged")
			}
			o.zpe, o.hasZPE = v[0], true
		case strings.HasPrefix(t, "| TOTAL ENERGY") && len(f) >= 5:
			v, err := parseNumbers(f[3:4])
			if err != nil {
				return nil, o.fail(n, fmt.Sprintf("TOTAL ENERGY: %v", err), "the output is damaged")
			}
			o.energy, o.hasEnergy = v[0], true
		case strings.HasPrefix(t, "* finished run on"):
			o.finished = true
		case t == "abnormal termination of xtb":
			o.abnormal = n
		case strings.HasPrefix(t, "[ERROR]") || strings.HasPrefix(t, "[WARNING]"):
			note := xtbNote{line: n}
			// The block lists its causes as "-k- source: message", innermost last.
			for i+1 < len(lines) && strings.HasPrefix(lines[i+1].text, "-") {
				i++
				m := lines[i].text
				if k := strings.Index(m[1:], "-"); k >= 0 {
					m = strings.TrimSpace(m[k+2:])
				}
				note.msgs = append(note.msgs, m)
			}
			if strings.HasPrefix(t, "[ERROR]") {
				o.errs = append(o.errs, note)
			} else {
				o.warnings = append(o.warnings, note)
			}
		}
	}
	return o, nil
}

// addIDs records the atoms numbered in list ("2, 3", "2-4") as element sym.
func (o *xtbOutput) addIDs(list, sym string, line int) error {
	bad := func() error {
		return o.fail(line, fmt.Sprintf("atom table: atom numbers %q", list), "want numbers and ranges such as 1, 3-5")
	}
	if list == "" || sym == "" {
		return bad()
	}
	for _, item := range strings.Split(list, ",") {
		lo, hi, isRange := strings.Cut(item, "-")
		a, err := strconv.Atoi(lo)
		if err != nil {
			return bad()
		}
		b := a
		if isRange {
			if b, err = strconv.Atoi(hi); err != nil {
				return bad()
			}
		}
		if a < 1 || b < a || b > xtbMaxAtoms || b-a >= xtbMaxAtoms-len(o.idTable) {
			return bad()
		}
		for k := a; k <= b; k++ {
			if _, dup := o.idTable[k]; dup {
				return o.fail(line, fmt.Sprintf("atom table lists atom %d twice", k), "the output is damaged")
			}
			o.idTable[k] = sym
		}
	}
	return nil
}

// finalStructure reads the block after "final structure:" (at line at): an
// .xyz block in Å or a Turbomole $coord block in bohr. It returns the
// geometry and how many of the lines it used.
func (o *xtbOutput) finalStructure(lines []xtbLine, at int) (xtbGeom, int, error) {
	k := 0
	for k < len(lines) && (lines[k].text == "" || strings.Trim(lines[k].text, "=") == "") {
		k++
	}
	if k == len(lines) {
		return xtbGeom{}, 0, o.fail(at, "final structure: no coordinates", "the output is truncated")
	}
	g := xtbGeom{line: lines[k].n}
	first := lines[k].text
	if count, err := strconv.Atoi(first); err == nil {
		// .xyz: count, comment, count lines of "element x y z" in Å.
		if count < 1 || count >= len(lines) || k+1+count >= len(lines) {
			return xtbGeom{}, 0, o.fail(lines[k].n, fmt.Sprintf("final structure: %q atoms, but the block is shorter", first), "the output is truncated")
		}
		for j := k + 2; j < k+2+count; j++ {
			a, err := xtbAtom(strings.Fields(lines[j].text), false, 1)
			if err != nil {
				return xtbGeom{}, 0, o.fail(lines[j].n, "final structure: "+err.Error(), "want: element x y z in Å")
			}
			g.atoms = append(g.atoms, a)
		}
		return g, k + 1 + count, nil
	}
	if first == "$coord" {
		for j := k + 1; j < len(lines); j++ {
			t := lines[j].text
			if t == "$end" {
				if len(g.atoms) == 0 {
					return xtbGeom{}, 0, o.fail(lines[j].n, "final structure: $coord lists no atoms", "")
				}
				return g, j, nil
			}
			if strings.HasPrefix(t, "$") {
				return xtbGeom{}, 0, o.fail(lines[j].n, fmt.Sprintf("final structure: data group %q", t), "only a molecule's $coord is read; periodic systems are not")
			}
			a, err := xtbAtom(strings.Fields(t), true, BohrAngstrom)
			if err != nil {
				return xtbGeom{}, 0, o.fail(lines[j].n, "final structure: "+err.Error(), "want: x y z in bohr and the element")
			}
			g.atoms = append(g.atoms, a)
		}
		return xtbGeom{}, 0, o.fail(at, "final structure: $coord without $end", "the output is truncated")
	}
	return xtbGeom{}, 0, o.fail(lines[k].n, fmt.Sprintf("final structure in a format this reader does not read (%q)", first),
		"run xtb on an .xyz or Turbomole coord file")
}

// xtbAtom parses "element x y z" (or "x y z element" when symbolLast) and
// scales the coordinates to Å.
func xtbAtom(f []string, symbolLast bool, scale float64) (Atom, error) {
	if len(f) != 4 {
		return Atom{}, fmt.Errorf("%q is not an atom line", strings.Join(f, " "))
	}
	sym, xyz := f[0], f[1:]
	if symbolLast {
		sym, xyz = f[3], f[:3]
	}
	x, err := parseNumbers(xyz)
	if err != nil {
		return Atom{}, err
	}
	s := NormalizeSymbol(sym)
	if _, err := IsotopeMass(s); err != nil {
		return Atom{}, fmt.Errorf("unknown element %q", sym)
	}
	return Atom{s, [3]float64{x[0] * scale, x[1] * scale, x[2] * scale}}, nil
}

// readXtbXYZ reads a single-structure .xyz file (Å); it returns the atoms
// and the line of the atom count.
func readXtbXYZ(r io.Reader, name string) ([]Atom, int, error) {
	fail := func(line int, what, hint string) error {
		return &ReadError{File: name, Line: line, What: what, Hint: hint}
	}
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, 0, fmt.Errorf("qcread: %s: %w", name, err)
	}
	lines := strings.Split(strings.TrimSuffix(string(data), "\n"), "\n")
	count, err := strconv.Atoi(strings.TrimSpace(lines[0]))
	if err != nil || count < 1 {
		return nil, 0, fail(1, fmt.Sprintf("first line %q is not an atom count", strings.TrimSpace(lines[0])), "an .xyz file starts with the number of atoms, then a comment line")
	}
	if count > len(lines) || len(lines) < count+2 {
		return nil, 0, fail(len(lines), fmt.Sprintf("%d atoms announced, %d lines follow the comment", count, max(len(lines)-2, 0)), "the file is truncated")
	}
	atoms := make([]Atom, 0, count)
	for j := 2; j < count+2; j++ {
		a, err := xtbAtom(strings.Fields(lines[j]), false, 1)
		if err != nil {
			return nil, 0, fail(j+1, err.Error(), "want: element x y z in Å, one atom per line")
		}
		atoms = append(atoms, a)
	}
	for j := count + 2; j < len(lines); j++ {
		if strings.TrimSpace(lines[j]) != "" {
			return nil, 0, fail(j+1, "more lines after the announced atoms", "give a file with one structure")
		}
	}
	return atoms, 1, nil
}

// check refuses an output that is not a complete, converged xtb frequency
// run, whatever its geometry.
func (o *xtbOutput) check() error {
	if o.program == "" {
		return o.fail(0, "not an xtb output (no \"* xtb version\" line)", "give the standard output of xtb --ohess, saved with > file")
	}
	if len(o.errs) > 0 {
		e := o.errs[0]
		what := "xtb stopped with an error"
		if len(e.msgs) > 0 {
			what += fmt.Sprintf(": %q", e.msgs[len(e.msgs)-1]) // the innermost cause
		}
		return o.fail(e.line, what, "the run failed; fix its input and rerun")
	}
	if o.abnormal > 0 {
		return o.fail(o.abnormal, "abnormal termination of xtb", "the run failed; see the messages before this line")
	}
	if o.failedOpt > 0 {
		return o.fail(o.failedOpt, "the geometry optimisation did not converge (xtb: FAILED TO CONVERGE); the Hessian is not at a stationary point",
			"rerun with a larger --cycles or from a better start")
	}
	if o.incomplete > 0 {
		return o.fail(o.incomplete, fmt.Sprintf("xtb computed the Hessian at a gradient norm%s above %g E_h/a0: not a stationary point (INCOMPLETELY OPTIMIZED GEOMETRY)", o.gnorm, XtbGradientLimit),
			"optimise first: xtb --ohess, or --hess on the optimised xtbopt.xyz")
	}
	for _, w := range o.warnings {
		benign := len(w.msgs) > 0
		for _, m := range w.msgs {
			benign = benign && slices.Contains(xtbBenignWarnings, m)
		}
		if !benign {
			return o.fail(w.line, fmt.Sprintf("xtb warned: %q", strings.Join(w.msgs, "; ")), "check the run; this reader takes no output with warnings it does not know to be harmless")
		}
	}
	if !o.finished {
		return o.fail(0, "no \"* finished run\" line: the output is truncated or xtb crashed", "rerun and check xtb's exit status and stderr")
	}
	if o.biased > 0 {
		return o.fail(o.biased, "a biased Hessian (--bhess): its frequencies are scaled for thermochemistry off a stationary point", "run xtb --ohess for harmonic frequencies")
	}
	if o.frozen > 0 {
		return o.fail(o.frozen, "a Hessian with frozen atoms", "run the frequency calculation without $fix/frozen atoms")
	}
	if len(o.freqs) == 0 {
		return o.fail(0, "no vibrational frequencies: not a Hessian run", "run xtb --ohess (or --hess on an optimised geometry)")
	}
	first := o.freqs[0]
	for _, b := range o.freqs[1:] {
		if b.linear != first.linear || !slices.Equal(b.values, first.values) {
			return o.fail(b.line, fmt.Sprintf("this frequency list differs from the one at line %d", first.line), "keep one xtb run per file")
		}
	}
	if len(o.constants) > 1 {
		for _, c := range o.constants[1:] {
			if !slices.Equal(c, o.constants[0]) {
				return o.fail(o.constLine, "two geometry summaries with different rotational constants", "keep one xtb run per file")
			}
		}
	}
	if !o.hasEnergy {
		return o.fail(0, "no TOTAL ENERGY", "the output is truncated")
	}
	if o.idTable == nil {
		return o.fail(0, "no atom table (ID Z sym. atoms)", "the output is truncated at its start")
	}
	return nil
}

// assemble checks atoms (from geomFile, at geomLine) against the atom table
// and the frequencies, and fills a Frequencies.
func (o *xtbOutput) assemble(atoms []Atom, geomLine int, geomFile string) (*Frequencies, error) {
	if len(o.idTable) != len(atoms) {
		return nil, &ReadError{File: geomFile, Line: geomLine, What: fmt.Sprintf("%d atoms in the geometry, %d in xtb's atom table (%s:%d)", len(atoms), len(o.idTable), o.name, o.idLine),
			Hint: "the geometry and the output come from different calculations"}
	}
	for i, a := range atoms {
		if want, ok := o.idTable[i+1]; !ok || want != a.Symbol {
			return nil, &ReadError{File: geomFile, Line: geomLine, What: fmt.Sprintf("atom %d is %s, xtb's atom table (%s:%d) has %q", i+1, a.Symbol, o.name, o.idLine, want),
				Hint: "the geometry and the output come from different calculations"}
		}
	}
	b := o.freqs[0]
	nRT, kind := 6, "projected (non-linear)"
	if b.linear {
		nRT, kind = 5, "linear"
	}
	if len(b.values) != 3*len(atoms) {
		return nil, o.fail(b.line, fmt.Sprintf("%d frequencies for %d atoms; xtb lists all 3N = %d", len(b.values), len(atoms), 3*len(atoms)),
			"the output is damaged, or the geometry comes from another calculation")
	}
	for i, v := range b.values {
		if (i < nRT) != (v == 0) {
			what := fmt.Sprintf("mode %d is %v cm⁻¹: xtb's %s list should start with %d zeros (translations and rotations) and have none after", i+1, v, kind, nRT)
			return nil, o.fail(b.lines[i], what, "xtb found a different number of zero modes; the frequencies cannot be told from translations and rotations")
		}
	}
	out := &Frequencies{Atoms: atoms, Program: o.program, Method: o.method, Energy: o.energy, HasEnergy: true}
	if o.solvModel != "" {
		out.Method += "/" + o.solvModel
		if o.solvent != "" {
			out.Method += "(" + o.solvent + ")"
		}
	}
	g, err := Analyse(atoms)
	if err != nil {
		return nil, &ReadError{File: geomFile, Line: geomLine, What: err.Error(), Hint: "the geometry cannot be analysed"}
	}
	if g.Linear != b.linear {
		return nil, o.fail(b.line, fmt.Sprintf("xtb took the molecule as %s (%d zero modes), but the geometry is %s within %g Å",
			xtbShape(b.linear), nRT, xtbShape(g.Linear), PositionTolerance), "a nearly linear molecule: its frequencies cannot be sorted safely")
	}
	out.Linear = g.Linear
	if err := out.SetModes(b.values[nRT:]); err != nil {
		me := err.(*ModeError)
		line := b.line
		if me.Index >= 0 {
			line = b.lines[nRT+me.Index]
		}
		return nil, o.fail(line, me.What, me.Hint)
	}
	out.Dropped = slices.Clone(b.values[:nRT])
	if o.hasZPE {
		out.Printed.ZeroPoint = o.zpe
	}
	if len(o.constants) > 0 && !g.Linear {
		c := slices.Clone(o.constants[0])
		slices.Sort(c)
		slices.Reverse(c)
		out.Printed.Constants = c
	}
	return out, nil
}

func xtbShape(linear bool) string {
	if linear {
		return "linear"
	}
	return "non-linear"
}
