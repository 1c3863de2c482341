package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// maxCond is the largest condition number of a linear least-squares
// problem whose solution this package trusts: at 1e12 about four of the
// sixteen digits of float64 remain, enough for fitted parameters.
const maxCond = 1e12

// FitArrhenius fits the modified Arrhenius form k = A·T^n·exp(−Ta/T) to
// rate constants ks at temperatures temps (K) by linear least squares in
// ln k, weighted by 1/σ² when sigmas (relative uncertainties of k) is not
// nil. With exactly two distinct temperatures it fits the two-parameter
// form (n = 0), which they determine exactly. Fewer than two distinct
// temperatures, a non-positive or non-finite k or T, or mismatched lengths
// in the data give an error.
func FitArrhenius(temps, ks, sigmas []float64) (Arrhenius, error) {
	if len(ks) != len(temps) || (sigmas != nil && len(sigmas) != len(temps)) {
		panic(fmt.Sprintf("fit: FitArrhenius: %d temperatures, %d k, %d sigmas", len(temps), len(ks), len(sigmas)))
	}
	for i := range temps {
		if !(temps[i] > 0) || math.IsInf(temps[i], 0) {
			return Arrhenius{}, fmt.Errorf("%w: T = %g K at point %d", ErrBadData, temps[i], i+1)
		}
		if !(ks[i] > 0) || math.IsInf(ks[i], 0) {
			return Arrhenius{}, fmt.Errorf("%w: k = %g at point %d (T = %g K) is not positive and finite", ErrBadData, ks[i], i+1, temps[i])
		}
		if sigmas != nil && (!(sigmas[i] > 0) || math.IsInf(sigmas[i], 0)) {
			return Arrhenius{}, fmt.Errorf("%w: sigma = %g at point %d (T = %g K)", ErrBadData, sigmas[i], i+1, temps[i])
		}
	}
	d := distinct(temps)
	np := 3
	switch {
	case len(d) < 2:
		return Arrhenius{}, fmt.Errorf("%w: an Arrhenius fit needs at least 2 temperatures, got %d", ErrTooFewData, len(d))
	case len(d) == 2:
		np = 2
	}
	// Columns 1, ln(T/Tr), Tr/T with Tr the geometric mean of the range
	// keep the problem well conditioned: ln k = a + n ln(T/Tr) − (Ta/Tr)(Tr/T).
	tr := math.Sqrt(d[0] * d[len(d)-1])
	a := mat.NewDense(len(temps), np, nil)
	b := mat.NewVecDense(len(temps), nil)
	for i, t := range temps {
		w := 1.0
		if sigmas != nil {
			w = 1 / sigmas[i]
		}
		a.Set(i, 0, w)
		a.Set(i, 1, -w*tr/t)
		if np == 3 {
			a.Set(i, 2, w*math.Log(t/tr))
		}
		b.SetVec(i, w*math.Log(ks[i]))
	}
	var qr mat.QR
	qr.Factorize(a)
	if c := qr.Cond(); !(c < maxCond) {
		return Arrhenius{}, fmt.Errorf("%w: Arrhenius fit (condition number %.3g)", ErrIllConditioned, c)
	}
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, b); err != nil {
		return Arrhenius{}, fmt.Errorf("%w: Arrhenius fit: %v", ErrIllConditioned, err)
	}
	r := Arrhenius{Ta: x.AtVec(1) * tr}
	lnA := x.AtVec(0)
	if np == 3 {
		r.N = x.AtVec(2)
		lnA -= r.N * math.Log(tr)
	}
	r.A = math.Exp(lnA)
	if !finite(r.A, r.N, r.Ta) || r.A == 0 {
		return Arrhenius{}, fmt.Errorf("%w: Arrhenius fit gives A = %g, n = %g, Ta = %g K", ErrIllConditioned, r.A, r.N, r.Ta)
	}
	return r, nil
}

// finite reports whether every value is finite.
func finite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// arrNodes represents a modified Arrhenius expression by its values
// ℓ_j = ln k(T_j) at three node temperatures spanning the fitted range
// (the ends and the middle in 1/T). ln k is linear in ℓ just as in
// (ln A, n, Ta), but the ℓ are of like size and nearly independent, which
// the nonlinear fits need: ln A and n are strongly correlated.
type arrNodes struct {
	t   [3]float64 // node temperatures, K
	tr  float64    // reference temperature, K (scales B)
	inv mat.Dense  // B⁻¹ with B_j = [1, ln(T_j/Tr), −Tr/T_j]
}

func newArrNodes(tmin, tmax float64) (*arrNodes, error) {
	if !(tmax > tmin) {
		return nil, fmt.Errorf("%w: need at least 3 distinct temperatures", ErrTooFewData)
	}
	n := &arrNodes{t: [3]float64{tmin, 2 / (1/tmin + 1/tmax), tmax}, tr: math.Sqrt(tmin * tmax)}
	b := mat.NewDense(3, 3, nil)
	for j, t := range n.t {
		b.SetRow(j, []float64{1, math.Log(t / n.tr), -n.tr / t})
	}
	if err := n.inv.Inverse(b); err != nil {
		return nil, fmt.Errorf("%w: Arrhenius nodes at %v K: %v", ErrIllConditioned, n.t, err)
	}
	return n, nil
}

// basis returns φ(T) such that ln k(T) = Σ φ_j ℓ_j.
func (n *arrNodes) basis(t float64) [3]float64 {
	v := [3]float64{1, math.Log(t / n.tr), -n.tr / t}
	var phi [3]float64
	for j := range 3 {
		for i := range 3 {
			phi[j] += v[i] * n.inv.At(i, j)
		}
	}
	return phi
}

// values returns ℓ for the Arrhenius expression a.
func (n *arrNodes) values(a Arrhenius) [3]float64 {
	var l [3]float64
	for j, t := range n.t {
		l[j] = math.Log(a.A) + a.N*math.Log(t) - a.Ta/t
	}
	return l
}

// arrhenius returns the expression with node values l.
func (n *arrNodes) arrhenius(l []float64) Arrhenius {
	var c [3]float64
	for i := range 3 {
		for j := range 3 {
			c[i] += n.inv.At(i, j) * l[j]
		}
	}
	return Arrhenius{A: math.Exp(c[0] - c[1]*math.Log(n.tr)), N: c[1], Ta: c[2] * n.tr}
}
