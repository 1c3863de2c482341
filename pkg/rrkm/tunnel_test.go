package rrkm

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// eckartCases are the barriers of the transmission tests: the CH3NC-like
// channel of tst_test.go (exothermic, V2 = E0 + 8300 cm⁻¹, illustrative),
// a symmetric barrier, an endothermic one, and one so thin (16·V1·V2 < ν‡²)
// that Johnston & Heicklen's δ is imaginary.
var eckartCases = []struct {
	name string
	e    Eckart
}{
	{"exothermic", Eckart{ImagFreq: 1000, V1: 13300, V2: 21600}},
	{"symmetric", Eckart{ImagFreq: 1500, V1: 5000, V2: 5000}},
	{"endothermic", Eckart{ImagFreq: 800, V1: 10000, V2: 3000}},
	{"thin", Eckart{ImagFreq: 1000, V1: 200, V2: 300}},
}

// schrodingerTransmission integrates the 1D Schrödinger equation through the
// Eckart potential V(x) = A·y/(1+y) + B·y/(1+y)², y = exp(αx) (Eckart, Phys.
// Rev. 35, 1303, 1930), in units where ħ²/2m = 1 cm⁻¹ (x in those length
// units, ψ” = (V − E)ψ). A = V1 − V2, B = (√V1 + √V2)², and α = 2π/L from
// the curvature at the top, hν‡ = ħ·sqrt(−V”/m) = sqrt(−2V”) here:
// −V”(x*) = α²(B² − A²)²/(8B³), so α = 2ν‡B^(3/2)/(B² − A²) (derived for
// this test; the curvature is also checked by finite differences). From a
// pure transmitted wave e^(ik₂x) deep on the product side, RK4 runs back to
// the reactant side, where ψ = I·e^(ik₁x) + R·e^(−ik₁x); the transmission is
// the flux ratio k₂/(k₁|I|²).
func schrodingerTransmission(t *testing.T, e Eckart, en float64) float64 {
	a := e.V1 - e.V2
	b := math.Pow(math.Sqrt(e.V1)+math.Sqrt(e.V2), 2)
	alpha := 2 * e.ImagFreq * math.Pow(b, 1.5) / (b*b - a*a)
	v := func(x float64) float64 {
		y := math.Exp(alpha * x)
		return a*y/(1+y) + b*y/((1+y)*(1+y))
	}
	// The top: y/(1+y) = (A+B)/(2B).
	us := (a + b) / (2 * b)
	xs := math.Log(us/(1-us)) / alpha
	if h := 1e-3 / alpha; true {
		if top := v(xs); !scalar.EqualWithinRel(top, e.V1, 1e-9) {
			t.Fatalf("potential top %v, want V1 = %v", top, e.V1)
		}
		f := -(v(xs+h) - 2*v(xs) + v(xs-h)) / (h * h)
		if nu := math.Sqrt(2 * f); !scalar.EqualWithinRel(nu, e.ImagFreq, 1e-5) {
			t.Fatalf("curvature gives ν‡ = %v, want %v", nu, e.ImagFreq)
		}
	}
	const reach = 40 // exp(−40) of B left at the ends
	xl, xr := xs-reach/alpha, xs+reach/alpha
	k1, k2 := math.Sqrt(en), math.Sqrt(en-a)
	kmax := math.Sqrt(max(en, en-a, math.Abs(e.V1-en)))
	n := int(math.Ceil((xr - xl) / math.Min(0.01/kmax, 0.01/alpha)))
	h := (xl - xr) / float64(n)
	psi := cmplx.Exp(complex(0, k2*xr))
	dpsi := complex(0, k2) * psi
	x := xr
	rhs := func(x float64, p, dp complex128) (complex128, complex128) {
		return dp, complex(v(x)-en, 0) * p
	}
	for range n {
		c := complex(h, 0)
		a1, b1 := rhs(x, psi, dpsi)
		a2, b2 := rhs(x+h/2, psi+c/2*a1, dpsi+c/2*b1)
		a3, b3 := rhs(x+h/2, psi+c/2*a2, dpsi+c/2*b2)
		a4, b4 := rhs(x+h, psi+c*a3, dpsi+c*b3)
		psi += c / 6 * (a1 + 2*a2 + 2*a3 + a4)
		dpsi += c / 6 * (b1 + 2*b2 + 2*b3 + b4)
		x += h
	}
	inc := cmplx.Abs(psi+dpsi/complex(0, k1)) / 2
	return k2 / (k1 * inc * inc)
}

// The closed form of Johnston & Heicklen against a direct numerical solution
// of the Schrödinger equation (an independent algorithm) from P ≈ 1e-5 to
// P ≈ 1. The issue asks for 0.5 %; RK4 at 0.01 rad a step is good to ~1e-6.
func TestEckartMatchesSchrodinger(t *testing.T) {
	const tol = 0.005
	for _, tc := range eckartCases {
		t.Run(tc.name, func(t *testing.T) {
			worst := 0.0
			nu := tc.e.ImagFreq
			for _, s := range []float64{-1.5, -1, -0.6, -0.3, 0, 0.3, 0.6, 1, 2} {
				en := tc.e.V1 + s*nu
				if en <= tc.e.Emin()+1 {
					continue
				}
				got, want := tc.e.Transmission(en), schrodingerTransmission(t, tc.e, en)
				worst = max(worst, math.Abs(got/want-1))
				if !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("E = V1 %+g ν‡: P = %.6g, Schrödinger %.6g", s, got, want)
				}
			}
			t.Logf("worst relative deviation %.2g", worst)
		})
	}
}

// naiveTransmission is Johnston & Heicklen's formula written with cosh as
// printed (J. Phys. Chem. 66, 532, 1962), for moderate arguments.
func naiveTransmission(e Eckart, en float64) float64 {
	a := e.V1 - e.V2
	b := math.Pow(math.Sqrt(e.V1)+math.Sqrt(e.V2), 2)
	sc := e.ImagFreq / 4 * (1/math.Sqrt(e.V1) + 1/math.Sqrt(e.V2)) // √C
	c := sc * sc
	al, be := 0.5*math.Sqrt(en/c), 0.5*math.Sqrt((en-a)/c)
	var chd float64
	if b >= c {
		chd = math.Cosh(2 * math.Pi * 0.5 * math.Sqrt((b-c)/c))
	} else {
		chd = math.Cos(2 * math.Pi * 0.5 * math.Sqrt((c-b)/c))
	}
	p := math.Cosh(2 * math.Pi * (al + be))
	return (p - math.Cosh(2*math.Pi*(al-be))) / (p + chd)
}

// Limits and special values of P(E). Sources: the formula as printed
// (overflow-free rewriting checked against it, 1e-12 where neither form
// cancels); the parabolic-barrier limit P = 1/(1 + exp(−2π(E−V1)/hν‡))
// (Bell, Trans. Faraday Soc. 55, 1, 1959, from memory) for a barrier a
// million times higher than hν‡, where the Eckart corrections to the
// exponent −2πε/hν‡ (ε = E − V1), πε²/(2hν‡V1) + πhν‡/(8V1), are at most
// 1.5e-5 over |ε| ≤ 3hν‡, so 1e-4; and the exact value at the top of a
// symmetric barrier.
func TestEckartLimits(t *testing.T) {
	t.Run("ratio form equals the printed formula", func(t *testing.T) {
		const tol = 1e-12
		for _, tc := range eckartCases {
			for _, s := range []float64{-1, 0, 1, 3} {
				en := tc.e.V1 + s*tc.e.ImagFreq/4
				if en <= tc.e.Emin()+50 {
					continue
				}
				if got, want := tc.e.Transmission(en), naiveTransmission(tc.e, en); !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("%s, E = %v: P = %.15g, printed formula %.15g", tc.name, en, got, want)
				}
			}
		}
	})
	t.Run("below, at and far above the asymptotes", func(t *testing.T) {
		for _, tc := range eckartCases {
			lo := tc.e.Emin()
			for _, en := range []float64{lo - 100, lo, math.Inf(-1)} {
				if p := tc.e.Transmission(en); p != 0 {
					t.Errorf("%s: P(%v) = %v, want 0 (at or below the upper asymptote)", tc.name, en, p)
				}
			}
			// Threshold law: P ∝ √(E − Emin), the momentum on the side of
			// the upper asymptote, or ∝ E − Emin when both asymptotes
			// coincide (both momenta vanish); the next order is relative
			// O(√(E − Emin)), so 1e-3 at 1e-6 cm⁻¹.
			want := 2.0
			if tc.e.V1 == tc.e.V2 {
				want = 4
			}
			p1, p4 := tc.e.Transmission(lo+1e-6), tc.e.Transmission(lo+4e-6)
			if !(p1 > 0) || !scalar.EqualWithinRel(p4/p1, want, 1e-3) {
				t.Errorf("%s: P(Emin + 4e-6)/P(Emin + 1e-6) = %v/%v = %v, want %v", tc.name, p4, p1, p4/p1, want)
			}
			if p := tc.e.Transmission(math.Inf(1)); p != 1 {
				t.Errorf("%s: P(+Inf) = %v, want 1", tc.name, p)
			}
		}
		// Far above a high barrier the reflection is e^(−2πΔE/hν‡) small:
		// P rounds to 1.
		e := Eckart{ImagFreq: 1000, V1: 13300, V2: 21600}
		if p := e.Transmission(e.V1 + 10*e.ImagFreq); !scalar.EqualWithinAbs(p, 1, 1e-15) {
			t.Errorf("P(V1 + 10 hν‡) = %v, want 1", p)
		}
		if p := e.Transmission(e.V1 - 10*e.ImagFreq); !(p > 0 && p < 1e-20) {
			t.Errorf("P(V1 − 10 hν‡) = %v, want below e^(−20π)", p)
		}
	})
	t.Run("top of a symmetric barrier", func(t *testing.T) {
		// At E = V1 = V2 the formula gives (cosh X − 1)/(cosh X + cosh D),
		// X = 4πV1/hν‡, D = (π/hν‡)√(16V1² − (hν‡)²) < X, that is
		// 1/(1 + e^(−(X−D))) + O(e^(−X)) with X − D ≈ πhν‡/(8V1): slightly
		// above ½ (exactly ½ for the parabolic barrier). Tolerance 1e-12:
		// e^(−X) < 1e-16 for these cases.
		const tol = 1e-12
		for _, v := range []float64{3000, 10000, 50000} {
			e := Eckart{ImagFreq: 1000, V1: v, V2: v}
			x := 4 * math.Pi * v / e.ImagFreq
			dd := math.Pi / e.ImagFreq * math.Sqrt(16*v*v-e.ImagFreq*e.ImagFreq)
			want := 1 / (1 + math.Exp(-(x - dd)))
			got := e.Transmission(v)
			if !scalar.EqualWithinRel(got, want, tol) || !(got > 0.5) {
				t.Errorf("V1 = V2 = %v: P(V1) = %.15g, want %.15g (> ½)", v, got, want)
			}
			if approx := 0.5 + math.Pi*e.ImagFreq/(32*v); !scalar.EqualWithinAbs(got, approx, 2e-3*e.ImagFreq/v) {
				t.Errorf("V1 = %v: P(V1) = %v, want ½ + πhν/(32V1) = %v", v, got, approx)
			}
		}
	})
	t.Run("parabolic limit", func(t *testing.T) {
		const tol = 1e-4
		e := Eckart{ImagFreq: 1000, V1: 1e9, V2: 1e9}
		worst := 0.0
		for s := -3.0; s <= 3; s += 0.25 {
			en := e.V1 + s*e.ImagFreq
			want := 1 / (1 + math.Exp(-2*math.Pi*s))
			got := e.Transmission(en)
			worst = max(worst, math.Abs(got/want-1))
			if !scalar.EqualWithinRel(got, want, tol) {
				t.Errorf("E = V1 %+g hν‡: P = %.8g, parabolic %.8g", s, got, want)
			}
		}
		t.Logf("worst relative deviation from the parabolic barrier %.2g", worst)
	})
}

// The thermal factor against the parabolic barrier. For a parabolic barrier
// κ = (u/2)/sin(u/2) = 1 + u²/24 + 7u⁴/5760 + 31u⁶/967680 + … for
// u = hν‡/kT < 2π, up to terms of order exp(−V1/kT) (Bell, Trans. Faraday
// Soc. 55, 1, 1959, from memory; the series is that of x/sin x), whose first
// term is Wigner's 1 + u²/24 (Wigner 1932). So κ − Wigner must be 7u⁴/5760
// to within the u⁶ term (the later terms, all positive, add at most 12 % to
// it for u ≤ 2: tolerance 1.2 × 31u⁶/967680). The Eckart barrier differs
// from the parabola by a shape correction of relative order kT/V1 in κ − 1
// (estimated here from the expansion of its exponent about the top); with
// V1 = 10⁹ cm⁻¹ that is below 2e-5 of κ − 1, and the comparison with
// (u/2)/sin(u/2) allows 2·(κ − 1)·kT/V1 plus the 1e-10 of the quadrature.
func TestEckartKappaWignerLimit(t *testing.T) {
	e := Eckart{ImagFreq: 500, V1: 1e9, V2: 1e9}
	for _, u := range []float64{0.03, 0.1, 0.3, 1, 2} {
		tK := e.ImagFreq / u / kT(1)
		got := e.Kappa(tK)
		w := Wigner(e.ImagFreq, tK)
		if !scalar.EqualWithinRel(w, 1+u*u/24, 1e-12) {
			t.Fatalf("Wigner(u = %v) = %v, want %v", u, w, 1+u*u/24)
		}
		shape := 2*(got-1)*kT(tK)/e.V1 + 1e-10
		dev, want := got-w, 7*math.Pow(u, 4)/5760
		if math.Abs(dev-want) > 1.2*31*math.Pow(u, 6)/967680+shape {
			t.Errorf("u = %v (T = %.4g K): κ − Wigner = %.6g, want 7u⁴/5760 = %.6g", u, tK, dev, want)
		}
		bell := u / 2 / math.Sin(u/2)
		if math.Abs(got-bell) > shape {
			t.Errorf("u = %v: κ = %.12g, parabolic (u/2)/sin(u/2) = %.12g", u, got, bell)
		}
		t.Logf("u = %v: κ − Wigner = %.6g (7u⁴/5760 = %.6g), κ − parabolic = %.2g", u, dev, want, got-bell)
	}
}

// ch3ncTunnel is the CH3NC-like channel of tst_test.go with an imaginary
// frequency nu and a reverse barrier E0 + 8300 cm⁻¹ (the isomerisation to
// CH3CN is exothermic by roughly that much, from memory; illustrative).
func ch3ncTunnel(nu float64) (*Species, *Species, *Eckart) {
	r, ts := ch3ncPair()
	ts.Imaginary = nu
	e, err := NewEckart(ts, ts.E0+8300)
	if err != nil {
		panic(err)
	}
	return r, ts, e
}

// The TST identity of TestThermalAverageEqualsCanonical with tunnelling: the
// Boltzmann average of RRKMTunnel's k(E) equals k∞·κ = KInfTunnel, because
// N‡ = ρ‡ * P is a convolution and the Laplace transform of a convolution is
// the product of the transforms (Miller, J. Am. Chem. Soc. 101, 6810, 1979).
// The discretisation keeps it to O((Δ/kT)²) as without tunnelling, so the
// same 1e-3. Below the crossover temperature hν‡/(2πk_B) (229 K for
// 1000 cm⁻¹, 343 K for 1500 cm⁻¹) the flux comes from far below E0, so this
// also checks k(E) there; k(E) must be positive on every grain below E0 that
// holds reactant states.
func TestThermalAverageWithTunnelling(t *testing.T) {
	const tol = 1e-3
	temps := []float64{200, 300, 500, 1000, 2000, 3000}
	for _, nu := range []float64{500, 1000, 1500} {
		r, ts, e := ch3ncTunnel(nu)
		t.Run(fmt.Sprintf("ν‡=%g", nu), func(t *testing.T) {
			ceiling := ts.E0 + 40*kT(3000)
			rc, tc := countPair(t, r, ts, ceiling)
			l := PathDegeneracy(r, ts)
			g := GrainsTo(10, ceiling-10)
			m := RRKMTunnel(rc, tc, l, g, e)
			for i := range g.N {
				if m.Counts[i] > 0 && g.Energy(i)+g.Width/2 <= ts.E0 && !(m.K[i] > 0) {
					t.Fatalf("k(%v cm-1) = %v below E0 with %v reactant states, want > 0", g.Energy(i), m.K[i], m.Counts[i])
				}
			}
			worst := 0.0
			for _, tK := range temps {
				got, want := m.ThermalK(tK), KInfTunnel(r, ts, l, tK, e)
				worst = math.Max(worst, math.Abs(got/want-1))
				if !scalar.EqualWithinRel(got, want, tol) {
					t.Errorf("%v K: <k(E)> = %.6g, k∞·κ = %.6g s-1 (ratio %.6f)", tK, got, want, got/want)
				}
				// KInfTunnel is KInf·κ where both are representable.
				if k := KInf(r, ts, l, tK) * e.Kappa(tK); !scalar.EqualWithinRel(k, want, 1e-12) {
					t.Errorf("%v K: KInf·Kappa = %.12g, KInfTunnel %.12g", tK, k, want)
				}
			}
			t.Logf("ν‡ = %g: κ(200 K) = %.4g, κ(300 K) = %.4g, worst |<k(E)>/(k∞κ) − 1| = %.2g",
				nu, e.Kappa(200), e.Kappa(300), worst)
		})
	}
}

// N‡ against brute force: for a transition state of two integer-frequency
// oscillators, enumerate the levels ε and integrate P(E − ε) over each grain
// by 12-point Gauss–Legendre on every 1 cm⁻¹ (in u = √(E − ε) on the first,
// where P has its square-root onset): an independent route. The grain edges
// are multiples of the 1 cm⁻¹ fine grain, where the package interpolates
// nothing, so the two differ by quadrature error only; 1e-8. A 5 cm⁻¹ grain
// puts every edge mid-bin, where P is in effect averaged over 1 cm⁻¹ bins:
// an error of δ²|P”|/(8P) relative, up to ~(δ·d ln P/dE)²/8 ≈ 1e-3 in the
// lowest grains, where ln P rises at 0.1 per cm⁻¹; 2e-3 (the lowest grain apart).
func TestTunnelSumsMatchEnumeration(t *testing.T) {
	ts := &Species{Name: "two-mode TS", E0: 3000, Vibrations: []float64{400, 1000}}
	e := Eckart{ImagFreq: 1000, V1: 3000, V2: 5000}
	c, err := NewCounter(ts, 1, 7000)
	if err != nil {
		t.Fatal(err)
	}
	var levels []float64
	for i := 0.0; i*400 <= 7000; i++ {
		for j := 0.0; i*400+j*1000 <= 7000; j++ {
			levels = append(levels, i*400+j*1000)
		}
	}
	gl := func(lo, hi float64, f func(float64) float64) float64 {
		s := 0.0
		for k := range glX {
			s += glW[k] * f((lo+hi)/2+(hi-lo)/2*glX[k])
		}
		return s * (hi - lo) / 2
	}
	for _, tc := range []struct {
		width, tol float64
	}{{10, 1e-8}, {5, 2e-3}} {
		g := GrainsTo(tc.width, 7000)
		got := c.AveragedTunnelSums(g, e)
		worst, at, want0 := 0.0, 0.0, 0.0
		for i := range g.N {
			a, b := g.Energy(i)-g.Width/2, g.Energy(i)+g.Width/2
			want := 0.0
			for _, eps := range levels {
				for x := math.Floor(a); x < b; x++ {
					lo, hi := max(x, a, eps), min(x+1, b)
					switch {
					case hi <= lo:
					case lo == eps:
						want += gl(0, math.Sqrt(hi-eps), func(u float64) float64 { return 2 * u * e.Transmission(u*u) })
					default:
						want += gl(lo-eps, hi-eps, e.Transmission)
					}
				}
			}
			want /= g.Width
			if i == 0 {
				want0 = want
			}
			tol := tc.tol
			if i == 0 && tc.width == 5 {
				// The lowest 5 cm⁻¹ grain ends mid-way through the bin
				// [2, 3] cm⁻¹ of the square-root onset, where Pc ∝ y^(3/2)
				// is far from linear: 5 %.
				tol = 0.05
			} else if d := math.Abs(got[i]/want - 1); d > worst {
				worst, at = d, g.Energy(i)
			}
			if !scalar.EqualWithinRel(got[i], want, tol) {
				t.Errorf("%v cm-1 grains: grain %v cm-1: N‡ = %.10g, enumeration %.10g", tc.width, g.Energy(i), got[i], want)
			}
		}
		t.Logf("%v cm-1 grains: worst relative deviation %.2g at %v cm-1 (lowest grain %.2g)", tc.width, worst, at, got[0]/want0-1)
	}
}

// The fine counts with rotors (all half-node sums in one pass) are the
// differences of Sum at the half nodes, evaluated one by one. The two group
// the comb differently (fixed blocks there, the block hierarchy in Sum), each
// series truncated below 3.4e-10 relative (powerSum), so they agree to 1e-9;
// both are checked against direct summation elsewhere
// (TestRotorConvolutionMatchesDirect, TestPowerSumGeneralExponent).
func TestFineCountsMatchSum(t *testing.T) {
	const tol = 1e-9
	for _, rs := range [][]Rotor{
		{{Dim: 1, Consts: []float64{2.1}, Symmetry: 2}},
		{{Dim: 3, Consts: []float64{1.2, 0.3, 0.25}, Symmetry: 1}},
		{{Dim: 3, Consts: []float64{1.2, 0.3, 0.25}, Symmetry: 1}, {Dim: 2, Consts: []float64{6.0}, Symmetry: 1}},
	} {
		s := &Species{Name: "x", Vibrations: []float64{3000, 1500.5, 890, 420, 133.3}, Rotors: rs}
		c, err := NewCounter(s, 1, 30000)
		if err != nil {
			t.Fatal(err)
		}
		n := c.fineCounts(29999)
		w, worst := 0.0, 0.0
		defer func() { t.Logf("%d rotors: worst relative deviation %.2g", len(rs), worst) }()
		for j, x := range n {
			w += x
			want := c.Sum(float64(j) + 0.5)
			worst = math.Max(worst, math.Abs(w/want-1))
			if !scalar.EqualWithinRel(w, want, tol) {
				t.Fatalf("%d rotors: Σ n up to %d = %.15g, Sum = %.15g", len(rs), j, w, want)
			}
		}
	}
}

func TestEckartRejects(t *testing.T) {
	bad := []struct {
		name string
		e    Eckart
		want string
	}{
		{"no frequency", Eckart{0, 1000, 1000}, "imaginary frequency"},
		{"negative frequency", Eckart{-500, 1000, 1000}, "imaginary frequency"},
		{"NaN frequency", Eckart{math.NaN(), 1000, 1000}, "imaginary frequency"},
		{"infinite frequency", Eckart{math.Inf(1), 1000, 1000}, "imaginary frequency"},
		{"zero V1", Eckart{1000, 0, 1000}, "V1"},
		{"negative V2", Eckart{1000, 1000, -1}, "V2"},
		{"infinite V2", Eckart{1000, 1000, math.Inf(1)}, "V2"},
		{"overflowing", Eckart{1e-300, 1e300, 1e300}, "out of range"},
	}
	for _, tc := range bad {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.e.Validate()
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("Validate() = %v, want an error about %s", err, tc.want)
			}
			mustPanic(t, "Transmission", func() { tc.e.Transmission(1000) })
			mustPanic(t, "Kappa", func() { tc.e.Kappa(300) })
		})
	}
	if err := (Eckart{1000, 13300, 21600}).Validate(); err != nil {
		t.Errorf("valid barrier: %v", err)
	}
	_, ts := ch3ncPair()
	if _, err := NewEckart(ts, 20000); err == nil || !strings.Contains(err.Error(), "imaginary frequency") {
		t.Errorf("NewEckart without an imaginary frequency: %v", err)
	}
	ts.Imaginary = 1000
	if _, err := NewEckart(ts, -5); err == nil || !strings.Contains(err.Error(), "CH3NC-TS") {
		t.Errorf("NewEckart with a negative reverse barrier: %v", err)
	}
	e := Eckart{1000, 13300, 21600}
	for _, tK := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		mustPanic(t, fmt.Sprintf("Kappa(%v)", tK), func() { e.Kappa(tK) })
		mustPanic(t, fmt.Sprintf("Wigner(%v)", tK), func() { Wigner(1000, tK) })
	}
	mustPanic(t, "Wigner(−1 cm-1)", func() { Wigner(-1, 300) })
	r, ts := ch3ncPair()
	rc, _ := NewCounter(r, 1, 20000)
	tc, _ := NewCounter(ts, 1, 20000)
	other := Eckart{1000, 12000, 21600}
	mustPanic(t, "RRKMTunnel with V1 ≠ E0", func() { RRKMTunnel(rc, tc, 3, GrainsTo(10, 19000), &other) })
	mustPanic(t, "KInfTunnel with V1 ≠ E0", func() { KInfTunnel(r, ts, 3, 300, &other) })
	short, _ := NewCounter(ts, 1, 8000)
	mustPanic(t, "TS counted too low", func() { RRKMTunnel(rc, short, 3, GrainsTo(10, 19000), &e) })
	if got, want := KInfTunnel(r, ts, 3, 500, nil), KInf(r, ts, 3, 500); got != want {
		t.Errorf("KInfTunnel(nil) = %v, want KInf = %v", got, want)
	}
	plain, tunnel := RRKM(rc, tc, 3, GrainsTo(10, 19000)), RRKMTunnel(rc, tc, 3, GrainsTo(10, 19000), nil)
	for i := range plain.K {
		if plain.K[i] != tunnel.K[i] {
			t.Fatalf("RRKMTunnel(nil) differs from RRKM at grain %d", i)
		}
	}
}

func mustPanic(t *testing.T, what string, f func()) {
	t.Helper()
	defer func() {
		if r := recover(); r == nil {
			t.Errorf("%s: no panic", what)
		} else if s := fmt.Sprint(r); !strings.HasPrefix(s, "rrkm: ") {
			t.Errorf("%s: panic %q without the package prefix", what, s)
		}
	}()
	f()
}

// No NaN or Inf from extreme barriers and temperatures: deep tunnelling at
// 1 K, barriers of 10⁶ cm⁻¹, a barrier of 1 cm⁻¹, nearly thermoneutral and
// very asymmetric ones. P must lie in [0, 1], ln κ and KInfTunnel be finite
// and k(E) finite and ≥ 0 on every grain.
func TestTunnellingFinite(t *testing.T) {
	barriers := []Eckart{
		{1000, 13300, 21600}, {3000, 1e6, 1e6}, {50, 1e6, 2e6}, {2000, 1, 1e5},
		{1500, 1e5, 1}, {1000, 200, 200}, {4000, 5, 5}, {10, 13300, 13300},
	}
	for _, e := range barriers {
		name := fmt.Sprintf("ν‡=%g,V1=%g,V2=%g", e.ImagFreq, e.V1, e.V2)
		for _, en := range []float64{0, 1e-300, e.Emin() + 1e-12, e.V1 / 2, e.V1, 2 * e.V1, 1e300, math.MaxFloat64} {
			if p := e.Transmission(en); !(p >= 0 && p <= 1) {
				t.Errorf("%s: P(%v) = %v", name, en, p)
			}
		}
		for _, tK := range []float64{1, 10, 50, 300, 3000, 1e5, 1e9} {
			lk := e.LogKappa(tK)
			if math.IsNaN(lk) || math.IsInf(lk, 0) {
				t.Errorf("%s, %v K: ln κ = %v", name, tK, lk)
			}
			// κ may fall below 1 (reflection above the top outweighs
			// tunnelling at high T) but is positive, and finite wherever
			// ln κ is in range.
			if k := e.Kappa(tK); lk < 700 && (math.IsInf(k, 0) || !(k > 0)) {
				t.Errorf("%s, %v K: κ = %v", name, tK, k)
			}
		}
	}
	r, ts := ch3ncPair()
	for _, nu := range []float64{50, 4000} {
		ts.Imaginary = nu
		e, _ := NewEckart(ts, ts.E0+8300)
		for _, tK := range []float64{1, 20, 300, 1e5} {
			if k := KInfTunnel(r, ts, 3, tK, e); math.IsNaN(k) || math.IsInf(k, 0) || k < 0 {
				t.Errorf("ν‡ = %v, %v K: KInfTunnel = %v", nu, tK, k)
			}
		}
		rc, _ := NewCounter(r, 1, 30000)
		tc, _ := NewCounter(ts, 1, 30000)
		m := RRKMTunnel(rc, tc, 3, GrainsTo(10, 30000), e)
		for i, k := range m.K {
			if math.IsNaN(k) || math.IsInf(k, 0) || k < 0 {
				t.Fatalf("ν‡ = %v: k(%v cm-1) = %v", nu, m.Grains.Energy(i), k)
			}
		}
		for _, tK := range []float64{20, 300} {
			if k := m.ThermalK(tK); math.IsNaN(k) || math.IsInf(k, 0) {
				t.Errorf("ν‡ = %v: <k(E)> at %v K = %v", nu, tK, k)
			}
		}
	}
}

// BenchmarkRRKMTunnel times k(E) of the 12-mode CH3NC-like channel to
// 60 000 cm⁻¹ on 10 cm⁻¹ grains with and without tunnelling (the counts are
// made once, outside the loop), and with a transition state without rotor,
// whose fine counts are the comb itself.
func BenchmarkRRKMTunnel(b *testing.B) {
	r, ts, e := ch3ncTunnel(1000)
	rc, err := NewCounter(r, 1, 60000)
	if err != nil {
		b.Fatal(err)
	}
	tc, err := NewCounter(ts, 1, 60000)
	if err != nil {
		b.Fatal(err)
	}
	vib := *ts
	vib.Rotors = nil
	tv, err := NewCounter(&vib, 1, 60000)
	if err != nil {
		b.Fatal(err)
	}
	g := GrainsTo(10, 60000)
	b.Run("rrkm", func(b *testing.B) {
		for b.Loop() {
			RRKM(rc, tc, 3, g)
		}
	})
	b.Run("tunnel", func(b *testing.B) {
		for b.Loop() {
			RRKMTunnel(rc, tc, 3, g, e)
		}
	})
	b.Run("rrkm-ts-vibrations-only", func(b *testing.B) {
		for b.Loop() {
			RRKM(rc, tv, 3, g)
		}
	})
	b.Run("tunnel-ts-vibrations-only", func(b *testing.B) {
		for b.Loop() {
			RRKMTunnel(rc, tv, 3, g, e)
		}
	})
}

func ExampleRRKMTunnel() {
	// Methyl isocyanide with an illustrative transition state, an imaginary
	// frequency of 1000 cm⁻¹ and a reverse barrier E0 + 8300 cm⁻¹.
	r, ts := ch3ncPair()
	ts.Imaginary = 1000
	e, err := NewEckart(ts, ts.E0+8300)
	if err != nil {
		fmt.Println(err)
		return
	}
	rc, _ := NewCounter(r, 1, 40000)
	tc, _ := NewCounter(ts, 1, 40000)
	l := PathDegeneracy(r, ts)
	m := RRKMTunnel(rc, tc, l, GrainsTo(10, 39000), e)
	fmt.Printf("P(E0) = %.4f\n", e.Transmission(ts.E0))
	fmt.Printf("κ(300 K) = %.3f, Wigner %.3f\n", e.Kappa(300), Wigner(ts.Imaginary, 300))
	fmt.Printf("k(12000 cm-1) = %.3g s-1 (below E0)\n", m.K[1200])
	fmt.Printf("<k(E)>/(k∞κ) at 300 K = %.4f\n", m.ThermalK(300)/KInfTunnel(r, ts, l, 300, e))
	// Output:
	// P(E0) = 0.5058
	// κ(300 K) = 3.360, Wigner 1.958
	// k(12000 cm-1) = 2.03e+03 s-1 (below E0)
	// <k(E)>/(k∞κ) at 300 K = 1.0000
}

// TestTunnelSumsFrom: on a grid whose zero lies an offset below the
// reactant's (a well of a network), the grain sums are those of the
// reactant's own grid moved by the offset: exactly the same numbers for an
// offset of whole grains (the same edges, an exact identity; 1e-12 for
// rounding), zero on the grains below the reactant's zero. For an offset
// half a grain larger each grain's window lies half a grain lower on the
// reactant's scale, so, the tunnelling sum being non-decreasing in energy,
// its average lies between those of the two grains it straddles: a check
// of the offset's direction.
func TestTunnelSumsFrom(t *testing.T) {
	ts := &Species{Name: "two-mode TS", E0: 3000, Vibrations: []float64{400, 1000}}
	e := Eckart{ImagFreq: 1000, V1: 3000, V2: 5000}
	c, err := NewCounter(ts, 1, 9000)
	if err != nil {
		t.Fatal(err)
	}
	g := GrainsTo(10, 7000)
	own := c.AveragedTunnelSums(g, e)
	shifted := GrainsTo(10, 7300)
	got := c.AveragedTunnelSumsFrom(shifted, e, 300)
	for i, v := range got {
		switch j := i - 30; {
		case j < 0 && v != 0:
			t.Fatalf("grain %d below the reactant's zero: %g", i, v)
		case j >= 0 && j < g.N && math.Abs(v-own[j]) > 1e-12*math.Abs(own[j]):
			t.Fatalf("grain %d: %.15g, own grid %.15g", i, v, own[j])
		}
	}
	half := c.AveragedTunnelSumsFrom(shifted, e, 305)
	for k := 31; k < shifted.N; k++ {
		if lo, hi := got[k-1], got[k]; half[k] < lo*(1-1e-12) || half[k] > hi*(1+1e-12) {
			t.Fatalf("grain %d, offset half a grain larger: %.15g, not between %.15g and %.15g", k, half[k], lo, hi)
		}
	}
}
