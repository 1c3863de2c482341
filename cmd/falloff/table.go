package main

import (
	"encoding/json"
	"fmt"
	"io"
	"strconv"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/renderer"
	"github.com/olekukonko/tablewriter/tw"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// renderTable writes an aligned ASCII table with the given header (units in
// the header cells) and rows.
func renderTable(w io.Writer, header []string, rows [][]string) error {
	t := tablewriter.NewTable(w,
		tablewriter.WithRenderer(renderer.NewBlueprint(tw.Rendition{Symbols: tw.NewSymbols(tw.StyleASCII)})),
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithRowAlignment(tw.AlignRight),
		tablewriter.WithHeaderAlignment(tw.AlignCenter),
	)
	t.Header(header)
	if err := t.Bulk(rows); err != nil {
		return err
	}
	return t.Render()
}

// num formats a number with 4 significant digits, the convention for
// terminal tables.
func num(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// numE formats an energy in cm⁻¹: whole wavenumbers, or 4 significant
// digits below 100 cm⁻¹.
func numE(x float64) string {
	if x >= 100 || x <= -100 {
		return strconv.FormatFloat(x, 'f', 0, 64)
	}
	return num(x)
}

// num6 formats a number with 6 significant digits, for ratios near 1.
func num6(x float64) string { return strconv.FormatFloat(x, 'f', 6, 64) }

// writeJSON prints v as one indented JSON object; a NaN or infinity anywhere
// is a numerical failure rather than broken JSON.
func writeJSON(w io.Writer, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return &job.NumericalError{Err: fmt.Errorf("writing JSON: %w", err)}
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// fullNum formats a number with full precision, for machine-readable files.
func fullNum(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
