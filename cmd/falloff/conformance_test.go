package main

import (
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// foamBashrc sets up the environment of the OpenFOAM tools (Debian's
// openfoam package).
const foamBashrc = "/usr/share/openfoam/etc/bashrc"

// foamEntry is one reaction of an OpenFOAM reactions file: its type and the
// numbers of its sub-dictionaries (kInf, k0, F, or the top level).
type foamEntry struct {
	kind string
	num  map[string]float64 // "kInf.A", "k0.Ta", "F.alpha", "A", …
}

// readFoamReactions reads the reactions chemkinToFoam wrote.
func readFoamReactions(t *testing.T, path string) []foamEntry {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var out []foamEntry
	var cur *foamEntry
	block := ""
	kv := regexp.MustCompile(`^\s*(\w+)\s+([-+0-9.eE]+);$`)
	for _, l := range strings.Split(string(b), "\n") {
		s := strings.TrimSpace(l)
		switch {
		case strings.HasPrefix(s, "type "):
			out = append(out, foamEntry{kind: strings.TrimSuffix(strings.Fields(s)[1], ";"), num: map[string]float64{}})
			cur, block = &out[len(out)-1], ""
		case s == "kInf" || s == "k0" || s == "F":
			block = s + "."
		case cur != nil && kv.MatchString(l):
			m := kv.FindStringSubmatch(l)
			x, _ := strconv.ParseFloat(m[2], 64)
			cur.num[block+m[1]] = x
		}
	}
	return out
}

// The keyword text converts unedited with a real mechanism converter,
// OpenFOAM's chemkinToFoam (Debian package openfoam; CI installs it and
// sets FALLOFF_REQUIRE_OPENFOAM=1): the mechanism files of rates --out —
// Arrhenius, Lindemann, Troe and SRI, forward and as the recombination —
// with the thermo block thermo.txt and the elements and species of
// phase.yaml. The converted numbers equal ours in its units (A in kmol
// and m³: 1e-3 per cm³ mol⁻¹, exact; Ta = Ea/R): the gas constant implied
// by every activation temperature agrees with 8.314462618 J mol⁻¹ K⁻¹
// (CODATA 2018) within 2e-4 — the converter's own R and the 4.184 J/cal
// of our cal/mol — and is the same for every entry.
func TestChemkinToFoam(t *testing.T) {
	if _, err := os.Stat(foamBashrc); err != nil {
		if os.Getenv("FALLOFF_REQUIRE_OPENFOAM") != "" {
			t.Fatalf("chemkinToFoam is required here: %v", err)
		}
		t.Skip("OpenFOAM not installed (apt-get install openfoam)")
	}
	in, err := os.ReadFile("../../pkg/thermo/testdata/ring-thermo.yaml")
	if err != nil {
		t.Fatal(err)
	}
	input := filepath.Join(t.TempDir(), "ring.yaml")
	text := strings.Replace(string(in), "fits: [troe, plog, chebyshev]", "fits: [arrhenius, lindemann, troe, sri]", 1)
	if err := os.WriteFile(input, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	const rCODATA = 8.314462618 // J mol⁻¹ K⁻¹
	var impliedR []float64
	for _, dir := range []string{"forward", "recombination"} {
		out := filepath.Join(t.TempDir(), "out")
		if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--skip-held-out", "--write-failed", "--direction", dir, "--out", out, input); code != exitOK {
			t.Fatalf("%s: exit %d: %s", dir, code, errs)
		}
		phase, err := os.ReadFile(filepath.Join(out, "phase.yaml"))
		if err != nil {
			t.Fatal(err)
		}
		elems := regexp.MustCompile(`elements: \[(.*)\]`).FindStringSubmatch(string(phase))
		species := regexp.MustCompile(`(?m)^(\S+)\s.*1$`).FindAllStringSubmatch(mustRead(t, filepath.Join(out, "thermo.txt")), -1)
		var names []string
		for _, m := range species {
			names = append(names, m[1])
		}
		work := t.TempDir()
		transport := "\".*\"\n{\n    transport\n    {\n        As 1.67212e-06;\n        Ts 170.672;\n    }\n}\n"
		write := func(name, s string) string {
			p := filepath.Join(work, name)
			if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
				t.Fatal(err)
			}
			return p
		}
		write("transport", transport)
		write("thermo.dat", mustRead(t, filepath.Join(out, "thermo.txt")))
		for _, form := range []string{"arrhenius", "lindemann", "troe", "sri"} {
			rx := mustRead(t, filepath.Join(out, "reactions-"+form+".txt"))
			write("chem.inp", "ELEMENTS "+strings.ToUpper(strings.ReplaceAll(elems[1], ",", " "))+" END\nSPECIES "+strings.Join(names, " ")+" END\n"+rx)
			cmd := exec.Command("bash", "-c", "source "+foamBashrc+" >/dev/null 2>&1; chemkinToFoam chem.inp thermo.dat transport reactions.foam thermo.foam")
			cmd.Dir = work
			if b, err := cmd.CombinedOutput(); err != nil {
				t.Fatalf("%s %s: chemkinToFoam: %v\n%s", dir, form, err, b)
			}
			ents := readFoamReactions(t, filepath.Join(work, "reactions.foam"))
			ours := readText(t, rx)
			if len(ents) != 1 || len(ours) != 1 {
				t.Fatalf("%s %s: %d converted entries, %d ours", dir, form, len(ents), len(ours))
			}
			e, o := ents[0], ours[0]
			order := 1.0
			if dir == "recombination" {
				order = 2
			}
			check := func(what string, got, want, tol float64) {
				if math.Abs(got/want-1) > tol {
					t.Errorf("%s %s %s: converted %.9g, ours %.9g", dir, form, what, got, want)
				}
			}
			const aTol = 1e-6 // our 7 printed digits
			switch form {
			case "arrhenius":
				check("A", e.num["A"], o.a*math.Pow(1e-3, order-1), aTol)
				check("beta", e.num["beta"], o.n, 1e-7)
				impliedR = append(impliedR, o.ea*4.184/e.num["Ta"])
			default:
				check("kInf.A", e.num["kInf.A"], o.a*math.Pow(1e-3, order-1), aTol)
				check("k0.A", e.num["k0.A"], o.low[0]*math.Pow(1e-3, order), aTol)
				check("kInf.beta", e.num["kInf.beta"], o.n, 1e-7)
				check("k0.beta", e.num["k0.beta"], o.low[1], 1e-7)
				impliedR = append(impliedR, o.ea*4.184/e.num["kInf.Ta"], o.low[2]*4.184/e.num["k0.Ta"])
				if form == "troe" {
					check("F.alpha", e.num["F.alpha"], o.aux[0], 1e-6)
					check("F.Tsss", e.num["F.Tsss"], o.aux[1], 1e-6)
				}
				if form == "sri" {
					check("F.a", e.num["F.a"], o.aux[0], 1e-6)
				}
			}
		}
	}
	for _, r := range impliedR {
		if math.Abs(r/rCODATA-1) > 2e-4 || math.Abs(r/impliedR[0]-1) > 1e-6 {
			t.Errorf("implied R = %.7g J/mol/K (first %.7g; CODATA %.10g)", r, impliedR[0], rCODATA)
		}
	}
	t.Logf("implied R of the converter: %.7g J/mol/K (%.2g from CODATA)", impliedR[0], impliedR[0]/rCODATA-1)
}

func mustRead(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// textEntry is one reaction of our keyword text: A, n, Ea and the LOW and
// TROE/SRI numbers.
type textEntry struct {
	a, n, ea float64
	low, aux []float64
}

// readText reads the reactions of a keyword text written by pkg/export.
func readText(t *testing.T, s string) []textEntry {
	t.Helper()
	var out []textEntry
	nums := func(fs []string) []float64 {
		var xs []float64
		for _, f := range fs {
			if x, err := strconv.ParseFloat(f, 64); err == nil {
				xs = append(xs, x)
			}
		}
		return xs
	}
	for _, l := range strings.Split(s, "\n") {
		f := strings.Fields(l)
		switch {
		case len(f) == 0 || strings.HasPrefix(l, "!") || f[0] == "REACTIONS" || f[0] == "END" || f[0] == "DUPLICATE":
		case f[0] == "LOW":
			out[len(out)-1].low = nums(f)
		case f[0] == "TROE" || f[0] == "SRI":
			out[len(out)-1].aux = nums(f)
		case strings.Contains(l, "="):
			xs := nums(f[len(f)-3:])
			out = append(out, textEntry{a: xs[0], n: xs[1], ea: xs[2]})
		}
	}
	return out
}

// --target openfoam names what chemkinToFoam cannot read: a recommended
// PLOG or Chebyshev form, KJOULES/MOLE, MOLECULES (what TestChemkinToFoam
// and its documentation found); cantera, which reads them all, says
// nothing.
func TestTargetWarnings(t *testing.T) {
	args := []string{"rates", "--skip-check", "--energy-unit", "kJ/mol", "--quantity", "molecule", "--out", t.TempDir()}
	_, _, errs := runCLI(t, append(args, "--target", "openfoam")...)
	for _, want := range []string{"has no keyword for chemkinToFoam", "refuses KJOULES/MOLE", "ignores MOLECULES"} {
		if !strings.Contains(errs, want) {
			t.Errorf("--target openfoam: no warning %q in %q", want, errs)
		}
	}
	_, _, errs = runCLI(t, append(args, "--target", "cantera")...)
	if strings.Contains(errs, "--target") {
		t.Errorf("--target cantera warned: %q", errs)
	}
}
