package job

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// largeInput returns the input file of an INVENTED molecule of the given
// number of atoms (issue 14, item 9): 3N−6 frequencies drawn uniformly from
// 100–3200 cm⁻¹ with a fixed seed, a non-linear top, and a transition state
// that loses one mode and loosens those below 600 cm⁻¹ by 3 %, 45 kcal/mol
// above the reactant; Lennard-Jones data of a molecule of that size, argon,
// exponential-down. The numbers describe no real chemistry.
func largeInput(atoms int, temps, pressures string) []byte {
	rng := rand.New(rand.NewPCG(14, uint64(atoms)))
	vib := make([]string, 3*atoms-6)
	var ts []string
	for i := range vib {
		v := math.Round(100 + 3100*rng.Float64())
		vib[i] = fmt.Sprint(v)
		switch {
		case i == len(vib)/2: // the reaction coordinate
		case v < 600:
			ts = append(ts, fmt.Sprint(math.Round(0.97*v)))
		default:
			ts = append(ts, fmt.Sprint(v))
		}
	}
	return fmt.Appendf(nil, `title: Invented %d-atom molecule (invented data, issue 14 item 9)
molecules:
  big:
    mass: %g amu
    vibrations: {unit: cm-1, values: [%s]}
    rotation: {constants: {unit: cm-1, values: [0.010, 0.006, 0.005]}, symmetry: 1}
    lennard-jones: {sigma: 8.0 angstrom, epsilon: 600 K}
  big-TS:
    energy: 45 kcal/mol
    imaginary-frequency: 500 cm-1
    vibrations: {unit: cm-1, values: [%s]}
    rotation: {constants: {unit: cm-1, values: [0.009, 0.0055, 0.0048]}, symmetry: 1}
reaction:
  reactant: big
  via: big-TS
  products: [frag-a, frag-b]
  path-degeneracy: 1
bath:
  gas: Ar
energy-transfer:
  model: exponential-down
  alpha-300: 250 cm-1
  alpha-exponent: 0.85
grid:
  temperatures: %s
  pressures: %s
fits: [troe]
`, atoms, 7.0*float64(atoms), strings.Join(vib, ", "), strings.Join(ts, ", "), temps, pressures)
}

// largeGrid is the grid of the large-molecule tests: up to 2500 K, where the
// counts of the 150-atom molecule pass float64, and down to 1e-6 bar, where
// the hottest rows reach the low-pressure limit.
const (
	largeTemps     = "{unit: K, values: [300, 600, 1000, 1500, 2000, 2500]}"
	largePressures = "{unit: bar, values: [1e-6, 1e-3, 1, 100]}"
)

// Tolerances of the large-molecule tests.
const (
	// largeTSTTol bounds |k∞(ME)/k∞ − 1| and, where the highest pressure is
	// a million times the half pressure, |k(Pmax)/k∞ − 1|: the 0.5 % the
	// design allows the grain error of the TST identity (docs/design.md
	// §3); the ME grains are kT/5 wide, and the Boltzmann counts keep the
	// identity far tighter (measured below 1e-6).
	largeTSTTol = 5e-3
	// largeLowTol bounds 1 − k/(k0[M]) at 1e-6 bar and 2500 K, 1e-8 to
	// 1e-9 of the half pressure there, where k/[M] must have reached k0
	// (the Lindemann–Hinshelwood limit, approached at first order in [M];
	// measured 7e-5 for 100 atoms, 1e-9 for 150).
	largeLowTol = 1e-3
	// largeOrderTol is the relative rounding allowed when k must not
	// exceed an upper limit or fall with pressure (collision.limitTol).
	largeOrderTol = 1e-6
)

// Issue 14, item 9: molecules of 100 to 150 atoms run with the automatic
// energy grid. Before, the 150-atom molecule failed at 2500 K with
// "ill-conditioned matrix": its numbers of states passed 1.8e308 at the
// energies its thermal distribution reaches, the Boltzmann weights became
// NaN and the factorisation of the master equation failed; the counts are
// now kept scaled (rrkm.Counter.Scale). The results are checked against
// limits from outside the master equation: the high-pressure limit is
// canonical TST (Eyring 1935; the identity of Holbrook, Pilling & Robertson
// 1996, eq. 4.26), k rises with pressure and k/[M] falls, from below, to
// the low-pressure limit k0 computed apart (the absorbing-grain
// eigenproblem, collision.Well.LowPressure).
func TestLargeMoleculeRates(t *testing.T) {
	if testing.Short() {
		t.Skip("three molecules of 100-150 atoms counted to 1e6 cm-1")
	}
	for _, atoms := range []int{100, 120, 150} {
		t.Run(fmt.Sprintf("%d atoms", atoms), func(t *testing.T) {
			m, err := input.Parse(fmt.Sprintf("big%d.yaml", atoms), largeInput(atoms, largeTemps, largePressures))
			if err != nil {
				t.Fatal(err)
			}
			n, err := New(m)
			if err != nil {
				t.Fatal(err)
			}
			r, err := n.Rates(context.Background(), Options{SkipCheck: true, SkipHeldOut: true})
			if err != nil {
				t.Fatal(err)
			}
			nP := len(r.Pressures)
			worstTST, worstLow := 0.0, 0.0
			for i, tK := range r.Temperatures {
				if d := math.Abs(r.KInfIntegrated[i]/r.KInf[i] - 1); d > largeTSTTol {
					t.Errorf("%v K: k∞(ME)/k∞ = %.6f", tK, r.KInfIntegrated[i]/r.KInf[i])
				} else {
					worstTST = math.Max(worstTST, d)
				}
				if r.HalfPressure[i] < 1e-6*r.Pressures[nP-1] {
					if d := math.Abs(r.K[i][nP-1]/r.KInf[i] - 1); d > largeTSTTol {
						t.Errorf("%v K: k(%g Pa)/k∞ = %.6f, want 1 (p½ = %.3g Pa)", tK, r.Pressures[nP-1], r.K[i][nP-1]/r.KInf[i], r.HalfPressure[i])
					} else {
						worstTST = math.Max(worstTST, d)
					}
				}
				for j := 1; j < nP; j++ {
					if r.K[i][j] < r.K[i][j-1]*(1-largeOrderTol) {
						t.Errorf("%v K: k falls with pressure: %.6g s-1 at %g Pa, %.6g s-1 at %g Pa", tK, r.K[i][j-1], r.Pressures[j-1], r.K[i][j], r.Pressures[j])
					}
				}
				low := r.K[i][0] / (r.K0[i] * collision.Concentration(r.Pressures[0], tK))
				if low > 1+largeOrderTol {
					t.Errorf("%v K: k/(k0[M]) = %.9f at %g Pa, above the low-pressure limit", tK, low, r.Pressures[0])
				}
				if tK == 2500 {
					if 1-low > largeLowTol {
						t.Errorf("%v K: k/(k0[M]) = %.9f at %g Pa, want 1 (p½ = %.3g Pa)", tK, low, r.Pressures[0], r.HalfPressure[i])
					}
					worstLow = 1 - low
				}
			}
			t.Logf("worst |k∞ identity − 1| %.2g; 1 − k/(k0[M]) at 2500 K, 1e-6 bar: %.2g; grain %.4g cm-1, ceiling %.4g cm-1 at 2500 K",
				worstTST, worstLow, r.Grain[len(r.Grain)-1], r.Ceiling[len(r.Ceiling)-1])
		})
	}
}

// The banded inverse iteration and the dense reference (gonum's
// mat.EigenSym, collision.Well.DenseSolve) agree on the master equation of
// the 150-atom molecule at 2500 K, whose counts are scaled: the same k_uni
// by the flux identity, and the dense eigenvalue itself where k_uni/ω is
// far above its rounding. On a 1000 cm⁻¹ grain (760 grains) to keep the
// O(n³) reference fast; both solve the same matrix, so the grain does not
// matter to the comparison. Tolerances: the dense eigenvalue carries an
// absolute error of about ε·‖A‖ (Golub & Van Loan 2013, §8.1), ‖A‖ up to
// the largest k(E) on the grid, 1e4 times k_uni here: 1e-11 relative; the
// flux identity weights the dense eigenvector's rounding, about ε·‖A‖/gap
// in each component, by k(E) up to that size: 1e-8 (measured 6e-14 and
// 2e-9).
func TestLargeMoleculeBandedVsDense(t *testing.T) {
	if testing.Short() {
		t.Skip("dense eigendecomposition of 760 grains, three times")
	}
	const denseEigTol, denseFluxTol = 1e-11, 1e-8
	m, err := input.Parse("big150.yaml", largeInput(150, "{unit: K, values: [300, 2500]}", largePressures))
	if err != nil {
		t.Fatal(err)
	}
	n, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	ch, err := n.masterEquation(context.Background(), 0)
	if err != nil {
		t.Fatal(err)
	}
	if ch.Reactant.Scale() == 0 {
		t.Fatal("the counts of the 150-atom molecule are not scaled: the test no longer covers counts beyond float64")
	}
	const tK = 2500
	ceiling, err := collision.CeilingFor(ch, tK)
	if err != nil {
		t.Fatal(err)
	}
	g := rrkm.GrainsTo(1000, ceiling)
	w := collision.NewWell(rrkm.RRKM(ch.Reactant, ch.TS, ch.L, g), ch.Reactant, tK)
	k, err := collision.ExponentialDown(w, n.Transfer.Alpha(tK))
	if err != nil {
		t.Fatal(err)
	}
	for _, pBar := range []float64{1e-6, 1, 100} {
		omega := n.Collider.Z(tK) * collision.Concentration(pBar*units.BarPa, tK)
		s, err := w.Solve(k, omega)
		if err != nil {
			t.Fatalf("%g bar: banded: %v", pBar, err)
		}
		ev, flux, err := w.DenseSolve(k.At, omega)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(s.K/ev-1) > denseEigTol || math.Abs(s.K/flux-1) > denseFluxTol {
			t.Errorf("%g bar: banded k = %.12g s-1, dense %.12g (flux), %.12g (eigenvalue)", pBar, s.K, flux, ev)
		}
		t.Logf("%g bar (k/ω = %.3g): banded/dense − 1 = %.2g (flux), %.2g (eigenvalue)", pBar, s.K/omega, s.K/flux-1, s.K/ev-1)
	}
}

// Beyond what scaled counts hold (about 1e460 states; a molecule of 300
// atoms at 2000 K) New refuses the file before counting, naming the highest
// temperature, and the estimate behind it is checked against the count
// itself: counting to that temperature's automatic top fails with
// rrkm.ErrRange, and counting to the top of a temperature the hint says fits
// succeeds.
func TestLargeMoleculeBeyondRange(t *testing.T) {
	if testing.Short() {
		t.Skip("counts 894 oscillators to 1e6 cm-1")
	}
	m, err := input.Parse("big300.yaml", largeInput(300, "{unit: K, values: [300, 2000]}", largePressures))
	if err != nil {
		t.Fatal(err)
	}
	_, err = New(m)
	var fe *input.FieldError
	if !errors.As(err, &fe) || !errors.Is(err, rrkm.ErrRange) || fe.Path != m.TemperaturePath(1) {
		t.Fatalf("New: %v, want a *input.FieldError at %s wrapping rrkm.ErrRange", err, m.TemperaturePath(1))
	}
	t.Log(err)
	// The network itself, without the checks of New.
	nw := &Network{Model: m, Wells: []Well{{Name: "big", Molecule: m.Molecule("big")}}, Channels: channels(m), Transfer: transfer(m)}
	fine := m.EnergyGrid.Fine
	if _, err := rrkm.NewCounter(&nw.reactant().Species, fine, nw.countTopAt(0, 2000)); !errors.Is(err, rrkm.ErrRange) {
		t.Errorf("count to the 2000 K top: %v, want rrkm.ErrRange", err)
	}
	var fitsK float64
	if _, err := fmt.Sscanf(fe.Hint[strings.Index(fe.Hint, "fits up to ")+len("fits up to "):], "%g K", &fitsK); err != nil {
		t.Fatalf("hint %q: %v", fe.Hint, err)
	}
	if _, err := rrkm.NewCounter(&nw.reactant().Species, fine, nw.countTopAt(0, fitsK)); err != nil {
		t.Errorf("count to the %g K top, which the hint says fits: %v", fitsK, err)
	}
}

// states on the 150-atom molecule at 2500 K, whose counts pass float64
// (before, the Boltzmann sum of the counts came out NaN and states
// failed): the partition function from the counts, summed in log space,
// equals the analytic product of the factors (harmonic oscillators,
// classical rotor; McQuarrie 1976) to the grain error of 10 cm⁻¹ grains,
// (Δ/kT)²/8 ≤ 1.4e-4 at 300 K; the densities and sums are then reported
// as powers of ten, all finite.
func TestLargeMoleculeStates(t *testing.T) {
	if testing.Short() {
		t.Skip("counts a 150-atom molecule to 1e6 cm-1")
	}
	m, err := input.Parse("big150.yaml", largeInput(150, "{unit: K, values: [300, 2500]}", largePressures))
	if err != nil {
		t.Fatal(err)
	}
	n, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	res, err := n.States(ReportGrid{})
	if err != nil {
		t.Fatal(err)
	}
	for _, sp := range res.Species {
		for _, q := range sp.Q {
			if math.Abs(q.Counted/q.Q-1) > 2e-4 {
				t.Errorf("%s at %g K: Q(counts)/Q = %.8f", sp.Name, q.T, q.Counted/q.Q)
			}
		}
		if sp.Density != nil || len(sp.Log10Density) != len(sp.Energies) || len(sp.Log10SumStates) != len(sp.Energies) {
			t.Errorf("%s: densities beyond float64 should be given as log10 only", sp.Name)
		}
	}
}
