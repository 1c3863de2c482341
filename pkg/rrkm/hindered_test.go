package rrkm

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mat"
)

// methyl is a typical methyl rotor: B = 5.3 cm⁻¹, a threefold barrier of
// 1000 cm⁻¹ (illustrative values of the size of ethane's, from memory).
var methyl = HinderedRotor{B: 5.3, V0: 1000, Fold: 3}

// expand turns levels into a sorted list of energies, each repeated
// σ·g times (σ·g is a whole number of states), so that two level lists can
// be compared whatever the merging of degenerate levels.
func expand(t *testing.T, levels []Level, sigma int) []float64 {
	t.Helper()
	var out []float64
	for _, l := range levels {
		k := l.Degeneracy * float64(sigma)
		if math.Abs(k-math.Round(k)) > 1e-12 {
			t.Fatalf("level %v cm-1: σ·g = %v is not a whole number", l.Energy, k)
		}
		for range int(math.Round(k)) {
			out = append(out, l.Energy)
		}
	}
	return out
}

// With V0 = 0 the Hamiltonian is diagonal in e^(imφ): the levels are B·m²
// (exact), m = 0 once and ±m twice, each state with weight 1/σ.
func TestHinderedFreeRotorLevels(t *testing.T) {
	const tol = 1e-9 // the eigenvalues of a diagonal matrix, to rounding
	cases := []HinderedRotor{
		{B: 2.5, Fold: 1},
		{B: 2.5, Fold: 2},
		{B: 2.5, Fold: 3},
		{B: 2.5, Fold: 3, Symmetry: 1},
		{B: 0.7, Fold: 6, Symmetry: 3},
	}
	for _, h := range cases {
		t.Run(fmt.Sprintf("n=%d σ=%d", h.Fold, h.sigma()), func(t *testing.T) {
			const emax = 2000
			got, err := h.Levels(emax)
			if err != nil {
				t.Fatal(err)
			}
			var want []Level
			for m := 0; h.B*float64(m*m) <= emax; m++ {
				g := 2.0
				if m == 0 {
					g = 1
				}
				want = append(want, Level{h.B * float64(m*m), g / float64(h.sigma())})
			}
			if len(got) != len(want) {
				t.Fatalf("%d levels, want %d", len(got), len(want))
			}
			for i := range want {
				if math.Abs(got[i].Energy-want[i].Energy) > tol || math.Abs(got[i].Degeneracy-want[i].Degeneracy) > 1e-12 {
					t.Errorf("level %d: %+v, want %+v", i, got[i], want[i])
				}
			}
		})
	}
}

// The free rotor's Q = (1/σ)·Σ_m exp(−a·m²), a = B/kT, over all integers m.
// Its Euler–Maclaurin expansion about the classical integral has no
// correction terms (all derivatives vanish at ±∞), so the remainder is
// exponentially small; Poisson summation gives it exactly (Jacobi's
// imaginary transformation of θ3):
//
//	Σ_m exp(−a·m²) = sqrt(π/a)·(1 + 2·Σ_{k≥1} exp(−π²k²/a)).
//
// The test checks Q against the right-hand side through k = 4 (the next
// term is below 1e-100 for a ≤ 3) to 1e-13 relative (summation rounding
// over ≤ 400 levels), from a = 3 (kT < B, far from classical) to a = 0.01,
// where Q equals the classical (1/σ)·sqrt(πkT/B) to 1e-13.
func TestHinderedFreeRotorQ(t *testing.T) {
	const tol = 1e-13
	worst := 0.0
	defer func() { t.Logf("worst |Q/Poisson − 1| = %.2g", worst) }()
	for _, h := range []HinderedRotor{{B: 5.3, Fold: 3}, {B: 0.9, Fold: 1}, {B: 2, Fold: 2, Symmetry: 1}} {
		for _, a := range []float64{3, 1, 0.3, 0.05, 0.01} {
			kt := h.B / a
			tK := kt / kT(1)
			want := 1.0
			for k := 1.0; k <= 4; k++ {
				want += 2 * math.Exp(-math.Pi*math.Pi*k*k/a)
			}
			want *= math.Sqrt(math.Pi/a) / float64(h.sigma())
			worst = math.Max(worst, math.Abs(h.Q(tK)/want-1))
			if got := h.Q(tK); !scalar.EqualWithinRel(got, want, tol) {
				t.Errorf("B=%v n=%d σ=%d, B/kT=%v: Q = %.15g, Poisson sum %.15g (rel %.2g)", h.B, h.Fold, h.sigma(), a, got, want, got/want-1)
			}
			if a <= 0.01 {
				if cl := math.Sqrt(math.Pi*kt/h.B) / float64(h.sigma()); !scalar.EqualWithinRel(h.Q(tK), cl, tol) {
					t.Errorf("B/kT=%v: Q = %.15g, classical %.15g", a, h.Q(tK), cl)
				}
			}
		}
	}
}

// A barrier much higher than the levels looked at leaves n equivalent
// harmonic wells of frequency ν = n·sqrt(V0·B): each well level is n-fold
// (tunnelling splittings ~ exp(−4·sqrt(V0/(Bn²))) ≈ e^−190 here, merged),
// weight n/σ. The potential is Mathieu's: with z = nφ/2, a = 4(E − V0/2)/(Bn²)
// and q = V0/(Bn²), whose characteristic values for large q are (Abramowitz &
// Stegun 20.2.30, from memory)
//
//	a ≈ −2q + 2s·√q − (s²+1)/8 − (s³+3s)/(2⁷·√q),   s = 2v + 1,
//
// that is E_v ≈ ν(v+½) − (Bn²/32)(s²+1) − (Bn²/512)(s³+3s)/√q. The second
// term is also first-order perturbation theory for the quartic term
// −V0·n⁴φ⁴/48 of the cosine with ⟨v|φ⁴|v⟩ = (B/ν)²(6v²+6v+3) (harmonic
// oscillator matrix element), which checks the recalled formula; the lowest
// spacing is then ν − n²B/4. The next term of the series is O(1/√q) = 0.02
// relative to the last one kept, so the test allows 0.1 of the last term in
// E_v − E_0.
func TestHinderedHighBarrierLimit(t *testing.T) {
	for _, h := range []HinderedRotor{{B: 1, V0: 20000, Fold: 3}, {B: 1, V0: 20000, Fold: 3, Symmetry: 1}, {B: 0.5, V0: 8000, Fold: 2}} {
		t.Run(fmt.Sprintf("n=%d σ=%d", h.Fold, h.sigma()), func(t *testing.T) {
			n := float64(h.Fold)
			nu := h.HarmonicFrequency()
			if want := n * math.Sqrt(h.V0*h.B); !scalar.EqualWithinRel(nu, want, 1e-14) {
				t.Fatalf("ν = %v, want n·sqrt(V0·B) = %v", nu, want)
			}
			sq := math.Sqrt(h.V0 / (h.B * n * n))
			e := func(v int) (two, three float64) {
				s := float64(2*v + 1)
				two = nu*(float64(v)+0.5) - h.B*n*n/32*(s*s+1)
				return two, two - h.B*n*n/512*(s*s*s+3*s)/sq
			}
			levels, err := h.Levels(4.5 * nu)
			if err != nil {
				t.Fatal(err)
			}
			two0, three0 := e(0)
			worst := 0.0
			for v := 1; v <= 4; v++ {
				got := levels[v]
				two, three := e(v)
				want := three - three0
				last := math.Abs((three - three0) - (two - two0))
				if d := math.Abs(got.Energy - want); d > 0.1*last {
					t.Errorf("v=%d: E = %.6f cm-1, Mathieu asymptotic %.6f (|Δ| %.3g > %.3g)", v, got.Energy, want, d, 0.1*last)
				} else {
					worst = math.Max(worst, d/last)
				}
				if want := n / float64(h.sigma()); math.Abs(got.Degeneracy-want) > 1e-12 {
					t.Errorf("v=%d: degeneracy %v, want n/σ = %v", v, got.Degeneracy, want)
				}
			}
			// The lowest spacing against the two-term ν − n²B/4, which lacks
			// the third term: allowed 1.1 times that term.
			two1, three1 := e(1)
			if s, last := levels[1].Energy, math.Abs((three1-three0)-(two1-two0)); math.Abs(s-(nu-n*n*h.B/4)) > 1.1*last {
				t.Errorf("lowest spacing %.6f, ν − n²B/4 = %.6f (|Δ| > %.3g)", s, nu-n*n*h.B/4, 1.1*last)
			}
			t.Logf("ν = %.4g cm-1: worst |E − Mathieu| = %.3g of the last term kept", nu, worst)
		})
	}
}

// Pitzer–Gwinn against the exact quantum Q from the levels. Its accuracy is
// usually quoted as a few per cent (from memory, not checked against a
// source); there is no error bound, so each tolerance below is the measured
// worst deviation with a margin, and the test guards the figures quoted in
// docs/validation.md. V0/kT runs from 0.1 to 50, T from 100 to 3000 K. The
// error is largest at low T for low barriers (V0 ≲ n²B), where the harmonic
// zero-point energy hν/2 = n·sqrt(V0·B)/2, which sets the zero of Q_PG,
// overstates the true one (≈ V0/2 for V0 → 0).
func TestPitzerGwinn(t *testing.T) {
	cases := []struct {
		name     string
		h        HinderedRotor
		hindered float64 // tolerance for V0/kT ≥ 2
		all      float64 // tolerance for V0/kT ≥ 0.1
	}{
		{"methyl B=5.3 n=3", HinderedRotor{B: 5.3, Fold: 3}, 0.025, 0.10},
		{"B=1 n=2", HinderedRotor{B: 1, Fold: 2}, 0.005, 0.01},
		{"heavy B=0.5 n=1", HinderedRotor{B: 0.5, Fold: 1}, 0.002, 0.002},
		// A light rotor (OH-like) at low T: PG fails; documented.
		{"light B=20 n=3", HinderedRotor{B: 20, Fold: 3}, 0.25, 0.40},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			worstH, worstAll := 0.0, 0.0
			for _, tK := range []float64{100, 200, 300, 500, 1000, 2000, 3000} {
				for _, r := range []float64{0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50} {
					h := tc.h
					h.V0 = r * kT(tK)
					q, pg := h.Q(tK), PitzerGwinn(h, tK)
					d := math.Abs(pg/q - 1)
					tol := tc.all
					if r >= 2 {
						tol = tc.hindered
						worstH = math.Max(worstH, d)
					}
					worstAll = math.Max(worstAll, d)
					if d > tol {
						t.Errorf("%v K, V0/kT = %v: Q_PG = %.6g, Q = %.6g (rel %.3g > %g)", tK, r, pg, q, pg/q-1, tol)
					}
				}
			}
			t.Logf("worst |Q_PG/Q − 1|: %.3g %% for V0/kT ≥ 2, %.3g %% for V0/kT ≥ 0.1", 100*worstH, 100*worstAll)
		})
	}
	// Exact limits: V0 = 0 gives the classical free rotor, which equals the
	// quantum Q at kT ≫ B (see TestHinderedFreeRotorQ), so Q_PG = Q there.
	free := HinderedRotor{B: 5.3, Fold: 3}
	if got, want := PitzerGwinn(free, 1000), math.Sqrt(math.Pi*kT(1000)/5.3)/3; !scalar.EqualWithinRel(got, want, 1e-14) {
		t.Errorf("V0 = 0: Q_PG = %v, want (1/σ)sqrt(πkT/B) = %v", got, want)
	}
}

// e^(−x)·I0(x) from the series and asymptotic expansion against Gauss–
// Legendre quadrature of the integral representation
// I0(x) = (1/π)∫₀^π exp(x·cos θ) dθ (Abramowitz & Stegun 9.6.19), an
// independent algorithm; 1e-13 relative is quadrature and summation
// rounding. I0(1) = 1.2660658777520084 (A&S Table 9.8, from memory) to
// 1e-15.
func TestScaledI0(t *testing.T) {
	worst := 0.0
	defer func() { t.Logf("worst relative difference from quadrature %.2g", worst) }()
	for _, x := range []float64{0, 0.1, 1, 5, 17, 29.99, 30.01, 45, 100, 1000, 1e4} {
		f := func(th float64) float64 { return math.Exp(x*(math.Cos(th)-1)) / math.Pi }
		want := quad.Fixed(f, 0, math.Pi, 4000, nil, 0)
		worst = math.Max(worst, math.Abs(scaledI0(x)/want-1))
		if got := scaledI0(x); !scalar.EqualWithinRel(got, want, 1e-13) {
			t.Errorf("e^-x I0(%v) = %.16g, quadrature %.16g (rel %.2g)", x, got, want, got/want-1)
		}
	}
	if got := scaledI0(1) * math.E; !scalar.EqualWithinRel(got, 1.2660658777520084, 1e-15) {
		t.Errorf("I0(1) = %.17g", got)
	}
}

// The classical Q of a series potential comes from the trapezoidal rule; a
// zero extra term takes that path and must give the I0 result (independent
// algorithm), to 1e-13 (the rule converges to 1e-14, plus rounding).
func TestClassicalQSeriesPath(t *testing.T) {
	for _, tK := range []float64{50, 300, 3000} {
		h := methyl
		want := h.ClassicalQ(tK)
		h.Cos = []float64{0}
		got := h.ClassicalQ(tK)
		t.Logf("%v K: trapezoid/I0 − 1 = %.2g", tK, got/want-1)
		if !scalar.EqualWithinRel(got, want, 1e-13) {
			t.Errorf("%v K: trapezoid %.15g, I0 %.15g", tK, got, want)
		}
	}
}

// Doubling the automatically chosen basis limit M moves no level below the
// requested ceiling by more than 1e-8 cm⁻¹ (the brief's criterion; the
// truncation error is designed to be below rounding, ~1e-11 here).
func TestHinderedLevelsConverge(t *testing.T) {
	const tol = 1e-8
	cases := []struct {
		name string
		h    HinderedRotor
		emax float64
	}{
		{"methyl to 50000", methyl, 50000},
		{"methyl to 300", methyl, 300},
		{"high barrier", HinderedRotor{B: 1, V0: 20000, Fold: 3}, 30000},
		{"heavy n=2 σ=1", HinderedRotor{B: 0.4, V0: 700, Fold: 2, Symmetry: 1}, 20000},
		{"series n=1", HinderedRotor{B: 0.8, V0: 1200, Fold: 1, Cos: []float64{300, -50}}, 20000},
		{"free", HinderedRotor{B: 3, Fold: 3}, 10000},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			auto, m, err := tc.h.levels(tc.emax)
			if err != nil {
				t.Fatal(err)
			}
			doubled, err := tc.h.levelsInBasis(tc.emax, 2*m)
			if err != nil {
				t.Fatal(err)
			}
			a, d := expand(t, auto, tc.h.sigma()), expand(t, doubled, tc.h.sigma())
			if len(a) != len(d) {
				t.Fatalf("M = %d: %d states below %v cm-1, 2M: %d", m, len(a), tc.emax, len(d))
			}
			worst := 0.0
			for i := range a {
				worst = math.Max(worst, math.Abs(a[i]-d[i]))
			}
			if worst > tol {
				t.Errorf("M = %d → %d: levels move by %.3g cm-1 (> %g)", m, 2*m, worst, tol)
			}
			t.Logf("M = %d, %d states: doubling M moves levels by %.2g cm-1", m, len(a), worst)
		})
	}
}

// The blocked solve (residue classes, mirror pairs, Dsterf for the
// tridiagonal single-cosine blocks) against mat.EigenSym on the whole
// (2M+1)-dimensional Hamiltonian in e^(imφ), assembled here from the matrix
// elements ⟨m'|V|m⟩ of each term (V_h/2)(1 − cos hnφ): V_h/2 on the diagonal,
// −V_h/4 at m' = m ± hn. An independent assembly and algorithm; 1e-8 cm⁻¹
// allows rounding of the dense solve (ε·‖H‖ ≈ 1e-11) and the merging by
// Levels of levels closer than 1e-9 cm⁻¹ (a tunnelling pair of the n = 4
// rotor is split by 1.09e-9 cm⁻¹, the largest difference measured).
func TestHinderedBlocksMatchDense(t *testing.T) {
	cases := []HinderedRotor{
		methyl,
		{B: 1.3, V0: 400, Fold: 2, Symmetry: 1},
		{B: 0.8, V0: 1200, Fold: 1, Cos: []float64{300, -50}},
		{B: 4, V0: 600, Fold: 3, Cos: []float64{-40}},
		{B: 2, V0: 300, Fold: 4, Symmetry: 2},
	}
	worst := 0.0
	defer func() { t.Logf("worst |blocked − dense| = %.2g cm-1", worst) }()
	for _, h := range cases {
		const emax, mMax = 4000, 70
		blocked, err := h.levelsInBasis(emax, mMax)
		if err != nil {
			t.Fatal(err)
		}
		size := 2*mMax + 1
		a := mat.NewSymDense(size, nil)
		vh := append([]float64{h.V0}, h.Cos...)
		for i := range size {
			m := float64(i - mMax)
			d := h.B * m * m
			for k, v := range vh {
				d += v / 2
				if j := i + (k+1)*h.Fold; j < size {
					a.SetSym(i, j, -v/4)
				}
			}
			a.SetSym(i, i, d)
		}
		var es mat.EigenSym
		if !es.Factorize(a, false) {
			t.Fatal("EigenSym failed")
		}
		ev := es.Values(nil)
		var dense []float64
		for _, e := range ev {
			if e-ev[0] <= emax {
				dense = append(dense, e-ev[0])
			}
		}
		got := expand(t, blocked, h.sigma())
		if len(got) != len(dense) {
			t.Fatalf("%+v: %d states, dense %d", h, len(got), len(dense))
		}
		for i := range dense {
			worst = math.Max(worst, math.Abs(got[i]-dense[i]))
			if math.Abs(got[i]-dense[i]) > 1e-8 {
				t.Errorf("%+v: state %d at %.10f, dense %.10f", h, i, got[i], dense[i])
			}
		}
	}
}

// The counted states of a species with a hindered rotor are the levels of
// HinderedRotor convolved into the comb, so the comb's Boltzmann sum is
// VibrationalQ·HinderedQ. Integer frequencies are exact on the fine grain;
// a level between fine grains is split keeping its mean energy, which moves
// its Boltzmann factor by at most (δ/kT)²/8 relative (a second-order
// Taylor remainder with f(1−f) ≤ ¼). With δ = 0.01 cm⁻¹ at 300 K and
// 0.025 cm⁻¹ at 1000 K (the frequencies stay multiples of δ) that is
// 2.9e-10 and 1.6e-10, hence 1e-9; the comb runs to 60 kT (tail < e⁻⁶⁰).
func TestCountedQHindered(t *testing.T) {
	const tol = 1e-9
	s := &Species{Name: "x", Vibrations: []float64{3000, 1450, 870, 300},
		Hindered: []HinderedRotor{methyl, {B: 1.1, V0: 350, Fold: 2, Symmetry: 1}}}
	for _, tc := range []struct{ tK, fine float64 }{{300, 0.01}, {1000, 0.025}} {
		tK, fine := tc.tK, tc.fine
		c, err := NewCounter(s, fine, 60*kT(tK))
		if err != nil {
			t.Fatal(err)
		}
		q := 0.0
		for j, n := range c.Comb() {
			q += n * math.Exp(-float64(j)*fine/kT(tK))
		}
		want := s.VibrationalQ(tK) * s.HinderedQ(tK)
		if !scalar.EqualWithinRel(q, want, tol) {
			t.Errorf("%v K: counted Q = %.12g, Vib×Hindered %.12g (rel %.2g)", tK, q, want, q/want-1)
		}
		if iq := s.InternalQ(tK); !scalar.EqualWithinRel(iq, want, 1e-15) {
			t.Errorf("%v K: InternalQ = %v, want %v", tK, iq, want)
		}
		t.Logf("%v K: counted/analytic − 1 = %.2g", tK, q/want-1)
	}
}

func TestHinderedRejects(t *testing.T) {
	cases := []struct {
		name string
		h    HinderedRotor
		want string
	}{
		{"zero B", HinderedRotor{B: 0, V0: 100, Fold: 3}, "rotational constant"},
		{"negative B", HinderedRotor{B: -1, V0: 100, Fold: 3}, "rotational constant"},
		{"NaN B", HinderedRotor{B: math.NaN(), V0: 100, Fold: 3}, "rotational constant"},
		{"negative V0", HinderedRotor{B: 5, V0: -1, Fold: 3}, "barrier"},
		{"infinite V0", HinderedRotor{B: 5, V0: math.Inf(1), Fold: 3}, "barrier"},
		{"fold 0", HinderedRotor{B: 5, V0: 100, Fold: 0}, "fold"},
		{"negative symmetry", HinderedRotor{B: 5, V0: 100, Fold: 3, Symmetry: -3}, "symmetry"},
		{"symmetry not dividing fold", HinderedRotor{B: 5, V0: 100, Fold: 3, Symmetry: 2}, "does not divide"},
		{"NaN cos", HinderedRotor{B: 5, V0: 100, Fold: 3, Cos: []float64{math.NaN()}}, "cos[0]"},
		{"minimum not at 0", HinderedRotor{B: 5, V0: 100, Fold: 3, Cos: []float64{-200}}, "minimum"},
		{"dip beside the barrier", HinderedRotor{B: 5, V0: 100, Fold: 1, Cos: []float64{0, -60}}, "minimum"},
	}
	for _, tc := range cases {
		err := tc.h.Validate()
		if err == nil || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %v, want one line containing %q", tc.name, err, tc.want)
		}
		if _, err := tc.h.Levels(1000); err == nil {
			t.Errorf("%s: Levels accepted", tc.name)
		}
		s := &Species{Name: "s", Hindered: []HinderedRotor{methyl, tc.h}}
		if err := s.Validate(); err == nil || !strings.Contains(err.Error(), `species "s": hindered[1]: hindered rotor:`) {
			t.Errorf("%s: Species.Validate: %v", tc.name, err)
		}
		if _, err := NewCounter(s, 1, 1000); err == nil {
			t.Errorf("%s: NewCounter accepted", tc.name)
		}
	}
	for _, emax := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := methyl.Levels(emax); err == nil {
			t.Errorf("Levels(%v) accepted", emax)
		}
	}
	// A basis that would not fit is refused with ErrTooLarge.
	if _, err := (HinderedRotor{B: 1e-4, V0: 100, Fold: 1}).Levels(1e6); !errors.Is(err, ErrTooLarge) {
		t.Errorf("huge basis: %v, want ErrTooLarge", err)
	}
}

// The level sum of Q stops at qCeilingKT = 50 kT. Over one list of levels
// to 100 kT, the sum to 50 kT and the whole sum agree to 1e-15 relative
// (rounding): a check of the stated truncation, for free-rotor-like,
// hindered and deep-well rotors. Q itself, solved in its own basis, agrees
// with the sum to 1e-11 (levels agree between bases to ~1e-9 cm⁻¹, which
// moves Q by ≤ 1e-9 cm⁻¹/kT).
func TestHinderedQCeiling(t *testing.T) {
	for _, h := range []HinderedRotor{{B: 0.3, Fold: 1}, methyl, {B: 1, V0: 20000, Fold: 3}, {B: 20, V0: 300, Fold: 3}} {
		for _, tK := range []float64{100, 1000, 3000} {
			kt := kT(tK)
			levels, err := h.Levels(100 * kt)
			if err != nil {
				t.Fatal(err)
			}
			all, cut := 0.0, 0.0
			for _, l := range slices.Backward(levels) {
				x := l.Degeneracy * math.Exp(-l.Energy/kt)
				all += x
				if l.Energy <= qCeilingKT*kt {
					cut += x
				}
			}
			if !scalar.EqualWithinRel(cut, all, 1e-15) {
				t.Errorf("%+v at %v K: sum to 50 kT %.17g, to 100 kT %.17g", h, tK, cut, all)
			}
			if got := h.Q(tK); !scalar.EqualWithinRel(got, all, 1e-11) {
				t.Errorf("%+v at %v K: Q = %.17g, level sum %.17g", h, tK, got, all)
			}
		}
	}
}

// Levels come sorted, from 0, with positive degeneracies summing (times σ)
// to whole numbers of states.
func TestHinderedLevelsShape(t *testing.T) {
	l, err := methyl.Levels(5000)
	if err != nil {
		t.Fatal(err)
	}
	if l[0].Energy != 0 {
		t.Errorf("lowest level at %v, want 0", l[0].Energy)
	}
	if !slices.IsSortedFunc(l, func(a, b Level) int { return cmpFloat(a.Energy, b.Energy) }) {
		t.Error("levels not sorted")
	}
	if l[len(l)-1].Energy > 5000 {
		t.Errorf("level %v above the ceiling", l[len(l)-1].Energy)
	}
	expand(t, l, 3)
}

// BenchmarkHinderedLevels solves rotors to a ceiling: the methyl rotor of
// the brief to 50 000 cm⁻¹ (and lower and heavier tiers), and a series
// potential, which takes the dense solver.
func BenchmarkHinderedLevels(b *testing.B) {
	cases := []struct {
		name string
		h    HinderedRotor
		emax float64
	}{
		{"methyl-5000", methyl, 5000},
		{"methyl-50000", methyl, 50000},
		{"heavy-B0.5-n2-50000", HinderedRotor{B: 0.5, V0: 1500, Fold: 2}, 50000},
		{"series-n1-B0.8-50000", HinderedRotor{B: 0.8, V0: 1200, Fold: 1, Cos: []float64{300, -50}}, 50000},
	}
	for _, tc := range cases {
		b.Run(tc.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := tc.h.Levels(tc.emax); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func ExampleHinderedRotor_Q() {
	// A methyl rotor: B = 5.3 cm⁻¹, threefold barrier 1000 cm⁻¹, σ = 3.
	h := HinderedRotor{B: 5.3, V0: 1000, Fold: 3}
	levels, _ := h.Levels(1000)
	fmt.Printf("levels below 1000 cm-1: %d, first excited %.2f cm-1\n", len(levels), levels[2].Energy)
	fmt.Printf("Q(300 K) = %.4f, Pitzer–Gwinn %.4f, free rotor %.4f\n",
		h.Q(300), PitzerGwinn(h, 300), math.Sqrt(math.Pi*kT(300)/h.B)/3)
	// Output:
	// levels below 1000 cm-1: 14, first excited 205.71 cm-1
	// Q(300 K) = 1.6497, Pitzer–Gwinn 1.6549, free rotor 3.7058
}
