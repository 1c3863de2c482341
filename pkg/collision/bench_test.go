package collision

import (
	"fmt"
	"math"
	"syscall"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/band"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// benchGrid is the benchmark case: a 12-mode molecule (methyl
// isocyanide's frequencies and rotation) with E0 = 40 kcal/mol,
// exponential-down (α300 = 250 cm⁻¹, n = 0.85), 30 temperatures from 300 to
// 2500 K evenly in 1/T and 20 pressures from 1e-3 to 1e3 bar evenly in log P.
func benchGrid(b testing.TB) (Channel, Collider, Transfer, []float64, []float64) {
	ch := rotorChannel(b, 40*units.Cm1PerKcalPerMol+CeilingKTMax*units.KT(2500))
	ch.E0 = 40 * units.Cm1PerKcalPerMol
	ch.TS = rotorChannel(b, ch.E0+CeilingKTMax*units.KT(2500)+13300).TS
	temps := make([]float64, 30)
	for i := range temps {
		inv := 1/300.0 + (1/2500.0-1/300.0)*float64(i)/29
		temps[i] = 1 / inv
	}
	ps := make([]float64, 20)
	for i := range ps {
		ps[i] = 1e2 * math.Pow(10, 6*float64(i)/19) // 1e-3 … 1e3 bar in Pa
	}
	col := Collider{LJ: Combine(LennardJones{4.5, 400}, LennardJones{3.542, 93.3}), Mu: ReducedMass(41, 39.948)}
	return ch, col, Transfer{Alpha300: 250, Exponent: 0.85}, temps, ps
}

// BenchmarkGrid times the whole 30 × 20 grid with its limits (k0, p½,
// the falloff centre), without and with the convergence check, on one
// worker and on two, reporting the CPU time per grid (cpu-s/op) and, on
// two workers, the speed-up in wall time over one worker measured in the
// same run (speedup-vs-1); previous-half-pressure runs the grid with the
// previous root search for p½ (halfPressureSearch), so the gain of the
// interpolation from the grid is measured in the same run.
func BenchmarkGrid(b *testing.B) {
	ch, col, tr, temps, ps := benchGrid(b)
	for _, v := range []struct {
		name     string
		skip     bool
		previous bool
	}{{"grid-only", true, false}, {"with-convergence-check", false, false}, {"previous-half-pressure", true, true}} {
		var one float64
		for _, jobs := range []int{1, 2} {
			if v.previous && jobs == 2 {
				continue
			}
			b.Run(fmt.Sprintf("%s/jobs=%d", v.name, jobs), func(b *testing.B) {
				halfFromGrid = !v.previous
				defer func() { halfFromGrid = true }()
				cpu0 := cpuSeconds()
				for b.Loop() {
					if _, err := Run(ch, col, tr, temps, ps, Options{SkipConvergence: v.skip, Jobs: jobs}); err != nil {
						b.Fatal(err)
					}
				}
				wall := b.Elapsed().Seconds() / float64(b.N)
				b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N), "cpu-s/op")
				if jobs == 1 {
					one = wall
				} else if one > 0 {
					b.ReportMetric(one/wall, "speedup-vs-1")
				}
			})
		}
	}
}

// cpuSeconds returns the CPU time (user + system) the process has used.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	tv := func(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
	return tv(ru.Utime) + tv(ru.Stime)
}

// BenchmarkSolvePoints times the 600 points of the benchmark grid (30
// temperatures × 20 pressures, the wells prepared beforehand), each solved
// as the grid solves it now and as the previous code did (band.Reference:
// row-by-row factorisation with gonum's kernels, and a new band matrix and
// factors for every point), and reports the ratio: the per-point speed-up
// averaged over the physics sweep.
func BenchmarkSolvePoints(b *testing.B) {
	ch, col, tr, temps, ps := benchGrid(b)
	var wells []*prepared
	for _, tK := range temps {
		p, err := prepare(ch, tr, tK, 0, 0)
		if err != nil {
			b.Fatal(err)
		}
		wells = append(wells, p)
	}
	omegas := make([][]float64, len(temps))
	for i, tK := range temps {
		for _, P := range ps {
			omegas[i] = append(omegas[i], col.Z(tK)*Concentration(P, tK))
		}
	}
	var previous float64
	for _, prev := range []bool{true, false} {
		name := "banded"
		if prev {
			name = "banded-previous"
		}
		b.Run(name, func(b *testing.B) {
			band.Reference = prev
			defer func() { band.Reference = false }()
			for b.Loop() {
				for i, p := range wells {
					for _, omega := range omegas[i] {
						var err error
						if prev {
							_, err = p.w.Solve(p.kernel, omega)
						} else {
							_, err = p.rate(omega)
						}
						if err != nil {
							b.Fatal(err)
						}
					}
				}
			}
			per := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
			if prev {
				previous = per
			} else {
				b.ReportMetric(previous/per, "speed-up")
			}
			b.ReportMetric(per/1e3/float64(len(temps)*len(ps)), "µs/point")
		})
	}
}

// BenchmarkSolvePoint compares one (T, P) point by the banded solver with the
// dense reference (gonum mat.EigenSym) on the same matrix; the ratio is
// reported as dense-ns/banded-ns (target ≥ 50).
func BenchmarkSolvePoint(b *testing.B) {
	ch, col, tr, _, _ := benchGrid(b)
	for _, tK := range []float64{300, 1000, 2500} {
		p, err := prepare(ch, tr, tK, 0, 0)
		if err != nil {
			b.Fatal(err)
		}
		omega := col.Z(tK) * Concentration(1e5, tK)
		var banded, dense, previous float64
		// The previous factorisation and kernels (row by row, gonum's dot
		// products: band.Reference) in the same run, for the speed-up.
		b.Run(units.Format(tK, "K", units.Temperature)+"/banded-previous", func(b *testing.B) {
			band.Reference = true
			defer func() { band.Reference = false }()
			for b.Loop() {
				if _, err := p.w.Solve(p.kernel, omega); err != nil {
					b.Fatal(err)
				}
			}
			previous = float64(b.Elapsed().Nanoseconds()) / float64(b.N)
		})
		// The point as the grid solves it now: the band matrix and its
		// factors reused from the point before (buildInto,
		// band.FactorInto), where the previous code allocated both.
		b.Run(units.Format(tK, "K", units.Temperature)+"/banded", func(b *testing.B) {
			for b.Loop() {
				if _, err := p.rate(omega); err != nil {
					b.Fatal(err)
				}
			}
			banded = float64(b.Elapsed().Nanoseconds()) / float64(b.N)
			b.ReportMetric(previous/banded, "speed-up")
		})
		b.Run(units.Format(tK, "K", units.Temperature)+"/dense", func(b *testing.B) {
			for b.Loop() {
				if _, _, err := p.w.DenseSolve(p.kernel.At, omega); err != nil {
					b.Fatal(err)
				}
			}
			dense = float64(b.Elapsed().Nanoseconds()) / float64(b.N)
			b.ReportMetric(dense/banded, "dense/banded")
			b.ReportMetric(float64(p.w.N()), "grains")
		})
	}
}
