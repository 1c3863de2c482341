package job

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"strings"
	"sync"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Options control Rates. The zero Options run the file as it is: its grids,
// automatic grains and ceilings, the convergence check, the forward
// direction and the default fit tolerance.
type Options struct {
	// Grain and Ceiling override the master-equation grain and ceiling at
	// every temperature (energy-grid.master-equation-grain and
	// energy-grid.ceiling of the file).
	Grain, Ceiling Setting
	// Jobs is the number of worker goroutines over temperatures (and over
	// the fits: the reaction and each channel, and their forms); 0 means
	// GOMAXPROCS. Results do not depend on it.
	Jobs int
	// SkipCheck skips the grain and ceiling convergence check.
	SkipCheck bool
	// Direction is the direction the results are written in; "" means
	// Forward.
	Direction Direction
	// Tolerance is the largest acceptable relative fit error (a fraction;
	// 0 means fit.DefaultTolerance).
	Tolerance float64
	// Progress, if set, is called (from worker goroutines) after each
	// temperature of the master equation.
	Progress func()
	// WorkLimit is the estimated CPU time in seconds (WorkSeconds) beyond
	// which Rates refuses to start; 0 means DefaultWorkLimit.
	WorkLimit float64
	// FreeLimits lets the Troe, SRI and Lindemann fits move k0 and k∞ away
	// from the Arrhenius fits of the computed limits when the broadening
	// alone misses the tolerance (the result then reports how far).
	FreeLimits bool
	// SkipHeldOut skips the held-out points: the master equation solved
	// between the grid's temperatures and pressures, on which every fit's
	// error is measured off the fitted points.
	SkipHeldOut bool
}

// RatesResult is the whole result of Rates: the k(T,P) grid and its limits
// in the chosen direction, the fits, and per channel their shares. Its JSON
// is the `rates --json` contract (docs/output.md).
type RatesResult struct {
	File           string      `json:"file"`
	Reaction       string      `json:"reaction"`
	Direction      string      `json:"direction"` // isomerization, dissociation or recombination
	KUnits         string      `json:"k_units"`
	Temperatures   []float64   `json:"temperatures_K"`
	Pressures      []float64   `json:"pressures_Pa"`
	K              [][]float64 `json:"k"` // K[iT][iP] in KUnits
	KInf           []float64   `json:"k_inf"`
	KInfIntegrated []float64   `json:"k_inf_integrated"`
	K0             []float64   `json:"k0"`
	K0Units        string      `json:"k0_units"`
	CollisionFreq  []float64   `json:"collision_frequency_per_s_per_Pa"`
	CollisionRate  []float64   `json:"collision_rate_constant_cm3_per_molecule_per_s"`
	HalfPressure   []float64   `json:"half_pressure_Pa"`   // p½: k = k∞/2
	PrOne          []float64   `json:"pr_one_pressure_Pa"` // Pr = k0[M]/k∞ = 1, the centre of Troe's curve
	Fcent          []float64   `json:"fcent"`              // k/(k∞/2) at Pr = 1
	// Tunnelling says which tunnelling corrections k, k∞ and k0 include.
	Tunnelling  string    `json:"tunnelling"`
	Grain       []float64 `json:"grain_cm-1"`
	Ceiling     []float64 `json:"ceiling_cm-1"`
	Convergence *float64  `json:"convergence_max_change,omitempty"`
	Transfer    string    `json:"energy_transfer"`
	// Rotation says how the external rotation was treated: every rotation
	// active, or the K rotor active with J adiabatic.
	Rotation       string        `json:"external_rotation"`
	Bath           BathInfo      `json:"bath"`
	PathDegeneracy float64       `json:"path_degeneracy"`
	Fits           *fit.Results  `json:"fits,omitempty"`
	Channels       []ChannelRate `json:"channels,omitempty"`
	// Warnings are the input file's warnings followed by those of the run
	// (NewWarnings).
	Warnings []string `json:"warnings"`
	Caution  string   `json:"caution"`

	// Order is the molecularity of the written direction (1 or 2).
	Order int `json:"-"`
	// Reactants and Products of the written direction, as in mechanism
	// equations.
	Reactants, Products []string `json:"-"`
	// Entries are the mechanism entries: the reaction, or one per channel
	// with competing channels.
	Entries []Entry `json:"-"`
	// HeldOut is k computed by the master equation between the grid
	// points (nil with Options.SkipHeldOut): the fits are measured on it.
	HeldOut *Grid `json:"held_out,omitempty"`
	// Notes are further header lines of the mechanism files, such as an
	// uncertainty run's factor f(T).
	Notes []string `json:"-"`
	// Spectrum is the main channel's k(E) and the reactant's ρ(E) on the
	// grains the master equation used, for figures; nil where they are not
	// the ones Micro and States report (see spectrum).
	Spectrum *Spectrum `json:"-"`

	model      *input.Model
	fileWarned int // how many of Warnings are the input file's
}

// Grid is k on a grid of temperatures and pressures, in the units of the
// result it belongs to; Channels holds each channel's share with competing
// channels.
type Grid struct {
	Temperatures []float64     `json:"temperatures_K"`
	Pressures    []float64     `json:"pressures_Pa"`
	K            [][]float64   `json:"k"`
	Channels     [][][]float64 `json:"channels_k,omitempty"`
}

// table returns the grid as a fit.Table in kUnits: the total k, or channel
// c's share (c ≥ 0); nil for a nil grid.
func (g *Grid) table(c int, kUnits string) *fit.Table {
	if g == nil {
		return nil
	}
	k := g.K
	if c >= 0 {
		if g.Channels == nil {
			return nil
		}
		k = g.Channels[c]
	}
	return fit.FromGrid(g.Temperatures, g.Pressures, k, kUnits)
}

// ChannelRate is one channel's share of the grid (competing channels).
type ChannelRate struct {
	Name           string       `json:"name"`
	Products       []string     `json:"products"`
	K              [][]float64  `json:"k"`
	KInf           []float64    `json:"k_inf"`
	KInfIntegrated []float64    `json:"k_inf_integrated"`
	K0             []float64    `json:"k0"`
	Branching      [][]float64  `json:"branching"`
	Fits           *fit.Results `json:"fits,omitempty"`
}

// Entry is one reaction to write to a mechanism: a channel in its
// direction with its fits.
type Entry struct {
	Label               string
	Reactants, Products []string
	Order               int
	Fits                *fit.Results
	// Note is added to the entry's comment in the mechanism files, and
	// Fields are extra keys of its Cantera YAML entry.
	Note   string
	Fields []export.UserField
}

// NewWarnings returns the warnings of the run itself, after the input
// file's.
func (r *RatesResult) NewWarnings() []string { return r.Warnings[r.fileWarned:] }

// SeparationLimit is the k0/Z above which Rates warns that the reaction is
// not slow beside collisional relaxation. In the low-pressure limit the
// reaction takes k0/Z of all collisions, and the strong collider relaxes
// at the collision rate, so k0/Z > 0.1 means the slowest (chemical) mode
// is less than ten times slower than relaxation: a phenomenological rate
// coefficient presumes that separation of time scales (Bartis & Widom,
// J. Chem. Phys. 60, 3474, 1974; from memory). The factor ten is common
// practice, no source.
const SeparationLimit = 0.1

// convergenceLimit is the change on halving the grain or raising the
// ceiling above which Rates warns.
const convergenceLimit = 0.005

// defaultFits are fitted when the input file names none.
var defaultFits = []fit.FormName{fit.FormTroe, fit.FormPLOG, fit.FormChebyshev}

// Rates runs the whole job on the network: the master equation over the
// file's temperatures and pressures with k∞, k0 and the falloff centre, the
// convergence check, the direction asked for, and the fits (the file's
// forms, or defaultFits) of the reaction and of each channel. It stops,
// returning ctx.Err(), when ctx is cancelled. Errors are *input.FieldError
// (the file), *OptionError (opt), *NumericalError (a failed computation),
// or wrap collision.ErrTooLarge.
func (n *Network) Rates(ctx context.Context, opt Options) (*RatesResult, error) {
	m := n.Model
	if err := n.needPressures("rates"); err != nil {
		return nil, err
	}
	dir := opt.Direction
	if dir == "" {
		dir = Forward
	}
	if dir != Forward && dir != Recombination {
		return nil, &OptionError{Option: "direction", Text: string(dir), Err: errors.New("use forward or recombination")}
	}
	if dir == Recombination {
		if _, err := n.recombinationProducts(); err != nil {
			return nil, err // before the master equation, not after
		}
		if len(n.Channels) > 1 {
			return nil, &OptionError{Option: "direction", Text: string(dir),
				Err: errors.New("the recombination direction is for a single channel; with competing channels write them forward")}
		}
	}
	grain := opt.Grain.or(m.EnergyGrid.MEGrain)
	ceiling := opt.Ceiling.or(m.EnergyGrid.Ceiling)
	if opt.Ceiling.given() && ceiling <= n.highestE0() {
		return nil, opt.Ceiling.optionError("", "not above the threshold %.0f cm-1", n.highestE0())
	}
	if err := n.checkMatrixSize(grain, ceiling, opt.Grain, opt.Ceiling, !opt.SkipCheck); err != nil {
		return nil, err // before counting any states
	}
	if err := n.checkWork(opt); err != nil {
		return nil, err
	}
	well, err := n.masterEquationJobs(ctx, ceiling, opt.Jobs)
	if err != nil {
		return nil, err
	}
	// The points between the grid points are solved at the same time as
	// the grid, on the same worker places (never more temperatures in work
	// than workers), so that neither run's last temperatures leave a
	// worker idle.
	slots := collision.NewSlots(opt.Jobs)
	var held *Grid
	var heldErr error
	heldDone := make(chan struct{})
	heldCtx, cancelHeld := context.WithCancel(ctx)
	defer cancelHeld()
	if opt.SkipHeldOut {
		close(heldDone)
	} else {
		go func() {
			defer close(heldDone)
			held, heldErr = n.heldOut(heldCtx, well, grain, ceiling, slots)
		}()
	}
	res, err := collision.RunContext(ctx, well, n.Collider, n.Transfer, m.Temperatures, m.Pressures,
		collision.Options{Grain: grain, Ceiling: ceiling, SkipConvergence: opt.SkipCheck, Progress: opt.Progress, Slots: slots})
	if err != nil {
		cancelHeld()
	}
	<-heldDone
	switch {
	case errors.Is(err, collision.ErrTooLarge):
		return nil, fmt.Errorf("%s: master equation: %w", m.File, err) // a request too large: bad input
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		return nil, err
	case err != nil:
		return nil, &NumericalError{fmt.Errorf("%s: master equation: %w", m.File, err)}
	}
	out, err := n.forward(res)
	if err != nil {
		return nil, err
	}
	if heldErr != nil {
		return nil, heldErr
	}
	out.HeldOut = held
	if dir == Recombination {
		if err := n.recombine(out); err != nil {
			return nil, err
		}
	}
	if err := n.fitAll(out, opt); err != nil {
		return nil, err
	}
	return out, nil
}

// forward assembles the result of the master equation in the direction
// computed, with the warnings on time-scale separation and convergence.
func (n *Network) forward(res *collision.Result) (*RatesResult, error) {
	m := n.Model
	r := n.reactant()
	out := &RatesResult{File: m.File, Direction: n.forwardName(), KUnits: "s-1", K0Units: "cm3 molecule-1 s-1",
		Reaction:     r.Name + " -> " + strings.Join(m.Reaction.Products, " + "),
		Temperatures: m.Temperatures, Pressures: m.Pressures, K: res.K(), Transfer: n.Transfer.String(), Rotation: n.RotationNote(), Bath: n.Bath,
		PathDegeneracy: n.Main().L, Warnings: append([]string{}, m.Warnings...), Caution: Caution, Tunnelling: n.tunnellingNote(),
		Order: 1, Reactants: []string{r.Name}, Products: m.Reaction.Products,
		model: m, fileWarned: len(m.Warnings)}
	if len(out.Products) == 0 {
		out.Products = []string{r.Name + "-products"}
	}
	for _, row := range res.Rows {
		out.KInf = append(out.KInf, n.KInf(row.T))
		out.KInfIntegrated = append(out.KInfIntegrated, row.KInfME)
		out.K0 = append(out.K0, row.K0)
		out.CollisionRate = append(out.CollisionRate, row.Z)
		out.CollisionFreq = append(out.CollisionFreq, row.Z*collision.Concentration(1, row.T))
		out.HalfPressure = append(out.HalfPressure, row.HalfPressure)
		out.PrOne = append(out.PrOne, row.PrOne)
		out.Fcent = append(out.Fcent, row.Fcent)
		out.Grain = append(out.Grain, row.Grain)
		out.Ceiling = append(out.Ceiling, row.Ceiling)
	}
	if len(n.Channels) > 1 {
		for c, ch := range n.Channels {
			cr := ChannelRate{Name: ch.Label(), Products: ch.Products}
			for _, row := range res.Rows {
				cr.K = append(cr.K, row.KC[c])
				cr.KInf = append(cr.KInf, ch.KInf(&r.Species, row.T))
				cr.KInfIntegrated = append(cr.KInfIntegrated, row.KInfC[c])
				cr.K0 = append(cr.K0, row.K0C[c])
				b := make([]float64, len(row.K))
				for j, k := range row.K {
					b[j] = row.KC[c][j] / k
				}
				cr.Branching = append(cr.Branching, b)
			}
			out.Channels = append(out.Channels, cr)
		}
	}
	out.Spectrum = n.spectrum(res.Rows)
	var poor []string
	worst, worstT := 0.0, 0.0
	for _, row := range res.Rows {
		if f := row.K0 / row.Z; f > SeparationLimit {
			poor = append(poor, num(row.T))
			if f > worst {
				worst, worstT = f, row.T
			}
		}
	}
	if len(poor) > 0 {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%s: at %s K the low-pressure rate is more than %g of the collision rate (k0/Z = %.2g at %s K): "+
			"the reaction is not slow beside collisional relaxation, so k(T,P) there, at low pressure above all, is not a well-defined thermal rate coefficient (hint: treat those temperatures with care, or leave them out of the grid)",
			m.File, strings.Join(poor, ", "), SeparationLimit, worst, num(worstT)))
	}
	if c := res.Convergence; !math.IsNaN(c) {
		out.Convergence = &c
		if c > convergenceLimit {
			out.Warnings = append(out.Warnings, fmt.Sprintf("%s: halving the grain or raising the ceiling by %d kT changes k by %.2g %% (more than %.2g %%) at T = %s K, P = %s bar (hint: set energy-grid.master-equation-grain or --grain smaller, or raise --ceiling)",
				m.File, collision.HeadroomKT, 100*c, 100*convergenceLimit, num(res.ConvergenceT), num(res.ConvergenceP/units.BarPa)))
		}
	}
	if w := n.lowPressureWarning(out); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	for _, xs := range [][]float64{out.KInf, out.KInfIntegrated, out.K0, out.HalfPressure, out.PrOne, out.Fcent} {
		if err := finite("rates", xs...); err != nil {
			return nil, err
		}
	}
	for _, xs := range out.K {
		if err := finite("k", xs...); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// forwardName names the computed direction: isomerization with one
// product, dissociation otherwise.
func (n *Network) forwardName() string {
	if len(n.Model.Reaction.Products) == 1 {
		return "isomerization"
	}
	return "dissociation"
}

// fitAll fits the reaction and, with competing channels, each channel, and
// sets the mechanism entries. The reaction and the channels are fitted
// concurrently (at most opt.Jobs at once), each into its own result.
func (n *Network) fitAll(out *RatesResult, opt Options) error {
	type fitTask struct {
		k               [][]float64
		kInf, k0, fcent []float64
		kUnits          string
		held            *fit.Table
		fits            **fit.Results
		err             error
	}
	// The master equation's broadening at the centre is the total's: the
	// channels' fits start without it.
	tables := []fitTask{{k: out.K, kInf: out.KInfIntegrated, k0: out.K0, fcent: out.Fcent, kUnits: out.KUnits, held: out.HeldOut.table(-1, out.KUnits), fits: &out.Fits}}
	for i := range out.Channels {
		cr := &out.Channels[i]
		tables = append(tables, fitTask{k: cr.K, kInf: cr.KInfIntegrated, k0: cr.K0, kUnits: "s-1", held: out.HeldOut.table(i, "s-1"), fits: &cr.Fits})
	}
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.GOMAXPROCS(0)
	}
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(jobs, len(tables)) {
		wg.Go(func() {
			for i := range next {
				tb := &tables[i]
				*tb.fits, tb.err = n.fit(tb.k, tb.kInf, tb.k0, tb.fcent, tb.kUnits, tb.held, opt)
			}
		})
	}
	for i := range tables {
		next <- i
	}
	close(next)
	wg.Wait()
	for _, tb := range tables {
		if tb.err != nil {
			return tb.err
		}
	}
	out.Entries = []Entry{{Label: out.Reaction, Reactants: out.Reactants, Products: out.Products, Order: out.Order, Fits: out.Fits}}
	if len(out.Channels) > 0 {
		out.Entries = out.Entries[:0]
		r := n.reactant()
		for i := range out.Channels {
			cr := &out.Channels[i]
			prods := cr.Products
			if len(prods) == 0 {
				prods = []string{fmt.Sprintf("%s-products-%d", r.Name, i+1)}
			}
			out.Entries = append(out.Entries, Entry{Label: cr.Name, Reactants: []string{r.Name}, Products: prods, Order: 1, Fits: cr.Fits})
		}
	}
	if out.Fits.Recommended == "" {
		out.Warnings = append(out.Warnings, n.Model.File+": no fitted form meets the tolerance: "+out.Fits.Reason)
	}
	return nil
}

// fit fits the file's forms (or defaultFits) to a k(T,P) grid, with the
// computed limits given to the falloff fits (held unless opt.FreeLimits)
// with the broadening at the centre fcent (nil: none; it places the
// fits' starts, fit.Limits), and held, k at the held-out points (nil:
// none), on which the fits' held-out errors are measured.
func (n *Network) fit(k [][]float64, kInf, k0, fcent []float64, kUnits string, held *fit.Table, opt Options) (*fit.Results, error) {
	m := n.Model
	forms := defaultFits
	if len(m.Fits) > 0 {
		forms = nil
		for _, s := range m.Fits {
			f, err := fit.ParseFormName(s)
			if err != nil {
				return nil, fmt.Errorf("%s: fits: %w", m.File, err) // input.Parse checked the names
			}
			forms = append(forms, f)
		}
	}
	t := fit.FromGrid(m.Temperatures, m.Pressures, k, kUnits)
	fo := fit.Options{Tolerance: opt.Tolerance, Limits: &fit.Limits{K0: k0, KInf: kInf, Free: opt.FreeLimits, Fcent: fcent}, Jobs: opt.Jobs}
	fo.Holdout = held
	res, err := fit.FitAll(t, forms, fo)
	if res == nil {
		return nil, &NumericalError{fmt.Errorf("%s: fitting: %w", m.File, err)}
	}
	return res, nil
}

// KPowers is the number of cm³ molecule⁻¹ factors in the unit of K and
// KInf: 0 for a unimolecular direction (s⁻¹), 1 for a recombination.
func (r *RatesResult) KPowers() int { return r.Order - 1 }

// K0Powers is the number of cm³ molecule⁻¹ factors in the unit of K0.
func (r *RatesResult) K0Powers() int { return r.Order }

// RotationNote says in words how the external rotation is treated.
func (n *Network) RotationNote() string {
	switch n.Model.Reaction.Rotation {
	case input.AdiabaticJ:
		return fmt.Sprintf("K rotor active, J adiabatic (centrifugal thresholds; master equation at %d J of the thermal distribution, J conserved in collisions)", JNodes)
	case input.AdiabaticJAveraged:
		return "K rotor active, J adiabatic (centrifugal thresholds; k(E) averaged over the thermal J distribution)"
	}
	return "all three rotations active"
}

// tunnellingNote says which channels' rates include a tunnelling
// correction: "none", or e.g. "eckart (CH3NC-TS); wigner (TS-2)".
func (n *Network) tunnellingNote() string {
	var parts []string
	for _, c := range n.Channels {
		if c.Tunnelling != "" && c.Tunnelling != input.NoTunnelling {
			parts = append(parts, fmt.Sprintf("%s (%s)", c.Tunnelling, c.Name))
		}
	}
	if len(parts) == 0 {
		return string(input.NoTunnelling)
	}
	return strings.Join(parts, "; ")
}

// lowPressureLimit is the k/(k0[M]) at the lowest pressure below which
// Rates warns that the grid does not reach the low-pressure limit.
const lowPressureLimit = 0.5

// lowPressureWarning warns, for a network with tunnelling, where the lowest
// pressure of the grid is far from the low-pressure limit, so that k0 is
// an extrapolation beyond the grid: k/(k0[M]) < lowPressureLimit there.
// With tunnelling this is the rule rather than the exception: k0 counts as reactive the grains far
// below the barrier whose k(E) is tiny, and only pressures where the
// collision frequency falls below that k(E) approach it.
func (n *Network) lowPressureWarning(out *RatesResult) string {
	if n.tunnellingNote() == string(input.NoTunnelling) {
		// Without tunnelling k0 is the master equation's own limit, reached
		// at pressures the grid may simply not include: nothing to warn.
		return ""
	}
	var worst, worstT float64 = 1, 0
	var at []string
	for i, tK := range out.Temperatures {
		r := out.K[i][0] / (out.K0[i] * collision.Concentration(out.Pressures[0], tK))
		if r < lowPressureLimit {
			at = append(at, num(tK))
			if r < worst {
				worst, worstT = r, tK
			}
		}
	}
	if len(at) == 0 {
		return ""
	}
	why := "with tunnelling k0 counts grains far below the barrier as reactive, and only pressures where collisions are rarer than their tiny k(E) approach it; treat k0 as that formal limit"
	return fmt.Sprintf("%s: at %s K the lowest pressure, %s Pa, is far from the low-pressure limit: k/(k0[M]) = %.2g at %s K, so k0 is an extrapolation beyond the grid (hint: %s)",
		n.Model.File, strings.Join(at, ", "), num(out.Pressures[0]), worst, num(worstT), why)
}

// heldOut solves the master equation at the midpoints between the grid's
// temperatures (in 1/T) and pressures (in log P), where no fit has seen k:
// (nT − 1) × (nP − 1) points, with the grid's grain and ceiling rules and
// without the convergence check. A grid with one temperature or pressure
// has no midpoints in it: nil.
func (n *Network) heldOut(ctx context.Context, well collision.Channel, grain, ceiling float64, slots collision.Slots) (*Grid, error) {
	m := n.Model
	ts, ps := m.Temperatures, m.Pressures
	if len(ts) < 2 || len(ps) < 2 {
		return nil, nil
	}
	g := &Grid{}
	for i := 1; i < len(ts); i++ {
		g.Temperatures = append(g.Temperatures, 2/(1/ts[i-1]+1/ts[i]))
	}
	for j := 1; j < len(ps); j++ {
		g.Pressures = append(g.Pressures, math.Sqrt(ps[j-1]*ps[j]))
	}
	res, err := collision.RunContext(ctx, well, n.Collider, n.Transfer, g.Temperatures, g.Pressures,
		collision.Options{Grain: grain, Ceiling: ceiling, Slots: slots, SkipConvergence: true, KOnly: true})
	switch {
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		return nil, err
	case err != nil:
		return nil, &NumericalError{fmt.Errorf("%s: master equation between the grid points: %w", m.File, err)}
	}
	g.K = res.K()
	if len(n.Channels) > 1 {
		g.Channels = make([][][]float64, len(n.Channels))
		for c := range n.Channels {
			for _, row := range res.Rows {
				g.Channels[c] = append(g.Channels[c], row.KC[c])
			}
		}
	}
	for _, xs := range g.K {
		if err := finite("k between the grid points", xs...); err != nil {
			return nil, err
		}
	}
	return g, nil
}
