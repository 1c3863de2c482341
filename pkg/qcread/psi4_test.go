package qcread

import (
	"bytes"
	"context"
	"errors"
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

// Tolerances of the Psi4 tests, from the digits Psi4 prints.
const (
	// p4FreqTol (cm⁻¹): the vibration table and the "post-proj all modes"
	// list both print 4 decimals of the same numbers.
	p4FreqTol = 1e-9
	// p4PosTol (Å): geometries are printed to 12 decimals; the bohr input
	// of water_freq_only.in was written to 10 decimals of bohr (5e-11 bohr).
	p4PosTol = 1e-9
	// p4EnergyTol (E_h): "Total E0" is printed to 8 decimals, the SCF
	// energy to 14.
	p4EnergyTol = 5e-9 + 1e-12
	// p4ZPETol (E_h): the ZPE is printed to 8 decimals (±5e-9); ½Σν from
	// frequencies rounded to 4 decimals moves by up to 2.5e-5 cm⁻¹ per
	// mode (1.1e-10 E_h each, at most 6 modes here); Psi4's CODATA 2014
	// E_h/hc differs from the 2018 value by 3e-11 relative.
	p4ZPETol = 5e-9 + 6*1.2e-10
	// p4RotAbsTol (cm⁻¹) and p4RotRelTol: the constants are printed to 5
	// decimals (±5e-6 cm⁻¹); Psi4 1.3.2 uses CODATA 2014 h and m_u, which
	// differ from CODATA 2018 by 1.5e-8 and 1.6e-8 relative.
	p4RotAbsTol = 5e-6
	p4RotRelTol = 1e-7
)

// p4Case is a recorded Psi4 output and what the file itself says.
type p4Case struct {
	file, program, method string
	linear                bool
	imaginary             int // number of imaginary modes
	// geomFile holds the "Final optimized geometry" the frequencies must
	// be at (the same file after optimize(), water.out for the bohr rerun).
	geomFile string
}

var p4Cases = []p4Case{
	{"water.out", "Psi4 1.3.2", "RHF/6-31G*", false, 0, "water.out"},
	{"water_freq_only.out", "Psi4 1.3.2", "RHF/6-31G*", false, 0, "water.out"},
	{"hcn.out", "Psi4 1.3.2", "B3LYP/6-31G*", true, 0, "hcn.out"},
	{"nh3_ts.out", "Psi4 1.3.2", "RHF/6-31G*", false, 1, "nh3_ts.out"},
}

func p4Path(file string) string { return filepath.Join("testdata", "psi4", file) }

// TestReadPsi4 reads the recorded Psi4 outputs (testdata/psi4/README.md)
// and compares what the reader returns with what Psi4 printed elsewhere in
// the same file (p4CheckPrinted).
func TestReadPsi4(t *testing.T) {
	for _, tc := range p4Cases {
		t.Run(tc.file, func(t *testing.T) {
			f, err := ReadPsi4File(p4Path(tc.file))
			if err != nil {
				t.Fatal(err)
			}
			if f.Program != tc.program || f.Method != tc.method || f.Linear != tc.linear || len(f.Imaginary) != tc.imaginary || len(f.Dropped) != 0 {
				t.Errorf("program %q, method %q, linear %v, %d imaginary, dropped %v; want %q, %q, %v, %d, none",
					f.Program, f.Method, f.Linear, len(f.Imaginary), f.Dropped, tc.program, tc.method, tc.linear, tc.imaginary)
			}
			text := p4Read(t, p4Path(tc.file))
			p4CheckPrinted(t, f, text)

			// The geometry is the optimised one, not the starting one.
			want := p4FinalGeometry(t, p4Read(t, p4Path(tc.geomFile)))
			if len(want) != len(f.Atoms) {
				t.Fatalf("%d atoms, the optimised geometry has %d", len(f.Atoms), len(want))
			}
			for i, a := range f.Atoms {
				for k := range 3 {
					if a.Symbol != want[i].Symbol || math.Abs(a.X[k]-want[i].X[k]) > p4PosTol {
						t.Errorf("atom %d: %v, want %v (±%g Å)", i+1, a, want[i], p4PosTol)
					}
				}
			}
		})
	}
}

// p4CheckPrinted compares f, read from the Psi4 output text, with the
// values Psi4 printed in other places of the same output: the "post-proj
// all modes" list (all 3N modes, translations and rotations near 0), the
// SCF energy of the frequency step, and its own ZPE and rotational
// constants against our recomputation from the geometry and frequencies.
func p4CheckPrinted(t *testing.T, f *Frequencies, text string) {
	t.Helper()
	// Frequencies: the modes above 10 cm⁻¹ in magnitude of Psi4's list
	// (translations and rotations print as 0.0000–0.0002) are ours.
	var listed []float64
	for _, v := range p4PostProjList(t, text) {
		if math.Abs(v) > 10 {
			listed = append(listed, v)
		}
	}
	var ours []float64
	ours = append(ours, f.Vibrations...)
	for _, v := range f.Imaginary {
		ours = append(ours, -v)
	}
	slices.Sort(listed)
	slices.Sort(ours)
	if len(listed) != len(ours) {
		t.Fatalf("frequencies %v, Psi4 listed %v", ours, listed)
	}
	for i := range ours {
		if math.Abs(ours[i]-listed[i]) > p4FreqTol {
			t.Errorf("frequency %v cm⁻¹, Psi4 listed %v", ours[i], listed[i])
		}
	}

	// Energy: the SCF energy printed first after "hessian() will perform"
	// (the reference point of the frequency step).
	step := strings.LastIndex(text, "hessian() will perform")
	k := strings.Index(text[step:], "Final Energy:")
	if step < 0 || k < 0 {
		t.Fatal("no SCF energy in the frequency step")
	}
	scf, err := strconv.ParseFloat(strings.Fields(text[step+k+len("Final Energy:"):])[0], 64)
	if err != nil {
		t.Fatal(err)
	}
	if !f.HasEnergy || math.Abs(f.Energy-scf) > p4EnergyTol {
		t.Errorf("energy %.10f E_h (has %v), SCF energy of the frequency step %.14f", f.Energy, f.HasEnergy, scf)
	}

	// ZPE: ½ Σ ν over the real modes (Psi4 leaves imaginary ones out).
	zpe := 0.0
	for _, v := range f.Vibrations {
		zpe += v / 2
	}
	zpe /= units.HartreeCm1
	if f.Printed.ZeroPoint == 0 || math.Abs(zpe-f.Printed.ZeroPoint) > p4ZPETol {
		t.Errorf("½Σν = %.10f E_h, Psi4 printed %.8f (±%g)", zpe, f.Printed.ZeroPoint, p4ZPETol)
	}
	t.Logf("ZPE ½Σν − printed = %.2e E_h", zpe-f.Printed.ZeroPoint)

	// Rotational constants: ours from the geometry and the isotope table.
	g, err := Analyse(f.Atoms)
	if err != nil {
		t.Fatal(err)
	}
	if len(g.Constants) != len(f.Printed.Constants) {
		t.Fatalf("rotational constants %v, Psi4 printed %v", g.Constants, f.Printed.Constants)
	}
	for i, c := range g.Constants {
		p := f.Printed.Constants[i]
		if math.Abs(c-p) > p4RotAbsTol+p4RotRelTol*p {
			t.Errorf("rotational constant %d: ours %.7f cm⁻¹, Psi4 %.5f", i, c, p)
		}
		t.Logf("rotational constant %d: (ours − Psi4)/Psi4 = %.1e", i, (c-p)/p)
	}
}

// p4PostProjList parses Psi4's "post-proj  all modes:['…' '…i' …]" list,
// which may wrap over lines; imaginary entries (…i) become negative.
func p4PostProjList(t *testing.T, text string) []float64 {
	t.Helper()
	k := strings.Index(text, "post-proj  all modes:[")
	if k < 0 {
		t.Fatal("no post-proj list")
	}
	rest := text[k+len("post-proj  all modes:["):]
	end := strings.Index(rest, "]")
	var out []float64
	for _, s := range strings.Fields(strings.ReplaceAll(rest[:end], "'", " ")) {
		sign := 1.0
		if strings.HasSuffix(s, "i") {
			s, sign = strings.TrimSuffix(s, "i"), -1
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, sign*v)
	}
	return out
}

// p4FinalGeometry parses the Å block after "Final optimized geometry and
// variables:" (symbol x y z, no mass column).
func p4FinalGeometry(t *testing.T, text string) []Atom {
	t.Helper()
	k := strings.Index(text, "Final optimized geometry and variables:")
	if k < 0 {
		t.Fatal("no final optimised geometry")
	}
	rest := text[k:]
	h := strings.Index(rest, "Geometry (in Angstrom)")
	if h < 0 {
		t.Fatal("final geometry not in Angstrom")
	}
	lines := strings.Split(rest[h:], "\n")[2:]
	var atoms []Atom
	for _, l := range lines {
		f := strings.Fields(l)
		if len(f) == 0 {
			break
		}
		var a Atom
		a.Symbol = f[0]
		for j := range 3 {
			v, err := strconv.ParseFloat(f[1+j], 64)
			if err != nil {
				t.Fatal(err)
			}
			a.X[j] = v
		}
		atoms = append(atoms, a)
	}
	return atoms
}

// p4DropLine removes from text the first line that starts (after blanks)
// with prefix and comes after the first occurrence of after.
func p4DropLine(text, after, prefix string) string {
	lines := strings.SplitAfter(text, "\n")
	seen := false
	for i, l := range lines {
		seen = seen || strings.Contains(l, after)
		if seen && strings.HasPrefix(strings.TrimSpace(l), prefix) {
			return strings.Join(slices.Delete(lines, i, i+1), "")
		}
	}
	return text
}

func p4Read(t testing.TB, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestPublishedHCN compares the B3LYP/6-31G* rotational constant of HCN,
// from the Psi4 and the NWChem run, with the measured ground-state one,
// B0 = 44315.976 MHz = 1.478222 cm⁻¹ (De Lucia & Gordy, Phys. Rev. 187, 58,
// 1969; from memory). B3LYP/6-31G* bond lengths are within about 0.01 Å of
// experiment (≤ 1 % of r, so ≤ 2 % of B ∝ 1/r²), and B_e − B_0 of HCN is
// under 0.5 %: tolerance 2 %. Wrong units (bohr for Å) or masses would be
// off by far more.
func TestPublishedHCN(t *testing.T) {
	const b0, tol = 1.478222, 0.02
	for _, c := range []struct {
		path string
		read func(string) (*Frequencies, error)
	}{{p4Path("hcn.out"), ReadPsi4File}, {nwPath("hcn.out"), ReadNWChemFile}} {
		f, err := c.read(c.path)
		if err != nil {
			t.Fatal(err)
		}
		g, err := Analyse(f.Atoms)
		if err != nil {
			t.Fatal(err)
		}
		if len(g.Constants) != 1 || math.Abs(g.Constants[0]-b0)/b0 > tol {
			t.Fatalf("%s: B = %v cm⁻¹, measured B0 = %g (±%g relative)", c.path, g.Constants, b0, tol)
		}
		t.Logf("%s: B = %.6f cm⁻¹, (B − B0)/B0 = %.2e", c.path, g.Constants[0], (g.Constants[0]-b0)/b0)
	}
}

// TestReadPsi4Refuses checks that broken or unusable outputs give one
// *ReadError line naming the file and the problem, and no result. The
// recorded ones are real Psi4 runs (or, for *_truncated, a real output cut
// short; testdata/psi4/README.md); the others are edits of a real output
// made here, named after the edit.
func TestReadPsi4Refuses(t *testing.T) {
	good := p4Read(t, p4Path("water_freq_only.out"))
	cut := func(s, from string) string { return s[:strings.Index(s, from)] }
	cases := []refusal{
		{"water_opt_fail.out", "", "Psi4 stopped with an error: Could not converge geometry optimization in 2 iterations"},
		{"water_freq_only_truncated.out", "", "no \"Psi4 exiting successfully\" line"},
		{"water_two_freqs.out", "", "2 harmonic vibrational analyses"},
		{"water_nonstationary.out", "", "Psi4 did not project rotations"},
		{"no-analysis", cut(good, "==> Harmonic Vibrational Analysis <==") + "*** Psi4 exiting successfully. Buy a developer a beer!\n", "no harmonic vibrational analysis"},
		{"cut-before-analysis", cut(good, "==> Harmonic Vibrational Analysis <=="), "the output is truncated"},
		{"deuterium-mass", strings.ReplaceAll(good, "1.425428118400    -0.961868313977     1.007825032230", "1.425428118400    -0.961868313977     2.014101778120"), "has mass 2.014102 u, not the most abundant isotope's 1.007825 u"},
		{"missing-atom-row", p4DropLine(good, "Freq [cm^-1]", "3   H"), "a vibration block has 2 atom rows but the geometry has 3 atoms"},
		{"nan-frequency", strings.Replace(good, "Freq [cm^-1]                1826.1344", "Freq [cm^-1]                NaN", 1), "frequency \"NaN\" is not a number"},
		{"ghost-atom", strings.Replace(good, "         O            0.000000000000     0.000000000000     0.121212896423", "      Gh(O)           0.000000000000     0.000000000000     0.121212896423", -1), "unknown element \"Gh(O)\""},
		{"not-psi4", p4Read(t, filepath.Join("testdata", "nwchem", "water.out")), "no Psi4 banner"},
		{"empty", "", "no Psi4 banner"},
	}
	checkRefusals(t, cases, p4Path, ReadPsi4File, ReadPsi4)
}

// TestDetectPsi4NWChem checks isPsi4 and isNWChem on the first 64 KiB of
// every recorded output and of the other formats' files in testdata, and on
// a QCSchema-style JSON document that embeds a Psi4 output as a string.
func TestDetectPsi4NWChem(t *testing.T) {
	head := func(path string) []byte {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		return b[:min(len(b), 64<<10)]
	}
	var n int
	for _, pat := range []string{"testdata/psi4/*.out", "testdata/nwchem/*.out", "testdata/*.molden", "testdata/xtb/*.out", "testdata/qcschema/*.json"} {
		files, _ := filepath.Glob(pat)
		for _, p := range files {
			h := head(p)
			wantPsi4 := strings.HasPrefix(p, filepath.Join("testdata", "psi4"))
			wantNW := strings.HasPrefix(p, filepath.Join("testdata", "nwchem"))
			if isPsi4(h) != wantPsi4 || isNWChem(h) != wantNW {
				t.Errorf("%s: isPsi4 %v, isNWChem %v; want %v, %v", p, isPsi4(h), isNWChem(h), wantPsi4, wantNW)
			}
			n++
		}
	}
	if n < 20 {
		t.Errorf("only %d files checked", n)
	}
	psi4 := head(p4Path("water.out"))
	embedded := []byte(`{"schema_name": "qcschema_output", "stdout": ` + strconv.Quote(string(psi4)) + `}`)
	if isPsi4(embedded) || isNWChem(embedded) {
		t.Error("a JSON document embedding a Psi4 output is taken for a text output")
	}
}

// TestReadPsi4Live reruns testdata/psi4/water_freq_only.in (HF/6-31G*
// water, about 1 s) in a temporary directory and checks the reader on the
// fresh output against Psi4's own printed values, and the frequencies
// against the recorded run (same input and program: equal to the printed
// 4 decimals).
func TestReadPsi4Live(t *testing.T) {
	psi4 := p4LiveProgram(t, "psi4")
	dir := t.TempDir()
	in, err := os.ReadFile(p4Path("water_freq_only.in"))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "water.in"), in, 0o644); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(t.Context(), 60*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, psi4, "-n", "1", "water.in", "water.out")
	cmd.Dir = dir
	cmd.Env = append(os.Environ(), "OMP_NUM_THREADS=1", "PSI_SCRATCH="+dir)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("psi4: %v\n%s", err, stderr.String())
	}
	out := filepath.Join(dir, "water.out")
	f, err := ReadPsi4File(out)
	if err != nil {
		t.Fatal(err)
	}
	p4CheckPrinted(t, f, p4Read(t, out))
	rec, err := ReadPsi4File(p4Path("water_freq_only.out"))
	if err != nil {
		t.Fatal(err)
	}
	for i := range rec.Vibrations {
		// 1e-3 cm⁻¹: two runs of one input agree to the printed digits up
		// to a last-digit flip.
		if math.Abs(f.Vibrations[i]-rec.Vibrations[i]) > 1e-3 {
			t.Errorf("vibration %d: %v cm⁻¹, recorded run %v", i, f.Vibrations[i], rec.Vibrations[i])
		}
	}
}

// p4LiveProgram returns the path of a quantum-chemistry program for a live
// test, skipping the test in -short mode or when the program is absent
// (failing instead when FALLOFF_REQUIRE_QC=1).
func p4LiveProgram(t *testing.T, name string) string {
	t.Helper()
	if testing.Short() {
		t.Skipf("runs %s; skipped in -short mode", name)
	}
	path, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("FALLOFF_REQUIRE_QC") == "1" {
			t.Fatalf("%s not found and FALLOFF_REQUIRE_QC=1: %v", name, err)
		}
		t.Skipf("%s not found: %v", name, err)
	}
	return path
}

// FuzzReadPsi4 feeds mutated recorded outputs to ReadPsi4: it must return
// either a *ReadError on one line or a result with finite numbers, never
// panic.
func FuzzReadPsi4(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("testdata", "psi4", "*.out"))
	for _, p := range files {
		f.Add(p4Read(f, p))
	}
	f.Fuzz(func(t *testing.T, text string) {
		fr, err := ReadPsi4(strings.NewReader(text), "fuzz.out")
		p4CheckFuzzResult(t, fr, err)
	})
}

// p4CheckFuzzResult checks the contract of a reader's result on any input.
func p4CheckFuzzResult(t *testing.T, fr *Frequencies, err error) {
	t.Helper()
	if err != nil {
		var re *ReadError
		if !errors.As(err, &re) || fr != nil || strings.ContainsAny(err.Error(), "\n\r") {
			t.Fatalf("got %v, %q; want nil and a one-line *ReadError", fr, err)
		}
		return
	}
	if fr == nil || len(fr.Atoms) == 0 {
		t.Fatalf("no error but no atoms: %+v", fr)
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	nums := append([]float64{fr.Energy, fr.Printed.ZeroPoint}, fr.Vibrations...)
	nums = append(nums, fr.Imaginary...)
	nums = append(nums, fr.Printed.Constants...)
	for _, a := range fr.Atoms {
		nums = append(nums, a.X[:]...)
	}
	for _, v := range nums {
		if !finite(v) {
			t.Fatalf("non-finite number in %+v", fr)
		}
	}
}

// The spin multiplicity is the one Psi4 prints in the geometry header of
// the frequency step ("charge = 0, multiplicity = 1" for closed-shell
// water and HCN).
func TestReadPsi4Multiplicity(t *testing.T) {
	for _, f := range []string{"water.out", "hcn.out", "nh3_ts.out"} {
		d, err := ReadPsi4File("testdata/psi4/" + f)
		if err != nil {
			t.Fatal(err)
		}
		if d.Multiplicity != 1 {
			t.Errorf("%s: multiplicity %d, want 1", f, d.Multiplicity)
		}
	}
}

// A transition-state search (testdata/ch3nc-qc: Psi4 1.3.2, B3LYP/6-31G(d),
// opt_type ts from a Hessian at the start) prints two analyses: the first
// at the starting geometry (491.1573i cm⁻¹), the second after "Optimization
// is complete!" (440.4127i, 208.5522, 621.9186 cm⁻¹ ...). The reader takes
// the second, exactly as printed; two analyses without an optimisation
// between them stay refused (TestReadPsi4Refuses, water_two_freqs.out).
func TestReadPsi4TransitionStateSearch(t *testing.T) {
	d, err := ReadPsi4File("../../testdata/ch3nc-qc/ts_opt_freq.out")
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Imaginary) != 1 || d.Imaginary[0] != 440.4127 || d.Vibrations[0] != 208.5522 || d.Vibrations[1] != 621.9186 {
		t.Errorf("imaginary %v, vibrations %v: want the analysis after the optimisation (440.4127i; 208.5522, 621.9186, ...)", d.Imaginary, d.Vibrations[:2])
	}
	if _, err := ReadPsi4File("testdata/psi4/water_two_freqs.out"); err == nil {
		t.Error("two analyses without an optimisation between them: accepted")
	}
}
