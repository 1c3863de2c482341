//go:build !purego

package band

import "gonum.org/v1/gonum/floats"

// dotFMA is Σ x[i]·y[i] over len(x) ≤ len(y) terms with AVX2 fused
// multiply-adds (dot_amd64.s).
//
//go:noescape
func dotFMA(x, y []float64) float64

// dot4FMA returns the four sums Σ x[i]·yk[i] over len(x) ≤ len(yk) terms,
// reading x once (dot_amd64.s).
//
//go:noescape
func dot4FMA(x, y0, y1, y2, y3 []float64) (s0, s1, s2, s3 float64)

// dot4x2FMA sets s[2k+j] to the sums Σ xj[i]·yk[i] over len(x0) terms,
// len(x1), len(yk) ≥ len(x0) (dot_amd64.s).
//
//go:noescape
func dot4x2FMA(x0, x1, y0, y1, y2, y3 []float64, s *[8]float64)

// axpyFMA sets y[i] += alpha·x[i] for i < len(x) ≤ len(y)
// (dot_amd64.s).
//
//go:noescape
func axpyFMA(alpha float64, x, y []float64)

// hasAVX2FMA reports whether the processor and the operating system support
// AVX2 and FMA.
func hasAVX2FMA() bool

// useFMA selects the AVX2 kernel; a test switches it off to compare.
var useFMA = hasAVX2FMA()

// dot returns Σ x[i]·y[i], len(x) = len(y): the AVX2 kernel where the
// processor has it, gonum's otherwise. The fused multiply-adds round once
// per term instead of twice, and the sum runs in 16 partial sums: the
// result differs from gonum's in the last bits only.
func dot(x, y []float64) float64 {
	if useFMA && !Reference {
		y = y[:len(x)] // bounds check: the kernel reads len(x) of each
		return dotFMA(x, y)
	}
	return floats.Dot(x, y)
}

// dot4 returns Σ x[i]·yk[i] for k = 0…3, len(yk) ≥ len(x): four dot
// products reading x once.
func dot4(x, y0, y1, y2, y3 []float64) (s0, s1, s2, s3 float64) {
	if useFMA && !Reference {
		n := len(x)
		return dot4FMA(x, y0[:n], y1[:n], y2[:n], y3[:n])
	}
	n := len(x)
	return floats.Dot(x, y0[:n]), floats.Dot(x, y1[:n]), floats.Dot(x, y2[:n]), floats.Dot(x, y3[:n])
}

// dot4x2 returns the eight sums Σ xj[i]·yk[i] over len(x0) terms at
// s[2k+j]: two vectors against four, each read once.
func dot4x2(x0, x1, y0, y1, y2, y3 []float64) (s [8]float64) {
	n := len(x0)
	if useFMA && !Reference {
		dot4x2FMA(x0, x1[:n], y0[:n], y1[:n], y2[:n], y3[:n], &s)
		return s
	}
	for k, y := range [][]float64{y0, y1, y2, y3} {
		s[2*k], s[2*k+1] = floats.Dot(x0, y[:n]), floats.Dot(x1[:n], y[:n])
	}
	return s
}

// axpy sets y += alpha·x, len(x) = len(y).
func axpy(alpha float64, x, y []float64) {
	if useFMA && !Reference {
		axpyFMA(alpha, x, y[:len(x)])
		return
	}
	floats.AddScaled(y, alpha, x)
}
