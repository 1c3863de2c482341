package thermo

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Range is the temperature range of a NASA fit in K: two polynomials, one on
// [TLow, TMid] and one on [TMid, THigh].
type Range struct {
	TLow, TMid, THigh float64
}

// DefaultRange is the fit range unless the input or the user sets another:
// 200–3000 K with the customary midpoint of 1000 K.
var DefaultRange = Range{TLow: 200, TMid: 1000, THigh: 3000}

// minSpan is the narrowest part of a fit range in K: a quartic on a
// narrower one is determined by rounding more than by the table.
const minSpan = 10.0

// Check reports a range that cannot be fitted: outside [MinT, MaxT], or
// not TLow < TMid < THigh with at least 10 K in each part. With auto set
// TMid is not looked at (the fit chooses it).
func (r Range) Check(auto bool) error {
	switch {
	case !(r.TLow >= MinT) || !(r.THigh <= MaxT):
		return fmt.Errorf("%w: fit range %v to %v K (need %v to %v K)", ErrTemperature, r.TLow, r.THigh, MinT, MaxT)
	case auto && !(r.THigh-r.TLow >= 4*minSpan):
		return fmt.Errorf("thermo: fit range %v to %v K: need at least %v K", r.TLow, r.THigh, 4*minSpan)
	case !auto && !(r.TMid-r.TLow >= minSpan && r.THigh-r.TMid >= minSpan):
		return fmt.Errorf("thermo: fit range %v, %v, %v K: need Tlow < Tmid < Thigh, each part at least %v K wide", r.TLow, r.TMid, r.THigh, minSpan)
	}
	return nil
}

// FitOptions set a NASA fit.
type FitOptions struct {
	Range Range
	// AutoMidpoint chooses TMid (Range.TMid is then ignored) as the
	// midpoint, on a 10 K grid, of the least largest relative error in Cp.
	AutoMidpoint bool
	// MatchSlope makes dCp/dT continuous at TMid too, on top of Cp, H and
	// S. Simulators need only the latter; the slope costs accuracy (the
	// largest Cp error of CH4 over 200–1000–3000 K grows from 0.17 % to 0.24 %).
	MatchSlope bool
}

// Sampling: fitPoints evenly spaced temperatures over the whole range
// (plus the midpoint, in both parts) are fitted; the errors are measured at
// checkFactor times as many.
const (
	fitPoints   = 401
	checkFactor = 4
)

// lawsonIterations is the number of reweighting steps toward the least
// largest error (Lawson's algorithm: each row's weight is multiplied by its
// residual; C. L. Lawson, thesis, UCLA 1961; see Rice & Usow, Math. Comp.
// 22, 118, 1968). The iterate with the smallest largest residual is kept,
// since the steps are not monotone; 30 take the largest Cp error of the
// test molecules within a few per cent of its limit.
const lawsonIterations = 30

// FitError is the largest difference between a NASA fit and the table it
// was fitted to, over the fit range on a grid four times finer than the
// fitted one, and where it occurs.
type FitError struct {
	Cp    float64 `json:"max_Cp_error_J_per_mol_K"`
	CpPct float64 `json:"max_Cp_error_pct"` // of Cp at the same T
	CpAt  float64 `json:"max_Cp_error_at_K"`
	S     float64 `json:"max_S_error_J_per_mol_K"`
	SPct  float64 `json:"max_S_error_pct"` // of S at the same T
	SAt   float64 `json:"max_S_error_at_K"`
	H     float64 `json:"max_H_error_J_per_mol"`
	HAt   float64 `json:"max_H_error_at_K"`
	// HRT and SR are the largest |ΔH|/RT and |ΔS|/R: bounds on a species'
	// share of the error in ln K of any equilibrium constant from the fit,
	// |Δ ln K| ≤ Σ|ν|·(HRT + SR).
	HRT float64 `json:"max_H_error_over_RT"`
	SR  float64 `json:"max_S_error_over_R"`
}

// ErrFit reports a fit that the least-squares solve could not make.
var ErrFit = errors.New("thermo: NASA fit failed")

// Fit fits NASA 7-coefficient polynomials to m over o.Range, with the
// absolute enthalpy H°(298.15 K) = dfH298 (J mol⁻¹: the formation enthalpy,
// or a placeholder). The two polynomials share Cp, H and S (and with
// o.MatchSlope dCp/dT) at the midpoint, and reproduce H and S at 298.15 K
// exactly when it lies in the range. The range must lie within
// [MinT, m.TMax()].
func Fit(m *Model, dfH298 float64, o FitOptions) (*NASA7, FitError, error) {
	r := o.Range
	if err := r.Check(o.AutoMidpoint); err != nil {
		return nil, FitError{}, err
	}
	if r.THigh > m.tMax*(1+1e-12) {
		return nil, FitError{}, fmt.Errorf("%w: fit range to %v K beyond the model's %v K", ErrTemperature, r.THigh, m.tMax)
	}
	if math.IsNaN(dfH298) || math.IsInf(dfH298, 0) {
		return nil, FitError{}, fmt.Errorf("thermo: formation enthalpy %v J/mol is not a finite number", dfH298)
	}
	d := m.newFitData(r)
	var p *NASA7
	var fe FitError
	if o.AutoMidpoint {
		var err error
		if p, fe, err = d.bestMidpoint(o.MatchSlope); err != nil {
			return nil, FitError{}, fmt.Errorf("%w: species %q: %v", ErrFit, m.sp.Name, err)
		}
	} else {
		var err error
		if p, err = d.fit(r.TMid, o.MatchSlope); err != nil {
			return nil, FitError{}, fmt.Errorf("%w: species %q: %v", ErrFit, m.sp.Name, err)
		}
		fe = d.errors(p)
	}
	// The fit and its errors take H relative to 298.15 K; the formation
	// enthalpy moves a6 of both ranges alike.
	p.Low[5] += dfH298 / R
	p.High[5] += dfH298 / R
	if err := p.Check(); err != nil {
		return nil, FitError{}, fmt.Errorf("%w: species %q: %v", ErrFit, m.sp.Name, err)
	}
	return p, fe, nil
}

// fitData holds the model's values on the sample and check grids, so that
// fits at many midpoints evaluate the partition functions once.
type fitData struct {
	m       *Model
	r       Range
	samples []sample // fitted, ascending in T
	checks  []Point  // m.At on the check grid, H relative to 298.15 K
}

// sample is the model at one temperature in the units of the fit:
// Cp/R, (H(T) − H(298.15 K))/RT and S/R.
type sample struct{ t, cp, h, s float64 }

func (m *Model) sample(t float64) sample {
	red := m.reduced(t)
	return sample{t: t, cp: red.c + 1, h: (t*(red.u+1) - m.h298) / t, s: red.lnq + red.u + 1}
}

func (m *Model) newFitData(r Range) *fitData {
	d := &fitData{m: m, r: r}
	for _, t := range linspace(r.TLow, r.THigh, fitPoints) {
		d.samples = append(d.samples, m.sample(t))
	}
	d.checks = m.Table(linspace(r.TLow, r.THigh, checkFactor*(fitPoints-1)+1))
	return d
}

// linspace returns n evenly spaced values from a to b, both included.
func linspace(a, b float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	out[n-1] = b
	return out
}

// bestMidpoint fits at midpoints 50 K apart, then 10 K apart around the
// best, keeping the fit of the least largest relative Cp error.
func (d *fitData) bestMidpoint(slope bool) (*NASA7, FitError, error) {
	var best *NASA7
	var bestErr FitError
	try := func(tm float64) error {
		if tm-d.r.TLow < minSpan || d.r.THigh-tm < minSpan {
			return nil
		}
		p, err := d.fit(tm, slope)
		if err != nil {
			return err
		}
		if e := d.errors(p); best == nil || e.CpPct < bestErr.CpPct {
			best, bestErr = p, e
		}
		return nil
	}
	lo, hi := d.r.TLow, d.r.THigh
	for tm := math.Ceil((lo+minSpan)/50) * 50; tm <= hi-minSpan; tm += 50 {
		if err := try(tm); err != nil {
			return nil, FitError{}, err
		}
	}
	if best == nil { // a range narrower than 50 K: its middle
		if err := try((lo + hi) / 2); err != nil {
			return nil, FitError{}, err
		}
		return best, bestErr, nil
	}
	centre := best.TMid
	for tm := centre - 40; tm <= centre+40; tm += 10 {
		if tm != centre {
			if err := try(tm); err != nil {
				return nil, FitError{}, err
			}
		}
	}
	return best, bestErr, nil
}

// The fit works in τ = T/tScale so that the columns T⁰…T⁴ stay of order
// one; unscale converts the coefficients b of τ back to the a of T.
const tScale = 1000.0

func unscale(b []float64) [7]float64 {
	return [7]float64{
		b[0],
		b[1] / tScale,
		b[2] / (tScale * tScale),
		b[3] / (tScale * tScale * tScale),
		b[4] / (tScale * tScale * tScale * tScale),
		b[5] * tScale,
		b[6] - b[0]*math.Log(tScale),
	}
}

// Rows of the seven coefficients of one range at τ.
func cpRow(t float64) []float64 { return []float64{1, t, t * t, t * t * t, t * t * t * t, 0, 0} }
func dCpRow(t float64) []float64 {
	return []float64{0, 1, 2 * t, 3 * t * t, 4 * t * t * t, 0, 0}
}
func hRow(t float64) []float64 {
	return []float64{1, t / 2, t * t / 3, t * t * t / 4, t * t * t * t / 5, 1 / t, 0}
}
func sRow(t float64) []float64 {
	return []float64{math.Log(t), t, t * t / 2, t * t * t / 3, t * t * t * t / 4, 0, 1}
}

// fit returns the polynomials fitted with the midpoint tm, H relative to
// H°(298.15 K) (a6 without the formation enthalpy).
func (d *fitData) fit(tm float64, slope bool) (*NASA7, error) {
	const n = 14
	var rows [][]float64
	var rhs []float64
	add := func(block int, row []float64, w, y float64) {
		full := make([]float64, n)
		for j, x := range row {
			full[7*block+j] = w * x
		}
		rows = append(rows, full)
		rhs = append(rhs, w*y)
	}
	mid := d.m.sample(tm)
	for block := range 2 {
		pts := []sample{mid}
		for _, s := range d.samples {
			if (block == 0 && s.t < tm) || (block == 1 && s.t > tm) {
				pts = append(pts, s)
			}
		}
		for _, s := range pts {
			tau := s.t / tScale
			// Relative errors in Cp and S; H/RT on the scale of Cp/R, its
			// derivative in ln T.
			add(block, cpRow(tau), 1/s.cp, s.cp)
			add(block, hRow(tau), 1/s.cp, s.h)
			add(block, sRow(tau), 1/math.Max(s.s, 1), s.s)
		}
	}

	// Equality constraints C·x = e: continuity at the midpoint, exact H and
	// S at 298.15 K.
	var cons [][]float64
	var e []float64
	fs := []func(float64) []float64{cpRow, hRow, sRow}
	if slope {
		fs = append(fs, dCpRow)
	}
	for _, f := range fs {
		lo, hi := f(tm/tScale), f(tm/tScale)
		row := make([]float64, n)
		for j := range 7 {
			row[j], row[7+j] = lo[j], -hi[j]
		}
		cons = append(cons, row)
		e = append(e, 0)
	}
	if TRef >= d.r.TLow && TRef <= d.r.THigh {
		block := 0
		if TRef > tm {
			block = 1
		}
		ref := d.m.sample(TRef)
		for _, c := range []struct {
			row []float64
			y   float64
		}{{hRow(TRef / tScale), ref.h}, {sRow(TRef / tScale), ref.s}} {
			row := make([]float64, n)
			copy(row[7*block:], c.row)
			cons = append(cons, row)
			e = append(e, c.y)
		}
	}
	b, err := constrainedMinimax(rows, rhs, cons, e)
	if err != nil {
		return nil, err
	}
	return &NASA7{TLow: d.r.TLow, TMid: tm, THigh: d.r.THigh, Low: unscale(b[:7]), High: unscale(b[7:])}, nil
}

// constrainedMinimax minimises the largest |A·x − b|_i subject to C·x = e,
// approximately: the null-space method (Golub & Van Loan, Matrix
// Computations, 4th ed. 2013, §6.2.4) turns the constraints into
// x = x1 + Q2·y, with Cᵀ = Q·R, R1ᵀ·y1 = e and x1 = Q1·y1; y then solves
// least-squares problems A·Q2·y ≈ b − A·x1 (by QR), reweighted by Lawson's
// rule, keeping the solution of the least largest residual.
func constrainedMinimax(a [][]float64, b []float64, c [][]float64, e []float64) ([]float64, error) {
	n, m, k := len(a[0]), len(a), len(c)
	ct := mat.NewDense(n, k, nil)
	for i, row := range c {
		for j, x := range row {
			ct.Set(j, i, x)
		}
	}
	var qrc mat.QR
	qrc.Factorize(ct)
	var q, rr mat.Dense
	qrc.QTo(&q)
	qrc.RTo(&rr)
	y1 := make([]float64, k) // R1ᵀ·y1 = e by forward substitution
	for i := range k {
		s := e[i]
		for j := range i {
			s -= rr.At(j, i) * y1[j]
		}
		diag := rr.At(i, i)
		if math.Abs(diag) < 1e-12*mat.Norm(ct, 2) {
			return nil, errors.New("the constraints are linearly dependent")
		}
		y1[i] = s / diag
	}
	q1 := q.Slice(0, n, 0, k)
	q2 := q.Slice(0, n, k, n)
	am := mat.NewDense(m, n, nil)
	for i, row := range a {
		am.SetRow(i, row)
	}
	var x1, ax1 mat.VecDense
	x1.MulVec(q1, mat.NewVecDense(k, y1))
	ax1.MulVec(am, &x1)
	b2 := mat.NewVecDense(m, nil)
	b2.SubVec(mat.NewVecDense(m, b), &ax1)
	var a2 mat.Dense
	a2.Mul(am, q2)

	w := make([]float64, m)
	for i := range w {
		w[i] = 1
	}
	var best *mat.VecDense
	bestMax := math.Inf(1)
	aw := mat.NewDense(m, n-k, nil)
	bw := mat.NewVecDense(m, nil)
	for range lawsonIterations + 1 {
		for i := range m {
			sw := math.Sqrt(w[i])
			for j := range n - k {
				aw.Set(i, j, a2.At(i, j)*sw)
			}
			bw.SetVec(i, b2.AtVec(i)*sw)
		}
		var qra mat.QR
		qra.Factorize(aw)
		y := mat.NewVecDense(n-k, nil)
		if err := qra.SolveVecTo(y, false, bw); err != nil {
			if best != nil {
				break // a later step lost rank; keep the best so far
			}
			return nil, fmt.Errorf("least squares: %w", err)
		}
		var res mat.VecDense
		res.MulVec(&a2, y)
		res.SubVec(&res, b2)
		worst, sum := 0.0, 0.0
		for i := range m {
			r := math.Abs(res.AtVec(i))
			worst = math.Max(worst, r)
			w[i] *= r
			sum += w[i]
		}
		if worst < bestMax {
			best, bestMax = y, worst
		}
		if !(sum > 0) {
			break // an exact fit
		}
		for i := range m {
			// A floor keeps every row in play: a weight of zero would drop
			// it for good and can leave the problem rank-deficient.
			w[i] = math.Max(w[i]/sum, 1e-12)
		}
	}
	var x mat.VecDense
	x.MulVec(q2, best)
	x.AddVec(&x, &x1)
	out := make([]float64, n)
	for i := range out {
		if out[i] = x.AtVec(i); math.IsNaN(out[i]) || math.IsInf(out[i], 0) {
			return nil, errors.New("a coefficient is not a finite number")
		}
	}
	return out, nil
}

// errors measures p (H relative to 298.15 K) against the check grid.
func (d *fitData) errors(p *NASA7) FitError {
	var e FitError
	for _, pt := range d.checks {
		t := pt.T
		if dc := math.Abs(R*p.CpR(t) - pt.Cp); dc > e.Cp {
			e.Cp, e.CpPct, e.CpAt = dc, 100*dc/pt.Cp, t
		}
		ds := math.Abs(R*p.SR(t) - pt.S)
		if ds > e.S {
			e.S, e.SPct, e.SAt = ds, 100*ds/pt.S, t
		}
		dh := math.Abs(R*t*p.HRT(t) - pt.H)
		if dh > e.H {
			e.H, e.HAt = dh, t
		}
		e.HRT = math.Max(e.HRT, dh/(R*t))
		e.SR = math.Max(e.SR, ds/R)
	}
	return e
}
