package rrkm

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// MaxFineBins bounds the fine-grain array (8 bytes a bin): 5e7 bins is 400 MB,
// the most a count may take. Larger requests fail with ErrTooLarge.
const MaxFineBins = 50_000_000

// ErrTooLarge reports an energy range and fine grain that would not fit in
// memory.
var ErrTooLarge = errors.New("rrkm: state count too large for memory")

// Counter holds the fine-grain count of a species' quantized states
// (vibrations, hindered rotors and electronic levels) and evaluates sums and
// densities with the classical rotors convolved in, at any energy up to its
// ceiling.
type Counter struct {
	species *Species
	fine    float64   // δ, cm⁻¹
	comb    []float64 // comb[j]: states at energy j·δ (quantized degrees only)
	ceiling float64   // cm⁻¹
	rot     *powerSum // nil if the species has no classical rotor
	cum0    []float64 // cum0[j] = Σ_{k<j} comb[k]
	cum1    []float64 // cum1[j] = Σ_{k<j} k·comb[k]
	rotB    float64
	rotDim  int
	// scale is the binary exponent of the stored counts: comb, cum0, cum1
	// and rot hold the true numbers of states times 2^−scale (see
	// combMaxExp). It is 0 unless the counts outgrow float64.
	scale int
}

// The numbers of states of a large molecule outgrow float64 (1.8e308) at the
// energies its thermal distribution reaches: a molecule of 150 atoms passes
// 1e308 states per cm⁻¹ near 7e5 cm⁻¹, which its Boltzmann population
// occupies at 2000–2500 K. The counter therefore keeps its comb times
// 2^−scale, an exact change of unit (a power of two) that every sum, rotor
// convolution and grain count inherits because each is linear in the comb:
// whenever the comb's largest entry could pass 2^combMaxExp it is scaled
// down to 2^combResetExp. Above 2^combMaxExp there is room for what is built
// from the comb: prefix sums Σ j·c_j (at most 2^52 times more over 5e7
// bins), the rotors' block moments (at most 2^130 more) and powers of the
// energy (x^p < 2^200 for x < 1e7 cm⁻¹ and p ≤ 8.5). The scale may grow
// until a state split between two fine bins (whose smaller share is at least
// 1e-9, see split) would leave the normal floating-point range: maxScale.
// A count that needs more (about 2^(maxScale+combMaxExp) ≈ 1e470 states in a
// fine bin) fails with ErrRange.
const (
	combMaxExp   = 600
	combResetExp = 300
	maxScale     = 960
)

// ErrRange reports a number of states beyond what the counter can represent
// (about 1e470, see combMaxExp).
var ErrRange = errors.New("rrkm: number of states beyond the floating-point range")

// MaxLogStates is the natural logarithm of a number of states (about 1e460)
// that a Counter always represents: a count whose largest fine bin stays
// below it never fails with ErrRange, since one step of the count grows an
// entry by less than 2^32 (see rescaler).
const MaxLogStates = (maxScale + combMaxExp - 32) * math.Ln2

// NewCounter counts the quantized states of s on a fine grain of fine cm⁻¹ up
// to ceiling cm⁻¹ by the Beyer–Swinehart algorithm (Beyer & Swinehart 1973),
// with the levels of each hindered rotor (HinderedRotor.Levels, to the
// ceiling) and the electronic levels convolved in as quantized levels (Stein
// & Rabinovitch, J. Chem. Phys. 58, 2438, 1973).
func NewCounter(s *Species, fine, ceiling float64) (*Counter, error) {
	return NewCounterContext(context.Background(), s, fine, ceiling)
}

// NewCounterContext is NewCounter that stops, returning ctx.Err(), when ctx
// is cancelled: it checks between oscillators and between levels, each one
// pass over the fine-grain array (at most MaxFineBins entries, well under a
// second).
func NewCounterContext(ctx context.Context, s *Species, fine, ceiling float64) (*Counter, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if !(fine > 0) || !(ceiling > 0) || math.IsInf(ceiling, 0) {
		return nil, fmt.Errorf("rrkm: species %q: fine grain %v and ceiling %v cm-1 must be positive", s.Name, fine, ceiling)
	}
	for i, v := range s.Vibrations {
		if v < fine {
			return nil, fmt.Errorf("rrkm: species %q: vibrations[%d] = %v cm-1 is below the fine grain %v cm-1; use a finer grain", s.Name, i, v, fine)
		}
	}
	nf := math.Ceil(ceiling/fine) + 2
	if nf > MaxFineBins {
		return nil, fmt.Errorf("%w: species %q: %.3g fine bins of %v cm-1 up to %v cm-1 (at most %d)", ErrTooLarge, s.Name, nf, fine, ceiling, MaxFineBins)
	}
	n := int(nf)
	comb := make([]float64, n)
	comb[0] = 1
	r := rescaler{bound: 1}
	for _, v := range s.Vibrations {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		// One oscillator of n0 ≥ 1 bins multiplies no entry by more than
		// the number of its quanta that fit, (n−1)/n0 + 1.
		if err := r.before(comb, float64(n-1)/math.Max(1, math.Floor(v/fine))+1, s.Name, ceiling); err != nil {
			return nil, err
		}
		addOscillator(comb, v/fine)
	}
	for i, h := range s.Hindered {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		// Levels past the last bin, (n−1)·δ, so that every bin is complete.
		levels, err := h.Levels(float64(n+1) * fine)
		if err != nil {
			return nil, fmt.Errorf("rrkm: species %q: hindered[%d]: %w", s.Name, i, err)
		}
		if err := r.before(comb, totalDegeneracy(levels), s.Name, ceiling); err != nil {
			return nil, err
		}
		if comb, err = convolveLevels(ctx, comb, levels, fine); err != nil {
			return nil, err
		}
	}
	levels := s.levels()
	if err := r.before(comb, totalDegeneracy(levels), s.Name, ceiling); err != nil {
		return nil, err
	}
	comb, err := convolveLevels(ctx, comb, levels, fine)
	if err != nil {
		return nil, err
	}
	c := &Counter{species: s, fine: fine, comb: comb, ceiling: ceiling, scale: r.scale}
	c.cum0 = make([]float64, n+1)
	c.cum1 = make([]float64, n+1)
	for j, x := range comb {
		c.cum0[j+1] = c.cum0[j] + x
		c.cum1[j+1] = c.cum1[j] + float64(j)*x
	}
	c.rotB, c.rotDim = s.rotorFactor()
	if c.rotDim > 0 {
		c.rot = newPowerSum(comb, fine)
	}
	return c, nil
}

// rescaler keeps the comb below 2^combMaxExp while it is built: bound is an
// upper bound on its largest entry, kept from the growth factors of the
// steps, so that the comb is scanned only when the bound could pass the
// limit (never for a small molecule).
type rescaler struct {
	bound float64
	scale int
}

// before prepares the comb for a step that multiplies no entry by more than
// growth: if the bound could then pass 2^combMaxExp, the comb is scanned and,
// if needed, scaled down by a power of two (exact).
func (r *rescaler) before(comb []float64, growth float64, name string, ceiling float64) error {
	if next := r.bound * growth; next < 0x1p600 && !math.IsInf(next, 0) {
		r.bound = next
		return nil
	}
	top := 0.0
	for _, x := range comb {
		top = math.Max(top, x)
	}
	_, e := math.Frexp(top) // top < 2^e
	if g := int(math.Ceil(math.Log2(growth))); e+g > combMaxExp {
		k := min(e-combResetExp, maxScale-r.scale)
		if e-k+g > combMaxExp {
			return fmt.Errorf("%w: species %q: more than 1e%.0f states below %.0f cm-1",
				ErrRange, name, float64(r.scale+e)*math.Log10(2), ceiling)
		}
		for j := range comb {
			comb[j] = math.Ldexp(comb[j], -k)
		}
		r.scale += k
		top = math.Ldexp(top, -k)
	}
	r.bound = top * growth
	return nil
}

// totalDegeneracy is Σ of the levels' degeneracies, the most a convolution
// with them multiplies an entry of the comb by.
func totalDegeneracy(levels []Level) float64 {
	g := 0.0
	for _, l := range levels {
		g += l.Degeneracy
	}
	return math.Max(g, 1)
}

// split returns the grain index n and fraction f of an energy r = x/δ in
// fine grains, rounding fractions within 1e-9 of a grain to it.
func split(r float64) (int, float64) {
	n := math.Floor(r)
	f := r - n
	if f < 1e-9 {
		f = 0
	} else if f > 1-1e-9 {
		n, f = n+1, 0
	}
	return int(n), f
}

// addOscillator adds one harmonic oscillator of frequency r fine grains to the
// comb in place: the Beyer–Swinehart recursion c[j] += c[j−r] for integer r.
// For a fractional r = n+f each quantum is shared between n and n+1 grains
// with weights 1−f and f, which keeps its mean energy exactly.
func addOscillator(c []float64, r float64) {
	if !(r < float64(len(c))) {
		return // a quantum beyond the comb adds no state to it
	}
	n, f := split(r)
	if f == 0 {
		j := n
		if n >= 4 { // as below: four at a time
			for ; j+3 < len(c); j += 4 {
				a := c[j-n : j-n+4 : j-n+4]
				out := c[j : j+4 : j+4]
				out[0] += a[0]
				out[1] += a[1]
				out[2] += a[2]
				out[3] += a[3]
			}
		}
		for ; j < len(c); j++ {
			c[j] += c[j-n]
		}
		return
	}
	g := 1 - f
	c[n] += g * c[0]
	j := n + 1
	// Four grains at a time where the four read no grain the four write
	// (n ≥ 4): the same sums, without the loop's bounds checks and with
	// four independent updates for the processor to overlap.
	if n >= 4 {
		for ; j+3 < len(c); j += 4 {
			a := c[j-n-1 : j-n+4 : j-n+4]
			out := c[j : j+4 : j+4]
			out[0] += g*a[1] + f*a[0]
			out[1] += g*a[2] + f*a[1]
			out[2] += g*a[3] + f*a[2]
			out[3] += g*a[4] + f*a[3]
		}
	}
	for ; j < len(c); j++ {
		c[j] += g*c[j-n] + f*c[j-n-1]
	}
}

// convolveLevels convolves the comb with a list of quantized levels (energies
// in cm⁻¹ above the lowest, with degeneracies), split like addOscillator.
func convolveLevels(ctx context.Context, c []float64, levels []Level, fine float64) ([]float64, error) {
	if len(levels) == 1 && levels[0].Energy == 0 && levels[0].Degeneracy == 1 {
		return c, nil
	}
	out := make([]float64, len(c))
	for _, l := range levels {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if !(l.Energy/fine < float64(len(c))) {
			continue // a level beyond the comb (split's int would overflow)
		}
		n, f := split(l.Energy / fine)
		for j := len(c) - 1; j >= n; j-- {
			x := (1 - f) * c[j-n]
			if f > 0 && j-n-1 >= 0 {
				x += f * c[j-n-1]
			}
			out[j] += l.Degeneracy * x
		}
	}
	return out, nil
}

// Fine returns the fine grain δ in cm⁻¹.
func (c *Counter) Fine() float64 { return c.fine }

// Species returns the species whose states the counter holds.
func (c *Counter) Species() *Species { return c.species }

// Ceiling returns the highest energy in cm⁻¹ the counter covers.
func (c *Counter) Ceiling() float64 { return c.ceiling }

// Comb returns the fine-grain counts of quantized states: element j is the
// number of states at energy j·δ, times 2^−Scale(). The slice is the
// counter's own; do not modify it.
func (c *Counter) Comb() []float64 { return c.comb }

// Scale returns the binary exponent of the counter's stored counts: Comb and
// the Scaled… and Log… methods' linear values are the true numbers times
// 2^−Scale(). It is 0 unless the numbers of states up to the ceiling
// outgrow float64 (a molecule of about 100 atoms or more counted to its
// thermal energies at 2000 K).
func (c *Counter) Scale() int { return c.scale }

// Sum returns the sum of states W(E), the number of states with energy below
// e cm⁻¹ (a state lying exactly at e counts one half), rotors included:
// +Inf beyond the floating-point range (see ScaledSum).
func (c *Counter) Sum(e float64) float64 { return math.Ldexp(c.ScaledSum(e), c.scale) }

// ScaledSum returns W(e)·2^−Scale(), finite for every e up to the ceiling.
func (c *Counter) ScaledSum(e float64) float64 {
	if e <= 0 {
		if e == 0 && c.rot == nil {
			return c.comb[0] / 2
		}
		return 0
	}
	c.check(e)
	if c.rot != nil {
		// W_rot(x) = B·x^(D/2)/Γ(D/2+1).
		p := float64(c.rotDim) / 2
		return c.rotB / math.Gamma(p+1) * c.rot.at(e, p)
	}
	r := e / c.fine
	n, f := split(r)
	if f == 0 {
		return c.cum0[n] + c.comb[n]/2
	}
	return c.cum0[n+1]
}

// LogSum returns ln W(e) (−Inf if W(e) = 0), at any size.
func (c *Counter) LogSum(e float64) float64 {
	return math.Log(c.ScaledSum(e)) + float64(c.scale)*math.Ln2
}

// LogStates returns ln(W(hi) − W(lo)), the natural logarithm of the number
// of states in [lo, hi) (−Inf if there is none), at any size.
func (c *Counter) LogStates(lo, hi float64) float64 {
	return math.Log(c.ScaledSum(hi)-c.ScaledSum(lo)) + float64(c.scale)*math.Ln2
}

// IntegratedSum returns ∫₀^e W(x) dx in cm⁻¹, used for grain averages of W
// (+Inf beyond the floating-point range).
func (c *Counter) IntegratedSum(e float64) float64 {
	return math.Ldexp(c.integratedSum(e), c.scale)
}

// integratedSum is IntegratedSum times 2^−scale.
func (c *Counter) integratedSum(e float64) float64 {
	if e <= 0 {
		return 0
	}
	c.check(e)
	if c.rot != nil {
		p := float64(c.rotDim)/2 + 1
		return c.rotB / math.Gamma(p+1) * c.rot.at(e, p)
	}
	// Σ_{jδ<e} comb[j]·(e − jδ): W is a step function, so its integral is
	// piecewise linear and exact from two prefix sums.
	n, f := split(e / c.fine)
	k := n
	if f > 0 {
		k = n + 1
	}
	return e*c.cum0[k] - c.fine*c.cum1[k]
}

// fracSum returns the Riemann–Liouville integral of order q ≥ 0 of the sum
// of states, I_q(e) = ∫₀^e W(x)·(e − x)^(q−1)/Γ(q) dx, in cm⁻¹^q, times
// 2^−scale: I_0 = W (ScaledSum), I_1 = ∫W (integratedSum). The comb convolved with the rotors'
// W_rot(x) = B·x^(D/2)/Γ(D/2+1) and then with x^(q−1)/Γ(q) is the comb
// convolved with B·x^(D/2+q)/Γ(D/2+q+1) (the Beta integral), so
//
//	I_q(e) = B/Γ(D/2+q+1) · Σ_{jδ<e} c_j·(e − jδ)^(D/2+q),
//
// evaluated by powerSum. ps is the comb's powerSum for a species without
// rotors (nil otherwise); it is passed in so that the Counter, which may be
// shared between goroutines, is never modified.
func (c *Counter) fracSum(e, q float64, ps *powerSum) float64 {
	switch {
	case q == 0:
		return c.ScaledSum(e)
	case q == 1 && c.rot == nil:
		return c.integratedSum(e) // exact from prefix sums
	case e <= 0:
		return 0
	}
	c.check(e)
	if c.rot != nil {
		ps = c.rot
	}
	p := float64(c.rotDim)/2 + q
	// B/Γ(p+1) in log space: Γ(p+1) overflows beyond p ≈ 171 and e^p may
	// overflow while their ratio does not.
	lg, _ := math.Lgamma(p + 1)
	return mulExp(ps.at(e, p), math.Log(c.rotB)-lg)
}

// mulExp returns x·e^l without spurious underflow or overflow of e^l alone:
// if e^l or the product is not a normal number, it is formed as
// ±e^(l + ln|x|). Zero, infinite and NaN x are returned as they are.
func mulExp(x, l float64) float64 {
	if x == 0 || math.IsInf(x, 0) || math.IsNaN(x) {
		return x
	}
	if x < 0 {
		return -mulExp(-x, l)
	}
	f := math.Exp(l)
	if r := x * f; f >= 0x1p-1022 && !math.IsInf(f, 0) && r >= 0x1p-1022 && !math.IsInf(r, 0) {
		return r
	}
	return math.Exp(l + math.Log(x))
}

// combPowerSum returns the powerSum fracSum needs for a species without
// rotors, nil if it needs none.
func (c *Counter) combPowerSum(q float64) *powerSum {
	if c.rot != nil || q == 0 || q == 1 {
		return nil
	}
	return newPowerSum(c.comb, c.fine)
}

func (c *Counter) check(e float64) {
	if e > c.ceiling*(1+1e-12)+c.fine {
		panic(fmt.Sprintf("rrkm: species %q: energy %v cm-1 above the counted ceiling %v cm-1", c.species.Name, e, c.ceiling))
	}
}
