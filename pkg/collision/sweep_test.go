package collision

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"runtime"
	"slices"
	"sync"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// sweepMolecule is one generated reactant with its transition state.
type sweepMolecule struct {
	atoms    int
	e0Kcal   float64
	temps    []float64 // K, ascending
	pressPa  []float64 // Pa, ascending
	ed       Transfer
	col      Collider
	ch       Channel
	r, ts    *rrkm.Species
	describe string
}

// Sweep sizes: molecules × temperatures × pressures × 2 collision models
// grid points, at least the 10 000 cases the reliability plan asks for.
const (
	sweepMolecules    = 42
	sweepTemperatures = 4
	sweepPressures    = 30
)

// newSweepMolecule draws a non-linear molecule of 3–40 atoms with 3N−6
// harmonic modes log-uniform in 100–3300 cm⁻¹ and a rotational constant
// falling with size, a transition state that loses one mode (the reaction
// coordinate) and has its three lowest modes loosened or tightened by up to
// a factor 2, a barrier of 5–100 kcal/mol, temperatures in 200–3000 K,
// pressures in 1e-5–1e3 bar, and an exponential-down model with α300 in
// 100–800 cm⁻¹ and a temperature exponent in 0–1. The ranges are those of
// the reliability plan; the data are invented, and the checks below are
// facts of the theory, not values.
func newSweepMolecule(rng *rand.Rand) (sweepMolecule, error) {
	atoms := 3 + rng.IntN(38)
	vib := make([]float64, 3*atoms-6)
	for i := range vib {
		vib[i] = 100 * math.Exp(rng.Float64()*math.Log(33))
	}
	slices.Sort(vib)
	b := 12 * math.Pow(float64(atoms), -1.4)
	rot := []rrkm.Rotor{{Dim: 3, Consts: []float64{2 * b, b, 0.8 * b}, Symmetry: 1}}
	tsVib := slices.Clone(vib)
	cut := rng.IntN(len(tsVib))
	tsVib = slices.Delete(tsVib, cut, cut+1)
	f := math.Exp((rng.Float64()*2 - 1) * math.Ln2)
	for i := range min(3, len(tsVib)) {
		tsVib[i] = math.Max(tsVib[i]*f, 30)
	}
	tsRot := []rrkm.Rotor{{Dim: 3, Consts: []float64{2 * b * 0.9, b * 0.9, 0.8 * b * 0.9}, Symmetry: 1}}
	e0Kcal := 5 + 95*rng.Float64()
	e0 := e0Kcal * units.Cm1PerKcalPerMol

	temps := make([]float64, sweepTemperatures)
	for i := range temps {
		temps[i] = 200 + 2800*rng.Float64()
	}
	slices.Sort(temps)
	press := make([]float64, sweepPressures)
	for i := range press {
		press[i] = units.BarPa * math.Pow(10, -5+8*rng.Float64())
	}
	slices.Sort(press)

	ed := Transfer{Alpha300: 100 + 700*rng.Float64(), Exponent: rng.Float64()}
	mass := 12.0 * float64(atoms)
	col := Collider{LJ: Combine(LennardJones{Sigma: 3 + 0.1*float64(atoms), Epsilon: 150 + 10*float64(atoms)}, LennardJones{Sigma: 3.47, Epsilon: 114}),
		Mu: ReducedMass(mass, 39.95)}

	r := &rrkm.Species{Name: "R", Vibrations: vib, Rotors: rot}
	ts := &rrkm.Species{Name: "TS", Vibrations: tsVib, Rotors: tsRot, E0: e0}
	top := CeilingBound(r, ts, e0, temps[len(temps)-1]) + 12*units.KT(temps[len(temps)-1])
	const fine = 2 // cm⁻¹, below the finest master-equation grain drawn
	rc, err := rrkm.NewCounter(r, fine, top)
	if err != nil {
		return sweepMolecule{}, err
	}
	tc, err := rrkm.NewCounter(ts, fine, top-e0)
	if err != nil {
		return sweepMolecule{}, err
	}
	return sweepMolecule{atoms: atoms, e0Kcal: e0Kcal, temps: temps, pressPa: press, ed: ed, col: col,
		ch: Channel{Reactant: rc, TS: tc, L: 1, E0: e0, Name: "sweep"}, r: r, ts: ts,
		describe: fmt.Sprintf("%d atoms, E0 %.1f kcal/mol, α300 %.0f cm-1, n %.2f", atoms, e0Kcal, ed.Alpha300, ed.Exponent)}, nil
}

// TestPhysicsSweep runs the master equation on generated molecules over the
// whole range a mechanism may ask for and checks at every grid point facts
// that hold for any molecule (Gilbert & Smith 1990, "Theory of
// Unimolecular and Recombination Reactions", ch. 5; Holbrook, Pilling &
// Robertson 1996, ch. 4):
//
//   - every k, k∞, k0 and falloff centre is finite and positive;
//   - k(T,P) does not decrease with pressure (to rounding, 1e-9);
//   - k(T,P) ≤ the high-pressure limit on the same grains, Σ F·k(E) (to
//     rounding, 1e-9), and that limit equals canonical TST k∞ within the
//     grain error (gridTol);
//   - k/[M] does not increase with pressure and stays at or below k0
//     (1e-9), and at a collision frequency 1e-7 of the smallest reactive
//     k(E) k/ω equals the low-pressure limit k0/ω within 1e-5 (the
//     deviation is of order ω/k);
//   - on the same grains and at the same collision rate the exponential-down
//     k is at most the strong-collider k (the strong collider is the upper
//     bound for thermal dissociation at a given collision rate; Troe 1977,
//     J. Chem. Phys. 66, 4745), to 1e-9;
//   - results are bit-identical whatever the number of worker goroutines.
func TestPhysicsSweep(t *testing.T) {
	if testing.Short() {
		t.Skip("about a minute on two cores; CI runs it (go test without -short)")
	}
	var mu sync.Mutex
	cases, worstGrid := 0, 0.0
	var wg sync.WaitGroup
	sem := make(chan struct{}, runtime.GOMAXPROCS(0))
	for m := range sweepMolecules {
		wg.Go(func() {
			sem <- struct{}{}
			defer func() { <-sem }()
			n, worst := sweepOne(t, m)
			mu.Lock()
			cases += n
			worstGrid = math.Max(worstGrid, worst)
			mu.Unlock()
		})
	}
	wg.Wait()
	t.Logf("%d cases (molecule, T, P, model); worst Σ F·k vs canonical k∞ %.2g %%", cases, 100*worstGrid)
	if cases < 10000 {
		t.Errorf("only %d cases", cases)
	}
}

// sweepOne checks molecule m (its own seeded generator, so molecules can run
// in parallel) and returns the number of grid points checked and the worst
// grain error of the high-pressure limit.
func sweepOne(t *testing.T, m int) (cases int, worstGrid float64) {
	// gridTol is the grain error of Σ F·k(E) against canonical k∞ on the
	// automatic grain (≤ kT/5, threshold on a grain edge): the identity is
	// exact in the limit of fine grains.
	const gridTol = 0.02
	const round = 1e-9
	mol, err := newSweepMolecule(rand.New(rand.NewPCG(2026, uint64(m))))
	if err != nil {
		t.Errorf("molecule %d: %v", m, err)
		return 0, 0
	}
	name := fmt.Sprintf("molecule %d (%s)", m, mol.describe)
	for _, tK := range mol.temps {
		grain := GrainFor(mol.ed, tK)
		var rows [2]TemperatureResult
		for i, tr := range []Transfer{mol.ed, {Strong: true}} {
			res, err := Run(mol.ch, mol.col, tr, []float64{tK}, mol.pressPa, Options{Grain: grain, Jobs: 1, SkipConvergence: true})
			if err != nil {
				t.Errorf("%s, %s, T = %.0f K: %v", name, tr, tK, err)
				return cases, worstGrid
			}
			rows[i] = res.Rows[0]
		}
		for i, row := range rows {
			where := fmt.Sprintf("%s, T = %.0f K, %s", name, tK, [2]string{"exponential-down", "strong collider"}[i])
			kinf := rrkm.KInf(mol.r, mol.ts, 1, tK)
			for _, x := range []float64{kinf, row.KInfME, row.K0, row.HalfPressure, row.Z} {
				if !(x > 0) || math.IsInf(x, 0) {
					t.Errorf("%s: k∞ %v, Σ F·k %v, k0 %v, centre %v, Z %v: not finite and positive", where, kinf, row.KInfME, row.K0, row.HalfPressure, row.Z)
					return cases, worstGrid
				}
			}
			d := math.Abs(row.KInfME/kinf - 1)
			worstGrid = math.Max(worstGrid, d)
			if d > gridTol {
				t.Errorf("%s: Σ F·k %.6g vs canonical k∞ %.6g (%.2g %%)", where, row.KInfME, kinf, 100*d)
			}
			prev, prevPerM := 0.0, math.Inf(1)
			for j, k := range row.K {
				cases++
				perM := k / (row.Z * Concentration(mol.pressPa[j], tK)) // cm³ molecule⁻¹ s⁻¹
				switch {
				case !(k > 0) || math.IsInf(k, 0):
					t.Errorf("%s, P = %.3g Pa: k = %v", where, mol.pressPa[j], k)
				case k < prev*(1-round):
					t.Errorf("%s, P = %.3g Pa: k %.10g below %.10g at the lower pressure", where, mol.pressPa[j], k, prev)
				case k > row.KInfME*(1+round):
					t.Errorf("%s, P = %.3g Pa: k %.10g above the high-pressure limit %.10g", where, mol.pressPa[j], k, row.KInfME)
				case perM > prevPerM*(1+round) || perM > row.K0/row.Z*(1+round):
					t.Errorf("%s, P = %.3g Pa: k/ω %.10g rises with pressure or exceeds k0/Z %.10g", where, mol.pressPa[j], perM, row.K0/row.Z)
				}
				prev, prevPerM = k, perM
			}
		}
		for j := range rows[0].K {
			if rows[0].K[j] > rows[1].K[j]*(1+round) {
				t.Errorf("%s, T = %.0f K, P = %.3g Pa: exponential-down k %.10g above strong-collider %.10g", name, tK, mol.pressPa[j], rows[0].K[j], rows[1].K[j])
			}
		}
	}
	if m%10 == 0 {
		checkLowPressureLimit(t, name, mol)
		checkJobs(t, name, mol)
	}
	return cases, worstGrid
}

// checkLowPressureLimit compares k/ω at ω = 1e-7 of the smallest reactive
// k(E) with the low-pressure limit, for both models, at the lowest and
// highest temperature.
func checkLowPressureLimit(t *testing.T, name string, mol sweepMolecule) {
	t.Helper()
	for _, tK := range []float64{mol.temps[0], mol.temps[len(mol.temps)-1]} {
		for _, tr := range []Transfer{mol.ed, {Strong: true}} {
			p, err := prepare(mol.ch, tr, tK, 0, 0)
			if err != nil {
				t.Error(err)
				return
			}
			kmin := math.Inf(1)
			for _, k := range p.w.K {
				if k > 0 {
					kmin = math.Min(kmin, k)
				}
			}
			omega := 1e-7 * kmin
			k, err := p.rate(omega)
			if err != nil {
				t.Error(err)
				return
			}
			k0, _, err := p.k0PerOmega()
			if err != nil {
				t.Error(err)
				return
			}
			if d := math.Abs(k/omega/k0 - 1); d > 1e-5 {
				t.Errorf("%s, %s, T = %.0f K: k/ω %.10g at ω = %.3g s-1 vs k0/ω %.10g (%.2g)", name, tr, tK, k/omega, omega, k0, d)
			}
		}
	}
}

// checkJobs runs the molecule's whole grid with one worker and with three
// and requires identical results.
func checkJobs(t *testing.T, name string, mol sweepMolecule) {
	t.Helper()
	var out [2]*Result
	for i, jobs := range []int{1, 3} {
		r, err := Run(mol.ch, mol.col, mol.ed, mol.temps, mol.pressPa, Options{Jobs: jobs, SkipConvergence: true})
		if err != nil {
			t.Errorf("%s: %v", name, err)
			return
		}
		out[i] = r
	}
	if !reflect.DeepEqual(out[0].Rows, out[1].Rows) { // Convergence is NaN (skipped)
		t.Errorf("%s: results differ between 1 and 3 workers", name)
	}
}
