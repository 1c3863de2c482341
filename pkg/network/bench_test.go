package network

import (
	"testing"

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

// BenchmarkSolveDense times one (T, P) point (1000 K, ω = 1e9 s⁻¹, about
// 1 bar) of the three-well, two-exit network by the dense reference solver.
func BenchmarkSolveDense(b *testing.B) {
	net := benchNetwork(b)
	var res *Result
	for b.Loop() {
		var err error
		if res, err = Solve(net, 1000, 1e9, Options{}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(res.Grains), "grains")
	b.ReportMetric(res.Separation, "separation")
}
