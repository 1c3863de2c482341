package report

import (
	"crypto/sha256"
	"fmt"
	"maps"
	"math"
	"path"
	"slices"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Rates is what the report of a rates run shows. Only Result is required.
type Rates struct {
	Result *job.RatesResult
	// Title is the input's title.
	Title string
	// Input is the input file as read: echoed, with its SHA-256.
	Input []byte
	// Units are those of the terminal tables and figures (--pressure-unit,
	// --quantity); the zero value means bar and per mol.
	Units figures.Units
	// Energy is the activation-energy unit of the fit parameters, that of
	// the mechanism files; "" means cal/mol.
	Energy export.EnergyUnit
	// Figures are the SVG figures of the run (figures.Rates), inlined in
	// this order.
	Figures []job.File
	// Mechanism are the mechanism files as written
	// (RatesResult.MechanismFiles); the reactions files are shown.
	Mechanism []job.File
	// Files names the files written with the report, listed at the end.
	Files []string
	// Warnings are the command's own warnings, shown after the result's.
	Warnings []string
}

// RatesHTML renders the report of a rates run as one self-contained HTML
// page. An error is a *job.NumericalError (a figure that is not a plain
// SVG drawing, or the template failing).
func RatesHTML(r Rates) ([]byte, error) {
	res := r.Result
	u := withDefaults(r.Units)
	kp, k0p := res.KPowers(), res.K0Powers()
	ku, k0u, pu := u.RateUnit(kp), u.RateUnit(k0p), u.Pressure
	title := clean(r.Title)
	if title == "" {
		title = "Rate coefficients k(T,P)"
	}
	p := &page{Title: title, Reaction: clean(res.Reaction), Version: job.Version, Caution: job.Caution}

	nT, nP := len(res.Temperatures), len(res.Pressures)
	if nT == 0 || nP == 0 {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %s: the result has no grid (%d temperatures, %d pressures)", FileName, clean(res.File), nT, nP)}
	}
	p.Job = append(p.Job, fmt.Sprintf("falloff %s computed the pressure-dependent rate coefficient k(T,P) of %s (%s) from RRKM k(E) and the master equation, "+
		"at %d temperatures from %s K to %s K and %d pressures from %s %s to %s %s.",
		job.Version, clean(res.Reaction), res.Direction, nT, num(res.Temperatures[0]), num(res.Temperatures[nT-1]),
		nP, num(u.P(res.Pressures[0])), pu, num(u.P(res.Pressures[nP-1])), pu))
	if r.Input != nil {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s, SHA-256 %x (echoed in full below).", clean(res.File), sha256.Sum256(r.Input)))
	} else {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s.", clean(res.File)))
	}
	p.Job = append(p.Job, fmt.Sprintf("Energy transfer: %s; bath gas %s (%s); external rotation: %s; tunnelling: %s; reaction-path degeneracy L = %s.",
		clean(res.Transfer), clean(res.Bath.Gas), clean(res.Bath.Source), clean(res.Rotation), clean(res.Tunnelling), num(res.PathDegeneracy)))
	if f := res.Fits; f != nil {
		if f.Recommended != "" {
			p.Job = append(p.Job, fmt.Sprintf("Fitted forms: %s, to a tolerance of %s %%; recommended: %s.", strings.Join(formNames(f), ", "), num(f.TolerancePct), f.Recommended))
		} else {
			p.Job = append(p.Job, fmt.Sprintf("Fitted forms: %s, to a tolerance of %s %%; none is recommended: none meets the tolerance.", strings.Join(formNames(f), ", "), num(f.TolerancePct)))
		}
	}
	p.Job = append(p.Job, fmt.Sprintf("Units: k and k∞ in %s, k0 in %s, pressures in %s, energies in cm-1, temperatures in K.", ku, k0u, pu))

	for _, w := range res.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}
	for _, w := range r.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}
	if res.Convergence == nil {
		p.Warnings = append(p.Warnings, "The grain and ceiling convergence check was skipped (--skip-check): the grid's numerical error is not known.")
	}
	for _, e := range entries(res) {
		p.Warnings = append(p.Warnings, fitWarnings(e.label, e.fits)...)
	}

	p.Sections = append(p.Sections, tstSection(res), limitsSection(res, u), gridSection(res, u))
	if len(res.Channels) > 0 {
		p.Sections = append(p.Sections, channelSection(res, u))
	}
	if res.Fits != nil {
		s := section{ID: "fits", Heading: "Fits"}
		ru := fit.ReportUnits{Energy: string(energyOr(r.Energy)), EnergyPerK: export.Units{Energy: energyOr(r.Energy)}.EnergyFactor(),
			Pressure: pu, PaPerUnit: u.PaPerUnit}
		s.Blocks = append(s.Blocks, para("Errors are 100·|k_fit/k − 1| in %%: on the grid (the points fitted) and held out (points the form was not fitted to: "+
			"the master equation solved between the grid's temperatures and pressures, or cross-validation on the grid). Tolerance %s %%.", num(res.Fits.TolerancePct)))
		for _, e := range entries(res) {
			s.Blocks = append(s.Blocks, fitBlocks(e.label, e.fits, u, ru)...)
		}
		p.Sections = append(p.Sections, s)
	}
	figs, err := figureSection(r.Figures)
	if err != nil {
		return nil, err
	}
	if len(figs.Blocks) > 0 {
		p.Sections = append(p.Sections, figs)
	}
	p.Sections = append(p.Sections, mechanismSection(r.Mechanism))
	p.Sections = append(p.Sections, tailSections(res.File, r.Input, r.Files)...)
	return render(p)
}

// withDefaults fills the zero Units: bar, per mol.
func withDefaults(u figures.Units) figures.Units {
	if u.Pressure == "" || !(u.PaPerUnit > 0) {
		u.Pressure, u.PaPerUnit = "bar", 1e5
	}
	if u.Quantity.Quantity == "" {
		u.Quantity = export.DefaultUnits
	}
	return u
}

func energyOr(e export.EnergyUnit) export.EnergyUnit {
	if e == "" {
		return export.CalPerMol
	}
	return e
}

// labelled is one set of fits with what it fits: "" for the reaction, a
// channel's name otherwise.
type labelled struct {
	label string
	fits  *fit.Results
}

// entries lists the fits of the result: the reaction's, then each
// channel's.
func entries(res *job.RatesResult) []labelled {
	var out []labelled
	if res.Fits != nil {
		out = append(out, labelled{"", res.Fits})
	}
	for _, c := range res.Channels {
		if c.Fits != nil {
			out = append(out, labelled{"channel " + clean(c.Name), c.Fits})
		}
	}
	return out
}

// formNames lists the forms fitted or tried, sorted.
func formNames(f *fit.Results) []string {
	var names []string
	for n := range f.Reports() {
		names = append(names, string(n))
	}
	for n := range f.Errors {
		names = append(names, string(n))
	}
	slices.Sort(names)
	return slices.Compact(names)
}

// tstSection states the canonical-TST identity: the Boltzmann average of
// RRKM k(E) over the reactant's density of states equals canonical TST
// k∞(T) when the partition functions are the Laplace transforms of the
// densities used (docs/design.md §3; Holbrook, Pilling & Robertson,
// "Unimolecular Reactions", 1996, eq. 4.26). Its departure is the grain's
// error.
func tstSection(res *job.RatesResult) section {
	worst, at := 0.0, 0.0
	for i, t := range res.Temperatures {
		if !(res.KInf[i] > 0) {
			continue // no canonical k∞ to compare with
		}
		if d := math.Abs(res.KInfIntegrated[i]/res.KInf[i] - 1); d >= worst {
			worst, at = d, t
		}
	}
	return section{ID: "tst", Heading: "TST identity check", Blocks: []block{
		para("The high-pressure limit two ways: k∞(ME), the thermal average of RRKM k(E) on the master equation's grains, against k∞ of canonical transition-state theory from the same partition functions. "+
			"They agree to %s %% at worst (at %s K); the ratio k∞(ME)/k∞ at each temperature is a column of the limits table.", num(100*worst), num(at))}}
}

func limitsSection(res *job.RatesResult, u figures.Units) section {
	kp, k0p := res.KPowers(), res.K0Powers()
	t := &table{Caption: "Limits, falloff centre and master-equation grid at each temperature", Class: "nums",
		Header: []string{"T / K", "k∞ / " + u.RateUnit(kp), "k∞(ME)/k∞", "k0 / " + u.RateUnit(k0p), "p½ / " + u.Pressure,
			"P(Pr=1) / " + u.Pressure, "Fcent", "grain / cm-1", "ceiling / cm-1"}}
	for i, T := range res.Temperatures {
		t.Rows = append(t.Rows, numRow(num(T), num(u.Rate(res.KInf[i], kp)), num6(res.KInfIntegrated[i]/res.KInf[i]),
			num(u.Rate(res.K0[i], k0p)), num(u.P(res.HalfPressure[i])), num(u.P(res.PrOne[i])), num(res.Fcent[i]),
			num(res.Grain[i]), numE(res.Ceiling[i])))
	}
	s := section{ID: "limits", Heading: "Limits", Blocks: []block{
		para("k∞: canonical TST; k0: the low-pressure, second-order limit k/[M] as [M] → 0; p½: the pressure where k = k∞/2; P(Pr=1): where k0[M] = k∞, the centre of the falloff curve; Fcent: k/(k∞/2) there."),
		{Kind: "table", Table: t}}}
	if res.Convergence != nil {
		s.Blocks = append(s.Blocks, para("Convergence: halving the grain or raising the ceiling by 10 kT changes k by at most %s %%.", num(100**res.Convergence)))
	}
	return s
}

func gridSection(res *job.RatesResult, u figures.Units) section {
	kp := res.KPowers()
	t := &table{Caption: fmt.Sprintf("k(T,P) / %s; columns are pressures in %s", u.RateUnit(kp), u.Pressure), Class: "wide",
		Header: []string{"T / K"}}
	for _, p := range res.Pressures {
		t.Header = append(t.Header, num(u.P(p)))
	}
	for i, T := range res.Temperatures {
		row := []string{num(T)}
		for _, k := range res.K[i] {
			row = append(row, num(u.Rate(k, kp)))
		}
		t.Rows = append(t.Rows, numRow(row...))
	}
	return section{ID: "grid", Heading: "k(T,P)", Blocks: []block{{Kind: "table", Table: t}}}
}

func channelSection(res *job.RatesResult, u figures.Units) section {
	kp := res.KPowers()
	t := &table{Caption: "Branching fractions k_channel/k, and k∞ per channel", Header: []string{"T / K", "P / " + u.Pressure}}
	for _, c := range res.Channels {
		t.Header = append(t.Header, clean(c.Name))
	}
	for i, T := range res.Temperatures {
		for j, p := range res.Pressures {
			row := []string{num(T), num(u.P(p))}
			for _, c := range res.Channels {
				row = append(row, num(c.Branching[i][j]))
			}
			t.Rows = append(t.Rows, numRow(row...))
		}
		row := []string{num(T), "k∞ / " + u.RateUnit(kp)}
		for _, c := range res.Channels {
			row = append(row, num(u.Rate(c.KInf[i], kp)))
		}
		t.Rows = append(t.Rows, numRow(row...))
	}
	return section{ID: "channels", Heading: "Channels", Blocks: []block{{Kind: "table", Table: t}}}
}

// fitWarnings are the fit problems a reader must not miss, one line per
// kind (the reasons are under Fits): no form recommended, the forms that
// failed, the forms that could not be fitted, and falloff limits moved
// away from the computed ones.
func fitWarnings(label string, f *fit.Results) []string {
	prefix := "Fit"
	if label != "" {
		prefix = "Fit of " + label
	}
	var failed []string
	reps := f.Reports()
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		if reps[n].Failed {
			failed = append(failed, string(n))
		}
	}
	var w []string
	switch {
	case f.Recommended == "" && len(failed) > 0:
		w = append(w, fmt.Sprintf("%s: no form recommended: none meets the tolerance on the grid and between its points; failed: %s (reasons under Fits).",
			prefix, strings.Join(failed, ", ")))
	case f.Recommended == "":
		w = append(w, prefix+": no form recommended: none meets the tolerance on the grid and between its points.")
	case len(failed) > 0:
		w = append(w, fmt.Sprintf("%s: failed: %s (reasons under Fits); recommended: %s.", prefix, strings.Join(failed, ", "), f.Recommended))
	}
	for _, n := range slices.Sorted(maps.Keys(f.Errors)) {
		w = append(w, fmt.Sprintf("%s: %s could not be fitted: %s.", prefix, n, clean(f.Errors[n])))
	}
	for _, d := range departures(f) {
		if d.shown { // a factor that rounds to 1 is no departure
			w = append(w, prefix+": "+d.text)
		}
	}
	return w
}

// departure says how far a falloff form's exported limits are from the
// computed ones; shown is false when the factor rounds to 1 in 4 digits.
type departure struct {
	text  string
	shown bool
}

// departures says, for each falloff form whose exported k0 and k∞ are
// not the computed ones, by how much at worst (as the terminal does).
func departures(f *fit.Results) []departure {
	var out []departure
	for _, fr := range []*fit.FalloffResult{f.Lindemann, f.Troe, f.SRI} {
		if fr == nil || len(fr.LimitDeparture) == 0 {
			continue
		}
		how := "held to Arrhenius fits of the computed k0 and k∞"
		if fr.LimitsRefined {
			how = "refitted (--free-limits)"
		}
		worst, at := 1.0, 0.0
		for _, d := range fr.LimitDeparture {
			for _, r := range []float64{d.K0Ratio, d.KInfRatio} {
				if x := math.Max(r, 1/r); x > worst {
					worst, at = x, d.T
				}
			}
		}
		out = append(out, departure{fmt.Sprintf("%s: limits %s; exported k0 and k∞ within a factor %s of the computed ones (worst at %s K).", fr.Name(), how, num(worst), num(at)),
			num(worst) != "1"})
	}
	return out
}

// fitBlocks is the fit table of one set of fits (the terminal's columns),
// why each failed form failed, the recommendation and the parameters.
func fitBlocks(label string, f *fit.Results, u figures.Units, ru fit.ReportUnits) []block {
	at := func(t, p float64) string { return fmt.Sprintf("%s K, %s %s", num(t), num(u.P(p)), u.Pressure) }
	caption := fmt.Sprintf("Fits to the grid (k in %s)", clean(f.KUnits))
	if label != "" {
		caption = fmt.Sprintf("Fits to %s (k in %s)", label, clean(f.KUnits))
	}
	t := &table{Caption: caption, Header: []string{"form", "max error / %", "rms error / %", "worst point",
		"held-out max / %", "held-out worst point", "parameters", "status"}}
	reps := f.Reports()
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		r := reps[n]
		status, class := "ok", ""
		switch {
		case n == f.Recommended:
			status, class = "recommended", "recommended"
		case r.Failed:
			status, class = "failed", "failed"
		}
		held, heldAt := "-", "-"
		if h := r.HeldOut; h != nil {
			held, heldAt = num(h.MaxErrorPct), at(h.WorstT, h.WorstP)+" ("+h.Method+")"
		}
		t.Rows = append(t.Rows, []cell{{Text: string(n), Class: class}, {Text: num(r.MaxErrorPct), Num: true}, {Text: num(r.RMSErrorPct), Num: true},
			{Text: at(r.WorstT, r.WorstP)}, {Text: held, Num: true}, {Text: heldAt}, {Text: fmt.Sprint(r.NParams), Num: true}, {Text: status}})
	}
	for _, n := range slices.Sorted(maps.Keys(f.Errors)) {
		t.Rows = append(t.Rows, []cell{{Text: string(n), Class: "failed"}, {Text: "-"}, {Text: "-"}, {Text: "-"}, {Text: "-"}, {Text: "-"}, {Text: "-"}, {Text: "not fitted"}})
	}
	blocks := []block{{Kind: "table", Table: t}}
	var notes []string
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		if r := reps[n]; r.Failed {
			notes = append(notes, fmt.Sprintf("%s failed: %s", n, clean(r.FailReason)))
		}
	}
	for _, n := range slices.Sorted(maps.Keys(f.Errors)) {
		notes = append(notes, fmt.Sprintf("%s could not be fitted: %s", n, clean(f.Errors[n])))
	}
	for _, d := range departures(f) {
		notes = append(notes, d.text)
	}
	if len(notes) > 0 {
		blocks = append(blocks, list(notes))
	}
	if f.Recommended != "" {
		blocks = append(blocks, para("Recommended: %s (%s).", f.Recommended, clean(f.Reason)))
	} else {
		blocks = append(blocks, para("No form recommended: none meets the tolerance on the grid and between its points."))
	}
	pt := &table{Caption: fmt.Sprintf("Parameters (Ea in %s; A in k units, low-pressure A in k units × cm3 molecule-1)", ru.Energy),
		Header: []string{"form", "parameters"}}
	for _, n := range fit.Forms {
		if form := f.Form(n); form != nil {
			pt.Rows = append(pt.Rows, []cell{{Text: string(n)}, {Text: clean(form.DescribeIn(ru))}})
		}
	}
	if len(pt.Rows) > 0 {
		blocks = append(blocks, block{Kind: "table", Table: pt})
	}
	return blocks
}

// figureCaptions say what each figure of internal/figures shows.
var figureCaptions = map[string]string{
	figures.FalloffPlot:   "falloff curves, k/k∞ against pressure at the temperatures shown; points: master equation, lines: the recommended fit.",
	figures.LimitsPlot:    "the limits k∞ and k0 against 1000/T, each in its own unit, with the limits of the fitted falloff form.",
	figures.KvsTPlot:      "k against 1000/T at up to five pressures; points: master equation, lines: the recommended fit.",
	figures.KvsPPlot:      "k against pressure at several temperatures; points: the table, lines: the recommended fit.",
	figures.ResidualsPlot: "residuals of the recommended fit, 100·(k_fit/k − 1) in %, over the grid.",
	figures.FcentPlot:     "Fcent(T) of the master equation, and of the Troe fit if there is one.",
	figures.MicroPlot:     "RRKM k(E) of the main channel, in s-1, against the energy above the reactant's ground state in cm-1.",
	figures.DensityPlot:   "the reactant's density of states ρ(E), in states per cm-1.",
}

// figureSection inlines each SVG figure with its caption.
func figureSection(files []job.File) (section, error) {
	s := section{ID: "figures", Heading: "Figures"}
	for _, f := range files {
		if !strings.HasSuffix(f.Name, ".svg") {
			continue
		}
		svg, err := inlineSVG(f.Name, f.Data)
		if err != nil {
			return s, &job.NumericalError{Err: err}
		}
		base := path.Base(f.Name)
		caption, ok := figureCaptions[base]
		if !ok {
			caption = "as written to the SVG file."
		}
		id := "fig-" + strings.TrimSuffix(base, ".svg")
		s.Blocks = append(s.Blocks, block{Kind: "figure", Figure: &figure{ID: id, File: clean(base), Caption: caption, SVG: svg}})
	}
	return s, nil
}

// mechanismSection shows the mechanism entries as written: reactions.yaml
// and reactions.txt (every entry's recommended form) when they were
// written, else each form's file.
func mechanismSection(files []job.File) section {
	s := section{ID: "mechanism", Heading: "Mechanism entries"}
	var shown []job.File
	for _, f := range files {
		if f.Name == "reactions.yaml" || f.Name == "reactions.txt" {
			shown = append(shown, f)
		}
	}
	if len(shown) == 0 {
		for _, f := range files {
			if strings.HasPrefix(f.Name, "reactions-") && (strings.HasSuffix(f.Name, ".yaml") || strings.HasSuffix(f.Name, ".txt")) {
				shown = append(shown, f)
			}
		}
	}
	switch {
	case len(shown) == 0 && len(files) == 0:
		s.Blocks = append(s.Blocks, para("No mechanism files were rendered with this report."))
	case len(shown) == 0:
		s.Blocks = append(s.Blocks, para("No mechanism entries were written: no fitted form meets the tolerance (--write-failed writes the best form, marked FAILED)."))
	default:
		s.Blocks = append(s.Blocks, para("As written to the files, in the units of the files (stated in each file's units block or REACTIONS line)."))
	}
	for _, f := range shown {
		s.Blocks = append(s.Blocks, pre(f.Name, clean(string(f.Data))))
	}
	return s
}
