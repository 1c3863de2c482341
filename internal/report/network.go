package report

import (
	"crypto/sha256"
	"fmt"
	"slices"
	"strings"

	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// Network is what the report of a network's rates run shows. Only Result
// is required.
type Network struct {
	Result *job.NetworkRatesResult
	// Channels are the fitted rate coefficients (job.NetworkRatesResult.
	// FitNetwork), in the order of the mechanism files.
	Channels []job.NetworkChannel
	// Title is the input's title; Input the file as read (echoed, with its
	// SHA-256).
	Title string
	Input []byte
	// Units are those of the terminal tables (pressure); the rate
	// coefficients of a network are first order, in s-1.
	Units figures.Units
	// Figures are the SVG figures (figures.Network), Mechanism the
	// mechanism files as written, Files the files written with the page,
	// Warnings the command's own.
	Figures   []job.File
	Mechanism []job.File
	Files     []string
	Warnings  []string
}

// networkCaptions say what each figure of figures.Network shows.
var networkCaptions = map[string]string{
	figures.PopulationsPlot: "the wells' and products' fractions against time after a start in the reference well, from the rate law at the middle grid point.",
	figures.NetworkKvsPPlot: "every rate coefficient from each well against pressure at the middle temperature, in s-1.",
	figures.YieldsPlot:      "the source's yields per captured molecule against pressure at the middle temperature: stabilised in each well, carried to each product.",
}

// NetworkHTML renders the report of a network's rates run as one
// self-contained HTML page, with the same tables as the terminal.
func NetworkHTML(r Network) ([]byte, error) {
	res := r.Result
	u := withDefaults(r.Units)
	pu := u.Pressure
	nT, nP := len(res.Temperatures), len(res.Pressures)
	if nT == 0 || nP == 0 {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %s: the result has no grid (%d temperatures, %d pressures)", FileName, clean(res.File), nT, nP)}
	}
	title := clean(r.Title)
	if title == "" {
		title = "Network rate coefficients k(T,P)"
	}
	p := &page{Title: title, Reaction: fmt.Sprintf("network of %d wells: %s", len(res.Wells), clean(strings.Join(res.Wells, ", "))),
		Version: job.Version, Caution: job.Caution}
	p.Job = append(p.Job, fmt.Sprintf("falloff %s computed the phenomenological rate coefficients of a network of %d wells (%s; reference %s) to %d products, "+
		"at %d temperatures from %s K to %s K and %d pressures from %s %s to %s %s: %s.",
		job.Version, len(res.Wells), clean(strings.Join(res.Wells, ", ")), clean(res.Reference), len(res.Products),
		nT, num(res.Temperatures[0]), num(res.Temperatures[nT-1]), nP, num(u.P(res.Pressures[0])), pu, num(u.P(res.Pressures[nP-1])), pu, clean(res.Note)))
	if r.Input != nil {
		p.Job = append(p.Job, fmt.Sprintf("Input: %s, SHA-256 %x (echoed in full below).", clean(res.File), sha256.Sum256(r.Input)))
	}
	p.Job = append(p.Job, fmt.Sprintf("Units: rate coefficients in s-1 (first order, from a well), pressures in %s, temperatures in K.", pu))

	if n := len(res.Refused); n > 0 {
		p.Warnings = append(p.Warnings, fmt.Sprintf("%d of %d points refused: a reaction there is about as fast as energy relaxation (no rate coefficient), listed under Points refused and merged.", n, nT*nP))
	}
	if n := len(res.Merged); n > 0 {
		p.Warnings = append(p.Warnings, fmt.Sprintf("%d points with wells in fast equilibrium merged into one species: their coefficients are between the merged species (Points refused and merged), not in the main table.", n))
	}
	for _, ch := range r.Channels {
		if !ch.Written {
			p.Warnings = append(p.Warnings, fmt.Sprintf("%s → %s not written: %s", clean(strings.Join(ch.Reactants, " + ")), clean(strings.Join(ch.Products, " + ")), clean(ch.WhyNot)))
		}
	}
	for _, w := range r.Warnings {
		p.Warnings = append(p.Warnings, clean(w))
	}

	// The rate coefficients, as the terminal table.
	t := &table{Caption: "Rate coefficients / s-1 from each well (a well's own loss is the sum of its columns), and the eigenvalue separation |λ_chem|/|λ_relax|", Class: "wide"}
	header, rows := res.RateTable(u.P, pu)
	t.Header = cleaned(header)
	for _, row := range rows {
		t.Rows = append(t.Rows, numRow(cleaned(row)...))
	}
	p.Sections = append(p.Sections, section{ID: "rates", Heading: "Rate coefficients", Blocks: []block{{Kind: "table", Table: t}}})

	if len(res.Refused)+len(res.Merged) > 0 {
		var items []string
		for _, at := range sortedKeys(res.Merged) {
			mp := res.Merged[at]
			var parts []string
			for i, from := range mp.Species {
				for j, to := range mp.Species {
					if i != j {
						parts = append(parts, fmt.Sprintf("%s→%s %s s-1", from, to, num(mp.K[j][i])))
					}
				}
				for x, pr := range res.Products {
					parts = append(parts, fmt.Sprintf("%s→%s %s s-1", from, pr, num(mp.KProducts[x][i])))
				}
			}
			items = append(items, clean(fmt.Sprintf("merged at %s: wells in fast equilibrium taken as %s (departure %.2g): %s", at, strings.Join(mp.Species, ", "), mp.Departure, strings.Join(parts, "; "))))
		}
		for _, at := range sortedKeys(res.Refused) {
			items = append(items, clean(fmt.Sprintf("refused at %s: %s", at, res.Refused[at])))
		}
		p.Sections = append(p.Sections, section{ID: "refused", Heading: "Points refused and merged", Blocks: []block{list(items)}})
	}

	if src := res.Source; src != nil {
		yt := &table{Caption: fmt.Sprintf("Source %s → %s: yields per captured molecule, stabilised in each well and carried to each product (back to %s included)",
			clean(src.Fragments), clean(src.Into), clean(src.Fragments))}
		header, rows := res.YieldTable(u.P, pu)
		yt.Header = cleaned(header)
		for _, row := range rows {
			yt.Rows = append(yt.Rows, numRow(cleaned(row)...))
		}
		blocks := []block{{Kind: "table", Table: yt}}
		if src.KCapture == nil {
			blocks = append(blocks, para("No capture rate coefficient: every fragment species must be described under molecules for K_c, and so for the bimolecular rate coefficients k_capture × yield."))
		}
		p.Sections = append(p.Sections, section{ID: "source", Heading: "Source yields", Blocks: blocks})
	}

	if len(r.Channels) > 0 {
		ft := &table{Caption: "Fits of every rate coefficient (PLOG and Chebyshev, Troe where k is a falloff curve) on the points computed; errors 100·|k_fit/k − 1| in %",
			Header: []string{"reaction", "points", "written", "form", "max error / %", "note"}}
		for _, ch := range r.Channels {
			name := clean(strings.Join(ch.Reactants, " + ") + " → " + strings.Join(ch.Products, " + "))
			row := []cell{{Text: name}, {Text: fmt.Sprint(ch.Points), Num: true}}
			if ch.Written {
				rep := ch.Fits.Reports()[fit.FormName(ch.Recommended)]
				row = append(row, cell{Text: "yes", Class: "recommended"}, cell{Text: clean(ch.Recommended)}, cell{Text: fmt.Sprintf("%.3g", rep.MaxErrorPct), Num: true}, cell{Text: clean(ch.Falloff)})
			} else {
				row = append(row, cell{Text: "no", Class: "failed"}, cell{Text: "-"}, cell{Text: "-", Num: true}, cell{Text: clean(ch.WhyNot + "; " + ch.Falloff)})
			}
			ft.Rows = append(ft.Rows, row)
		}
		p.Sections = append(p.Sections, section{ID: "fits", Heading: "Fits", Blocks: []block{{Kind: "table", Table: ft}}})
	}

	figs := section{ID: "figures", Heading: "Figures"}
	for _, f := range r.Figures {
		if !strings.HasSuffix(f.Name, ".svg") {
			continue
		}
		svg, err := inlineSVG(f.Name, f.Data)
		if err != nil {
			return nil, &job.NumericalError{Err: err}
		}
		caption, ok := networkCaptions[f.Name]
		if !ok {
			caption = "as written to the SVG file."
		}
		figs.Blocks = append(figs.Blocks, block{Kind: "figure", Figure: &figure{ID: "fig-" + strings.TrimSuffix(f.Name, ".svg"), File: clean(f.Name), Caption: caption, SVG: svg}})
	}
	if len(figs.Blocks) > 0 {
		p.Sections = append(p.Sections, figs)
	}
	p.Sections = append(p.Sections, mechanismSection(r.Mechanism))
	p.Sections = append(p.Sections, tailSections(res.File, r.Input, r.Files)...)
	return render(p)
}

// sortedKeys returns the keys of m in order.
func sortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// cleaned applies clean to every string.
func cleaned(xs []string) []string {
	out := make([]string, len(xs))
	for i, x := range xs {
		out[i] = clean(x)
	}
	return out
}
