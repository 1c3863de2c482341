package uncertainty

import "math"

// TRef is the reference temperature of the fitted uncertainty factor,
// 298 K, as rate evaluations give it.
const TRef = 298.0

// envelopeTol is the slack, in ln f, with which a candidate of FitFactor
// may pass below a factor: rounding of the logarithms, far below the
// three digits the factors are written with.
const envelopeTol = 1e-12

// FitFactor fits f(T) = F298·exp(|G·(1/T − 1/TRef)|) to factors f ≥ 1 at
// the temperatures temps (K) as their upper envelope: the curve of the form
// that lies nowhere below them (within envelopeTol) and above them least,
// summed over the temperatures in ln f, with G ≥ 0 and F298 ≥ 1. An
// envelope, not a least-squares line, because a mechanism's factor must
// not claim more certainty than the calculation gives: the form grows away
// from 298 K, and where the factors fall away from it (a barrier's
// uncertainty shrinks as 1/T) G is held at 0 and F298 is the largest
// factor. In x = |1/T − 1/TRef| and y = ln f the problem is the linear
// program min Σ(a + G·x_i − y_i) subject to a + G·x_i ≥ y_i, a ≥ 0,
// G ≥ 0; its optimum lies on a vertex: a line through two points, through
// one point with G = 0, or through one point with a = 0; FitFactor tries
// them all (the grid has tens of temperatures). MaxDeviation is the largest
// factor by which the fit lies above the factors. A temperature range that
// does not reach 298 K makes F298 an extrapolation.
func FitFactor(temps, f []float64) FactorFit {
	out := FactorFit{F298: 1, MaxDeviation: 1}
	if len(temps) == 0 {
		return out
	}
	x := make([]float64, len(temps))
	y := make([]float64, len(temps))
	out.TMin, out.TMax = temps[0], temps[0]
	for i, t := range temps {
		x[i], y[i] = math.Abs(1/t-1/TRef), math.Log(f[i])
		out.TMin, out.TMax = math.Min(out.TMin, t), math.Max(out.TMax, t)
	}
	best, ba, bg := math.Inf(1), 0.0, 0.0
	try := func(a, g float64) {
		if !(a >= 0 && g >= 0) || math.IsInf(a, 0) || math.IsInf(g, 0) {
			return
		}
		excess := 0.0
		for i := range x {
			d := a + g*x[i] - y[i]
			if d < -envelopeTol {
				return
			}
			excess += d
		}
		if excess < best {
			best, ba, bg = excess, a, g
		}
	}
	for i := range x {
		try(math.Max(y[i], 0), 0) // flat through point i (or at f = 1)
		if x[i] > 0 {
			try(0, y[i]/x[i]) // through point i with F298 = 1
		}
		for j := i + 1; j < len(x); j++ {
			if x[j] != x[i] {
				g := (y[j] - y[i]) / (x[j] - x[i])
				try(y[i]-g*x[i], g)
			}
		}
	}
	out.F298, out.G = math.Exp(ba), bg
	for i, t := range temps {
		out.MaxDeviation = math.Max(out.MaxDeviation, out.At(t)/f[i])
	}
	return out
}
