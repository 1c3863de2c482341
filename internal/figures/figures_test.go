package figures

import (
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// griTable is the GRI-Mech 3.0 H + CH3 (+M) table of pkg/fit's tests.
const griTable = "../../pkg/fit/testdata/h_ch3_gri30.csv"

// readTable reads a CSV table.
func readTable(t *testing.T, path string) *fit.Table {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := fit.ReadCSV(path, f)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// tableEval is a form that gives the table's own k at its points.
type tableEval struct{ tab *fit.Table }

func (e tableEval) Eval(t, p float64) float64 {
	for _, pt := range e.tab.Points {
		if pt.T == t && pt.P == p {
			return pt.K
		}
	}
	return math.NaN()
}

// scaled is a form that is exactly (1 + r) times another.
type scaled struct {
	f fit.Evaluator
	r float64
}

func (s scaled) Eval(t, p float64) float64 { return (1 + s.r) * s.f.Eval(t, p) }

// residuals puts 100·(k_fit/k − 1) of each point in the cell of its
// temperature and pressure. Checked against pkg/fit's own report, computed
// independently by fit.NewReport: the largest |residual| is the report's
// max error, at its worst (T, P), and the root mean square its rms error;
// a form 2 % above the table everywhere gives 2 % in every cell (exact);
// points in any order give the same map, and a missing point an empty
// cell.
func TestResiduals(t *testing.T) {
	// relTol: the map and the report compute the same quotient with
	// float64 in another order; 1e-12 leaves room for that only.
	const relTol = 1e-12
	tab := readTable(t, griTable)
	res, err := fit.FitAll(tab, []fit.FormName{fit.FormTroe}, fit.Options{})
	if err != nil {
		t.Fatal(err)
	}
	form := res.Form(fit.FormTroe)
	rep := res.Reports()[fit.FormTroe]
	temps, pressures, z := residuals(tab, form)
	worst, worstT, worstP, ss, n := 0.0, 0.0, 0.0, 0.0, 0
	for j, p := range pressures {
		for i, tk := range temps {
			v := z[j][i]
			if math.IsNaN(v) {
				t.Fatalf("cell %v K, %v Pa empty in a full grid", tk, p)
			}
			if math.Abs(v) > worst {
				worst, worstT, worstP = math.Abs(v), tk, p
			}
			ss += v * v
			n++
		}
	}
	if n != len(tab.Points) {
		t.Fatalf("%d cells for %d points", n, len(tab.Points))
	}
	if math.Abs(worst-rep.MaxErrorPct) > relTol*rep.MaxErrorPct || worstT != rep.WorstT || worstP != rep.WorstP {
		t.Errorf("largest |residual| %v %% at %v K, %v Pa; report %v %% at %v K, %v Pa", worst, worstT, worstP, rep.MaxErrorPct, rep.WorstT, rep.WorstP)
	}
	if rms := math.Sqrt(ss / float64(n)); math.Abs(rms-rep.RMSErrorPct) > 1e-9*rep.RMSErrorPct {
		t.Errorf("rms residual %v %%, report %v %%", rms, rep.RMSErrorPct)
	}

	// A form exactly 2 % above every point: every cell 2 (to the
	// rounding of 1.02·k/k, a few 1e-16).
	_, _, z2 := residuals(tab, scaled{tableEval{tab}, 0.02})
	for j := range z2 {
		for i := range z2[j] {
			if math.Abs(z2[j][i]-2) > 1e-12 {
				t.Errorf("cell (%d, %d): %v %%, want 2 %%", j, i, z2[j][i])
			}
		}
	}

	// Shuffled, with one point dropped.
	shuffled := &fit.Table{KUnits: tab.KUnits, Points: slices.Clone(tab.Points)}
	rng := rand.New(rand.NewPCG(1, 1))
	rng.Shuffle(len(shuffled.Points), func(a, b int) {
		shuffled.Points[a], shuffled.Points[b] = shuffled.Points[b], shuffled.Points[a]
	})
	dropped := shuffled.Points[0]
	shuffled.Points = shuffled.Points[1:]
	_, _, zs := residuals(shuffled, form)
	for j, p := range pressures {
		for i, tk := range temps {
			if tk == dropped.T && p == dropped.P {
				if !math.IsNaN(zs[j][i]) {
					t.Errorf("dropped point %v K, %v Pa: cell %v, want empty", tk, p, zs[j][i])
				}
				continue
			}
			if zs[j][i] != z[j][i] {
				t.Errorf("cell %v K, %v Pa: %v shuffled, %v in order", tk, p, zs[j][i], z[j][i])
			}
		}
	}
}

// microRange cuts k(E) where the brief says. On a synthetic channel whose
// flux k(E)ρ(E)e^(−E/kT) is known in closed form: with constant ρ, k(E) =
// k₁ above E0 and k₁·e^((E−E0)/w) below (a tunnelling tail of width w <
// kT), the flux peaks at E0 and falls below it as e^((E−E0)(1/w − 1/kT)),
// so it reaches microFluxFloor of the peak at E0 − ln(1/microFluxFloor) /
// (1/w − 1/kT) at the lowest temperature; the top is E0 + MicroAboveKT·kT
// at the highest (exact). Without the tail the range starts at the first
// grain with k > 0.
func TestMicroRange(t *testing.T) {
	const grain = 10.0 // cm⁻¹
	const e0, w = 10000.0, 50.0
	temps := []float64{300, 1000, 2000}
	var mc job.MicroChannel
	mc.E0, mc.Grain = e0, grain
	var density []float64
	for e := 0.0; e <= 80000; e += grain {
		mc.Energies = append(mc.Energies, e)
		density = append(density, 1)
		k := 1e8
		if e < e0 {
			k = 1e8 * math.Exp((e-e0)/w)
		}
		mc.K = append(mc.K, k)
	}
	kT := units.KT(300)
	wantLo := e0 - math.Log(1/microFluxFloor)/(1/w-1/kT)
	wantHi := e0 + MicroAboveKT*units.KT(2000)
	lo, hi := microRange(mc, mc.Energies, density, temps)
	if math.Abs(lo-wantLo) > grain || hi != wantHi {
		t.Errorf("tunnelling: range %v–%v cm-1, want %v (± one grain)–%v", lo, hi, wantLo, wantHi)
	}
	for i, e := range mc.Energies {
		if e < e0 {
			mc.K[i] = 0
		}
	}
	if lo, hi = microRange(mc, mc.Energies, density, temps); lo != e0 || hi != wantHi {
		t.Errorf("no tunnelling: range %v–%v cm-1, want %v–%v", lo, hi, e0, wantHi)
	}
	f := microFigure(mc, mc.Energies, density, temps)
	for _, e := range f.Series[0].X {
		if e < e0 || e > wantHi {
			t.Fatalf("micro.svg shows E = %v cm-1 outside %v–%v", e, e0, wantHi)
		}
	}
}
