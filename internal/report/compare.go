package report

import (
	"crypto/sha256"
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// CompareFigure is the file name of the comparison figure in an output
// folder of `compare --out`.
const CompareFigure = "compare.svg"

// Compare is what the report of a comparison of energy-transfer models
// shows. Only Result is required.
type Compare struct {
	Result *job.CompareResult
	// Title is the input's title; Reaction its equation, e.g. "A -> B + C".
	Title, Reaction string
	// Input is the input file as read: echoed, with its SHA-256.
	Input []byte
	// Units are those of the terminal tables and the figure
	// (--pressure-unit, --quantity); the zero value means bar and per mol.
	Units figures.Units
	// Figures are the SVG figures (the falloff curves of every model).
	Figures []job.File
	// Files names the files written with the report.
	Files []string
	// Warnings are the input file's and the command's warnings.
	Warnings []string
}

// compareCaptions say what each figure of a comparison shows.
var compareCaptions = map[string]string{
	CompareFigure: "falloff curves k/k∞ against pressure under every energy-transfer model at the temperatures shown: " +
		"one colour per temperature, one dash pattern per model, each curve named in the legend.",
}

// CompareHTML renders the report of `falloff compare` as one
// self-contained HTML page: the job, the warnings, k/k∞, k and k0 under
// each energy-transfer model at the same collision rate, the figure, the
// input echoed and the caution. Numbers are formatted as the terminal
// prints them. An error is a *job.NumericalError.
func CompareHTML(r Compare) ([]byte, error) {
	res := r.Result
	u := withDefaults(r.Units)
	ku, k0u, pu := u.RateUnit(0), u.RateUnit(1), u.Pressure
	nT, nP := len(res.Temperatures), len(res.Pressures)
	if nT == 0 || nP == 0 || len(res.Models) == 0 || len(res.KInf) != nT {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %s: the result has no grid (%d temperatures, %d pressures, %d models)", FileName, clean(res.File), nT, nP, len(res.Models))}
	}
	title := clean(r.Title)
	if title == "" {
		title = "k(T,P)"
	}
	p := &page{Title: "Energy-transfer models: " + title, Reaction: clean(r.Reaction), Version: job.Version, Caution: job.Caution}
	var names []string
	for _, m := range res.Models {
		names = append(names, clean(m.Name))
	}
	what := "the reaction"
	if r.Reaction != "" {
		what = clean(r.Reaction)
	}
	p.Job = append(p.Job, fmt.Sprintf("falloff %s computed the pressure-dependent rate coefficient k(T,P) of %s from RRKM k(E) and the master equation under %d energy-transfer models "+
		"(%s) at the same collision rate and on the same grains, at %d temperatures from %s K to %s K and %d pressures from %s %s to %s %s.",
		job.Version, what, len(res.Models), strings.Join(names, ", "), nT, num(res.Temperatures[0]), num(res.Temperatures[nT-1]),
		nP, num(u.P(res.Pressures[0])), pu, num(u.P(res.Pressures[nP-1])), pu))
	if r.Input != nil {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s, SHA-256 %x (echoed in full below).", clean(res.File), sha256.Sum256(r.Input)))
	} else {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s.", clean(res.File)))
	}
	p.Job = append(p.Job, "The exponential-down models differ only in ⟨ΔE⟩down at 300 K (in cm-1, in the model's name); "+
		"the strong collider thermalises at every collision.")
	p.Job = append(p.Job, fmt.Sprintf("Units: k and k∞ in %s, k0 in %s, pressures in %s, temperatures in K; k/k∞ is dimensionless.", ku, k0u, pu))

	for _, w := range r.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}
	p.Warnings = append(p.Warnings, "The comparison skips the grain and ceiling convergence check: its numerical error is not known (`falloff rates` checks it for the file's own model).")

	ratio := &table{Caption: "k(T,P)/k∞ under each energy-transfer model (k∞ the thermal average of RRKM k(E), the same for every model)", Class: "nums",
		Header: []string{"T / K", "P / " + pu}}
	rates := &table{Caption: fmt.Sprintf("k(T,P) / %s under each energy-transfer model", ku),
		Header: []string{"T / K", "P / " + pu}}
	limits := &table{Caption: fmt.Sprintf("k∞ / %s, and k0 / %s under each energy-transfer model", ku, k0u),
		Header: []string{"T / K", "k∞ / " + ku}}
	for _, name := range names {
		ratio.Header = append(ratio.Header, name)
		rates.Header = append(rates.Header, name+" / "+ku)
		limits.Header = append(limits.Header, "k0 "+name+" / "+k0u)
	}
	for i, T := range res.Temperatures {
		for j, P := range res.Pressures {
			rr, kr := []string{num(T), num(u.P(P))}, []string{num(T), num(u.P(P))}
			for _, m := range res.Models {
				rr = append(rr, num(m.K[i][j]/res.KInf[i]))
				kr = append(kr, num(u.Rate(m.K[i][j], 0)))
			}
			ratio.Rows = append(ratio.Rows, numRow(rr...))
			rates.Rows = append(rates.Rows, numRow(kr...))
		}
		lr := []string{num(T), num(u.Rate(res.KInf[i], 0))}
		for _, m := range res.Models {
			lr = append(lr, num(u.Rate(m.K0[i], 1)))
		}
		limits.Rows = append(limits.Rows, numRow(lr...))
	}
	p.Sections = append(p.Sections,
		section{ID: "ratio", Heading: "k/k∞ under each model", Blocks: []block{
			para("The falloff curves side by side: at the same collision rate a weaker collider (smaller ⟨ΔE⟩down) activates less, so k/k∞ lies lower in the falloff region, " +
				"and the strong collider is the upper bound (Troe, J. Chem. Phys. 66, 4758, 1977)."),
			{Kind: "table", Table: ratio}}},
		section{ID: "rates", Heading: "k(T,P) under each model", Blocks: []block{{Kind: "table", Table: rates}}},
		section{ID: "limits", Heading: "Limits", Blocks: []block{
			para("k∞: the thermal average of RRKM k(E) on the master equation's grains, the same for every model; k0: the low-pressure, second-order limit k/[M] as [M] → 0, under each model."),
			{Kind: "table", Table: limits}}})
	figs, err := figureSection(r.Figures)
	if err != nil {
		return nil, err
	}
	recaption(&figs, compareCaptions)
	if len(figs.Blocks) > 0 {
		p.Sections = append(p.Sections, figs)
	}
	p.Sections = append(p.Sections, tailSections(res.File, r.Input, r.Files)...)
	return render(p)
}
