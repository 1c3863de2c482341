package collision

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Channel is a reactant and the transition state of its reaction channel,
// with their state counters; the counters must reach CeilingFor's energy at
// the highest temperature of a grid. Competing lists further channels out of
// the same well (their Reactant is ignored): the master equation then has
// several sinks, and results are given per channel as well as in total.
type Channel struct {
	Reactant, TS *rrkm.Counter
	L            float64 // reaction-path degeneracy
	E0           float64 // threshold, cm⁻¹
	Name         string
	// Micro, if set, gives the channel's k(E) on grains at temperature tK
	// in place of RRKM with TS (a tunnelling-corrected or inverse-Laplace
	// channel); TS may then be nil.
	Micro     func(g rrkm.Grains, tK float64) (*rrkm.Micro, error)
	Competing []Channel
	// JWeights, if set on the well's (first) channel, resolves the well in
	// angular momentum: at tK it returns the weights of the well's J
	// components (summing to 1). The master equation is then solved once
	// per component, J conserved, with each channel's k(E) from
	// MicroJ(g, tK, q) (Micro for a channel without MicroJ), and every rate
	// is the weighted sum over the components.
	JWeights func(tK float64) []float64
	MicroJ   func(g rrkm.Grains, tK float64, q int) (*rrkm.Micro, error)
	// JThreshold, if set with JWeights, gives the lowest threshold of J
	// component q at tK (cm⁻¹), on which that component's grid puts a
	// grain edge.
	JThreshold func(tK float64, q int) float64
}

// channels returns the channel and its competitors.
func (ch Channel) channels() []Channel { return append([]Channel{ch}, ch.Competing...) }

// lowestE0 is the lowest threshold of the well's channels.
func (ch Channel) lowestE0() float64 {
	e := ch.E0
	for _, c := range ch.Competing {
		e = math.Min(e, c.E0)
	}
	return e
}

// countedTop is the highest energy every counter of the well reaches, in
// cm⁻¹ above the reactant's zero-point level.
func (ch Channel) countedTop() float64 {
	top := ch.Reactant.Ceiling()
	for _, c := range ch.channels() {
		if c.TS != nil {
			top = math.Min(top, c.TS.Ceiling()+c.E0)
		}
	}
	return top
}

// micro returns the channel's k(E) on grains g at tK.
func (ch Channel) micro(reactant *rrkm.Counter, g rrkm.Grains, tK float64) (*rrkm.Micro, error) {
	if ch.Micro != nil {
		return ch.Micro(g, tK)
	}
	if ch.TS == nil {
		return nil, errors.New("collision: a channel has neither a transition state nor k(E)")
	}
	if top := g.Top(); top-ch.E0 > ch.TS.Ceiling()+ch.TS.Fine() {
		return nil, fmt.Errorf("collision: ceiling %.0f cm-1 above the counted transition-state states (%.0f cm-1)", top, ch.TS.Ceiling()+ch.E0)
	}
	return rrkm.RRKM(reactant, ch.TS, ch.L, g), nil
}

// Options override the automatic energy grid of the master equation.
type Options struct {
	Grain   float64 // grain width in cm⁻¹; 0 = min(α/5, kT/5)
	Ceiling float64 // top of the grid in cm⁻¹; 0 = automatic (CeilingFor)
	Jobs    int     // worker goroutines over temperatures; 0 = GOMAXPROCS
	// SkipConvergence turns off the grain and ceiling convergence check.
	SkipConvergence bool
	// Progress, if set, is called (from worker goroutines) after each
	// temperature is done.
	Progress func()
}

// MaxMatrixEntries bounds the banded matrix (8 bytes an entry, 400 MB).
const MaxMatrixEntries = 50_000_000

// ErrTooLarge reports a master-equation grid that would not fit in memory.
var ErrTooLarge = errors.New("collision: master-equation grid too large for memory")

// tailTol is the relative size below which the Boltzmann tails of the
// reactant and of the transition-state flux W‡(E−E0)e^(−E/kT) are cut.
const tailTol = 1e-10

// CeilingKTMax is the most kT above the threshold an automatic ceiling takes
// for a channel whose thermal distributions end below it (CeilingBound).
const CeilingKTMax = 60

// HeadroomKT is how far, in kT, the convergence check raises the ceiling:
// state counts must reach this far above the largest ceiling a grid uses.
const HeadroomKT = 10

// CeilingBound returns the highest automatic ceiling for one channel at tK:
// E0 + CeilingKTMax·kT, or higher where the reactant's or the transition
// state's thermal distribution extends further (rrkm.Species.ThermalCeiling:
// a large molecule at high temperature holds most of its population far
// above E0). ts is nil for a channel without a transition state. Counters
// built to the largest CeilingBound over a grid's temperatures, plus 10 kT
// (HeadroomKT) for the convergence check, suffice for Run.
func CeilingBound(reactant, ts *rrkm.Species, e0, tK float64) float64 {
	top := math.Max(e0+CeilingKTMax*units.KT(tK), reactant.ThermalCeiling(tK))
	if ts != nil {
		top = math.Max(top, e0+ts.ThermalCeiling(tK))
	}
	return top
}

// CeilingFor returns the automatic energy ceiling at tK: E0 plus the least
// whole number of kT (at least 10, and not beyond CeilingBound) beyond which
// both the reactant's Boltzmann distribution ρ(E)e^(−E/kT) and the
// transition-state flux W‡(E−E0)e^(−E/kT) have fallen below tailTol of their
// maxima. It fails if the counters end before that.
func CeilingFor(ch Channel, tK float64) (float64, error) {
	top := 0.0
	for _, c := range ch.channels() {
		c.Reactant = ch.Reactant
		e, err := c.ceiling(tK)
		if err != nil {
			return 0, err
		}
		top = math.Max(top, e)
	}
	return top, nil
}

// ceiling is CeilingFor for one channel; without a transition-state counter
// only the reactant's tail counts, and at least 30 kT are taken.
func (ch Channel) ceiling(tK float64) (float64, error) {
	kt := units.KT(tK)
	least := 10
	var ts *rrkm.Species
	if ch.TS == nil {
		least = 30
	} else {
		ts = ch.TS.Species()
	}
	most := int(math.Ceil((CeilingBound(ch.Reactant.Species(), ts, ch.E0, tK) - ch.E0) / kt))
	counted := ch.Reactant.Ceiling() - kt/2
	if ch.TS != nil {
		counted = math.Min(counted, ch.TS.Ceiling()+ch.E0)
	}
	gR, gT := math.Inf(-1), math.Inf(-1)
	lnTol := math.Log(tailTol)
	for m := 1; m <= most; m++ {
		x := float64(m) * kt
		e := ch.E0 + x
		if e > counted {
			return 0, fmt.Errorf("collision: at %g K the thermal distribution reaches beyond the counted states (%.0f cm-1) (hint: count states up to CeilingBound, %.0f cm-1)",
				tK, counted, ch.E0+float64(most)*kt)
		}
		// In log space: a large molecule's numbers of states here are
		// beyond the floating-point range (rrkm.Counter.Scale).
		lr := ch.Reactant.LogStates(e-kt/2, e+kt/2) - e/kt
		lt := math.Inf(-1)
		if ch.TS != nil {
			lt = ch.TS.LogSum(x) - x/kt
		}
		gR, gT = math.Max(gR, lr), math.Max(gT, lt)
		if m >= least && lr < gR+lnTol && (ch.TS == nil || lt < gT+lnTol) {
			return e, nil
		}
	}
	return ch.E0 + float64(most)*kt, nil
}

// GrainFor returns the automatic grain at tK: min(α/5, kT/5) for the
// exponential-down model (fine enough to resolve one collision's transfer
// and the Boltzmann factor), kT/5 for the strong collider.
func GrainFor(tr Transfer, tK float64) float64 {
	g := units.KT(tK) / 5
	if !tr.Strong {
		g = math.Min(g, tr.Alpha(tK)/5)
	}
	return g
}

// TemperatureResult is the master-equation result at one temperature.
type TemperatureResult struct {
	T      float64
	K      []float64 // k(T,P) in s⁻¹, one per pressure
	KInfME float64   // Σ F·k on the master-equation grains (the P → ∞ limit)
	K0     float64   // low-pressure limit k0 in cm³ molecule⁻¹ s⁻¹
	Z      float64   // collision rate constant, cm³ molecule⁻¹ s⁻¹
	// HalfPressure is the pressure in Pa where k = KInfME/2 (p½).
	HalfPressure float64
	// PrOne is the pressure in Pa where the reduced pressure
	// Pr = k0[M]/k∞ is 1 (k∞ = KInfME), the centre of Troe's falloff
	// curve, and Fcent = k/(k∞·Pr/(1+Pr)) = 2k/k∞ there: the broadening
	// of the master-equation curve at its centre (Gilbert, Luther & Troe,
	// Ber. Bunsenges. Phys. Chem. 87, 169, 1983).
	PrOne, Fcent float64
	Grain        float64 // cm⁻¹
	Ceiling      float64 // cm⁻¹
	Grains       int
	Band         int
	// Rescaled counts the grains where the kernel's upward probabilities
	// were scaled to keep detailed balance (see ExponentialDown).
	Rescaled int
	// Per channel (in the order of Channel.channels): k(T,P) for each
	// pressure, the high-pressure limit and k0. They sum to K, KInfME and
	// K0; branching fractions are KC[c][j]/K[j].
	KC    [][]float64
	KInfC []float64
	K0C   []float64
}

// Result is a k(T,P) grid.
type Result struct {
	Temperatures []float64 // K
	Pressures    []float64 // Pa
	Rows         []TemperatureResult
	// Convergence is the largest relative change of k found when the grain
	// was halved or the ceiling raised by 10 kT at the check points (the
	// lowest and highest temperature, lowest and highest pressure); NaN if
	// not checked. ConvergenceT (K) and ConvergenceP (Pa) say where.
	Convergence                float64
	ConvergenceT, ConvergenceP float64
}

// K returns k[iT][iP] in s⁻¹.
func (r *Result) K() [][]float64 {
	out := make([][]float64, len(r.Rows))
	for i := range r.Rows {
		out[i] = r.Rows[i].K
	}
	return out
}

// Run solves the master equation at every temperature and pressure. Work is
// spread over Options.Jobs goroutines by temperature; results do not depend
// on their number. A numerical failure is returned as a *PointError.
func Run(ch Channel, col Collider, tr Transfer, temps, pressures []float64, opt Options) (*Result, error) {
	return RunContext(context.Background(), ch, col, tr, temps, pressures, opt)
}

// RunContext is Run that stops early, returning ctx.Err(), when ctx is
// cancelled: between temperatures and between pressures.
func RunContext(ctx context.Context, ch Channel, col Collider, tr Transfer, temps, pressures []float64, opt Options) (*Result, error) {
	if err := tr.validate(); err != nil {
		return nil, err
	}
	res := &Result{Temperatures: temps, Pressures: pressures, Rows: make([]TemperatureResult, len(temps)), Convergence: math.NaN()}
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	errs := make([]error, len(temps))
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(jobs, len(temps)) {
		wg.Go(func() {
			for i := range next {
				if errs[i] = ctx.Err(); errs[i] != nil {
					continue
				}
				res.Rows[i], errs[i] = solveGuarded(ctx, ch, col, tr, temps[i], pressures, opt.Grain, opt.Ceiling)
				if opt.Progress != nil {
					opt.Progress()
				}
			}
		})
	}
	for i := range temps {
		next <- i
	}
	close(next)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	if !opt.SkipConvergence && len(pressures) > 0 {
		if err := convergence(ctx, ch, col, tr, res, opt); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// ErrInternal marks a defect of the program found at run time (a panic in
// a worker), reported as an error rather than a crash.
var ErrInternal = errors.New("collision: internal error")

// solveGuarded is solveTemperature with limits, turning a panic in the
// worker goroutine (which would end the process with no message) into an
// error wrapping ErrInternal that names the temperature.
func solveGuarded(ctx context.Context, ch Channel, col Collider, tr Transfer, tK float64, pressures []float64, grain, ceiling float64) (r TemperatureResult, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("%w at T = %g K: %v", ErrInternal, tK, p)
		}
	}()
	return solveTemperature(ctx, ch, col, tr, tK, pressures, grain, ceiling, true)
}

// convergence re-solves the corner points with half the grain and with the
// ceiling 10 kT higher and records in res the largest relative change of k
// and where it was found.
func convergence(ctx context.Context, ch Channel, col Collider, tr Transfer, res *Result, opt Options) error {
	worst := 0.0
	nT, nP := len(res.Temperatures), len(res.Pressures)
	ps := []float64{res.Pressures[0], res.Pressures[nP-1]}
	for _, it := range []int{0, nT - 1} {
		row := res.Rows[it]
		t := row.T
		for _, v := range []struct{ grain, ceiling float64 }{
			{row.Grain / 2, row.Ceiling},
			{row.Grain, row.Ceiling + HeadroomKT*units.KT(t)},
		} {
			if v.ceiling > ch.countedTop() {
				continue // counters do not reach; the automatic ceiling has headroom
			}
			if v.grain < ch.Reactant.Fine() {
				continue // a grain this close to the fine grain cannot be halved on this count
			}
			alt, err := solveTemperature(ctx, ch, col, tr, t, ps, v.grain, v.ceiling, false)
			if err != nil {
				var pe *PointError
				if errors.As(err, &pe) {
					pe.Stage = "convergence check (" + pe.Stage + ")"
				}
				return err
			}
			for j, k := range alt.K {
				base := row.K[0]
				if j == 1 {
					base = row.K[nP-1]
				}
				if d := math.Abs(k/base - 1); d > worst || worst == 0 {
					worst, res.ConvergenceT, res.ConvergenceP = d, t, ps[j]
				}
			}
		}
	}
	res.Convergence = worst
	return nil
}

// prepared is one temperature's well with its energy-transfer operator.
// A well resolved in J (Channel.JWeights) has further components in more,
// each a well on the same grains with its own k(E); w and kernel are the
// first component, of weight weight.
type prepared struct {
	w      *Well
	kernel *Kernel // nil for the strong collider
	eff    float64
	weight float64
	more   []component
}

// component is one J component of a well.
type component struct {
	w      *Well
	kernel *Kernel
	weight float64
}

// components returns every component of p, the first included.
func (p *prepared) components() []component {
	return append([]component{{p.w, p.kernel, p.weight}}, p.more...)
}

// kInf is the high-pressure limit on the grid, Σ weight·Σ F·k.
func (p *prepared) kInf() float64 {
	s := 0.0
	for _, c := range p.components() {
		s += c.weight * c.w.KInf()
	}
	return s
}

// edgeGrain returns grain moved so that a grain edge falls on the (lowest)
// threshold e0, so that every grain is wholly below or wholly above it:
// otherwise the grain across E0 reacts as a whole in the low-pressure limit,
// a first-order grain error.
func edgeGrain(grain, e0 float64) float64 {
	if n := math.Round(e0/grain - 0.5); n >= 1 {
		return e0 / (n + 0.5)
	}
	return grain
}

// matrixEntries is the number of stored entries of the master equation on
// grains g at tK: the banded kernel's grains × band for exponential-down (the
// band reaching where exp(−ΔE/α) falls below bandTolerance), one per grain
// for the strong collider.
func matrixEntries(tr Transfer, tK float64, g rrkm.Grains) float64 {
	if tr.Strong {
		return float64(g.N)
	}
	return float64(g.N) * math.Ceil(tr.Alpha(tK)*-math.Log(bandTolerance)/g.Width+1)
}

// MatrixSize returns the grains and the number of matrix entries (8 bytes
// each; Run refuses more than MaxMatrixEntries) of the master equation at tK
// with grain and ceiling in cm⁻¹ (grain 0: automatic, GrainFor), the grain
// moved as Run moves it so that an edge falls on the lowest threshold e0. It
// lets a caller check a request before counting any states; for an automatic
// ceiling pass its largest value, e0 + CeilingKTMax·kT.
func MatrixSize(tr Transfer, tK, grain, ceiling, e0 float64) (rrkm.Grains, float64) {
	if grain == 0 {
		grain = GrainFor(tr, tK)
	}
	g := rrkm.GrainsTo(edgeGrain(grain, e0), ceiling)
	return g, matrixEntries(tr, tK, g)
}

func prepare(ch Channel, tr Transfer, tK, grain, ceiling float64) (*prepared, error) {
	if grain == 0 {
		grain = GrainFor(tr, tK)
	}
	if ceiling == 0 {
		var err error
		if ceiling, err = CeilingFor(ch, tK); err != nil {
			return nil, err
		}
	}
	weights := []float64{1}
	if ch.JWeights != nil {
		weights = ch.JWeights(tK)
	}
	var parts []component
	base := grain
	for q, wq := range weights {
		// Each J component's grid puts a grain edge on its own lowest
		// threshold, so that no grain straddles it (edgeGrain).
		e0 := ch.lowestE0()
		if ch.JWeights != nil && ch.JThreshold != nil {
			e0 = ch.JThreshold(tK, q)
		}
		g, err := grid(ch, tr, tK, base, ceiling, e0)
		if err != nil {
			return nil, err
		}
		var kc [][]float64 // k(E) per channel on the grains g
		var total *rrkm.Micro
		for _, c := range ch.channels() {
			var m *rrkm.Micro
			var err error
			if ch.JWeights != nil && c.MicroJ != nil {
				m, err = c.MicroJ(g, tK, q)
			} else {
				m, err = c.micro(ch.Reactant, g, tK)
			}
			if err != nil {
				return nil, err
			}
			if len(m.K) != g.N {
				return nil, fmt.Errorf("collision: channel %q gives k(E) on %d grains, want %d", c.Name, len(m.K), g.N)
			}
			kc = append(kc, m.K)
			if total == nil {
				cp := *m
				cp.K = append([]float64(nil), m.K...)
				total = &cp
			} else {
				for i, k := range m.K {
					total.K[i] += k
				}
			}
		}
		w := NewWell(total, ch.Reactant, tK)
		w.E0 = e0
		w.KC = make([][]float64, len(kc))
		for c, ks := range kc {
			w.KC[c] = make([]float64, w.N())
			for i, gi := range w.Index {
				w.KC[c][i] = ks[gi]
			}
		}
		if w.N() < 2 || w.belowFloor() == 0 {
			return nil, fmt.Errorf("collision: the grid (%d grains of %.3g cm-1) has no grain below the threshold", w.N(), g.Width)
		}
		part := component{w: w, weight: wq}
		if !tr.Strong {
			// The kernel depends on the grains and their Boltzmann weights
			// only, the same in every J component.
			if len(parts) > 0 && parts[0].w.Grain == w.Grain && slices.Equal(parts[0].w.Index, w.Index) {
				part.kernel = parts[0].kernel
			} else {
				k, err := ExponentialDown(w, tr.Alpha(tK))
				if err != nil {
					return nil, err
				}
				part.kernel = k
			}
		}
		parts = append(parts, part)
	}
	p := &prepared{w: parts[0].w, kernel: parts[0].kernel, weight: parts[0].weight, more: parts[1:], eff: tr.efficiency()}
	return p, nil
}

// grid returns the grains of width near grain, up to ceiling, with an edge
// on the threshold e0, after checking them against the counted states and
// the matrix limit.
func grid(ch Channel, tr Transfer, tK, grain, ceiling, e0 float64) (rrkm.Grains, error) {
	grain = edgeGrain(grain, e0)
	if grain < ch.Reactant.Fine() {
		return rrkm.Grains{}, fmt.Errorf("collision: grain %.3g cm-1 is below the fine counting grain %g cm-1 (hint: a smaller fine-grain, or a larger grain)", grain, ch.Reactant.Fine())
	}
	g := rrkm.GrainsTo(grain, ceiling)
	if top := g.Top(); top > ch.Reactant.Ceiling()+ch.Reactant.Fine() {
		return rrkm.Grains{}, fmt.Errorf("collision: ceiling %.0f cm-1 above the counted states (%.0f cm-1)", top, ch.Reactant.Ceiling())
	}
	if matrixEntries(tr, tK, g) > MaxMatrixEntries {
		if tr.Strong {
			return rrkm.Grains{}, fmt.Errorf("%w: %d grains", ErrTooLarge, g.N)
		}
		return rrkm.Grains{}, fmt.Errorf("%w: %d grains of %.3g cm-1 with α = %.3g cm-1 (hint: a larger grain or a lower ceiling)", ErrTooLarge, g.N, grain, tr.Alpha(tK))
	}
	return g, nil
}

// rate returns k_uni at collision frequency omega (s⁻¹, before efficiency).
func (p *prepared) rate(omega float64) (float64, error) {
	k, _, err := p.rates(omega)
	return k, err
}

// rates returns k_uni and its share per channel: the flux identity applied
// to each channel's k(E) with the same slowest mode, so the shares sum to the
// total; for a well resolved in J, the weighted sums over its components.
func (p *prepared) rates(omega float64) (float64, []float64, error) {
	return p.sum(func(w *Well, kernel *Kernel) (float64, []float64, error) { return p.rates1(w, kernel, omega) })
}

// sum returns f of the single component, or f's weighted sum over the J
// components of a well resolved in J.
func (p *prepared) sum(f func(w *Well, kernel *Kernel) (float64, []float64, error)) (float64, []float64, error) {
	if len(p.more) == 0 {
		return f(p.w, p.kernel)
	}
	k := 0.0
	var kc []float64
	for _, c := range p.components() {
		kq, kcq, err := f(c.w, c.kernel)
		if err != nil {
			return 0, nil, err
		}
		k += c.weight * kq
		if kc == nil {
			kc = make([]float64, len(kcq))
		}
		for i := range kcq {
			kc[i] += c.weight * kcq[i]
		}
	}
	return k, kc, nil
}

// rates1 is rates for one component.
func (p *prepared) rates1(w *Well, kernel *Kernel, omega float64) (float64, []float64, error) {
	kc := make([]float64, len(w.KC))
	if kernel == nil {
		om := p.eff * omega
		lambda := w.StrongCollider(om)
		for i, n := range w.StrongColliderPopulation(om, lambda) {
			for c := range kc {
				kc[c] += w.KC[c][i] * n
			}
		}
		return lambda, kc, nil
	}
	s, err := w.Solve(kernel, omega)
	if err != nil {
		return 0, nil, err
	}
	for c := range kc {
		for i, n := range s.Population {
			kc[c] += w.KC[c][i] * n
		}
	}
	return s.K, kc, nil
}

// k0PerOmega returns the low-pressure limit of k_uni/ω and its share per
// channel: in that limit a molecule that reaches a reactive grain reacts
// there, by channel c with probability k_c(E)/k(E).
func (p *prepared) k0PerOmega() (float64, []float64, error) {
	return p.sum(p.k0PerOmega1)
}

// k0PerOmega1 is k0PerOmega for one component.
func (p *prepared) k0PerOmega1(w *Well, kernel *Kernel) (float64, []float64, error) {
	kc := make([]float64, len(w.KC))
	if kernel == nil {
		for i := w.belowFloor(); i < w.N(); i++ {
			if k := w.K[i]; k > 0 {
				for c := range kc {
					kc[c] += p.eff * w.F[i] * w.KC[c][i] / k
				}
			}
		}
		return p.eff * w.StrongColliderK0(), kc, nil
	}
	s, err := w.LowPressure(kernel)
	if err != nil {
		return 0, nil, err
	}
	nk := len(s.Population)
	for i, n := range s.Population {
		for m := nk; m < min(w.N(), i+kernel.Band+1); m++ {
			if w.K[m] == 0 {
				continue
			}
			pm := kernel.At(m, i) * n
			for c := range kc {
				kc[c] += pm * w.KC[c][m] / w.K[m]
			}
		}
	}
	return s.K, kc, nil
}

// solveTemperature solves the grid pressures at tK and, with limits, k0,
// the half-pressure and the falloff centre (Pr = 1, Fcent). Failures are
// *PointError (or ctx.Err()); results are checked against the limits of
// the theory before they are returned.
func solveTemperature(ctx context.Context, ch Channel, col Collider, tr Transfer, tK float64, pressures []float64, grain, ceiling float64, limits bool) (TemperatureResult, error) {
	fail := func(pPa float64, stage string, err error) (TemperatureResult, error) {
		if errors.Is(err, ErrTooLarge) || errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return TemperatureResult{}, err
		}
		return TemperatureResult{}, &PointError{T: tK, P: pPa, Stage: stage, Err: err}
	}
	p, err := prepare(ch, tr, tK, grain, ceiling)
	if err != nil {
		return fail(0, "energy grid", err)
	}
	w := p.w
	for _, cp := range p.components() {
		for i, k := range cp.w.K {
			if !(k >= 0) || math.IsInf(k, 0) {
				return fail(0, "k(E)", fmt.Errorf("k(E) = %v s-1 at E = %.6g cm-1: %w", k, cp.w.E[i], errNotFinite))
			}
		}
	}
	z := col.Z(tK)
	r := TemperatureResult{T: tK, K: make([]float64, len(pressures)), Z: z,
		KInfME: p.kInf(), Grain: w.Grain, Ceiling: w.E[w.N()-1] + w.Grain/2, Grains: w.N(),
		KC: make([][]float64, len(w.KC)), KInfC: make([]float64, len(w.KC))}
	for c := range w.KC {
		r.KC[c] = make([]float64, len(pressures))
		for _, cp := range p.components() {
			for i, f := range cp.w.F {
				r.KInfC[c] += cp.weight * f * cp.w.KC[c][i]
			}
		}
	}
	if p.kernel != nil {
		r.Band, r.Rescaled = p.kernel.Band, p.kernel.Rescaled
	}
	if !(z > 0) || math.IsInf(z, 0) {
		return fail(0, "collision rate", fmt.Errorf("collision rate constant %v cm3/molecule/s: %w", z, errNotFinite))
	}
	omegas := make([]float64, len(pressures))
	for j, pr := range pressures {
		if err := ctx.Err(); err != nil {
			return TemperatureResult{}, err
		}
		omegas[j] = z * Concentration(pr, tK)
		k, kc, err := p.rates(omegas[j])
		if err != nil {
			return fail(pr, "k(T,P)", err)
		}
		if err := checkRate(k, r.KInfME, r.K[:j], pressures[:j+1]); err != nil {
			return fail(pr, "k(T,P)", err)
		}
		r.K[j] = k
		for c := range kc {
			r.KC[c][j] = kc[c]
		}
	}
	if !limits {
		return r, nil
	}
	k0, k0c, err := p.k0PerOmega()
	if err == nil && (!(k0 > 0) || math.IsInf(k0, 0)) {
		err = fmt.Errorf("k0/ω = %v: %w", k0, errNotFinite)
	}
	if err != nil {
		return fail(0, "low-pressure limit", err)
	}
	r.K0 = k0 * z
	for _, x := range k0c {
		r.K0C = append(r.K0C, x*z)
	}
	omegaC, err := p.halfPressure(r.KInfME, k0, omegas, r.K)
	if err != nil {
		return fail(0, "half-pressure (k = k∞/2)", err)
	}
	r.HalfPressure = omegaC / z * units.Boltzmann * tK * 1e6
	// At Pr = 1, [M] = k∞/k0, so ω = z·k∞/k0 = k∞/(k0/ω).
	omega1 := r.KInfME / k0
	k1, err := p.rate(omega1)
	if err == nil && !(k1 > 0) {
		err = fmt.Errorf("k = %v at Pr = 1: %w", k1, errNotFinite)
	}
	if err != nil {
		return fail(omega1/z*units.Boltzmann*tK*1e6, "falloff centre (Pr = 1)", err)
	}
	r.PrOne = omega1 / z * units.Boltzmann * tK * 1e6
	r.Fcent = 2 * k1 / r.KInfME
	return r, nil
}

// limitTol is the relative excess over k∞, or fall with rising pressure,
// at which a computed k counts as broken: far above rounding (the sweep
// test finds ≤ 1e-9), far below any grain error.
const limitTol = 1e-6

// checkRate reports a k(T,P) that is not finite and positive, lies above
// the high-pressure limit kInf on the same grains, or falls below the rate
// at a lower pressure (prev are the rates at the earlier pressures ps).
func checkRate(k, kInf float64, prev, ps []float64) error {
	switch {
	case !(k > 0) || math.IsInf(k, 0):
		return fmt.Errorf("k = %v s-1: %w", k, errNotFinite)
	case k > kInf*(1+limitTol):
		return fmt.Errorf("k = %.6g s-1 above the high-pressure limit %.6g s-1: %w", k, kInf, errUnphysical)
	}
	if j := len(prev); j > 0 && ps[j] > ps[j-1] && k < prev[j-1]*(1-limitTol) {
		return fmt.Errorf("k = %.6g s-1 below %.6g s-1 at the lower pressure %.4g Pa: %w", k, prev[j-1], ps[j-1], errUnphysical)
	}
	return nil
}

// halfPressure returns the collision frequency where k = kInf/2, by false position
// (Illinois variant) in ln ω. The bracket comes from the grid points when
// they straddle it, otherwise from the Lindemann estimate
// ω = k∞/(k0/ω), widened until it holds.
func (p *prepared) halfPressure(kInf, k0PerOmega float64, omegas, ks []float64) (float64, error) {
	g := func(lnw float64) (float64, error) {
		k, err := p.rate(math.Exp(lnw))
		return math.Log(k/kInf) + math.Ln2, err
	}
	var a, b, ga, gb float64
	found := false
	for j := 1; j < len(ks); j++ {
		lo, hi := math.Log(ks[j-1]/kInf)+math.Ln2, math.Log(ks[j]/kInf)+math.Ln2
		if lo <= 0 && hi >= 0 {
			a, b, ga, gb, found = math.Log(omegas[j-1]), math.Log(omegas[j]), lo, hi, true
			break
		}
	}
	if !found {
		guess := math.Log(kInf / k0PerOmega)
		a, b = guess-math.Log(10), guess+math.Log(1e4)
		var err error
		if ga, err = g(a); err != nil {
			return 0, err
		}
		if gb, err = g(b); err != nil {
			return 0, err
		}
		for n := 0; ga > 0 || gb < 0; n++ {
			if n > 20 {
				return 0, errors.New("collision: half-pressure (k = k∞/2) not bracketed")
			}
			if ga > 0 {
				a -= math.Log(100)
				if ga, err = g(a); err != nil {
					return 0, err
				}
			} else {
				b += math.Log(100)
				if gb, err = g(b); err != nil {
					return 0, err
				}
			}
		}
	}
	side := 0
	for range 100 {
		if ga == 0 {
			return math.Exp(a), nil
		}
		c := b - gb*(b-a)/(gb-ga)
		gc, err := g(c)
		if err != nil {
			return 0, err
		}
		if math.Abs(gc) < 1e-9 || b-a < 1e-9 {
			return math.Exp(c), nil
		}
		if gc > 0 {
			b, gb = c, gc
			if side == 1 {
				ga /= 2
			}
			side = 1
		} else {
			a, ga = c, gc
			if side == -1 {
				gb /= 2
			}
			side = -1
		}
	}
	return 0, errors.New("collision: half-pressure (k = k∞/2) did not converge")
}
