package rrkm

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/integrate/quad"
)

// Wigner returns Wigner's tunnelling correction κ = 1 + u²/24,
// u = hν‡/(k_BT), for an imaginary frequency of magnitude imagFreq cm⁻¹ at tK
// kelvin (Wigner, Z. Phys. Chem. B 19, 203, 1932). It is the leading quantum
// correction at the barrier top and is meant for u well below 2π; Eckart
// gives the full factor. Wigner panics unless imagFreq ≥ 0 and tK > 0 are
// finite.
func Wigner(imagFreq, tK float64) float64 {
	if !(imagFreq >= 0) || math.IsInf(imagFreq, 0) {
		panic(fmt.Sprintf("rrkm: Wigner: imaginary frequency %v cm-1 must be finite and not negative", imagFreq))
	}
	checkT("Wigner", tK)
	u := imagFreq / kT(tK)
	return 1 + u*u/24
}

func checkT(where string, tK float64) {
	if !(tK > 0) || math.IsInf(tK, 0) {
		panic(fmt.Sprintf("rrkm: %s: temperature %v K must be positive and finite", where, tK))
	}
}

// Eckart is an asymmetric Eckart barrier along the reaction coordinate
// (Eckart, Phys. Rev. 35, 1303, 1930), fixed by the magnitude of the
// transition state's imaginary frequency and the two zero-point-corrected
// barrier heights. Energies are measured from the reactant's zero-point
// level: the barrier top is at V1 (the threshold E0) and the product side
// levels off at V1 − V2, the reaction energy.
type Eckart struct {
	ImagFreq float64 // |ν‡|, cm⁻¹
	V1       float64 // forward barrier E0, cm⁻¹
	V2       float64 // reverse barrier from the product side, E0 − ΔE, cm⁻¹
}

// NewEckart returns the Eckart barrier of transition state ts, with V1 =
// ts.E0 and ImagFreq = ts.Imaginary, and reverse barrier v2 cm⁻¹ (E0 minus
// the zero-point-corrected reaction energy).
func NewEckart(ts *Species, v2 float64) (*Eckart, error) {
	if ts.Imaginary == 0 {
		return nil, fmt.Errorf("rrkm: species %q: tunnelling needs the imaginary frequency", ts.Name)
	}
	e := &Eckart{ImagFreq: ts.Imaginary, V1: ts.E0, V2: v2}
	if err := e.Validate(); err != nil {
		return nil, fmt.Errorf("species %q: %w", ts.Name, err)
	}
	return e, nil
}

// Validate reports a barrier that Transmission and Kappa cannot evaluate:
// the frequency and both barriers must be positive and finite, and the
// reduced barrier heights 2πV/hν‡ small enough that the formula's exponents
// stay finite.
func (e Eckart) Validate() error {
	for _, f := range []struct {
		name string
		v    float64
	}{{"imaginary frequency", e.ImagFreq}, {"forward barrier V1", e.V1}, {"reverse barrier V2", e.V2}} {
		if !(f.v > 0) || math.IsInf(f.v, 0) {
			return fmt.Errorf("rrkm: Eckart barrier: %s %v cm-1 must be positive and finite", f.name, f.v)
		}
	}
	if p := e.params(); math.IsInf(p.k, 0) || math.IsInf(p.d, 0) || p.k == 0 {
		return fmt.Errorf("rrkm: Eckart barrier: V1 = %v, V2 = %v cm-1 with ν‡ = %v cm-1 are out of range (2πV/hν overflows)", e.V1, e.V2, e.ImagFreq)
	}
	return nil
}

// eckartParams holds the constants of Johnston & Heicklen's form:
// 2πα = k·√E, 2πβ = k·√(E − A), 2πδ = d (or i·d when imag), and
// g0 = 2π(α+β) − 2πδ at the top.
type eckartParams struct {
	v1, v2, a, emin float64
	k, d, g0        float64
	imag            bool
}

// params derives the constants. With the potential V(x) = A·y/(1+y) +
// B·y/(1+y)², y = exp(2πx/L) (Eckart 1930), A = V1 − V2 and
// B = (√V1 + √V2)²; the barrier curvature fixes C = h²/(8mL²) through
// hν‡ = √(C·(B² − A²)²/B³), which gives √C = (hν‡/4)·(1/√V1 + 1/√V2) and
// B/C = 16·V1·V2/(hν‡)² (Johnston & Heicklen, J. Phys. Chem. 66, 532, 1962).
func (e Eckart) params() eckartParams {
	nu := e.ImagFreq
	p := eckartParams{v1: e.V1, v2: e.V2, a: e.V1 - e.V2}
	p.emin = max(0, p.a)
	p.k = 4 * math.Pi / (nu * (1/math.Sqrt(e.V1) + 1/math.Sqrt(e.V2)))
	// At the top 2π(α+β) = t0 = 4π√(V1V2)/hν‡ and 2πδ = t0·√(1 − q),
	// q = (hν‡)²/(16V1V2).
	t0 := 4 * math.Pi * math.Sqrt(e.V1/nu) * math.Sqrt(e.V2/nu)
	q := 1 / (16 * (e.V1 / nu) * (e.V2 / nu))
	if q <= 1 {
		p.d = t0 * math.Sqrt(1-q)
		p.g0 = t0 * q / (1 + math.Sqrt(1-q))
	} else {
		p.d, p.imag = t0*math.Sqrt(q-1), true
		p.g0 = t0
	}
	return p
}

func (e Eckart) mustParams(where string) eckartParams {
	if err := e.Validate(); err != nil {
		panic(fmt.Sprintf("%s: %v", where, err))
	}
	return e.params()
}

// Emin returns the lowest energy at which the barrier transmits, the higher
// of the two asymptotes max(0, V1 − V2), in cm⁻¹.
func (e Eckart) Emin() float64 { return max(0, e.V1-e.V2) }

// Transmission returns the exact transmission probability P(E) of the Eckart
// barrier at energy E cm⁻¹ above the reactant's zero-point level (Eckart
// 1930, in the form of Johnston & Heicklen 1962):
//
//	P = [cosh 2π(α+β) − cosh 2π(α−β)] / [cosh 2π(α+β) + cosh 2πδ],
//
// α = ½√(E/C), β = ½√((E−A)/C), δ = ½√((B−C)/C), with cosh 2πδ → cos 2π|δ|
// for a barrier so thin that B < C. P = 0 at and below the upper asymptote
// max(0, V1 − V2) and tends to 1 far above the top. It is evaluated as
// sinh·sinh over cosh·cosh with the exponentials factored out, so it neither
// overflows nor loses precision deep below the barrier. NaN gives NaN;
// Transmission panics if e is invalid (see Validate).
func (e Eckart) Transmission(E float64) float64 {
	p := e.mustParams("rrkm: Eckart.Transmission")
	if math.IsNaN(E) {
		return math.NaN()
	}
	return math.Exp(p.logP(E))
}

// logP returns ln P(E), −Inf at and below the threshold.
func (p *eckartParams) logP(E float64) float64 {
	if !(E > p.emin) {
		return math.Inf(-1)
	}
	return p.logPAt(E, E-p.a, E-p.v1)
}

// logPx returns ln P at x = E − V1 from the top, which keeps full precision
// on barriers far higher than hν‡.
func (p *eckartParams) logPx(x float64) float64 {
	er, ep := p.v1+x, p.v2+x
	if !(er > 0 && ep > 0) {
		return math.Inf(-1)
	}
	return p.logPAt(er, ep, x)
}

// logPAt returns ln P from the energies er above the reactant asymptote, ep
// above the product asymptote and x = E − V1 (all three consistent).
func (p *eckartParams) logPAt(er, ep, x float64) float64 {
	if math.IsInf(x, 1) {
		return 0
	}
	a := p.k * math.Sqrt(er)
	b := p.k * math.Sqrt(ep)
	// 2·sinh a·sinh b = ½e^(a+b)(1 − e^(−2a))(1 − e^(−2b)).
	l := math.Log(-math.Expm1(-2*a)) + math.Log(-math.Expm1(-2*b))
	// a + b − t0 = k·x·(1/(√er + √V1) + 1/(√ep + √V2)), without the
	// cancellation of two large numbers.
	dt := p.k * x * (1/(math.Sqrt(er)+math.Sqrt(p.v1)) + 1/(math.Sqrt(ep)+math.Sqrt(p.v2)))
	if p.imag {
		// cosh t + cos d = ½e^t·[(1 − e^(−t))² + 4cos²(d/2)·e^(−t)], both
		// terms ≥ 0, so no cancellation near threshold.
		t := p.g0 + dt
		c := math.Cos(p.d / 2)
		em := math.Expm1(-t)
		return l - math.Log(em*em+4*c*c*math.Exp(-t))
	}
	// cosh t + cosh d = 2cosh((t+d)/2)·cosh((t−d)/2)
	//                 = ½e^(max(t,d))·(1 + e^(−(t+d)))(1 + e^(−|t−d|)).
	g := p.g0 + dt // t − d
	return l - math.Log1p(math.Exp(-(g + 2*p.d))) - math.Log1p(math.Exp(-math.Abs(g))) - max(0, -g)
}

// Kappa returns the thermal tunnelling factor of the barrier at tK kelvin,
//
//	κ(T) = β·e^(βV1)·∫ P(E)·e^(−βE) dE,   β = 1/k_BT,
//
// the ratio of the quantum flux over the Eckart barrier to the classical flux
// over its top (Johnston & Heicklen 1962). The integral is done by adaptive
// Gauss–Legendre quadrature to 1e-10 relative accuracy. κ can exceed the
// float64 range deep in the tunnelling regime (ln κ > 709.78, far below the
// crossover temperature hν‡/(2πk_B)); it is then +Inf, and LogKappa and
// KInfTunnel stay finite. Kappa panics unless tK > 0 is finite or if e is
// invalid.
func (e Eckart) Kappa(tK float64) float64 { return math.Exp(e.LogKappa(tK)) }

// LogKappa returns ln κ(T) (see Kappa), finite at any positive temperature.
func (e Eckart) LogKappa(tK float64) float64 {
	checkT("Eckart.Kappa", tK)
	p := e.mustParams("rrkm: Eckart.Kappa")
	beta := 1 / kT(tK)
	return math.Log(beta) + p.logJ(beta, e.ImagFreq)
}

// logLaplace returns ln ∫P(E)e^(−βE)dE, energies from the reactant zero.
func (e Eckart) logLaplace(tK float64) float64 {
	checkT("KInfTunnel", tK)
	p := e.mustParams("rrkm: KInfTunnel")
	beta := 1 / kT(tK)
	return p.logJ(beta, e.ImagFreq) - beta*p.v1
}

// logJ returns ln J, J = ∫ P·e^(−βx) dx over x = E − V1 from the upper
// asymptote to 20hν‡ + 60kT above the top, beyond which the integrand is
// below e^(−60) of its value at the top. The features of the integrand are
// the rise of P at the top (width hν‡/2π), the thermal tail above it (kT),
// a deep-tunnelling peak below it at low temperature, and the square-root
// onset of P at the asymptote. The initial panels are therefore hν‡/2 wide
// across the top and double in width away from it in both directions; the
// panel that reaches the asymptote is integrated in u = √(x − x_min), which
// removes the square root, with panels halving in width towards u = 0.
func (p *eckartParams) logJ(beta, nu float64) float64 {
	xmin := -min(p.v1, p.v2)
	xmax := 20*nu + 60/beta
	lnf := func(x float64) float64 { return p.logPx(x) - beta*x }
	lnu := func(u float64) float64 { return math.Log(2*u) + lnf(xmin+u*u) }
	var segs []logSegment
	// Above the top.
	for x := 0.0; x < xmax; {
		w := max(nu/2, x)
		segs = append(segs, logSegment{x, min(x+w, xmax), lnf})
		x += w
	}
	// Below the top, down to the panel that reaches the asymptote.
	x := 0.0
	for {
		w := max(nu/2, -x)
		if x-2*w <= xmin {
			break
		}
		segs = append(segs, logSegment{x - w, x, lnf})
		x -= w
	}
	umax := math.Sqrt(x - xmin)
	for u := umax; ; u /= 2 {
		if u < umax*0x1p-30 {
			segs = append(segs, logSegment{0, u, lnu})
			break
		}
		segs = append(segs, logSegment{u / 2, u, lnu})
	}
	return logIntegrate(segs, 1e-10)
}

// logSegment is an integral ∫_a^b exp(lnf(x)) dx.
type logSegment struct {
	a, b float64
	lnf  func(float64) float64
}

// glX, glW are the 12-point Gauss–Legendre nodes and weights on [−1, 1],
// gl6X, gl6W the 6-point ones (gonum integrate/quad).
var (
	glX, glW   = legendre(12)
	gl6X, gl6W = legendre(6)
)

func legendre(n int) ([]float64, []float64) {
	x, w := make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}

// logIntegrate returns ln Σ_s ∫ exp(lnf_s) over the panels segs, to
// relative accuracy rel, by adaptive bisection of 12-point Gauss–Legendre
// panels (a panel is kept when its two halves agree with it within its share
// of the tolerance). The integrand is scaled by exp(−g), g the largest log
// value sampled, so that the scale neither overflows nor underflows.
func logIntegrate(segs []logSegment, rel float64) float64 {
	g := math.Inf(-1)
	for _, s := range segs {
		for _, x := range glX {
			g = max(g, s.lnf((s.a+s.b)/2+(s.b-s.a)/2*x))
		}
	}
	if math.IsInf(g, -1) {
		return g
	}
	for {
		q := scaledGL{g: g, seen: g, budget: 1 << 16}
		whole := make([]float64, len(segs))
		total := 0.0
		for i, s := range segs {
			whole[i] = q.rule(s.lnf, s.a, s.b)
			total += whole[i]
		}
		sum := 0.0
		tol := rel * total / float64(len(segs))
		for i, s := range segs {
			sum += q.adapt(s.lnf, s.a, s.b, whole[i], tol, 50)
		}
		// A peak the first samples missed by more than e^300 would lose
		// precision in the scale: rescale and redo.
		if q.seen <= g+300 {
			return g + math.Log(sum)
		}
		g = q.seen
	}
}

// scaledGL evaluates 12-point Gauss–Legendre panels of exp(lnf − g); budget
// bounds the number of panels, so that rounding noise in lnf cannot make the
// bisection run away (it stops refining, at an accuracy near that noise).
type scaledGL struct {
	g, seen float64
	budget  int
}

func (q *scaledGL) rule(lnf func(float64) float64, a, b float64) float64 {
	q.budget--
	c, h := (a+b)/2, (b-a)/2
	s := 0.0
	for i, x := range glX {
		l := lnf(c + h*x)
		q.seen = max(q.seen, l)
		s += glW[i] * math.Exp(l-q.g)
	}
	return s * h
}

func (q *scaledGL) adapt(lnf func(float64) float64, a, b, whole, tol float64, depth int) float64 {
	m := (a + b) / 2
	l, r := q.rule(lnf, a, m), q.rule(lnf, m, b)
	if depth == 0 || q.budget <= 0 || math.Abs(l+r-whole) <= tol {
		return l + r
	}
	return q.adapt(lnf, a, m, l, tol/2, depth-1) + q.adapt(lnf, m, b, r, tol/2, depth-1)
}

// AveragedTunnelSums returns, on grains g, the grain averages of the number
// of open channels with tunnelling through barrier e,
//
//	N‡(E) = Σ_levels P(E − ε) = ∫ ρ‡(x)·P(E − x) dx,
//
// the convolution of the transition state's density of states (this
// counter, rotors included) with the Eckart transmission probability (Miller,
// J. Am. Chem. Soc. 101, 6810, 1979). E is measured from the reactant's zero
// point and x is the transition state's energy above its own zero point
// (that is, above the barrier top V1), so P is evaluated at the energy
// E − x left in the reaction coordinate. N‡ replaces W‡(E − E0) in k(E); it
// is positive down to the upper asymptote max(0, V1 − V2).
//
// Discretisation: the counted states are point masses n_j at the fine-grain
// nodes jδ (n_j the exact count in [(j−½)δ, (j+½)δ), the comb itself for
// vibrations and electronic levels), and the grain average is
// [C(E⁺) − C(E⁻)]/Δ with C(E) = Σ_j n_j·Pc(E − jδ) and Pc(y) = ∫P up to y,
// tabulated exactly (Gauss–Legendre) at the nodes and interpolated linearly
// between them. When the grain edges are multiples of δ (Δ an even multiple
// of δ, as 10 and 1 cm⁻¹) no interpolation is needed and the grain averages
// are exact for the counted states; otherwise P is in effect averaged over
// each fine bin, a local error of order δ²|P”|. Either way the result is an
// exact convolution of two discrete objects whose Laplace transforms are Q‡
// and ∫P(E)e^(−βE)dE to O((δ/kT)²), so the Boltzmann average of k(E)
// reproduces k∞·κ to O((Δ/kT)²), as without tunnelling. Each edge's sum is
// cut where the rest, bounded by the transmission integral reached times
// the states left, is below 1e-16 of it.
//
// The counter must cover g.Top() − max(0, V1 − V2): deep tunnelling reaches
// transition-state levels up to that energy. AveragedTunnelSums panics if it
// does not, or if e is invalid. Sums beyond the floating-point range are
// +Inf.
func (c *Counter) AveragedTunnelSums(g Grains, e Eckart) []float64 {
	return unscale(c.averagedTunnelSums(g, e, 0), c.scale)
}

// AveragedTunnelSumsFrom is AveragedTunnelSums on a grid whose zero lies
// offset cm⁻¹ below the reactant's zero-point level (the common grid of a
// network of wells, the reactant a well at offset): grain i averages the
// tunnelling sum over [E_i − Δ/2 − offset, E_i + Δ/2 − offset] of the
// reactant's energy scale, 0 below its zero. The counter must cover
// g.Top() − offset − max(0, V1 − V2).
func (c *Counter) AveragedTunnelSumsFrom(g Grains, e Eckart, offset float64) []float64 {
	return unscale(c.averagedTunnelSums(g, e, offset), c.scale)
}

// averagedTunnelSums is AveragedTunnelSumsFrom times 2^−scale.
func (c *Counter) averagedTunnelSums(g Grains, e Eckart, offset float64) []float64 {
	p := e.mustParams("rrkm: AveragedTunnelSums")
	out := make([]float64, g.N)
	top := g.Top() - offset
	if top <= p.emin {
		return out
	}
	d := c.fine
	jmax := int(math.Floor((top-p.emin)/d + 0.5))
	if float64(jmax)*d > c.ceiling+d/2 {
		panic(fmt.Sprintf("rrkm: species %q: tunnelling on grains to %v cm-1 needs states to %v cm-1, counted only to %v cm-1",
			c.species.Name, top, top-p.emin, c.ceiling))
	}
	n := c.fineCounts(jmax)
	s0 := make([]float64, len(n)+1)
	s1 := make([]float64, len(n)+1)
	for j, x := range n {
		s0[j+1] = s0[j] + x
		s1[j+1] = s1[j] + float64(j)*x
	}
	k := newTunnelKernel(&p, d, top)
	w := g.Width
	lo := k.cum(n, s0, s1, -w/2-offset)
	for i := range out {
		hi := k.cum(n, s0, s1, (float64(i)+0.5)*w-offset)
		out[i] = max(0, (hi-lo)/w)
		lo = hi
	}
	return out
}

// fineCounts returns n_j, j = 0..jmax, the states of the counter in
// [(j−½)δ, (j+½)δ) times 2^−scale, rotors included; for quantized degrees
// alone this is the comb itself.
func (c *Counter) fineCounts(jmax int) []float64 {
	n := make([]float64, jmax+1)
	if c.rot == nil {
		copy(n, c.comb)
		return n
	}
	// W((j+½)δ) = B/Γ(D/2+1)·S_{D/2}((j+½)δ), as in Sum.
	p := float64(c.rotDim) / 2
	s := c.rot.atHalfNodes(jmax, p)
	f := c.rotB / math.Gamma(p+1)
	prev := 0.0
	for j := range n {
		w := f * s[j]
		n[j] = w - prev
		prev = w
	}
	return n
}

// tunnelKernel tabulates Pc(mδ) = ∫_{Emin}^{mδ} P(E) dE at the nodes
// m = mlo … mcut, stored in reverse, rev[i] = Pc((mcut − i)δ), so that the
// sums over transition-state states run forwards through both arrays. From
// mcut on P = 1 to rounding (if saturates), and Pc grows linearly.
type tunnelKernel struct {
	d         float64
	mlo, mcut int
	rev       []float64
	saturates bool
}

func newTunnelKernel(p *eckartParams, d, top float64) *tunnelKernel {
	k := &tunnelKernel{d: d, mlo: int(math.Floor(p.emin / d))}
	mtop := int(math.Ceil(top/d)) + 1 // energies in the reaction coordinate stay below top
	var pc []float64                  // Pc at mlo, mlo+1, …
	pc = append(pc, 0)
	sum := 0.0
	k.mcut = mtop
	lnA := math.Inf(-1)
	for m := k.mlo; m < mtop; m++ {
		a, b := max(p.emin, float64(m)*d), float64(m+1)*d
		lnB := p.logP(b)
		sum += p.binIntegral(a, b, lnA, lnB)
		lnA = lnB
		pc = append(pc, sum)
		if float64(m+1)*d > p.v1 && lnB > -0x1p-54 { // 1 − P < 2^−54
			k.mcut, k.saturates = m+1, true
			break
		}
	}
	k.rev = make([]float64, len(pc))
	for i, v := range pc {
		k.rev[len(pc)-1-i] = v
	}
	return k
}

// binIntegral returns ∫_a^b P(E) dE over a fine bin (b − a ≤ δ) by
// Gauss–Legendre quadrature on sub-panels, one per unit change of ln P
// across the bin (lnA, lnB: ln P at a and b), so that the integrand varies
// by at most a factor e on each: 6 points then integrate e^(sx), |s| ≤ 1, to
// 1e-15. Next to the threshold the integral is taken in u = √(E − Emin),
// which removes the square-root onset, with 12 points on sub-panels over
// which 2k·u, the growth of ln P there, changes by at most 1.
func (p *eckartParams) binIntegral(a, b, lnA, lnB float64) float64 {
	panels := func(lo, hi float64, n int, xs, ws []float64, f func(float64) float64) float64 {
		s, h := 0.0, (hi-lo)/float64(n)
		for i := range n {
			c := lo + (float64(i)+0.5)*h
			for k, x := range xs {
				s += ws[k] * f(c+h/2*x)
			}
		}
		return s * h / 2
	}
	if a-p.emin < 4*(b-a) {
		ua, ub := math.Sqrt(a-p.emin), math.Sqrt(b-p.emin)
		n := min(256, 1+int(2*p.k*(ub-ua)))
		return panels(ua, ub, n, glX, glW, func(u float64) float64 { return 2 * u * math.Exp(p.logP(p.emin+u*u)) })
	}
	n := min(256, 1+int(math.Abs(lnB-lnA)))
	return panels(a, b, n, gl6X, gl6W, func(e float64) float64 { return math.Exp(p.logP(e)) })
}

// cum returns C(edge) = Σ_j n_j·Pc(edge − jδ), with Pc interpolated linearly
// between nodes: the integral of N‡ up to edge.
func (k *tunnelKernel) cum(n, s0, s1 []float64, edge float64) float64 {
	d := k.d
	m, phi := split(edge / d)
	if m < k.mlo {
		return 0
	}
	jmax := len(n) - 1
	total := 0.0
	// Saturated part, y = edge − jδ ≥ mcut·δ: Pc = Pc(mcut·δ) + y − mcut·δ.
	j1 := min(m-k.mcut, jmax)
	if k.saturates && j1 >= 0 {
		total = (k.rev[0]+(float64(m-k.mcut)+phi)*d)*s0[j1+1] - d*s1[j1+1]
	}
	// Window, mlo ≤ m − j < mcut: Pc = (1−φ)·Pc[m−j] + φ·Pc[m−j+1], which
	// does not increase with j, so the states left times the current Pc
	// bound what remains.
	jlo := max(0, m-k.mcut+1)
	jhi := min(jmax, m-k.mlo)
	if jhi < jlo {
		return total
	}
	i0 := k.mcut - m + jlo // rev index of Pc[m − jlo]
	nn := n[jlo : jhi+1]
	ra := k.rev[i0 : i0+len(nn)]
	rb := k.rev[i0-1 : i0-1+len(nn)] // Pc[m − j + 1]
	const block = 256
	accA, accB := 0.0, 0.0
	for b := 0; b < len(nn); b += block {
		e := min(b+block, len(nn))
		accA += floats.Dot(nn[b:e], ra[b:e])
		if phi != 0 {
			accB += floats.Dot(nn[b:e], rb[b:e])
		}
		last := (1-phi)*ra[e-1] + phi*rb[e-1]
		if sum := (1-phi)*accA + phi*accB; last*(s0[jhi+1]-s0[jlo+e]) < 1e-16*(total+sum) {
			break
		}
	}
	return total + (1-phi)*accA + phi*accB
}
