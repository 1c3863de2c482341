package uncertainty

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"reflect"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// load parses the test input at path with its uncertainty: section
// replaced by section (unless section is "") and builds its network.
func load(t testing.TB, path, section string) (*job.Network, []input.Uncertain) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	if section != "" {
		text = text[:strings.Index(text, "uncertainty:")] + section
	}
	return parse(t, path, text)
}

// parse builds the network and the uncertain values of an input text.
func parse(t testing.TB, name, text string) (*job.Network, []input.Uncertain) {
	t.Helper()
	m, err := input.Parse(name, []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	us, _, err := m.Uncertainty()
	if err != nil {
		t.Fatal(err)
	}
	n, err := job.New(m)
	if err != nil {
		t.Fatal(err)
	}
	return n, us
}

func runT(t testing.TB, n *job.Network, us []input.Uncertain, opt Options) *Result {
	t.Helper()
	res, err := Run(context.Background(), n, us, opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// z975 is the 97.5 % quantile of the standard normal distribution.
const z975 = 1.959963984540054

// samples picks the Monte Carlo sample count: full, or the -short one.
func samples(full, short int) int {
	if testing.Short() {
		return short
	}
	return full
}

// With every uncertainty of zero width each sample is the nominal model,
// so the band collapses onto the nominal result exactly (an exact limit:
// the quantiles of equal numbers are that number), and the nominal result
// is the rates run's k(T,P), k∞ and k0 number for number (the same counts,
// grain and ceiling; job.Network.Solve's contract).
func TestZeroUncertaintyCollapses(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", `uncertainty:
  molecules.small-TS.energy: {sd: 0 kcal/mol}
  energy-transfer.alpha-300: {factor: 1}
  energy-transfer.alpha-exponent: {from: 0.7, to: 0.7}
  molecules.small.lennard-jones.sigma: {plus-minus: 0 angstrom, distribution: uniform}
  frequency-scale: {sd: 0}
`)
	res := runT(t, n, us, Options{Samples: samples(16, 6), Seed: 3, SkipSensitivities: true})
	rates, err := n.Rates(context.Background(), job.Options{SkipCheck: true, SkipHeldOut: true})
	if err != nil {
		t.Fatal(err)
	}
	exact := func(what string, b Band, want float64) {
		t.Helper()
		if b.Median != want || b.Low != want || b.High != want || b.F != 1 {
			t.Errorf("%s: band %+v, nominal %v: not collapsed", what, b, want)
		}
	}
	for i, tK := range res.Temperatures {
		for j := range res.Pressures {
			exact(fmt.Sprintf("k(%g K, P[%d])", tK, j), res.K[i][j], rates.K[i][j])
			if res.SDLnK[i][j] != 0 {
				t.Errorf("sd of ln k at %g K, P[%d] = %g, want 0", tK, j, res.SDLnK[i][j])
			}
		}
		exact(fmt.Sprintf("k∞(%g K)", tK), res.KInf[i], rates.KInf[i])
		exact(fmt.Sprintf("k0(%g K)", tK), res.K0[i], rates.K0[i])
	}
	if !res.ReusedCounts {
		t.Error("zero-width values: the nominal counts should serve every sample")
	}
}

// For a small barrier uncertainty σ the high-pressure limit is lognormal
// with sd(ln k∞) = σ/RT exactly: canonical TST k∞ ∝ exp(−E0/RT) and the
// partition functions do not depend on E0 (transition-state theory;
// Holbrook, Pilling & Robertson, Unimolecular Reactions, 1996, ch. 4).
// The Monte Carlo estimates carry sampling errors, against which the
// tolerances are three standard errors at the sample count used (normal
// sampling theory, Stuart & Ord, Kendall's Advanced Theory of Statistics,
// vol. 1, §10.5 and §10.10):
//
//   - the sample sd: relative standard error 1/sqrt(2(N−1));
//   - ln f = (q97.5 − q2.5)/2 against 1.96σ/RT: each quantile has
//     variance p(1−p)/(N·φ(1.96)²)·s², so ln f has relative standard
//     error sqrt(p(1−p))/(φ(1.96)·1.96·sqrt(2N)) = 0.964/sqrt(N);
//   - the median of ln k∞ against the nominal: standard error
//     sqrt(π/2)·s/sqrt(N).
func TestBarrierLognormalHighPressure(t *testing.T) {
	const sigmaKcal = 0.3 // small: 0.1 to 0.2 in ln k at these temperatures
	n, us := load(t, "testdata/small.yaml", fmt.Sprintf("uncertainty:\n  molecules.small-TS.energy: {sd: %g kcal/mol}\n", sigmaKcal))
	N := samples(400, 60)
	res := runT(t, n, us, Options{Samples: N, Seed: 11, SkipSensitivities: true})
	const phi = 0.05844094433345147 // standard normal density at 1.959964
	const p = 0.025
	for i, tK := range res.Temperatures {
		rt := units.KT(tK) / units.Cm1PerKcalPerMol // RT in kcal/mol
		want := sigmaKcal / rt
		seSD := 3 / math.Sqrt(2*float64(N-1))
		if got := res.SDLnKInf[i]; math.Abs(got/want-1) > seSD {
			t.Errorf("%g K: sd(ln k∞) = %.5g, σ/RT = %.5g (relative %.3g, 3 SE = %.3g)", tK, got, want, got/want-1, seSD)
		} else {
			t.Logf("%g K: sd(ln k∞) = %.5g, σ/RT = %.5g (relative %+.3g, 3 SE %.3g)", tK, got, want, got/want-1, seSD)
		}
		b := res.KInf[i]
		lnF, wantF := math.Log(b.F), z975*want
		seF := 3 * math.Sqrt(p*(1-p)) / (phi * z975 * math.Sqrt(2*float64(N)))
		if math.Abs(lnF/wantF-1) > seF {
			t.Errorf("%g K: ln f(k∞) = %.5g, 1.96σ/RT = %.5g (relative %.3g, 3 SE = %.3g)", tK, lnF, wantF, lnF/wantF-1, seF)
		} else {
			t.Logf("%g K: ln f(k∞) = %.5g, 1.96σ/RT = %.5g (relative %+.3g, 3 SE %.3g)", tK, lnF, wantF, lnF/wantF-1, seF)
		}
		seMed := 3 * math.Sqrt(math.Pi/2) * want / math.Sqrt(float64(N))
		if d := math.Log(b.Median / res.NominalKInf[i]); math.Abs(d) > seMed {
			t.Errorf("%g K: ln(median/nominal k∞) = %.3g, beyond 3 SE = %.3g", tK, d, seMed)
		} else {
			t.Logf("%g K: ln(median/nominal k∞) = %+.3g (3 SE %.3g)", tK, d, seMed)
		}
	}
}

// The barrier's sensitivity of canonical k∞ is −1/RT per kcal/mol exactly
// (TST, as above); ln k∞ is linear in E0, so the central difference is
// exact to rounding: 1e-9 relative allows for the rounding of ln k∞
// (about 30 × 1e-16) over a step of 0.03 kcal/mol.
func TestBarrierSensitivityKInf(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", "uncertainty:\n  molecules.small-TS.energy: {sd: 1 kcal/mol}\n")
	res := runT(t, n, us, Options{Samples: 1, Seed: 1})
	for i, tK := range res.Temperatures {
		want := -units.Cm1PerKcalPerMol / units.KT(tK)
		if got := res.Sensitivities[0].KInf[i]; !scalar.EqualWithinRel(got, want, 1e-9) {
			t.Errorf("%g K: dln k∞/dE0 = %.12g per kcal/mol, −1/RT = %.12g", tK, got, want)
		}
	}
}

// Local sensitivities with the default step agree with a run whose step
// is ten times smaller (1e-4). Central differences err by O(h²) ≈ 1e-6;
// what the comparison can see is the master equation's own grain (its
// edge moves with E0, its width with α): measured 1.6e-4 of the largest
// coefficient for the barrier, 2e-3 for k0 (at 700 K, where k0 comes from
// the few grains near E0). The tolerances, 1e-3 for k and k∞ and 5e-3 for
// k0, sit above those and far below any change of the physics.
func TestSensitivityStep(t *testing.T) {
	path := "testdata/ring.yaml"
	if testing.Short() {
		path = "testdata/small.yaml"
	}
	n, us := load(t, path, "")
	coarse := runT(t, n, us, Options{Samples: 1, Seed: 1})
	fine := runT(t, n, us, Options{Samples: 1, Seed: 1, Step: 1e-4})
	for i, sc := range coarse.Sensitivities {
		sf := fine.Sensitivities[i]
		compare := func(what string, a, b []float64, tol float64) {
			scale, worst := 0.0, 0.0
			for _, x := range a {
				scale = math.Max(scale, math.Abs(x))
			}
			for k := range a {
				d := math.Abs(a[k] - b[k])
				if scale > 0 {
					worst = math.Max(worst, d/scale)
				}
				if d > tol*scale {
					t.Errorf("%s, %s[%d]: step 1e-3 gives %.8g, step 1e-4 %.8g (difference %.2g of the largest %.3g)", sc.Path, what, k, a[k], b[k], d/scale, scale)
				}
			}
			t.Logf("%s, %s: largest difference %.2g of the largest coefficient", sc.Path, what, worst)
		}
		var ka, kb []float64
		for it := range sc.K {
			ka, kb = append(ka, sc.K[it]...), append(kb, sf.K[it]...)
		}
		compare("k", ka, kb, 1e-3)
		compare("k∞", sc.KInf, sf.KInf, 1e-3)
		compare("k0", sc.K0, sf.K0, 5e-3)
	}
}

// Collision parameters leave the high-pressure limit alone: canonical k∞
// does not depend on ⟨ΔE⟩down or the Lennard-Jones σ, so its sensitivity
// to them is zero exactly. The low-pressure limit is proportional to the
// collision rate Z ∝ σ² with σ = (σ_r + σ_bath)/2 (Hirschfelder, Curtiss &
// Bird 1954 combining rule; Ω(2,2)* depends on ε alone, Neufeld, Janzen &
// Aziz 1972), so ∂ln k0/∂ln σ_r = 2σ_r/(σ_r + σ_bath); the central
// difference of 2 ln(σ_r + σ_b) in ln σ_r errs by O(h²) ≈ 1e-7, and k0 is
// Z times a sum that does not see σ: tolerance 1e-6.
func TestCollisionSensitivities(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", `uncertainty:
  energy-transfer.alpha-300: {factor: 2}
  molecules.small.lennard-jones.sigma: {sd: 0.3 angstrom}
`)
	res := runT(t, n, us, Options{Samples: 2, Seed: 1})
	if !res.ReusedCounts {
		t.Error("collisional values only: the samples should keep the nominal counts")
	}
	for _, s := range res.Sensitivities {
		for i, x := range s.KInf {
			if x != 0 {
				t.Errorf("%s: dln k∞ at %g K = %g, want 0", s.Path, res.Temperatures[i], x)
			}
		}
	}
	sr, sb := 4.5, n.Bath.Sigma // Å: the file's σ of the reactant, Ar's from the table
	want := 2 * sr / (sr + sb)
	for i, x := range res.Sensitivities[1].K0 {
		if !scalar.EqualWithinRel(x, want, 1e-6) {
			t.Errorf("%g K: dln k0/dln σ = %.9g, 2σ_r/(σ_r+σ_b) = %.9g", res.Temperatures[i], x, want)
		}
	}
}

// troeFE returns Troe's F_E (J. Chem. Phys. 66, 4745, 1977, eqs. 9 and 13):
// F_E = Σ_{ν=0}^{s−1} (s−1)!/(s−1−ν)!·(kT/(E0 + a(E0)E_z))^ν, with the
// Whitten–Rabinovitch a(E0) (J. Chem. Phys. 38, 2466, 1963), as
// pkg/collision's test of βc computes it.
func troeFE(freqs []float64, e0, tK float64) float64 {
	s := float64(len(freqs))
	var ez, m1, m2 float64
	for _, v := range freqs {
		ez += v / 2
		m1 += v
		m2 += v * v
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
	fe, term := 0.0, 1.0
	for nu := 0; nu < int(s); nu++ {
		fe += term
		term *= (s - 1 - float64(nu)) * units.KT(tK) / u
	}
	return fe
}

// troeModel is a molecule without external rotors (F_rot = 1) with
// harmonic vibrations (F_anh = 1), the case where Troe's factorised k0
// holds with F_E alone (docs/design.md §10); the CH3NC-like frequencies of
// pkg/collision's tests, E0 = 13300 cm⁻¹.
const troeModel = `title: Troe collision-efficiency check (frequencies as pkg/collision's tests)
molecules:
  R:
    mass: 41.05 amu
    vibrations: {unit: cm-1, values: [3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263]}
    lennard-jones: {sigma: 4.5 angstrom, epsilon: 350 K}
  TS:
    energy: 13300 cm-1
    vibrations: {unit: cm-1, values: [3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280]}
reaction:
  reactant: R
  via: TS
  products: [P]
bath:
  gas: Ar
energy-transfer:
  model: exponential-down
  alpha-300: %g cm-1
  alpha-exponent: 0
grid:
  temperatures: {unit: K, values: [%g]}
  pressures: {unit: bar, values: [1]}
uncertainty:
  energy-transfer.alpha-300: {factor: 1}
`

// The sensitivity of k0 to ⟨ΔE⟩down approaches the slope of Troe's weak
// collision efficiency (J. Chem. Phys. 66, 4758, 1977): βc/(1 − βc^½) =
// −⟨ΔE⟩/(F_E·kT) with ⟨ΔE⟩ = −α²/(α + F_E·kT) for the exponential-down
// model, i.e. βc^½ = α/(α + F_E·kT) (equivalently βc/(1 − βc^½)² =
// (⟨ΔE⟩down/(F_E·kT))²), so dln βc/dln α = 2F_E·kT/(α + F_E·kT). Since k0 =
// βc·k0(strong collider), and the strong collider does not see α,
// ∂ln k0/∂ln α = dln βc/dln α within 10 % (the tolerance; the
// relation itself agrees with the master equation to 15 % in βc,
// pkg/collision's TestLowPressureCollisionEfficiency). The cases are that
// test's.
func TestK0CollisionEfficiencySlope(t *testing.T) {
	cases := []struct{ tK, alpha float64 }{{600, 200}, {1000, 300}, {1000, 800}, {1500, 500}}
	if testing.Short() {
		cases = cases[1:3]
	}
	freqs := []float64{3014, 2966, 2966, 2166, 1467, 1467, 1429, 1129, 1129, 945, 263, 263}
	for _, c := range cases {
		n, us := parse(t, "troe.yaml", fmt.Sprintf(troeModel, c.alpha, c.tK))
		res := runT(t, n, us, Options{Samples: 1})
		got := res.Sensitivities[0].K0[0]
		y := c.alpha / (troeFE(freqs, 13300, c.tK) * units.KT(c.tK))
		want := 2 / (1 + y)
		if !scalar.EqualWithinRel(got, want, 0.10) {
			t.Errorf("%g K, α = %g cm-1: ∂ln k0/∂ln α = %.4f, Troe dln βc/dln α = %.4f (relative %.3g)", c.tK, c.alpha, got, want, got/want-1)
		} else {
			t.Logf("%g K, α = %g cm-1: ∂ln k0/∂ln α = %.4f, Troe dln βc/dln α = %.4f (relative %+.3g)", c.tK, c.alpha, got, want, got/want-1)
		}
	}
}

// The same seed gives the same numbers with 1, 2 and 4 workers: each
// sample draws from its own generator seeded with (seed, index), and the
// results are gathered by index (an exact property of the design).
func TestSameSeedAnyWorkers(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", "")
	opt := Options{Samples: samples(12, 3), Seed: 42, Workers: 1}
	want := runT(t, n, us, opt)
	for _, w := range []int{2, 4} {
		opt.Workers = w
		if got := runT(t, n, us, opt); !reflect.DeepEqual(got, want) {
			t.Errorf("%d workers: the result differs from 1 worker's", w)
		}
	}
	opt.Seed = 43
	if other := runT(t, n, us, opt); reflect.DeepEqual(other.K, want.K) {
		t.Error("another seed gives the same band: the seed is not used")
	}
}

// Cancelling the context stops the run with context.Canceled.
func TestRunCancelled(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", "")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Run(ctx, n, us, Options{Samples: 4}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled run: err = %v, want context.Canceled", err)
	}
}

// For small uncertainties ln k is linear in the values over their spread,
// so the Monte Carlo standard deviation of ln k matches the first-order
// one from the sensitivities, sqrt(Σ(S_i·σ_i)²) (propagation of errors to
// first order). The values here are normal in x or in ln x, so ln k is
// normal to first order and the sample sd has the relative standard error
// 1/sqrt(2(N−1)) (as in TestBarrierLognormalHighPressure); the tolerance is
// three of them plus 2 % for the second-order terms, which at these widths
// (σ·S ≤ 0.2) are of order (σ·S)²/2 relative.
func TestSpreadMatchesSensitivities(t *testing.T) {
	n, us := load(t, "testdata/small.yaml", `uncertainty:
  molecules.small-TS.energy: {sd: 0.3 kcal/mol}
  energy-transfer.alpha-300: {factor: 1.2}
  molecules.small.lennard-jones.sigma: {sd: 0.1 angstrom}
  frequency-scale: {sd: 0.005}
`)
	N := samples(300, 40)
	res := runT(t, n, us, Options{Samples: N, Seed: 5})
	tol := 3/math.Sqrt(2*float64(N-1)) + 0.02
	for i, tK := range res.Temperatures {
		for j := range res.Pressures {
			mc, lin := res.SDLnK[i][j], res.LinearSDLnK[i][j]
			if math.Abs(mc/lin-1) > tol {
				t.Errorf("%g K, P[%d]: Monte Carlo sd of ln k %.4g, first order %.4g (relative %.3g, tolerance %.3g)", tK, j, mc, lin, mc/lin-1, tol)
			} else {
				t.Logf("%g K, P[%d]: Monte Carlo sd of ln k %.4g, first order %.4g (relative %+.3g, tolerance %.3g)", tK, j, mc, lin, mc/lin-1, tol)
			}
		}
	}
}
