package fit

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// PlogPressure is the fit at one pressure of a PLOG form.
type PlogPressure struct {
	P           float64 `json:"P_Pa"`
	NTerms      int     `json:"n_terms"`
	MaxErrorPct float64 `json:"max_error_pct"`
	RMSErrorPct float64 `json:"rms_error_pct"`
}

// PLOGResult is a fitted PLOG form with its report and the errors at
// each pressure. At the table's pressures PLOG is exact in P, so the
// report says nothing about the error of its interpolation between them.
type PLOGResult struct {
	PLOG
	Pressures []PlogPressure `json:"pressure_errors"`
	Report
}

// minTwoTermTemps is the fewest temperatures at one pressure for which a
// sum of two Arrhenius terms (6 parameters) is tried: one more than its
// parameters, so it does not interpolate exactly.
const minTwoTermTemps = 7

// FitPLOG fits one modified Arrhenius expression at each pressure of the
// table (linear least squares in ln k); the table needs at least 2
// pressures and 3 temperatures at each. Where that leaves a maximum error
// above opt.Tolerance and the pressure has at least 7 temperatures, it
// fits a sum of two Arrhenius terms with positive A by nonlinear least
// squares in ln k, started from separate fits to the low- and
// high-temperature parts of the range, and keeps it if it is better.
func FitPLOG(t *Table, opt Options) (*PLOGResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	press := t.Pressures()
	if len(press) < 2 {
		return nil, fmt.Errorf("%w: %s: a PLOG form needs at least 2 pressures (simulators require two); the table has 1 (%g Pa): use arrhenius",
			ErrTooFewData, t.name(), press[0])
	}
	type fitted struct {
		entry PlogEntry
		rep   PlogPressure
		err   error
	}
	out := make([]fitted, len(press))
	// The pressures are independent fits; run them on all CPUs.
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(runtime.GOMAXPROCS(0), len(press)) {
		wg.Go(func() {
			for i := range next {
				e, r, err := fitPlogPressure(t, press[i], opt.Tolerance)
				out[i] = fitted{e, r, err}
			}
		})
	}
	for i := range press {
		next <- i
	}
	close(next)
	wg.Wait()
	res := &PLOGResult{}
	for _, f := range out {
		if f.err != nil {
			return nil, f.err
		}
		res.Entries = append(res.Entries, f.entry)
		res.Pressures = append(res.Pressures, f.rep)
	}
	rep, err := formReport(t, &res.PLOG)
	if err != nil {
		return nil, err
	}
	res.Report = rep
	return res, nil
}

// fitPlogPressure fits the entry at pressure P.
func fitPlogPressure(t *Table, P, tol float64) (PlogEntry, PlogPressure, error) {
	var sub Table
	var ts, ks, sig []float64
	for _, p := range t.Points {
		if math.Abs(p.P-P) <= distinctRelTol*P {
			sub.Points = append(sub.Points, p)
			ts, ks = append(ts, p.T), append(ks, p.K)
			sig = append(sig, p.Sigma)
		}
	}
	if !t.Weighted() {
		sig = nil
	}
	nt := len(distinct(ts))
	if nt < 3 {
		return PlogEntry{}, PlogPressure{}, fmt.Errorf("%w: %s: PLOG needs at least 3 temperatures at each pressure; P = %g Pa has %d", ErrTooFewData, t.name(), P, nt)
	}
	a, err := FitArrhenius(ts, ks, sig)
	if err != nil {
		return PlogEntry{}, PlogPressure{}, fmt.Errorf("PLOG at P = %g Pa: %w", P, err)
	}
	terms := []Arrhenius{a}
	r, err := NewReport(&sub, a, 3)
	if err != nil {
		return PlogEntry{}, PlogPressure{}, fmt.Errorf("PLOG at P = %g Pa: %w", P, err)
	}
	if r.MaxError() > tol && nt >= minTwoTermTemps {
		if two, err := fitTwoArrhenius(ts, ks, sig); err == nil {
			r2, err := NewReport(&sub, plogEntryEval{two}, 6)
			if err == nil && r2.MaxErrorPct < r.MaxErrorPct {
				terms, r = two, r2
			}
		}
	}
	return PlogEntry{P: P, Terms: terms}, PlogPressure{P: P, NTerms: len(terms), MaxErrorPct: r.MaxErrorPct, RMSErrorPct: r.RMSErrorPct}, nil
}

// plogEntryEval evaluates the sum of Arrhenius terms.
type plogEntryEval struct{ terms []Arrhenius }

func (e plogEntryEval) Eval(t, _ float64) float64 { return PlogEntry{Terms: e.terms}.eval(t) }

// fitTwoArrhenius fits k = k1(T) + k2(T), both modified Arrhenius, by
// nonlinear least squares in ln k. Each term is represented by its ln k at
// three node temperatures, so both A stay positive. Starts: for splits of
// the distinct temperatures at a half, a third and two thirds, terms
// fitted to the lower and upper parts, and the "peeled" pairs: one part's
// term and the fit of what it leaves of the other part.
func fitTwoArrhenius(ts, ks, sig []float64) ([]Arrhenius, error) {
	d := distinct(ts)
	nodes, err := newArrNodes(d[0], d[len(d)-1])
	if err != nil {
		return nil, err
	}
	phi := make([][3]float64, len(ts))
	lnk := make([]float64, len(ts))
	w := make([]float64, len(ts))
	for i, T := range ts {
		phi[i] = nodes.basis(T)
		lnk[i] = math.Log(ks[i])
		w[i] = 1
		if sig != nil {
			w[i] = 1 / sig[i]
		}
	}
	f := func(x, r []float64, jac *mat.Dense) {
		for i := range ts {
			l1 := phi[i][0]*x[0] + phi[i][1]*x[1] + phi[i][2]*x[2]
			l2 := phi[i][0]*x[3] + phi[i][1]*x[4] + phi[i][2]*x[5]
			hi, lo := max(l1, l2), min(l1, l2)
			lsum := hi + math.Log1p(math.Exp(lo-hi))
			r[i] = w[i] * (lsum - lnk[i])
			if jac != nil {
				s1 := math.Exp(l1 - lsum)
				s2 := math.Exp(l2 - lsum)
				for j := range 3 {
					jac.Set(i, j, w[i]*s1*phi[i][j])
					jac.Set(i, 3+j, w[i]*s2*phi[i][j])
				}
			}
		}
	}
	var starts [][]float64
	for _, frac := range []float64{0.5, 1.0 / 3, 2.0 / 3} {
		cut := d[max(2, min(len(d)-4, int(frac*float64(len(d)))))]
		var lt, lk, ut, uk []float64
		for i, T := range ts {
			if T <= cut {
				lt, lk = append(lt, T), append(lk, ks[i])
			} else {
				ut, uk = append(ut, T), append(uk, ks[i])
			}
		}
		add := func(a1, a2 Arrhenius) {
			v1, v2 := nodes.values(a1), nodes.values(a2)
			if x := append(v1[:], v2[:]...); finite(x...) {
				starts = append(starts, x)
			}
		}
		a1, err1 := FitArrhenius(lt, lk, nil)
		a2, err2 := FitArrhenius(ut, uk, nil)
		if err1 != nil || err2 != nil {
			continue
		}
		add(a1, a2)
		// Peeling: fit one end, subtract that term from the other end's
		// data and fit what is left.
		if b, err := peel(a1, ut, uk); err == nil {
			add(a1, b)
		}
		if b, err := peel(a2, lt, lk); err == nil {
			add(b, a2)
		}
	}
	if len(starts) == 0 {
		return nil, fmt.Errorf("%w: no start for the two-term fit", ErrNoConvergence)
	}
	q := newLSQ(len(ts), 6, f)
	x, _, err := q.multiStart(starts)
	if err != nil {
		return nil, err
	}
	terms := []Arrhenius{nodes.arrhenius(x[:3]), nodes.arrhenius(x[3:])}
	for _, a := range terms {
		if !finite(a.A, a.N, a.Ta) || !(a.A > 0) {
			return nil, fmt.Errorf("%w: two-term fit gave A = %g, n = %g, Ta = %g K", ErrNoConvergence, a.A, a.N, a.Ta)
		}
	}
	slices.SortFunc(terms, func(a, b Arrhenius) int {
		switch {
		case a.Ta < b.Ta:
			return -1
		case a.Ta > b.Ta:
			return 1
		}
		return 0
	})
	return terms, nil
}

// peel fits an Arrhenius term to k − a(T) at the temperatures where that
// is positive (at least 3 of them).
func peel(a Arrhenius, ts, ks []float64) (Arrhenius, error) {
	var pt, pk []float64
	for i, T := range ts {
		if r := ks[i] - a.At(T); r > 0 {
			pt, pk = append(pt, T), append(pk, r)
		}
	}
	if len(distinct(pt)) < 3 {
		return Arrhenius{}, fmt.Errorf("%w: nothing left to peel", ErrTooFewData)
	}
	return FitArrhenius(pt, pk, nil)
}
