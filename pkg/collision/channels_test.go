package collision

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// twoChannels is CH3NC (testChannel) with a second, illustrative channel
// 1200 cm⁻¹ higher, looser and twice degenerate.
func twoChannels(t testing.TB) (Channel, *rrkm.Species, *rrkm.Species, *rrkm.Species) {
	ch, r := testChannel(t, 120000)
	ts1 := &rrkm.Species{E0: 13300, Vibrations: []float64{3050, 2990, 2990, 2100, 1450, 1450, 1400, 1100, 1100, 600, 280}}
	ts2 := &rrkm.Species{Name: "TS2", E0: 14500, Vibrations: []float64{3040, 2980, 2980, 1900, 1440, 1440, 1300, 1000, 900, 300, 150}}
	tc2, err := rrkm.NewCounter(ts2, 1, 120000-ts2.E0)
	if err != nil {
		t.Fatal(err)
	}
	ch.Name = "first"
	ch.Competing = []Channel{{Name: "second", TS: tc2, L: 2, E0: ts2.E0}}
	return ch, r, ts1, ts2
}

// Competing channels from one well (facts of the theory): the per-channel
// rates, from the flux identity with one slowest mode, sum to the total to
// rounding; at high pressure each channel's rate equals its canonical TST
// k∞ (within the 0.5 % grain error of TestHighPressureLimit); branching
// fractions lie in [0, 1]; per-channel k0 sums to k0. Both collision models.
func TestCompetingChannels(t *testing.T) {
	ch, r, ts1, ts2 := twoChannels(t)
	col := Collider{Fixed: 3e-10}
	ps := []float64{10, 1e3, 1e5, 1e7, 1e12}
	for _, tr := range []Transfer{{Strong: true}, {Alpha300: 300, Exponent: 0.8}} {
		res, err := Run(ch, col, tr, []float64{700, 1200}, ps, Options{SkipConvergence: true})
		if err != nil {
			t.Fatal(err)
		}
		for _, row := range res.Rows {
			for j := range ps {
				sum := row.KC[0][j] + row.KC[1][j]
				if !scalar.EqualWithinRel(sum, row.K[j], 1e-12) {
					t.Errorf("%v, %v K, %v Pa: channels sum to %v, total %v", tr, row.T, ps[j], sum, row.K[j])
				}
				for c := range row.KC {
					if b := row.KC[c][j] / row.K[j]; !(b >= 0 && b <= 1) {
						t.Errorf("branching fraction %v", b)
					}
				}
			}
			if s := row.K0C[0] + row.K0C[1]; !scalar.EqualWithinRel(s, row.K0, 1e-9) {
				t.Errorf("%v, %v K: k0 channels sum to %v, k0 %v", tr, row.T, s, row.K0)
			}
			last := len(ps) - 1
			for c, ts := range []*rrkm.Species{ts1, ts2} {
				l := []float64{1, 2}[c]
				if want := rrkm.KInf(r, ts, l, row.T); !scalar.EqualWithinRel(row.KC[c][last], want, 0.005) {
					t.Errorf("%v, %v K, channel %d at high pressure: %v, canonical %v", tr, row.T, c, row.KC[c][last], want)
				}
			}
		}
	}
}

// Splitting one channel into two identical halves (L = ½ each) halves each
// share exactly and leaves the total unchanged (an exact property).
func TestSplitChannel(t *testing.T) {
	ch, _ := testChannel(t, 120000)
	half := ch
	half.L = 0.5
	half.Competing = []Channel{{TS: ch.TS, L: 0.5, E0: ch.E0}}
	col := Collider{Fixed: 3e-10}
	ps := []float64{100, 1e5}
	tr := Transfer{Alpha300: 250, Exponent: 0.85}
	a, err := Run(ch, col, tr, []float64{900}, ps, Options{SkipConvergence: true})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Run(half, col, tr, []float64{900}, ps, Options{SkipConvergence: true})
	if err != nil {
		t.Fatal(err)
	}
	for j := range ps {
		ka, kb := a.Rows[0].K[j], b.Rows[0].K[j]
		if !scalar.EqualWithinRel(ka, kb, 1e-10) || math.Abs(b.Rows[0].KC[0][j]/kb-0.5) > 1e-12 {
			t.Errorf("%v Pa: one channel %v, two halves %v (shares %v, %v)", ps[j], ka, kb, b.Rows[0].KC[0][j], b.Rows[0].KC[1][j])
		}
	}
}
