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
// precedence as the limits the fit uses; per-temperature values given as
// well are then only the reference of the departure report). K0 and Low
// are in k units × cm³ molecule⁻¹, KInf and High in k units.
//
// By default the falloff fits hold k0 and k∞ to the Arrhenius fits of the
// given limits and fit only the broadening. Free lets them move: if the
// held fit fails (see Report.Failed), k0 and k∞ are refitted with the
// broadening and the result says LimitsRefined. Either way the result
// reports how far the exported limits depart from the given ones.
//
// Fcent, if given (per temperature, as K0), is the broadening at the
// centre of each falloff curve, F1 = k/(k∞/2) at Pr = 1, as the master
// equation computes it. With the limits held, the Troe and SRI fits then
// start from the expression of Fcent(T) fitted to it (starts.go), one or
// two starts in place of the eight or more spread over the parameters'
// ranges; without it, or with the limits free, they start from those.
type Limits struct {
	K0, KInf  []float64
	Low, High *Arrhenius
	Free      bool
	Fcent     []float64
}

// Range of Troe's T3 (T***), T1 (T*) and T2 (T**) and of SRI's c: 10 K to
// 1e5 K. The Fcent terms exp(−T/T3), exp(−T/T1) and exp(−T2/T) describe a
// temperature dependence only while their temperature is within a factor
// of about 30 of the temperatures a mechanism covers (about 200–3000 K).
// At 10 K, exp(−T/T3) is 2e-9 or less from 200 K up (the term is gone) and
// exp(−T2/T) above 0.95 (a constant); at 1e5 K, exp(−T/T1) stays above
// 0.97 up to 3000 K (a constant) and exp(−T2/T) below 4e-15 (gone).
// Beyond these ends a parameter no longer describes anything the data can
// fix; it only switches a term off or makes it constant, which the
// simpler broadenings (constant Fcent, three parameters) say directly. A
// fitted value at an end is therefore a bound hit (see boundHits) and
// fails the fit. Published values lie inside: GRI-Mech 3.0 (Smith et al.,
// 1999) has 73.2–9999 K for H+CH3 and 2CH3 (gri_test.go).
const (
	broadTMin = 10.0 // K
	broadTMax = 1e5  // K
)

// Troe parameters that write a constant Fcent = A in Troe form: with T3 =
// 1e-30 K and T1 = 1e30 K, (1−A)·exp(−T/T3) = 0 and A·exp(−T/T1) = A to
// double precision at any temperature from 1e-27 K to 1e13 K, in every
// reader of Troe parameters (common practice in published mechanisms, no
// source). These are conventions, not fitted values, and lie outside the
// fitted range on purpose.
const (
	troeConstT3 = 1e-30 // K
	troeConstT1 = 1e30  // K
)

// Broadening bounds of the falloff fits. Troe's T3, T1 and T2 and SRI's c
// stay in [broadTMin, broadTMax] (see there). A stays in [0, 1], which
// keeps Fcent positive and is the range of its meaning (the weight of the
// high-temperature term); the constant Fcent is also in [0, 1]. SRI's a
// stays in [1e-8, 1e8], b in [−5000 K, 50000 K] (so exp(−b/T) cannot
// overflow above 10 K), d in [0.1, 10] and e in [−3, 3].
var (
	boundA    = bound{0, 1}
	boundLnT  = bound{math.Log(broadTMin), math.Log(broadTMax)}
	boundLnSa = bound{math.Log(1e-8), math.Log(1e8)}
	boundSb   = bound{-5000, 50000}
	boundLnSd = bound{math.Log(0.1), math.Log(10)}
	boundSe   = bound{-3, 3}
	ln10      = math.Log(10)
)

// boundEffectFrac is the fraction of the tolerance below which a
// parameter counts as sitting on an end of its range: if setting it to
// that end changes no k of the table by more than 1 % of what the fit may
// miss by, the data do not place it inside the range, and the value is
// the bound's, not the data's (see boundHits).
const boundEffectFrac = 0.01

// falloffKind is the broadening of a falloff fit.
type falloffKind int

const (
	kindLindemann falloffKind = iota
	kindTroeConst             // constant Fcent, written in Troe form
	kindTroe3
	kindTroe4
	kindSRI3
	kindSRI5
)

// nBroad returns the number of broadening parameters.
func (k falloffKind) nBroad() int {
	return [...]int{0, 1, 3, 4, 3, 5}[k]
}

// isTroe reports a Troe broadening (constant Fcent included).
func (k falloffKind) isTroe() bool { return k == kindTroeConst || k == kindTroe3 || k == kindTroe4 }

// ladders are the broadenings FitFalloff tries for each form, simplest
// first; the first that meets the tolerance with no parameter on a bound
// is the fit.
var ladders = map[FormName][]falloffKind{
	FormLindemann: {kindLindemann},
	FormTroe:      {kindTroeConst, kindTroe3, kindTroe4},
	FormSRI:       {kindSRI3, kindSRI5},
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
	// limits caches, per point, what depends on the limits' coordinates
	// z[0:6] alone, for the z it was made at: with the limits held they do
	// not change from one evaluation to the next.
	limits struct {
		z   [6]float64
		ok  bool
		pre []limitTerms
	}
}

// limitTerms are a point's ln k∞, ln Pr, ln(1 + Pr) and Pr/(1 + Pr).
type limitTerms struct{ li, lnPr, ln1p, s float64 }

// limitTermsAt returns the limit terms of every point at m.z[0:6], from the
// cache when z[0:6] has not changed.
func (m *falloffModel) limitTermsAt() []limitTerms {
	var z6 [6]float64
	copy(z6[:], m.z[:6])
	if m.limits.ok && m.limits.z == z6 {
		return m.limits.pre
	}
	if m.limits.pre == nil {
		m.limits.pre = make([]limitTerms, len(m.pts))
	}
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
		m.limits.pre[i] = limitTerms{li, lnPr, ln1p, s}
	}
	m.limits.z, m.limits.ok = z6, true
	return m.limits.pre
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

// troeParams returns the Troe parameters of coordinates v: one
// coordinate is the constant Fcent, three or four the Troe parameters.
func troeParams(v []float64) Troe {
	if len(v) == 1 {
		a, _ := boundA.val(v[0])
		return Troe{A: a, T3: troeConstT3, T1: troeConstT1}
	}
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

// troeCoords returns the coordinates of tr (n = 1 for a constant Fcent
// = tr.A, 3 or 4).
func troeCoords(tr Troe, n int) []float64 {
	if n == 1 {
		return []float64{boundA.inv(tr.A)}
	}
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
	case kindTroeConst:
		a, da := boundA.val(v[0])
		b.fc, b.dfc[0] = a, da
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
	logFc := make([]float64, len(m.temps)) // log10 Fcent (Troe) or ln W (SRI) per temperature
	troe := m.kind == kindTroeConst || m.kind == kindTroe3 || m.kind == kindTroe4
	for i, T := range m.temps {
		bs[i] = m.perT(T, v)
		if troe {
			logFc[i] = math.Log10(bs[i].fc)
		} else {
			logFc[i] = math.Log(bs[i].fc)
		}
	}
	var row [11]float64
	pre := m.limitTermsAt()
	for i, p := range m.pts {
		phi := &m.phi[p.iT]
		li, lnPr, ln1p, s := pre[i].li, pre[i].lnPr, pre[i].ln1p, pre[i].s
		lnF, q := 0.0, 0.0 // ln F and ∂ln F/∂ln Pr
		var dF [5]float64  // ∂ln F/∂v
		b := &bs[p.iT]
		switch m.kind {
		case kindTroeConst, kindTroe3, kindTroe4:
			// log F = log Fcent/(1 + y²), y = x/(N − 0.14x), x = log Pr + c,
			// c = −0.4 − 0.67 log Fcent, N = 0.75 − 1.27 log Fcent
			// (Gilbert, Luther & Troe 1983).
			lf := logFc[p.iT]
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
			lnW := logFc[p.iT]
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
		jr := jac.RawMatrix()
		out := jr.Data[i*jr.Stride : i*jr.Stride+len(m.free)]
		for c, j := range m.free {
			out[c] = row[j]
		}
	}
}

// form returns the falloff form of the full parameter vector.
func (m *falloffModel) form() Falloff {
	f := Falloff{Low: m.nodes.arrhenius(m.z[0:3]), High: m.nodes.arrhenius(m.z[3:6])}
	switch m.kind {
	case kindTroeConst:
		tr := troeParams(m.z[6:])
		f.Troe = &tr
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
	x, _, err := q.screenedStart(starts)
	if err != nil {
		return err
	}
	for i, j := range free {
		m.z[j] = x[i]
	}
	return nil
}

// FalloffResult is a fitted Lindemann, Troe or SRI form with its report.
//
// Broadening says in words which broadening was chosen ("constant Fcent
// = 0.5", "three-parameter Troe", …). With limits given, LimitDeparture
// gives at each temperature of the table the ratio of the exported k0 and
// k∞ to the given ones, and MaxLimitDeparture the largest factor between
// them: with held limits this is the error of their Arrhenius fits, with
// Limits.Free also how far the fit moved them. LimitsRefined tells that
// the limits were refitted with the broadening (only with Limits.Free).
type FalloffResult struct {
	Falloff
	LowUnits          string           `json:"low_units"` // units of Low.A·T^n, i.e. of k0
	Broadening        string           `json:"broadening"`
	LimitsRefined     bool             `json:"limits_refined,omitempty"`
	LimitDeparture    []LimitDeparture `json:"limit_departure,omitempty"`
	MaxLimitDeparture float64          `json:"max_limit_departure,omitempty"` // max over T of max(r, 1/r), ≥ 1
	Report
	kind falloffKind
	hits []string // parameters on a bound, in words
}

// LimitDeparture compares the exported limits with the given ones at one
// temperature: K0Ratio = k0(exported)/k0(given), KInfRatio likewise.
type LimitDeparture struct {
	T         float64 `json:"T_K"`
	K0Ratio   float64 `json:"k0_ratio"`
	KInfRatio float64 `json:"kinf_ratio"`
}

// FitFalloff fits a Lindemann, Troe or SRI form (kind FormLindemann,
// FormTroe or FormSRI; any other kind panics) to the table by nonlinear
// least squares in ln k. See docs/fitting.md for the procedure; in short:
//
//   - k0 and k∞ are modified Arrhenius expressions. Without opt.Limits
//     they start from Lindemann extrapolations of the two lowest and two
//     highest pressures at each temperature and are fitted jointly with
//     the broadening. With opt.Limits they are held to the Arrhenius fits
//     of the supplied limits and only the broadening is fitted; with
//     Limits.Free they are refitted with the broadening if the held fit
//     fails, kept if that fit passes or, the held one missing the
//     tolerance, lowers the maximum error by at least a tenth, and the
//     result says LimitsRefined.
//   - The broadening is the simplest that meets opt.Tolerance with no
//     parameter on the end of its range (see boundHits): Troe tries a
//     constant Fcent, then three parameters, then four (T2); SRI three,
//     then five (d, e). If none passes, the result is marked Failed with
//     the reasons (see fitLadder for which is returned).
//
// The table needs at least 3 temperatures, 2 pressures and more points
// than parameters.
func FitFalloff(t *Table, kind FormName, opt Options) (*FalloffResult, error) {
	opt = opt.withDefaults()
	if err := t.Validate(); err != nil {
		return nil, err
	}
	ladder, ok := ladders[kind]
	if !ok {
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
	if n := 6 + ladder[0].nBroad(); len(t.Points) <= n {
		return nil, fmt.Errorf("%w: %s: a %s fit has %d parameters; the table has only %d points", ErrTooFewData, t.name(), kind, n, len(t.Points))
	}
	lim, err := resolveLimits(t, temps, opt.Limits)
	if err != nil {
		return nil, err
	}

	var centre *fcentTarget
	if lim.given && opt.Limits != nil && kind != FormLindemann {
		centre = newFcentTarget(temps, opt.Limits.Fcent, kind == FormTroe)
	}
	best, tried, err := fitLadder(t, ladder, lim.low, lim.high, lim.given, nil, centre, opt.Tolerance)
	if lim.given && opt.Limits.Free && (err != nil || best.Failed) {
		// Refit the limits with the broadening, starting from the given
		// ones and from each held broadening.
		seeds := map[falloffKind][]float64{}
		for _, r := range tried {
			seeds[r.kind] = broadCoords(r)
		}
		free, _, ferr := fitLadder(t, ladder, lim.low, lim.high, false, seeds, nil, opt.Tolerance)
		if ferr == nil && (err != nil || !free.Failed || best.MaxError() > opt.Tolerance && free.MaxErrorPct < 0.9*best.MaxErrorPct) {
			free.LimitsRefined = true
			best, err = free, nil
		}
	}
	if err != nil {
		return nil, err
	}
	best.LowUnits = t.KUnits + " cm3/molecule"
	best.Broadening = broadeningWords(&best.Falloff)
	if lim.given {
		best.LimitDeparture, best.MaxLimitDeparture = limitDeparture(&best.Falloff, temps, lim.k0, lim.kinf)
		if !finite(best.MaxLimitDeparture) {
			return nil, fmt.Errorf("%w: %s: the fitted limits differ from the given ones by a factor beyond float64 range; check the limits' units (k0 in %s cm3/molecule, k∞ in %s)",
				ErrBadData, t.name(), t.KUnits, t.KUnits)
		}
	}
	return best, nil
}

// fitLadder fits the broadenings kinds in turn, from limits low and high
// (held if hold), and returns the first that passes (Report.Failed
// false) and every result it tried. If none passes it returns the
// simplest that is within the tolerance (and failed on a bound only) or
// whose maximum error no later one lowers by a tenth: more parameters
// must buy that much at least to be worth carrying into a mechanism.
// seeds are extra starting coordinates per kind. With hold and a centre
// target the starts are centre's (fcentTarget.centreStarts), else
// ladderStarts.
func fitLadder(t *Table, kinds []falloffKind, low, high Arrhenius, hold bool, seeds map[falloffKind][]float64, centre *fcentTarget, tol float64) (*FalloffResult, []*FalloffResult, error) {
	var tried []*FalloffResult
	var prev *FalloffResult
	var lastErr error
	for _, k := range kinds {
		if n := 6 + k.nBroad(); len(t.Points) <= n {
			lastErr = fmt.Errorf("%w: %s: a fit with %d parameters needs more than %d points", ErrTooFewData, t.name(), n, len(t.Points))
			continue
		}
		starts := ladderStarts(k, prev)
		if hold && centre != nil {
			starts = centre.centreStarts(k, prev)
		}
		if s, ok := seeds[k]; ok {
			starts = append(starts, s)
		}
		r, err := fitStage(t, k, low, high, hold, starts)
		if err != nil {
			lastErr = err
			continue
		}
		r.hits = boundHits(t, &r.Falloff, k, tol)
		r.judge(tol, r.hits...)
		tried = append(tried, r)
		if !r.Failed {
			return r, tried, nil
		}
		prev = r
	}
	if len(tried) == 0 {
		return nil, nil, lastErr
	}
	best := tried[0]
	for _, r := range tried[1:] {
		if best.MaxError() > tol && r.MaxErrorPct < 0.9*best.MaxErrorPct {
			best = r
		}
	}
	return best, tried, nil
}

// fitStage fits one kind of broadening from starting limits low and high
// and the broadening starts (coordinates). With hold the limits stay
// exactly low and high and only the broadening is fitted.
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
	var held *[2]Arrhenius
	if hold {
		held = &[2]Arrhenius{low, high}
	}
	return falloffResult(t, m, held)
}

// ladderStarts returns the starting broadening coordinates of kind, after
// the fit prev of the simpler kind before it on the ladder (nil if there
// was none or it did not converge).
//
//   - Constant Fcent: 0.2, 0.5, 0.8.
//   - Three-parameter Troe: A ∈ {0.3, 0.7} × T3 ∈ {100, 1000} K × T1 ∈
//     {1000, 10000} K, spanning the values of published fits, and from a
//     constant Fcent a: A = a, T3 = 20 K, T1 = 5e4 K, nearly that constant.
//   - Four-parameter Troe: the three-parameter fit with T2 ∈ {1000, 3000,
//     10000} K; if that fit sat on a bound or is missing, also the
//     freshStarts with T2 = 3000 K, so the search can leave the bound.
//   - SRI: a ∈ {0.5, 5} × b ∈ {200, 2000} K × c ∈ {300, 3000} K; the
//     five-parameter form from the three-parameter fit with d = 1, e = 0,
//     and likewise from the freshStarts if that sat on a bound.
func ladderStarts(kind falloffKind, prev *FalloffResult) [][]float64 {
	var out [][]float64
	switch kind {
	case kindTroeConst:
		for _, a := range []float64{0.2, 0.5, 0.8} {
			out = append(out, troeCoords(Troe{A: a}, 1))
		}
	case kindTroe3:
		out = broadStarts(kindTroe3)
		if prev != nil && prev.kind == kindTroeConst {
			out = append(out, troeCoords(Troe{A: prev.Troe.A, T3: 2 * broadTMin, T1: broadTMax / 2}, 3))
		}
	case kindTroe4:
		if prev != nil && prev.kind == kindTroe3 {
			for _, t2 := range []float64{1000, 3000, 10000} {
				tr := *prev.Troe
				tr.T2, tr.HasT2 = t2, true
				out = append(out, troeCoords(tr, 4))
			}
		}
		if prev == nil || prev.kind != kindTroe3 || len(prev.hits) > 0 {
			for _, v := range freshStarts(kindTroe3) {
				out = append(out, append(v, boundLnT.inv(math.Log(3000))))
			}
		}
	case kindSRI3:
		out = broadStarts(kindSRI3)
	case kindSRI5:
		extend := func(s SRI) []float64 {
			s.D, s.E = 1, 0
			return sriCoords(s, 5)
		}
		if prev != nil && prev.kind == kindSRI3 {
			out = append(out, extend(*prev.SRI))
		}
		if prev == nil || prev.kind != kindSRI3 || len(prev.hits) > 0 {
			for _, v := range freshStarts(kindSRI3) {
				out = append(out, extend(sriParams(v)))
			}
		}
	}
	return out
}

// broadStarts returns the starting coordinates of a three-parameter Troe
// or SRI fit from scratch (see ladderStarts).
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

// freshStarts returns half of broadStarts, the other parameters on the
// diagonal (Troe T3, T1 = 100, 1000 K or 1000, 10000 K; SRI b, c = 200,
// 300 K or 2000, 3000 K): the restarts of the extended forms when the
// simpler fit sat on a bound. Half, because a run that ends on a bound
// takes some twenty times as long as one that does not, and these
// restarts are for the fits that do.
func freshStarts(kind falloffKind) [][]float64 {
	all := broadStarts(kind)
	var out [][]float64
	for i, v := range all {
		if i%4 == 0 || i%4 == 3 {
			out = append(out, v)
		}
	}
	return out
}

// broadCoords returns the broadening coordinates of a fitted result.
func broadCoords(r *FalloffResult) []float64 {
	switch {
	case r.kind.isTroe():
		return troeCoords(*r.Troe, r.kind.nBroad())
	case r.kind == kindSRI3 || r.kind == kindSRI5:
		return sriCoords(*r.SRI, r.kind.nBroad())
	}
	return nil
}

// falloffResult builds the result of the model's current parameters. If
// held is not nil its limits (k0, k∞) replace the model's node values,
// which equal them only to rounding.
func falloffResult(t *Table, m *falloffModel, held *[2]Arrhenius) (*FalloffResult, error) {
	f := m.form()
	if held != nil {
		f.Low, f.High = held[0], held[1]
	}
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

// clone returns a copy of f that shares no broadening with it.
func (f *Falloff) clone() Falloff {
	g := *f
	if f.Troe != nil {
		tr := *f.Troe
		g.Troe = &tr
	}
	if f.SRI != nil {
		s := *f.SRI
		g.SRI = &s
	}
	return g
}

// boundHits lists, in words, the broadening parameters of f (of the given
// kind) that sit on an end of their range in effect: setting the
// parameter to that end, the others unchanged, changes no k of the table
// by more than boundEffectFrac of the tolerance tol (a fraction). That
// covers a parameter the fit pushed onto its bound and one it left
// anywhere in a stretch where the data no longer see it (a T3 of 12 K
// over 300–2500 K, whose term is below 1e-10).
func boundHits(t *Table, f *Falloff, kind falloffKind, tol float64) []string {
	var hits []string
	base := make([]float64, len(t.Points)) // f's k at the points, computed once
	for i, p := range t.Points {
		base[i] = f.Eval(p.T, p.P)
	}
	// check tries the ends of bound b for the parameter set by set (which
	// receives the coordinate y of the bound and changes a copy of f).
	check := func(name string, b bound, set func(g *Falloff, y float64), show func(float64) string, now float64) {
		for _, end := range []struct {
			word string
			y    float64
		}{{"lower", b.lo}, {"upper", b.hi}} {
			g := f.clone()
			set(&g, end.y)
			worst := 0.0
			for i, p := range t.Points {
				d := math.Abs(g.Eval(p.T, p.P)/base[i] - 1)
				if !(d <= worst) { // NaN counts as a large change
					worst = d
					if math.IsNaN(d) {
						worst = math.Inf(1)
					}
				}
			}
			if worst <= boundEffectFrac*tol {
				hits = append(hits, fmt.Sprintf("%s = %s sits on the %s end of its range, %s (no k changes by more than %.2g %% there)",
					name, show(now), end.word, show(end.y), 100*worst))
				return
			}
		}
	}
	plain := func(y float64) string { return g4(y) }
	kelvin := func(lnT float64) string { return g4(math.Exp(lnT)) + " K" }
	exp := func(ly float64) string { return g4(math.Exp(ly)) }
	switch kind {
	case kindTroeConst:
		check("constant Fcent", boundA, func(g *Falloff, y float64) { g.Troe.A = y }, plain, f.Troe.A)
	case kindTroe3, kindTroe4:
		tr := f.Troe
		check("Troe A", boundA, func(g *Falloff, y float64) { g.Troe.A = y }, plain, tr.A)
		check("T3 (T***)", boundLnT, func(g *Falloff, y float64) { g.Troe.T3 = math.Exp(y) }, kelvin, math.Log(tr.T3))
		check("T1 (T*)", boundLnT, func(g *Falloff, y float64) { g.Troe.T1 = math.Exp(y) }, kelvin, math.Log(tr.T1))
		if tr.HasT2 {
			check("T2 (T**)", boundLnT, func(g *Falloff, y float64) { g.Troe.T2 = math.Exp(y) }, kelvin, math.Log(tr.T2))
		}
	case kindSRI3, kindSRI5:
		s := f.SRI
		check("SRI a", boundLnSa, func(g *Falloff, y float64) { g.SRI.A = math.Exp(y) }, exp, math.Log(s.A))
		check("SRI b", boundSb, func(g *Falloff, y float64) { g.SRI.B = y }, func(y float64) string { return g4(y) + " K" }, s.B)
		check("SRI c", boundLnT, func(g *Falloff, y float64) { g.SRI.C = math.Exp(y) }, kelvin, math.Log(s.C))
		if kind == kindSRI5 {
			check("SRI d", boundLnSd, func(g *Falloff, y float64) { g.SRI.D = math.Exp(y) }, exp, math.Log(s.D))
			check("SRI e", boundSe, func(g *Falloff, y float64) { g.SRI.E = y }, plain, s.E)
		}
	}
	return hits
}

// broadeningWords says which broadening f has: "none (Lindemann)",
// "constant Fcent = a" (Troe with T3 ≤ 1e-20 K, T1 ≥ 1e20 K and no T2,
// the form FitFalloff writes with troeConstT3 and troeConstT1),
// "three-parameter Troe", "four-parameter Troe (T** needed)",
// "three-parameter SRI" or "five-parameter SRI (d, e needed)".
func broadeningWords(f *Falloff) string {
	switch tr, s := f.Troe, f.SRI; {
	case constantFcent(tr):
		return "constant Fcent = " + g4(tr.A)
	case tr != nil && tr.HasT2:
		return "four-parameter Troe (T** needed)"
	case tr != nil:
		return "three-parameter Troe"
	case s != nil && s.D != 0:
		return "five-parameter SRI (d, e needed)"
	case s != nil:
		return "three-parameter SRI"
	}
	return "none (Lindemann)"
}

// constantFcent reports whether tr (nil: no) is a constant Fcent = tr.A
// written in Troe form: T3 ≤ 1e-20 K and T1 ≥ 1e20 K (where (1−A)·exp(−T/T3)
// = 0 and A·exp(−T/T1) = A to double precision at least from 1e-17 K to
// 1e4 K), no T2; FitFalloff writes troeConstT3 and troeConstT1.
func constantFcent(tr *Troe) bool {
	return tr != nil && !tr.HasT2 && tr.T3 <= 1e-20 && tr.T1 >= 1e20
}

// limitDeparture returns, at each temperature, the ratio of the limits of
// f to the given k0 and k∞, and the largest factor max(r, 1/r) among them.
func limitDeparture(f *Falloff, temps, k0, kinf []float64) ([]LimitDeparture, float64) {
	out := make([]LimitDeparture, len(temps))
	worst := 1.0
	for i, T := range temps {
		d := LimitDeparture{T: T, K0Ratio: f.Low.At(T) / k0[i], KInfRatio: f.High.At(T) / kinf[i]}
		for _, r := range []float64{d.K0Ratio, d.KInfRatio} {
			worst = math.Max(worst, math.Max(r, 1/r))
		}
		out[i] = d
	}
	return out, worst
}

// fitLimits are the limits a falloff fit starts from (and holds, if
// given), with the per-temperature values the departure is measured
// against when given.
type fitLimits struct {
	low, high Arrhenius
	given     bool
	k0, kinf  []float64 // per temperature of the table; nil unless given
}

// resolveLimits returns the limits of the fit: those of lim if not nil,
// else estimates from the table.
func resolveLimits(t *Table, temps []float64, lim *Limits) (fitLimits, error) {
	var out fitLimits
	var err error
	if lim != nil && (len(lim.K0) > 0 || len(lim.KInf) > 0) {
		if len(lim.K0) != len(temps) || len(lim.KInf) != len(temps) {
			return out, fmt.Errorf("%w: limits: %d k0 and %d k∞ values for %d temperatures", ErrBadData, len(lim.K0), len(lim.KInf), len(temps))
		}
		for i, T := range temps {
			for _, v := range []struct {
				name string
				k    float64
			}{{"k0", lim.K0[i]}, {"k∞", lim.KInf[i]}} {
				if !(v.k > 0) || math.IsInf(v.k, 0) {
					return out, fmt.Errorf("%w: limits: %s = %g at %g K is not positive and finite", ErrBadData, v.name, v.k, T)
				}
			}
		}
		out.k0, out.kinf, out.given = lim.K0, lim.KInf, true
		if out.low, err = FitArrhenius(temps, lim.K0, nil); err != nil {
			return out, fmt.Errorf("limits: k0: %w", err)
		}
		if out.high, err = FitArrhenius(temps, lim.KInf, nil); err != nil {
			return out, fmt.Errorf("limits: k∞: %w", err)
		}
	}
	if lim != nil && lim.Low != nil && lim.High != nil {
		for _, a := range []struct {
			name string
			a    *Arrhenius
		}{{"low", lim.Low}, {"high", lim.High}} {
			if !(a.a.A > 0) || !finite(a.a.A, a.a.N, a.a.Ta) {
				return out, fmt.Errorf("%w: limits: %s-pressure Arrhenius A = %g, n = %g, Ta = %g K: A must be positive and all finite", ErrBadData, a.name, a.a.A, a.a.N, a.a.Ta)
			}
		}
		out.low, out.high = *lim.Low, *lim.High
		if !out.given {
			out.k0, out.kinf = make([]float64, len(temps)), make([]float64, len(temps))
			for i, T := range temps {
				out.k0[i], out.kinf[i] = out.low.At(T), out.high.At(T)
			}
		}
		out.given = true
	}
	if out.given {
		return out, nil
	}
	k0, ki := extrapolateLimits(t, temps)
	if out.low, err = FitArrhenius(temps, k0, nil); err != nil {
		return out, fmt.Errorf("estimated k0: %w", err)
	}
	if out.high, err = FitArrhenius(temps, ki, nil); err != nil {
		return out, fmt.Errorf("estimated k∞: %w", err)
	}
	return out, nil
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
