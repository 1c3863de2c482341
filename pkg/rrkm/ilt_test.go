package rrkm

import (
	"fmt"
	"math"
	"sync"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/units"
	"gonum.org/v1/gonum/floats/scalar"
)

// iltCases are the high-pressure rate constants of the inverse-Laplace tests:
// n = 0 (the δ kernel, a shifted count), a fractional n, n = 1 (the exact
// prefix-sum path for a pure comb) and n = 1.5, with and without an
// activation energy. The values are illustrative.
var iltCases = []ILT{
	{A: 1e13, T0: 300, N: 0, EInf: 0},
	{A: 1e13, T0: 300, N: 0, EInf: 3000},
	{A: 2e12, T0: 300, N: 0.35, EInf: 0},
	{A: 2e12, T0: 300, N: 0.35, EInf: 1200},
	{A: 5e11, T0: 1000, N: 1, EInf: 500},
	{A: 1e14, T0: 298, N: 1.5, EInf: 0},
	{A: 1e14, T0: 298, N: 1.5, EInf: 8000},
}

func iltName(p ILT) string { return fmt.Sprintf("n=%g,EInf=%g", p.N, p.EInf) }

// iltCeiling covers the Boltzmann tail of the shifted flux at 2500 K: beyond
// E∞ + 45 kT the integrands are below 1e-6 of their weight for these
// molecules.
func iltCeiling(p ILT) float64 { return p.EInf + 45*kT(2500) }

var iltCache = struct {
	sync.Mutex
	m map[string]*Micro
}{m: map[string]*Micro{}}

// iltMicro returns ILTMicro for species r (CH3NC or HCN from tst_test.go)
// and case p on 10 cm⁻¹ grains to iltCeiling, computed once for the tests
// that share it (a fractional n takes about a second).
func iltMicro(t *testing.T, r *Species, p ILT) *Micro {
	t.Helper()
	key := r.Name + "/" + iltName(p)
	iltCache.Lock()
	defer iltCache.Unlock()
	if m, ok := iltCache.m[key]; ok {
		return m
	}
	ceiling := iltCeiling(p)
	c, err := NewCounter(r, 1, ceiling)
	if err != nil {
		t.Fatal(err)
	}
	m, err := ILTMicro(c, p, GrainsTo(10, ceiling))
	if err != nil {
		t.Fatal(err)
	}
	iltCache.m[key] = m
	return m
}

// The defining property of the inverse Laplace transform (Forst, Theory of
// Unimolecular Reactions, 1973; Davies, Green & Pilling, Chem. Phys. Lett.
// 126, 373, 1986): the Boltzmann average of k(E) over the reactant's own
// density, (1/Q)∫k(E)ρ(E)e^(−E/kT)dE, returns the k∞(T) it was made from.
// The brief asks for 0.5 %; on 10 cm⁻¹ grains the numerator and the
// partition function carry grain errors of at most (Δ/kT)²/8 = 2.9e-4 at
// 300 K (TestGrainCountsLaplaceTransform), so the test holds it to 1e-3.
// CH3NC has a 3D rotor (density ∝ comb ⊗ E^½), HCN a 2D one (a step
// density): both densities are non-zero on every grain above 0.
func TestILTThermalAverageEqualsKInf(t *testing.T) {
	const tol = 1e-3
	temps := []float64{300, 600, 1000, 1500, 2500}
	for _, pair := range []func() (*Species, *Species){ch3ncPair, hcnPair} {
		r, _ := pair()
		for _, p := range iltCases {
			t.Run(r.Name+"/"+iltName(p), func(t *testing.T) {
				m := iltMicro(t, r, p)
				worst := 0.0
				for _, tK := range temps {
					got, want := m.ThermalK(tK), p.KInf(tK)
					worst = math.Max(worst, math.Abs(got/want-1))
					if !scalar.EqualWithinRel(got, want, tol) {
						t.Errorf("%v K: <k(E)> = %.6g, k∞ = %.6g s-1 (ratio %.6f)", tK, got, want, got/want)
					}
				}
				t.Logf("worst |<k(E)>/k∞ − 1| = %.2g", worst)
			})
		}
	}
}

// Shape of k(E) for real molecules. Exact facts: k = 0 on every grain that
// lies wholly below E∞ (no flux below the threshold); k is finite and
// non-negative; and the numerator k·ρ/c (SumTS, the sum of states an
// equivalent transition state would need) is non-decreasing, because it is
// the non-decreasing ρ (D ≥ 2) convolved with a non-negative kernel on
// x ≥ 0 — a sum of states never falls. k(E) itself is not monotone here:
// each vibrational level that opens makes ρ rise faster than the smoothed
// numerator (see TestILTPowerLawReactant for where monotonicity is exact).
// Tolerance on the monotone numerator: SumTS_i is a difference F(hi) − F(lo)
// of power sums, each within maxSeriesError = 1e-9 relative; for exponents
// p ≥ 1 (here D ≥ 2) F(hi) − F(lo) ≥ F(hi)·Δ/(hi − E∞), so each value is
// within 2e-9·(hi − E∞)/Δ, and two neighbours within twice that.
func TestILTShape(t *testing.T) {
	for _, pair := range []func() (*Species, *Species){ch3ncPair, hcnPair} {
		r, _ := pair()
		for _, p := range iltCases {
			t.Run(r.Name+"/"+iltName(p), func(t *testing.T) {
				m := iltMicro(t, r, p)
				g := m.Grains
				dip, at := 0.0, 0.0
				for i, k := range m.K {
					if !(k >= 0) || math.IsInf(k, 0) {
						t.Fatalf("k(%v cm-1) = %v", g.Energy(i), k)
					}
					if hi := g.Energy(i) + g.Width/2; hi < p.EInf && (k != 0 || m.SumTS[i] != 0) {
						t.Errorf("grain %v cm-1 below E∞ = %v: k = %v, SumTS = %v", g.Energy(i), p.EInf, k, m.SumTS[i])
					}
					tol := 4 * maxSeriesError * math.Max(1, (g.Energy(i)+g.Width/2-p.EInf)/g.Width)
					if i > 0 && m.SumTS[i] < m.SumTS[i-1]*(1-tol) {
						t.Errorf("SumTS falls at %v cm-1: %v < %v", g.Energy(i), m.SumTS[i], m.SumTS[i-1])
					}
					if i > 0 && m.K[i-1] > 0 && 1-k/m.K[i-1] > dip {
						dip, at = 1-k/m.K[i-1], g.Energy(i)
					}
				}
				t.Logf("largest grain-to-grain dip of k(E): %.3g at %v cm-1", dip, at)
			})
		}
	}
}

// A reactant made only of classical rotors has the power-law density
// ρ = B·E^(s−1)/Γ(s), s = D/2, and the inverse Laplace transform is then
// closed-form (Euler's Beta integral): the grain integrals are
// B·[hi^s − lo^s]/Γ(s+1) for ρ and A′·B·[(hi−E∞)^(s+n) − (lo−E∞)^(s+n)]/Γ(s+n+1)
// for k·ρ, written here independently of Counter. Tolerance: each power sum
// is within maxSeriesError = 1e-9 relative, and a grain value is a difference
// of two of them, so its relative error is at most 1e-9·(S_hi + S_lo)/(S_hi −
// S_lo), summed over numerator and count (the ratio grows like E/(pΔ); the
// error jumps where a block of the comb passes from exact to series
// summation). A power law with s ≥ 1 is log-concave, so every ratio
// ρ(E−a)/ρ(E) (a ≥ 0) rises with E and k(E), a positive mixture of such
// ratios, is non-decreasing above E∞ — checked to the same tolerance.
func TestILTPowerLawReactant(t *testing.T) {
	rotors := map[string][]Rotor{
		"2D":    {{Dim: 2, Consts: []float64{1.478}, Symmetry: 1}},
		"3D":    {{Dim: 3, Consts: []float64{5.25, 0.3357, 0.3357}, Symmetry: 1}},
		"3D+1D": {{Dim: 3, Consts: []float64{5.25, 0.3357, 0.3357}, Symmetry: 1}, {Dim: 1, Consts: []float64{5.3}, Symmetry: 3}},
	}
	for name, rs := range rotors {
		s := &Species{Name: name, Rotors: rs}
		_, d := s.rotorFactor() // B cancels in k = k·ρ/ρ
		sh := float64(d) / 2
		for _, p := range []ILT{{1e13, 300, 0, 0}, {1e13, 300, 0.35, 1234.5}, {1e13, 300, 1.5, 0}, {1e12, 500, 2.7, 777}} {
			t.Run(name+"/"+iltName(p), func(t *testing.T) {
				c, err := NewCounter(s, 1, 30000)
				if err != nil {
					t.Fatal(err)
				}
				g := GrainsTo(10, 30000)
				m, err := ILTMicro(c, p, g)
				if err != nil {
					t.Fatal(err)
				}
				aPrime := p.A / math.Pow(units.KT(p.T0), p.N)
				// diff returns [hi^q − lo^q] (negative parts cut) and the
				// error amplification (hi^q + lo^q)/(hi^q − lo^q).
				diff := func(lo, hi, q float64) (float64, float64) {
					a, b := math.Pow(math.Max(hi, 0), q), math.Pow(math.Max(lo, 0), q)
					if a == b {
						return 0, 0
					}
					return a - b, (a + b) / (a - b)
				}
				worst, worstTol, prev, prevTol := 0.0, 0.0, 0.0, 0.0
				for i := range g.N {
					lo, hi := g.Energy(i)-g.Width/2, g.Energy(i)+g.Width/2
					dn, ampN := diff(lo, hi, sh)
					dk, ampK := diff(lo-p.EInf, hi-p.EInf, sh+p.N)
					want := aPrime * dk / math.Gamma(sh+p.N+1) / (dn / math.Gamma(sh+1))
					tol := maxSeriesError*(ampN+ampK) + 1e-14
					got := m.K[i]
					if !scalar.EqualWithinAbsOrRel(got, want, 0, tol) {
						t.Errorf("k(%v cm-1) = %.12g, closed form %.12g (rel %.2g > %.2g)", g.Energy(i), got, want, got/want-1, tol)
					}
					if want > 0 && math.Abs(got/want-1) > worst {
						worst, worstTol = math.Abs(got/want-1), tol
					}
					if got < prev*(1-tol-prevTol) {
						t.Errorf("k falls at %v cm-1: %v < %v", g.Energy(i), got, prev)
					}
					prev, prevTol = got, tol
				}
				t.Logf("worst relative deviation from the closed form: %.2g (tolerance there %.2g)", worst, worstTol)
			})
		}
	}
}

// A reactant without classical rotors has a density made of spikes; a grain
// with no reactant state can still receive flux from the shifted comb, and
// k(E) cannot carry it (no state reacts there), so <k(E)> falls below k∞ at
// low temperature (logged; never above k∞). The numerator itself is still the
// exact inverse transform, which checks the comb-only power sums:
// Σ_i (k·ρ)_i·Δ·e^(−E_i/kT) / Σ_i N_i·e^(−E_i/kT) = k∞ (Laplace convolution
// theorem, Forst 1973). Both sums weight each grain at its centre; for a
// sparse comb a level off the centre by d carries a first-order error βd
// (up to βΔ/2 = 2.4 % at 300 K) that the numerator, a smoothed comb for
// n > 0, does not share, so the check is made at 1000 and 2500 K, where the
// population spreads over many levels and the errors average to second order
// ((Δ/kT)²/8 ≤ 5e-5): held to 1e-3 as above. For n = 0, E∞ = 0, k(E) = A on
// every grain with states (k·ρ = A·ρ), to rounding.
func TestILTPureVibrational(t *testing.T) {
	const tol = 1e-3
	r, _ := ch3ncPair()
	r.Rotors = nil
	for _, p := range iltCases {
		t.Run(iltName(p), func(t *testing.T) {
			ceiling := iltCeiling(p)
			c, err := NewCounter(r, 1, ceiling)
			if err != nil {
				t.Fatal(err)
			}
			g := GrainsTo(10, ceiling)
			m, err := ILTMicro(c, p, g)
			if err != nil {
				t.Fatal(err)
			}
			for _, tK := range []float64{300, 1000, 2500} {
				beta := 1 / units.KT(tK)
				num := 0.0
				for i, w := range m.SumTS {
					num += w * units.LightCm * g.Width * math.Exp(-beta*g.Energy(i))
				}
				got, want := num/CountedQ(m.Counts, g, tK), p.KInf(tK)
				if tK >= 1000 && !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("%v K: numerator transform %.6g, k∞ %.6g (ratio %.6f)", tK, got, want, got/want)
				}
				kt := m.ThermalK(tK)
				if kt > want*(1+tol) {
					t.Errorf("%v K: <k(E)> = %.6g above k∞ = %.6g", tK, kt, want)
				}
				t.Logf("%v K: numerator transform/k∞ − 1 = %.2g; <k(E)>/k∞ = %.4f (flux on empty grains lost)", tK, got/want-1, kt/want)
			}
			if p.N == 0 && p.EInf == 0 {
				for i, k := range m.K {
					if m.Counts[i] > 0 && !scalar.EqualWithinRel(k, p.A, 1e-14) {
						t.Errorf("k(%v cm-1) = %v, want A = %v", g.Energy(i), k, p.A)
					}
				}
			}
		})
	}
}

// powerSum for exponents that are not multiples of ½, and Counter.fracSum
// built on it, against direct O(N) summation Σ_j c_j·(x − jδ)^p (an
// independent algorithm). Tolerance 1e-9: the block series is truncated below
// maxSeriesError = 1e-9 relative; p = 8.3 and 12.7 need more than the three
// default near blocks.
func TestPowerSumGeneralExponent(t *testing.T) {
	const tol = 1e-9
	for _, rs := range [][]Rotor{nil, {{Dim: 3, Consts: []float64{1.2, 0.3, 0.25}, Symmetry: 1}}} {
		s := &Species{Name: "x", Vibrations: []float64{3000, 1500.5, 890, 420, 133.3}, Rotors: rs}
		c, err := NewCounter(s, 1, 60000)
		if err != nil {
			t.Fatal(err)
		}
		ps := newPowerSum(c.Comb(), 1)
		b, d := s.rotorFactor()
		worst := 0.0
		for _, p := range []float64{0.35, 1.85, 2.2, 3.6, 8.3, 12.7} {
			for _, x := range []float64{50, 133.3, 1000.25, 20000, 59999} {
				want := 0.0
				for j, n := range c.Comb() {
					if y := x - float64(j); y > 0 {
						want += n * math.Pow(y, p)
					}
				}
				got := ps.at(x, p)
				worst = math.Max(worst, math.Abs(got/want-1))
				if !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("S_%v(%v) = %.12g, direct %.12g", p, x, got, want)
				}
				// fracSum: B/Γ(D/2+q+1)·S_(D/2+q).
				q := p - float64(d)/2
				if q <= 0 {
					continue
				}
				wantI := b * want / math.Gamma(p+1)
				if gotI := c.fracSum(x, q, c.combPowerSum(q)); !scalar.EqualWithinRel(gotI, wantI, tol) {
					t.Errorf("D=%d: I_%v(%v) = %.12g, direct %.12g", d, q, x, gotI, wantI)
				}
			}
		}
		t.Logf("D=%d: worst relative deviation %.2g", d, worst)
	}
}

// fracCounts at q = 0 and q = 1 must be the existing Counts and
// Δ·AveragedSums (same definitions, other code paths for q = 1 with rotors).
func TestFracCountsLimits(t *testing.T) {
	const tol = 1e-12 // same sums, rounding only
	for _, rs := range [][]Rotor{nil, {{Dim: 2, Consts: []float64{0.4}, Symmetry: 1}}} {
		s := &Species{Name: "x", Vibrations: []float64{2097, 713, 713, 3311}, Rotors: rs}
		c, err := NewCounter(s, 1, 20000)
		if err != nil {
			t.Fatal(err)
		}
		g := GrainsTo(10, 15000)
		for _, off := range []float64{0, 1234.5} {
			n0, n := c.fracCounts(g, off, 0), c.Counts(g, off)
			n1, w := c.fracCounts(g, off, 1), c.AveragedSums(g, off)
			for i := range g.N {
				if !scalar.EqualWithinAbsOrRel(n0[i], n[i], tol, tol) {
					t.Errorf("q=0, grain %d: %v, Counts %v", i, n0[i], n[i])
				}
				if !scalar.EqualWithinAbsOrRel(n1[i], g.Width*w[i], tol, tol) {
					t.Errorf("q=1, grain %d: %v, Δ·AveragedSums %v", i, n1[i], g.Width*w[i])
				}
			}
		}
	}
}

// Invalid parameters are errors, and so is an exponent so large that the
// power sums overflow: ILTMicro never returns NaN or Inf.
func TestILTRejects(t *testing.T) {
	r, _ := ch3ncPair()
	c, err := NewCounter(r, 1, 5000)
	if err != nil {
		t.Fatal(err)
	}
	g := GrainsTo(10, 5000)
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name string
		p    ILT
	}{
		{"zero A", ILT{0, 300, 1, 0}},
		{"negative A", ILT{-1, 300, 1, 0}},
		{"infinite A", ILT{inf, 300, 1, 0}},
		{"NaN A", ILT{nan, 300, 1, 0}},
		{"zero T0", ILT{1e13, 0, 1, 0}},
		{"infinite T0", ILT{1e13, inf, 1, 0}},
		{"negative n", ILT{1e13, 300, -0.5, 0}},
		{"NaN n", ILT{1e13, 300, nan, 0}},
		{"infinite n", ILT{1e13, 300, inf, 0}},
		{"negative EInf", ILT{1e13, 300, 1, -1}},
		{"NaN EInf", ILT{1e13, 300, 1, nan}},
		{"infinite EInf", ILT{1e13, 300, 1, inf}},
		{"overflowing n", ILT{1e13, 300, 300, 0}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			m, err := ILTMicro(c, tc.p, g)
			if err == nil {
				t.Fatalf("accepted %+v", tc.p)
			}
			if m != nil {
				t.Errorf("returned a Micro with the error %v", err)
			}
			t.Log(err)
		})
	}
}

// k∞ of the modified Arrhenius form at T = T0 is A·exp(−E∞/kT0), and
// (T/T0)^n scales it exactly (the definition).
func TestILTKInf(t *testing.T) {
	p := ILT{A: 3e13, T0: 300, N: 1.5, EInf: 1000}
	if got, want := p.KInf(300), 3e13*math.Exp(-1000/units.KT(300)); !scalar.EqualWithinRel(got, want, 1e-15) {
		t.Errorf("k∞(T0) = %v, want %v", got, want)
	}
	q := p
	q.EInf = 0
	if got := q.KInf(1200) / q.KInf(300); !scalar.EqualWithinRel(got, 8, 1e-14) {
		t.Errorf("k∞(4T0)/k∞(T0) = %v, want 4^1.5 = 8", got)
	}
}

func ExampleILTMicro() {
	// Methyl isocyanide with an illustrative barrierless channel,
	// k∞ = 1e14·(T/298 K)^0.35·exp(−15000 cm⁻¹/kT) s⁻¹.
	r, _ := ch3ncPair()
	p := ILT{A: 1e14, T0: 298, N: 0.35, EInf: 15000}
	c, err := NewCounter(r, 1, 60000)
	if err != nil {
		fmt.Println(err)
		return
	}
	m, err := ILTMicro(c, p, GrainsTo(10, 59000))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("k(14990 cm-1) = %g s-1\n", m.K[1499])
	fmt.Printf("k(20000 cm-1) = %.3g s-1\n", m.K[2000])
	fmt.Printf("<k(E)>/k∞ at 1000 K = %.4f\n", m.ThermalK(1000)/p.KInf(1000))
	// Output:
	// k(14990 cm-1) = 0 s-1
	// k(20000 cm-1) = 7.98e+09 s-1
	// <k(E)>/k∞ at 1000 K = 1.0000
}
