package main

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// preflight checks what pkg/input cannot check alone, before any state is
// counted: the bath gas against the built-in table, and the memory that the
// state count and the master equation would take. loadModel applies it for
// every verb, so that check refuses what rates would refuse, and rates
// refuses before doing any work.
func preflight(m *input.Model) error {
	if len(m.Pressures) > 0 {
		if _, _, err := newCollider(m); err != nil {
			return err
		}
	}
	if err := checkCountSize(m); err != nil {
		return err
	}
	if len(m.Pressures) > 0 {
		return checkMatrixSize(m, m.EnergyGrid.MEGrain, m.EnergyGrid.Ceiling, sizeSources{}, false)
	}
	return nil
}

// bytesPerEntry is the size of one float64 of the state count or the matrix.
const bytesPerEntry = 8

// countTop returns the energy in cm⁻¹ up to which rates counts the states of
// the reactant (newNetwork): the automatic ceiling at its largest at the
// highest temperature (autoCeiling), or the given ceiling, plus the 10 kT
// the convergence check may add. It is the highest any verb counts to with
// the file's settings.
func countTop(m *input.Model, ceiling float64) float64 {
	return countTopAt(m, ceiling, m.Temperatures[len(m.Temperatures)-1])
}

func countTopAt(m *input.Model, ceiling, tK float64) float64 {
	if ceiling > 0 {
		return ceiling + 10*units.KT(tK)
	}
	return autoCeiling(m, tK) + 10*units.KT(tK)
}

// autoCeiling is the largest automatic ceiling at tK over the file's
// channels (collision.CeilingBound): E0 + 60 kT, or higher where a large
// molecule's thermal distribution reaches further.
func autoCeiling(m *input.Model, tK float64) float64 {
	r, _ := m.ReactantAndTS()
	top := 0.0
	for _, c := range channelSpecs(m) {
		var ts *rrkm.Species
		if c.ts != nil {
			ts = &c.ts.Species
		}
		top = math.Max(top, collision.CeilingBound(&r.Species, ts, c.e0, tK))
	}
	return top
}

// lowestE0 is the lowest threshold of the file's channels, cm⁻¹.
func lowestE0(m *input.Model) float64 {
	e := math.Inf(1)
	for _, c := range channelSpecs(m) {
		e = math.Min(e, c.e0)
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
func checkCountSize(m *input.Model) error {
	g := m.EnergyGrid
	top := countTop(m, g.Ceiling)
	bins := fineBins(g.Fine, top)
	if bins <= rrkm.MaxFineBins {
		return nil
	}
	limit := float64(rrkm.MaxFineBins)
	err := &sizeError{rrkm.ErrTooLarge, fmt.Sprintf("the state count up to %s cm-1 on a fine grain of %s cm-1 would need %s bins, %s of memory; the limit is %s",
		num(top), num(g.Fine), num(bins), byteSize(bins*bytesPerEntry), byteSize(limit*bytesPerEntry))}
	switch {
	case m.Has("energy-grid.fine-grain") && fineBins(input.DefaultFineGrain, top) <= limit:
		return m.FieldError("energy-grid.fine-grain", err,
			fmt.Sprintf("use a fine grain of at least %s cm-1; %g cm-1, the default, resolves the vibrations of almost any molecule",
				num(roundUp(top/(limit-2), 2)), input.DefaultFineGrain))
	case g.Ceiling > 0 && fineBins(g.Fine, countTop(m, 0)) <= limit:
		return m.FieldError("energy-grid.ceiling", err,
			"lower the ceiling, or delete it to have it chosen automatically")
	}
	i := len(m.Temperatures) - 1
	// The highest temperature whose count fits, by bisection (the count
	// grows with T).
	lo, hi := 0.0, m.Temperatures[i]
	for range 60 {
		if mid := (lo + hi) / 2; fineBins(g.Fine, countTopAt(m, 0, mid)) <= limit {
			lo = mid
		} else {
			hi = mid
		}
	}
	hint := fmt.Sprintf("states are counted to E0 + %d kT at the highest temperature (further for a large molecule); with this fine grain that fits up to %s K (harmonic states are unreliable above about 5000 K anyway)",
		collision.CeilingKTMax+10, num(math.Floor(lo)))
	if lo < 1 {
		hint = "with this fine grain not even E0 fits: use a coarser energy-grid.fine-grain"
	}
	return m.FieldError(m.TemperaturePath(i), err, hint)
}

// sizeSources says which master-equation settings came from the command line
// (rates --grain, --ceiling) rather than from the file.
type sizeSources struct {
	grainFlag, ceilingFlag string
}

// meGrid is one master-equation grid a run builds.
type meGrid struct {
	i       int // index of the temperature
	g       rrkm.Grains
	entries float64
	refine  bool    // a grid of the convergence check
	base    float64 // the run's grain at this temperature, cm⁻¹
}

// meGrids returns the grids the master equation builds over m's temperatures
// with grain and ceiling in cm⁻¹ (0: automatic; an automatic ceiling taken at
// its largest, autoCeiling) and, if refine, those of the
// convergence check: half the grain, and the ceiling 10 kT higher, at the
// lowest and highest temperatures.
func meGrids(m *input.Model, grain, ceiling float64, refine bool) []meGrid {
	tr := newTransfer(m)
	lo := lowestE0(m)
	ceilingAt := func(tK float64) float64 {
		if ceiling > 0 {
			return ceiling
		}
		return autoCeiling(m, tK)
	}
	var out []meGrid
	for i, tK := range m.Temperatures {
		g, n := collision.MatrixSize(tr, tK, grain, ceilingAt(tK), lo)
		out = append(out, meGrid{i: i, g: g, entries: n, base: g.Width})
		if !refine || i != 0 && i != len(m.Temperatures)-1 {
			continue
		}
		if g2, n2 := collision.MatrixSize(tr, tK, g.Width/2, ceilingAt(tK), lo); g2.Width >= m.EnergyGrid.Fine {
			out = append(out, meGrid{i: i, g: g2, entries: n2, refine: true, base: g.Width}) // a finer grain is skipped (collision.Run)
		}
		if c := ceilingAt(tK) + 10*units.KT(tK); c <= countTop(m, ceiling) {
			g3, n3 := collision.MatrixSize(tr, tK, g.Width, c, lo)
			out = append(out, meGrid{i: i, g: g3, entries: n3, refine: true, base: g.Width})
		}
	}
	return out
}

// checkMatrixSize refuses a master-equation grid that collision.Run would
// refuse: a grain below the fine counting grain, or a matrix of more than
// collision.MaxMatrixEntries entries at some temperature. It names the
// setting that decides the grid: the grain if one is given, else the
// ceiling if one is given, else the temperature (the automatic grid grows
// with kT) — or, for a grain below the fine grain, α.
func checkMatrixSize(m *input.Model, grain, ceiling float64, src sizeSources, refine bool) error {
	grids := meGrids(m, grain, ceiling, refine)
	fine := m.EnergyGrid.Fine
	for _, mg := range grids {
		if mg.g.Width >= fine {
			continue
		}
		tK := m.Temperatures[mg.i]
		err := fmt.Errorf("the master-equation grain at %s K would be %.4g cm-1, below the fine counting grain %s cm-1",
			num(tK), mg.g.Width, num(fine))
		switch {
		case src.grainFlag != "":
			return usagef("--grain %q: %v (hint: a grain of at least %s cm-1)", src.grainFlag, err, num(roundUp(fine*1.01, 2)))
		case grain > 0:
			// The grain given was moved down onto E0 (collision.MatrixSize).
			return m.FieldError("energy-grid.master-equation-grain", err,
				fmt.Sprintf("the grain is moved slightly so that a grain edge falls on E0; give at least %s cm-1", num(roundUp(fine*1.01, 2))))
		}
		if tr := newTransfer(m); !tr.Strong && tr.Alpha(tK) < units.KT(tK) {
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
	err := &sizeError{collision.ErrTooLarge, fmt.Sprintf("%s at %s K would need %s entries (%s), %s of memory; the limit is %s",
		what, num(tK), num(worst.entries), shape, byteSize(worst.entries*bytesPerEntry), byteSize(limit*bytesPerEntry))}
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
	case src.grainFlag != "":
		return fmt.Errorf("%s: --grain %q: %w (hint: a grain of at least about %s cm-1%s)", m.File, src.grainFlag, err, num(better), grainSkip)
	case grain > 0:
		return m.FieldError("energy-grid.master-equation-grain", err,
			fmt.Sprintf("use a grain of at least about %s cm-1%s, or delete it for the automatic min(α, kT)/5", num(better), grainSkip))
	case src.ceilingFlag != "":
		return fmt.Errorf("%s: --ceiling %q: %w (hint: a lower ceiling, or none for the automatic one%s)", m.File, src.ceilingFlag, err, skip)
	case ceiling > 0:
		return m.FieldError("energy-grid.ceiling", err, "lower the ceiling, or delete it to have it chosen automatically"+skip)
	}
	return m.FieldError(m.TemperaturePath(worst.i), err,
		"the automatic grid reaches E0 + 60 kT or more in grains of min(α, kT)/5, so it grows with the temperature; lower the highest temperature or give energy-grid.master-equation-grain"+skip)
}

// checkRatesSize applies checkMatrixSize with the grain and ceiling rates
// will use, from its flags or the file, including the convergence check's
// grids unless that is skipped.
func checkRatesSize(m *input.Model, o ratesOptions, grain, ceiling float64) error {
	return checkMatrixSize(m, grain, ceiling, sizeSources{grainFlag: o.grain, ceilingFlag: o.ceiling}, !o.skipCheck)
}

// sizeError is a request too large for memory. It unwraps to the sentinel
// of the package that would refuse the request (rrkm.ErrTooLarge,
// collision.ErrTooLarge) without repeating its text.
type sizeError struct {
	sentinel error
	msg      string
}

func (e *sizeError) Error() string { return e.msg }
func (e *sizeError) Unwrap() error { return e.sentinel }

// byteSize writes a number of bytes in decimal units: "400 MB", "1.09 GB".
func byteSize(b float64) string {
	if math.IsInf(b, 0) || math.IsNaN(b) {
		return "more than any memory"
	}
	names := []string{"B", "kB", "MB", "GB", "TB", "PB", "EB"}
	i := 0
	for b >= 1000 && i < len(names)-1 {
		b /= 1000
		i++
	}
	return fmt.Sprintf("%.3g %s", b, names[i])
}

// roundUp rounds x up to digits significant digits, for hints.
func roundUp(x float64, digits int) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return x
	}
	p := math.Pow(10, float64(digits)-math.Ceil(math.Log10(x)))
	return math.Ceil(x*p) / p
}
