package fit

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Limits are known low- and high-pressure limits, e.g. from the master
// equation and the canonical k∞. Give either per-temperature values, in
// the order of Table.Temperatures(), or Arrhenius expressions (which take
// precedence). K0 and Low are in k units × cm³ molecule⁻¹, KInf and High
// in k units.
type Limits struct {
	K0, KInf  []float64
	Low, High *Arrhenius
}

// Broadening bounds of the falloff fits. Troe's T3, T1 and T2 stay in
// [1 K, 1e10 K]: below 1 K or above 1e10 K their exponentials are 0 or 1
// to double precision at any temperature a mechanism covers, so nothing is
// lost. A stays in [0, 1], which keeps Fcent positive and is the range of
// its meaning (the weight of the high-temperature term). SRI's a stays in
// [1e-8, 1e8], b in [−5000 K, 50000 K] (so exp(−b/T) cannot overflow
// above 10 K), c in [1 K, 1e10 K], d in [0.1, 10] and e in [−3, 3].
var (
	boundA    = bound{0, 1}
	boundLnT  = bound{0, math.Log(1e10)}
	boundLnSa = bound{math.Log(1e-8), math.Log(1e8)}
	boundSb   = bound{-5000, 50000}
	boundLnSd = bound{math.Log(0.1), math.Log(10)}
	boundSe   = bound{-3, 3}
	ln10      = math.Log(10)
)

// falloffKind is the broadening of a falloff fit.
type falloffKind int

const (
	kindLindemann falloffKind = iota
	kindTroe3
	kindTroe4
	kindSRI3
	kindSRI5
)

// nBroad returns the number of broadening parameters.
func (k falloffKind) nBroad() int {
	return [...]int{0, 3, 4, 3, 5}[k]
}

// fpoint is a table point as the falloff model uses it.
type fpoint struct {
	iT       int     // index of the distinct temperature
	lnM, lnk float64 // ln [M] (molecules cm⁻³), ln k
	w        float64 // weight 1/σ of ln k
}

// falloffModel computes ln k of a falloff form from the parameter vector
// z = [ℓ0 (3 node values of ln k0), ℓ∞ (3 of ln k∞), broadening].
type falloffModel struct {
	kind  falloffKind
	nodes *arrNodes
	temps []float64
	phi   [][3]float64 // node basis at each distinct temperature
	pts   []fpoint
	free  []int     // indices of z that are fitted
	z     []float64 // full parameter vector; fixed entries stay as set
}

func newFalloffModel(t *Table, kind falloffKind) (*falloffModel, error) {
	temps := t.Temperatures()
	nodes, err := newArrNodes(temps[0], temps[len(temps)-1])
	if err != nil {
		return nil, err
	}
	m := &falloffModel{kind: kind, nodes: nodes, temps: temps, z: make([]float64, 6+kind.nBroad())}
	for _, T := range temps {
		m.phi = append(m.phi, nodes.basis(T))
	}
	w := t.weights()
	for i, p := range t.Points {
		m.pts = append(m.pts, fpoint{iT: index(temps, p.T), lnM: math.Log(Concentration(p.P, p.T)), lnk: math.Log(p.K), w: w[i]})
	}
	return m, nil
}

// broadening holds the per-temperature broadening quantities.
type broadening struct {
	fc  float64    // Troe: Fcent; SRI: W = a·exp(−b/T) + exp(−T/c)
	dfc [5]float64 // derivatives of fc (Troe) or of ln F pieces (SRI) by the coordinates
	lnD float64    // SRI: ln d + e ln T
}

// troeParams returns the Troe parameters of coordinates v.
func troeParams(v []float64) Troe {
	a, _ := boundA.val(v[0])
	l3, _ := boundLnT.val(v[1])
	l1, _ := boundLnT.val(v[2])
	tr := Troe{A: a, T3: math.Exp(l3), T1: math.Exp(l1)}
	if len(v) > 3 {
		l2, _ := boundLnT.val(v[3])
		tr.T2, tr.HasT2 = math.Exp(l2), true
	}
	return tr
}

// troeCoords returns the coordinates of tr (n = 3 or 4).
func troeCoords(tr Troe, n int) []float64 {
	v := []float64{boundA.inv(tr.A), boundLnT.inv(math.Log(tr.T3)), boundLnT.inv(math.Log(tr.T1))}
	if n == 4 {
		v = append(v, boundLnT.inv(math.Log(tr.T2)))
	}
	return v
}

func sriParams(v []float64) SRI {
	la, _ := boundLnSa.val(v[0])
	b, _ := boundSb.val(v[1])
	lc, _ := boundLnT.val(v[2])
	s := SRI{A: math.Exp(la), B: b, C: math.Exp(lc)}
	if len(v) > 3 {
		ld, _ := boundLnSd.val(v[3])
		s.D = math.Exp(ld)
		s.E, _ = boundSe.val(v[4])
	}
	return s
}

func sriCoords(s SRI, n int) []float64 {
	v := []float64{boundLnSa.inv(math.Log(s.A)), boundSb.inv(s.B), boundLnT.inv(math.Log(s.C))}
	if n == 5 {
		d := s.D
		if d == 0 {
			d = 1
		}
		v = append(v, boundLnSd.inv(math.Log(d)), boundSe.inv(s.E))
	}
	return v
}

// perT computes the broadening quantities at temperature T for the
// broadening coordinates v.
func (m *falloffModel) perT(T float64, v []float64) broadening {
	var b broadening
	switch m.kind {
	case kindTroe3, kindTroe4:
		// Fcent = (1−A)exp(−T/T3) + A·exp(−T/T1) + exp(−T2/T)
		// (Gilbert, Luther & Troe 1983).
		a, da := boundA.val(v[0])
		l3, dl3 := boundLnT.val(v[1])
		l1, dl1 := boundLnT.val(v[2])
		t3, t1 := math.Exp(l3), math.Exp(l1)
		e3, e1 := math.Exp(-T/t3), math.Exp(-T/t1)
		b.fc = (1-a)*e3 + a*e1
		b.dfc[0] = (e1 - e3) * da
		b.dfc[1] = (1 - a) * e3 * (T / t3) * dl3
		b.dfc[2] = a * e1 * (T / t1) * dl1
		if m.kind == kindTroe4 {
			l2, dl2 := boundLnT.val(v[3])
			t2 := math.Exp(l2)
			e2 := math.Exp(-t2 / T)
			b.fc += e2
			b.dfc[3] = -e2 * (t2 / T) * dl2
		}
	case kindSRI3, kindSRI5:
		// W = a·exp(−b/T) + exp(−T/c) (Stewart, Larson & Golden 1989);
		// dfc holds ∂ln W/∂v.
		la, dla := boundLnSa.val(v[0])
		sb, dsb := boundSb.val(v[1])
		lc, dlc := boundLnT.val(v[2])
		a, c := math.Exp(la), math.Exp(lc)
		eb, ec := a*math.Exp(-sb/T), math.Exp(-T/c)
		b.fc = eb + ec
		b.dfc[0] = eb * dla / b.fc
		b.dfc[1] = -eb / T * dsb / b.fc
		b.dfc[2] = ec * (T / c) * dlc / b.fc
		if m.kind == kindSRI5 {
			ld, dld := boundLnSd.val(v[3])
			e, de := boundSe.val(v[4])
			b.lnD = ld + e*math.Log(T)
			b.dfc[3] = dld
			b.dfc[4] = de * math.Log(T)
		}
	}
	return b
}

// residuals fills r and, if jac is not nil, the Jacobian by the free
// parameters x (which are written into m.z first).
func (m *falloffModel) residuals(x, r []float64, jac *mat.Dense) {
	for i, j := range m.free {
		m.z[j] = x[i]
	}
	nb := m.kind.nBroad()
	v := m.z[6:]
	bs := make([]broadening, len(m.temps))
	for i, T := range m.temps {
		bs[i] = m.perT(T, v)
	}
	var row [11]float64
	for i, p := range m.pts {
		phi := &m.phi[p.iT]
		l0 := phi[0]*m.z[0] + phi[1]*m.z[1] + phi[2]*m.z[2]
		li := phi[0]*m.z[3] + phi[1]*m.z[4] + phi[2]*m.z[5]
		lnPr := l0 + p.lnM - li
		// ln(1+Pr) and Pr/(1+Pr) without overflow.
		var ln1p, s float64
		if lnPr > 0 {
			e := math.Exp(-lnPr)
			ln1p, s = lnPr+math.Log1p(e), 1/(1+e)
		} else {
			e := math.Exp(lnPr)
			ln1p, s = math.Log1p(e), e/(1+e)
		}
		lnF, q := 0.0, 0.0 // ln F and ∂ln F/∂ln Pr
		var dF [5]float64  // ∂ln F/∂v
		b := &bs[p.iT]
		switch m.kind {
		case kindTroe3, kindTroe4:
			// log F = log Fcent/(1 + y²), y = x/(N − 0.14x), x = log Pr + c,
			// c = −0.4 − 0.67 log Fcent, N = 0.75 − 1.27 log Fcent
			// (Gilbert, Luther & Troe 1983).
			lf := math.Log10(b.fc)
			c := -0.4 - 0.67*lf
			n := 0.75 - 1.27*lf
			xx := lnPr/ln10 + c
			den := n - 0.14*xx
			if math.Abs(den) > 1e-8 {
				y := xx / den
				g := 1 / (1 + y*y)
				gp := -2 * y * g * g
				lnF = ln10 * lf * g
				q = lf * gp * n / (den * den)
				dlf := g + lf*gp*(-0.67*n+1.27*xx)/(den*den)
				for k := range nb {
					dF[k] = dlf * b.dfc[k] / b.fc
				}
			}
		case kindSRI3, kindSRI5:
			// F = d·W^X·T^e, X = 1/(1 + (log Pr)²) (Stewart, Larson & Golden 1989).
			L := lnPr / ln10
			X := 1 / (1 + L*L)
			lnW := math.Log(b.fc)
			lnF = X*lnW + b.lnD
			q = lnW * (-2 * L * X * X) / ln10
			for k := range 3 {
				dF[k] = X * b.dfc[k]
			}
			if m.kind == kindSRI5 {
				dF[3], dF[4] = b.dfc[3], b.dfc[4]
			}
		}
		lnk := li + lnPr - ln1p + lnF
		r[i] = p.w * (lnk - p.lnk)
		if jac == nil {
			continue
		}
		g0, gi := (1-s)+q, s-q
		for j := range 3 {
			row[j] = p.w * g0 * phi[j]
			row[3+j] = p.w * gi * phi[j]
		}
		for k := range nb {
			row[6+k] = p.w * dF[k]
		}
		for c, j := range m.free {
			jac.Set(i, c, row[j])
		}
	}
}

// form returns the falloff form of the full parameter vector.
func (m *falloffModel) form() Falloff {
	f := Falloff{Low: m.nodes.arrhenius(m.z[0:3]), High: m.nodes.arrhenius(m.z[3:6])}
	switch m.kind {
	case kindTroe3, kindTroe4:
		tr := troeParams(m.z[6:])
		// (A, T3, T1) and (1−A, T1, T3) give the same Fcent; write the
		// one with T3 ≤ T1, as in published mechanisms.
		if tr.T3 > tr.T1 {
			tr.A, tr.T3, tr.T1 = 1-tr.A, tr.T1, tr.T3
		}
		f.Troe = &tr
	case kindSRI3, kindSRI5:
		s := sriParams(m.z[6:])
		f.SRI = &s
	}
	return f
}

// fit minimises over the parameters free from each start (values of the
// free parameters) and leaves the best in m.z.
func (m *falloffModel) fit(free []int, starts [][]float64) error {
	m.free = free
	q := newLSQ(len(m.pts), len(free), m.residuals)
	x, _, err := q.multiStart(starts)
	if err != nil {
		return err
	}
	for i, j := range free {
		m.z[j] = x[i]
	}
	return nil
}

// FalloffResult is a fitted Lindemann, Troe or SRI form with its report.
// LimitsRefined tells that supplied limits were refitted with the
// broadening because the fit with them held fixed missed the tolerance.
type FalloffResult struct {
	Falloff
	LowUnits      string `json:"low_units"` // units of Low.A·T^n, i.e. of k0
	LimitsRefined bool   `json:"limits_refined,omitempty"`
	Report
	kind falloffKind
}

// FitFalloff fits a Lindemann, Troe or SRI form (kind FormLindemann,
// FormTroe or FormSRI; any other kind panics) to the table by nonlinear
// least squares in ln k. See docs/fitting.md for the procedure; in short:
//
//   - k0 and k∞ are modified Arrhenius expressions. Without opt.Limits
//     they start from Lindemann extrapolations of the two lowest and two
//     highest pressures at each temperature and are fitted jointly with
//     the broadening. With opt.Limits they are the Arrhenius fits of the
//     supplied limits and are held while the broadening is fitted; only if
//     that misses opt.Tolerance are they refitted with the broadening, kept
//     if that lowers the maximum error by at least a tenth, and the result
//     says LimitsRefined.
//   - The broadening is fitted from several starts; Troe's T2 and SRI's d,
//     e are added only if the simpler form misses the tolerance and adding
//     them lowers the maximum error by at least a tenth.
//
// The table needs at least 3 temperatures, 2 pressures and more points
// than parameters.
func FitFalloff(t *Table, kind FormName, opt Options) (*FalloffResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	var base falloffKind
	switch kind {
	case FormLindemann:
		base = kindLindemann
	case FormTroe:
		base = kindTroe3
	case FormSRI:
		base = kindSRI3
	default:
		panic(fmt.Sprintf("fit: FitFalloff: unknown kind %q", kind))
	}
	temps, press := t.Temperatures(), t.Pressures()
	if len(temps) < 3 {
		return nil, fmt.Errorf("%w: %s: a %s fit needs at least 3 temperatures (k0 and k∞ have 3 Arrhenius parameters each); the table has %d (%s)",
			ErrTooFewData, t.name(), kind, len(temps), listK(temps))
	}
	if len(press) < 2 {
		return nil, fmt.Errorf("%w: %s: a %s fit needs at least 2 pressures to see the falloff; the table has %d (%g Pa)",
			ErrTooFewData, t.name(), kind, len(press), press[0])
	}
	if n := 6 + base.nBroad(); len(t.Points) <= n {
		return nil, fmt.Errorf("%w: %s: a %s fit has %d parameters; the table has only %d points", ErrTooFewData, t.name(), kind, n, len(t.Points))
	}
	low, high, given, err := startLimits(t, temps, opt.Limits)
	if err != nil {
		return nil, err
	}

	best, err := fitStage(t, base, low, high, given, broadStarts(base))
	if err != nil {
		return nil, err
	}
	// More parameters must buy a tenth of the error at least: less is not
	// worth carrying into a mechanism, nor worth leaving given limits for.
	better := func(r *FalloffResult, err error) {
		if err == nil && r.MaxErrorPct < 0.9*best.MaxErrorPct {
			best = r
		}
	}
	extend := func(r *FalloffResult, hold bool) {
		if r.MaxError() > opt.Tolerance && (r.kind == kindTroe3 || r.kind == kindSRI3) {
			better(fitStage(t, r.kind+1, r.Low, r.High, hold, extendedStarts(r)))
		}
	}
	extend(best, given)
	if given && best.MaxError() > opt.Tolerance {
		// Refit the given limits with the broadening, as without limits
		// but starting from them.
		starts := broadStarts(base)
		if best.kind == base {
			starts = append(starts, broadCoords(best))
		}
		r, err := fitStage(t, base, low, high, false, starts)
		if err == nil {
			r.LimitsRefined = true
			held := best
			better(r, nil)
			if best != held {
				extend(best, false)
				best.LimitsRefined = true
			}
		}
	}
	best.LowUnits = t.KUnits + " cm3/molecule"
	return best, nil
}

// fitStage fits one kind of broadening from starting limits low and high
// and the broadening starts (coordinates). With hold the limits stay as
// given and only the broadening is fitted.
func fitStage(t *Table, kind falloffKind, low, high Arrhenius, hold bool, broad [][]float64) (*FalloffResult, error) {
	m, err := newFalloffModel(t, kind)
	if err != nil {
		return nil, err
	}
	nb := kind.nBroad()
	l0, li := m.nodes.values(low), m.nodes.values(high)
	copy(m.z, l0[:])
	copy(m.z[3:], li[:])
	all := make([]int, 6+nb)
	for i := range all {
		all[i] = i
	}
	if len(broad) == 0 {
		broad = [][]float64{nil}
	}
	switch {
	case hold && nb == 0:
		// nothing to fit
	case hold:
		if err := m.fit(all[6:], broad); err != nil {
			return nil, err
		}
	default:
		var starts [][]float64
		for _, v := range broad {
			starts = append(starts, append(slices.Clone(m.z[:6:6]), v...))
		}
		if err := m.fit(all, starts); err != nil {
			return nil, err
		}
	}
	return falloffResult(t, m)
}

// broadStarts returns the starting broadening coordinates of a fit from
// scratch: Troe A ∈ {0.3, 0.7} × T3 ∈ {100, 1000} K × T1 ∈ {1000, 10000} K,
// spanning the values of published fits; SRI a ∈ {0.5, 5} × b ∈ {200,
// 2000} K × c ∈ {300, 3000} K.
func broadStarts(kind falloffKind) [][]float64 {
	var out [][]float64
	switch kind {
	case kindTroe3:
		for _, a := range []float64{0.3, 0.7} {
			for _, t3 := range []float64{100, 1000} {
				for _, t1 := range []float64{1000, 10000} {
					out = append(out, troeCoords(Troe{A: a, T3: t3, T1: t1}, 3))
				}
			}
		}
	case kindSRI3:
		for _, a := range []float64{0.5, 5} {
			for _, b := range []float64{200, 2000} {
				for _, c := range []float64{300, 3000} {
					out = append(out, sriCoords(SRI{A: a, B: b, C: c}, 3))
				}
			}
		}
	}
	return out
}

// extendedStarts returns the starts of the extended kind from the simpler
// fit: T2 ∈ {1000, 3000, 10000} K for Troe; d = 1, e = 0 for SRI.
func extendedStarts(prev *FalloffResult) [][]float64 {
	switch prev.kind + 1 {
	case kindTroe4:
		var out [][]float64
		for _, t2 := range []float64{1000, 3000, 10000} {
			tr := *prev.Troe
			tr.T2, tr.HasT2 = t2, true
			out = append(out, troeCoords(tr, 4))
		}
		return out
	case kindSRI5:
		s := *prev.SRI
		s.D, s.E = 1, 0
		return [][]float64{sriCoords(s, 5)}
	}
	return nil
}

// broadCoords returns the broadening coordinates of a fitted result.
func broadCoords(r *FalloffResult) []float64 {
	switch r.kind {
	case kindTroe3, kindTroe4:
		return troeCoords(*r.Troe, r.kind.nBroad())
	case kindSRI3, kindSRI5:
		return sriCoords(*r.SRI, r.kind.nBroad())
	}
	return nil
}

// falloffResult builds the result of the model's current parameters.
func falloffResult(t *Table, m *falloffModel) (*FalloffResult, error) {
	f := m.form()
	vals := []float64{f.Low.A, f.Low.N, f.Low.Ta, f.High.A, f.High.N, f.High.Ta}
	if f.Troe != nil {
		vals = append(vals, f.Troe.A, f.Troe.T3, f.Troe.T1, f.Troe.T2)
	}
	if f.SRI != nil {
		vals = append(vals, f.SRI.A, f.SRI.B, f.SRI.C, f.SRI.D, f.SRI.E)
	}
	if !finite(vals...) || f.Low.A == 0 || f.High.A == 0 {
		return nil, fmt.Errorf("%w: %s fit gave non-finite parameters", ErrNoConvergence, f.Kind())
	}
	rep, err := formReport(t, &f)
	if err != nil {
		return nil, err
	}
	return &FalloffResult{Falloff: f, Report: rep, kind: m.kind}, nil
}

// startLimits returns the starting k0 and k∞ and whether they were given.
func startLimits(t *Table, temps []float64, lim *Limits) (low, high Arrhenius, given bool, err error) {
	if lim != nil {
		switch {
		case lim.Low != nil && lim.High != nil:
			return *lim.Low, *lim.High, true, nil
		case len(lim.K0) > 0 || len(lim.KInf) > 0:
			if len(lim.K0) != len(temps) || len(lim.KInf) != len(temps) {
				return low, high, false, fmt.Errorf("%w: limits: %d k0 and %d k∞ values for %d temperatures", ErrBadData, len(lim.K0), len(lim.KInf), len(temps))
			}
			if low, err = FitArrhenius(temps, lim.K0, nil); err != nil {
				return low, high, false, fmt.Errorf("limits: k0: %w", err)
			}
			if high, err = FitArrhenius(temps, lim.KInf, nil); err != nil {
				return low, high, false, fmt.Errorf("limits: k∞: %w", err)
			}
			return low, high, true, nil
		}
	}
	k0, ki := extrapolateLimits(t, temps)
	if low, err = FitArrhenius(temps, k0, nil); err != nil {
		return low, high, false, fmt.Errorf("estimated k0: %w", err)
	}
	if high, err = FitArrhenius(temps, ki, nil); err != nil {
		return low, high, false, fmt.Errorf("estimated k∞: %w", err)
	}
	return low, high, false, nil
}

// extrapolateLimits estimates k0 and k∞ at each temperature from the
// Lindemann form 1/k = 1/k∞ + 1/(k0[M]), which is linear in 1/[M]: a line
// through the two highest pressures gives 1/k∞ as its intercept, one
// through the two lowest gives 1/k0 as its slope. Where the line gives no
// positive value (broadening bends the data the other way) the end point
// itself is used: k∞ ≥ k(Pmax) and k0 ≥ k(Pmin)/[M] hold for any
// broadening F ≤ 1. Extrapolations are capped at 100 times the end value.
func extrapolateLimits(t *Table, temps []float64) (k0, kinf []float64) {
	type mk struct{ m, k float64 }
	rows := make([][]mk, len(temps))
	for _, p := range t.Points {
		i := index(temps, p.T)
		rows[i] = append(rows[i], mk{Concentration(p.P, p.T), p.K})
	}
	k0, kinf = make([]float64, len(temps)), make([]float64, len(temps))
	for i, r := range rows {
		slices.SortFunc(r, func(a, b mk) int {
			switch {
			case a.m < b.m:
				return -1
			case a.m > b.m:
				return 1
			}
			return 0
		})
		lo, hi := r[0], r[len(r)-1]
		k0[i], kinf[i] = lo.k/lo.m, hi.k
		if len(r) < 2 {
			continue
		}
		// 1/k = a + b/[M]
		line := func(p, q mk) (a, b float64) {
			b = (1/p.k - 1/q.k) / (1/p.m - 1/q.m)
			return 1/q.k - b/q.m, b
		}
		if a, _ := line(r[len(r)-2], hi); a > 0 {
			kinf[i] = math.Max(hi.k, math.Min(1/a, 100*hi.k))
		}
		if _, b := line(lo, r[1]); b > 0 {
			k0[i] = math.Max(lo.k/lo.m, math.Min(1/b, 100*lo.k/lo.m))
		}
	}
	return k0, kinf
}

// listK formats temperatures for a message.
func listK(temps []float64) string {
	if len(temps) > 4 {
		return fmt.Sprintf("%g … %g K", temps[0], temps[len(temps)-1])
	}
	s := ""
	for i, T := range temps {
		if i > 0 {
			s += ", "
		}
		s += fmt.Sprintf("%g", T)
	}
	return s + " K"
}
