package uncertainty

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// UserFieldKey is the key of the extra field Annotate adds to a Cantera
// YAML entry.
const UserFieldKey = "rate-uncertainty"

// Annotate writes the result's uncertainty into the mechanism files of r,
// the rates result of the same file (job.Network.Rates, forward): header
// lines with the inputs, f(T) at each grid temperature (the largest over
// the pressures) and its fit f(T) = f298·exp(|g·(1/T − 1/298 K)|), their
// upper envelope (FitFactor); and, when
// the mechanism has one entry, the fit in the entry's comment and as
// rate-uncertainty: {f298, g, T-range, fit-deviation} in its Cantera YAML
// entry (g in K, T-range in K). With competing channels f(T) is of the
// total rate coefficient, and only the header says so.
func (res *Result) Annotate(r *job.RatesResult) {
	var ins []string
	for _, in := range res.Inputs {
		s := fmt.Sprintf("%s (%s, sd %s", in.Path, in.Distribution, g3(in.SD))
		switch {
		case in.Relative:
			s += " in ln x)"
		case strings.Contains(in.Sensitivity, " per "):
			s += " " + in.NominalUnit + ")"
		default:
			s += ")"
		}
		ins = append(ins, s)
	}
	r.Notes = append(r.Notes, fmt.Sprintf("Uncertainty: Monte Carlo over %d samples (seed %d) of %s", res.Samples, res.Seed, strings.Join(ins, "; ")))
	var fs []string
	for i, t := range res.Temperatures {
		fs = append(fs, g4(t)+" K "+g3(res.FactorT[i]))
	}
	what := "k"
	if len(r.Entries) > 1 {
		what = "the total k of the channels"
	}
	r.Notes = append(r.Notes, fmt.Sprintf("Uncertainty factor f = sqrt(k97.5%%/k2.5%%) of %s, largest over the pressures: %s", what, strings.Join(fs, ", ")))
	fit := res.Factor
	line := fmt.Sprintf("Fitted f(T) = %s exp(|%s K (1/T - 1/298 K)|), their upper envelope: nowhere below them, at most a factor %s above", g3(fit.F298), g3(fit.G), g3(fit.MaxDeviation))
	if fit.TMin > TRef || fit.TMax < TRef {
		line += fmt.Sprintf(" (298 K lies outside %s-%s K: f298 is extrapolated)", g4(fit.TMin), g4(fit.TMax))
	}
	r.Notes = append(r.Notes, line)
	if len(r.Entries) != 1 {
		return
	}
	e := &r.Entries[0]
	e.Note = fmt.Sprintf("uncertainty factor f(T) = %s exp(|%s K (1/T - 1/298 K)|)", g3(fit.F298), g3(fit.G))
	e.Fields = append(e.Fields, export.UserField{Key: UserFieldKey, Values: []export.UserValue{
		{Name: "f298", Numbers: []float64{round3(fit.F298)}},
		{Name: "g", Numbers: []float64{round3(fit.G)}},
		{Name: "T-range", Numbers: []float64{fit.TMin, fit.TMax}},
		{Name: "fit-deviation", Numbers: []float64{round3(fit.MaxDeviation)}},
	}})
}

// g3 writes x with 3 significant digits.
func g3(x float64) string { return strconv.FormatFloat(x, 'g', 3, 64) }

// g4 writes x with 4 significant digits (temperatures).
func g4(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// round3 rounds x to 3 significant digits, as the comments write it.
func round3(x float64) float64 {
	v, _ := strconv.ParseFloat(g3(x), 64)
	return v
}
