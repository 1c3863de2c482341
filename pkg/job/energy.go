package job

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// This file holds the rules of the energy grids, each in one place:
//
//   - the automatic ceiling: AutoCeiling (collision.CeilingBound over the
//     channels), the top of states/micro reports and the largest ceiling
//     the master equation may pick (collision.CeilingFor picks the actual
//     one per temperature, where the thermal tails end);
//   - the headroom above it: collision.HeadroomKT, for the convergence
//     check, in CountTop;
//   - the master-equation grain: collision.GrainFor, moved onto E0 as
//     collision.MatrixSize does;
//   - the memory estimates: checkCountSize and checkMatrixSize, applied by
//     New with the file's settings and by each calculation with its own;
//     with them, checkCountRange, whether the numbers of states stay within
//     what rrkm's scaled counts hold (rrkm.MaxLogStates).

// Setting is an energy given outside the input file, such as a
// command-line option, with the text the user wrote, for messages. The zero
// Setting means "not given": the file's value (or the automatic one) holds.
type Setting struct {
	Cm1    float64 // the value in cm⁻¹
	Option string  // its name as the user knows it, e.g. "--grain"
	Text   string  // the value as written, e.g. "50 cm-1"
}

// given reports whether the setting was given.
func (s Setting) given() bool { return s.Option != "" || s.Cm1 != 0 }

// or returns the setting's value, or def if it was not given.
func (s Setting) or(def float64) float64 {
	if s.given() {
		return s.Cm1
	}
	return def
}

// optionError is an OptionError about s.
func (s Setting) optionError(hint, format string, a ...any) *OptionError {
	return &OptionError{Option: s.Option, Text: s.Text, Err: fmt.Errorf(format, a...), Hint: hint}
}

// bytesPerEntry is the size of one float64 of a state count or the matrix.
const bytesPerEntry = 8

// AutoCeiling returns the automatic energy ceiling at tK in cm⁻¹: the
// largest collision.CeilingBound over the channels (E0 + 60 kT, or higher
// where a large molecule's thermal distribution reaches further). The
// master equation picks its ceiling at or below it; states and micro report
// up to it at the highest temperature.
func (n *Network) AutoCeiling(tK float64) float64 {
	top := 0.0
	for _, c := range n.Channels {
		var ts *rrkm.Species
		if c.TS != nil {
			ts = &c.TS.Species
		}
		top = math.Max(top, collision.CeilingBound(&n.reactant().Species, ts, c.E0, tK))
	}
	return top
}

// CountTop returns the energy in cm⁻¹ up to which the states of the well
// are counted for the master equation: the ceiling (0: AutoCeiling) at the
// highest temperature plus the collision.HeadroomKT the convergence check
// may add. It is the highest any calculation counts to with that ceiling.
func (n *Network) CountTop(ceiling float64) float64 {
	ts := n.Model.Temperatures
	return n.countTopAt(ceiling, ts[len(ts)-1])
}

func (n *Network) countTopAt(ceiling, tK float64) float64 {
	if ceiling <= 0 {
		ceiling = n.AutoCeiling(tK)
	}
	return ceiling + collision.HeadroomKT*units.KT(tK)
}

// lowestE0 is the lowest threshold of the channels, cm⁻¹.
func (n *Network) lowestE0() float64 {
	e := math.Inf(1)
	for _, c := range n.Channels {
		e = math.Min(e, c.E0)
	}
	return e
}

// highestE0 is the highest threshold of the channels, cm⁻¹.
func (n *Network) highestE0() float64 {
	e := math.Inf(-1)
	for _, c := range n.Channels {
		e = math.Max(e, c.E0)
	}
	return e
}

// fineBins is the length of the fine-grain arrays of a state count up to top
// cm⁻¹ (as rrkm.NewCounter sizes them).
func fineBins(fine, top float64) float64 { return math.Ceil(top/fine) + 2 }

// checkCountSize refuses a state count that rrkm.NewCounter would refuse
// (more than rrkm.MaxFineBins bins), naming the field that makes it large:
// energy-grid.fine-grain if the default fine grain would fit, else
// energy-grid.ceiling if the automatic ceiling would fit, else the highest
// temperature.
func (n *Network) checkCountSize() error {
	m := n.Model
	g := m.EnergyGrid
	top := n.CountTop(g.Ceiling)
	bins := fineBins(g.Fine, top)
	if bins <= rrkm.MaxFineBins {
		return n.checkCountRange()
	}
	limit := float64(rrkm.MaxFineBins)
	err := &sizeError{rrkm.ErrTooLarge, fmt.Sprintf("the state count up to %s cm-1 on a fine grain of %s cm-1 would need %s bins, %s of memory; the limit is %s",
		num(top), num(g.Fine), num(bins), byteSize(bins*bytesPerEntry), byteSize(limit*bytesPerEntry))}
	switch {
	case m.Has("energy-grid.fine-grain") && fineBins(input.DefaultFineGrain, top) <= limit:
		return m.FieldError("energy-grid.fine-grain", err,
			fmt.Sprintf("use a fine grain of at least %s cm-1; %g cm-1, the default, resolves the vibrations of almost any molecule",
				num(roundUp(top/(limit-2), 2)), input.DefaultFineGrain))
	case g.Ceiling > 0 && fineBins(g.Fine, n.CountTop(0)) <= limit:
		return m.FieldError("energy-grid.ceiling", err,
			"lower the ceiling, or delete it to have it chosen automatically")
	}
	i := len(m.Temperatures) - 1
	// The highest temperature whose count fits, by bisection (the count
	// grows with T).
	lo, hi := 0.0, m.Temperatures[i]
	for range 60 {
		if mid := (lo + hi) / 2; fineBins(g.Fine, n.countTopAt(0, mid)) <= limit {
			lo = mid
		} else {
			hi = mid
		}
	}
	hint := fmt.Sprintf("states are counted to E0 + %d kT at the highest temperature (further for a large molecule); with this fine grain that fits up to %s K (harmonic states are unreliable above about 5000 K anyway)",
		collision.CeilingKTMax+collision.HeadroomKT, num(math.Floor(lo)))
	if lo < 1 {
		hint = "with this fine grain not even E0 fits: use a coarser energy-grid.fine-grain"
	}
	return m.FieldError(m.TemperaturePath(i), err, hint)
}

// countRange returns the largest estimated ln W over the species counted up
// to top cm⁻¹ above the reactant (rrkm.Species.LogSumEstimate: each
// transition state to top − E0, or to the Eckart barrier's lower end) and
// the species it belongs to.
func (n *Network) countRange(top float64) (float64, string) {
	worst, name := n.reactant().Species.LogSumEstimate(top), n.reactant().Name
	for _, c := range n.Channels {
		if c.TS == nil {
			continue
		}
		tsTop := top - c.E0
		if e := c.Eckart(); e != nil {
			tsTop = top - e.Emin()
		}
		if l := c.TS.Species.LogSumEstimate(tsTop); l > worst {
			worst, name = l, c.TS.Name
		}
	}
	return worst, name
}

// checkCountRange refuses a state count whose numbers of states would pass
// what rrkm's scaled counts hold (rrkm.MaxLogStates, about 1e460; a
// molecule of several hundred atoms at 2500 K), naming energy-grid.ceiling
// if the automatic ceiling would fit, else the highest temperature, with
// the highest temperature that fits.
func (n *Network) checkCountRange() error {
	m := n.Model
	g := m.EnergyGrid
	fits := func(top float64) bool { l, _ := n.countRange(top); return l <= rrkm.MaxLogStates }
	top := n.CountTop(g.Ceiling)
	if fits(top) {
		return nil
	}
	l, name := n.countRange(top)
	err := &sizeError{rrkm.ErrRange, fmt.Sprintf("the state count of %s up to %s cm-1 would reach about 1e%.0f states, beyond the 1e%.0f that the count holds",
		name, num(top), l/math.Ln10, rrkm.MaxLogStates/math.Ln10)}
	if g.Ceiling > 0 && fits(n.CountTop(0)) {
		return m.FieldError("energy-grid.ceiling", err, "lower the ceiling, or delete it to have it chosen automatically")
	}
	// The highest temperature whose automatic count fits, by bisection.
	i := len(m.Temperatures) - 1
	lo, hi := 0.0, m.Temperatures[i]
	for range 60 {
		if mid := (lo + hi) / 2; fits(n.countTopAt(0, mid)) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return m.FieldError(m.TemperaturePath(i), err,
		fmt.Sprintf("the automatic ceiling follows the thermal distribution, where a molecule this large has more states than the count holds; it fits up to %s K, or give a lower energy-grid.ceiling (or --ceiling)",
			num(math.Floor(lo))))
}

// meGrid is one master-equation grid a run builds.
type meGrid struct {
	i       int // index of the temperature
	g       rrkm.Grains
	entries float64
	refine  bool    // a grid of the convergence check
	base    float64 // the run's grain at this temperature, cm⁻¹
}

// meGrids returns the grids the master equation builds over the
// temperatures with grain and ceiling in cm⁻¹ (0: automatic; an automatic
// ceiling taken at its largest, AutoCeiling) and, if refine, those of the
// convergence check: half the grain, and the ceiling HeadroomKT higher, at
// the lowest and highest temperatures.
func (n *Network) meGrids(grain, ceiling float64, refine bool) []meGrid {
	m := n.Model
	lo := n.lowestE0()
	ceilingAt := func(tK float64) float64 {
		if ceiling > 0 {
			return ceiling
		}
		return n.AutoCeiling(tK)
	}
	var out []meGrid
	for i, tK := range m.Temperatures {
		g, e := collision.MatrixSize(n.Transfer, tK, grain, ceilingAt(tK), lo)
		out = append(out, meGrid{i: i, g: g, entries: e, base: g.Width})
		if !refine || i != 0 && i != len(m.Temperatures)-1 {
			continue
		}
		if g2, e2 := collision.MatrixSize(n.Transfer, tK, g.Width/2, ceilingAt(tK), lo); g2.Width >= m.EnergyGrid.Fine {
			out = append(out, meGrid{i: i, g: g2, entries: e2, refine: true, base: g.Width}) // a finer grain is skipped (collision.Run)
		}
		if c := ceilingAt(tK) + collision.HeadroomKT*units.KT(tK); c <= n.CountTop(ceiling) {
			g3, e3 := collision.MatrixSize(n.Transfer, tK, g.Width, c, lo)
			out = append(out, meGrid{i: i, g: g3, entries: e3, refine: true, base: g.Width})
		}
	}
	return out
}

// checkMatrixSize refuses a master-equation grid that collision.Run would
// refuse: a grain below the fine counting grain, or a matrix of more than
// collision.MaxMatrixEntries entries at some temperature. Its message gives
// the memory as a worker's peak (collision.PeakBytes: the band matrices
// held at once and the collector's headroom), the figure that decides
// whether a run fits, times the number of workers. grain and ceiling
// are in cm⁻¹ (0: automatic); grainSet and ceilingSet say whether they came
// from outside the file. It names the setting that decides the grid: the
// grain if one is given, else the ceiling if one is given, else the
// temperature (the automatic grid grows with kT), or, for a grain below the
// fine grain, α.
func (n *Network) checkMatrixSize(grain, ceiling float64, grainSet, ceilingSet Setting, refine bool) error {
	m := n.Model
	grids := n.meGrids(grain, ceiling, refine)
	fine := m.EnergyGrid.Fine
	for _, mg := range grids {
		if mg.g.Width >= fine {
			continue
		}
		tK := m.Temperatures[mg.i]
		err := fmt.Errorf("the master-equation grain at %s K would be %.4g cm-1, below the fine counting grain %s cm-1",
			num(tK), mg.g.Width, num(fine))
		switch {
		case grainSet.given():
			return grainSet.optionError(fmt.Sprintf("a grain of at least %s cm-1", num(roundUp(fine*1.01, 2))), "%v", err)
		case grain > 0:
			// The grain given was moved down onto E0 (collision.MatrixSize).
			return m.FieldError("energy-grid.master-equation-grain", err,
				fmt.Sprintf("the grain is moved slightly so that a grain edge falls on E0; give at least %s cm-1", num(roundUp(fine*1.01, 2))))
		}
		if tr := n.Transfer; !tr.Strong && tr.Alpha(tK) < units.KT(tK) {
			return m.FieldError("energy-transfer.alpha-300", err,
				fmt.Sprintf("the automatic grain is α(T)/5, and α = %.4g cm-1 at %s K; ⟨ΔE⟩down is typically 100 to 1000 cm-1, or give energy-grid.master-equation-grain", tr.Alpha(tK), num(tK)))
		}
		return m.FieldError(m.TemperaturePath(mg.i), err, "the automatic grain is kT/5: give energy-grid.master-equation-grain, or a finer fine-grain")
	}

	// The run's own grids first: if one of them is too large, skipping the
	// convergence check would not help.
	limit := float64(collision.MaxMatrixEntries)
	var worst meGrid
	for _, refine := range []bool{false, true} {
		for _, mg := range grids {
			if mg.refine == refine && mg.entries > worst.entries {
				worst = mg
			}
		}
		if worst.entries > limit {
			break
		}
	}
	if worst.entries <= limit {
		return nil
	}
	tK := m.Temperatures[worst.i]
	what := "the master-equation matrix"
	if worst.refine {
		what = "the convergence check's master-equation matrix"
	}
	shape := fmt.Sprintf("%d grains of %.4g cm-1", worst.g.N, worst.g.Width)
	if band := worst.entries / float64(worst.g.N); band > 1 {
		shape += fmt.Sprintf(" × a band of %.0f", band)
	}
	err := &sizeError{collision.ErrTooLarge, fmt.Sprintf("%s at %s K would need %s entries (%s), %s of memory per worker at its peak; the limit is %s per worker",
		what, num(tK), num(worst.entries), shape, byteSize(collision.PeakBytes(worst.entries)), byteSize(collision.PeakBytes(limit)))}
	// The grain at which the run's own grids fit: entries ≈ (ceiling/w)·
	// (16.1 α/w), so the grain grows as the square root of the excess (5 %
	// more for the move onto E0 and the band's rounding). The convergence
	// check halves it, so it needs twice that.
	need := 0.0
	for _, mg := range grids {
		if !mg.refine {
			need = math.Max(need, mg.base*math.Sqrt(mg.entries/limit)*1.05)
		}
	}
	better, skip, grainSkip := roundUp(need, 2), "", ""
	switch {
	case refine && worst.refine:
		better, skip = roundUp(2*need, 2), ", or run rates with --skip-check"
		grainSkip = skip
	case refine:
		better, grainSkip = roundUp(2*need, 2), fmt.Sprintf(" (%s cm-1 with --skip-check)", num(roundUp(need, 2)))
	}
	switch {
	case grainSet.given():
		return fmt.Errorf("%s: %s %q: %w (hint: a grain of at least about %s cm-1%s)", m.File, grainSet.Option, grainSet.Text, err, num(better), grainSkip)
	case grain > 0:
		return m.FieldError("energy-grid.master-equation-grain", err,
			fmt.Sprintf("use a grain of at least about %s cm-1%s, or delete it for the automatic min(α, kT)/5", num(better), grainSkip))
	case ceilingSet.given():
		return fmt.Errorf("%s: %s %q: %w (hint: a lower ceiling, or none for the automatic one%s)", m.File, ceilingSet.Option, ceilingSet.Text, err, skip)
	case ceiling > 0:
		return m.FieldError("energy-grid.ceiling", err, "lower the ceiling, or delete it to have it chosen automatically"+skip)
	}
	return m.FieldError(m.TemperaturePath(worst.i), err,
		fmt.Sprintf("the automatic grid reaches E0 + %d kT or more in grains of min(α, kT)/5, so it grows with the temperature; lower the highest temperature or give energy-grid.master-equation-grain%s",
			collision.CeilingKTMax, skip))
}

// Work estimates: the master equation costs about one matrix entry per
// solve and entry (a banded factorisation and a few back-substitutions per
// inverse iteration), a temperature's limits (k0, p½, Pr = 1) about
// limitSolves solves more.
const (
	limitSolves = 15
	// entrySolvesPerSecond is measured on one core of the reference
	// machine (docs/performance.md): the demo with its held-out points,
	// 2.8e7 entry-solves in 1.1 s of CPU time.
	entrySolvesPerSecond = 2.5e7
	// DefaultWorkLimit is the estimated CPU time, in seconds, beyond which
	// Rates refuses to start unless Options.WorkLimit raises it.
	DefaultWorkLimit = 3600
)

// WorkSeconds estimates the CPU time in seconds Rates takes with opt on
// one core of the reference machine (docs/performance.md), from the matrix
// sizes of every grid it builds: the run's, the convergence check's and
// the held-out points'. Workers share it out over the cores.
func (n *Network) WorkSeconds(opt Options) float64 {
	m := n.Model
	grain := opt.Grain.or(m.EnergyGrid.MEGrain)
	ceiling := opt.Ceiling.or(m.EnergyGrid.Ceiling)
	nP := float64(len(m.Pressures))
	units := 0.0
	for _, g := range n.meGrids(grain, ceiling, !opt.SkipCheck) {
		if g.refine {
			units += g.entries * 2 // the corner pressures
			continue
		}
		units += g.entries * (nP + limitSolves)
		if !opt.SkipHeldOut && g.i > 0 {
			units += g.entries * (nP - 1) // the midpoint temperature below: k alone
		}
	}
	return units / entrySolvesPerSecond
}

// checkWork refuses a run whose estimated time exceeds the limit.
func (n *Network) checkWork(opt Options) error {
	limit := opt.WorkLimit
	if limit <= 0 {
		limit = DefaultWorkLimit
	}
	est := n.WorkSeconds(opt)
	if est <= limit {
		return nil
	}
	m := n.Model
	return m.FieldError("grid", fmt.Errorf("the master equation over %d temperatures × %d pressures would take about %s of CPU time; the limit is %s",
		len(m.Temperatures), len(m.Pressures), duration(est), duration(limit)),
		"use fewer temperatures or pressures, a coarser energy-grid.master-equation-grain, --skip-check, or raise the limit with --work-limit")
}

// duration writes seconds as "40 s", "12 min" or "3.5 h".
func duration(s float64) string {
	switch {
	case s < 120:
		return fmt.Sprintf("%.2g s", s)
	case s < 7200:
		return fmt.Sprintf("%.3g min", s/60)
	}
	return fmt.Sprintf("%.3g h", s/3600)
}
