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
	// KOnly computes k(T,P) alone: no k0, half-pressure or falloff centre
	// (their fields stay zero), for points that only check fits.
	KOnly bool
	// Progress, if set, is called (from worker goroutines) after each
	// temperature is done.
	Progress func()
	// Slots, if not nil, are the worker slots shared with other runs going
	// on at the same time (a channel with one buffer place per worker,
	// NewSlots): a temperature starts when it takes a place and gives it
	// back when done, so runs sharing the slots never have more than its
	// capacity of temperatures in work together, and one run's last
	// temperatures overlap with the other's instead of leaving workers
	// idle. Jobs is then ignored.
	Slots Slots
}

// Slots are worker places shared by concurrent runs (Options.Slots).
type Slots chan struct{}

// NewSlots returns n worker places (n ≤ 0: GOMAXPROCS).
func NewSlots(n int) Slots {
	if n <= 0 {
		n = runtime.GOMAXPROCS(0)
	}
	return make(Slots, n)
}

// MaxMatrixEntries bounds the banded matrix of one temperature (8 bytes
// an entry, 400 MB a matrix). A worker holds several such matrices at its
// peak (PeakBytes): at this limit about 4.8 GB per worker.
const MaxMatrixEntries = 50_000_000

// PeakBands is the most band matrices of a temperature's size one worker
// holds at once: the kernel's downward probabilities and the collision
// operator (both kept for the whole temperature), the assembled matrix
// (reused from pressure to pressure) and its LDLᵀ factors, the
// low-pressure operator and, while a shift is tried, a second
// factorisation; the eigenvectors and k(E) are single columns beside them.
const PeakBands = 6

// GCHeadroom is the factor by which Go's collector lets the heap grow
// past the live data before it collects (GOGC = 100: twice; the runtime
// package documentation, "Environment Variables").
const GCHeadroom = 2

// PeakBytes returns the peak memory in bytes one worker needs for a
// master equation of the given number of matrix entries (MatrixSize):
// PeakBands matrices of 8-byte entries, with the collector's headroom. N
// workers need N times the largest of their temperatures'.
func PeakBytes(entries float64) float64 { return entries * 8 * PeakBands * GCHeadroom }

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
	// Spectrum is the well's grains as the master equation used them, for
	// figures drawn without counting states again; nil for a well resolved
	// in J.
	Spectrum *Spectrum
}

// Spectrum is one temperature's grains of the well, in ascending energy:
// the grain energies in cm⁻¹, the first channel's k(E) in s⁻¹ (as the
// master equation used it, with any tunnelling or thermal correction), and
// the reactant's states per grain times 2^−Scale (rrkm.Micro.Scale), so the
// density of states is Counts·2^Scale/Width per cm⁻¹. Grains that hold no
// state are left out (see NewWell).
type Spectrum struct {
	E, K, Counts []float64
	Width        float64
	Scale        int
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
	// The temperatures go to the workers in falling order of their cost,
	// the largest grids first (longest-processing-time order, Graham 1969,
	// SIAM J. Appl. Math. 17, 416), so that no worker is left alone with the
	// largest grid at the end; each result lands in its own row, so the
	// order does not change the results.
	run := func(n int, order []int, do func(i int)) { pool(jobs, n, order, do) }
	if opt.Slots != nil {
		run = func(n int, order []int, do func(i int)) { opt.Slots.run(n, order, do) }
	}
	run(len(temps), costOrder(ch, tr, temps, opt.Grain, opt.Ceiling), func(i int) {
		if errs[i] = ctx.Err(); errs[i] != nil {
			return
		}
		res.Rows[i], errs[i] = solveGuarded(ctx, ch, col, tr, temps[i], pressures, opt.Grain, opt.Ceiling, !opt.KOnly)
		if opt.Progress != nil {
			opt.Progress()
		}
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	if !opt.SkipConvergence && len(pressures) > 0 {
		if err := convergence(ctx, ch, col, tr, res, run); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// run is pool on the shared places: do(i) for every i of order (nil:
// 0..n−1), each started on its own goroutine once it holds a place, in
// that order; it returns when all are done.
func (s Slots) run(n int, order []int, do func(i int)) {
	var wg sync.WaitGroup
	for k := range n {
		i := k
		if order != nil {
			i = order[k]
		}
		s <- struct{}{}
		wg.Go(func() {
			defer func() { <-s }()
			do(i)
		})
	}
	wg.Wait()
}

// pool runs do(i) for every i of order (a permutation of 0..n−1, or nil
// for 0..n−1 in turn) on min(jobs, n) goroutines, handing out the indices
// in that order, and returns when all are done.
func pool(jobs, n int, order []int, do func(i int)) {
	var wg sync.WaitGroup
	next := make(chan int)
	for range max(1, min(jobs, n)) {
		wg.Go(func() {
			for i := range next {
				do(i)
			}
		})
	}
	for k := range n {
		i := k
		if order != nil {
			i = order[k]
		}
		next <- i
	}
	close(next)
	wg.Wait()
}

// costOrder returns the indices of temps from the costliest master
// equation to the cheapest. The cost of a temperature is the factorisation
// of its band matrix, about grains × band² = (ceiling/grain)·(16α/grain)²
// (the band reaches KernelReach), estimated with the ceiling E0 + 40 kT
// (within the automatic ceiling's range, CeilingFor) or the one given, and
// the grain GrainFor or the one given; the strong collider costs one grain
// each. It orders the temperatures without building their grids.
func costOrder(ch Channel, tr Transfer, temps []float64, grain, ceiling float64) []int {
	cost := make([]float64, len(temps))
	order := make([]int, len(temps))
	for i, tK := range temps {
		g, c := grain, ceiling
		if g == 0 {
			g = GrainFor(tr, tK)
		}
		if c == 0 {
			c = ch.lowestE0() + 40*units.KT(tK)
		}
		cost[i] = c / g
		if !tr.Strong {
			b := KernelReach(tr.Alpha(tK)) / g
			cost[i] *= b * b
		}
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case cost[a] > cost[b]:
			return -1
		case cost[a] < cost[b]:
			return 1
		}
		return 0
	})
	return order
}

// ErrInternal marks a defect of the program found at run time (a panic in
// a worker), reported as an error rather than a crash.
var ErrInternal = errors.New("collision: internal error")

// solveGuarded is solveTemperature with limits, turning a panic in the
// worker goroutine (which would end the process with no message) into an
// error wrapping ErrInternal that names the temperature.
func solveGuarded(ctx context.Context, ch Channel, col Collider, tr Transfer, tK float64, pressures []float64, grain, ceiling float64, limits bool) (r TemperatureResult, err error) {
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("%w at T = %g K: %v", ErrInternal, tK, p)
		}
	}()
	return solveTemperature(ctx, ch, col, tr, tK, pressures, grain, ceiling, limits)
}

// convergence re-solves the corner points with half the grain and with the
// ceiling 10 kT higher and records in res the largest relative change of k
// and where it was found. The re-solves run on run's workers, the costliest
// (half the grain) first; the changes are then compared in a fixed order,
// so the result does not depend on jobs.
func convergence(ctx context.Context, ch Channel, col Collider, tr Transfer, res *Result, run func(n int, order []int, do func(i int))) error {
	nT, nP := len(res.Temperatures), len(res.Pressures)
	ps := []float64{res.Pressures[0], res.Pressures[nP-1]}
	type check struct {
		it             int
		grain, ceiling float64
		alt            TemperatureResult
		err            error
	}
	var checks []check
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
			checks = append(checks, check{it: it, grain: v.grain, ceiling: v.ceiling})
		}
	}
	order := make([]int, len(checks))
	for i := range order {
		order[i] = i
	}
	// Half the grain costs about eight times the row (grains × band²).
	slices.SortStableFunc(order, func(a, b int) int {
		ha, hb := checks[a].grain < res.Rows[checks[a].it].Grain, checks[b].grain < res.Rows[checks[b].it].Grain
		switch {
		case ha && !hb:
			return -1
		case hb && !ha:
			return 1
		}
		return 0
	})
	run(len(checks), order, func(i int) {
		c := &checks[i]
		c.alt, c.err = solveTemperature(ctx, ch, col, tr, res.Rows[c.it].T, ps, c.grain, c.ceiling, false)
	})
	worst := 0.0
	for _, c := range checks {
		if c.err != nil {
			var pe *PointError
			if errors.As(c.err, &pe) {
				pe.Stage = "convergence check (" + pe.Stage + ")"
			}
			return c.err
		}
		row := res.Rows[c.it]
		for j, k := range c.alt.K {
			base := row.K[0]
			if j == 1 {
				base = row.K[nP-1]
			}
			if d := math.Abs(k/base - 1); d > worst || worst == 0 {
				worst, res.ConvergenceT, res.ConvergenceP = d, row.T, ps[j]
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
	// systems holds each component's last system, whose storage and
	// ω-independent parts the next pressure reuses (buildInto,
	// band.FactorInto).
	systems map[*Well]*system
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
	if !(omega > 0) || math.IsInf(omega, 0) {
		return 0, nil, fmt.Errorf("collision: collision frequency %v s-1 must be positive and finite", omega)
	}
	if p.systems == nil {
		p.systems = map[*Well]*system{}
	}
	sys := buildInto(p.systems[w], w, kernel, omega)
	p.systems[w] = sys
	s, err := sys.eigen()
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
	if len(p.more) == 0 && limits {
		r.Spectrum = &Spectrum{E: w.E, K: w.KC[0], Counts: w.Counts, Width: w.Grain, Scale: w.CountScale}
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
	half := p.halfPressure
	if !halfFromGrid {
		half = p.halfPressureSearch
	}
	omegaC, err := half(r.KInfME, k0, omegas, r.K)
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

// halfTol is the |ln(k/(k∞/2))| at which the half-pressure search stops:
// the slope d ln k/d ln ω is about 0.2 to 0.5 at the half-pressure, so p½
// is then found to a few parts in 1e8 (far below the grain error of k,
// ~1e-3, and the 4 digits it is reported with).
const halfTol = 1e-8

// halfRefineSolves is the most master-equation solves halfPressure spends
// refining the root interpolated from the grid before it falls back on
// the root search.
const halfRefineSolves = 2

// halfFromGrid selects halfPressure; false selects the previous root
// search (halfPressureSearch), which benchmarks time beside it.
var halfFromGrid = true

// halfExtendSolves is the most solves halfPressure spends extending the
// grid toward the half-pressure when the grid's pressures do not straddle
// it, before it falls back on the root search.
const halfExtendSolves = 6

// halfOvershoot stretches each secant step of the extension: upward from
// below the centre g is concave and the secant's root falls short of the
// half-pressure, so a step a fifth longer crosses it once near instead
// of creeping up to it.
const halfOvershoot = 1.2

// halfMaxStep is the longest step in ln ω by which halfPressure extends
// the grid: three decades of pressure.
const halfMaxStep = 3 * math.Ln10

// halfPressure returns the collision frequency where k = kInf/2, the root
// of g(ln ω) = ln(k/k∞) + ln 2, from the grid points (omegas ascending,
// rates ks). When the grid's pressures do not straddle it, the grid is
// first extended from its end by secant steps through the two end points,
// stretched by halfOvershoot (a slope of at least 0.1, steps of at most
// halfMaxStep, at most halfExtendSolves of them); below the falloff
// centre the slope of g steepens toward the low-pressure limit, so a step
// down from the low end overshoots into a bracket. Then the root is
// interpolated from the points around it — the cubic through up to four
// of them in ln ω — and refined by at most halfRefineSolves solves (plus
// halfExtendSolves after an extension, whose points are further apart),
// each at the interpolant's root and then added to its nodes, so that the
// next interpolant is exact beside the root; g rises smoothly in ln ω,
// and ln k is close to a cubic over a decade or so of pressure. If the
// extension or the refinement misses, the root search continues
// (halfPressureSearch, or illinois from the tightest bracket).
func (p *prepared) halfPressure(kInf, k0PerOmega float64, omegas, ks []float64) (float64, error) {
	g := func(lnw float64) (float64, error) {
		k, err := p.rate(math.Exp(lnw))
		return math.Log(k/kInf) + math.Ln2, err
	}
	n := len(ks)
	if n < 2 {
		return p.halfPressureSearch(kInf, k0PerOmega, omegas, ks)
	}
	xs, gs := make([]float64, n, n+halfExtendSolves+halfRefineSolves), make([]float64, n, n+halfExtendSolves+halfRefineSolves)
	for i := range ks {
		xs[i], gs[i] = math.Log(omegas[i]), math.Log(ks[i]/kInf)+math.Ln2
		if i > 0 && !(xs[i] > xs[i-1]) {
			return p.halfPressureSearch(kInf, k0PerOmega, omegas, ks) // not ascending
		}
	}
	j := halfBracket(gs)
	extended := j < 0
	for extend := 0; j < 0; extend++ {
		if extend == halfExtendSolves {
			return p.halfPressureSearch(kInf, k0PerOmega, omegas, ks)
		}
		m := len(xs)
		if gs[0] > 0 { // the whole grid above half: p½ below it
			slope := math.Max((gs[1]-gs[0])/(xs[1]-xs[0]), 0.1)
			x := xs[0] - math.Min(halfOvershoot*gs[0]/slope, halfMaxStep)
			gx, err := g(x)
			if err != nil {
				return 0, err
			}
			if math.Abs(gx) < halfTol {
				return math.Exp(x), nil
			}
			xs, gs = append([]float64{x}, xs...), append([]float64{gx}, gs...)
		} else { // the whole grid below half: p½ above it
			slope := math.Max((gs[m-1]-gs[m-2])/(xs[m-1]-xs[m-2]), 0.1)
			x := xs[m-1] + math.Min(-halfOvershoot*gs[m-1]/slope, halfMaxStep)
			gx, err := g(x)
			if err != nil {
				return 0, err
			}
			if math.Abs(gx) < halfTol {
				return math.Exp(x), nil
			}
			xs, gs = append(xs, x), append(gs, gx)
		}
		j = halfBracket(gs)
	}
	// The interpolation nodes: the bracket's two points and one more on
	// each side where there are any.
	lo, hi := max(0, j-2), min(len(xs), j+2)
	a, b := xs[j-1], xs[j]
	ga, gb := gs[j-1], gs[j]
	if ga == 0 {
		return math.Exp(a), nil
	}
	xs, gs = slices.Clone(xs[lo:hi]), slices.Clone(gs[lo:hi])
	c := lagrangeRoot(xs, gs, a, b)
	refine := halfRefineSolves
	if extended {
		refine += halfExtendSolves // an extended grid: wider spacing, fewer nodes
	}
	for range refine {
		gc, err := g(c)
		if err != nil {
			return 0, err
		}
		if math.Abs(gc) < halfTol {
			return math.Exp(c), nil
		}
		if gc > 0 {
			b, gb = c, gc
		} else {
			a, ga = c, gc
		}
		// The solved point joins the nodes: the interpolant is then
		// exact where the root is, and its root far closer.
		xs, gs = append(xs, c), append(gs, gc)
		c = lagrangeRoot(xs, gs, a, b)
	}
	return p.illinois(g, a, b, ga, gb)
}

// halfBracket returns the first j where g rises through zero from gs[j−1]
// ≤ 0 to gs[j] ≥ 0, or −1.
func halfBracket(gs []float64) int {
	for j := 1; j < len(gs); j++ {
		if gs[j-1] <= 0 && gs[j] >= 0 {
			return j
		}
	}
	return -1
}

// lagrange returns the polynomial through (xs, gs) at x and its slope.
func lagrange(xs, gs []float64, x float64) (v, slope float64) {
	for i := range xs {
		l, dl := 1.0, 0.0
		for m := range xs {
			if m == i {
				continue
			}
			d := xs[i] - xs[m]
			dl = dl*(x-xs[m])/d + l/d
			l *= (x - xs[m]) / d
		}
		v += gs[i] * l
		slope += gs[i] * dl
	}
	return v, slope
}

// lagrangeRoot returns a root in [a, b] of the polynomial through (xs, gs),
// which is ≤ 0 at a and ≥ 0 at b: by bisection, 60 halvings (the bracket
// to 1e-18 of its width; no solve is spent).
func lagrangeRoot(xs, gs []float64, a, b float64) float64 {
	for range 60 {
		m := a + (b-a)/2
		if v, _ := lagrange(xs, gs, m); v > 0 {
			b = m
		} else {
			a = m
		}
	}
	return a + (b-a)/2
}

// halfPressureSearch is the root search for the half-pressure used before
// the interpolation from the grid (and after it, when the grid does not
// straddle the half-pressure or the refinement misses halfTol): false
// position (Illinois variant) in ln ω, from the grid points' bracket when
// they straddle it, otherwise from the Lindemann estimate ω = k∞/(k0/ω),
// widened until it holds. Tests compare halfPressure with it.
func (p *prepared) halfPressureSearch(kInf, k0PerOmega float64, omegas, ks []float64) (float64, error) {
	g := func(lnw float64) (float64, error) {
		k, err := p.rate(math.Exp(lnw))
		return math.Log(k/kInf) + math.Ln2, err
	}
	var a, b, ga, gb float64
	found := false
	gs := make([]float64, len(ks))
	for i, k := range ks {
		gs[i] = math.Log(k/kInf) + math.Ln2
	}
	if j := halfBracket(gs); j > 0 {
		a, b, found = math.Log(omegas[j-1]), math.Log(omegas[j]), true
		ga, gb = gs[j-1], gs[j]
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
	return p.illinois(g, a, b, ga, gb)
}

// illinois finds the root of g in [a, b], g(a) = ga ≤ 0 ≤ gb = g(b), by
// false position with the Illinois modification (Dowell & Jarratt 1971,
// BIT 11, 168), to |g| < 1e-9 or a bracket of 1e-9.
func (p *prepared) illinois(g func(float64) (float64, error), a, b, ga, gb float64) (float64, error) {
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
