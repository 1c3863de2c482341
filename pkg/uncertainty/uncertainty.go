package uncertainty

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"sync"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Defaults and bounds of Options.
const (
	// DefaultSamples is the number of Monte Carlo samples when Options
	// gives none. With 200 samples the 2.5 and 97.5 % quantiles of a
	// normal ln k carry a standard error of about 0.19σ each (asymptotic
	// variance p(1−p)/(N·φ(z)²), Stuart & Ord, Kendall's Advanced Theory
	// of Statistics, vol. 1, §10.10), so ln f to about ±7 %: enough for a
	// factor. Ask for more for a smoother band.
	DefaultSamples = 200
	// MaxSamples bounds Options.Samples: every sample's grid is kept for
	// the quantiles, 50 MB at this bound on the demo's 16 × 19 grid.
	MaxSamples = 20_000
	// DefaultStep is the relative step h of the central differences:
	// x·e^(±h) for a positive quantity, x ± h·max(|x|, scale) for an
	// energy (scale 1 kcal/mol) or an exponent (scale 1). Central
	// differences err by O(h²), about 1e-6 here; what remains is the
	// master equation's grain, whose edge moves with E0 and whose width
	// follows α: a tenfold smaller step gives coefficients within 2e-4
	// of these (TestSensitivityStep).
	DefaultStep = 1e-3
	// maxRedraws bounds the draws of one value that fall outside its
	// physical range before the run gives up.
	maxRedraws = 1000
)

// Options control Run.
type Options struct {
	// Samples is the number of Monte Carlo samples; 0 means
	// DefaultSamples.
	Samples int
	// Seed seeds the draws: sample i uses a PCG generator seeded with
	// (Seed, i).
	Seed uint64
	// Workers is the number of samples solved at once; 0 means
	// GOMAXPROCS. Results do not depend on it.
	Workers int
	// Step is the relative step of the central differences; 0 means
	// DefaultStep.
	Step float64
	// Job sets the master-equation grain and ceiling (Grain, Ceiling);
	// its other fields are ignored.
	Job job.Options
	// SkipSensitivities skips the central differences.
	SkipSensitivities bool
	// Recount counts the states for every run, even one that changes only
	// the collisions (for the benchmark of the reuse).
	Recount bool
	// Progress, if set, is called (from worker goroutines) after each
	// run: the nominal one, each sample and each step of the differences.
	Progress func()
}

// Runs returns the number of master-equation runs Run makes with these
// options for nInputs uncertain values: the nominal one, the samples and
// two per value for the sensitivities.
func (o Options) Runs(nInputs int) int {
	n := 1 + o.samples()
	if !o.SkipSensitivities {
		n += 2 * nInputs
	}
	return n
}

func (o Options) samples() int {
	if o.Samples == 0 {
		return DefaultSamples
	}
	return o.Samples
}

func (o Options) step() float64 {
	if o.Step == 0 {
		return DefaultStep
	}
	return o.Step
}

// Input describes one uncertain value of a result.
type Input struct {
	Path         string  `json:"path"`
	Quantity     string  `json:"quantity"`
	Distribution string  `json:"distribution"`
	Nominal      float64 `json:"nominal"`
	NominalUnit  string  `json:"nominal_unit"`
	// SD is the standard deviation of the distribution in the measure of
	// the sensitivity: of ln x when Relative, else of x in SensitivityUnit.
	SD       float64 `json:"sd"`
	Relative bool    `json:"relative"`
	// Sensitivity says what the coefficients are: "dln k/dln x" or
	// "dln k/dx per UNIT".
	Sensitivity string `json:"sensitivity"`
	// Collisional says the value changes only the master equation's
	// matrix; its runs keep the nominal state counts.
	Collisional bool `json:"collisional"`
}

// Band is the spread of a rate coefficient over the samples: the median,
// the 2.5 and 97.5 % quantiles and the uncertainty factor
// F = sqrt(High/Low), in the unit of the coefficient.
type Band struct {
	Median float64 `json:"median"`
	Low    float64 `json:"p2.5"`
	High   float64 `json:"p97.5"`
	F      float64 `json:"f"`
}

// Sensitivity holds the local sensitivity coefficients of ln k, ln k∞ and
// ln k0 to one uncertain value (Input.Sensitivity says per what).
type Sensitivity struct {
	Path string      `json:"path"`
	K    [][]float64 `json:"k"` // K[iT][iP]
	KInf []float64   `json:"k_inf"`
	K0   []float64   `json:"k0"`
	// Step is the step taken: in ln x (Relative) or in x in the unit of
	// the coefficients.
	Step float64 `json:"step"`
}

// Share is one value's part of the first-order variance of ln k at a
// point: (S·σ)²/Σ(S_j·σ_j)², with its coefficient S·σ (the change of ln k
// for one standard deviation).
type Share struct {
	Path  string  `json:"path"`
	Share float64 `json:"share"`
	PerSD float64 `json:"dln_k_per_sd"`
}

// Region is a corner or the middle of the grid with the uncertain values
// ranked by their share of the variance of ln k there.
type Region struct {
	Label   string  `json:"region"` // e.g. "low T, high P"
	T       float64 `json:"T_K"`
	P       float64 `json:"P_Pa"`
	Ranking []Share `json:"ranking"`
}

// FactorFit is f(T) = F298·exp(|G·(1/T − 1/298 K)|) fitted (FitFactor) as
// the upper envelope of the largest factor over the pressures at each
// temperature, with F298 ≥ 1 and G ≥ 0. MaxDeviation is the largest factor
// by which the fit lies above those factors; TMin and TMax (K) the range
// fitted.
type FactorFit struct {
	F298         float64 `json:"f298"`
	G            float64 `json:"g_K"`
	MaxDeviation float64 `json:"max_deviation_factor"`
	TMin         float64 `json:"T_min_K"`
	TMax         float64 `json:"T_max_K"`
}

// At returns f(T) at tK.
func (f FactorFit) At(tK float64) float64 {
	return f.F298 * math.Exp(math.Abs(f.G*(1/tK-1/TRef)))
}

// Result is the outcome of Run. Its JSON is the `uncertainty --json`
// contract (docs/uncertainty.md).
type Result struct {
	File     string `json:"file"`
	Reaction string `json:"reaction"`
	KUnits   string `json:"k_units"`
	K0Units  string `json:"k0_units"`
	Seed     uint64 `json:"seed"`
	Samples  int    `json:"samples"`
	// ReusedCounts says whether every sample kept the nominal state
	// counts (only collisional values vary).
	ReusedCounts bool      `json:"state_counts_reused"`
	Temperatures []float64 `json:"temperatures_K"`
	Pressures    []float64 `json:"pressures_Pa"`
	Inputs       []Input   `json:"inputs"`
	// Nominal is the run with every value at the file's.
	Nominal     *job.Limits `json:"-"`
	NominalK    [][]float64 `json:"nominal_k"`
	NominalKInf []float64   `json:"nominal_k_inf"`
	NominalK0   []float64   `json:"nominal_k0"`
	K           [][]Band    `json:"k"` // K[iT][iP]
	KInf        []Band      `json:"k_inf"`
	K0          []Band      `json:"k0"`
	// SDLnK is the standard deviation of ln k over the samples, and
	// LinearSDLnK the first-order estimate sqrt(Σ(S_i·σ_i)²) from the
	// sensitivities (nil without them): the two agree where the spread is
	// small enough for ln k to be linear in the values.
	SDLnK       [][]float64 `json:"sd_ln_k"`
	LinearSDLnK [][]float64 `json:"linear_sd_ln_k,omitempty"`
	// SDLnKInf and SDLnK0 are the standard deviations of ln k∞ and ln k0
	// over the samples.
	SDLnKInf []float64 `json:"sd_ln_k_inf"`
	SDLnK0   []float64 `json:"sd_ln_k0"`
	// FactorT is the largest F over the pressures at each temperature,
	// and Factor its fit.
	FactorT       []float64     `json:"f_max_over_pressures"`
	Factor        FactorFit     `json:"f_fit"`
	Sensitivities []Sensitivity `json:"sensitivities,omitempty"`
	Dominant      []Region      `json:"dominant,omitempty"`
	// Redrawn counts the draws that fell outside their value's physical
	// range and were drawn again.
	Redrawn  int      `json:"redrawn_draws"`
	Warnings []string `json:"warnings"`
}

// run is one master-equation run: the nominal one, a sample, or a step of
// a central difference.
type run struct {
	xs   []float64
	what string // for messages
	lim  *job.Limits
	err  error
}

// Run propagates the uncertain values us of the network's file through the
// master equation (see the package comment). n is the nominal network
// (job.New of the file); us its input.Model.Uncertainty. It stops,
// returning ctx.Err(), when ctx is cancelled. Errors are those of
// job.Network.Solve for the run that failed, wrapped with the sample and
// its values, or a *job.OptionError for opt.
func Run(ctx context.Context, n *job.Network, us []input.Uncertain, opt Options) (*Result, error) {
	if err := checkOptions(opt); err != nil {
		return nil, err
	}
	m := n.Model
	nominal := make([]float64, len(us))
	for i, u := range us {
		nominal[i] = u.Nominal
	}
	counts, err := n.CountStates(ctx, opt.Job)
	if err != nil {
		return nil, err
	}
	ns := opt.samples()
	runs := []*run{{xs: nominal, what: "the nominal run"}}
	redrawn := 0
	for i := range ns {
		xs, r, err := Draw(us, opt.Seed, i)
		if err != nil {
			return nil, err
		}
		redrawn += r
		runs = append(runs, &run{xs: xs, what: fmt.Sprintf("sample %d (%s)", i, describe(us, xs))})
	}
	steps := make([]float64, len(us))
	if !opt.SkipSensitivities {
		for i, u := range us {
			hi, lo, step := stepValues(u, opt.step())
			steps[i] = step
			for _, x := range []float64{hi, lo} {
				xs := slices.Clone(nominal)
				xs[i] = x
				runs = append(runs, &run{xs: xs, what: fmt.Sprintf("the sensitivity to %s (%s)", u.Path, describe(us[i:i+1], xs[i:i+1]))})
			}
		}
	}
	if err := solveAll(ctx, n, counts, us, nominal, runs, opt); err != nil {
		return nil, err
	}

	res := &Result{File: m.File, Reaction: runsReaction(n), KUnits: "s-1", K0Units: "cm3 molecule-1 s-1",
		Seed: opt.Seed, Samples: ns, Temperatures: m.Temperatures, Pressures: m.Pressures,
		Nominal: runs[0].lim, NominalK: runs[0].lim.K, NominalKInf: runs[0].lim.KInf, NominalK0: runs[0].lim.K0,
		Redrawn: redrawn, Warnings: []string{}}
	res.ReusedCounts = !opt.Recount
	for _, u := range us {
		res.Inputs = append(res.Inputs, describeInput(u))
		if !u.Collisional && spread(u) {
			res.ReusedCounts = false
		}
	}
	samples := runs[1 : 1+ns]
	res.bands(samples)
	if !opt.SkipSensitivities {
		res.sensitivities(us, runs[1+ns:], steps)
	}
	res.Factor = FitFactor(res.Temperatures, res.FactorT)
	res.warn(us)
	return res, nil
}

// checkOptions refuses options outside their ranges.
func checkOptions(opt Options) error {
	switch {
	case opt.Samples < 0 || opt.Samples > MaxSamples:
		return &job.OptionError{Option: "samples", Text: fmt.Sprint(opt.Samples), Err: fmt.Errorf("outside 1 to %d", MaxSamples)}
	case opt.Workers < 0:
		return &job.OptionError{Option: "workers", Text: fmt.Sprint(opt.Workers), Err: errors.New("must be 0 (all cores) or positive")}
	case opt.Step < 0 || opt.Step > 0.1 || math.IsNaN(opt.Step):
		return &job.OptionError{Option: "step", Text: fmt.Sprint(opt.Step), Err: errors.New("the relative step of the differences lies in (0, 0.1]")}
	}
	return nil
}

// spread reports whether the value's distribution has a width.
func spread(u input.Uncertain) bool {
	switch u.Dist {
	case input.Normal:
		return u.SD > 0
	case input.LogNormal:
		return u.SDLog > 0
	}
	return u.High > u.Low
}

// runsReaction names the reaction as the rates verb does.
func runsReaction(n *job.Network) string {
	r, _ := n.Model.ReactantAndTS()
	return r.Name + " -> " + strings.Join(n.Model.Reaction.Products, " + ")
}

// Draw returns the values of sample i of a run seeded with seed, in the
// order of us, and how many draws fell outside their value's physical
// range and were drawn again. The numbers depend on (seed, i) alone.
func Draw(us []input.Uncertain, seed uint64, i int) ([]float64, int, error) {
	rng := rand.New(rand.NewPCG(seed, uint64(i)))
	xs := make([]float64, len(us))
	redrawn := 0
	for k := range us {
		u := &us[k]
		for try := 0; ; try++ {
			if try == maxRedraws {
				return nil, 0, &job.NumericalError{Err: fmt.Errorf("uncertainty: %s: %d draws in a row fell outside the physical range of a %s (hint: the distribution lies mostly outside it; give a lognormal factor or a narrower range)",
					u.Path, maxRedraws, u.Quantity)}
			}
			x := draw(u, rng)
			if u.Valid(x) {
				xs[k] = x
				break
			}
			redrawn++
		}
	}
	return xs, redrawn, nil
}

// draw draws one value of u. A distribution of zero width returns the
// nominal value exactly.
func draw(u *input.Uncertain, rng *rand.Rand) float64 {
	switch u.Dist {
	case input.Normal:
		return u.Nominal + u.SD*rng.NormFloat64()
	case input.LogNormal:
		return u.Nominal * math.Exp(u.SDLog*rng.NormFloat64())
	}
	return u.Low + (u.High-u.Low)*rng.Float64()
}

// absoluteScale is the scale of an absolute step: 1 kcal/mol for an
// energy, 1 for an exponent.
func absoluteScale(u input.Uncertain) float64 {
	if u.Quantity == input.TSEnergy {
		return units.Cm1PerKcalPerMol
	}
	return 1
}

// stepValues returns the values x+ and x− of the central difference of u
// with relative step h, and the step between them in the measure of the
// coefficient (ln x+ − ln x−, or (x+ − x−) in u.Unit). An end outside the
// physical range is replaced by the nominal value (a one-sided
// difference), as at a collision efficiency of 1.
func stepValues(u input.Uncertain, h float64) (hi, lo, step float64) {
	x := u.Nominal
	if u.Relative {
		hi, lo = x*math.Exp(h), x*math.Exp(-h)
	} else {
		d := h * math.Max(math.Abs(x), absoluteScale(u))
		hi, lo = x+d, x-d
	}
	if !u.Valid(hi) {
		hi = x
	}
	if !u.Valid(lo) {
		lo = x
	}
	if u.Relative {
		return hi, lo, math.Log(hi / lo)
	}
	return hi, lo, (hi - lo) / u.UnitFactor
}

// describe writes the values of a run for messages, e.g.
// "molecules.TS.energy = 41.3 kcal/mol".
func describe(us []input.Uncertain, xs []float64) string {
	var parts []string
	for i, u := range us {
		in := describeInput(u)
		v := xs[i]
		if in.NominalUnit == u.Unit && u.Unit != "" {
			v /= u.UnitFactor
		}
		s := fmt.Sprintf("%s = %.6g", u.Path, v)
		if in.NominalUnit != "" {
			s += " " + in.NominalUnit
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, ", ")
}

// internalUnits are the units Uncertain values are kept in.
var internalUnits = map[input.Quantity]string{
	input.ImaginaryFreq: "cm-1", input.LJSigma: "angstrom", input.LJEpsilon: "K", input.TorsionBarrier: "cm-1",
	input.Alpha300: "cm-1", input.CollisionRate: "cm3/molecule/s",
}

// describeInput is the Input of u.
func describeInput(u input.Uncertain) Input {
	in := Input{Path: u.Path, Quantity: string(u.Quantity), Distribution: string(u.Dist), Nominal: u.Nominal,
		NominalUnit: internalUnits[u.Quantity], SD: u.SDOf(), Relative: u.Relative, Collisional: u.Collisional,
		Sensitivity: "dln k/dln x"}
	if !u.Relative {
		in.Sensitivity = "dln k/dx"
		if u.Unit != "" {
			in.Sensitivity += " per " + u.Unit
			in.Nominal, in.NominalUnit = u.Nominal/u.UnitFactor, u.Unit
		}
	}
	return in
}

// solveAll solves every run, on opt.Workers goroutines, each run on one.
// A run whose values differ from the nominal ones only in collisional
// values keeps the nominal state counts (unless opt.Recount). On an error
// the others stop; the error of the first run that failed (in the order of
// runs) is returned.
func solveAll(ctx context.Context, n *job.Network, counts *job.StateCounts, us []input.Uncertain, nominal []float64, runs []*run, opt Options) error {
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	jo := job.Options{Grain: opt.Job.Grain, Ceiling: opt.Job.Ceiling, Jobs: 1}
	next := make(chan *run)
	var wg sync.WaitGroup
	for range min(workers, len(runs)) {
		wg.Go(func() {
			for r := range next {
				if r.err = ctx.Err(); r.err != nil {
					continue
				}
				r.lim, r.err = solveOne(ctx, n, counts, us, nominal, r.xs, jo, opt.Recount)
				if r.err != nil {
					cancel()
				}
				if opt.Progress != nil {
					opt.Progress()
				}
			}
		})
	}
	for _, r := range runs {
		next <- r
	}
	close(next)
	wg.Wait()
	var cancelled error
	for _, r := range runs {
		switch {
		case r.err == nil:
		case errors.Is(r.err, context.Canceled) || errors.Is(r.err, context.DeadlineExceeded):
			if cancelled == nil {
				cancelled = r.err
			}
		default:
			return fmt.Errorf("%s: %w", r.what, r.err)
		}
	}
	return cancelled
}

// solveOne solves one run with the values xs: on the nominal network
// itself when xs are the nominal values, else on the network of the
// perturbed model, with the nominal counts when only collisional values
// differ.
func solveOne(ctx context.Context, n *job.Network, counts *job.StateCounts, us []input.Uncertain, nominal, xs []float64, jo job.Options, recount bool) (*job.Limits, error) {
	same, collisional := true, true
	for i, u := range us {
		if xs[i] != nominal[i] {
			same = false
			if !u.Collisional {
				collisional = false
			}
		}
	}
	net := n
	if !same {
		var err error
		if net, err = job.New(n.Model.Perturbed(us, xs)); err != nil {
			return nil, err
		}
	}
	c := counts
	if !collisional || recount {
		c = nil
	}
	return net.Solve(ctx, c, jo)
}

// quantile returns the p-quantile of the sorted values s, interpolated
// linearly between order statistics (Hyndman & Fan 1996, definition 7:
// h = (N−1)p). Equal values give that value exactly.
func quantile(s []float64, p float64) float64 {
	h := float64(len(s)-1) * p
	lo := int(math.Floor(h))
	if lo >= len(s)-1 {
		return s[len(s)-1]
	}
	f := h - float64(lo)
	if f == 0 || s[lo+1] == s[lo] {
		return s[lo]
	}
	return s[lo] + f*(s[lo+1]-s[lo])
}

// bandOf is the Band of the values xs (not changed).
func bandOf(xs []float64) Band {
	s := slices.Clone(xs)
	slices.Sort(s)
	b := Band{Median: quantile(s, 0.5), Low: quantile(s, 0.025), High: quantile(s, 0.975)}
	b.F = math.Sqrt(b.High / b.Low)
	return b
}

// sdLog is the sample standard deviation of ln x (0 for one value). The
// logarithms are taken relative to the first value, which keeps equal
// values at exactly 0 and the sums small.
func sdLog(xs []float64) float64 {
	if len(xs) < 2 {
		return 0
	}
	l0 := math.Log(xs[0])
	mean := 0.0
	for _, x := range xs {
		mean += math.Log(x) - l0
	}
	mean /= float64(len(xs))
	v := 0.0
	for _, x := range xs {
		d := math.Log(x) - l0 - mean
		v += d * d
	}
	return math.Sqrt(v / float64(len(xs)-1))
}

// bands fills the bands, the Monte Carlo spread and the factors of res
// from the samples.
func (res *Result) bands(samples []*run) {
	nT, nP := len(res.Temperatures), len(res.Pressures)
	col := make([]float64, len(samples))
	gather := func(get func(l *job.Limits) float64) []float64 {
		for s, r := range samples {
			col[s] = get(r.lim)
		}
		return col
	}
	res.K = make([][]Band, nT)
	res.SDLnK = make([][]float64, nT)
	res.FactorT = make([]float64, nT)
	for i := range nT {
		res.K[i] = make([]Band, nP)
		res.SDLnK[i] = make([]float64, nP)
		for j := range nP {
			xs := gather(func(l *job.Limits) float64 { return l.K[i][j] })
			res.K[i][j] = bandOf(xs)
			res.SDLnK[i][j] = sdLog(xs)
			res.FactorT[i] = math.Max(res.FactorT[i], res.K[i][j].F)
		}
		kInf := gather(func(l *job.Limits) float64 { return l.KInf[i] })
		res.KInf = append(res.KInf, bandOf(kInf))
		res.SDLnKInf = append(res.SDLnKInf, sdLog(kInf))
		k0 := gather(func(l *job.Limits) float64 { return l.K0[i] })
		res.K0 = append(res.K0, bandOf(k0))
		res.SDLnK0 = append(res.SDLnK0, sdLog(k0))
	}
}

// sensitivities fills the coefficients, the first-order spread and the
// ranking from the runs of the differences (two per value, x+ then x−).
func (res *Result) sensitivities(us []input.Uncertain, runs []*run, steps []float64) {
	nT, nP := len(res.Temperatures), len(res.Pressures)
	d := func(hi, lo, step float64) float64 {
		if step == 0 {
			return 0
		}
		return (math.Log(hi) - math.Log(lo)) / step
	}
	for i, u := range us {
		hi, lo := runs[2*i].lim, runs[2*i+1].lim
		s := Sensitivity{Path: u.Path, Step: steps[i], K: make([][]float64, nT)}
		for t := range nT {
			s.K[t] = make([]float64, nP)
			for p := range nP {
				s.K[t][p] = d(hi.K[t][p], lo.K[t][p], steps[i])
			}
			s.KInf = append(s.KInf, d(hi.KInf[t], lo.KInf[t], steps[i]))
			s.K0 = append(s.K0, d(hi.K0[t], lo.K0[t], steps[i]))
		}
		res.Sensitivities = append(res.Sensitivities, s)
	}
	res.LinearSDLnK = make([][]float64, nT)
	for t := range nT {
		res.LinearSDLnK[t] = make([]float64, nP)
		for p := range nP {
			v := 0.0
			for i := range us {
				x := res.Sensitivities[i].K[t][p] * res.Inputs[i].SD
				v += x * x
			}
			res.LinearSDLnK[t][p] = math.Sqrt(v)
		}
	}
	res.Dominant = res.rank()
}

// rank ranks the values by their share of the first-order variance of
// ln k at the corners and the middle of the grid.
func (res *Result) rank() []Region {
	nT, nP := len(res.Temperatures), len(res.Pressures)
	type end struct {
		i    int
		name string
	}
	ends := func(n int) []end {
		out := []end{{0, "low"}}
		if n > 2 {
			out = append(out, end{n / 2, "middle"})
		}
		if n > 1 {
			out = append(out, end{n - 1, "high"})
		}
		return out
	}
	var out []Region
	for _, t := range ends(nT) {
		for _, p := range ends(nP) {
			r := Region{Label: t.name + " T, " + p.name + " P", T: res.Temperatures[t.i], P: res.Pressures[p.i]}
			total := 0.0
			for i, s := range res.Sensitivities {
				x := s.K[t.i][p.i] * res.Inputs[i].SD
				r.Ranking = append(r.Ranking, Share{Path: s.Path, PerSD: x, Share: x * x})
				total += x * x
			}
			for k := range r.Ranking {
				if total > 0 {
					r.Ranking[k].Share /= total
				}
			}
			slices.SortStableFunc(r.Ranking, func(a, b Share) int {
				switch {
				case a.Share > b.Share:
					return -1
				case a.Share < b.Share:
					return 1
				}
				return 0
			})
			out = append(out, r)
		}
	}
	return out
}

// linearityLimit is the ratio of the Monte Carlo spread of ln k to its
// first-order estimate beyond which Run warns that ln k is not linear in
// the values over their spread (common practice, no source: 30 % is
// well beyond the sampling error of an sd from DefaultSamples samples,
// 1/sqrt(2(N−1)) = 5 %).
const linearityLimit = 0.3

// warn adds the warnings of the run: values that k does not depend on,
// and a Monte Carlo spread far from the first-order one.
func (res *Result) warn(us []input.Uncertain) {
	for i, s := range res.Sensitivities {
		zero := true
		for _, row := range s.K {
			for _, x := range row {
				zero = zero && x == 0
			}
		}
		if zero && spread(us[i]) {
			why := ""
			switch us[i].Quantity {
			case input.ImaginaryFreq:
				why = " (the imaginary frequency enters only through tunnelling)"
			case input.LJSigma, input.LJEpsilon:
				why = " (only the reactant's and the bath gas's parameters enter the collision rate)"
			}
			res.Warnings = append(res.Warnings, fmt.Sprintf("%s: %s: k does not depend on it%s", res.File, s.Path, why))
		}
	}
	if res.LinearSDLnK == nil || res.Samples < 2 {
		return
	}
	worst, wt, wp := 0.0, 0.0, 0.0
	for t, row := range res.SDLnK {
		for p, mc := range row {
			lin := res.LinearSDLnK[t][p]
			if lin == 0 && mc == 0 {
				continue
			}
			if d := math.Abs(mc-lin) / math.Max(mc, lin); d > worst {
				worst, wt, wp = d, res.Temperatures[t], res.Pressures[p]
			}
		}
	}
	if worst > linearityLimit {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%s: the Monte Carlo spread of ln k and its first-order estimate from the sensitivities differ by %.0f %% at %.4g K, %.4g bar: ln k is not linear in the values over their spread there, so the band, not the sensitivities, measures the uncertainty",
			res.File, 100*worst, wt, wp/units.BarPa))
	}
}
