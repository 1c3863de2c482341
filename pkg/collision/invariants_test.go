package collision

import (
	"context"
	"math"
	"math/big"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// Invariants of the exponential-down kernel and of k(T,P) on a table of
// cases (facts of the theory): columns of P sum to 1 and P obeys detailed
// balance P(i←j)F_j = P(j←i)F_i, both to 1e-12 (rounding); k is
// non-decreasing in pressure and never above the high-pressure limit.
func TestInvariants(t *testing.T) {
	ch, _ := testChannel(t, 90000)
	cases := []struct {
		name  string
		tK    float64
		alpha float64
	}{
		{"cold, small alpha", 300, 100},
		{"cold, large alpha", 300, 1000},
		{"warm", 800, 300},
		{"hot, small alpha", 1500, 150},
		{"hot, large alpha", 2000, 2000},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := testWell(t, ch, Transfer{Alpha300: tc.alpha}, tc.tK, 0)
			k, w := p.kernel, p.w
			for j := range w.N() {
				col := 0.0
				for i := max(0, j-k.Band); i <= min(w.N()-1, j+k.Band); i++ {
					pij := k.At(i, j)
					if pij < 0 {
						t.Fatalf("P(%d←%d) = %v < 0", i, j, pij)
					}
					col += pij
					flux, back := pij*w.F[j], k.At(j, i)*w.F[i]
					if math.Abs(flux-back) > 1e-12*math.Max(flux, back) {
						t.Fatalf("detailed balance (%d,%d): %v vs %v", i, j, flux, back)
					}
				}
				if math.Abs(col-1) > 1e-12 {
					t.Fatalf("column %d sums to 1%+.3g", j, col-1)
				}
			}
			kinf := w.KInf()
			prev := 0.0
			for lw := 0.0; lw <= 16; lw += 1 {
				kk, err := p.rate(math.Pow(10, lw))
				if err != nil {
					t.Fatal(err)
				}
				if kk < prev*(1-1e-12) || kk > kinf*(1+1e-12) {
					t.Fatalf("ω = 1e%v: k = %v (previous %v, k∞ %v)", lw, kk, prev, kinf)
				}
				prev = kk
			}
			t.Logf("%d grains, band %d, %d grains rescaled", w.N(), k.Band, k.Rescaled)
		})
	}
}

// bigEigen is an independent extended-precision (256-bit) solution of the
// same symmetric banded system: dense Gaussian elimination without a shift,
// inverse iteration from sqrt(F) until λ settles to 1e-15, and the flux
// identity, all in math/big.
func bigEigen(s *system) float64 {
	s.matrix() // A itself, if only its factors were formed
	const prec = 256
	n := len(s.loss)
	nf := func(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }
	a := make([][]*big.Float, n)
	for p := range n {
		a[p] = make([]*big.Float, n)
		for q := range n {
			a[p][q] = nf(0)
		}
	}
	for p := range n {
		for d := 0; d <= s.a.B && d <= p; d++ {
			v := *s.a.At(p, d)
			a[p][p-d].Set(nf(v))
			a[p-d][p].Set(nf(v))
		}
	}
	// LU without pivoting, within the band.
	b := s.a.B
	tmp := nf(0)
	for k := range n {
		for i := k + 1; i <= min(n-1, k+b); i++ {
			f := new(big.Float).SetPrec(prec).Quo(a[i][k], a[k][k])
			a[i][k] = f
			for j := k + 1; j <= min(n-1, k+b); j++ {
				a[i][j].Sub(a[i][j], tmp.Mul(f, a[k][j]))
			}
		}
	}
	x := make([]*big.Float, n)
	for p := range n {
		x[p] = nf(s.sqf[n-1-p])
	}
	lambda := math.Inf(1)
	for range 500 {
		prev := lambda
		for i := range n {
			for k := max(0, i-b); k < i; k++ {
				x[i].Sub(x[i], tmp.Mul(a[i][k], x[k]))
			}
		}
		for i := n - 1; i >= 0; i-- {
			for j := i + 1; j <= min(n-1, i+b); j++ {
				x[i].Sub(x[i], tmp.Mul(a[i][j], x[j]))
			}
			x[i].Quo(x[i], a[i][i])
		}
		num, den := nf(0), nf(0)
		scale := new(big.Float).Abs(x[0])
		for p := range n {
			if v := new(big.Float).Abs(x[p]); v.Cmp(scale) > 0 {
				scale = v
			}
		}
		for p := range n {
			x[p].Quo(x[p], scale)
			i := n - 1 - p
			pop := new(big.Float).SetPrec(prec).Mul(x[p], nf(s.sqf[i]))
			num.Add(num, new(big.Float).SetPrec(prec).Mul(pop, nf(s.loss[i])))
			den.Add(den, pop)
		}
		lambda, _ = new(big.Float).Quo(num, den).Float64()
		if math.Abs(lambda-prev) <= 1e-15*lambda {
			break
		}
	}
	return lambda
}

// Where k_uni/ω is far below machine epsilon (300 K, E0 = 38 kcal/mol), the
// float64 banded solver still agrees with an extended-precision solution of
// the same matrix to 1e-9 (the dense float64 eigenvalue is noise there).
func TestBandedBelowEpsilon(t *testing.T) {
	if testing.Short() {
		t.Skip("extended precision is slow")
	}
	ch, _ := testChannel(t, 40000)
	p := testWell(t, ch, Transfer{Alpha300: 400}, 300, 100)
	for _, omega := range []float64{1e4, 1e8} {
		s := build(p.w, p.kernel, omega)
		got, err := s.eigen()
		if err != nil {
			t.Fatal(err)
		}
		if got.K/omega > 1e-15 {
			t.Fatalf("k/ω = %g: not the regime under test", got.K/omega)
		}
		want := bigEigen(s)
		if !scalar.EqualWithinRel(got.K, want, 1e-9) {
			t.Errorf("ω = %g: float64 %.12g, 256-bit %.12g (k/ω = %.2g)", omega, got.K, want, got.K/omega)
		}
		t.Logf("ω = %g: k/ω = %.2g, float64/extended − 1 = %.2g", omega, got.K/omega, got.K/want-1)
	}
}

// rotorChannel is testChannel with methyl isocyanide's external rotation
// (A = 5.25, B = C = 0.3357 cm⁻¹, from memory) and a rotor for the TS: a
// molecule with a smooth density, as real ones have.
func rotorChannel(t testing.TB, ceiling float64) Channel {
	r := &rrkm.Species{Name: "CH3NC", Vibrations: []float64{3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{5.25, 0.3357, 0.3357}, Symmetry: 1}}}
	ts := &rrkm.Species{Name: "TS", E0: 13300, Vibrations: []float64{3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.9, 0.42, 0.38}, Symmetry: 1}}}
	return channelOf(t, r, ts, ceiling)
}

// Halving the automatic grain changes k by < 0.5 % (issue requirement), for
// a molecule with external rotation (a smooth density of states).
func TestGrainConvergence(t *testing.T) {
	ch := rotorChannel(t, 120000)
	col := Collider{LJ: LennardJones{4.5, 300}, Mu: 20}
	tr := Transfer{Alpha300: 250, Exponent: 0.85}
	temps := []float64{300, 1000, 2000}
	pressures := []float64{100, 1e5, 1e7}
	res, err := Run(ch, col, tr, temps, pressures, Options{SkipConvergence: true})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for i, tK := range temps {
		half, err := solveTemperature(context.Background(), ch, col, tr, tK, pressures, res.Rows[i].Grain/2, res.Rows[i].Ceiling, false)
		if err != nil {
			t.Fatal(err)
		}
		for j := range pressures {
			d := math.Abs(half.K[j]/res.Rows[i].K[j] - 1)
			worst = math.Max(worst, d)
			if d > 0.005 {
				t.Errorf("%v K, %v Pa: halving the grain changes k by %.3g", tK, pressures[j], d)
			}
		}
	}
	t.Logf("largest change on halving the grain: %.2g", worst)
}

// Results do not depend on the number of workers.
func TestJobsIdentical(t *testing.T) {
	ch, _ := testChannel(t, 120000)
	col := Collider{Fixed: 3e-10}
	tr := Transfer{Alpha300: 250, Exponent: 0.85}
	temps := []float64{400, 700, 1000, 1600}
	ps := []float64{1e3, 1e5}
	a, err := Run(ch, col, tr, temps, ps, Options{Jobs: 1, SkipConvergence: true})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Run(ch, col, tr, temps, ps, Options{Jobs: 3, SkipConvergence: true})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a.Rows, b.Rows) {
		t.Error("results differ between 1 and 3 workers")
	}
}
