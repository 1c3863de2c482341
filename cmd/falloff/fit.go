package main

import (
	"errors"
	"fmt"
	"maps"
	"os"
	"slices"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type fitOptions struct {
	json, quiet  bool
	formNames    []string       // --forms as given
	forms        []fit.FormName // formNames, checked by validate
	tolerancePct float64
	order        string // N_TxN_P for Chebyshev, "" = automatic
	nT, nP       int    // order, parsed by validate; 0 = automatic
}

func (o *fitOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print the fits as one JSON object")
	fs.StringSliceVar(&o.formNames, "forms", []string{"arrhenius", "lindemann", "troe", "sri", "plog", "chebyshev"},
		"forms to fit, comma-separated: arrhenius, lindemann, troe, sri, plog, chebyshev")
	fs.Float64Var(&o.tolerancePct, "tolerance", 1, "largest acceptable fit error in per cent")
	fs.StringVar(&o.order, "chebyshev-order", "", `Chebyshev order N_T x N_P, e.g. "7x4" (default: the smallest that meets the tolerance)`)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter on stderr")
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
	return nil
}

func runFitCmd(args []string, s streams) error {
	var o fitOptions
	fs := newFlags("fit", "fit [flags] TABLE.csv",
		"  falloff rates ring.yaml --csv > grid.csv\n"+
			"  falloff fit grid.csv --forms troe,chebyshev\n"+
			"  # a measured table: header T/K,P/atm,k/s-1 (optional 4th column uncertainty/%)\n"+
			"  falloff fit measured.csv --json", s)
	o.addFlags(fs)
	args, err := parseVerb(fs, args, o.validate)
	if err != nil {
		return err
	}
	return runFit(o, args[0], s)
}

func runFit(o fitOptions, path string, s streams) error {
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	t, err := fit.ReadCSV(path, f)
	if err != nil {
		return err
	}
	res, err := fit.FitAll(t, o.forms, fit.Options{Tolerance: o.tolerancePct / 100, ChebyshevNT: o.nT, ChebyshevNP: o.nP})
	if res == nil || errors.Is(err, fit.ErrNoForm) {
		if err == nil {
			err = errors.New("no form could be fitted")
		}
		return &job.NumericalError{Err: fmt.Errorf("%s: %w", path, err)}
	} else if err != nil {
		return err
	}
	if o.json {
		return writeJSON(s.out, res)
	}
	ts, ps := t.Temperatures(), t.Pressures()
	fmt.Fprintf(s.out, "%s: %d points, %d temperatures %s-%s K, %d pressures %s-%s bar, k in %s\n\n", path, len(t.Points),
		len(ts), num(ts[0]), num(ts[len(ts)-1]), len(ps), num(ps[0]/units.BarPa), num(ps[len(ps)-1]/units.BarPa), t.KUnits)
	if err := renderTable(s.out, fitHeader, fitRows(res)); err != nil {
		return err
	}
	if res.Recommended != "" {
		fmt.Fprintf(s.out, "recommended: %s (%s)\n", res.Recommended, res.Reason)
	} else {
		fmt.Fprintf(s.out, "no form meets the tolerance: %s\n", res.Reason)
	}
	fmt.Fprintln(s.out, "\nparameters (Ea as Ea/R in K; low-pressure A in k units × cm3 molecule-1):")
	for _, name := range fit.Forms {
		if form := res.Form(name); form != nil {
			fmt.Fprintf(s.out, "  %-10s %s\n", name, form.Describe())
		}
	}
	return nil
}

// fitHeader heads the table of fit reports.
var fitHeader = []string{"form", "max error / %", "rms error / %", "worst point", "parameters", ""}

// fitRows returns the fit report as table rows: fitted forms sorted by
// name, then the forms that failed, sorted by name.
func fitRows(res *fit.Results) [][]string {
	reps := res.Reports()
	var rows [][]string
	for _, n := range slices.Sorted(maps.Keys(reps)) {
		r := reps[n]
		mark := ""
		if n == res.Recommended {
			mark = "recommended"
		}
		rows = append(rows, []string{string(n), num(r.MaxErrorPct), num(r.RMSErrorPct),
			fmt.Sprintf("%s K, %s bar", num(r.WorstT), num(r.WorstP/units.BarPa)), fmt.Sprint(r.NParams), mark})
	}
	for _, n := range slices.Sorted(maps.Keys(res.Errors)) {
		rows = append(rows, []string{string(n), "-", "-", "failed: " + res.Errors[n], "-", ""})
	}
	return rows
}
