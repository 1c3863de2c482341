package fit

import (
	"fmt"
	"math"
	"strings"
)

// Evaluator gives k at t K and p Pa in the table's units. Every Form is
// an Evaluator, and so are the values Arrhenius, Falloff, PLOG and
// Chebyshev.
type Evaluator interface {
	Eval(t, p float64) float64
}

// Report describes how well a form reproduces a table: relative errors
// |k_fit/k − 1| over all points, unweighted, in per cent, and the extent
// of the data, which is the range in which the form may be used.
type Report struct {
	MaxErrorPct float64    `json:"max_error_pct"`
	RMSErrorPct float64    `json:"rms_error_pct"`
	WorstT      float64    `json:"worst_T_K"`  // T of the point with the largest error
	WorstP      float64    `json:"worst_P_Pa"` // P of the point with the largest error
	TRange      [2]float64 `json:"T_range_K"`
	PRange      [2]float64 `json:"P_range_Pa"`
	NParams     int        `json:"n_params"` // number of fitted parameters
	NPoints     int        `json:"n_points"`
	// Failed marks a fit that is not fit for use: its max error exceeds
	// the tolerance, or a parameter sits on the end of its allowed range
	// (the data did not determine it). FailReason says which, in words.
	// Recommend never picks a failed fit.
	Failed     bool   `json:"failed,omitempty"`
	FailReason string `json:"fail_reason,omitempty"`
	// HeldOut is the error at points the form was not fitted to
	// (holdout.go); nil if none could be computed. Scatter compares the
	// residuals with the table's stated uncertainties (scatter.go); nil
	// for a table without them. Both are written flat into the JSON.
	*HeldOut
	*Scatter
}

// NewReport compares f with the table. It returns an error wrapping
// ErrBadData if f gives a non-finite or non-positive k at any point.
func NewReport(t *Table, f Evaluator, nParams int) (Report, error) {
	return reportOf(t, func(i int) float64 { p := t.Points[i]; return f.Eval(p.T, p.P) }, nParams)
}

// reportOf is NewReport with the fitted k at point i given by k(i).
func reportOf(t *Table, kAt func(i int) float64, nParams int) (Report, error) {
	r := Report{NParams: nParams, NPoints: len(t.Points)}
	r.TRange, r.PRange = t.extent()
	ss := 0.0
	for i, p := range t.Points {
		k := kAt(i)
		if !(k > 0) || math.IsInf(k, 0) {
			return Report{}, fmt.Errorf("%w: fitted k = %g at T = %g K, P = %g Pa", ErrBadData, k, p.T, p.P)
		}
		e := math.Abs(k/p.K - 1)
		ss += e * e
		if e > r.MaxErrorPct || r.WorstT == 0 {
			r.MaxErrorPct, r.WorstT, r.WorstP = e, p.T, p.P
		}
	}
	r.MaxErrorPct *= 100
	r.RMSErrorPct = 100 * math.Sqrt(ss/float64(len(t.Points)))
	if !finite(r.MaxErrorPct, r.RMSErrorPct) {
		return Report{}, fmt.Errorf("%w: fit error not finite", ErrBadData)
	}
	return r, nil
}

// formReport compares the fitted form f with the table; the report's
// NParams is f.NParams().
func formReport(t *Table, f Form) (Report, error) { return NewReport(t, f, f.NParams()) }

// MaxError returns the largest relative error as a fraction.
func (r Report) MaxError() float64 { return r.MaxErrorPct / 100 }

// judge sets Failed and FailReason from the tolerance tol (a fraction)
// and the problems found by the fit itself (e.g. parameters on a bound).
func (r *Report) judge(tol float64, problems ...string) {
	var why []string
	if r.MaxError() > tol {
		why = append(why, fmt.Sprintf("max error %.3g %% exceeds the %.3g %% tolerance", r.MaxErrorPct, 100*tol))
	}
	why = append(why, problems...)
	r.Failed = len(why) > 0
	r.FailReason = strings.Join(why, "; ")
}

// markFailed marks every fitted form of r whose max error exceeds tol (a
// fraction) as failed; a form already failed (by its own fit, which also
// checks its bounds) keeps its reason.
func (r *Results) markFailed(tol float64) {
	reps := []*Report{}
	if r.Arrhenius != nil {
		reps = append(reps, &r.Arrhenius.Report)
	}
	for _, f := range []*FalloffResult{r.Lindemann, r.Troe, r.SRI} {
		if f != nil {
			reps = append(reps, &f.Report)
		}
	}
	if r.PLOG != nil {
		reps = append(reps, &r.PLOG.Report)
	}
	if r.Chebyshev != nil {
		reps = append(reps, &r.Chebyshev.Report)
	}
	for _, rep := range reps {
		if !rep.Failed {
			rep.judge(tol)
		}
	}
}
