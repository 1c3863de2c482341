package main

import (
	"errors"
	"fmt"
	"os"
	"strings"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

type fitOptions struct {
	json, quiet  bool
	forms        []string
	tolerancePct float64
	order        string // N_TxN_P for Chebyshev, "" = automatic
}

func (o *fitOptions) addFlags(fs *pflag.FlagSet) {
	fs.BoolVar(&o.json, "json", false, "print the fits as one JSON object")
	fs.StringSliceVar(&o.forms, "forms", []string{"arrhenius", "lindemann", "troe", "sri", "plog", "chebyshev"},
		"forms to fit, comma-separated: arrhenius, lindemann, troe, sri, plog, chebyshev")
	fs.Float64Var(&o.tolerancePct, "tolerance", 1, "largest acceptable fit error in per cent")
	fs.StringVar(&o.order, "chebyshev-order", "", `Chebyshev order N_T x N_P, e.g. "7x4" (default: the smallest that meets the tolerance)`)
	fs.BoolVarP(&o.quiet, "quiet", "q", false, "no chatter on stderr")
}

func (o *fitOptions) validate(args []string) error {
	if len(args) != 1 {
		return usagef("fit takes one table file (CSV with columns T, P, k and units in the header), got %d arguments", len(args))
	}
	for _, f := range o.forms {
		known := false
		for _, k := range fit.Forms {
			known = known || f == k
		}
		if !known {
			return usagef("--forms: unknown form %q (use %s)", f, strings.Join(fit.Forms, ", "))
		}
	}
	if !(o.tolerancePct > 0) || o.tolerancePct > 100 {
		return usagef("--tolerance %v: give a percentage between 0 and 100", o.tolerancePct)
	}
	_, _, err := o.chebyshevOrder()
	return err
}

func (o *fitOptions) chebyshevOrder() (nT, nP int, err error) {
	if o.order == "" {
		return 0, 0, nil
	}
	if _, err := fmt.Sscanf(strings.ToLower(o.order), "%dx%d", &nT, &nP); err != nil || nT < 1 || nP < 1 {
		return 0, 0, usagef("--chebyshev-order %q: write N_TxN_P with positive whole numbers, e.g. 7x4", o.order)
	}
	return nT, nP, nil
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
	nT, nP, _ := o.chebyshevOrder()
	res, err := fit.FitAll(t, o.forms, fit.Options{Tolerance: o.tolerancePct / 100, ChebyshevNT: nT, ChebyshevNP: nP})
	if res == nil || errors.Is(err, fit.ErrNoForm) {
		if err == nil {
			err = errors.New("no form could be fitted")
		}
		return &numericalError{fmt.Errorf("%s: %w", path, err)}
	} else if err != nil {
		return err
	}
	if o.json {
		return writeJSON(s.out, res)
	}
	ts, ps := t.Temperatures(), t.Pressures()
	fmt.Fprintf(s.out, "%s: %d points, %d temperatures %s-%s K, %d pressures %s-%s bar, k in %s\n\n", path, len(t.Points),
		len(ts), num(ts[0]), num(ts[len(ts)-1]), len(ps), num(ps[0]/units.BarPa), num(ps[len(ps)-1]/units.BarPa), t.KUnits)
	if err := renderTable(s.out, []string{"form", "max error / %", "rms error / %", "worst point", "parameters", ""}, fitRows(res)); err != nil {
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
			fmt.Fprintf(s.out, "  %-10s %s\n", name, describeForm(form))
		}
	}
	return nil
}

// describeForm prints a form's parameters on one line.
func describeForm(form any) string {
	arr := func(a fit.Arrhenius) string { return fmt.Sprintf("A=%s n=%s Ea/R=%s K", num(a.A), num(a.N), num(a.Ta)) }
	switch f := form.(type) {
	case *fit.Arrhenius:
		return arr(*f)
	case *fit.Falloff:
		s := "high: " + arr(f.High) + "; low: " + arr(f.Low)
		if t := f.Troe; t != nil {
			s += fmt.Sprintf("; Troe a=%s T3=%s T1=%s", num(t.A), num(t.T3), num(t.T1))
			if t.HasT2 {
				s += " T2=" + num(t.T2)
			}
		}
		if r := f.SRI; r != nil {
			s += fmt.Sprintf("; SRI a=%s b=%s c=%s", num(r.A), num(r.B), num(r.C))
			if r.D != 0 {
				s += fmt.Sprintf(" d=%s e=%s", num(r.D), num(r.E))
			}
		}
		return s
	case *fit.PLOG:
		n := 0
		for _, e := range f.Entries {
			n += len(e.Terms)
		}
		return fmt.Sprintf("%d pressures, %d Arrhenius terms", len(f.Entries), n)
	case *fit.Chebyshev:
		return fmt.Sprintf("%d x %d coefficients over %s-%s K, %s-%s bar", len(f.Coef), len(f.Coef[0]),
			num(f.Tmin), num(f.Tmax), num(f.Pmin/units.BarPa), num(f.Pmax/units.BarPa))
	}
	return fmt.Sprintf("%T", form)
}
