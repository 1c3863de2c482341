package qcread

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// The recorded outputs of testdata/xtb (README.md there says how each was
// made) are xtb 6.5.1 GFN2-xTB runs. Expected values in these tests are
// copied from what xtb printed in the same files, or come from published
// spectroscopy; none is computed by this package.

// xtbZPETol is the tolerance (E_h) for comparing ½Σν from the printed
// frequencies with xtb's printed zero-point energy: each frequency is
// printed rounded to 0.01 cm⁻¹, so ½Σν can be off by n × 0.0025 cm⁻¹; xtb's
// own hartree-to-cm⁻¹ factor may differ from CODATA 2018 in the 9th digit,
// which 1e-8 relative covers.
func xtbZPETol(n int, zpe float64) float64 {
	return float64(n)*0.0025/units.HartreeCm1 + 1e-8*zpe
}

// xtbMassTol is the relative tolerance for our rotational constants against
// xtb's printed ones: xtb uses isotope-averaged atomic masses (its H2O
// weighs 18.0153 u), Analyse the most abundant isotopes; the moments differ
// to first order by at most the largest relative mass difference, C: 12.0107
// vs 12 (8.9e-4; standard atomic weight from memory), and xtb prints 7
// digits.
const xtbMassTol = 1e-3

// xtbPrinted is what a recorded xtb output printed, copied by hand.
type xtbPrinted struct {
	file      string
	real      []float64 // Frequency Printout, after the six zeros
	imaginary []float64 // magnitudes
	energy    float64   // TOTAL ENERGY, E_h
	zpe       float64   // zero point energy, E_h
	constants []float64 // rotational constants/cm⁻¹
	nImag     int       // "# imaginary freq." of xtb's thermochemistry
	sigma     int       // "rotational number" of xtb's thermochemistry
}

var xtbRecorded = []xtbPrinted{
	{"h2o.out", []float64{1539.19, 3643.02, 3651.66}, nil, -5.070544374389, 0.020125046264,
		[]float64{0.2911598e+02, 0.1401325e+02, 0.9460162e+01}, 0, 2},
	{"nh3.out", []float64{1158.56, 1592.20, 1592.59, 3425.78, 3478.04, 3478.23}, nil, -4.426243954658, 0.033546895731,
		[]float64{0.1002878e+02, 0.1002875e+02, 0.6256101e+01}, 0, 3},
	{"ch3nc.out", []float64{329.83, 329.84, 1021.19, 1079.82, 1079.82, 1380.54, 1442.22, 1442.34, 2255.99, 2993.89, 2994.07, 3004.09}, nil,
		-8.650827706464, 0.044090824838, []float64{0.5265235e+01, 0.3442245e+00, 0.3442245e+00}, 0, 3},
	{"nh3_planar.out", []float64{1461.15, 1461.40, 3621.21, 3732.26, 3732.38}, []float64{974.80}, -4.416505948961, 0.031913473660,
		[]float64{0.1132671e+02, 0.1132671e+02, 0.5663354e+01}, 1, 6},
	{"h2o_coord.out", []float64{1539.19, 3643.02, 3651.66}, nil, -5.070544374389, 0.020125046253,
		[]float64{0.2911598e+02, 0.1401325e+02, 0.9460162e+01}, 0, 2},
}

// TestReadXtb reads the recorded --ohess outputs and checks them against
// the values xtb printed: frequencies exactly, the energy exactly, ½Σν
// against xtb's zero-point energy, our rotational constants against xtb's,
// our interatomic distances against the distances xtb printed, and our
// symmetry number against the one xtb's thermochemistry used.
func TestReadXtb(t *testing.T) {
	for _, tc := range xtbRecorded {
		t.Run(tc.file, func(t *testing.T) {
			path := filepath.Join("testdata", "xtb", tc.file)
			f, err := ReadXtbFile(path)
			if err != nil {
				t.Fatal(err)
			}
			if f.Program != "xtb 6.5.1" || f.Method != "GFN2-xTB" {
				t.Errorf("program %q, method %q; want xtb 6.5.1, GFN2-xTB", f.Program, f.Method)
			}
			if !slices.Equal(f.Vibrations, tc.real) || !slices.Equal(f.Imaginary, tc.imaginary) {
				t.Errorf("real %v, imaginary %v; xtb printed %v, %v", f.Vibrations, f.Imaginary, tc.real, tc.imaginary)
			}
			if len(f.Dropped) != 6 || slices.ContainsFunc(f.Dropped, func(v float64) bool { return v != 0 }) {
				t.Errorf("dropped %v, want xtb's six zeros", f.Dropped)
			}
			if !f.HasEnergy || f.Energy != tc.energy {
				t.Errorf("energy %v (%v), xtb printed %v", f.Energy, f.HasEnergy, tc.energy)
			}
			if f.Printed.ZeroPoint != tc.zpe {
				t.Errorf("Printed.ZeroPoint %v, xtb printed %v", f.Printed.ZeroPoint, tc.zpe)
			}
			if nImag := xtbCountLine(t, path, "# imaginary freq."); nImag != tc.nImag || len(f.Imaginary) != tc.nImag {
				t.Errorf("%d imaginary modes read, xtb counted %d (table says %d)", len(f.Imaginary), nImag, tc.nImag)
			}

			var sum float64
			for _, v := range f.Vibrations {
				sum += v
			}
			zpe := sum / 2 / units.HartreeCm1
			tol := xtbZPETol(len(f.Vibrations), tc.zpe)
			if math.Abs(zpe-tc.zpe) > tol {
				t.Errorf("½Σν = %.12f E_h, xtb printed %.12f (tolerance %.2g)", zpe, tc.zpe, tol)
			}
			t.Logf("ZPE ½Σν − xtb = %.3g E_h (tolerance %.3g)", zpe-tc.zpe, tol)

			g, err := Analyse(f.Atoms)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(f.Printed.Constants, tc.constants) {
				t.Errorf("Printed.Constants %v, xtb printed %v", f.Printed.Constants, tc.constants)
			}
			for k, want := range tc.constants {
				dev := g.Constants[k]/want - 1
				if math.Abs(dev) > xtbMassTol {
					t.Errorf("constant %d: ours %.7g cm⁻¹, xtb %.7g (relative %.2g > %g)", k, g.Constants[k], want, dev, xtbMassTol)
				}
				t.Logf("constant %d: ours/xtb − 1 = %.2g", k, dev)
			}
			if g.Symmetry != tc.sigma {
				t.Errorf("σ = %d, xtb's thermochemistry used %d", g.Symmetry, tc.sigma)
			}

			// xtb prints bonded distances to 1e-7 Å from the same final
			// structure. They exceed ours by a factor 1 + 9.3e-8 beyond
			// that rounding (measured: 0.9e-7 to 1.3e-7 over the 15
			// distances), as a bohr radius of 0.52917726 Å (CODATA 1986,
			// from memory) in xtb's geometry summary against CODATA 2018
			// (0.529177210903 Å) in its structure printout and here gives.
			distTol := func(r float64) float64 { return 5e-8 + 1.5e-7*r }
			for _, d := range xtbDistances(t, path) {
				got := norm(sub(f.Atoms[d.i-1].X, f.Atoms[d.j-1].X))
				if math.Abs(got-d.r) > distTol(d.r) {
					t.Errorf("r(%d,%d) = %.9f Å, xtb printed %.7f", d.i, d.j, got, d.r)
				}
			}
		})
	}
}

// TestReadXtbPublished compares the GFN2-xTB rotational constants with
// measured ground-state ones. GFN2-xTB geometries are not spectroscopic:
// its H2O angle is 107.3° against 104.5°, which alone moves A by about 4 %;
// and B0 differs from Be by vibrational averaging (1–2 % for these
// molecules). 5 % is the tolerance that catches a wrong unit, a wrong axis
// or a lost atom (common practice, no source).
func TestReadXtbPublished(t *testing.T) {
	const tol = 0.05
	cases := []struct {
		file, what string
		index      int
		want       float64 // cm⁻¹
		source     string
	}{
		// NIST CCCBDB, Release 22 (May 2022), "Listing of experimental
		// geometry data for H2O": A, B, C = 27.877, 14.512, 9.285 cm⁻¹.
		{"h2o.out", "H2O A", 0, 27.877, "NIST CCCBDB"},
		{"h2o.out", "H2O B", 1, 14.512, "NIST CCCBDB"},
		{"h2o.out", "H2O C", 2, 9.285, "NIST CCCBDB"},
		// "Methyl isocyanide: the low-frequency bands ν8 and ν7, and a
		// determination of the rotational constant A0", J. Mol. Spectrosc.
		// (1995): A0 = 5.247234(77) cm⁻¹.
		{"ch3nc.out", "CH3NC A", 0, 5.247234, "J. Mol. Spectrosc. 1995"},
		// B0 = 10052.89 MHz from the microwave spectrum (from memory).
		{"ch3nc.out", "CH3NC B", 1, 10052.89 * units.Cm1PerGHz / 1000, "microwave B0 (from memory)"},
	}
	for _, tc := range cases {
		t.Run(tc.what, func(t *testing.T) {
			f, err := ReadXtbFile(filepath.Join("testdata", "xtb", tc.file))
			if err != nil {
				t.Fatal(err)
			}
			g, err := Analyse(f.Atoms)
			if err != nil {
				t.Fatal(err)
			}
			dev := g.Constants[tc.index]/tc.want - 1
			if math.Abs(dev) > tol {
				t.Errorf("%s = %.5f cm⁻¹, %s %.5f: relative %.3f > %g", tc.what, g.Constants[tc.index], tc.source, tc.want, dev, tol)
			}
			t.Logf("%s: GFN2-xTB/experiment − 1 = %+.4f", tc.what, dev)
		})
	}
}

// TestReadXtbSaddle checks the planar NH3 inversion saddle point (--ohess
// from an exactly planar D3h start: the gradient keeps the plane, so the
// optimiser ends on the saddle) against exact properties of its geometry:
// planar, D3h with σ = 6, a symmetric top with C = A/2 exactly (perpendicular
// axis theorem, I_c = I_a + I_b for a plane figure), one imaginary mode.
func TestReadXtbSaddle(t *testing.T) {
	f, err := ReadXtbFile(filepath.Join("testdata", "xtb", "nh3_planar.out"))
	if err != nil {
		t.Fatal(err)
	}
	// xtb printed the structure to 1e-14 Å; its z are ≤ 5e-14.
	const planeTol = 1e-12
	for i, a := range f.Atoms {
		if math.Abs(a.X[2]) > planeTol {
			t.Errorf("atom %d at z = %g Å, want the plane z = 0", i+1, a.X[2])
		}
	}
	g, err := Analyse(f.Atoms)
	if err != nil {
		t.Fatal(err)
	}
	if g.Symmetry != 6 || g.PointGroup != "D3h" || len(f.Imaginary) != 1 {
		t.Errorf("σ = %d, %s, %d imaginary modes; want 6, D3h, 1", g.Symmetry, g.PointGroup, len(f.Imaginary))
	}
	// The printed coordinates are threefold symmetric to about 1e-10 Å in
	// 1 Å, so A = B and C = A/2 hold to about 1e-9 relative.
	const topTol = 1e-8
	A, B, C := g.Constants[0], g.Constants[1], g.Constants[2]
	if math.Abs(A/B-1) > topTol || math.Abs(2*C/A-1) > topTol {
		t.Errorf("A, B, C = %.10g, %.10g, %.10g cm⁻¹: want A = B = 2C", A, B, C)
	}
	t.Logf("A/B − 1 = %.2g, 2C/A − 1 = %.2g", A/B-1, 2*C/A-1)
}

// TestReadXtbWithXYZ reads the --hess run on the H2O geometry that the
// --opt run wrote (h2o_opt.xyz) and checks that it gives what the --ohess
// run from the same start printed: the same geometry digit for digit, the
// same frequencies and energy as xtb printed them.
func TestReadXtbWithXYZ(t *testing.T) {
	dir := filepath.Join("testdata", "xtb")
	f, err := ReadXtbWithXYZFile(filepath.Join(dir, "h2o_hess.out"), filepath.Join(dir, "h2o_opt.xyz"))
	if err != nil {
		t.Fatal(err)
	}
	ohess, err := ReadXtbFile(filepath.Join(dir, "h2o.out"))
	if err != nil {
		t.Fatal(err)
	}
	// Printed by xtb in h2o_hess.out (and, identically, in h2o.out).
	if want := []float64{1539.19, 3643.02, 3651.66}; !slices.Equal(f.Vibrations, want) {
		t.Errorf("frequencies %v, xtb printed %v", f.Vibrations, want)
	}
	if f.Energy != -5.070544374389 || f.Printed.ZeroPoint != 0.020125046264 {
		t.Errorf("energy %v, ZPE %v; xtb printed -5.070544374389, 0.020125046264", f.Energy, f.Printed.ZeroPoint)
	}
	if !slices.Equal(f.Atoms, ohess.Atoms) {
		t.Errorf("atoms %v, the --ohess final structure %v", f.Atoms, ohess.Atoms)
	}
	if f.Printed.Constants != nil {
		t.Errorf("Printed.Constants %v: a --hess run prints no geometry summary", f.Printed.Constants)
	}
}

// TestReadXtbRefuses checks that every failed, truncated or inconsistent
// output gives a *ReadError of one line naming the file and the problem,
// and no result. Files are real outputs of runs that failed, except
// h2o_truncated.out (a cut copy); the in-memory cases edit a real output
// as their names say.
func TestReadXtbRefuses(t *testing.T) {
	dir := filepath.Join("testdata", "xtb")
	read := func(name string) string {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		return string(b)
	}
	h2o := read("h2o.out")
	hess := read("h2o_hess.out")
	opt := read("h2o_opt.xyz")
	lastReplace := func(s, old, new string) string {
		i := strings.LastIndex(s, old)
		return s[:i] + new + s[i+len(old):]
	}
	zeros := "eigval :       -0.00    -0.00    -0.00     0.00     0.00     0.00"
	insertBefore := func(s, at, text string) string { return strings.Replace(s, at, text+at, 1) }
	cases := []struct {
		name, text string // text "" reads the file name from testdata/xtb
		want       string
	}{
		{"h2o_truncated.out", "", "no \"* finished run\" line"},
		{"hcn_crash.out", "", "no \"* finished run\" line"},
		{"ch3nc_cycles2.out", "", "did not converge (xtb: FAILED TO CONVERGE)"},
		{"h2o_scc_fail.out", "", "\"scf: Self consistent charge iterator did not converge\""},
		{"h2o_hess_unoptimised.out", "", "gradient norm of 0.00722 E_h/a0, above 0.002 E_h/a0"},
		{"h2o_opt_only.out", "", "no vibrational frequencies"},
		{"h2o_hess.out", "", "a --hess run does not print the coordinates"},
		{"second-list-differs.out", lastReplace(h2o, "3651.66", "3615.66"), "differs from the one at line 408"},
		{"seventh-zero.out", strings.ReplaceAll(h2o, "1539.19", "   0.00"), "mode 7 is 0 cm⁻¹"},
		{"sixth-not-zero.out", strings.ReplaceAll(h2o, zeros, zeros[:len(zeros)-4]+"1.00"), "mode 6 is 1 cm⁻¹"},
		{"nan.out", strings.ReplaceAll(h2o, "3643.02", "    NaN"), "\"NaN\" is not a finite number"},
		{"atom-lost.out", strings.Replace(strings.Replace(h2o, "3\n xtb: 6.5.1 (unknown)", "2\n xtb: 6.5.1 (unknown)", 1),
			"H            0.00000000000000       -0.77249613457318       -0.46326031790153\n", "", 1), "2 atoms in the geometry, 3 in xtb's atom table"},
		{"atom-renamed.out", strings.Replace(h2o, "H            0.00000000000000        0.77249613457318", "O            0.00000000000000        0.77249613457318", 1),
			"atom 2 is O, xtb's atom table"},
		{"linear-geometry.out", strings.Replace(strings.Replace(h2o, "H            0.00000000000000        0.77249613457318       -0.46326031790153", "H 0 0 0.96", 1),
			"H            0.00000000000000       -0.77249613457318       -0.46326031790153", "H 0 0 -0.96", 1), "xtb took the molecule as non-linear (6 zero modes), but the geometry is linear"},
		{"molfile.out", strings.Replace(h2o, "================\n3\n xtb:", "================\n xtb:", 1), "final structure in a format this reader does not read"},
		{"biased.out", strings.Replace(h2o, "|                Numerical Hessian                |", "|            Biased Numerical Hessian             |", 1), "a biased Hessian"},
		{"frozen.out", strings.Replace(h2o, "frozen atoms in %    :   0.00000    0", "frozen atoms in %    :  33.33333    1", 1), "frozen atoms"},
		{"warned.out", insertBefore(h2o, " * finished run", "[WARNING] Runtime exception occurred\n-1- numhess: Hessian element 1 2 is not symmetric\n"), "xtb warned: \"numhess: Hessian element 1 2 is not symmetric\""},
		{"stderr-mixed-in.out", insertBefore(h2o, " * finished run", "abnormal termination of xtb\n"), "abnormal termination of xtb"},
		{"two-structures.out", strings.Replace(h2o, " final structure:", " final structure:\n================\n3\n\nO 0 0 0\nH 0 0 1\nH 0 1 0\n\n final structure:", 1), "2 final structures"},
		{"no-energy.out", strings.Replace(h2o, "| TOTAL ENERGY", "| TOTAL ENRGY", 1), "no TOTAL ENERGY"},
		{"molden.out", read("../water.molden"), "not an xtb output"},
		{"empty.out", " ", "not an xtb output"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var f *Frequencies
			var err error
			if tc.text == "" {
				f, err = ReadXtbFile(filepath.Join(dir, tc.name))
			} else {
				f, err = ReadXtb(strings.NewReader(tc.text), tc.name)
			}
			xtbWantRefusal(t, f, err, tc.name, tc.want)
		})
	}

	// A GFN-FF first run warns that it wrote its topology file; that
	// warning alone is not refused.
	benign := insertBefore(h2o, " * finished run", "[WARNING] Runtime exception occurred\n-1- gfnff_setup: Could not read topology file.\n")
	if _, err := ReadXtb(strings.NewReader(benign), "benign.out"); err != nil {
		t.Errorf("benign warning: %v", err)
	}

	withXYZ := []struct {
		name, out, xyzName, xyz, want string
	}{
		{"wrong-file", hess, "h2o.xyz", read("h2o.xyz"), "xtb ran on coordinate file \"h2o_opt.xyz\", not on \"h2o.xyz\""},
		{"ohess-output", h2o, "h2o_opt.xyz", opt, "prints its own final structure"},
		{"atom-order", hess, "h2o_opt.xyz", strings.Replace(strings.Replace(opt, "O ", "X ", 1), "H ", "O ", 1), "unknown element \"X\""},
		{"elements-swapped", hess, "h2o_opt.xyz", "3\n\nH 0 0 0\nO 0 0 0.96\nH 0 0.96 0\n", "atom 1 is H, xtb's atom table"},
		{"two-frames", hess, "h2o_opt.xyz", opt + opt, "more lines after the announced atoms"},
		{"no-count", hess, "h2o_opt.xyz", "O 0 0 0\n", "is not an atom count"},
		{"short", hess, "h2o_opt.xyz", "3\n\nO 0 0 0\n", "3 atoms announced, 1 lines follow"},
		{"unoptimised", read("h2o_hess_unoptimised.out"), "h2o.xyz", read("h2o.xyz"), "INCOMPLETELY OPTIMIZED GEOMETRY"},
	}
	for _, tc := range withXYZ {
		t.Run("with-xyz/"+tc.name, func(t *testing.T) {
			f, err := ReadXtbWithXYZ(strings.NewReader(tc.out), "run.out", strings.NewReader(tc.xyz), filepath.Join("somewhere", tc.xyzName))
			var re *ReadError
			if errors.As(err, &re) && re.File != "run.out" && re.File != filepath.Join("somewhere", tc.xyzName) {
				t.Errorf("error names %q, neither file", re.File)
			}
			xtbWantRefusal(t, f, err, "", tc.want)
		})
	}
}

func xtbWantRefusal(t *testing.T, f *Frequencies, err error, name, want string) {
	t.Helper()
	var re *ReadError
	if err == nil || !errors.As(err, &re) || f != nil {
		t.Fatalf("got %v, %v; want a *ReadError", f, err)
	}
	msg := err.Error()
	if !strings.Contains(msg, want) || !strings.Contains(msg, name) || strings.Contains(msg, "\n") {
		t.Errorf("error %q: want one line naming %q and containing %q", msg, name, want)
	}
}

// TestIsXtb checks detection on the recorded outputs and on the other
// formats' files in testdata (Molden, Psi4, NWChem, QCSchema, and the
// inputs here).
func TestIsXtb(t *testing.T) {
	outs, _ := filepath.Glob(filepath.Join("testdata", "xtb", "*.out"))
	var others []string
	for _, pattern := range []string{"*.molden", "psi4/*", "nwchem/*", "qcschema/*", "xtb/*.xyz", "xtb/*.coord"} {
		m, _ := filepath.Glob(filepath.Join("testdata", pattern))
		others = append(others, m...)
	}
	for i, p := range append(outs, others...) {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := isXtb(b), i < len(outs); got != want {
			t.Errorf("isXtb(%s) = %v", p, got)
		}
	}
}

// TestReadXtbLive runs xtb 6.x on H2O (--ohess, a fraction of a second on
// one thread) and checks the reader against what the same run wrote
// elsewhere: the frequencies xtb put in its vibspectrum file, the geometry
// and energy of its xtbopt.xyz (turned by xtb's 1e-4° rotation before the
// Hessian, so distances are compared), the zero-point energy and the
// rotational constants it printed.
func TestReadXtbLive(t *testing.T) {
	bin, err := exec.LookPath("xtb")
	if err != nil {
		if os.Getenv("FALLOFF_REQUIRE_QC") == "1" {
			t.Fatal("xtb not found and FALLOFF_REQUIRE_QC=1")
		}
		t.Skip("xtb not installed")
	}
	dir := t.TempDir()
	xyz, err := os.ReadFile(filepath.Join("testdata", "xtb", "h2o.xyz"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "h2o.xyz"), xyz, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "h2o.xyz", "--ohess")
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), "OMP_NUM_THREADS=1")
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("xtb: %v\n%s", err, stderr.String())
	}
	f, err := ReadXtb(bytes.NewReader(stdout.Bytes()), "live h2o.out")
	if err != nil {
		t.Fatal(err)
	}

	// vibspectrum: "mode [symmetry] wavenumber intensity IR Raman" rows.
	vib, err := os.ReadFile(filepath.Join(dir, "vibspectrum"))
	if err != nil {
		t.Fatal(err)
	}
	var spectrum []float64
	for _, l := range strings.Split(string(vib), "\n") {
		fs := strings.Fields(l)
		if len(fs) < 5 || strings.HasPrefix(fs[0], "#") || strings.HasPrefix(fs[0], "$") {
			continue
		}
		v, err := strconv.ParseFloat(fs[len(fs)-4], 64)
		if err != nil {
			t.Fatalf("vibspectrum line %q: %v", l, err)
		}
		if v != 0 {
			spectrum = append(spectrum, v)
		}
	}
	if !slices.Equal(f.Vibrations, spectrum) {
		t.Errorf("frequencies %v, xtb's vibspectrum %v", f.Vibrations, spectrum)
	}

	// xtbopt.xyz: count, " energy: E gnorm: g xtb: ...", atoms in Å.
	optXYZ, err := os.ReadFile(filepath.Join(dir, "xtbopt.xyz"))
	if err != nil {
		t.Fatal(err)
	}
	optLines := strings.Split(string(optXYZ), "\n")
	comment := strings.Fields(optLines[1])
	if len(comment) < 2 || comment[0] != "energy:" {
		t.Fatalf("xtbopt.xyz comment %q", optLines[1])
	}
	if e, err := strconv.ParseFloat(comment[1], 64); err != nil || e != f.Energy {
		t.Errorf("energy %v, xtbopt.xyz says %v (%v)", f.Energy, comment[1], err)
	}
	opt, _, err := readXtbXYZ(bytes.NewReader(optXYZ), "xtbopt.xyz")
	if err != nil {
		t.Fatal(err)
	}
	// A rotation leaves distances unchanged; both files print 14 decimals.
	const distTol = 1e-12
	for i := range opt {
		for j := i + 1; j < len(opt); j++ {
			a, b := norm(sub(f.Atoms[i].X, f.Atoms[j].X)), norm(sub(opt[i].X, opt[j].X))
			if math.Abs(a-b) > distTol {
				t.Errorf("r(%d,%d) = %.14f Å, xtbopt.xyz %.14f", i+1, j+1, a, b)
			}
		}
	}

	var sum float64
	for _, v := range f.Vibrations {
		sum += v
	}
	if zpe, tol := sum/2/units.HartreeCm1, xtbZPETol(len(f.Vibrations), f.Printed.ZeroPoint); f.Printed.ZeroPoint == 0 || math.Abs(zpe-f.Printed.ZeroPoint) > tol {
		t.Errorf("½Σν = %.12f E_h, xtb printed %.12f (tolerance %.2g)", zpe, f.Printed.ZeroPoint, tol)
	}
	g, err := Analyse(f.Atoms)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Printed.Constants) != 3 {
		t.Fatalf("printed constants %v", f.Printed.Constants)
	}
	for k, want := range f.Printed.Constants {
		if math.Abs(g.Constants[k]/want-1) > xtbMassTol {
			t.Errorf("constant %d: ours %.7g cm⁻¹, xtb %.7g", k, g.Constants[k], want)
		}
	}
}

func ExampleReadXtbFile() {
	// The stdout of `xtb h2o.xyz --ohess > h2o.out` (xtb 6.5.1).
	f, err := ReadXtbFile("testdata/xtb/h2o.out")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(f.Program, f.Method, f.Vibrations, f.Energy, "E_h")
	_, err = ReadXtbFile("testdata/xtb/h2o_hess.out")
	fmt.Println(err)
	// Output:
	// xtb 6.5.1 GFN2-xTB [1539.19 3643.02 3651.66] -5.070544374389 E_h
	// testdata/xtb/h2o_hess.out:204: no geometry: a --hess run does not print the coordinates of its Hessian (read the output together with "h2o_opt.xyz", the coordinate file it ran on, or run xtb --ohess, whose output carries the optimised geometry)
}

// FuzzReadXtb feeds the readers damaged outputs: they must return a
// *ReadError of one line or a result whose modes fit its atoms, and never
// panic.
func FuzzReadXtb(f *testing.F) {
	outs, _ := filepath.Glob(filepath.Join("testdata", "xtb", "*.out"))
	for _, p := range outs {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	xyz, err := os.ReadFile(filepath.Join("testdata", "xtb", "h2o_opt.xyz"))
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		_ = isXtb(data)
		check := func(r *Frequencies, err error) {
			if err != nil {
				var re *ReadError
				if !errors.As(err, &re) || r != nil || strings.Contains(err.Error(), "\n") {
					t.Fatalf("%v, %v: want a one-line *ReadError and no result", r, err)
				}
				return
			}
			want := 3*len(r.Atoms) - 6
			if r.Linear {
				want++
			}
			if len(r.Vibrations)+len(r.Imaginary) != want {
				t.Fatalf("%d atoms, %d + %d modes", len(r.Atoms), len(r.Vibrations), len(r.Imaginary))
			}
			for _, v := range append(slices.Clone(r.Vibrations), r.Imaginary...) {
				if !(v > 0) || math.IsInf(v, 0) {
					t.Fatalf("mode %v", v)
				}
			}
		}
		check(ReadXtb(bytes.NewReader(data), "fuzz.out"))
		check(ReadXtbWithXYZ(bytes.NewReader(data), "fuzz.out", bytes.NewReader(xyz), "h2o_opt.xyz"))
	})
}

// xtbCountLine returns the integer on the line of path that contains key
// (xtb's ":  # imaginary freq.   1   :" style).
func xtbCountLine(t *testing.T, path, key string) int {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(string(b), "\n") {
		if i := strings.Index(l, key); i >= 0 {
			n, err := strconv.Atoi(strings.Trim(l[i+len(key):], " :"))
			if err != nil {
				t.Fatalf("%s: line %q: %v", path, l, err)
			}
			return n
		}
	}
	t.Fatalf("%s: no %q", path, key)
	return 0
}

type xtbDistance struct {
	i, j int
	r    float64 // Å
}

// xtbDistances returns the "selected distances" xtb printed in the geometry
// summary of path: rows "i Z sym j Z sym r [(min)|(max)]".
func xtbDistances(t *testing.T, path string) []xtbDistance {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []xtbDistance
	in := false
	for _, l := range strings.Split(string(b), "\n") {
		fs := strings.Fields(l)
		switch {
		case strings.Contains(l, "selected distances"):
			in = true
		case strings.Contains(l, "distinct bonds"):
			in = false
		case in && len(fs) >= 7:
			// Skips the header and the point-group lines xtb may write
			// into the table.
			i, err1 := strconv.Atoi(fs[0])
			j, err2 := strconv.Atoi(fs[3])
			r, err3 := strconv.ParseFloat(fs[6], 64)
			if err1 == nil && err2 == nil && err3 == nil {
				out = append(out, xtbDistance{i, j, r})
			}
		}
	}
	if len(out) == 0 {
		t.Fatalf("%s: no selected distances", path)
	}
	return out
}
