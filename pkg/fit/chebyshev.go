package fit

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Largest automatic Chebyshev orders. A falloff surface over 300–2500 K
// and four decades of pressure needs about 12 × 10 coefficients for 1 %
// between the points of a dense grid (the GRI-Mech 3.0 H+CH3 Troe form on
// 30 × 20 points, chebyshev_test.go), above the 10 × 8 once used as the
// cap; the held-out error, not the cap, keeps the order within what the
// data support.
const (
	maxAutoNT = 16
	maxAutoNP = 12
)

// chebStall is how many orders in a row the automatic search tries
// without lowering the best held-out error by a tenth before it stops:
// past that point more coefficients follow the data's noise or the gaps
// between its rows, not the surface.
const chebStall = 24

// ChebyshevResult is a fitted Chebyshev form with its report.
type ChebyshevResult struct {
	Chebyshev
	NT int `json:"n_T"`
	NP int `json:"n_P"`
	Report
}

// FitChebyshev fits log10 k = Σ Coef[i][j]·φ_i(T̃)·φ_j(P̃) by linear least
// squares over the table, with Tmin, Tmax, Pmin and Pmax the extent of the
// data. With opt.ChebyshevNT and opt.ChebyshevNP both set it fits that
// order, which may be as high as the number of distinct temperatures and
// pressures (an exact interpolation on a full grid). With both zero it
// chooses the order by held-out error (see HeldOut): at opt.Holdout's
// points if given, else by cross-validation. Among N_T ≤ min(n_T − 1, 16),
// N_P ≤ min(n_P − 1, 12) and N_T·N_P ≤ half the distinct (T, P) points
// (n_T, n_P count the distinct temperatures and pressures), taken by
// number of coefficients (ties: fewer in P), the first whose maximum error
// on the table and held-out maximum error are both within opt.Tolerance;
// if none is, the first whose held-out maximum error is within a tenth of
// the smallest found. Orders whose held-out error cannot be computed
// (the data without a fold do not determine them) are never chosen. A
// table with no held-out points and no interior rows or columns falls
// back to the error on the table. The table needs at least 2 temperatures
// and 2 pressures. The result's Report carries the held-out error.
func FitChebyshev(t *Table, opt Options) (*ChebyshevResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	if err := checkHoldout(opt); err != nil {
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
	s := newChebSearch(t, opt)
	if nT > 0 {
		if nT > len(temps) || nP > len(press) || nT*nP > t.sites() {
			return nil, fmt.Errorf("%w: %s: a %d × %d Chebyshev fit needs at least %d temperatures, %d pressures and %d distinct points; the table has %d, %d and %d",
				ErrTooFewData, t.name(), nT, nP, nT, nP, nT*nP, len(temps), len(press), t.sites())
		}
		r, err := s.result(nT, nP)
		if err != nil {
			return nil, err
		}
		r.HeldOut = s.heldOut(r).result()
		return r, nil
	}
	return s.auto(len(temps), len(press))
}

// chebSearch holds what the automatic order search reuses: the least-
// squares problem of the whole table and of each cross-validation fold.
type chebSearch struct {
	t     *Table
	tol   float64
	full  *chebData
	extra []Point    // held-out points inside the table's range
	folds []chebFold // cross-validation folds (when extra is empty)
	c     Chebyshev  // the range of the table (Coef nil)
	// The reduced coordinates (Chebyshev.reduced) of the table's points
	// and of extra, computed once for every order tried.
	redT, redExtra [][2]float64
}

// reducedAll returns the reduced coordinates of pts in c's range.
func reducedAll(c Chebyshev, pts []Point) [][2]float64 {
	out := make([][2]float64, len(pts))
	for i, p := range pts {
		out[i][0], out[i][1] = c.reduced(p.T, p.P)
	}
	return out
}

// result fits the nT × nP form to the whole table and reports it:
// chebData.result with the table's reduced coordinates computed once.
func (s *chebSearch) result(nT, nP int) (*ChebyshevResult, error) {
	coef, err := s.full.fit(nT, nP)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", s.t.name(), err)
	}
	for _, row := range coef {
		if !finite(row...) {
			return nil, fmt.Errorf("%w: %s: %d × %d Chebyshev fit: coefficient not finite", ErrIllConditioned, s.t.name(), nT, nP)
		}
	}
	c := s.c
	c.Coef = coef
	rep, err := reportOf(s.t, func(i int) float64 { return c.evalReduced(s.redT[i][0], s.redT[i][1]) }, c.NParams())
	if err != nil {
		return nil, err
	}
	return &ChebyshevResult{Chebyshev: c, NT: nT, NP: nP, Report: rep}, nil
}

// chebFold is a cross-validation fold: the problem without the points
// out, and those points.
type chebFold struct {
	train *chebData
	out   []Point
}

func newChebSearch(t *Table, opt Options) *chebSearch {
	tr, pr := t.extent()
	c := Chebyshev{Tmin: tr[0], Tmax: tr[1], Pmin: pr[0], Pmax: pr[1]}
	s := &chebSearch{t: t, tol: opt.Tolerance, c: c, full: newChebData(t.Points, t.Weighted(), c)}
	s.extra = extraPoints(opt.Holdout, tr, pr)
	s.redT, s.redExtra = reducedAll(c, t.Points), reducedAll(c, s.extra)
	if len(s.extra) == 0 {
		for _, f := range cvFolds(t, opt.GroupTol) {
			train := t.without(f)
			out := make([]Point, len(f))
			for i, j := range f {
				out[i] = t.Points[j]
			}
			s.folds = append(s.folds, chebFold{train: newChebData(train.Points, t.Weighted(), c), out: out})
		}
	}
	return s
}

// heldOut returns the held-out error of the fitted order r: at the extra
// points, or by refitting each fold; nil if neither is possible.
func (s *chebSearch) heldOut(r *ChebyshevResult) *heldOutAcc {
	if len(s.extra) > 0 {
		a := newHeldOutAcc(HeldOutExtra)
		for i, p := range s.extra {
			a.add(p, r.evalReduced(s.redExtra[i][0], s.redExtra[i][1]))
		}
		return a
	}
	if len(s.folds) == 0 {
		return nil
	}
	a := newHeldOutAcc(HeldOutCV)
	for _, f := range s.folds {
		coef, err := f.train.fit(r.NT, r.NP)
		if err != nil {
			a.ok = false
			return a
		}
		c := s.c
		c.Coef = coef
		for _, p := range f.out {
			a.add(p, c.Eval(p.T, p.P))
		}
	}
	return a
}

// chebCand is one order tried by the automatic search.
type chebCand struct {
	r   *ChebyshevResult
	ho  *heldOutAcc
	hoE float64 // held-out max error, fraction; +Inf if unavailable
}

// auto searches the orders (see FitChebyshev) for a table with nTd
// distinct temperatures and nPd distinct pressures.
func (s *chebSearch) auto(nTd, nPd int) (*ChebyshevResult, error) {
	maxT := min(maxAutoNT, max(1, nTd-1))
	maxP := min(maxAutoNP, max(1, nPd-1))
	maxN := max(1, s.t.sites()/2)
	haveHeldOut := len(s.extra) > 0 || len(s.folds) > 0
	var cands []chebCand
	var lastErr error
	best, stall := math.Inf(1), 0
search:
	for n := 1; n <= min(maxT*maxP, maxN); n++ {
		for np := 1; np <= min(n, maxP); np++ {
			if n%np != 0 || n/np > maxT {
				continue
			}
			r, err := s.result(n/np, np)
			if err != nil {
				lastErr = err
				continue
			}
			if !haveHeldOut {
				if r.MaxError() <= s.tol {
					return r, nil
				}
				cands = append(cands, chebCand{r: r, hoE: r.MaxError()})
				continue
			}
			ho := s.heldOut(r)
			c := chebCand{r: r, ho: ho, hoE: ho.maxOrInf()}
			cands = append(cands, c)
			if r.MaxError() <= s.tol && c.hoE <= s.tol {
				r.HeldOut = ho.result()
				return r, nil
			}
			if c.hoE < 0.9*best {
				best, stall = c.hoE, 0
			} else if stall++; stall >= chebStall {
				break search
			}
		}
	}
	if len(cands) == 0 {
		if lastErr == nil {
			lastErr = fmt.Errorf("%w: %s: no Chebyshev order fits the table", ErrTooFewData, s.t.name())
		}
		return nil, lastErr
	}
	// None met the tolerance: the smallest held-out error, or the first
	// order within a tenth of it (fewer coefficients for the same error).
	least := math.Inf(1)
	for _, c := range cands {
		least = math.Min(least, c.hoE)
	}
	if math.IsInf(least, 1) {
		return nil, fmt.Errorf("%w: %s: no Chebyshev order could be cross-validated (every order needs the rows or columns a fold leaves out)",
			ErrTooFewData, s.t.name())
	}
	for _, c := range cands {
		if c.hoE <= 1.1*least {
			if c.ho != nil {
				c.r.HeldOut = c.ho.result()
			}
			return c.r, nil
		}
	}
	panic("fit: Chebyshev search lost its best order") // least is one of the hoE
}

// chebData is the linear least-squares problem of a Chebyshev fit to a
// set of points over a fixed range. On a full grid without weights (one
// point at every pair of its distinct temperatures and pressures, as the
// master equation gives) the design matrix is the Kronecker product of a
// temperature and a pressure matrix, and the problem separates: the
// coefficients are A_T⁺·Y·A_P⁺ᵀ with Y the grid of log10 k, two small
// solves instead of one of (points × coefficients).
type chebData struct {
	c   Chebyshev // range (Coef nil)
	pts []Point
	w   []float64
	// Full grid: distinct temperatures and pressures and log10 k on them.
	grid         bool
	temps, press []float64
	y            *mat.Dense
}

func newChebData(pts []Point, weighted bool, c Chebyshev) *chebData {
	d := &chebData{c: c, pts: pts, w: make([]float64, len(pts))}
	for i, p := range pts {
		d.w[i] = 1
		if weighted && p.Sigma > 0 {
			d.w[i] = 1 / p.Sigma
		}
	}
	if weighted {
		return d
	}
	tv, pv := make([]float64, len(pts)), make([]float64, len(pts))
	for i, p := range pts {
		tv[i], pv[i] = p.T, p.P
	}
	temps, press := distinct(tv), distinct(pv)
	if len(temps)*len(press) != len(pts) {
		return d
	}
	y := mat.NewDense(len(temps), len(press), nil)
	seen := make([]bool, len(pts))
	for _, p := range pts {
		i, j := index(temps, p.T), index(press, p.P)
		if seen[i*len(press)+j] {
			return d // a replicate: not a plain grid
		}
		seen[i*len(press)+j] = true
		y.Set(i, j, math.Log10(p.K))
	}
	d.grid, d.temps, d.press, d.y = true, temps, press, y
	return d
}

// fit returns the nT × nP coefficients (rows = temperature index).
func (d *chebData) fit(nT, nP int) ([][]float64, error) {
	if d.grid {
		return d.fitGrid(nT, nP)
	}
	a := mat.NewDense(len(d.pts), nT*nP, nil)
	b := mat.NewVecDense(len(d.pts), nil)
	ft, fp := make([]float64, nT), make([]float64, nP)
	for i, p := range d.pts {
		x, y := d.c.reduced(p.T, p.P)
		chebyshevT(x, ft)
		chebyshevT(y, fp)
		for k := range nT {
			for l := range nP {
				a.Set(i, k*nP+l, d.w[i]*ft[k]*fp[l])
			}
		}
		b.SetVec(i, d.w[i]*math.Log10(p.K))
	}
	var qr mat.QR
	qr.Factorize(a)
	if cond := qr.Cond(); !(cond < maxCond) {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit (condition number %.3g): the points do not determine that many coefficients",
			ErrIllConditioned, nT, nP, cond)
	}
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, b); err != nil {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit: %v", ErrIllConditioned, nT, nP, err)
	}
	coef := make([][]float64, nT)
	for k := range nT {
		coef[k] = make([]float64, nP)
		for l := range nP {
			coef[k][l] = x.AtVec(k*nP + l)
		}
	}
	return coef, nil
}

// fitGrid solves the separated problem of a full grid: X = A_T⁺·Y, then
// Cᵀ = A_P⁺·Xᵀ. The condition number of the Kronecker product is the
// product of the two.
func (d *chebData) fitGrid(nT, nP int) ([][]float64, error) {
	if nT > len(d.temps) || nP > len(d.press) {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit to %d × %d points", ErrTooFewData, nT, nP, len(d.temps), len(d.press))
	}
	basis := func(vals []float64, n int, reduce func(float64) float64) *mat.Dense {
		a := mat.NewDense(len(vals), n, nil)
		row := make([]float64, n)
		for i, v := range vals {
			chebyshevT(reduce(v), row)
			a.SetRow(i, row)
		}
		return a
	}
	at := basis(d.temps, nT, func(t float64) float64 { x, _ := d.c.reduced(t, d.c.Pmin); return x })
	ap := basis(d.press, nP, func(p float64) float64 { _, y := d.c.reduced(d.c.Tmin, p); return y })
	var qt, qp mat.QR
	qt.Factorize(at)
	qp.Factorize(ap)
	if cond := qt.Cond() * qp.Cond(); !(cond < maxCond) {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit (condition number %.3g): the points do not determine that many coefficients",
			ErrIllConditioned, nT, nP, cond)
	}
	var x, ct mat.Dense
	if err := qt.SolveTo(&x, false, d.y); err != nil {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit: %v", ErrIllConditioned, nT, nP, err)
	}
	if err := qp.SolveTo(&ct, false, x.T()); err != nil {
		return nil, fmt.Errorf("%w: %d × %d Chebyshev fit: %v", ErrIllConditioned, nT, nP, err)
	}
	coef := make([][]float64, nT)
	for k := range nT {
		coef[k] = make([]float64, nP)
		for l := range nP {
			coef[k][l] = ct.At(l, k)
		}
	}
	return coef, nil
}
