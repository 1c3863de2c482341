package network

import (
	"sync"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// The test species are invented (no source): ten-mode molecules with a
// classical external rotor, shaped like small organic isomers, and looser
// transition states. The rotor makes the density of states smooth, so
// that rrkm's Boltzmann weights within a grain are the plain counts
// (rrkm.Counter.BoltzmannCounts) and pkg/collision's wells and ours hold
// the same populations.
var (
	spA = &rrkm.Species{Name: "A", Vibrations: []float64{3050, 2980, 1480, 1390, 1210, 1060, 940, 780, 560, 330},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.6, 0.28, 0.24}}}}
	spB = &rrkm.Species{Name: "B", Vibrations: []float64{3080, 2950, 1520, 1330, 1170, 1010, 890, 720, 500, 280},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.3, 0.33, 0.29}}}}
	spC = &rrkm.Species{Name: "C", Vibrations: []float64{3000, 2900, 1600, 1440, 1250, 1100, 980, 830, 610, 410},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.8, 0.26, 0.22}}}}
	// Transition states; E0 is on the common scale (from A's zero-point
	// level), which for tsAB and tsAP is also their threshold above A.
	tsAB = &rrkm.Species{Name: "TS-AB", E0: 30 * units.Cm1PerKcalPerMol, Vibrations: []float64{3060, 2960, 1490, 1350, 1180, 1030, 900, 700, 450},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.4, 0.3, 0.26}}}}
	tsBC = &rrkm.Species{Name: "TS-BC", E0: 32 * units.Cm1PerKcalPerMol, Vibrations: []float64{3040, 2930, 1550, 1390, 1200, 1050, 930, 760, 520},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.5, 0.29, 0.25}}}}
	tsAP = &rrkm.Species{Name: "TS-AP", E0: 38 * units.Cm1PerKcalPerMol, Vibrations: []float64{3050, 2970, 1450, 1300, 1100, 900, 700, 400, 200},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.2, 0.22, 0.2}}}}
	// tsX is A's exit in the single-well tests, 25 kcal/mol above A.
	tsX = &rrkm.Species{Name: "TS-X", E0: 25 * units.Cm1PerKcalPerMol, Vibrations: []float64{3040, 2960, 1460, 1320, 1150, 980, 820, 520, 250},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.25, 0.23, 0.21}}}}
	// tsLow joins A and B only 700 cm⁻¹ (2 kcal/mol) above B: an
	// isomerisation about as fast as energy relaxation.
	tsLow = &rrkm.Species{Name: "TS-low", E0: offB + 700, Vibrations: []float64{3060, 2960, 1490, 1350, 1180, 1030, 900, 700, 450},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.4, 0.3, 0.26}}}}
	tsCQ = &rrkm.Species{Name: "TS-CQ", E0: 36 * units.Cm1PerKcalPerMol, Vibrations: []float64{3010, 2910, 1500, 1350, 1150, 950, 750, 420, 180},
		Rotors: []rrkm.Rotor{{Dim: 3, Consts: []float64{1.3, 0.21, 0.19}}}}
)

// Offsets of the wells' zero-point levels on the common scale, cm⁻¹:
// multiples of the test grain, so every well's grains line up with the grid.
const (
	offA = 0
	offB = 1600
	offC = 800
)

// testGrid is the common grid of the tests: 200 cm⁻¹ grains to 36000 cm⁻¹,
// 25 kT above the highest threshold at 1300 K.
var testGrid = rrkm.GrainsTo(200, 36000)

var (
	countersOnce sync.Once
	counters     map[string]*rrkm.Counter
	countersErr  error
)

// counter returns the state counter of sp, counted (1 cm⁻¹ fine grain) as
// far as the test grid needs: to its top above the species' own zero
// (offset off for a well, E0 for a transition state).
func counter(t testing.TB, sp *rrkm.Species, off float64) *rrkm.Counter {
	t.Helper()
	countersOnce.Do(func() {
		counters = map[string]*rrkm.Counter{}
		for _, s := range []struct {
			sp  *rrkm.Species
			off float64
		}{{spA, offA}, {spB, offB}, {spC, offC}, {tsAB, tsAB.E0}, {tsBC, tsBC.E0}, {tsAP, tsAP.E0}, {tsCQ, tsCQ.E0}, {tsX, tsX.E0}, {tsLow, tsLow.E0}} {
			c, err := rrkm.NewCounter(s.sp, 1, testGrid.Top()-s.off+10)
			if err != nil {
				countersErr = err
				return
			}
			counters[s.sp.Name] = c
		}
	})
	if countersErr != nil {
		t.Fatal(countersErr)
	}
	c := counters[sp.Name]
	if c == nil {
		t.Fatalf("no counter for %q", sp.Name)
	}
	return c
}

// wellCounts returns the states per grain of a well whose zero-point level
// lies off cm⁻¹ above the common zero.
func wellCounts(t testing.TB, sp *rrkm.Species, off float64) []float64 {
	return counter(t, sp, off).Counts(testGrid, off)
}

// rrkmK returns RRKM k(E) = L·c·W̄‡(E−E0)·Δ/N(E) on the test grid for the
// well sp at offset off through transition state ts (threshold ts.E0 on the
// common scale): the formula of rrkm.Micro (Holbrook, Pilling & Robertson
// 1996, eq. 4.21), with grain-averaged sums and grain counts.
func rrkmK(t testing.TB, sp *rrkm.Species, off float64, ts *rrkm.Species, l float64) []float64 {
	n := wellCounts(t, sp, off)
	w := counter(t, ts, ts.E0).AveragedSums(testGrid, ts.E0)
	k := make([]float64, testGrid.N)
	for i := range k {
		if n[i] > 0 && w[i] > 0 {
			k[i] = l * units.LightCm * w[i] * testGrid.Width / n[i]
		}
	}
	return k
}

// expDown is the tests' exponential-down model (α = 250 cm⁻¹ at 300 K,
// rising as T^0.85: 544 cm⁻¹ at 1000 K).
var expDown = collision.Transfer{Alpha300: 250, Exponent: 0.85}

// twoWells is A ⇌ B over TS-AB, with no exit.
func twoWells(t testing.TB, tr collision.Transfer) *Network {
	return &Network{
		Grains: testGrid,
		Wells: []Well{
			{Name: "A", Counts: wellCounts(t, spA, offA), Transfer: tr},
			{Name: "B", Counts: wellCounts(t, spB, offB), Transfer: tr},
		},
		Isomerisations: []Isomerisation{{Name: "A=B", From: 0, To: 1, K: rrkmK(t, spA, offA, tsAB, 1)}},
	}
}

// threeWells is A ⇌ B ⇌ C with exits A → P and C → Q.
func threeWells(t testing.TB, tr collision.Transfer) *Network {
	return &Network{
		Grains: testGrid,
		Wells: []Well{
			{Name: "A", Counts: wellCounts(t, spA, offA), Transfer: tr},
			{Name: "B", Counts: wellCounts(t, spB, offB), Transfer: tr},
			{Name: "C", Counts: wellCounts(t, spC, offC), Transfer: tr},
		},
		Isomerisations: []Isomerisation{
			{Name: "A=B", From: 0, To: 1, K: rrkmK(t, spA, offA, tsAB, 1)},
			// Given from C's side: the reverse C → B comes from detailed
			// balance, exercising the From/To direction.
			{Name: "C=B", From: 2, To: 1, K: rrkmK(t, spC, offC, tsBC, 1)},
		},
		Exits: []Exit{
			{Name: "P", Well: 0, K: rrkmK(t, spA, offA, tsAP, 1)},
			{Name: "Q", Well: 2, K: rrkmK(t, spC, offC, tsCQ, 1)},
		},
	}
}
