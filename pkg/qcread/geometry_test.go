package qcread

import (
	"math"
	"math/rand/v2"
	"testing"
)

const deg = math.Pi / 180

// tetra are unit vectors to the corners of a regular tetrahedron.
var tetra = [4][3]float64{
	{1 / math.Sqrt2 / math.Sqrt(1.5), 1 / math.Sqrt2 / math.Sqrt(1.5), 1 / math.Sqrt2 / math.Sqrt(1.5)},
	{1 / math.Sqrt(3), -1 / math.Sqrt(3), -1 / math.Sqrt(3)},
	{-1 / math.Sqrt(3), 1 / math.Sqrt(3), -1 / math.Sqrt(3)},
	{-1 / math.Sqrt(3), -1 / math.Sqrt(3), 1 / math.Sqrt(3)},
}

func water() []Atom {
	// Equilibrium structure r_OH = 0.9572 Å, HOH = 104.52° (Benedict,
	// Gailar & Plyler, J. Chem. Phys. 24, 1139, 1956; from memory).
	r, a := 0.9572, 104.52*deg
	return []Atom{
		{"O", [3]float64{0, 0, 0}},
		{"H", [3]float64{r * math.Sin(a/2), 0, r * math.Cos(a/2)}},
		{"H", [3]float64{-r * math.Sin(a/2), 0, r * math.Cos(a/2)}},
	}
}

// pyramid puts three atoms of element sym at distance r from centre c
// (along −z) with angle between them a, rotated by phase about z.
func pyramid(sym string, c [3]float64, r, a, phase, dir float64) []Atom {
	sb := math.Sqrt((1 - math.Cos(a)) / 1.5)
	cb := math.Sqrt(1 - sb*sb)
	var out []Atom
	for i := range 3 {
		phi := phase + float64(i)*2*math.Pi/3
		out = append(out, Atom{sym, [3]float64{c[0] + r*sb*math.Cos(phi), c[1] + r*sb*math.Sin(phi), c[2] + dir*r*cb}})
	}
	return out
}

func ammonia() []Atom {
	// r_NH = 1.012 Å, HNH = 106.7° (equilibrium; Herzberg, Electronic
	// Spectra of Polyatomic Molecules, 1966, App. VI; from memory).
	return append([]Atom{{"N", [3]float64{}}}, pyramid("H", [3]float64{}, 1.012, 106.7*deg, 0, -1)...)
}

func methane(r float64) []Atom {
	at := []Atom{{"C", [3]float64{}}}
	for _, v := range tetra {
		at = append(at, Atom{"H", scale(v, r)})
	}
	return at
}

func benzene() []Atom {
	var at []Atom
	for i := range 6 {
		phi := float64(i) * math.Pi / 3
		c, s := math.Cos(phi), math.Sin(phi)
		at = append(at, Atom{"C", [3]float64{1.397 * c, 1.397 * s, 0}}, Atom{"H", [3]float64{2.481 * c, 2.481 * s, 0}})
	}
	return at
}

func linear(syms []string, z []float64) []Atom {
	var at []Atom
	for i, s := range syms {
		at = append(at, Atom{s, [3]float64{0, 0, z[i]}})
	}
	return at
}

// ethane has r_CC 1.535, r_CH 1.094 Å, HCC 111.2° (common values, from
// memory) and the second methyl turned by twist from eclipsed (60° staggered).
func ethane(twist float64) []Atom {
	h, r, a := 1.535/2, 1.094, 111.2*deg
	at := []Atom{{"C", [3]float64{0, 0, h}}, {"C", [3]float64{0, 0, -h}}}
	for i := range 3 {
		p1 := float64(i) * 2 * math.Pi / 3
		p2 := p1 + twist
		rho, dz := r*math.Sin(a), -r*math.Cos(a)
		at = append(at,
			Atom{"H", [3]float64{rho * math.Cos(p1), rho * math.Sin(p1), h + dz}},
			Atom{"H", [3]float64{rho * math.Cos(p2), rho * math.Sin(p2), -h - dz}})
	}
	return at
}

func methylIsocyanide() []Atom {
	at := []Atom{{"C", [3]float64{0, 0, 0}}, {"N", [3]float64{0, 0, 1.424}}, {"C", [3]float64{0, 0, 2.590}}}
	return append(at, pyramid("H", [3]float64{}, 1.094, 109.5*deg, 0.3, -1)...)
}

func bromochlorofluoromethane() []Atom {
	at := []Atom{{"C", [3]float64{}}}
	for i, s := range []string{"H", "F", "Cl", "Br"} {
		at = append(at, Atom{s, scale(tetra[i], []float64{1.08, 1.35, 1.77, 1.93}[i])})
	}
	return at
}

func allene() []Atom {
	z := 1.308 + 1.087*math.Cos(58.6*deg)
	x := 1.087 * math.Sin(58.6*deg)
	return []Atom{
		{"C", [3]float64{0, 0, 0}}, {"C", [3]float64{0, 0, 1.308}}, {"C", [3]float64{0, 0, -1.308}},
		{"H", [3]float64{x, 0, z}}, {"H", [3]float64{-x, 0, z}},
		{"H", [3]float64{0, x, -z}}, {"H", [3]float64{0, -x, -z}},
	}
}

func sulfurHexafluoride() []Atom {
	at := []Atom{{"S", [3]float64{}}}
	for k := range 3 {
		for _, s := range []float64{1.561, -1.561} {
			var v [3]float64
			v[k] = s
			at = append(at, Atom{"F", v})
		}
	}
	return at
}

// TestSymmetryNumbers checks σ, the point group and chirality against the
// tables of Fernández-Ramos et al. (Theor. Chem. Acc. 118, 813, 2007,
// Table 1) and Cotton (Chemical Applications of Group Theory, 1990), from
// memory: these are textbook point groups. Each molecule is also turned by
// a random rotation and its atoms moved by up to 0.002 Å (fixed seed), as
// a loosely converged optimisation would leave them.
func TestSymmetryNumbers(t *testing.T) {
	// jitter is well inside PositionTolerance (0.01 Å).
	const jitter = 0.002
	cases := []struct {
		name   string
		atoms  []Atom
		sigma  int
		group  string
		chiral bool
	}{
		{"H2O", water(), 2, "C2v", false},
		{"NH3", ammonia(), 3, "C3v", false},
		{"CH4", methane(1.087), 12, "Td", false},
		{"C6H6", benzene(), 12, "D6h", false},
		{"CO2", linear([]string{"O", "C", "O"}, []float64{-1.160, 0, 1.160}), 2, "D∞h", false},
		{"HCN", linear([]string{"H", "C", "N"}, []float64{-1.066, 0, 1.153}), 1, "C∞v", false},
		{"C2H6 staggered", ethane(60 * deg), 6, "D3d", false},
		{"C2H6 eclipsed", ethane(0), 6, "D3h", false},
		{"C2H6 twisted 20°", ethane(20 * deg), 6, "D3", true},
		{"CH3NC", methylIsocyanide(), 3, "C3v", false},
		{"CHFClBr", bromochlorofluoromethane(), 1, "C1", true},
		{"allene", allene(), 4, "D2d", false},
		{"SF6", sulfurHexafluoride(), 24, "Oh", false},
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for _, tc := range cases {
		for _, moved := range []bool{false, true} {
			atoms := tc.atoms
			name := tc.name
			if moved {
				name += " rotated+jittered"
				u := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
				R := rotation(scale(u, 1/norm(u)), rng.Float64()*2*math.Pi)
				shift := [3]float64{rng.Float64(), -rng.Float64(), 3}
				atoms = nil
				for _, a := range tc.atoms {
					x := R.apply(a.X)
					for k := range 3 {
						x[k] += shift[k] + jitter*(2*rng.Float64()-1)/math.Sqrt(3)
					}
					atoms = append(atoms, Atom{a.Symbol, x})
				}
			}
			t.Run(name, func(t *testing.T) {
				g, err := Analyse(atoms)
				if err != nil {
					t.Fatal(err)
				}
				wantIsomers := 1
				if tc.chiral {
					wantIsomers = 2
				}
				if g.Symmetry != tc.sigma || g.PointGroup != tc.group || g.Chiral != tc.chiral || g.OpticalIsomers != wantIsomers {
					t.Errorf("σ = %d, group %q, chiral %v, isomers %d; want %d, %q, %v, %d",
						g.Symmetry, g.PointGroup, g.Chiral, g.OpticalIsomers, tc.sigma, tc.group, tc.chiral, wantIsomers)
				}
			})
		}
	}
}

// TestRotationalConstants compares rotational constants from equilibrium
// geometries with measured ones. Measured A0, B0, C0 include vibrational
// averaging, so an equilibrium geometry agrees only to that order. For the
// hydrides the largest gap is C: the ground-state inertial defect of H2O,
// Δ0 = I_C − I_A − I_B ≈ +0.05 amu·Å² (zero at equilibrium for a planar
// molecule), is 2.7 % of I_C, so the hydride tolerance is 3 %; CO2's
// vibration–rotation constants are small (0.5 %).
func TestRotationalConstants(t *testing.T) {
	cases := []struct {
		name   string
		atoms  []Atom
		linear bool
		want   []float64 // cm⁻¹
		tol    float64
		source string
	}{
		// Ground-state constants of H2O (De Lucia et al., J. Phys. Chem. Ref.
		// Data 3, 211, 1974), from memory.
		{"H2O", water(), false, []float64{27.88, 14.51, 9.28}, 0.03, "A0 B0 C0 (from memory)"},
		// CO2: B0 = 0.3902 cm⁻¹ (Herzberg 1945), r_e(CO) = 1.160 Å; from memory.
		{"CO2", linear([]string{"O", "C", "O"}, []float64{-1.160, 0, 1.160}), true, []float64{0.3902}, 0.005, "B0 (from memory)"},
		// NH3 ground state: B0 = 9.944, C0 = 6.196 cm⁻¹ (Herzberg 1945; from memory).
		{"NH3", ammonia(), false, []float64{9.944, 9.944, 6.196}, 0.03, "B0 C0 (from memory)"},
		// CH4 ground state B0 = 5.241 cm⁻¹ (Herzberg 1945; from memory) with
		// r_e(CH) = 1.087 Å.
		{"CH4", methane(1.087), false, []float64{5.241, 5.241, 5.241}, 0.03, "B0 (from memory)"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g, err := Analyse(tc.atoms)
			if err != nil {
				t.Fatal(err)
			}
			if g.Linear != tc.linear || len(g.Constants) != len(tc.want) {
				t.Fatalf("linear %v, constants %v; want linear %v, %d constants", g.Linear, g.Constants, tc.linear, len(tc.want))
			}
			for i, w := range tc.want {
				dev := g.Constants[i]/w - 1
				t.Logf("%s constant %d: %.4f cm⁻¹ vs %.4f (%s): %+.2f %%", tc.name, i, g.Constants[i], w, tc.source, 100*dev)
				if math.Abs(dev) > tc.tol {
					t.Errorf("constant %d = %.4f cm⁻¹, want %.4f within %.1f %%", i, g.Constants[i], w, 100*tc.tol)
				}
			}
		})
	}
}

// TestMomentsExact checks the inertia tensor against closed forms (exact):
// CO2 I = 2 m_O r²; CH4 I = (8/3) m_H r²; the centre of mass of HCN; the
// planar-molecule identity I_C = I_A + I_B (perpendicular-axis theorem) for
// H2O and benzene.
func TestMomentsExact(t *testing.T) {
	const tol = 1e-12 // rounding only
	mO, mH := isotopeMass["O"], isotopeMass["H"]
	g, err := Analyse(linear([]string{"O", "C", "O"}, []float64{-1.16, 0, 1.16}))
	if err != nil {
		t.Fatal(err)
	}
	if want := 2 * mO * 1.16 * 1.16; math.Abs(g.Moments[2]/want-1) > tol || g.Moments[0] != 0 {
		t.Errorf("CO2 moments %v, want 0, %v, %v", g.Moments, want, want)
	}
	g, err = Analyse(methane(1.087))
	if err != nil {
		t.Fatal(err)
	}
	want := 8.0 / 3 * mH * 1.087 * 1.087
	for _, m := range g.Moments {
		if math.Abs(m/want-1) > tol {
			t.Errorf("CH4 moment %v, want %v", m, want)
		}
	}
	g, err = Analyse(linear([]string{"H", "C", "N"}, []float64{-1.066, 0, 1.153}))
	if err != nil {
		t.Fatal(err)
	}
	wantZ := (-1.066*mH + 1.153*isotopeMass["N"]) / (mH + 12 + isotopeMass["N"])
	if math.Abs(g.Centre[2]-wantZ) > tol {
		t.Errorf("HCN centre %v, want z = %v", g.Centre, wantZ)
	}
	for name, atoms := range map[string][]Atom{"H2O": water(), "C6H6": benzene()} {
		g, err := Analyse(atoms)
		if err != nil {
			t.Fatal(err)
		}
		if d := g.Moments[2] - g.Moments[0] - g.Moments[1]; math.Abs(d) > tol*g.Moments[2] {
			t.Errorf("%s: inertial defect %v amu·Å², want 0", name, d)
		}
	}
}

func TestAnalyseRefuses(t *testing.T) {
	for name, atoms := range map[string][]Atom{
		"empty":   nil,
		"unknown": {{"Xx", [3]float64{}}, {"H", [3]float64{1, 0, 0}}},
		"NaN":     {{"H", [3]float64{math.NaN(), 0, 0}}, {"H", [3]float64{1, 0, 0}}},
	} {
		if _, err := Analyse(atoms); err == nil {
			t.Errorf("%s: no error", name)
		} else {
			t.Logf("%s: %v", name, err)
		}
	}
	g, err := Analyse([]Atom{{"Ar", [3]float64{1, 2, 3}}})
	if err != nil || !g.Atomic || len(g.Constants) != 0 || g.Symmetry != 1 {
		t.Errorf("Ar atom: %+v, %v", g, err)
	}
}
