package rrkm

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// The classical rotor densities of docs/design.md §3 — 1D ρ = 1/(σ√(BE)),
// 2D ρ = 1/(σB), 3D ρ = (2/σ)√(E/(ABC)) (Holbrook, Pilling & Robertson 1996,
// §4.4) — written here independently, integrated numerically against
// e^(−E/kT), must give the classical partition functions RotationalQ uses.
func TestRotorDensityLaplaceTransform(t *testing.T) {
	const tol = 1e-6 // numerical quadrature of a smooth integrand
	cases := []struct {
		name string
		r    Rotor
		rho  func(e float64) float64
	}{
		{"1D free rotor", Rotor{Dim: 1, Consts: []float64{5.3}, Symmetry: 3},
			func(e float64) float64 { return 1 / (3 * math.Sqrt(5.3*e)) }},
		{"2D linear", Rotor{Dim: 2, Consts: []float64{1.478}, Symmetry: 1},
			func(e float64) float64 { return 1 / 1.478 }},
		{"3D top", Rotor{Dim: 3, Consts: []float64{5.25, 0.3357, 0.3357}, Symmetry: 1},
			func(e float64) float64 { return 2 * math.Sqrt(e/(5.25*0.3357*0.3357)) }},
	}
	for _, tc := range cases {
		for _, tK := range []float64{200, 1000, 3000} {
			s := &Species{Name: tc.name, Rotors: []Rotor{tc.r}}
			kt := kT(tK)
			// E = x² removes the 1D rotor's E^(−½) singularity.
			f := func(x float64) float64 { return 2 * x * tc.rho(x*x) * math.Exp(-x*x/kt) }
			got := quad.Fixed(f, 0, math.Inf(1), 2000, nil, 0)
			if want := s.RotationalQ(tK); !scalar.EqualWithinRel(got, want, tol) {
				t.Errorf("%s at %v K: ∫ρe^(−E/kT) = %.10g, Q = %.10g", tc.name, tK, got, want)
			}
		}
	}
}

// With vibrations present, Sum convolves the comb with the rotors' analytic
// sum of states; the block expansion must equal the direct convolution
// Σ_j c_j·W_rot(E − jδ) (an independent O(N) algorithm).
func TestRotorConvolutionMatchesDirect(t *testing.T) {
	const tol = 1e-9 // the binomial series is truncated below 1e-10 relative
	rotors := [][]Rotor{
		{{Dim: 1, Consts: []float64{2.1}, Symmetry: 2}},
		{{Dim: 2, Consts: []float64{0.4}, Symmetry: 1}},
		{{Dim: 3, Consts: []float64{1.2, 0.3, 0.25}, Symmetry: 1}},
		{{Dim: 3, Consts: []float64{1.2, 0.3, 0.25}, Symmetry: 1}, {Dim: 1, Consts: []float64{6.0}, Symmetry: 3}},
	}
	worst := 0.0
	defer func() { t.Logf("worst relative deviation %.2g", worst) }()
	for _, rs := range rotors {
		s := &Species{Name: "x", Vibrations: []float64{3000, 1500.5, 890, 420, 133.3}, Rotors: rs}
		c, err := NewCounter(s, 1, 60000)
		if err != nil {
			t.Fatal(err)
		}
		b, d := s.rotorFactor()
		p := float64(d) / 2
		for _, e := range []float64{50, 133.3, 1000.25, 20000, 59999} {
			want := 0.0
			for j, n := range c.Comb() {
				if x := e - float64(j); x > 0 {
					want += n * b * math.Pow(x, p) / math.Gamma(p+1)
				}
			}
			worst = math.Max(worst, math.Abs(c.Sum(e)/want-1))
			if got := c.Sum(e); !scalar.EqualWithinRel(got, want, tol) {
				t.Errorf("D=%d, W(%v) = %.12g, direct %.12g", d, e, got, want)
			}
			wantI := 0.0
			for j, n := range c.Comb() {
				if x := e - float64(j); x > 0 {
					wantI += n * b * math.Pow(x, p+1) / math.Gamma(p+2)
				}
			}
			if got := c.IntegratedSum(e); !scalar.EqualWithinRel(got, wantI, tol) {
				t.Errorf("D=%d, ∫W(%v) = %.12g, direct %.12g", d, e, got, wantI)
			}
		}
	}
}

// Grain counts of a rotor-and-oscillator species, summed with Boltzmann
// weights at the grain centres, reproduce the analytic Q_vib·Q_rot to the
// grain error. A density made of steps (a 2D rotor on a comb) has, from the
// ground state at the centre of grain 0, an error of (Δ/kT)²/8 (the half grain
// [0, Δ/2] weighted by 1 instead of e^(−E/kT)); the other steps, spread evenly
// over grain positions, add less. Here Δ = 10 cm⁻¹, T ≥ 200 K: < 6.5e-4.
func TestGrainCountsLaplaceTransform(t *testing.T) {
	s := &Species{Name: "x", Vibrations: []float64{2097, 713, 713, 3311},
		Rotors: []Rotor{{Dim: 2, Consts: []float64{1.478}, Symmetry: 1}}}
	c, err := NewCounter(s, 1, 90000)
	if err != nil {
		t.Fatal(err)
	}
	g := GrainsTo(10, 89000)
	n := c.Counts(g, 0)
	for _, tK := range []float64{200, 500, 2000} {
		tol := math.Pow(10/kT(tK), 2) / 8
		got, want := CountedQ(n, g, tK), s.InternalQ(tK)
		if !scalar.EqualWithinRel(got, want, tol) {
			t.Errorf("%v K: Σ N e^(−E/kT) = %.8g, Q = %.8g (rel %.2g > %.2g)", tK, got, want, got/want-1, tol)
		}
	}
}
