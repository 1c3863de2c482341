// Package report renders the report of a run as one self-contained HTML
// page, report.html, to read and to pass on: the job (what was computed,
// by which version, from which input and its SHA-256), the warnings in a
// box at the top, the TST identity check, the limits table, the k(T,P)
// grid, the fits with their errors on and off the grid and the
// recommendation, every figure, the mechanism entries as written, the
// input echoed, and the caution.
//
// The page only formats what pkg/job and pkg/fit computed: numbers keep
// the terminal tables' formats (4 significant digits, 6 decimals for
// ratios near 1, whole wavenumbers) and every number carries its unit in
// its column header or beside it; the figures are the SVG files of
// internal/figures, inlined unchanged apart from their XML prolog.
//
// The page is built with html/template (every text from an input file is
// escaped), is well-formed XML as well as HTML, and references nothing
// outside itself: no script, no font, no image or style sheet from a URL
// (its Content-Security-Policy forbids loading any). Its colours are those
// of Okabe and Ito's colour-universal-design palette (Okabe & Ito 2008,
// "Color Universal Design (CUD): how to make figures and presentations
// that are friendly to colorblind people"), and nothing is told by colour
// alone: the warnings box has a heavy border and a heading, a failed or
// recommended fit says so in words. A print style sheet sets A4
// landscape pages, keeps table rows and figures whole and repeats table
// headers on each page.
package report
