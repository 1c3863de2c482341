package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Largest automatic Chebyshev orders: beyond 10 × 8 coefficients a
// smooth rate surface gains nothing and the fit starts to follow noise.
const (
	maxAutoNT = 10
	maxAutoNP = 8
)

// ChebyshevResult is a fitted Chebyshev form with its report.
type ChebyshevResult struct {
	Chebyshev
	NT int `json:"n_T"`
	NP int `json:"n_P"`
	Report
}

// FitChebyshev fits log10 k = Σ Coef[i][j]·φ_i(T̃)·φ_j(P̃) by linear least
// squares (QR) over the table, with Tmin, Tmax, Pmin and Pmax the extent of
// the data. With opt.ChebyshevNT and opt.ChebyshevNP both set it fits that
// order, which may be as high as the number of distinct temperatures and
// pressures (an exact interpolation on a full grid). With both zero it
// takes the order with the fewest coefficients (ties: fewer in P) whose
// maximum error is within opt.Tolerance, among N_T ≤ min(n_T − 1, 10) and
// N_P ≤ min(n_P − 1, 8), where n_T, n_P count the distinct temperatures
// and pressures (one less than the data, so the fit never interpolates
// exactly); if none meets the tolerance, the one with the smallest
// maximum error. The table needs at least 2 temperatures and 2 pressures.
func FitChebyshev(t *Table, opt Options) (*ChebyshevResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	temps, press := t.Temperatures(), t.Pressures()
	if len(temps) < 2 || len(press) < 2 {
		return nil, fmt.Errorf("%w: %s: a Chebyshev form needs a range of temperature and of pressure; the table has %d temperatures and %d pressures (use arrhenius or plog)",
			ErrTooFewData, t.name(), len(temps), len(press))
	}
	nT, nP := opt.ChebyshevNT, opt.ChebyshevNP
	if (nT == 0) != (nP == 0) || nT < 0 || nP < 0 {
		return nil, fmt.Errorf("%w: Chebyshev order %d × %d: give both N_T and N_P, or neither", ErrBadData, nT, nP)
	}
	if nT > 0 {
		if nT > len(temps) || nP > len(press) || nT*nP > len(t.Points) {
			return nil, fmt.Errorf("%w: %s: a %d × %d Chebyshev fit needs at least %d temperatures, %d pressures and %d points; the table has %d, %d and %d",
				ErrTooFewData, t.name(), nT, nP, nT, nP, nT*nP, len(temps), len(press), len(t.Points))
		}
		return chebyshevFit(t, nT, nP)
	}
	maxT := min(maxAutoNT, max(1, len(temps)-1))
	maxP := min(maxAutoNP, max(1, len(press)-1))
	var best *ChebyshevResult
	var lastErr error
	for n := 1; n <= maxT*maxP; n++ {
		for np := 1; np <= min(n, maxP); np++ {
			if n%np != 0 || n/np > maxT || n > len(t.Points) {
				continue
			}
			r, err := chebyshevFit(t, n/np, np)
			if err != nil {
				lastErr = err
				continue
			}
			if r.MaxError() <= opt.Tolerance {
				return r, nil
			}
			if best == nil || r.MaxErrorPct < best.MaxErrorPct {
				best = r
			}
		}
	}
	if best == nil {
		return nil, lastErr
	}
	return best, nil
}

// chebyshevFit fits the nT × nP form.
func chebyshevFit(t *Table, nT, nP int) (*ChebyshevResult, error) {
	tr, pr := t.extent()
	c := Chebyshev{Tmin: tr[0], Tmax: tr[1], Pmin: pr[0], Pmax: pr[1]}
	w := t.weights()
	a := mat.NewDense(len(t.Points), nT*nP, nil)
	b := mat.NewVecDense(len(t.Points), nil)
	ft, fp := make([]float64, nT), make([]float64, nP)
	for i, p := range t.Points {
		x, y := c.reduced(p.T, p.P)
		chebyshevT(x, ft)
		chebyshevT(y, fp)
		for k := range nT {
			for l := range nP {
				a.Set(i, k*nP+l, w[i]*ft[k]*fp[l])
			}
		}
		b.SetVec(i, w[i]*math.Log10(p.K))
	}
	var qr mat.QR
	qr.Factorize(a)
	if cond := qr.Cond(); !(cond < maxCond) {
		return nil, fmt.Errorf("%w: %s: %d × %d Chebyshev fit (condition number %.3g): the points do not determine that many coefficients",
			ErrIllConditioned, t.name(), nT, nP, cond)
	}
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, b); err != nil {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit: %v", ErrIllConditioned, nT, nP, err)
	}
	c.Coef = make([][]float64, nT)
	for k := range nT {
		c.Coef[k] = make([]float64, nP)
		for l := range nP {
			v := x.AtVec(k*nP + l)
			if !finite(v) {
				return nil, fmt.Errorf("%w: %d × %d Chebyshev fit: coefficient not finite", ErrIllConditioned, nT, nP)
			}
			c.Coef[k][l] = v
		}
	}
	rep, err := formReport(t, &c)
	if err != nil {
		return nil, err
	}
	return &ChebyshevResult{Chebyshev: c, NT: nT, NP: nP, Report: rep}, nil
}
