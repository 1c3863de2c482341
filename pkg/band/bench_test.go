package band

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// BenchmarkFactor times the LDLᵀ factorisation of a diagonally dominant
// band matrix of the sizes of the network benchmark (777 grains,
// half-bandwidth 222), of the one-well benchmark grid (≈ 500 grains,
// half-bandwidth 110) and of a long narrow band, reporting GFLOP/s (n·b²/2
// multiply-adds) and the speed-up over the previous code (row by row with
// gonum's dot product, "rows-gonum", timed in the same run): row by row
// with the AVX2 dot product, and blocked (Factor).
func BenchmarkFactor(b *testing.B) {
	for _, nb := range [][2]int{{777, 222}, {516, 110}, {3000, 60}} {
		r := rand.New(rand.NewPCG(3, 4))
		m, _ := random(nb[0], nb[1], r)
		flops := float64(nb[0]) * float64(nb[1]) * float64(nb[1]) // 2 per multiply-add
		var rows float64
		for _, v := range []struct {
			name   string
			factor func(*Sym, float64) (*LDL, bool)
			fma    bool
		}{{"rows-gonum", factorRows, false}, {"rows", factorRows, true}, {"blocked", Factor, true}} {
			b.Run(fmt.Sprintf("n%d-b%d/%s", nb[0], nb[1], v.name), func(b *testing.B) {
				old := useFMA
				useFMA = useFMA && v.fma
				defer func() { useFMA = old }()
				for b.Loop() {
					if _, ok := v.factor(m, 0); !ok {
						b.Fatal("not factorised")
					}
				}
				ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
				b.ReportMetric(flops/ns, "GFLOP/s")
				if v.name == "rows-gonum" {
					rows = ns
				} else {
					b.ReportMetric(rows/ns, "speed-up")
				}
			})
		}
	}
}
