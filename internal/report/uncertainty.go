package report

import (
	"crypto/sha256"
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
)

// Uncertainty is what the report of an uncertainty run shows. Only Result
// is required.
type Uncertainty struct {
	Result *uncertainty.Result
	// Rates is the nominal rates run whose fits give the mechanism entries
	// (nil if none was made): its warnings and fit problems join the box.
	Rates *job.RatesResult
	// Title is the input's title.
	Title string
	// Input is the input file as read: echoed, with its SHA-256.
	Input []byte
	// Units are those of the terminal tables and figures (--pressure-unit,
	// --quantity); the zero value means bar and per mol.
	Units figures.Units
	// Figures are the SVG figures of the run (figures.Uncertainty).
	Figures []job.File
	// Mechanism are the mechanism files as written, with f(T) in their
	// headers (uncertainty.Result.Annotate, RatesResult.MechanismFiles).
	Mechanism []job.File
	// Files names the files written with the report.
	Files []string
	// Warnings are the command's own warnings.
	Warnings []string
}

// uncertaintyCaptions say what each figure of an uncertainty run shows.
var uncertaintyCaptions = map[string]string{
	figures.BandPlot: "falloff curves k over the nominal k∞ against pressure at up to three temperatures: the nominal points, the median of the samples and, shaded, " +
		"their central 95 %.",
	figures.SensitivityPlot: "sensitivity coefficients of ln k against temperature at the lowest, middle and highest pressure, one panel each, per the unit of each value " +
		"(as in the sensitivity table).",
	figures.FactorPlot: "the uncertainty factor f = sqrt(k97.5/k2.5), the largest over the pressures at each temperature, with the fitted f(T).",
}

// UncertaintyHTML renders the report of an uncertainty run (Monte Carlo
// propagation of uncertain input values, pkg/uncertainty) as one
// self-contained HTML page: the job with the uncertain values and their
// distributions, the warnings, the band of k at each grid point, the
// limits with f(T) and its fit, the sensitivity coefficients and the
// ranking of the values, the figures, the mechanism entries, the input
// echoed and the caution. Numbers are formatted as `falloff uncertainty`
// prints them. An error is a *job.NumericalError.
func UncertaintyHTML(r Uncertainty) ([]byte, error) {
	res := r.Result
	u := withDefaults(r.Units)
	ku, k0u, pu := u.RateUnit(0), u.RateUnit(1), u.Pressure
	nT, nP := len(res.Temperatures), len(res.Pressures)
	if nT == 0 || nP == 0 {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %s: the result has no grid (%d temperatures, %d pressures)", FileName, clean(res.File), nT, nP)}
	}
	title := clean(r.Title)
	if title == "" {
		title = "Uncertainty of k(T,P)"
	}
	p := &page{Title: "Uncertainty: " + title, Reaction: clean(res.Reaction), Version: job.Version, Caution: job.Caution}

	var values []string
	for _, in := range res.Inputs {
		values = append(values, fmt.Sprintf("%s (%s, nominal %s, sd %s)", clean(in.Path), clean(in.Distribution), nominalText(in), sdText(in)))
	}
	p.Job = append(p.Job, fmt.Sprintf("falloff %s propagated the uncertainty of %d input values through RRKM k(E) and the master equation of %s by Monte Carlo: "+
		"%d samples drawn with seed %d (sample i from a generator seeded with the seed and i, so the same seed gives the same numbers on any number of workers), "+
		"at %d temperatures from %s K to %s K and %d pressures from %s %s to %s %s.",
		job.Version, len(res.Inputs), clean(res.Reaction), res.Samples, res.Seed, nT, num(res.Temperatures[0]), num(res.Temperatures[nT-1]),
		nP, num(u.P(res.Pressures[0])), pu, num(u.P(res.Pressures[nP-1])), pu))
	if r.Input != nil {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s, SHA-256 %x (echoed in full below).", clean(res.File), sha256.Sum256(r.Input)))
	} else {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s.", clean(res.File)))
	}
	p.Job = append(p.Job, fmt.Sprintf("Uncertain values: %s.", strings.Join(values, "; ")))
	reuse := "The states were counted once (only collisional values vary)."
	if !res.ReusedCounts {
		reuse = "The states were counted again for each sample that changes them."
	}
	p.Job = append(p.Job, reuse)
	if res.Redrawn > 0 {
		p.Job = append(p.Job, fmt.Sprintf("%d draws fell outside their value's physical range and were drawn again.", res.Redrawn))
	}
	if len(res.Sensitivities) > 0 {
		p.Job = append(p.Job, "Sensitivities: central differences about the nominal values.")
	} else {
		p.Job = append(p.Job, "Sensitivities: skipped (--skip-sensitivities).")
	}
	if f := r.Rates; f != nil && f.Fits != nil {
		if f.Fits.Recommended != "" {
			p.Job = append(p.Job, fmt.Sprintf("The mechanism entries are the nominal run's fits (%s, recommended: %s), with f(T) in their comments.",
				strings.Join(formNames(f.Fits), ", "), f.Fits.Recommended))
		} else {
			p.Job = append(p.Job, fmt.Sprintf("The mechanism entries are the nominal run's fits (%s); none is recommended: none meets the tolerance.",
				strings.Join(formNames(f.Fits), ", ")))
		}
	}
	p.Job = append(p.Job, fmt.Sprintf("Units: k and k∞ in %s, k0 in %s, pressures in %s, temperatures in K; f is a factor (dimensionless).", ku, k0u, pu))

	if rr := r.Rates; rr != nil {
		for _, w := range rr.Warnings {
			p.Warnings = append(p.Warnings, clean(w))
		}
	}
	for _, w := range res.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}
	for _, w := range r.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}
	if rr := r.Rates; rr != nil {
		for _, e := range entries(rr) {
			p.Warnings = append(p.Warnings, fitWarnings(e.label, e.fits)...)
		}
	}

	p.Sections = append(p.Sections, inputsSection(res), bandSection(res, u), factorSection(res, u))
	if len(res.Sensitivities) > 0 {
		p.Sections = append(p.Sections, sensitivitySection(res, u), rankingSection(res, u))
	}
	figs, err := figureSection(r.Figures)
	if err != nil {
		return nil, err
	}
	recaption(&figs, uncertaintyCaptions)
	if len(figs.Blocks) > 0 {
		p.Sections = append(p.Sections, figs)
	}
	p.Sections = append(p.Sections, mechanismSection(r.Mechanism))
	p.Sections = append(p.Sections, tailSections(res.File, r.Input, r.Files)...)
	return render(p)
}

// recaption replaces the captions of the figures named in captions.
func recaption(s *section, captions map[string]string) {
	for _, b := range s.Blocks {
		if b.Figure == nil {
			continue
		}
		if c, ok := captions[b.Figure.File]; ok {
			b.Figure.Caption = c
		}
	}
}

// nominalText is an input's nominal value with its unit, as the terminal
// prints it.
func nominalText(in uncertainty.Input) string {
	s := num(in.Nominal)
	if in.NominalUnit != "" {
		s += " " + clean(in.NominalUnit)
	}
	return s
}

// sdText is an input's standard deviation in the measure of its
// sensitivity, as the terminal prints it.
func sdText(in uncertainty.Input) string {
	s := num(in.SD)
	if in.Relative {
		s += " (of ln x)"
	} else if in.NominalUnit != "" {
		s += " " + clean(in.NominalUnit)
	}
	return s
}

// perUnit says what an input's sensitivity coefficient is per, as the
// terminal's column header does.
func perUnit(in uncertainty.Input) string {
	if in.Relative {
		return "per ln x"
	}
	if _, unit, ok := strings.Cut(in.Sensitivity, " per "); ok {
		return "per " + clean(unit)
	}
	return "per unit"
}

func inputsSection(res *uncertainty.Result) section {
	t := &table{Caption: "Uncertain values: nominal value and distribution; sd in the measure of the sensitivity (of ln x for a relative value)",
		Header: []string{"uncertain value", "nominal", "distribution", "sd"}}
	for _, in := range res.Inputs {
		t.Rows = append(t.Rows, []cell{{Text: clean(in.Path)}, {Text: nominalText(in), Num: true}, {Text: clean(in.Distribution)}, {Text: sdText(in), Num: true}})
	}
	return section{ID: "inputs", Heading: "Uncertain values", Blocks: []block{{Kind: "table", Table: t}}}
}

// bandSection is the terminal's band table: at each grid point the
// nominal k, the median and the 2.5 and 97.5 % quantiles of the samples,
// f = sqrt(k97.5/k2.5), and the spread of ln k over the samples and to
// first order.
func bandSection(res *uncertainty.Result, u figures.Units) section {
	ku, pu := u.RateUnit(0), u.Pressure
	t := &table{Caption: fmt.Sprintf("k(T,P) / %s: nominal, median and central 95 %% of the samples; f = sqrt(k97.5/k2.5)", ku), Class: "nums",
		Header: []string{"T / K", "P / " + pu, "nominal / " + ku, "median / " + ku, "2.5 % / " + ku, "97.5 % / " + ku, "f", "sd ln k"}}
	if res.LinearSDLnK != nil {
		t.Header = append(t.Header, "sd ln k (linear)")
	}
	for i, T := range res.Temperatures {
		for j, P := range res.Pressures {
			b := res.K[i][j]
			row := []string{num(T), num(u.P(P)), num(u.Rate(res.NominalK[i][j], 0)), num(u.Rate(b.Median, 0)),
				num(u.Rate(b.Low, 0)), num(u.Rate(b.High, 0)), num(b.F), num(res.SDLnK[i][j])}
			if res.LinearSDLnK != nil {
				row = append(row, num(res.LinearSDLnK[i][j]))
			}
			t.Rows = append(t.Rows, numRow(row...))
		}
	}
	blocks := []block{
		para("The band of k over the %d samples: quantiles interpolated between order statistics (Hyndman & Fan 1996, definition 7). "+
			"sd ln k is the standard deviation of ln k over the samples; sd ln k (linear) its first-order estimate from the sensitivities, sqrt(Σ(S·sd)²): "+
			"the two agree where ln k is linear in the values over their spread.", res.Samples),
		{Kind: "table", Table: t}}
	return section{ID: "band", Heading: "Band of k(T,P)", Blocks: blocks}
}

// factorSection is the terminal's limits table and the fitted f(T).
func factorSection(res *uncertainty.Result, u figures.Units) section {
	t := &table{Caption: "Limits: median and f of k∞ and k0; f(T), the largest f over the pressures, and its fit", Class: "nums",
		Header: []string{"T / K", "k∞ median / " + u.RateUnit(0), "f(k∞)", "k0 median / " + u.RateUnit(1), "f(k0)", "f(T) max over P", "f(T) fitted"}}
	for i, T := range res.Temperatures {
		t.Rows = append(t.Rows, numRow(num(T), num(u.Rate(res.KInf[i].Median, 0)), num(res.KInf[i].F),
			num(u.Rate(res.K0[i].Median, 1)), num(res.K0[i].F), num(res.FactorT[i]), num(res.Factor.At(T))))
	}
	ff := res.Factor
	fit := fmt.Sprintf("Fitted f(T) = %.3g·exp(|%.3g K·(1/T − 1/298 K)|), the upper envelope of the largest f at each temperature: at most a factor %.3g above it.",
		ff.F298, ff.G, ff.MaxDeviation)
	if ff.TMin > uncertainty.TRef || ff.TMax < uncertainty.TRef {
		fit += fmt.Sprintf(" 298 K lies outside the grid's %s–%s K: f298 is extrapolated.", num(ff.TMin), num(ff.TMax))
	}
	return section{ID: "factor", Heading: "Limits and uncertainty factor f(T)", Blocks: []block{
		{Kind: "table", Table: t},
		para("%s", fit),
		para("The mechanism entries carry this fit (the Cantera YAML entry as %s: {f298, g, T-range, fit-deviation}, g and T-range in K) when the mechanism has one entry.",
			uncertainty.UserFieldKey)}}
}

// sensitivitySection is the terminal's table of the sensitivity
// coefficients of ln k, each value's unit in its header.
func sensitivitySection(res *uncertainty.Result, u figures.Units) section {
	t := &table{Caption: "Sensitivity coefficients of ln k: d ln k/d ln x for a relative value, d ln k/dx per its unit otherwise",
		Header: []string{"T / K", "P / " + u.Pressure}}
	for i, sn := range res.Sensitivities {
		t.Header = append(t.Header, clean(sn.Path)+" ("+perUnit(res.Inputs[i])+")")
	}
	for i, T := range res.Temperatures {
		for j, P := range res.Pressures {
			row := []string{num(T), num(u.P(P))}
			for _, sn := range res.Sensitivities {
				row = append(row, num(sn.K[i][j]))
			}
			t.Rows = append(t.Rows, numRow(row...))
		}
	}
	return section{ID: "sensitivities", Heading: "Sensitivity coefficients", Blocks: []block{{Kind: "table", Table: t}}}
}

// rankingSection is the terminal's ranking of the values at the corners
// and the middle of the grid.
func rankingSection(res *uncertainty.Result, u figures.Units) section {
	t := &table{Caption: "Which value dominates where: share of the first-order variance of ln k (change of ln k per sd)",
		Header: []string{"region", "T / K", "P / " + u.Pressure, "first", "second", "third"}}
	for _, r := range res.Dominant {
		row := []cell{{Text: clean(r.Label)}, {Text: num(r.T), Num: true}, {Text: num(u.P(r.P)), Num: true}}
		for k := range min(3, len(r.Ranking)) {
			sh := r.Ranking[k]
			row = append(row, cell{Text: fmt.Sprintf("%s %.0f %% (%+.2g)", clean(sh.Path), 100*sh.Share, sh.PerSD), Num: true})
		}
		for len(row) < 6 {
			row = append(row, cell{Num: true})
		}
		t.Rows = append(t.Rows, row)
	}
	return section{ID: "ranking", Heading: "Dominant values", Blocks: []block{
		para("Each value's share is (S·sd)²/Σ(S_j·sd_j)² at the point, S its sensitivity coefficient and sd its standard deviation; " +
			"in brackets the change of ln k for one standard deviation. The ranking is first order: where the two spreads of the band table differ, the band measures the uncertainty."),
		{Kind: "table", Table: t}}}
}
