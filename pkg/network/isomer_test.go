package network

import (
	"fmt"
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// point is one (T, ω) of a test.
type point struct{ tK, omega float64 }

func (p point) String() string { return fmt.Sprintf("%gK/%g", p.tK, p.omega) }

// twoWellPoints span 700–1300 K and ω = 1e6–1e12 s⁻¹ (about 1e-3 to 1e3 bar
// for a collision rate constant of 3e-10 cm³ s⁻¹), leaving out 1300 K below
// 1e10 s⁻¹, where A ⇌ B is too fast beside energy relaxation (separation
// 0.19 and more, measured) for a rate coefficient.
var twoWellPoints = []point{{700, 1e6}, {700, 1e9}, {700, 1e12}, {1000, 1e6}, {1000, 1e9}, {1000, 1e12}, {1300, 1e10}, {1300, 1e12}}

// eqTol is the agreement of k(A→B)/k(B→A) with the equilibrium constant:
// for two wells without exits it is exact algebra (one chemical mode is the
// equilibrium distribution, so Y = [[x_A, y], [x_B, −y]] and K = Y·Λ·Y⁻¹
// gives k_f/k_r = x_B/x_A identically), so only rounding is left; 1e-6 is
// the tolerance.
const eqTol = 1e-6

// TestEquilibriumConstant: for A ⇌ B without exits, k(A→B)/k(B→A) equals the
// equilibrium constant Q_B/Q_A from the counted partition functions
// Σ N·exp(−E/kT) with the common zero (rrkm.CountedQ on each well's counts,
// B's shifted by its zero-point offset), and so do the equilibrium
// fractions; the conserved mode is exactly 0. Both collision models.
func TestEquilibriumConstant(t *testing.T) {
	na, nb := wellCounts(t, spA, offA), wellCounts(t, spB, offB)
	worst := 0.0
	for _, tr := range []collision.Transfer{{Strong: true}, expDown} {
		net := twoWells(t, tr)
		for _, p := range twoWellPoints {
			t.Run(fmt.Sprintf("%v/%v", tr, p), func(t *testing.T) {
				res, err := Solve(net, p.tK, p.omega, Options{})
				if err != nil {
					t.Fatal(err)
				}
				keq := rrkm.CountedQ(nb, testGrid, p.tK) / rrkm.CountedQ(na, testGrid, p.tK)
				kf, kr := res.K[1][0], res.K[0][1]
				for _, c := range []struct {
					what string
					got  float64
				}{{"k(A→B)/k(B→A)", kf / kr}, {"x_B/x_A", res.Equilibrium[1] / res.Equilibrium[0]}} {
					d := math.Abs(c.got/keq - 1)
					worst = math.Max(worst, d)
					if d > eqTol {
						t.Errorf("%s = %.10g, Q_B/Q_A = %.10g (relative %.2g, tolerance %g)", c.what, c.got, keq, d, eqTol)
					}
				}
				if res.Conserved != 1 || res.Eigenvalues[0] != 0 {
					t.Errorf("conserved modes %d, first eigenvalue %v; want 1 and 0", res.Conserved, res.Eigenvalues[0])
				}
				// The chemical eigenvalue is −(k_f + k_r) (two-state kinetics):
				// the flux-form K against the dense eigenvalue, to the
				// latter's rounding bound.
				if d := math.Abs((kf+kr)/-res.Eigenvalues[1] - 1); d > 10*res.Roundoff+1e-12 {
					t.Errorf("k_f + k_r = %.10g, −λ1 = %.10g (relative %.2g, Roundoff %.2g)", kf+kr, -res.Eigenvalues[1], d, res.Roundoff)
				}
			})
		}
	}
	t.Logf("largest relative deviation from Q_B/Q_A: %.2g", worst)
}

// TestEquilibriumConstantAnalytic: the counted Q_B/Q_A of the test grid
// agrees with the analytic one, InternalQ_B/InternalQ_A·exp(−ΔE/kT)
// (harmonic oscillators, classical rotors; rrkm.Species.InternalQ), to the
// grain error of the counted partition functions, O((Δ/kT)²) with
// Δ = 200 cm⁻¹ (rrkm.CountedQ; (Δ/kT)²/24 = 0.7 % at 700 K for one
// function, mostly cancelling in the ratio of two similar molecules):
// tolerance 0.2 %, measured 0.034 %.
// It checks that the common zero and the offsets are put where they
// belong.
func TestEquilibriumConstantAnalytic(t *testing.T) {
	const tol = 2e-3
	net := twoWells(t, expDown)
	worst := 0.0
	defer func() { t.Logf("largest relative deviation: %.2g", worst) }()
	for _, p := range twoWellPoints {
		res, err := Solve(net, p.tK, p.omega, Options{})
		if err != nil {
			t.Fatal(err)
		}
		want := spB.InternalQ(p.tK) / spA.InternalQ(p.tK) * math.Exp(-offB/units.KT(p.tK))
		got := res.K[1][0] / res.K[0][1]
		worst = math.Max(worst, math.Abs(got/want-1))
		if math.Abs(got/want-1) > tol {
			t.Errorf("%v: k_f/k_r = %.6g, analytic K = %.6g (relative %.2g, tolerance %g)", p, got, want, math.Abs(got/want-1), tol)
		}
	}
}

// TestHighPressureLimit: as ω → ∞ every well stays Boltzmann, so k(A→B)
// tends to the thermal average of k_AB(E) over A's grains (rrkm.Micro's
// ThermalK, an exact limit on the grid) and to canonical TST (rrkm.KInf)
// within the grain error of the k(E) average, 0.5 % as in pkg/collision's
// high-pressure test; k(B→A) likewise to TST over B (the transition state's
// threshold measured from B's zero-point level). The falloff deficit falls
// as 1/ω but is large for its k(E)/ω: at 1300 K the flux crosses at
// k(E) = 1e9–3e10 s⁻¹ while a collision moves only about α = 800 cm⁻¹, so
// many collisions refill a grain; measured 7 % at ω = 1e13 s⁻¹ and 0.85 %
// at 1e14 s⁻¹. The limit is therefore taken at ω = 1e16 s⁻¹ (an
// unphysical pressure, a limit only), where the deficit is below 1e-4:
// tolerance 1e-3 against the thermal average. The dense solve's rounding bound is
// then 5e-5 at 700 K (the rate coefficients measured far more precise).
func TestHighPressureLimit(t *testing.T) {
	const omega = 1e16
	m := rrkm.RRKM(counter(t, spA, offA), counter(t, tsAB, tsAB.E0), 1, testGrid)
	tsFromB := *tsAB
	tsFromB.E0 -= offB
	net := twoWells(t, expDown)
	for _, tK := range []float64{700, 1000, 1300} {
		res, err := Solve(net, tK, omega, Options{})
		if err != nil {
			t.Fatal(err)
		}
		kf, kr := res.K[1][0], res.K[0][1]
		for _, c := range []struct {
			what      string
			got, want float64
			tol       float64
		}{
			{"k(A→B) vs thermal average", kf, m.ThermalK(tK), 1e-3},
			{"k(A→B) vs canonical TST", kf, rrkm.KInf(spA, tsAB, 1, tK), 5e-3},
			{"k(B→A) vs canonical TST", kr, rrkm.KInf(spB, &tsFromB, 1, tK), 5e-3},
		} {
			if d := math.Abs(c.got/c.want - 1); d > c.tol {
				t.Errorf("%g K: %s: %.6g s-1, want %.6g (relative %.2g, tolerance %g)", tK, c.what, c.got, c.want, d, c.tol)
			} else {
				t.Logf("%g K: %s: relative %.2g", tK, c.what, d)
			}
		}
	}
}

// balanceTol is the rounding allowance in detailed balance (relative): the
// two-well cases are exact algebra (see eqTol), measured 1.8e-8 at most
// (the rounding of the computed equilibrium eigenvector).
const balanceTol = 1e-6

// TestDetailedBalance: K_ji·x_i = K_ij·x_j for every pair of wells at every
// point. For two wells without exits it is exact (to 1e-6, the issue's
// tolerance). With three wells, and with exits, the CSE rate coefficients
// K = Y·Λ·Y⁻¹ obey it only up to the non-orthogonality of the chemical
// modes' well projections G = ZᵀZ (see rates): the asymmetry of
// sqrt(x)⁻¹·K·sqrt(x) is Z·(Λ·G⁻¹ − G⁻¹·Λ)·Zᵀ, whose entries are bounded by
// Overlap·Σ_{k≠l}|λ_k − λ_l| (|Z_jk| ≤ sqrt(G_kk), |G⁻¹_kl| ≤
// Overlap/sqrt(G_kk·G_ll) to first order; 1 % added for the second). That
// bound is checked there, and that the departure vanishes in the
// high-pressure limit, where every well is thermal (ω = 1e14 s⁻¹ at
// 700 K: 1e-6).
func TestDetailedBalance(t *testing.T) {
	check := func(t *testing.T, res *Result, bound bool) float64 {
		worst := 0.0
		n := len(res.K)
		spread := 0.0
		for k := range n {
			for l := range n {
				spread += math.Abs(res.Eigenvalues[k] - res.Eigenvalues[l])
			}
		}
		for i := range n {
			for j := range i {
				a := res.K[j][i] * res.Equilibrium[i]
				b := res.K[i][j] * res.Equilibrium[j]
				d := math.Abs(a - b)
				rel := d / math.Max(a, b)
				worst = math.Max(worst, rel)
				tol := balanceTol * math.Max(a, b)
				if bound {
					tol += 1.01 * res.Overlap * spread * math.Sqrt(res.Equilibrium[i]*res.Equilibrium[j])
				}
				if d > tol {
					t.Errorf("%s→%s: K·x = %.10g, reverse %.10g (relative %.2g; Overlap %.2g)", res.Wells[i], res.Wells[j], a, b, rel, res.Overlap)
				}
			}
		}
		if math.Abs(worst-res.Balance) > 1e-6*worst+1e-12 {
			t.Errorf("Result.Balance = %.4g, measured %.4g", res.Balance, worst)
		}
		return worst
	}
	t.Run("two wells", func(t *testing.T) {
		worst := 0.0
		for _, tr := range []collision.Transfer{{Strong: true}, expDown} {
			net := twoWells(t, tr)
			for _, p := range twoWellPoints {
				res, err := Solve(net, p.tK, p.omega, Options{})
				if err != nil {
					t.Fatal(err)
				}
				worst = math.Max(worst, check(t, res, false))
			}
		}
		t.Logf("largest departure: %.2g", worst)
	})
	t.Run("three wells", func(t *testing.T) {
		if testing.Short() {
			t.Skip("three-well sweep (2 s) in -short")
		}
		withoutExits := threeWells(t, expDown)
		withoutExits.Exits = nil
		for _, c := range []struct {
			name string
			net  *Network
		}{{"exits", threeWells(t, expDown)}, {"no exit", withoutExits}} {
			worst := 0.0
			for _, p := range []point{{700, 1e10}, {1000, 1e6}, {1000, 1e9}, {1000, 1e12}, {1300, 1e10}, {1300, 1e12}} {
				res, err := Solve(c.net, p.tK, p.omega, Options{})
				if err != nil {
					t.Fatal(err)
				}
				worst = math.Max(worst, check(t, res, true))
			}
			res, err := Solve(c.net, 700, 1e14, Options{MaxRoundoff: 1e-3})
			if err != nil {
				t.Fatal(err)
			}
			hp := check(t, res, false)
			if hp > balanceTol {
				t.Errorf("%s: high-pressure limit departs by %.2g", c.name, hp)
			}
			t.Logf("%s: largest departure %.2g; %.2g in the high-pressure limit", c.name, worst, hp)
		}
	})
}

// TestConservation: the columns of K and K_exit together sum to zero (each
// well's loss is the others' and the products' gain), exact in the flux
// form but for rounding: 1e-12 of the diagonal.
func TestConservation(t *testing.T) {
	net := threeWells(t, expDown)
	worst := 0.0
	defer func() { t.Logf("largest column sum: %.2g of the diagonal", worst) }()
	for _, p := range []point{{1000, 1e6}, {1000, 1e10}} {
		res, err := Solve(net, p.tK, p.omega, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for i := range res.K {
			s := 0.0
			for j := range res.K {
				s += res.K[j][i]
			}
			for x := range res.KExit {
				s += res.KExit[x][i]
			}
			worst = math.Max(worst, math.Abs(s/res.K[i][i]))
			if math.Abs(s) > 1e-12*math.Abs(res.K[i][i]) {
				t.Errorf("%v: column %s sums to %.3g s-1 (diagonal %.4g)", p, res.Wells[i], s, res.K[i][i])
			}
		}
	}
}
