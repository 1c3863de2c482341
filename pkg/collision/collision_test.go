package collision

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"

	"github.com/falloff-kinetics/falloff/pkg/band"
)

// Ω(2,2)* from the Neufeld–Janzen–Aziz fit against the table of Monchick &
// Mason (J. Chem. Phys. 35, 1676, 1961) as reprinted in Bird, Stewart &
// Lightfoot, Transport Phenomena, Table E.2: T* = 0.3: 2.840, 1: 1.593 (1.5929
// in the issue), 2: 1.1757, 5: 0.92676, 10: 0.82435 (issue), 100: 0.5887.
func TestOmega22(t *testing.T) {
	cases := []struct{ tStar, want, tol float64 }{
		{1, 1.5929, 0.003},
		{2, 1.1757, 0.003},
		{5, 0.92676, 0.003},
		{10, 0.82435, 0.003},
		{0.3, 2.840, 0.005},
		{100, 0.5887, 0.005},
	}
	for _, tc := range cases {
		if got := omega22(tc.tStar); !scalar.EqualWithinRel(got, tc.want, tc.tol) {
			t.Errorf("Ω(2,2)*(%v) = %.5f, table %.5f (tol %g)", tc.tStar, got, tc.want, tc.tol)
		}
	}
}

// The collision rate constant is the hard-sphere rate πσ²·sqrt(8kT/πμ) times
// Ω(2,2)*, worked by hand here for Ar + Ar at 300 K (σ = 3.542 Å,
// μ = 19.974 amu): πσ² = 3.9413e-15 cm², mean relative speed 5.6392e4 cm/s
// (5 significant figures, so the tolerance is 1e-4).
func TestLJRateConstant(t *testing.T) {
	ar, _ := LookupBath("Ar")
	pair := Combine(ar.LJ, ar.LJ)
	if pair != ar.LJ {
		t.Errorf("combining like parameters changed them: %v", pair)
	}
	mu := ReducedMass(ar.Mass, ar.Mass)
	got := lJRateConstant(pair, mu, 300)
	want := 3.9413e-15 * 5.6392e4 * omega22(300/93.3)
	if !scalar.EqualWithinRel(got, want, 1e-4) {
		t.Errorf("Z(Ar+Ar, 300 K) = %.5g, hand value %.5g", got, want)
	}
	// Combining rules (Hirschfelder, Curtiss & Bird 1954).
	c := Combine(LennardJones{3, 100}, LennardJones{5, 400})
	if c.Sigma != 4 || c.Epsilon != 200 {
		t.Errorf("Combine = %+v, want {4 200}", c)
	}
	// [M] at 1 atm and 273.15 K is the Loschmidt constant, 2.686780111e25 m⁻³
	// (CODATA 2018, exact to the digits shown).
	if n := Concentration(units.AtmPa, 273.15); !scalar.EqualWithinRel(n, 2.686780111e19, 1e-9) {
		t.Errorf("[M] = %.8g", n)
	}
	for _, name := range []string{"He", "Ne", "Ar", "Kr", "H2", "N2", "O2", "CO2", "H2O", "CH4"} {
		if g, ok := LookupBath(name); !ok || g.Source == "" || !(g.Mass > 0) {
			t.Errorf("bath gas %s missing or without source", name)
		}
	}
}

// testChannel is methyl isocyanide with harmonic vibrations and no rotors
// (fundamentals after Shimanouchi, NSRDS-NBS 39, 1972, from memory) and an
// illustrative transition state: a case where Troe's F_rot = F_anh = 1.
func testChannel(t testing.TB, ceiling float64) (Channel, *rrkm.Species) {
	r := &rrkm.Species{Name: "CH3NC", Vibrations: []float64{3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263}}
	ts := &rrkm.Species{Name: "TS", E0: 13300, Vibrations: []float64{3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280}}
	return channelOf(t, r, ts, ceiling), r
}

// channelOf counts reactant and transition state up to ceiling cm⁻¹.
func channelOf(t testing.TB, r, ts *rrkm.Species, ceiling float64) Channel {
	rc, err := rrkm.NewCounter(r, 1, ceiling)
	if err != nil {
		t.Fatal(err)
	}
	tc, err := rrkm.NewCounter(ts, 1, ceiling-ts.E0)
	if err != nil {
		t.Fatal(err)
	}
	return Channel{Reactant: rc, TS: tc, L: 1, E0: ts.E0}
}

func testWell(t testing.TB, ch Channel, tr Transfer, tK, grain float64) *prepared {
	p, err := prepare(ch, tr, tK, grain, 0)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// The strong-collider eigenvalue from the secular equation equals an
// independent 256-bit solution of the full matrix problem (bigEigen on
// ω(I − √F√Fᵀ) + K, the symmetrised strong-collision master equation) to
// 1e-12, from k_uni/ω ≈ 3e-10 to k_uni/ω ≈ 0.025. Where k_uni/ω is not small
// the steady-state sum Σ F·k·ω/(ω+k) falls below the eigenvalue (it is exact
// only to O(k_uni/ω)); the test checks that it never lies above and that
// some cases part the two by more than 1e-3. (gonum's dense float64
// eigensolver cannot serve here: its absolute error, ε times the largest
// k(E) on the grid, exceeds k_uni at low ω.)
func TestStrongColliderMatrixPath(t *testing.T) {
	ch, _ := testChannel(t, 60000)
	tr := Transfer{Strong: true}
	parted := 0
	for _, tK := range []float64{800, 1500} {
		p := testWell(t, ch, tr, tK, 400)
		w := p.w
		n := w.N()
		for _, omega := range []float64{1e2, 1e6, 1e8, 1e12} {
			got := w.StrongCollider(omega)
			s := &system{a: band.NewSym(n, n-1), loss: w.K, sqf: sqrtF(w, n)}
			for pr := range n {
				i := n - 1 - pr
				for d := 0; d <= pr; d++ {
					j := i + d // row pr, column pr−d is grain i+d
					v := -omega * s.sqf[i] * s.sqf[j]
					if d == 0 {
						v += omega + w.K[i]
					}
					*s.a.At(pr, d) = v
				}
			}
			want := bigEigen(s)
			if !scalar.EqualWithinRel(got, want, 1e-12) {
				t.Errorf("%v K, ω = %g: secular root %.15g, 256-bit %.15g", tK, omega, got, want)
			}
			ss := 0.0
			for i, f := range w.F {
				ss += f * w.K[i] * omega / (omega + w.K[i])
			}
			if ss > got*(1+1e-12) {
				t.Errorf("%v K, ω = %g: steady-state sum %.12g above the eigenvalue %.12g", tK, omega, ss, got)
			}
			if got/ss-1 > 1e-3 {
				parted++
			}
			t.Logf("%v K, ω = %g: k/ω = %.2g, eigenvalue/steady-state − 1 = %.2g, secular/256-bit − 1 = %.2g", tK, omega, got/omega, got/ss-1, got/want-1)
		}
	}
	if parted == 0 {
		t.Error("no case where k_uni/ω is large enough to part the eigenvalue from the steady-state sum")
	}
}

// High-pressure limit: k(T,P→∞) → canonical k∞(T) (exact limit of the master
// equation; the remaining difference is the grain error of kT/5 grains,
// about (1/5)²/24 ≈ 0.17 %), within 0.5 % for both models.
func TestHighPressureLimit(t *testing.T) {
	ch, r := testChannel(t, 90000)
	ts := &rrkm.Species{E0: 13300, Vibrations: []float64{3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280}}
	for _, tr := range []Transfer{{Strong: true}, {Alpha300: 300, Exponent: 0.8}} {
		for _, tK := range []float64{400, 1000, 1600} {
			p := testWell(t, ch, tr, tK, 0)
			k, err := p.rate(1e8 * p.w.K[p.w.N()-1])
			if err != nil {
				t.Fatal(err)
			}
			want := rrkm.KInf(r, ts, 1, tK)
			if !scalar.EqualWithinRel(k, want, 0.005) {
				t.Errorf("%v, %v K: k(P→∞) = %.6g, canonical k∞ = %.6g", tr, tK, k, want)
			}
		}
	}
}

// troeFactors returns Troe's ρ_vib,h(E0) (Whitten–Rabinovitch form without
// the derivative term) and F_E (Troe, J. Chem. Phys. 66, 4745, 1977, eqs. 9
// and 13): F_E = Σ_{ν=0}^{s−1} (s−1)!/(s−1−ν)!·(kT/(E0 + a(E0)E_z))^ν.
func troeFactors(freqs []float64, e0, tK float64) (rho, fe float64) {
	s := float64(len(freqs))
	var ez, m1, m2, lp float64
	for _, v := range freqs {
		ez += v / 2
		m1 += v
		m2 += v * v
		lp += math.Log(v)
	}
	m1, m2 = m1/s, m2/s
	beta := (s - 1) / s * m2 / (m1 * m1)
	x := e0 / ez
	var w float64
	if x < 1 {
		w = 1 / (5*x + 2.73*math.Sqrt(x) + 3.51)
	} else {
		w = math.Exp(-2.4191 * math.Pow(x, 0.25))
	}
	u := e0 + (1-beta*w)*ez
	lg, _ := math.Lgamma(s)
	rho = math.Exp((s-1)*math.Log(u) - lg - lp)
	term := 1.0
	for nu := 0; nu < int(s); nu++ {
		fe += term
		term *= (s - 1 - float64(nu)) * units.KT(tK) / u
	}
	return rho, fe
}

// Strong-collider k0 agrees with Troe's factorised formula (J. Chem. Phys.
// 66, 4745, 1977) k0^SC/Z = ρ(E0)·kT·e^(−E0/kT)·F_E/Q_vib with F_rot = F_anh = 1
// (no rotors, harmonic) and F_E from the same paper. The issue asks for 10 %;
// docs/design.md §10 expects well under 1 % from F_E alone, to which the
// Whitten–Rabinovitch density adds its own ~1 %.
func TestStrongColliderK0Troe(t *testing.T) {
	ch, r := testChannel(t, 90000)
	for _, tK := range []float64{500, 1000, 1500} {
		p := testWell(t, ch, Transfer{Strong: true}, tK, 0)
		got := p.w.StrongColliderK0()
		_, fe := troeFactors(r.Vibrations, ch.E0, tK)
		// ρ(E0) = dW/dE of the Whitten–Rabinovitch sum of states, which
		// the master equation's exact density should be compared with.
		_, rho := rrkm.WhittenRabinovitch(r.Vibrations, ch.E0)
		kt := units.KT(tK)
		want := rho * kt * math.Exp(-ch.E0/kt) * fe / r.VibrationalQ(tK)
		if !scalar.EqualWithinRel(got, want, 0.10) {
			t.Errorf("%v K: k0^SC/Z = %.5g, Troe %.5g (ratio %.3f)", tK, got, want, got/want)
		}
		t.Logf("%v K: ME/Troe k0^SC = %.4f", tK, got/want)
	}
}

// Low-pressure exponential-down against strong collider: k0(ED)/k0(SC) ≈ βc
// from Troe's βc/(1−βc^½) = −⟨ΔE⟩/(F_E·kT), ⟨ΔE⟩ = −α²/(α + F_E·kT) (Troe, J.
// Chem. Phys. 66, 4758, 1977), within 15 %.
func TestLowPressureCollisionEfficiency(t *testing.T) {
	ch, r := testChannel(t, 90000)
	cases := []struct{ tK, alpha float64 }{
		{600, 200}, {1000, 300}, {1000, 800}, {1500, 500},
	}
	for _, tc := range cases {
		tr := Transfer{Alpha300: tc.alpha}
		ed := testWell(t, ch, tr, tc.tK, 0)
		k0, _, err := ed.k0PerOmega()
		if err != nil {
			t.Fatal(err)
		}
		sc := ed.w.StrongColliderK0() // same grains
		_, fe := troeFactors(r.Vibrations, ch.E0, tc.tK)
		kt := units.KT(tc.tK)
		de := tc.alpha * tc.alpha / (tc.alpha + fe*kt)
		q := de / (fe * kt)
		x := (-q + math.Sqrt(q*q+4*q)) / 2 // x = sqrt(βc): x²/(1−x) = q
		betaC := x * x
		if got := k0 / sc; !scalar.EqualWithinRel(got, betaC, 0.15) {
			t.Errorf("T = %v K, α = %v: k0(ED)/k0(SC) = %.4f, Troe βc = %.4f", tc.tK, tc.alpha, got, betaC)
		} else {
			t.Logf("T = %v K, α = %v: k0(ED)/k0(SC) = %.4f, Troe βc = %.4f", tc.tK, tc.alpha, got, betaC)
		}
	}
}

// The banded solver agrees with the dense reference (gonum mat.EigenSym) to
// 1e-6 wherever the dense eigenvalue is accurate: its rounding error is about
// 1e-16·ω·n, so the test takes points with k_uni/ω > 1e-9.
func TestBandedMatchesDense(t *testing.T) {
	ch, _ := testChannel(t, 90000)
	for _, tK := range []float64{900, 1400} {
		p := testWell(t, ch, Transfer{Alpha300: 250, Exponent: 0.7}, tK, 0)
		for _, omega := range []float64{1e4, 1e6, 1e8, 1e10, 1e12} {
			s, err := p.w.Solve(p.kernel, omega)
			if err != nil {
				t.Fatal(err)
			}
			if s.K/omega < 1e-9 {
				continue
			}
			ev, _, err := p.w.DenseSolve(p.kernel.At, omega)
			if err != nil {
				t.Fatal(err)
			}
			if !scalar.EqualWithinRel(s.K, ev, 1e-6) {
				t.Errorf("%v K, ω = %g: banded %.10g, dense %.10g", tK, omega, s.K, ev)
			}
		}
	}
}

// MatrixSize, with which callers check a request before counting states,
// puts a grain edge on E0 as Run does and counts the banded kernel's
// entries: N grains × (band + 1), the band reaching where exp(−ΔE/α) falls
// below bandTolerance (16.1 α for 1e-7), one entry a grain for the strong
// collider.
func TestMatrixSize(t *testing.T) {
	const e0, ceiling = 14689.7, 60000.0
	tr := Transfer{Alpha300: 250}
	g, n := MatrixSize(tr, 300, 10, ceiling, e0)
	if edge := e0/g.Width - 0.5; math.Abs(edge-math.Round(edge)) > 1e-9 {
		t.Errorf("grain %v: E0 is not on a grain edge (E0/grain − ½ = %v)", g.Width, edge)
	}
	// The move changes the grain by less than 0.1 %: 5998 grains of 10.003
	// cm-1 reach 60000 cm-1.
	if want := float64(g.N) * math.Ceil(250*math.Log(1e7)/g.Width+1); n != want || g.N != 5998 {
		t.Errorf("%d grains, %v entries; want 5998 grains, %v entries", g.N, n, want)
	}
	gs, ns := MatrixSize(Transfer{Strong: true, Efficiency: 1}, 300, 10, ceiling, e0)
	if ns != float64(gs.N) {
		t.Errorf("strong collider: %v entries for %d grains", ns, gs.N)
	}
	// Automatic grain: min(α, kT)/5 before the move onto E0.
	if g, _ := MatrixSize(tr, 300, 0, ceiling, e0); math.Abs(g.Width/GrainFor(tr, 300)-1) > 0.01 {
		t.Errorf("automatic grain %v, GrainFor %v", g.Width, GrainFor(tr, 300))
	}
}
