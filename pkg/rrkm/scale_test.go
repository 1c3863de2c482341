package rrkm

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// lnChoose returns ln C(n, k) from the log-gamma function.
func lnChoose(n, k float64) float64 {
	a, _ := math.Lgamma(n + 1)
	b, _ := math.Lgamma(k + 1)
	c, _ := math.Lgamma(n - k + 1)
	return a - b - c
}

// Counts beyond float64 are kept in units of 2^Scale (Counter.Scale) and
// must still be exact. For s identical oscillators of frequency ν the counts
// are combinatorics (stars and bars, e.g. Feller, An Introduction to
// Probability Theory, vol. 1, §II.5): C(n+s−1, s−1) states at nν and
// W = C(n−1+s, s) states below (n−½)ν. With 300 oscillators and 2000 quanta
// these reach 1e390, beyond float64. The count adds integers (exact to
// 2^53) and rounds once per addition beyond; after 300 oscillators the
// relative error is below 300·2^−52 ≈ 7e-14, so ln W is held to 1e-12.
func TestScaledCountMatchesCombinatorics(t *testing.T) {
	const (
		tol   = 1e-12
		nu    = 1000.0 // cm⁻¹
		fine  = 10.0   // cm⁻¹: 100 bins a quantum
		modes = 300
		quant = 2000
	)
	s := &Species{Name: "identical oscillators", Vibrations: make([]float64, modes)}
	for i := range s.Vibrations {
		s.Vibrations[i] = nu
	}
	c, err := NewCounter(s, fine, quant*nu+fine)
	if err != nil {
		t.Fatal(err)
	}
	if c.Scale() == 0 {
		t.Fatal("Scale() = 0: the counts of this species exceed float64 and must be scaled")
	}
	worst := 0.0
	for _, n := range []float64{0, 1, 10, 300, 1000, 1500, 2000} {
		e := n * nu
		want := lnChoose(n+modes-1, modes-1)
		got := c.LogStates(e-fine/2, e+fine/2)
		if !scalar.EqualWithinAbs(got, want, tol*math.Max(1, want)) {
			t.Errorf("ln(states at %v quanta) = %.15g, C(n+s−1, s−1) gives %.15g", n, got, want)
		}
		worst = math.Max(worst, math.Abs(got-want)/math.Max(1, want))
		if n > 0 {
			want := lnChoose(n-1+modes, modes)
			if got := c.LogSum(e - nu/2); !scalar.EqualWithinAbs(got, want, tol*want) {
				t.Errorf("ln W below %v quanta = %.15g, C(n−1+s, s) gives %.15g", n, got, want)
			}
		}
	}
	t.Logf("scale 2^%d; worst relative error of ln(count) %.2g", c.Scale(), worst)
	// The plain accessors give the true numbers: +Inf beyond float64, and
	// exact where the number fits.
	if got := c.Sum(2000 * nu); !math.IsInf(got, 1) {
		t.Errorf("Sum beyond float64 = %v, want +Inf", got)
	}
	if got, want := c.Sum(10.5*nu), math.Exp(lnChoose(10+modes, modes)); !scalar.EqualWithinRel(got, want, 1e-10) {
		t.Errorf("Sum(10.5ν) = %.15g, want C(310, 300) = %.15g", got, want)
	}
}

// A count beyond what the scale can hold fails with ErrRange rather than
// giving Inf or NaN: 2000 oscillators with 1000 quanta have C(2999, 1999) ≈
// 1e828 states at the top, beyond the ≈1e470 the counter represents.
func TestCountBeyondRange(t *testing.T) {
	s := &Species{Name: "huge", Vibrations: make([]float64, 2000)}
	for i := range s.Vibrations {
		s.Vibrations[i] = 1000
	}
	_, err := NewCounter(s, 100, 1e6)
	if !errors.Is(err, ErrRange) {
		t.Fatalf("err = %v, want ErrRange", err)
	}
	t.Log(err)
}

// bigPair returns an invented molecule of atoms atoms (3N−6 frequencies
// drawn uniformly from 100–3200 cm⁻¹ with a fixed seed, a non-linear top)
// and a transition state that loses one mode and loosens those below
// 600 cm⁻¹ by 3 %, E0 = 50 kcal/mol. INVENTED data: the identities tested
// hold for any input.
func bigPair(atoms int) (*Species, *Species) {
	rng := rand.New(rand.NewPCG(1, uint64(atoms)))
	vib := make([]float64, 3*atoms-6)
	for i := range vib {
		vib[i] = math.Round(100 + 3100*rng.Float64())
	}
	var tsVib []float64
	for i, v := range vib {
		switch {
		case i == len(vib)/2: // the reaction coordinate
		case v < 600:
			tsVib = append(tsVib, math.Round(0.97*v))
		default:
			tsVib = append(tsVib, v)
		}
	}
	r := &Species{Name: "big", Mass: 7 * float64(atoms), Vibrations: vib,
		Rotors: []Rotor{{Dim: 3, Consts: []float64{0.010, 0.006, 0.005}, Symmetry: 1}}, Symmetry: 1}
	ts := &Species{Name: "big-TS", Mass: r.Mass, E0: 50 * 349.7551, Vibrations: tsVib,
		Rotors: []Rotor{{Dim: 3, Consts: []float64{0.009, 0.0055, 0.0048}, Symmetry: 1}}, Symmetry: 1}
	return r, ts
}

// The TST identity of TestThermalAverageEqualsCanonical for a molecule of
// 150 atoms counted to its thermal energies at 2500 K (about 9e5 cm⁻¹,
// ThermalCeiling), where its numbers of states reach 1e330 and are kept
// scaled: k(E) then comes from counts in units of 2^Scale (the reactant's
// and the transition state's, which need not agree) and must still average to the
// canonical k∞ of the partition functions (Holbrook, Pilling & Robertson
// 1996, eq. 4.26). Same tolerance, 1e-3, on 20 cm⁻¹ grains (grain error
// (Δ/kT)²/8 < 6e-4 at 300 K).
func TestThermalAverageLargeMolecule(t *testing.T) {
	if testing.Short() {
		t.Skip("counts 444 oscillators to 9e5 cm-1")
	}
	const tol = 1e-3
	r, ts := bigPair(150)
	ceiling := r.ThermalCeiling(2500)
	rc, tc := countPair(t, r, ts, ceiling)
	if rc.Scale() == 0 {
		t.Fatal("the reactant's counts are not scaled: this test no longer reaches beyond float64")
	}
	g := GrainsTo(20, ceiling-20)
	m := RRKM(rc, tc, 1, g)
	worst := 0.0
	for _, tK := range []float64{300, 600, 1000, 1500, 2000, 2500} {
		got, want := m.ThermalK(tK), KInf(r, ts, 1, tK)
		worst = math.Max(worst, math.Abs(got/want-1))
		if !scalar.EqualWithinRel(got, want, tol) {
			t.Errorf("%v K: <k(E)> = %.6g, k∞ = %.6g s-1 (ratio %.6f)", tK, got, want, got/want)
		}
	}
	t.Logf("scales 2^%d, 2^%d; worst |<k(E)>/k∞ − 1| = %.2g", rc.Scale(), tc.Scale(), worst)
	// The inverse Laplace transform over the same scaled density returns
	// the k∞ it was made from (TestILTThermalAverageEqualsKInf).
	p := ILT{A: 1e15, T0: 1000, N: 1, EInf: ts.E0}
	mi, err := ILTMicro(rc, p, g)
	if err != nil {
		t.Fatal(err)
	}
	worst = 0
	for _, tK := range []float64{600, 2500} {
		got, want := mi.ThermalK(tK), p.KInf(tK)
		worst = math.Max(worst, math.Abs(got/want-1))
		if !scalar.EqualWithinRel(got, want, tol) {
			t.Errorf("ILT %v K: <k(E)> = %.6g, k∞ = %.6g s-1", tK, got, want)
		}
	}
	t.Logf("ILT: worst |<k(E)>/k∞ − 1| = %.2g", worst)
}

// LogSumEstimate checks a count before it is made. Its vibrational part is
// the Chernoff bound W(e) ≤ Q(β)e^(βe), so it lies above the exact count
// (here the combinatorial one, C(n−1+s, s) below (n−½)ν), by the saddle-point
// width, about ln(√(2π)·σ_E/kT) ≈ ½ln(2πs) ≈ 3.8 for s = 300 oscillators
// (the Darwin–Fowler steepest-descent estimate, from memory); the test
// allows 6.
func TestLogSumEstimate(t *testing.T) {
	const (
		nu    = 1000.0
		modes = 300
		slack = 6.0
	)
	s := &Species{Name: "identical oscillators", Vibrations: make([]float64, modes)}
	for i := range s.Vibrations {
		s.Vibrations[i] = nu
	}
	for _, n := range []float64{10, 300, 2000, 20000} {
		exact := lnChoose(n-1+modes, modes)
		got := s.LogSumEstimate((n - 0.5) * nu)
		if got < exact || got > exact+slack {
			t.Errorf("%v quanta: estimate %.6g, exact ln W %.6g: want within [0, %g] above", n, got, exact, slack)
		}
		t.Logf("%v quanta: estimate − exact = %.3g", n, got-exact)
	}
}
