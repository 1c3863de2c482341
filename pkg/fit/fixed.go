package fit

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Fix holds fitted parameters a user fixes; a nil field is fitted.
type Fix struct {
	// N fixes the temperature exponent n of the arrhenius form, of every
	// PLOG term and of the falloff limits that are fitted; LowN and HighN,
	// if set, fix it for k0 or k∞ alone instead.
	N, LowN, HighN *float64
	// Fcent fixes the Troe broadening to a constant Fcent (written in Troe
	// form with T3 = 1e-30 K, T1 = 1e30 K).
	Fcent *float64
	// Low and High fix k0 (k units × cm³ molecule⁻¹) and k∞ (k units) of
	// the falloff forms: held exactly, never refitted.
	Low, High *Arrhenius
}

// fitArrheniusFixedN fits k = A·T^n·exp(−Ta/T) with n given, by linear
// least squares of ln k − n·ln T on 1 and −Tr/T (Tr the geometric mean of
// the range, for conditioning), weighted by 1/σ when sigmas is not nil.
// It needs 2 distinct temperatures.
func fitArrheniusFixedN(temps, ks, sigmas []float64, n float64) (Arrhenius, error) {
	d := distinct(temps)
	if len(d) < 2 {
		return Arrhenius{}, fmt.Errorf("%w: an Arrhenius fit with fixed n needs at least 2 temperatures, got %d", ErrTooFewData, len(d))
	}
	tr := math.Sqrt(d[0] * d[len(d)-1])
	a := mat.NewDense(len(temps), 2, nil)
	b := mat.NewVecDense(len(temps), nil)
	for i, t := range temps {
		if !(t > 0) || !(ks[i] > 0) || math.IsInf(ks[i], 0) || math.IsInf(t, 0) {
			return Arrhenius{}, fmt.Errorf("%w: T = %g K, k = %g at point %d", ErrBadData, t, ks[i], i+1)
		}
		w := 1.0
		if sigmas != nil {
			w = 1 / sigmas[i]
		}
		a.Set(i, 0, w)
		a.Set(i, 1, -w*tr/t)
		b.SetVec(i, w*(math.Log(ks[i])-n*math.Log(t/tr)))
	}
	var qr mat.QR
	qr.Factorize(a)
	if c := qr.Cond(); !(c < maxCond) {
		return Arrhenius{}, fmt.Errorf("%w: Arrhenius fit with fixed n (condition number %.3g)", ErrIllConditioned, c)
	}
	var x mat.VecDense
	if err := qr.SolveVecTo(&x, false, b); err != nil {
		return Arrhenius{}, fmt.Errorf("%w: Arrhenius fit with fixed n: %v", ErrIllConditioned, err)
	}
	r := Arrhenius{A: math.Exp(x.AtVec(0) - n*math.Log(tr)), N: n, Ta: x.AtVec(1) * tr}
	if !finite(r.A, r.Ta) || r.A == 0 {
		return Arrhenius{}, fmt.Errorf("%w: Arrhenius fit with fixed n gives A = %g, Ta = %g K", ErrIllConditioned, r.A, r.Ta)
	}
	return r, nil
}

// falloff reports whether f fixes anything of a falloff fit.
func (f Fix) falloff() bool {
	return f.N != nil || f.LowN != nil || f.HighN != nil || f.Fcent != nil || f.Low != nil || f.High != nil
}

// limitN returns the fixed n of k0 (low) or k∞, nil if it is fitted.
func (f Fix) limitN(low bool) *float64 {
	if n := f.HighN; !low && n != nil {
		return n
	}
	if n := f.LowN; low && n != nil {
		return n
	}
	return f.N
}

// check checks the fixed values.
func (f Fix) check() error {
	for _, n := range []*float64{f.N, f.LowN, f.HighN} {
		if n != nil && !finite(*n) {
			return fmt.Errorf("%w: fixed n = %g is not finite", ErrBadData, *n)
		}
	}
	if c := f.Fcent; c != nil && !(*c > 0 && *c <= 1) {
		return fmt.Errorf("%w: fixed Fcent = %g: give a value in (0, 1]", ErrBadData, *c)
	}
	for _, a := range []struct {
		name string
		a    *Arrhenius
	}{{"low-pressure limit", f.Low}, {"high-pressure limit", f.High}} {
		if a.a != nil && (!(a.a.A > 0) || !finite(a.a.A, a.a.N, a.a.Ta)) {
			return fmt.Errorf("%w: fixed %s A = %g, n = %g, Ea/R = %g K: A must be positive and all finite", ErrBadData, a.name, a.a.A, a.a.N, a.a.Ta)
		}
	}
	return nil
}

// fitFalloffFixed fits a falloff form (FormLindemann, FormTroe or
// FormSRI) with the parameters of opt.Fix held: a fixed limit exactly; a
// fixed n (Fix.limitN) in a fitted limit, whose A and Ea/R stay free; a fixed
// Fcent as the constant-Fcent Troe broadening (Troe only; SRI has no
// Fcent and is refused, Lindemann has no broadening and ignores it).
// Otherwise it follows FitFalloff: the broadenings of the form in turn,
// simplest first, the first within opt.Tolerance with no parameter at the
// end of its range, else the simplest that a later one does not beat by a
// tenth. Report.NParams counts the fitted parameters only.
func fitFalloffFixed(t *Table, form FormName, opt Options) (*FalloffResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	fix := opt.Fix
	if err := fix.check(); err != nil {
		return nil, err
	}
	kinds, ok := ladders[form]
	if !ok {
		panic(fmt.Sprintf("fit: fitFalloffFixed: unknown kind %q", form))
	}
	if fix.Fcent != nil {
		switch form {
		case FormSRI:
			return nil, fmt.Errorf("%w: a fixed Fcent is a Troe parameter; the SRI broadening has none (fit troe, or do not fix Fcent)", ErrBadData)
		case FormTroe:
			kinds = []falloffKind{kindTroeConst}
		}
	}
	temps, press := t.Temperatures(), t.Pressures()
	if len(temps) < 2 || len(press) < 2 {
		return nil, fmt.Errorf("%w: %s: a %s fit needs at least 2 temperatures and 2 pressures; the table has %d and %d",
			ErrTooFewData, t.name(), form, len(temps), len(press))
	}
	low, high := fix.Low, fix.High
	if low == nil || high == nil {
		if len(temps) < 3 && (low == nil && fix.limitN(true) == nil || high == nil && fix.limitN(false) == nil) {
			return nil, fmt.Errorf("%w: %s: a %s fit needs at least 3 temperatures for its fitted limits; the table has %d (%s)",
				ErrTooFewData, t.name(), form, len(temps), listK(temps))
		}
		lim, err := resolveLimits(t, temps, opt.Limits)
		if err != nil {
			return nil, err
		}
		if low == nil {
			low = &lim.low
		}
		if high == nil {
			high = &lim.high
		}
	}
	var tried []*FalloffResult
	var prev *FalloffResult
	var lastErr error
	for _, k := range kinds {
		var starts [][]float64
		switch {
		case fix.Fcent != nil && k == kindTroeConst:
			starts = [][]float64{troeCoords(Troe{A: *fix.Fcent}, 1)}
		case k.nBroad() > 0:
			starts = ladderStarts(k, prev)
		}
		r, err := fixedStage(t, k, *low, *high, fix, starts)
		if err != nil {
			lastErr = err
			continue
		}
		var hits []string
		if fix.Fcent == nil {
			hits = boundHits(t, &r.Falloff, k, opt.Tolerance)
		}
		r.hits = hits
		r.judge(opt.Tolerance, hits...)
		tried = append(tried, r)
		if !r.Failed {
			break
		}
		prev = r
	}
	if len(tried) == 0 {
		return nil, lastErr
	}
	best := tried[len(tried)-1]
	if best.Failed {
		best = tried[0]
		for _, r := range tried[1:] {
			if best.MaxError() > opt.Tolerance && r.MaxErrorPct < 0.9*best.MaxErrorPct {
				best = r
			}
		}
	}
	best.LowUnits = t.KUnits + " cm3/molecule"
	best.Broadening = broadeningWords(&best.Falloff)
	return best, nil
}

// fixedStage fits one broadening kind with the parameters of fix held,
// from limits low and high (the fixed ones, or starts) and the broadening
// starts (coordinates; ignored when a fixed Fcent sets the broadening).
// The fitted parameters y map linearly onto the model's vector z = z0 +
// D·y: three node values of a free limit; ln A' and Ea/(R·Tr) of a limit
// with n fixed (its node values are then linear in them); nothing of a
// fixed limit or a fixed broadening, which sit in z0.
func fixedStage(t *Table, kind falloffKind, low, high Arrhenius, fix Fix, broad [][]float64) (*FalloffResult, error) {
	m, err := newFalloffModel(t, kind)
	if err != nil {
		return nil, err
	}
	nz := len(m.z)
	z0 := make([]float64, nz)
	var cols [][]float64 // columns of D
	var y0 []float64     // start of the limits' coordinates
	tr := m.nodes.tr
	limit := func(off int, a Arrhenius, fixed bool, nFix *float64) {
		switch {
		case fixed:
			v := m.nodes.values(a)
			copy(z0[off:off+3], v[:])
		case nFix != nil:
			n := *nFix
			c1, c2 := make([]float64, nz), make([]float64, nz)
			for j, T := range m.nodes.t {
				z0[off+j] = n * math.Log(T/tr)
				c1[off+j], c2[off+j] = 1, -tr/T
			}
			cols = append(cols, c1, c2)
			y0 = append(y0, math.Log(a.A)+a.N*math.Log(tr), a.Ta/tr)
		default:
			v := m.nodes.values(a)
			for j := range 3 {
				c := make([]float64, nz)
				c[off+j] = 1
				cols = append(cols, c)
			}
			y0 = append(y0, v[:]...)
		}
	}
	limit(0, low, fix.Low != nil, fix.limitN(true))
	limit(3, high, fix.High != nil, fix.limitN(false))
	nb := kind.nBroad()
	fixedBroad := fix.Fcent != nil && kind == kindTroeConst
	switch {
	case fixedBroad:
		copy(z0[6:], troeCoords(Troe{A: *fix.Fcent}, 1))
	case nb > 0:
		for j := range nb {
			c := make([]float64, nz)
			c[6+j] = 1
			cols = append(cols, c)
		}
	}
	p := len(cols)
	if len(t.Points) <= p {
		return nil, fmt.Errorf("%w: %s: a fit with %d free parameters needs more than %d points", ErrTooFewData, t.name(), p, len(t.Points))
	}
	d := mat.NewDense(nz, max(p, 1), nil)
	for j, c := range cols {
		d.SetCol(j, c)
	}
	all := make([]int, nz)
	for i := range all {
		all[i] = i
	}
	m.free = all
	z := make([]float64, nz)
	toZ := func(y []float64) {
		copy(z, z0)
		for j := range p {
			for i := range nz {
				z[i] += d.At(i, j) * y[j]
			}
		}
	}
	if p > 0 {
		jz := mat.NewDense(len(m.pts), nz, nil)
		f := func(y, r []float64, jac *mat.Dense) {
			toZ(y)
			if jac == nil {
				m.residuals(z, r, nil)
				return
			}
			m.residuals(z, r, jz)
			jac.Mul(jz, d.Slice(0, nz, 0, p))
		}
		var ys [][]float64
		if fixedBroad || nb == 0 {
			ys = [][]float64{slices.Clone(y0)}
		} else {
			for _, b := range broad {
				if len(b) == nb {
					ys = append(ys, append(slices.Clone(y0), b...))
				}
			}
		}
		if len(ys) == 0 {
			return nil, fmt.Errorf("%w: no start for the broadening", ErrNoConvergence)
		}
		q := newLSQ(len(m.pts), p, f)
		y, _, err := q.multiStart(ys)
		if err != nil {
			return nil, err
		}
		toZ(y)
		copy(y0, y) // the limits' coordinates, for the exact limits below
	} else {
		toZ(nil)
	}
	copy(m.z, z)
	// The limits exactly: fixed ones as given, those with n fixed from
	// their two coordinates (node values would return n only to rounding).
	exact := func(off int, a Arrhenius, fixed bool, nFix *float64, y []float64) (Arrhenius, []float64) {
		switch {
		case fixed:
			return a, y
		case nFix != nil:
			n := *nFix
			return Arrhenius{A: math.Exp(y[0] - n*math.Log(tr)), N: n, Ta: y[1] * tr}, y[2:]
		}
		return m.nodes.arrhenius(m.z[off : off+3]), y[3:]
	}
	rest := y0
	lo, rest := exact(0, low, fix.Low != nil, fix.limitN(true), rest)
	hi, _ := exact(3, high, fix.High != nil, fix.limitN(false), rest)
	r, err := falloffResult(t, m, &[2]Arrhenius{lo, hi})
	if err != nil {
		return nil, err
	}
	if fixedBroad {
		r.Troe = &Troe{A: *fix.Fcent, T3: troeConstT3, T1: troeConstT1}
		if r.Report, err = formReport(t, &r.Falloff); err != nil {
			return nil, err
		}
	}
	r.Report.NParams = p
	return r, nil
}

// fitFalloffOpt fits a falloff form by FitFalloff, or, when opt fixes any
// of its parameters, by fitFalloffFixed.
func fitFalloffOpt(t *Table, form FormName, opt Options) (*FalloffResult, error) {
	if opt.Fix.falloff() {
		return fitFalloffFixed(t, form, opt)
	}
	return FitFalloff(t, form, opt)
}
