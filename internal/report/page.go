package report

import (
	"bytes"
	"crypto/sha256"
	"encoding/xml"
	"errors"
	"fmt"
	"html/template"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/falloff-kinetics/falloff/pkg/job"
)

// FileName is the name of the report in an output folder.
const FileName = "report.html"

// page is what the template shows: a heading, the job paragraph, the
// warnings box, the sections in order and the caution above and below.
type page struct {
	Title    string // <title> and <h1>
	Reaction string // under the heading, kept on one line
	Version  string
	Job      []string // the job paragraph, in sentences
	Warnings []string
	Sections []section
	Caution  string
}

// section is one part of the page, with an anchor in the contents.
type section struct {
	ID, Heading string
	Blocks      []block
}

// block is one paragraph, table, preformatted text or figure; Kind says
// which field is set.
type block struct {
	Kind   string // "p", "table", "pre", "figure", "list"
	Text   string // p; the caption of a pre
	Items  []string
	Table  *table
	Figure *figure
}

// table is a table with its caption (which names what is tabulated and
// the units not in the headers).
type table struct {
	Caption string
	Header  []string
	Rows    [][]cell
	Class   string // "wide" for the k(T,P) grid
}

// cell is one table cell; Num right-aligns it.
type cell struct {
	Text  string
	Num   bool
	Class string // "recommended", "failed" or ""
	Href  string // a link to another page of the same output folder
}

// figure is one SVG figure, inlined.
type figure struct {
	ID, File, Caption string
	SVG               template.HTML
}

func para(format string, a ...any) block { return block{Kind: "p", Text: fmt.Sprintf(format, a...)} }

func pre(caption, text string) block { return block{Kind: "pre", Text: caption, Items: []string{text}} }

func list(items []string) block { return block{Kind: "list", Items: items} }

// numRow makes a row of numeric cells, the first (a label or temperature)
// included.
func numRow(texts ...string) []cell {
	row := make([]cell, len(texts))
	for i, t := range texts {
		row[i] = cell{Text: t, Num: true}
	}
	return row
}

// num formats a number with 4 significant digits, as the terminal tables
// do (docs/output.md).
func num(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// num6 formats a ratio near 1 with 6 decimals, as the terminal's
// k∞(ME)/k∞ column.
func num6(x float64) string { return strconv.FormatFloat(x, 'f', 6, 64) }

// numE formats an energy in cm⁻¹: whole wavenumbers, or 4 significant
// digits below 100 cm⁻¹.
func numE(x float64) string {
	if x >= 100 || x <= -100 {
		return strconv.FormatFloat(x, 'f', 0, 64)
	}
	return num(x)
}

// clean makes text from an input file safe to put in an XML document:
// invalid UTF-8 and every character XML 1.0 forbids (controls other than
// tab and newline, U+FFFE, U+FFFF) become U+FFFD. html/template does the
// escaping of markup; this only keeps the page well-formed.
func clean(s string) string {
	if utf8.ValidString(s) && strings.IndexFunc(s, badRune) < 0 {
		return s
	}
	s = strings.ToValidUTF8(s, "\uFFFD")
	return strings.Map(func(r rune) rune {
		if badRune(r) {
			return '\uFFFD'
		}
		return r
	}, s)
}

// badRune reports whether r may not appear in an XML 1.0 document, or is
// a carriage return (kept out so that line ends are the same everywhere).
func badRune(r rune) bool {
	switch {
	case r == '\t' || r == '\n':
		return false
	case r < 0x20 || r == 0x7f || (r >= 0x80 && r < 0xa0):
		return true
	case r == 0xfffe || r == 0xffff || (r >= 0xd800 && r <= 0xdfff):
		return true
	}
	return false
}

// errUnsafeSVG is returned for a figure the page would not show as is.
var errUnsafeSVG = errors.New("report: figure is not a plain SVG drawing")

// inlineSVG returns the SVG file data ready to inline in the page: the XML
// prolog and anything before the <svg> element dropped. The drawing is
// checked first: well-formed, one <svg> root, and nothing active or
// external — no script, foreignObject, image, use, style element or
// event attribute, no link other than to a fragment of itself, no
// url() other than to a fragment, no DOCTYPE (entities).
func inlineSVG(name string, data []byte) (template.HTML, error) {
	start := bytes.Index(data, []byte("<svg"))
	if start < 0 {
		return "", fmt.Errorf("%s: %w: no <svg> element", name, errUnsafeSVG)
	}
	body := data[start:]
	d := xml.NewDecoder(bytes.NewReader(body))
	d.Strict = true
	depth, roots := 0, 0
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return "", fmt.Errorf("%s: %w: %v", name, errUnsafeSVG, err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if depth == 0 {
				roots++
				if t.Name.Local != "svg" || roots > 1 {
					return "", fmt.Errorf("%s: %w: root <%s>", name, errUnsafeSVG, t.Name.Local)
				}
			}
			depth++
			switch strings.ToLower(t.Name.Local) {
			case "script", "foreignobject", "image", "use", "style", "iframe", "object", "embed", "a":
				return "", fmt.Errorf("%s: %w: <%s> element", name, errUnsafeSVG, t.Name.Local)
			}
			for _, a := range t.Attr {
				n, v := strings.ToLower(a.Name.Local), strings.ToLower(a.Value)
				switch {
				case strings.HasPrefix(n, "on"):
					return "", fmt.Errorf("%s: %w: %s attribute", name, errUnsafeSVG, a.Name.Local)
				case n == "href" && !strings.HasPrefix(v, "#"):
					return "", fmt.Errorf("%s: %w: link %q", name, errUnsafeSVG, a.Value)
				case strings.Contains(v, "url(") && !onlyFragmentURLs(v):
					return "", fmt.Errorf("%s: %w: url() in %s", name, errUnsafeSVG, a.Name.Local)
				}
			}
		case xml.EndElement:
			depth--
		case xml.Directive:
			return "", fmt.Errorf("%s: %w: <!%s>", name, errUnsafeSVG, firstWord(string(t)))
		case xml.ProcInst:
			return "", fmt.Errorf("%s: %w: processing instruction %s", name, errUnsafeSVG, t.Target)
		case xml.CharData:
			if depth == 0 && len(bytes.TrimSpace(t)) > 0 {
				return "", fmt.Errorf("%s: %w: text outside <svg>", name, errUnsafeSVG)
			}
		}
	}
	if roots != 1 {
		return "", fmt.Errorf("%s: %w: no <svg> element", name, errUnsafeSVG)
	}
	return template.HTML(bytes.TrimSpace(body)), nil // checked above: a plain drawing
}

// onlyFragmentURLs reports whether every url(…) in v points into the
// document, url(#id).
func onlyFragmentURLs(v string) bool {
	for {
		i := strings.Index(v, "url(")
		if i < 0 {
			return true
		}
		v = strings.TrimLeft(v[i+4:], " '\"")
		if !strings.HasPrefix(v, "#") {
			return false
		}
	}
}

func firstWord(s string) string {
	if f := strings.Fields(s); len(f) > 0 {
		return f[0]
	}
	return ""
}

// rowClass is the class of a table row: that of its first cell with one.
func rowClass(row []cell) string {
	for _, c := range row {
		if c.Class != "" {
			return c.Class
		}
	}
	return ""
}

// render executes the page template.
func render(p *page) ([]byte, error) {
	var b bytes.Buffer
	if err := pageTemplate.Execute(&b, p); err != nil {
		return nil, &job.NumericalError{Err: fmt.Errorf("%s: %w", FileName, err)}
	}
	return b.Bytes(), nil
}

// Colours (Okabe & Ito 2008, colour-universal-design palette): vermillion
// #D55E00 for warnings, blue #0072B2 for links and the recommended fit,
// bluish green #009E73 for the "no warnings" box, black text on white.
// Each is paired with words, a border weight or a font weight, so the page
// reads the same in greyscale.
var pageTemplate = template.Must(template.New(FileName).Funcs(template.FuncMap{"rowClass": rowClass}).Parse(`<!DOCTYPE html>
<html lang="en" xmlns="http://www.w3.org/1999/xhtml">
<head>
<meta charset="utf-8" />
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'" />
<meta name="viewport" content="width=device-width, initial-scale=1" />
<meta name="generator" content="falloff {{.Version}}" />
<title>{{.Title}}</title>
<style>
:root { --warn: #D55E00; --ok: #009E73; --accent: #0072B2; --rule: #999999; --shade: #F2F2F2; }
html { font-family: system-ui, -apple-system, "Segoe UI", "DejaVu Sans", "Liberation Sans", sans-serif; font-size: 15px; line-height: 1.45; color: #000000; background: #FFFFFF; }
body { margin: 0 auto; padding: 1rem 1.5rem 3rem; max-width: 78rem; }
h1 { font-size: 1.5rem; margin: 0.5rem 0; }
p.reaction { font-size: 1.2rem; font-weight: 600; margin: 0.3rem 0; white-space: nowrap; overflow-x: auto; }
h2 { font-size: 1.2rem; margin: 2rem 0 0.5rem; border-bottom: 2px solid #000000; padding-bottom: 0.2rem; }
a { color: var(--accent); }
p.job { max-width: 60rem; }
.caution { border: 1px solid #000000; padding: 0.5rem 0.75rem; font-weight: 600; max-width: 60rem; }
.warnings { border: 4px solid var(--warn); border-left-width: 12px; padding: 0.5rem 1rem; margin: 1rem 0; background: #FFF3EB; }
.warnings h2 { border: none; margin: 0.2rem 0; color: #000000; }
.warnings ul { margin: 0.3rem 0; padding-left: 1.2rem; }
.warnings li { margin: 0.25rem 0; }
.nowarnings { border: 2px solid var(--ok); border-left-width: 12px; padding: 0.5rem 1rem; margin: 1rem 0; }
nav ol { columns: 3 14rem; margin: 0.3rem 0; }
.scroll { overflow-x: auto; max-width: 100%; }
table { border-collapse: collapse; margin: 0.5rem 0 1rem; font-variant-numeric: tabular-nums; }
caption { caption-side: top; text-align: left; font-weight: 600; padding: 0.2rem 0; }
th, td { border: 1px solid var(--rule); padding: 0.15rem 0.45rem; vertical-align: top; }
th { background: var(--shade); font-weight: 600; text-align: center; }
table.nums th { white-space: nowrap; }
td { text-align: left; }
td.num { text-align: right; white-space: nowrap; }
table.wide { font-size: 0.8rem; }
table.wide th:first-child, table.wide td:first-child { position: sticky; left: 0; background: var(--shade); }
tr.recommended td { font-weight: 700; border-top: 2px solid var(--accent); border-bottom: 2px solid var(--accent); }
tr.failed td { font-style: italic; color: #333333; }
pre { background: var(--shade); border: 1px solid var(--rule); padding: 0.5rem; overflow-x: auto; font-size: 0.8rem; line-height: 1.3; white-space: pre; }
.pre-caption { font-weight: 600; margin: 0.8rem 0 0.2rem; }
figure { margin: 1rem 0 2rem; break-inside: avoid; }
figure svg { display: block; width: 100%; max-width: 50rem; height: auto; }
figcaption { max-width: 46rem; font-size: 0.9rem; }
@media print {
	@page { size: A4 landscape; margin: 12mm; }
	html { font-size: 10pt; }
	body { max-width: none; padding: 0; }
	nav { display: none; }
	.scroll { overflow: visible; }
	table.wide { font-size: 7pt; }
	table.wide th:first-child, table.wide td:first-child { position: static; }
	thead { display: table-header-group; }
	tr, figure, .warnings, .caution { break-inside: avoid; }
	h2 { break-after: avoid; }
	pre { white-space: pre-wrap; overflow: visible; font-size: 7.5pt; }
	figure svg { max-height: 165mm; width: auto; }
	a { color: #000000; text-decoration: none; }
	.warnings { background: #FFFFFF; }
}
</style>
</head>
<body>
<header>
<h1>{{.Title}}</h1>
{{with .Reaction}}<p class="reaction">{{.}}</p>
{{end}}<p class="job" id="job">{{range $i, $s := .Job}}{{if $i}} {{end}}{{$s}}{{end}}</p>
{{if .Warnings}}<section class="warnings" id="warnings" role="alert">
<h2>⚠ Warnings ({{len .Warnings}}): read before using the results</h2>
<ul>
{{range .Warnings}}<li>{{.}}</li>
{{end}}</ul>
</section>{{else}}<section class="nowarnings" id="warnings">
<p><strong>No warnings.</strong> The run raised no warning; the checks below still apply.</p>
</section>{{end}}
<p class="caution" id="caution-top">{{.Caution}}</p>
<nav><strong>Contents</strong>
<ol>
{{range .Sections}}<li><a href="#{{.ID}}">{{.Heading}}</a></li>
{{end}}</ol>
</nav>
</header>
<main>
{{range .Sections}}<section id="{{.ID}}">
<h2>{{.Heading}}</h2>
{{range .Blocks}}{{if eq .Kind "p"}}<p>{{.Text}}</p>
{{else if eq .Kind "list"}}<ul>
{{range .Items}}<li>{{.}}</li>
{{end}}</ul>
{{else if eq .Kind "pre"}}{{if .Text}}<p class="pre-caption">{{.Text}}</p>
{{end}}<pre>{{index .Items 0}}</pre>
{{else if eq .Kind "table"}}{{with .Table}}<div class="scroll">
<table{{if .Class}} class="{{.Class}}"{{end}}>
<caption>{{.Caption}}</caption>
<thead><tr>{{range .Header}}<th scope="col">{{.}}</th>{{end}}</tr></thead>
<tbody>
{{range .Rows}}<tr{{with (rowClass .)}} class="{{.}}"{{end}}>{{range .}}<td{{if .Num}} class="num"{{end}}>{{if .Href}}<a href="{{.Href}}">{{.Text}}</a>{{else}}{{.Text}}{{end}}</td>{{end}}</tr>
{{end}}</tbody>
</table>
</div>
{{end}}{{else if eq .Kind "figure"}}{{with .Figure}}<figure id="{{.ID}}">
{{.SVG}}
<figcaption><strong>{{.File}}</strong>: {{.Caption}}</figcaption>
</figure>
{{end}}{{end}}{{end}}</section>
{{end}}</main>
<footer>
<p class="caution" id="caution">{{.Caution}}</p>
<p>Written by falloff {{.Version}}. This page is self-contained: it loads nothing from anywhere and runs no script.</p>
</footer>
</body>
</html>
`))

// tailSections are the last sections of every page: the input echoed
// (file as read, with its SHA-256; none without input) and the files
// written with the page (none without files).
func tailSections(file string, input []byte, files []string) []section {
	var out []section
	if input != nil {
		out = append(out, section{ID: "input", Heading: "Input", Blocks: []block{
			pre(fmt.Sprintf("%s, as read (SHA-256 %x)", clean(file), sha256.Sum256(input)), clean(string(input)))}})
	}
	if len(files) > 0 {
		var names []string
		for _, f := range files {
			names = append(names, clean(f))
		}
		out = append(out, section{ID: "files", Heading: "Files written with this report", Blocks: []block{list(names)}})
	}
	return out
}
