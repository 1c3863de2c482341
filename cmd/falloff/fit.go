package main

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type fitOptions struct {
	json, quiet  bool
	writeFailed  bool           // --write-failed
	formNames    []string       // --forms as given
	forms        []fit.FormName // formNames, checked by validate
	tolerancePct float64
	order        string // N_TxN_P for Chebyshev, "" = automatic
	nT, nP       int    // order, parsed by validate; 0 = automatic
	plots        string // --plots folder, "" = none

	// Fixed parameters, PLOG and the held-out error (docs/fitting.md).
	fixN, fixLowN, fixHighN, fixFcent optFloat
	low, high                         string // "A n Ea" in the files' units, "" = fitted
	plogMaxN                          float64
	plogOneTerm                       bool
	groupTolPct                       float64
	// Mechanism files (--out).
	out                 string
	reactants, products []string
	molecularity        int // --order
	energyUnit          string
	disp                display
	units               export.Units // parsed by validate
}

func (o *fitOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print the fits as one JSON object")
	fs.StringSliceVar(&o.formNames, "forms", []string{"arrhenius", "lindemann", "troe", "sri", "plog", "chebyshev"},
		"forms to fit, comma-separated: arrhenius, lindemann, troe, sri, plog, chebyshev")
	fs.Float64Var(&o.tolerancePct, "tolerance", 1, "largest acceptable fit error in per cent")
	fs.StringVar(&o.order, "chebyshev-order", "", `Chebyshev order N_T x N_P, e.g. "7x4" (default: the smallest that meets the tolerance on the table and held out)`)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter on stderr")
	fs.StringVar(&o.plots, "plots", "", "write SVG figures (k against 1000/T and against P with the recommended form, its residuals) to this directory")
	fs.Var(&o.fixN, "fix-n", "fix the temperature exponent n of the arrhenius form, of every PLOG term and of the fitted falloff limits")
	fs.Var(&o.fixLowN, "fix-low-n", "fix n of the low-pressure limit k0 alone")
	fs.Var(&o.fixHighN, "fix-high-n", "fix n of the high-pressure limit k∞ alone")
	fs.Var(&o.fixFcent, "fix-fcent", "fix the Troe broadening to this constant Fcent (0 < Fcent ≤ 1)")
	fs.StringVar(&o.low, "low", "", `fix k0 to "A n Ea" in the mechanism files' units (--quantity, --energy-unit), e.g. GRI-Mech's LOW "2.62e33 -4.76 2440"`)
	fs.StringVar(&o.high, "high", "", `fix k∞ to "A n Ea" in the mechanism files' units, e.g. "1.39e16 -0.534 536"`)
	fs.Float64Var(&o.plogMaxN, "plog-max-n", 0, "bound |n| of every PLOG term (0: no bound)")
	fs.BoolVar(&o.plogOneTerm, "plog-one-term", false, "one Arrhenius term at every PLOG pressure, never two")
	fs.Float64Var(&o.groupTolPct, "group-tolerance", 100*fit.DefaultGroupTol, "pressures within this many per cent are one PLOG entry (measured data); also groups rows and columns for the held-out error")
	fs.BoolVar(&o.writeFailed, "write-failed", false, "with --out, write failed fits too (marked FAILED), and reactions.yaml with the best form when none meets the tolerance")
	fs.StringVarP(&o.out, "out", "o", "", "write reactions.yaml and .txt (recommended form) and reactions-FORM.yaml and .txt (each fitted form), and report.html, to this directory")
	fs.StringSliceVar(&o.reactants, "reactants", nil, "species names for the equation of the files, comma-separated (default R, or R1,R2 for a second-order k)")
	fs.StringSliceVar(&o.products, "products", nil, "product names for the equation of the files (default P)")
	fs.IntVar(&o.molecularity, "order", 0, "molecularity of the reaction as written, 1 or 2 (default: from the table's k units)")
	fs.StringVar(&o.energyUnit, "energy-unit", "cal/mol", "activation-energy unit of the files and of --low, --high: cal/mol, kcal/mol, J/mol, kJ/mol or K")
	o.disp.addFlags(fs) // --pressure-unit; --quantity: of the files, of --low and --high
}

func (o *fitOptions) validate(args []string) error {
	if len(args) != 1 {
		return usagef("fit takes one table file (CSV with columns T, P, k and units in the header), got %d arguments", len(args))
	}
	o.forms = make([]fit.FormName, 0, len(o.formNames))
	for _, name := range o.formNames {
		f, err := fit.ParseFormName(name)
		if err != nil {
			return usagef("--forms: %v", err)
		}
		o.forms = append(o.forms, f)
	}
	if len(o.forms) == 0 {
		return usagef("--forms: no form given (hint: name at least one of %s, comma-separated)", strings.Join(fitFormNames(), ", "))
	}
	if !(o.tolerancePct > 0) || o.tolerancePct > 100 {
		return usagef("--tolerance %v: give a percentage between 0 and 100", o.tolerancePct)
	}
	o.nT, o.nP = 0, 0
	if o.order != "" {
		var nT, nP int
		if _, err := fmt.Sscanf(strings.ToLower(o.order), "%dx%d", &nT, &nP); err != nil || nT < 1 || nP < 1 {
			return usagef("--chebyshev-order %q: write N_TxN_P with positive whole numbers, e.g. 7x4", o.order)
		}
		o.nT, o.nP = nT, nP
	}
	if o.fixFcent.set && !(o.fixFcent.v > 0 && o.fixFcent.v <= 1) {
		return usagef("--fix-fcent %v: give a value above 0 and at most 1", o.fixFcent.v)
	}
	if !(o.plogMaxN >= 0) || math.IsInf(o.plogMaxN, 0) {
		return usagef("--plog-max-n %v: give a positive bound on |n|, or 0 for none", o.plogMaxN)
	}
	if o.fixN.set && o.plogMaxN > 0 && math.Abs(o.fixN.v) > o.plogMaxN {
		return usagef("--fix-n %v is outside --plog-max-n %v", o.fixN.v, o.plogMaxN)
	}
	if !(o.groupTolPct >= 0) || o.groupTolPct >= 100 {
		return usagef("--group-tolerance %v: give a percentage from 0 (equal values only) below 100", o.groupTolPct)
	}
	if o.molecularity != 0 && o.molecularity != 1 && o.molecularity != 2 {
		return usagef("--order %d: give 1 (k in s-1) or 2 (k in cm3/mol/s)", o.molecularity)
	}
	var err error
	if err := o.disp.validate(); err != nil {
		return err
	}
	if o.units, err = export.ParseUnits(o.energyUnit, string(o.disp.Quantity.Quantity)); err != nil {
		return usagef("%v", err)
	}
	if o.out != "" && o.plots != "" && filepath.Clean(o.out) == filepath.Clean(o.plots) {
		return usagef("--out and --plots name the same folder %s: give each its own", o.out)
	}
	for _, names := range []struct {
		flag string
		list []string
	}{{"--reactants", o.reactants}, {"--products", o.products}} {
		for _, n := range names.list {
			if n == "" || strings.ContainsAny(n, " \t=<>+!/") {
				return usagef("%s %q: a species name cannot be empty or hold spaces or = < > + ! /", names.flag, n)
			}
		}
	}
	return nil
}

// fitFormNames lists the forms fit knows, for messages.
func fitFormNames() []string {
	var names []string
	for _, f := range fit.Forms {
		names = append(names, string(f))
	}
	return names
}

// optFloat is a float flag that knows whether it was given.
type optFloat struct {
	v   float64
	set bool
}

func (f *optFloat) String() string {
	if !f.set {
		return ""
	}
	return strconv.FormatFloat(f.v, 'g', -1, 64)
}

func (f *optFloat) Set(s string) error {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%q is not a finite number", s)
	}
	f.v, f.set = v, true
	return nil
}

func (f *optFloat) Type() string { return "number" }

// ptr returns the value, nil if the flag was not given.
func (f *optFloat) ptr() *float64 {
	if !f.set {
		return nil
	}
	v := f.v
	return &v
}

func runFitCmd(args []string, s streams) error {
	var o fitOptions
	fs := newFlags("fit", "fit [flags] TABLE.csv",
		"  falloff rates ring.yaml --csv > grid.csv\n"+
			"  falloff fit grid.csv --forms troe,chebyshev\n"+
			"  # a measured table: header T/K,P/atm,k/s-1 (optional 4th column uncertainty/%)\n"+
			"  falloff fit measured.csv --json\n"+
			"  # mechanism files, with k∞ fixed and a constant Fcent\n"+
			"  falloff fit h_ch3.csv --high \"1.39e16 -0.534 536\" --fix-fcent 0.6 --reactants H,CH3 --products CH4 --out mech", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	return runFit(o, args[0], s)
}

func runFit(o fitOptions, path string, s streams) error {
	var set, plotSet export.FileSet // --out and --plots, each published whole
	defer set.Release()
	defer plotSet.Release()
	if o.out != "" {
		if err := set.ReserveFolder(o.out); err != nil {
			return err
		}
	}
	if o.plots != "" {
		if err := plotSet.ReserveFolder(o.plots); err != nil {
			return err
		}
	}
	// At most fit.MaxCSVBytes: /dev/zero or a huge file ends with one line.
	t, src, err := fit.ReadCSVFile(path)
	if err != nil {
		return err
	}
	rx, err := o.reaction(t)
	if err != nil {
		return err
	}
	opt := fit.Options{Tolerance: o.tolerancePct / 100, ChebyshevNT: o.nT, ChebyshevNP: o.nP,
		GroupTol: o.groupTolPct / 100, PLOGMaxN: o.plogMaxN, PLOGOneTerm: o.plogOneTerm,
		Fix: fit.Fix{N: o.fixN.ptr(), LowN: o.fixLowN.ptr(), HighN: o.fixHighN.ptr(), Fcent: o.fixFcent.ptr(), Low: rx.low, High: rx.high}}
	if o.groupTolPct == 0 {
		opt.GroupTol = -1 // equal values only
	}
	res, err := fit.FitAll(t, o.forms, opt)
	if res == nil || errors.Is(err, fit.ErrNoForm) {
		if err == nil {
			err = errors.New("no form could be fitted")
		}
		return &job.NumericalError{Err: fmt.Errorf("%s: %w", path, err)}
	} else if err != nil {
		return err
	}
	if o.plots != "" {
		figs, err := figures.Table(t, res)
		if err != nil {
			return err
		}
		for _, f := range figs {
			plotSet.Add(filepath.Join(o.plots, f.Name), f.Data)
		}
		if _, err := plotSet.Commit(s.ctx); err != nil {
			return err
		}
	}
	var files []string
	if o.out != "" {
		if files, err = writeFitFiles(&set, o, path, src, t, res, rx, s); err != nil {
			return err
		}
	}
	if o.json {
		return writeJSON(s.out, fitJSON{res, files})
	}
	ts, ps := t.Temperatures(), t.Pressures()
	fmt.Fprintf(s.out, "%s: %d points, %d temperatures %s-%s K, %d pressures %s-%s %s, k in %s\n\n", path, len(t.Points),
		len(ts), num(ts[0]), num(ts[len(ts)-1]), len(ps), num(o.disp.P(ps[0])), num(o.disp.P(ps[len(ps)-1])), o.disp.Pressure, t.KUnits)
	if err := printFits(s, res, o.disp); err != nil {
		return err
	}
	if err := printFitChecks(s, t, res); err != nil {
		return err
	}
	ru := fit.ReportUnits{Energy: string(o.units.Energy), EnergyPerK: o.units.EnergyFactor(),
		Pressure: o.disp.Pressure, PaPerUnit: o.disp.PaPerUnit}
	fmt.Fprintf(s.out, "\nparameters (Ea in %s, --energy-unit; A in k units, low-pressure A in k units × cm3 molecule-1):\n", o.units.Energy)
	for _, name := range fit.Forms {
		if form := res.Form(name); form != nil {
			fmt.Fprintf(s.out, "  %-10s %s\n", name, form.DescribeIn(ru))
		}
	}
	if len(files) > 0 {
		fmt.Fprintln(s.out, "\nwrote:")
		for _, f := range files {
			fmt.Fprintln(s.out, "  "+f)
		}
	}
	return nil
}

// printFits writes the table of fit reports and, under it, why each
// failed form failed and which form is recommended. Worst points are in
// the display units d.
func printFits(s streams, res *fit.Results, d display) error {
	if err := renderTable(s.out, []string{"form", "max error / %", "rms error / %", "worst point",
		"held-out max / %", "held-out worst point", "parameters", "status"}, fitRows(res, d)); err != nil {
		return err
	}
	reps := res.Reports()
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		if r := reps[n]; r.Failed && n != res.Recommended {
			fmt.Fprintf(s.out, "%s failed: %s\n", n, r.FailReason)
		}
	}
	for _, n := range slices.Sorted(maps.Keys(res.Errors)) {
		fmt.Fprintf(s.out, "%s could not be fitted: %s\n", n, res.Errors[n])
	}
	for _, f := range []*fit.FalloffResult{res.Lindemann, res.Troe, res.SRI} {
		if f == nil || len(f.LimitDeparture) == 0 {
			continue
		}
		how := "held to Arrhenius fits of the computed k0 and k∞"
		if f.LimitsRefined {
			how = "refitted (--free-limits)"
		}
		worst, at := 1.0, 0.0
		for _, d := range f.LimitDeparture {
			for _, r := range []float64{d.K0Ratio, d.KInfRatio} {
				if x := math.Max(r, 1/r); x > worst {
					worst, at = x, d.T
				}
			}
		}
		fmt.Fprintf(s.out, "%s: limits %s; exported k0 and k∞ within a factor %s of the computed ones (worst at %s K)\n",
			f.Name(), how, num(worst), num(at))
	}
	var err error
	if res.Recommended != "" {
		_, err = fmt.Fprintf(s.out, "recommended: %s (%s)\n", res.Recommended, res.Reason)
	} else {
		_, err = fmt.Fprintln(s.out, "no form recommended: none meets the tolerance on the grid and between its points")
	}
	return err
}

// fitRows returns the fit report as table rows: fitted forms sorted by
// name, then the forms that could not be fitted. The status column says
// recommended, failed (the reasons follow the table, printFits) or ok.
func fitRows(res *fit.Results, d display) [][]string {
	at := func(t, p float64) string { return fmt.Sprintf("%s K, %s %s", num(t), num(d.P(p)), d.Pressure) }
	reps := res.Reports()
	var rows [][]string
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		r := reps[n]
		status := "ok"
		switch {
		case n == res.Recommended:
			status = "recommended"
		case r.Failed:
			status = "failed"
		}
		held, heldAt := "-", "-"
		if h := r.HeldOut; h != nil {
			held, heldAt = num(h.MaxErrorPct), at(h.WorstT, h.WorstP)+" ("+h.Method+")"
		}
		rows = append(rows, []string{string(n), num(r.MaxErrorPct), num(r.RMSErrorPct), at(r.WorstT, r.WorstP),
			held, heldAt, fmt.Sprint(r.NParams), status})
	}
	for _, n := range slices.Sorted(maps.Keys(res.Errors)) {
		rows = append(rows, []string{string(n), "-", "-", "-", "-", "-", "-", "not fitted"})
	}
	return rows
}

// fitJSON is the JSON of `fit`: the fits (docs/design.md §8) and the files
// written with --out.
type fitJSON struct {
	*fit.Results
	Files []string `json:"files_written,omitempty"`
}

// fitReaction is what the mechanism files and the fixed limits need to
// know of the fitted reaction: its molecularity, the factor from the
// table's k units to per-molecule centimetre units (in which pkg/export
// reads forms), the species, and --low, --high in the table's units.
type fitReaction struct {
	order               int
	toMolecule          float64
	reactants, products []string
	low, high           *fit.Arrhenius
}

// reaction works out the reaction of table t for --out, --low and --high
// (nothing is needed without them).
func (o *fitOptions) reaction(t *fit.Table) (fitReaction, error) {
	var rx fitReaction
	if o.out == "" && o.low == "" && o.high == "" {
		return rx, nil
	}
	order, f, err := fit.RateUnits(t.KUnits)
	if err != nil {
		return rx, fmt.Errorf("%s: %w (needed for --out, --low and --high)", t.Name, err)
	}
	switch {
	case o.molecularity != 0 && o.molecularity != order:
		return rx, usagef("--order %d, but k in %s is of order %d (hint: leave --order out, or fix the table's k unit)", o.molecularity, t.KUnits, order)
	case order > 2:
		return rx, fmt.Errorf("%s: k in %s is of order %d; mechanism files take reactions of order 1 or 2 (a falloff form adds the third body itself)", t.Name, t.KUnits, order)
	}
	rx.order, rx.toMolecule = order, f
	rx.reactants, rx.products = o.reactants, o.products
	if len(rx.reactants) == 0 {
		rx.reactants = map[int][]string{1: {"R"}, 2: {"R1", "R2"}}[order]
	}
	if len(rx.products) == 0 {
		rx.products = []string{"P"}
	}
	if len(rx.reactants) != order {
		return rx, usagef("--reactants lists %d species, but k in %s is of order %d", len(rx.reactants), t.KUnits, order)
	}
	// A of the files' units → per molecule → the table's units.
	perMol := func(p int) float64 {
		if o.units.Quantity == export.Molecule {
			return 1
		}
		return math.Pow(units.Avogadro, float64(p))
	}
	for _, l := range []struct {
		flag, text string
		powers     int // concentration powers of A in the files
		dst        **fit.Arrhenius
	}{{"--low", o.low, order, &rx.low}, {"--high", o.high, order - 1, &rx.high}} {
		if l.text == "" {
			continue
		}
		fs := strings.Fields(l.text)
		var v [3]float64
		if len(fs) == 3 {
			for i, s := range fs {
				if v[i], err = strconv.ParseFloat(s, 64); err != nil || !finiteF(v[i]) {
					break
				}
			}
		}
		if len(fs) != 3 || err != nil || !finiteF(v[0], v[1], v[2]) || !(v[0] > 0) {
			return rx, usagef(`%s %q: give "A n Ea", three numbers with A > 0, in the files' units (%s, Ea in %s)`, l.flag, l.text, o.units.RateLabel(l.powers), o.energyUnit)
		}
		*l.dst = &fit.Arrhenius{A: v[0] / perMol(l.powers) / f, N: v[1], Ta: v[2] / o.units.EnergyFactor()}
	}
	return rx, nil
}

// finiteF reports whether every value is finite.
func finiteF(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// writeFitFiles renders the mechanism files of the fits (job.TableFiles)
// into the reserved set, commits it and returns the paths written.
func writeFitFiles(set *export.FileSet, o fitOptions, path string, src []byte, t *fit.Table, res *fit.Results, rx fitReaction, s streams) ([]string, error) {
	files, err := job.TableFiles(path, src, t, res,
		job.TableReaction{Order: rx.order, ToMolecule: rx.toMolecule, Reactants: rx.reactants, Products: rx.products},
		job.FileOptions{Units: o.units, WriteFailed: o.writeFailed})
	if err != nil {
		return nil, err
	}
	for _, f := range files {
		set.Add(filepath.Join(o.out, f.Name), f.Data)
	}
	if !o.quiet && !slices.ContainsFunc(files, func(f job.File) bool { return f.Name == "reactions.yaml" }) {
		fmt.Fprintln(s.err, "warning: no reactions.yaml written: no fitted form meets the tolerance (hint: see the fit table; --write-failed writes the best form marked FAILED, or raise --tolerance)")
	}
	page, err := fitReport(o, src, t, res, files, set.Paths())
	if err != nil {
		return nil, err
	}
	set.Add(filepath.Join(o.out, htmlReportName), page)
	return set.Commit(s.ctx)
}

// printFitChecks prints what the error on the fitted points cannot say:
// each form's held-out error (between the table's points) and, for a
// table with uncertainties, χ² per degree of freedom against them; and
// the PLOG pressures with too few temperatures for an entry.
func printFitChecks(s streams, t *fit.Table, res *fit.Results) error {
	reps := res.Reports()
	header := []string{"form", "held-out max / %", "held-out rms / %", "held-out points", "method"}
	if t.Weighted() {
		header = append(header, "chi2/dof", "dof", "within scatter")
	}
	var rows [][]string
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		r := reps[n]
		row := []string{string(n), "-", "-", "-", "none (no extra points; too few rows and columns to leave out)"}
		if h := r.HeldOut; h != nil {
			row = []string{string(n), num(h.MaxErrorPct), num(h.RMSErrorPct), fmt.Sprint(h.Points), h.Method}
		}
		if t.Weighted() {
			if sc := r.Scatter; sc != nil {
				within := "no"
				if sc.WithinScatter {
					within = "yes"
				}
				row = append(row, num(sc.Chi2PerDOF), fmt.Sprint(sc.DOF), within)
			} else {
				row = append(row, "-", "-", "-")
			}
		}
		rows = append(rows, row)
	}
	if len(rows) == 0 {
		return nil
	}
	fmt.Fprintln(s.out, "\nbetween the points (held out: extra points, or each interior temperature row and pressure column left out and refitted):")
	if err := renderTable(s.out, header, rows); err != nil {
		return err
	}
	if p := res.PLOG; p != nil && len(p.Skipped) > 0 {
		var ps []string
		for _, sk := range p.Skipped {
			ps = append(ps, fmt.Sprintf("%s bar (%s)", num(sk.P/units.BarPa), sk.Reason))
		}
		fmt.Fprintf(s.out, "plog: pressures without an entry, interpolated: %s\n", strings.Join(ps, "; "))
	}
	return nil
}
