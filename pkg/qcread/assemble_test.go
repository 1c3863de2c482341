package qcread

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
)

// readTwo reads the water minimum and the invented transition state of
// testdata with the electronic energies e0 and e1 (E_h) set.
func readTwo(t *testing.T, e0, e1 float64) []Source {
	t.Helper()
	w, err := ReadMoldenFile("testdata/water.molden")
	if err != nil {
		t.Fatal(err)
	}
	ts, err := ReadMoldenFile("testdata/ts_invented.molden")
	if err != nil {
		t.Fatal(err)
	}
	w.Energy, w.HasEnergy = e0, true
	ts.Energy, ts.HasEnergy = e1, true
	return []Source{{"R", "water.molden", w}, {"TS", "ts_invented.molden", ts}}
}

// The zero-point-corrected barrier is the textbook sum
// E0 = (E_el,TS − E_el,R)·E_h + ½Σν_TS − ½Σν_R, written out here by hand from
// the frequencies listed in the two files (1 E_h = 219474.6313632 cm⁻¹,
// CODATA 2018, Tiesinga et al., Rev. Mod. Phys. 93, 025010, 2021); with a
// scale factor s the real frequencies and so the zero-point energies scale
// by s and the imaginary one stays (Scott & Radom, J. Phys. Chem. 100,
// 16502, 1996, scale real fundamentals). Tolerance 1e-6 cm⁻¹: the
// difference of two energies near −76 E_h carries float64 rounding of
// about 76·2e-16 E_h ≈ 4e-9 cm⁻¹, the zero-point sums far less.
func TestAssembleBarrier(t *testing.T) {
	const eR, eTS = -76.40, -76.35
	zpeR := 0.5 * (1594.7 + 3657.1 + 3755.9) // testdata/water.molden [FREQ]
	zpeTS := 0.5 * (2050.0 + 2990.0)         // testdata/ts_invented.molden, real modes
	for _, s := range []float64{0, 0.96} {
		scale := s
		if s == 0 {
			scale = 1
		}
		im, err := Assemble(readTwo(t, eR, eTS), Options{Scale: s})
		if err != nil {
			t.Fatal(err)
		}
		want := (eTS-eR)*219474.6313632 + scale*(zpeTS-zpeR)
		ts := im.Species[1]
		if !ts.IsTS || im.Reactant != "R" || math.Abs(ts.Relative-want) > 1e-6 {
			t.Errorf("scale %g: TS=%v reactant %q E0 = %.6f cm⁻¹, want %.6f", s, ts.IsTS, im.Reactant, ts.Relative, want)
		}
		if ts.Imaginary != 1200 {
			t.Errorf("scale %g: imaginary %g cm⁻¹, want 1200 unscaled", s, ts.Imaginary)
		}
		if math.Abs(im.Species[0].ZeroPoint-scale*zpeR) > 1e-9 {
			t.Errorf("scale %g: ZPE %g, want %g", s, im.Species[0].ZeroPoint, scale*zpeR)
		}
	}
}

// Every refusal is one line naming the file or the value, with a hint.
func TestAssembleRefuses(t *testing.T) {
	two := func(t *testing.T) []Source { return readTwo(t, -76.40, -76.35) }
	cases := []struct {
		name string
		srcs func(*testing.T) []Source
		opt  Options
		want []string
	}{
		{"two imaginary", func(t *testing.T) []Source {
			s := two(t)
			s[1].Data.Imaginary = append(s[1].Data.Imaginary, 300)
			return s
		}, Options{}, []string{"ts_invented.molden", "2 imaginary frequencies", "exactly one"}},
		{"TS alone", func(t *testing.T) []Source { return two(t)[1:] }, Options{}, []string{"ts_invented.molden", "transition state alone", "hint"}},
		{"TS below reactant", func(t *testing.T) []Source { return readTwo(t, -76.40, -76.45) }, Options{}, []string{"ts_invented.molden", "below the reactant", "cannot be negative"}},
		{"no energy", func(t *testing.T) []Source {
			s := two(t)
			s[1].Data.HasEnergy = false
			return s
		}, Options{}, []string{"ts_invented.molden", "no electronic energy", "--energy TS="}},
		{"reactant is a TS", two, Options{Reactant: "TS"}, []string{"imaginary frequency", "--reactant"}},
		{"unknown reactant", two, Options{Reactant: "X"}, []string{`"X"`, "R, TS"}},
		{"scale", two, Options{Scale: 9.6}, []string{"9.6", "scale factor"}},
		{"symmetry of nobody", two, Options{Symmetry: map[string]int{"Q": 2}}, []string{`"Q"`}},
		{"positive energy", two, Options{Energy: map[string]float64{"R": 1}}, []string{"hartree"}},
		{"same name", func(t *testing.T) []Source {
			s := two(t)
			s[1].Name = "R"
			return s
		}, Options{}, []string{`"R"`, "two files"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Assemble(c.srcs(t), c.opt)
			if err == nil {
				t.Fatal("accepted")
			}
			msg := err.Error()
			for _, w := range c.want {
				if !strings.Contains(msg, w) || strings.Contains(msg, "\n") {
					t.Errorf("error %q: want one line containing %q", msg, w)
				}
			}
		})
	}
}

// The written block reads back through the input parser to the imported
// numbers, within the digits written: frequencies to 0.05 cm⁻¹ (one
// decimal), rotational constants to 5e-6 relative (six significant
// digits), the barrier to 5e-7 relative (seven digits), the mass to
// 5e-5 amu (four decimals). The mass is the sum of the most abundant
// isotopes' masses (H 1.00782503223, O 15.99491461957 u; Wang et al., Chin.
// Phys. C 45, 030003, 2021, AME2020).
func TestBlockReadsBack(t *testing.T) {
	srcs := readTwo(t, -76.40, -76.35)
	srcs[1].Data.Multiplicity = 2 // a doublet: ground level degeneracy 2S+1 = 2
	im, err := Assemble(srcs, Options{Scale: 0.97, Symmetry: map[string]int{"TS": 1}})
	if err != nil {
		t.Fatal(err)
	}
	for _, unit := range []string{"", "kJ/mol", "cm-1"} {
		var buf bytes.Buffer
		if err := im.WriteBlock(&buf, BlockOptions{EnergyUnit: unit, Header: "test"}); err != nil {
			t.Fatal(err)
		}
		text := "title: read back\n" + buf.String() + "bath: {gas: Ar}\nenergy-transfer: {model: exponential-down, alpha-300: 200 cm-1}\n" +
			"grid: {temperatures: {unit: K, values: [1000]}, pressures: {unit: Torr, values: [1]}}\n"
		m, err := input.Parse("block.yaml", []byte(text))
		if err != nil {
			t.Fatalf("unit %q: %v\n%s", unit, err, text)
		}
		for i, sp := range im.Species {
			got := m.Molecules[i]
			if got.Name != sp.Name || got.IsTS != sp.IsTS {
				t.Fatalf("species %d: %s TS=%v, want %s TS=%v", i, got.Name, got.IsTS, sp.Name, sp.IsTS)
			}
			for j, v := range sp.Vibrations {
				if math.Abs(got.Vibrations[j]-v) > 0.05 {
					t.Errorf("%s ν%d = %g, want %g", sp.Name, j, got.Vibrations[j], v)
				}
			}
			rot := got.Rotors[0]
			for j, c := range sp.Geometry.Constants {
				if math.Abs(rot.Consts[j]/c-1) > 5e-6 {
					t.Errorf("%s B%d = %g, want %g", sp.Name, j, rot.Consts[j], c)
				}
			}
			if int(got.Symmetry) != sp.Symmetry || math.Abs(got.Mass-sp.Geometry.Mass) > 5e-5 {
				t.Errorf("%s σ = %g m = %g, want %d, %g", sp.Name, got.Symmetry, got.Mass, sp.Symmetry, sp.Geometry.Mass)
			}
			if sp.IsTS && (math.Abs(got.E0/sp.Relative-1) > 5e-7 || got.Imaginary != sp.Imaginary) {
				t.Errorf("%s E0 = %g cm⁻¹ ν‡ = %g, want %g, %g", sp.Name, got.E0, got.Imaginary, sp.Relative, sp.Imaginary)
			}
		}
		if e := m.Molecules[1].Electronic; len(e) != 1 || e[0].Degeneracy != 2 || e[0].Energy != 0 {
			t.Errorf("doublet TS electronic levels %+v, want one level of degeneracy 2", e)
		}
		if e := m.Molecules[0].Electronic; len(e) != 1 || e[0].Degeneracy != 1 {
			t.Errorf("R electronic levels %+v, want the default singlet", e)
		}
		if m.Reaction.Reactant != "R" || m.Reaction.Via != "TS" {
			t.Errorf("reaction %+v", m.Reaction)
		}
	}
	water := 2*1.00782503223 + 15.99491461957
	if math.Abs(im.Species[0].Geometry.Mass-water) > 1e-9 {
		t.Errorf("water mass %.9f, want %.9f", im.Species[0].Geometry.Mass, water)
	}
}

// Merging keeps the other keys and their comments, replaces a molecule of
// the same name, adds a molecule that is new, leaves an existing reaction:
// alone and writes energies in the unit the file's transition states use.
func TestMerge(t *testing.T) {
	im, err := Assemble(readTwo(t, -76.40, -76.35), Options{})
	if err != nil {
		t.Fatal(err)
	}
	doc := `# my reaction
title: merge test # kept
molecules:
  R: {mass: 1 amu}
  other:
    energy: 10 kJ/mol
reaction: {reactant: R, via: other}
`
	out, replaced, err := im.Merge([]byte(doc), "f.yaml", BlockOptions{})
	if err != nil {
		t.Fatal(err)
	}
	s := string(out)
	for _, w := range []string{"# my reaction", "# kept", "other:", "energy: 10 kJ/mol", "reactant: R, via: other", "kJ/mol\n    imaginary-frequency"} {
		if !strings.Contains(s, w) {
			t.Errorf("merged file lacks %q:\n%s", w, s)
		}
	}
	if strings.Contains(s, "mass: 1 amu") || strings.Count(s, "reaction:") != 1 {
		t.Errorf("R not replaced or reaction written twice:\n%s", s)
	}
	if len(replaced) != 1 || replaced[0] != "R" {
		t.Errorf("replaced %v, want [R]", replaced)
	}
	if u := EnergyUnitIn([]byte(doc)); u != "kJ/mol" {
		t.Errorf("EnergyUnitIn = %q, want kJ/mol", u)
	}
	for _, bad := range []string{"- a\n- b\n", "molecules: [1, 2]\n", "a: [\n"} {
		if _, _, err := im.Merge([]byte(bad), "bad.yaml", BlockOptions{}); err == nil || !strings.HasPrefix(err.Error(), "bad.yaml: ") {
			t.Errorf("merge into %q: %v, want an error naming bad.yaml", bad, err)
		}
	}
}
