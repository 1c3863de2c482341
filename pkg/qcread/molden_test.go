package qcread

import (
	"errors"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestReadMolden reads the hand-written files of testdata (README.md there
// says what each holds) and checks modes, atoms and geometry. The bohr
// coordinates were written from the Å ones with a0 = 0.529177210903 Å
// (CODATA 2018) to 8 decimals, so positions agree to 5e-9 bohr ≈ 3e-9 Å.
func TestReadMolden(t *testing.T) {
	const posTol = 1e-8 // Å: 8 written decimals of bohr
	cases := []struct {
		file      string
		linear    bool
		real      []float64
		imaginary []float64
		dropped   int
		first     [3]float64 // Å, second atom
		sigma     int
	}{
		{"water.molden", false, []float64{1594.7, 3657.1, 3755.9}, nil, 0, [3]float64{0.75695033, 0, 0.58588228}, 2},
		{"water_all_modes.molden", false, []float64{1594.7, 3657.1, 3755.9}, nil, 6, [3]float64{0.75695033, 0, 0.58588228}, 2},
		{"co2.molden", true, []float64{667.4, 667.4, 1333.0, 2349.2}, nil, 0, [3]float64{0, 0, 0}, 2},
		{"ts_invented.molden", false, []float64{2050, 2990}, []float64{1200}, 0, [3]float64{0, 0, 1.18}, 1},
	}
	for _, tc := range cases {
		t.Run(tc.file, func(t *testing.T) {
			f, err := ReadMoldenFile(filepath.Join("testdata", tc.file))
			if err != nil {
				t.Fatal(err)
			}
			if f.Linear != tc.linear || !slices.Equal(f.Vibrations, tc.real) || !slices.Equal(f.Imaginary, tc.imaginary) || len(f.Dropped) != tc.dropped {
				t.Errorf("linear %v, real %v, imaginary %v, dropped %v; want %v, %v, %v, %d",
					f.Linear, f.Vibrations, f.Imaginary, f.Dropped, tc.linear, tc.real, tc.imaginary, tc.dropped)
			}
			for k := range 3 {
				if math.Abs(f.Atoms[1].X[k]-tc.first[k]) > posTol {
					t.Errorf("atom 2 at %v Å, want %v", f.Atoms[1].X, tc.first)
				}
			}
			g, err := Analyse(f.Atoms)
			if err != nil {
				t.Fatal(err)
			}
			if g.Symmetry != tc.sigma {
				t.Errorf("σ = %d, want %d", g.Symmetry, tc.sigma)
			}
		})
	}
}

// TestReadMoldenRefuses checks that every broken file gives one ReadError
// line naming the file and what is missing, and no result.
func TestReadMoldenRefuses(t *testing.T) {
	water := `[FREQ]
1594.7
3657.1
3755.9
[FR-COORD]
O 0 0 0
H 1.43042881 0 1.10715704
H -1.43042881 0 1.10715704
`
	cases := []struct {
		name, text, want string
	}{
		{"water_wrong_count.molden", "", "4 frequencies, but 3 atoms need 3N−6 = 3"},
		{"water_truncated.molden", "", "no [FR-COORD]"},
		{"water_truncated_modes.molden", "", "vibration 3 has 1 displacement lines, want 3"},
		{"no-freq", "[FR-COORD]\nH 0 0 0\nH 0 0 1.4\n", "no [FREQ]"},
		{"seven-small", "[FREQ]\n-12\n-3\n0\n2\n8\n20\n30\n3657.1\n3755.9\n" + water[strings.Index(water, "[FR-COORD]"):], "9 modes are listed but 7 lie below 50"},
		{"atoms-order", "[Atoms] Angs\nH 1 1 0 0 0\nO 2 8 0 0 0\nH 3 1 0 0 0\n" + water, "[Atoms] atom 1 is \"H\", [FR-COORD] has \"O\""},
		{"atoms-unit", "[Atoms] nm\nO 1 8 0 0 0\nH 2 1 0 0 0\nH 3 1 0 0 0\n" + water, "[Atoms] unit \"nm\""},
		{"nan", strings.Replace(water, "1594.7", "NaN", 1), "\"NaN\" is not a finite number"},
		{"zero", strings.Replace(water, "1594.7", "0.0", 1), "a vibration of 0 cm⁻¹"},
		{"unknown-element", strings.Replace(water, "O 0 0 0", "Q 0 0 0", 1), "unknown element \"Q\""},
		{"norm-count", water + "[FR-NORM-COORD]\nvibration 1\n0 0 1\n0 0 1\n0 0 1\n", "[FR-NORM-COORD] has 1 vibrations, [FREQ] 3"},
		{"empty", "", "no [FREQ]"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var f *Frequencies
			var err error
			if strings.HasSuffix(tc.name, ".molden") {
				f, err = ReadMoldenFile(filepath.Join("testdata", tc.name))
			} else if tc.name == "empty" {
				f, err = ReadMolden(strings.NewReader(""), tc.name)
			} else {
				f, err = ReadMolden(strings.NewReader(tc.text), tc.name)
			}
			var re *ReadError
			if err == nil || !errors.As(err, &re) || f != nil {
				t.Fatalf("got %v, %v; want a *ReadError", f, err)
			}
			msg := err.Error()
			if !strings.Contains(msg, tc.want) || !strings.Contains(msg, tc.name) || strings.Contains(msg, "\n") {
				t.Errorf("error %q: want one line naming %q and containing %q", msg, tc.name, tc.want)
			}
		})
	}
}
