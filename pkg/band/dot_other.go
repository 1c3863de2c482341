//go:build !amd64 || purego

package band

import "gonum.org/v1/gonum/floats"

// useFMA is false: no AVX2 kernel on this platform or build.
var useFMA = false

// dot returns Σ x[i]·y[i], len(x) = len(y) (gonum's kernels).
func dot(x, y []float64) float64 { return floats.Dot(x, y) }

// dot4 returns Σ x[i]·yk[i] for k = 0…3, len(yk) ≥ len(x).
func dot4(x, y0, y1, y2, y3 []float64) (s0, s1, s2, s3 float64) {
	n := len(x)
	return floats.Dot(x, y0[:n]), floats.Dot(x, y1[:n]), floats.Dot(x, y2[:n]), floats.Dot(x, y3[:n])
}

// dot4x2 returns the eight sums Σ xj[i]·yk[i] over len(x0) terms at
// s[2k+j].
func dot4x2(x0, x1, y0, y1, y2, y3 []float64) (s [8]float64) {
	n := len(x0)
	for k, y := range [][]float64{y0, y1, y2, y3} {
		s[2*k], s[2*k+1] = floats.Dot(x0, y[:n]), floats.Dot(x1[:n], y[:n])
	}
	return s
}

// axpy sets y += alpha·x, len(x) = len(y).
func axpy(alpha float64, x, y []float64) { floats.AddScaled(y, alpha, x) }
