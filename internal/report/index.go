package report

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// IndexFileName is the name of a batch's index page, beside its merged
// mechanism.
const IndexFileName = "index.html"

// IndexRow is one reaction of a batch on its index page.
type IndexRow struct {
	Name, Reaction string
	// State is the reaction's state in words: done, failed, missing, stale.
	State string
	// Forms are the recommended forms of its entries ("none" for an entry
	// without one); MaxErrorPct is their largest error on the grid in %.
	Forms       []string
	MaxErrorPct float64
	Warnings    []string
	Error       string // why it failed
	// Report is the path of its report.html relative to the index page,
	// "" when it has none.
	Report string
}

// Index is a batch's index page: the manifest and a row per reaction.
type Index struct {
	Manifest, Title string
	Rows            []IndexRow
}

// IndexHTML renders the index page of a batch: every reaction with its
// state, recommended form, fit error and warnings, linking to its own
// report. The links are relative paths inside the batch's output folder
// (the page still loads nothing: a link is followed only when clicked).
func IndexHTML(x Index) ([]byte, error) {
	title := "Batch " + clean(x.Manifest)
	if x.Title != "" {
		title += ": " + clean(x.Title)
	}
	p := &page{Title: title, Version: job.Version, Caution: job.Caution}
	failed, warned := 0, 0
	t := &table{Caption: "Reactions (each name links to that reaction's report)", Header: []string{"reaction", "equation", "state", "recommended form", "max fit error / %", "warnings"}}
	for i := range x.Rows {
		r := &x.Rows[i]
		state, class := r.State, ""
		if r.State == "failed" {
			state, class = "FAILED", "failed"
			failed++
			p.Warnings = append(p.Warnings, fmt.Sprintf("%s: FAILED: %s", clean(r.Name), clean(r.Error)))
		}
		if len(r.Warnings) > 0 {
			warned++
		}
		for _, w := range r.Warnings {
			p.Warnings = append(p.Warnings, fmt.Sprintf("%s: %s", clean(r.Name), clean(w)))
		}
		errPct := ""
		if len(r.Forms) > 0 {
			errPct = num(r.MaxErrorPct)
		}
		t.Rows = append(t.Rows, []cell{{Text: clean(r.Name), Class: class, Href: clean(r.Report)}, {Text: clean(r.Reaction)}, {Text: state},
			{Text: clean(strings.Join(r.Forms, ", "))}, {Text: errPct, Num: true}, {Text: strconv.Itoa(len(r.Warnings)), Num: true}})
	}
	p.Job = append(p.Job, fmt.Sprintf("falloff %s ran the %d reactions of the manifest %s: %d failed, %d with warnings. "+
		"Each reaction's report holds its limits, k(T,P) grid, fits, figures and mechanism entries.",
		job.Version, len(x.Rows), clean(x.Manifest), failed, warned))
	s := section{ID: "reactions", Heading: "Reactions", Blocks: []block{{Kind: "table", Table: t}}}
	p.Sections = append(p.Sections, s)
	return render(p)
}
