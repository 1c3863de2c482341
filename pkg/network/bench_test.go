package network

import (
	"errors"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// benchNetwork is the benchmark case: three invented 15-mode wells
// with external rotation (A, B 1200 cm⁻¹ and C 2400 cm⁻¹ above it), A ⇌ B at
// 35 and B ⇌ C at 38 kcal/mol, exits A → P at 45 and C → Q at 42 kcal/mol
// (all from A's zero-point level), exponential-down (α300 = 250 cm⁻¹,
// n = 0.85), on 150 cm⁻¹ grains to 40 000 cm⁻¹.
func benchNetwork(b *testing.B) *Network {
	vib := func(scale float64) []float64 {
		base := []float64{3080, 3010, 2950, 1620, 1480, 1420, 1310, 1200, 1090, 980, 870, 760, 590, 410, 230}
		out := make([]float64, len(base))
		for i, v := range base {
			out[i] = v * scale
		}
		return out
	}
	rot := func(a float64) []rrkm.Rotor { return []rrkm.Rotor{{Dim: 3, Consts: []float64{a, 0.12, 0.1}}} }
	kcal := units.Cm1PerKcalPerMol
	type wellSpec struct {
		sp  *rrkm.Species
		off float64
	}
	wells := []wellSpec{
		{&rrkm.Species{Name: "A", Vibrations: vib(1), Rotors: rot(0.9)}, 0},
		{&rrkm.Species{Name: "B", Vibrations: vib(0.97), Rotors: rot(0.8)}, 1200},
		{&rrkm.Species{Name: "C", Vibrations: vib(1.03), Rotors: rot(1.0)}, 2400},
	}
	ts := func(name string, e0kcal, scale float64) *rrkm.Species {
		return &rrkm.Species{Name: name, E0: e0kcal * kcal, Vibrations: vib(scale)[:14], Rotors: rot(0.7)}
	}
	g := rrkm.GrainsTo(150, 40000)
	counts := make([][]float64, len(wells))
	net := &Network{Grains: g}
	for w, ws := range wells {
		c, err := rrkm.NewCounter(ws.sp, 1, g.Top()-ws.off+10)
		if err != nil {
			b.Fatal(err)
		}
		counts[w] = c.Counts(g, ws.off)
		net.Wells = append(net.Wells, Well{Name: ws.sp.Name, Counts: counts[w], Transfer: expDown})
	}
	k := func(w int, t *rrkm.Species) []float64 {
		c, err := rrkm.NewCounter(t, 1, g.Top()-t.E0+10)
		if err != nil {
			b.Fatal(err)
		}
		sums := c.AveragedSums(g, t.E0)
		out := make([]float64, g.N)
		for i, n := range counts[w] {
			if n > 0 && sums[i] > 0 {
				out[i] = units.LightCm * sums[i] * g.Width / n
			}
		}
		return out
	}
	net.Isomerisations = []Isomerisation{
		{Name: "A=B", From: 0, To: 1, K: k(0, ts("TS-AB", 35, 1))},
		{Name: "B=C", From: 1, To: 2, K: k(1, ts("TS-BC", 38, 0.98))},
	}
	net.Exits = []Exit{
		{Name: "P", Well: 0, K: k(0, ts("TS-AP", 45, 0.9))},
		{Name: "Q", Well: 2, K: k(2, ts("TS-CQ", 42, 0.92))},
	}
	return net
}

// benchGrid is the benchmark grid: 30 temperatures from 300 to
// 2500 K evenly in 1/T and 20 pressures from 1e-3 to 1e3 bar evenly in
// log P, with the collision frequency of a 15-mode molecule in argon
// (Lennard-Jones σ = 4.5 Å, ε/k = 400 K, combined with argon's 3.542 Å,
// 93.3 K; mass 80 u).
func benchGrid() (temps []float64, omegas [][]float64) {
	col := collision.Collider{LJ: collision.Combine(collision.LennardJones{Sigma: 4.5, Epsilon: 400}, collision.LennardJones{Sigma: 3.542, Epsilon: 93.3}),
		Mu: collision.ReducedMass(80, 39.948)}
	for i := range 30 {
		tK := 1 / (1/300.0 + (1/2500.0-1/300.0)*float64(i)/29)
		temps = append(temps, tK)
		row := make([]float64, 20)
		for j := range row {
			pPa := 1e2 * math.Pow(10, 6*float64(j)/19)
			row[j] = col.Z(tK) * collision.Concentration(pPa, tK)
		}
		omegas = append(omegas, row)
	}
	return temps, omegas
}

// BenchmarkGrid solves the three-well, two-exit network on the 30 × 20
// grid with GOMAXPROCS workers by the banded solver (target ≤ 30 s on 2
// cores). Points where the chemical modes are not separated (high
// temperature, low pressure) end in a SeparationError, as without merging
// they must; the metric "solved" counts the others.
func BenchmarkGrid(b *testing.B) {
	net := benchNetwork(b)
	temps, omegas := benchGrid()
	var solved, refused atomic.Int64
	for b.Loop() {
		solved.Store(0)
		refused.Store(0)
		jobs := make(chan [2]int)
		var wg sync.WaitGroup
		for range runtime.GOMAXPROCS(0) {
			wg.Go(func() {
				for ij := range jobs {
					_, err := Solve(net, temps[ij[0]], omegas[ij[0]][ij[1]], Options{})
					switch {
					case err == nil:
						solved.Add(1)
					case errors.Is(err, ErrNotSeparated):
						refused.Add(1)
					default:
						b.Error(err)
					}
				}
			})
		}
		for i := range temps {
			for j := range omegas[i] {
				jobs <- [2]int{i, j}
			}
		}
		close(jobs)
		wg.Wait()
	}
	b.ReportMetric(float64(solved.Load()), "solved")
	b.ReportMetric(float64(refused.Load()), "not-separated")
}

// BenchmarkSolvePoint times one point, about 1 bar, at three temperatures
// by the banded solver and by the dense reference (gonum mat.EigenSym) on
// the same matrix, and reports dense/banded (target ≥ 50). At 300 K the
// dense solve loses the chemical eigenvalues in rounding (PrecisionError):
// it is timed all the same.
func BenchmarkSolvePoint(b *testing.B) {
	net := benchNetwork(b)
	for _, tK := range []float64{300, 700, 1000} {
		omega := 1e9 * 1000 / tK
		var banded float64
		var res *Result
		b.Run(units.Format(tK, "K", units.Temperature)+"/banded", func(b *testing.B) {
			for b.Loop() {
				var err error
				if res, err = Solve(net, tK, omega, Options{}); err != nil {
					b.Fatal(err)
				}
			}
			banded = float64(b.Elapsed().Nanoseconds()) / float64(b.N)
			b.ReportMetric(float64(res.Grains), "grains")
		})
		b.Run(units.Format(tK, "K", units.Temperature)+"/dense", func(b *testing.B) {
			for b.Loop() {
				if _, err := Solve(net, tK, omega, Options{Dense: true}); err != nil && !errors.Is(err, ErrRoundoff) {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/banded, "dense/banded")
		})
	}
}
