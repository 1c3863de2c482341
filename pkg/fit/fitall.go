package fit

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"
)

// Forms are the forms FitAll fits, in the order of preference of
// Recommend: the simplest, most widely read and safest to extrapolate first.
var Forms = []FormName{FormArrhenius, FormLindemann, FormTroe, FormSRI, FormChebyshev, FormPLOG}

// DefaultTolerance is the default maximum relative error of a fit (1 %).
const DefaultTolerance = 0.01

// Options control FitAll and the per-form fits.
type Options struct {
	// Tolerance is the largest relative error in k, as a fraction, that
	// makes a fit acceptable (0 means DefaultTolerance). It decides the
	// extra Troe/SRI parameters, PLOG's second terms, the automatic
	// Chebyshev order and the recommendation.
	Tolerance float64
	// ChebyshevNT and ChebyshevNP fix the Chebyshev order; 0 and 0 choose
	// it automatically.
	ChebyshevNT, ChebyshevNP int
	// Limits, if not nil, are known k0 and k∞ for the falloff fits.
	Limits *Limits

	// Holdout, if it has points, holds rate constants computed off the
	// table (e.g. by the master equation between its temperatures and
	// pressures), in the table's k units: each form's held-out error
	// (Report.HeldOut) is its error at those inside the table's range,
	// and the automatic choices (Chebyshev order, PLOG's interpolation
	// error) use them. Without, they come from cross-validation.
	Holdout *Table
	// GroupTol is the relative tolerance within which pressures count as
	// one PLOG entry, and temperatures or pressures as one row or column
	// of the cross-validation (0 means DefaultGroupTol; negative means
	// equal values only).
	GroupTol float64
	// PLOGMaxN, if positive, bounds the temperature exponent n of every
	// PLOG term: |n| ≤ PLOGMaxN.
	PLOGMaxN float64
	// PLOGOneTerm fits one Arrhenius term at every PLOG pressure, never
	// two.
	PLOGOneTerm bool
	// Fix holds parameters the user fixes (fixed.go).
	Fix Fix
	// Jobs bounds the forms FitAll fits at once, each on its own
	// goroutine, and the pressures FitPLOG fits at once; 0 means
	// GOMAXPROCS. Results do not depend on it.
	Jobs int
}

func (o Options) withDefaults() Options {
	if o.Tolerance <= 0 || math.IsNaN(o.Tolerance) {
		o.Tolerance = DefaultTolerance
	}
	switch {
	case o.GroupTol == 0 || math.IsNaN(o.GroupTol):
		o.GroupTol = DefaultGroupTol
	case o.GroupTol < 0:
		o.GroupTol = 0
	}
	return o
}

// ArrheniusResult is a pressure-independent modified Arrhenius fit to the
// whole table.
type ArrheniusResult struct {
	Rate Arrhenius `json:"rate"`
	Report
}

// Results holds every form FitAll was asked for: a nil field is a form not
// asked for or one that failed, with its error text in Errors.
type Results struct {
	KUnits       string              `json:"k_units"`
	TolerancePct float64             `json:"tolerance_pct"`
	Arrhenius    *ArrheniusResult    `json:"arrhenius,omitempty"`
	Lindemann    *FalloffResult      `json:"lindemann,omitempty"`
	Troe         *FalloffResult      `json:"troe,omitempty"`
	SRI          *FalloffResult      `json:"sri,omitempty"`
	PLOG         *PLOGResult         `json:"plog,omitempty"`
	Chebyshev    *ChebyshevResult    `json:"chebyshev,omitempty"`
	Errors       map[FormName]string `json:"errors,omitempty"` // form → why it failed
	Recommended  FormName            `json:"recommended"`      // one of Forms, or "" if none fitted
	Reason       string              `json:"reason"`
}

// fitted returns the form of the given name and its report; ok is false,
// and f a nil interface, if it was not fitted.
func (r *Results) fitted(name FormName) (f Form, rep Report, ok bool) {
	switch name {
	case FormArrhenius:
		if r.Arrhenius != nil {
			return &r.Arrhenius.Rate, r.Arrhenius.Report, true
		}
	case FormLindemann, FormTroe, FormSRI:
		fr := map[FormName]*FalloffResult{FormLindemann: r.Lindemann, FormTroe: r.Troe, FormSRI: r.SRI}[name]
		if fr != nil {
			return &fr.Falloff, fr.Report, true
		}
	case FormPLOG:
		if r.PLOG != nil {
			return &r.PLOG.PLOG, r.PLOG.Report, true
		}
	case FormChebyshev:
		if r.Chebyshev != nil {
			return &r.Chebyshev.Chebyshev, r.Chebyshev.Report, true
		}
	}
	return nil, Report{}, false
}

// Reports returns the report of each fitted form by name.
func (r *Results) Reports() map[FormName]Report {
	m := map[FormName]Report{}
	for _, name := range Forms {
		if _, rep, ok := r.fitted(name); ok {
			m[name] = rep
		}
	}
	return m
}

// Form returns the fitted form of the given name (*Arrhenius, *Falloff,
// *PLOG or *Chebyshev), or nil if it was not fitted.
func (r *Results) Form(name FormName) Form {
	f, _, _ := r.fitted(name)
	return f
}

// FitAll fits each of forms (from Forms; nil means all) to the
// table and recommends one. A form that cannot be fitted is recorded in
// Results.Errors and does not stop the others. FitAll returns an error for
// an unknown form name or a table with bad values (wrapping ErrBadData),
// and, together with the Results, an error wrapping ErrNoForm if no form
// could be fitted.
func FitAll(t *Table, forms []FormName, opt Options) (*Results, error) {
	opt = opt.withDefaults()
	if forms == nil {
		forms = Forms
	}
	for _, f := range forms {
		if _, err := ParseFormName(string(f)); err != nil {
			return nil, err
		}
	}
	if err := t.Validate(); err != nil {
		return nil, err
	}
	if err := checkHoldout(opt); err != nil {
		return nil, err
	}
	res := &Results{KUnits: t.KUnits, TolerancePct: 100 * opt.Tolerance, Errors: map[FormName]string{}}
	var todo []FormName
	for _, f := range Forms {
		if slices.Contains(forms, f) {
			todo = append(todo, f)
		}
	}
	// The forms are independent fits of the same table: each runs on its
	// own goroutine (at most opt.Jobs at once) into its own field, and the
	// errors are collected in the order of Forms, so the results do not
	// depend on the number of workers.
	errs := make([]error, len(todo))
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(jobs, len(todo)) {
		wg.Go(func() {
			for i := range next {
				var err error
				switch f := todo[i]; f {
				case FormArrhenius:
					res.Arrhenius, err = fitArrheniusTable(t, opt)
				case FormLindemann:
					res.Lindemann, err = fitFalloffOpt(t, f, opt)
				case FormTroe:
					res.Troe, err = fitFalloffOpt(t, f, opt)
				case FormSRI:
					res.SRI, err = fitFalloffOpt(t, f, opt)
				case FormPLOG:
					res.PLOG, err = FitPLOG(t, opt)
				case FormChebyshev:
					res.Chebyshev, err = FitChebyshev(t, opt)
				}
				errs[i] = err
			}
		})
	}
	for i := range todo {
		next <- i
	}
	close(next)
	wg.Wait()
	for i, err := range errs {
		if err != nil {
			res.Errors[todo[i]] = err.Error()
		}
	}
	if len(res.Errors) == 0 {
		res.Errors = nil
	}
	res.annotate(t, opt)
	res.markFailed(opt.Tolerance)
	res.Recommended, res.Reason = Recommend(res.Reports(), opt.Tolerance)
	if len(res.Reports()) == 0 {
		var errs []error
		for _, f := range forms {
			errs = append(errs, fmt.Errorf("%s: %s", f, res.Errors[f]))
		}
		return res, fmt.Errorf("%w: %w", ErrNoForm, errors.Join(errs...))
	}
	return res, nil
}

// fitArrheniusTable fits one Arrhenius expression to every point, with n
// fixed to opt.Fix.N if that is set.
func fitArrheniusTable(t *Table, opt Options) (*ArrheniusResult, error) {
	ts, ks, sig := make([]float64, len(t.Points)), make([]float64, len(t.Points)), []float64(nil)
	if t.Weighted() {
		sig = make([]float64, len(t.Points))
	}
	for i, p := range t.Points {
		ts[i], ks[i] = p.T, p.K
		if sig != nil {
			sig[i] = p.Sigma
		}
	}
	var a Arrhenius
	var err error
	if n := opt.Fix.N; n != nil {
		a, err = fitArrheniusFixedN(ts, ks, sig, *n)
	} else {
		a, err = FitArrhenius(ts, ks, sig)
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", t.name(), err)
	}
	rep, err := formReport(t, &a)
	if err != nil {
		return nil, err
	}
	if opt.Fix.N != nil {
		rep.NParams = 2
	}
	return &ArrheniusResult{Rate: a, Report: rep}, nil
}

// Recommend picks a form from reports (keyed by names from Forms) for the
// maximum relative error tol (a fraction; 0 means DefaultTolerance). Rule:
// the first form in the order of Forms — arrhenius, lindemann, troe, sri,
// chebyshev, plog — that has not failed: not marked Report.Failed (a
// parameter on a bound, or the tolerance its fit was given) and with a
// maximum error within tol, on the table and at the held-out points
// (Report.HeldOut) where there are any. The falloff forms come first
// because every simulator reads them and they extrapolate to the right
// limits;
// Chebyshev before PLOG because its error over the table measures the fit
// everywhere, while PLOG is exact in P at the table's pressures, so its
// figure says nothing of the interpolation between them. A failed form is
// never recommended: if every form failed, or reports is empty, it
// returns "". reason says why, in one sentence, naming each failure.
func Recommend(reports map[FormName]Report, tol float64) (form FormName, reason string) {
	if tol <= 0 || math.IsNaN(tol) {
		tol = DefaultTolerance
	}
	var failed, failedNames []string
	for _, f := range Forms {
		r, ok := reports[f]
		if !ok {
			continue
		}
		if !r.Failed && r.MaxError() <= tol && r.HeldOut.within(tol) {
			// The worst point is in the report, in the units its reader
			// chose; the sentence quotes only the errors.
			why := fmt.Sprintf("%s is the simplest form within the %.3g %% tolerance (max error %.3g %%, rms %.3g %%%s)",
				f, 100*tol, r.MaxErrorPct, r.RMSErrorPct, r.HeldOut.phrase())
			if len(failedNames) > 0 {
				why += "; the forms before it failed: " + strings.Join(failedNames, ", ")
			}
			return f, why
		}
		if !r.Failed || r.FailReason == "" {
			r.judge(tol)
			if why := r.HeldOut.problem(tol); why != "" {
				r.FailReason = strings.TrimPrefix(r.FailReason+"; "+why, "; ")
			}
		}
		if r.FailReason == "" {
			r.FailReason = "marked failed"
		}
		failed = append(failed, fmt.Sprintf("%s (%s)", f, r.FailReason))
		failedNames = append(failedNames, string(f))
	}
	if len(failed) == 0 {
		return "", "no form could be fitted"
	}
	return "", "every fitted form failed: " + strings.Join(failed, "; ")
}
