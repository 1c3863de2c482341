package fit

import (
	"fmt"
	"math"
	"slices"
)

// Ways a held-out error was obtained (HeldOut.Method).
const (
	// HeldOutExtra: the form was evaluated at extra points computed off
	// the table (Options.Holdout), e.g. by the master equation between the
	// grid's temperatures and pressures.
	HeldOutExtra = "extra points"
	// HeldOutCV: cross-validation on the table itself (see cvFolds): each
	// interior temperature row and each interior pressure column is left
	// out in turn, the form refitted without it and compared with it.
	HeldOutCV = "cross-validation"
)

// HeldOut is the error of a fitted form at points it was not fitted to:
// relative errors |k_fit/k − 1| in per cent, unweighted, like Report's.
// It measures what Report's in-sample error cannot: the error between the
// table's points, where a simulator evaluates the form. A form that gives
// no finite k at a held-out point has an error of 1e300 % there
// (heldOutCapPct), since JSON holds no infinity.
type HeldOut struct {
	MaxErrorPct float64 `json:"heldout_max_error_pct"`
	RMSErrorPct float64 `json:"heldout_rms_error_pct"`
	// Points is the number of comparisons: the extra points inside the
	// table's range, or, for cross-validation, the points of every fold
	// (a point left out once with its row and once with its column counts
	// twice).
	Points int     `json:"heldout_points"`
	Method string  `json:"heldout_method"` // HeldOutExtra or HeldOutCV
	WorstT float64 `json:"heldout_worst_T_K"`
	WorstP float64 `json:"heldout_worst_P_Pa"`
}

// MaxError returns the largest held-out relative error as a fraction; 0
// for a nil HeldOut (nothing is known, so nothing counts against a form).
func (h *HeldOut) MaxError() float64 {
	if h == nil {
		return 0
	}
	return h.MaxErrorPct / 100
}

// within reports whether the held-out error is within tol (a fraction);
// true when there is no held-out error.
func (h *HeldOut) within(tol float64) bool { return h == nil || h.MaxError() <= tol }

// problem says in words how the held-out error misses tol, "" if it does
// not.
func (h *HeldOut) problem(tol float64) string {
	if h.within(tol) {
		return ""
	}
	return fmt.Sprintf("held-out max error %.3g %% (%s) exceeds the %.3g %% tolerance",
		h.MaxErrorPct, h.Method, 100*tol)
}

// phrase returns "; held-out max error X % by METHOD" to close the
// parenthesis of a reason sentence, "" without a held-out error.
func (h *HeldOut) phrase() string {
	if h == nil {
		return ""
	}
	return fmt.Sprintf("; held-out max error %.3g %% by %s", h.MaxErrorPct, h.Method)
}

// heldOutCapPct is the held-out error, in per cent, reported for a form
// whose error between the points is beyond float64 range or not a number
// at all (it gives no finite k there): JSON holds no infinity.
const heldOutCapPct = 1e300

// heldOutAcc accumulates relative errors into a HeldOut. The RMS sums
// (e/scale)², scale the largest e so far, so that no square overflows.
type heldOutAcc struct {
	h         HeldOut
	scale, ss float64
	ok        bool // false once a refit failed: the error cannot be computed
}

func newHeldOutAcc(method string) *heldOutAcc {
	return &heldOutAcc{h: HeldOut{Method: method}, ok: true}
}

// add compares the fitted k with the point p; a k that is not positive and
// finite counts as an infinite error.
func (a *heldOutAcc) add(p Point, k float64) {
	e := math.Abs(k/p.K - 1)
	if !(k > 0) || math.IsInf(k, 0) || math.IsNaN(e) {
		e = math.Inf(1)
	}
	switch {
	case a.h.Points == 0 || e > a.scale:
		if a.scale > 0 {
			a.ss *= (a.scale / e) * (a.scale / e)
		}
		if e > 0 {
			a.ss++
		}
		a.scale, a.h.WorstT, a.h.WorstP = e, p.T, p.P
	case a.scale > 0:
		a.ss += (e / a.scale) * (e / a.scale)
	}
	a.h.Points++
}

// result returns the HeldOut, or nil if nothing was compared or a refit
// failed. Errors beyond float64 range are reported as heldOutCapPct.
func (a *heldOutAcc) result() *HeldOut {
	if a == nil || !a.ok || a.h.Points == 0 {
		return nil
	}
	h := a.h
	h.MaxErrorPct = math.Min(100*a.scale, heldOutCapPct)
	h.RMSErrorPct = math.Min(100*a.scale*math.Sqrt(a.ss/float64(h.Points)), heldOutCapPct)
	if math.IsNaN(h.RMSErrorPct) { // 0·Inf cannot happen (scale > 0 when ss > 0), but never write NaN
		h.RMSErrorPct = heldOutCapPct
	}
	return &h
}

// maxOrInf returns the held-out max error of a as a fraction, +Inf if it
// is nil, has failed, is empty or beyond float64 range.
func (a *heldOutAcc) maxOrInf() float64 {
	if h := a.result(); h != nil && h.MaxErrorPct < heldOutCapPct {
		return h.MaxError()
	}
	return math.Inf(1)
}

// DefaultGroupTol is the default relative tolerance within which two
// pressures (or temperatures) count as one group: 5 %, wide enough for the
// scatter of the pressures of a measured data set (1.00 and 1.03 Torr) and
// far below the factor of about 2 between the pressures of a computed grid.
const DefaultGroupTol = 0.05

// maxHeldOutRange is the relative margin by which an extra held-out point
// may lie outside the table's range and still count as inside (rounding of
// the grid's ends).
const maxHeldOutRange = 1e-9

// extraPoints returns the points of h inside the T range tr and P range
// pr (K, Pa) of a table: held-out points outside would measure
// extrapolation, which no form is used for.
func extraPoints(h *Table, tr, pr [2]float64) []Point {
	if h == nil {
		return nil
	}
	var out []Point
	for _, p := range h.Points {
		if p.T >= tr[0]*(1-maxHeldOutRange) && p.T <= tr[1]*(1+maxHeldOutRange) &&
			p.P >= pr[0]*(1-maxHeldOutRange) && p.P <= pr[1]*(1+maxHeldOutRange) && p.K > 0 && !math.IsInf(p.K, 0) {
			out = append(out, p)
		}
	}
	return out
}

// checkHoldout checks the extra held-out points of opt, as Validate checks
// a table.
func checkHoldout(opt Options) error {
	if opt.Holdout == nil {
		return nil
	}
	if len(opt.Holdout.Points) == 0 {
		return nil
	}
	h := *opt.Holdout
	if h.Name == "" {
		h.Name = "held-out points"
	}
	return h.Validate()
}

// heldOutExtra compares f with the extra points pts.
func heldOutExtra(pts []Point, f Evaluator) *HeldOut {
	a := newHeldOutAcc(HeldOutExtra)
	for _, p := range pts {
		a.add(p, f.Eval(p.T, p.P))
	}
	return a.result()
}

// group is a set of points whose T (or P) agree within a tolerance.
type group struct {
	value float64 // geometric mean of the distinct values in the group
	idx   []int   // indices into Table.Points
}

// groupBy returns the groups of the table's points by key (p.T or p.P),
// ascending: sorted distinct values are put in one group while they stay
// within a factor 1+tol of the group's smallest value (so groups cannot
// chain). tol ≤ 0 groups only equal values (within distinctRelTol).
func groupBy(pts []Point, key func(Point) float64, tol float64) []group {
	tol = max(tol, distinctRelTol)
	order := make([]int, len(pts))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		switch ka, kb := key(pts[a]), key(pts[b]); {
		case ka < kb:
			return -1
		case ka > kb:
			return 1
		}
		return 0
	})
	var out []group
	var first, lnSum, last float64
	var nDistinct int
	flush := func() {
		switch {
		case len(out) == 0:
		case nDistinct == 1:
			out[len(out)-1].value = first // exactly, not through exp(log)
		default:
			out[len(out)-1].value = math.Exp(lnSum / float64(nDistinct))
		}
	}
	for _, i := range order {
		v := key(pts[i])
		if len(out) == 0 || v > first*(1+tol) {
			flush()
			out = append(out, group{})
			first, lnSum, nDistinct, last = v, 0, 0, math.Inf(-1)
		}
		g := &out[len(out)-1]
		g.idx = append(g.idx, i)
		if math.Abs(v-last) > distinctRelTol*v {
			lnSum += math.Log(v)
			nDistinct++
			last = v
		}
	}
	flush()
	return out
}

// maxCVFolds is the most folds cross-validation leaves out along each of
// T and P: on a large table, this many interior rows (and columns), evenly
// spread, measure the error between rows as well as all of them would, at
// a tenth of the cost of a 30 × 20 grid's.
const maxCVFolds = 10

// cvFolds returns the folds of the cross-validation of table t: each is
// the indices of the points left out. A fold is every point of one
// interior temperature group, or of one interior pressure group (groups
// within tol, as groupBy); the first and last group of each never leave,
// so every fold's fit spans the table's range and the comparison measures
// interpolation, not extrapolation. At most maxCVFolds of each kind,
// evenly spread over the interior groups. Leaving a whole row out doubles
// the local spacing of the data, so the held-out error is an upper
// estimate of the error between the table's rows and columns.
func cvFolds(t *Table, tol float64) [][]int {
	var folds [][]int
	for _, key := range []func(Point) float64{func(p Point) float64 { return p.T }, func(p Point) float64 { return p.P }} {
		gs := groupBy(t.Points, key, tol)
		if len(gs) < 3 {
			continue
		}
		for _, i := range spread(len(gs)-2, maxCVFolds) {
			folds = append(folds, gs[1+i].idx)
		}
	}
	return folds
}

// spread returns min(n, m) indices out of 0..n−1, evenly spread and
// including both ends.
func spread(n, m int) []int {
	if n <= m {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	out := make([]int, 0, m)
	for k := range m {
		i := int(math.Round(float64(k) * float64(n-1) / float64(m-1)))
		if len(out) == 0 || i != out[len(out)-1] {
			out = append(out, i)
		}
	}
	return out
}

// without returns a copy of t without the points at the indices out.
func (t *Table) without(out []int) *Table {
	drop := make(map[int]bool, len(out))
	for _, i := range out {
		drop[i] = true
	}
	s := &Table{Name: t.Name, KUnits: t.KUnits, Points: make([]Point, 0, len(t.Points)-len(out))}
	for i, p := range t.Points {
		if !drop[i] {
			s.Points = append(s.Points, p)
		}
	}
	return s
}

// heldOutCV cross-validates a fitting procedure on t: for each fold of
// cvFolds it calls refit on the table without the fold and compares the
// result with the points left out. It returns nil if t has no interior
// rows or columns, and an accumulator whose maxOrInf is +Inf if a refit
// failed (the data without the fold do not determine the form: more
// parameters than the data support).
func heldOutCV(t *Table, tol float64, refit func(train *Table) (Evaluator, error)) *heldOutAcc {
	folds := cvFolds(t, tol)
	if len(folds) == 0 {
		return nil
	}
	a := newHeldOutAcc(HeldOutCV)
	for _, f := range folds {
		e, err := refit(t.without(f))
		if err != nil {
			a.ok = false
			return a
		}
		for _, i := range f {
			p := t.Points[i]
			a.add(p, e.Eval(p.T, p.P))
		}
	}
	return a
}

// heldOutOf returns the held-out error of a form fitted to t: at the extra
// points of opt inside the table's range if there are any, else by
// cross-validation with refit. It returns nil when neither is possible.
func heldOutOf(t *Table, opt Options, f Evaluator, refit func(train *Table) (Evaluator, error)) *HeldOut {
	tr, pr := t.extent()
	if pts := extraPoints(opt.Holdout, tr, pr); len(pts) > 0 {
		return heldOutExtra(pts, f)
	}
	if a := heldOutCV(t, opt.GroupTol, refit); a != nil {
		return a.result()
	}
	return nil
}

// eachFitted calls fn with every fitted form of res and a pointer to its
// report, in the order of Forms.
func (res *Results) eachFitted(fn func(name FormName, f Form, rep *Report)) {
	if r := res.Arrhenius; r != nil {
		fn(FormArrhenius, &r.Rate, &r.Report)
	}
	for _, r := range []*FalloffResult{res.Lindemann, res.Troe, res.SRI} {
		if r != nil {
			fn(r.Name(), &r.Falloff, &r.Report)
		}
	}
	if r := res.Chebyshev; r != nil {
		fn(FormChebyshev, &r.Chebyshev, &r.Report)
	}
	if r := res.PLOG; r != nil {
		fn(FormPLOG, &r.PLOG, &r.Report)
	}
}

// annotate adds to every fitted form of res its held-out error (computed
// here for the forms whose own fit does not: arrhenius and the falloff
// forms) and, for a table with uncertainties, the scatter test. A form
// whose held-out error exceeds opt.Tolerance is marked failed: it is
// judged by its largest error over every point known, those of the table
// and those held out.
func (res *Results) annotate(t *Table, opt Options) {
	if r := res.Arrhenius; r != nil && r.HeldOut == nil {
		r.HeldOut = heldOutOf(t, opt, &r.Rate, func(train *Table) (Evaluator, error) {
			a, err := fitArrheniusTable(train, opt)
			if err != nil {
				return nil, err
			}
			return &a.Rate, nil
		})
	}
	for _, r := range []*FalloffResult{res.Lindemann, res.Troe, res.SRI} {
		if r != nil && r.HeldOut == nil {
			r.HeldOut = heldOutOf(t, opt, &r.Falloff, falloffRefit(r, opt))
		}
	}
	res.eachFitted(func(_ FormName, f Form, rep *Report) {
		rep.Scatter = newScatter(t, f, rep.NParams)
		if why := rep.HeldOut.problem(opt.Tolerance); why != "" {
			if !rep.Failed {
				rep.judge(opt.Tolerance)
			}
			rep.Failed = true
			if rep.FailReason != "" {
				why = rep.FailReason + "; " + why
			}
			rep.FailReason = why
		}
	})
}

// falloffRefit returns the refit of the falloff result r for
// cross-validation: the same broadening, from r's parameters, with the
// limits held if r held them (given limits, not refined), and the
// parameters opt.Fix fixes held.
func falloffRefit(r *FalloffResult, opt Options) func(*Table) (Evaluator, error) {
	if opt.Fix.falloff() {
		return func(train *Table) (Evaluator, error) {
			f, err := fixedStage(train, r.kind, r.Low, r.High, opt.Fix, [][]float64{broadCoords(r)})
			if err != nil {
				return nil, err
			}
			return &f.Falloff, nil
		}
	}
	hold := opt.Limits != nil && (len(opt.Limits.K0) > 0 || opt.Limits.Low != nil && opt.Limits.High != nil) && !r.LimitsRefined
	return func(train *Table) (Evaluator, error) {
		f, err := fitStage(train, r.kind, r.Low, r.High, hold, [][]float64{broadCoords(r)})
		if err != nil {
			return nil, err
		}
		return &f.Falloff, nil
	}
}
