package report

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/internal/figures"
	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// demoUnits are the command line's default display units: bar, per mol.
var demoUnits = figures.Units{Pressure: "bar", PaPerUnit: units.BarPa, Quantity: export.DefaultUnits}

var (
	demoOnce sync.Once
	demoIn   Rates
	demoErr  error
)

// demoReport is the report input of the built-in demo as `rates --out`
// assembles it: the result, its figures and its mechanism files (computed
// once, about a second).
func demoReport(t testing.TB) Rates {
	t.Helper()
	demoOnce.Do(func() {
		m, err := input.Parse(demo.Name, demo.Text)
		if err != nil {
			demoErr = err
			return
		}
		n, err := job.New(m)
		if err != nil {
			demoErr = err
			return
		}
		res, err := n.Rates(context.Background(), job.Options{})
		if err != nil {
			demoErr = err
			return
		}
		figs, err := figures.Rates(n, res, demoUnits, nil)
		if err != nil {
			demoErr = err
			return
		}
		mech, err := res.MechanismFiles(job.FileOptions{Units: export.DefaultUnits, PressureUnit: "bar"})
		if err != nil {
			demoErr = err
			return
		}
		demoIn = Rates{Result: res, Title: m.Title, Input: m.Source, Units: demoUnits, Energy: export.CalPerMol,
			Figures: figs, Mechanism: mech, Files: []string{"reactions.yaml", "report.html", "summary.json"}}
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoIn
}

// node is an element of the page read back with encoding/xml: a strict
// XML parser, independent of html/template, so a page it accepts is
// well-formed (every element closed, attributes quoted, entities known).
type node struct {
	name     string
	attr     map[string]string
	children []*node
	text     strings.Builder // all text inside, children's included
}

// parsePage parses the page strictly as XML into a tree.
func parsePage(t *testing.T, page []byte) *node {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(page))
	d.Strict = true
	d.AutoClose = nil
	d.Entity = nil // only XML's own five entities and numeric references
	root := &node{name: "#document"}
	stack := []*node{root}
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the page is not well-formed XML: %v", err)
		}
		switch x := tok.(type) {
		case xml.StartElement:
			n := &node{name: x.Name.Local, attr: map[string]string{}}
			for _, a := range x.Attr {
				key := a.Name.Local
				if a.Name.Space != "" {
					key = a.Name.Space + ":" + key
				}
				n.attr[key] = a.Value
			}
			top := stack[len(stack)-1]
			top.children = append(top.children, n)
			stack = append(stack, n)
		case xml.EndElement:
			stack = stack[:len(stack)-1]
		case xml.CharData:
			for _, n := range stack {
				n.text.Write(x)
			}
		}
	}
	if len(stack) != 1 {
		t.Fatalf("%d elements left open", len(stack)-1)
	}
	if len(root.children) != 1 || root.children[0].name != "html" {
		t.Fatalf("the page's root is not one <html> element")
	}
	return root.children[0]
}

// find returns every element below n (n included) for which ok holds, in
// document order.
func (n *node) find(ok func(*node) bool) []*node {
	var out []*node
	if ok(n) {
		out = append(out, n)
	}
	for _, c := range n.children {
		out = append(out, c.find(ok)...)
	}
	return out
}

func (n *node) byID(id string) *node {
	if f := n.find(func(m *node) bool { return m.attr["id"] == id }); len(f) > 0 {
		return f[0]
	}
	return nil
}

func named(name string) func(*node) bool { return func(m *node) bool { return m.name == name } }

// cells returns the text of each row's cells of the first table below n.
func (n *node) cells() (header []string, rows [][]string) {
	tables := n.find(named("table"))
	if len(tables) == 0 {
		return nil, nil
	}
	for _, th := range tables[0].find(named("th")) {
		header = append(header, th.text.String())
	}
	for _, tr := range tables[0].find(named("tr")) {
		var row []string
		for _, td := range tr.find(named("td")) {
			row = append(row, td.text.String())
		}
		if len(row) > 0 {
			rows = append(rows, row)
		}
	}
	return header, rows
}

// externalRefs lists every reference the page makes to anything outside
// itself. A browser fetches from attributes naming a resource (src, href,
// xlink:href, data, poster, srcset, action, formaction, background, ping,
// manifest, content of a refresh), from url() and @import in CSS, and from
// the elements script, link, img, iframe, object, embed, base, audio,
// video, source, track, image and use; a link to a fragment of the page
// itself ("#id") is the only reference allowed. The list follows the HTML
// Living Standard's attributes index (WHATWG; from memory). Namespace
// declarations (xmlns) name namespaces and are never fetched.
func externalRefs(root *node) []string {
	var refs []string
	resourceAttrs := map[string]bool{"src": true, "href": true, "http://www.w3.org/1999/xlink:href": true, "data": true, "poster": true,
		"srcset": true, "action": true, "formaction": true, "background": true, "ping": true, "manifest": true, "cite": true, "longdesc": true}
	for _, n := range root.find(func(*node) bool { return true }) {
		switch n.name {
		case "script", "link", "img", "iframe", "object", "embed", "base", "audio", "video", "source", "track", "image", "use", "frame", "applet":
			refs = append(refs, "<"+n.name+">")
		}
		for k, v := range n.attr {
			switch {
			case resourceAttrs[k] && !strings.HasPrefix(v, "#"):
				refs = append(refs, k+"="+v)
			case k == "style" && cssRefs(v):
				refs = append(refs, "style="+v)
			case k == "http-equiv" && strings.EqualFold(v, "refresh"):
				refs = append(refs, "meta refresh")
			case strings.HasPrefix(strings.ToLower(k), "on"):
				refs = append(refs, k+" handler")
			}
		}
		if n.name == "style" && cssRefs(n.text.String()) {
			refs = append(refs, "<style> with url() or @import")
		}
	}
	return refs
}

// cssRefs reports whether CSS text can load anything: a url() not to a
// fragment, @import or @font-face.
func cssRefs(css string) bool {
	l := strings.ToLower(css)
	if strings.Contains(l, "@import") || strings.Contains(l, "@font-face") {
		return true
	}
	for {
		i := strings.Index(l, "url(")
		if i < 0 {
			return false
		}
		l = strings.TrimLeft(l[i+4:], " '\"")
		if !strings.HasPrefix(l, "#") {
			return true
		}
	}
}

// The demo's report is one well-formed page that references nothing
// outside itself, forbids loading anything (its Content-Security-Policy),
// has every section, the caution above and below, one inline SVG per
// figure file, and the numbers of the result: each cell of the limits and
// k(T,P) tables is the result's value formatted as the terminal tables
// format it (strconv 'g' with 4 significant digits, docs/output.md and
// the code conventions), and parses back to within half a unit of the 4th
// significant digit (5e-4 relative: the rounding of 4 digits, exact).
func TestRatesHTMLDemo(t *testing.T) {
	in := demoReport(t)
	page, err := RatesHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	if refs := externalRefs(root); len(refs) > 0 {
		t.Errorf("the page references outside itself: %v", refs)
	}
	csp := root.find(func(n *node) bool { return n.attr["http-equiv"] == "Content-Security-Policy" })
	if len(csp) != 1 || !strings.Contains(csp[0].attr["content"], "default-src 'none'") {
		t.Errorf("no Content-Security-Policy forbidding every load")
	}
	if bytes.Contains(bytes.ToLower(page), []byte("http://")) && bytes.Count(page, []byte("http://")) != bytes.Count(page, []byte(`="http://www.w3.org/`)) {
		t.Errorf("an http:// address that is not a namespace name")
	}
	if bytes.Contains(bytes.ToLower(page), []byte("https://")) {
		t.Errorf("an https:// address in the page")
	}
	for _, id := range []string{"job", "warnings", "caution-top", "tst", "limits", "grid", "fits", "figures", "mechanism", "input", "files", "caution"} {
		if root.byID(id) == nil {
			t.Errorf("no element with id %q", id)
		}
	}
	for _, id := range []string{"caution-top", "caution"} {
		if n := root.byID(id); n != nil && n.text.String() != job.Caution {
			t.Errorf("#%s = %q, want the caution", id, n.text.String())
		}
	}
	res := in.Result
	jobText := root.byID("job").text.String()
	for _, want := range []string{job.Version, demo.Name, "SHA-256 ", res.Reaction, "recommended: " + string(res.Fits.Recommended)} {
		if !strings.Contains(jobText, want) {
			t.Errorf("the job paragraph lacks %q: %s", want, jobText)
		}
	}
	// One inline <svg> per figure, the figure file's content.
	svgs := root.byID("figures").find(named("svg"))
	if len(svgs) != len(in.Figures) {
		t.Errorf("%d inline SVG figures, want %d", len(svgs), len(in.Figures))
	}
	for _, f := range in.Figures {
		_, body, _ := bytes.Cut(f.Data, []byte("<svg"))
		if !bytes.Contains(page, body) {
			t.Errorf("%s is not inlined unchanged", f.Name)
		}
	}
	// The input echoed, byte for byte after XML escaping.
	if got := root.byID("input").find(named("pre"))[0].text.String(); got != string(in.Input) {
		t.Errorf("the echoed input differs from the file")
	}
	// The mechanism entries as written.
	pres := root.byID("mechanism").find(named("pre"))
	if len(pres) != 2 || pres[0].text.String() != string(fileData(in.Mechanism, "reactions.yaml")) || pres[1].text.String() != string(fileData(in.Mechanism, "reactions.txt")) {
		t.Errorf("the mechanism section does not hold reactions.yaml and reactions.txt as written")
	}

	kp, k0p := res.KPowers(), res.K0Powers()
	header, rows := root.byID("grid").cells()
	if len(rows) != len(res.Temperatures) || len(header) != len(res.Pressures)+1 {
		t.Fatalf("k(T,P) table %d×%d, want %d×%d", len(rows), len(header), len(res.Temperatures), len(res.Pressures)+1)
	}
	for j, p := range res.Pressures {
		checkCell(t, "pressure column", header[j+1], p/units.BarPa)
	}
	for i, T := range res.Temperatures {
		checkCell(t, "T", rows[i][0], T)
		for j := range res.Pressures {
			checkCell(t, "k", rows[i][j+1], demoUnits.Rate(res.K[i][j], kp))
		}
	}
	header, rows = root.byID("limits").cells()
	wantHeader := []string{"T / K", "k∞ / s-1", "k∞(ME)/k∞", "k0 / cm3 mol-1 s-1", "p½ / bar", "P(Pr=1) / bar", "Fcent", "grain / cm-1", "ceiling / cm-1"}
	if strings.Join(header, "|") != strings.Join(wantHeader, "|") {
		t.Errorf("limits header %q, want %q", header, wantHeader)
	}
	for i := range res.Temperatures {
		checkCell(t, "k∞", rows[i][1], res.KInf[i])
		if want := strconv.FormatFloat(res.KInfIntegrated[i]/res.KInf[i], 'f', 6, 64); rows[i][2] != want {
			t.Errorf("k∞(ME)/k∞ at row %d: %q, want %q", i, rows[i][2], want)
		}
		checkCell(t, "k0", rows[i][3], demoUnits.Rate(res.K0[i], k0p))
		checkCell(t, "p½", rows[i][4], res.HalfPressure[i]/units.BarPa)
		checkCell(t, "Fcent", rows[i][6], res.Fcent[i])
	}
	// The fits: every form's errors, the recommendation marked in words.
	_, rows = root.byID("fits").cells()
	reps := res.Fits.Reports()
	if len(rows) != len(reps) {
		t.Errorf("%d fit rows, want %d", len(rows), len(reps))
	}
	for _, row := range rows {
		rep, ok := reps[fit.FormName(row[0])]
		if !ok {
			t.Errorf("fit row %q: no such form", row[0])
			continue
		}
		checkCell(t, row[0]+" max error", row[1], rep.MaxErrorPct)
		checkCell(t, row[0]+" rms error", row[2], rep.RMSErrorPct)
		if rep.HeldOut != nil {
			checkCell(t, row[0]+" held-out max", row[4], rep.HeldOut.MaxErrorPct)
		}
		if (row[7] == "recommended") != (row[0] == string(res.Fits.Recommended)) {
			t.Errorf("fit row %q: status %q, recommended is %s", row[0], row[7], res.Fits.Recommended)
		}
	}
	// The warnings box names each failed form, and the reasons are under
	// Fits.
	box, fits := root.byID("warnings").text.String(), root.byID("fits").text.String()
	for n, r := range reps {
		if r.Failed && (!regexp.MustCompile(`failed: [a-z, ]*\b`+string(n)+`\b`).MatchString(box) || !strings.Contains(fits, string(n)+" failed: "+r.FailReason)) {
			t.Errorf("the warnings box does not name %s as failed, or Fits lacks its reason", n)
		}
	}
}

// checkCell checks one table cell: the 4-significant-digit text of want,
// which parses back to want within the rounding of 4 digits.
func checkCell(t *testing.T, what, got string, want float64) {
	t.Helper()
	if s := strconv.FormatFloat(want, 'g', 4, 64); got != s {
		t.Errorf("%s: cell %q, want %q", what, got, s)
		return
	}
	x, err := strconv.ParseFloat(got, 64)
	if err != nil || math.Abs(x-want) > 5e-4*math.Abs(want) {
		t.Errorf("%s: cell %q does not parse back to %g", what, got, want)
	}
}

func fileData(files []job.File, name string) []byte {
	for _, f := range files {
		if f.Name == name {
			return f.Data
		}
	}
	return nil
}

// Text from an input file is shown, not obeyed: markup in a title or a
// reaction name is escaped, control characters that XML forbids are
// replaced, and the page stays well-formed with nothing external.
func TestRatesHTMLEscapes(t *testing.T) {
	in := demoReport(t)
	res := *in.Result
	res.Reaction = `ring <script>alert(1)</script> -> "a" & 'b'`
	res.Warnings = append([]string{"bell \a and escape \x1b[31m, invalid \xff UTF-8, <img src=http://example.org/x.png>"}, res.Warnings...)
	in.Result = &res
	in.Title = `</title><link rel="stylesheet" href="https://example.org/s.css">`
	in.Input = append([]byte("# <iframe src=\"http://example.org\"></iframe> \x00\n"), in.Input...)
	page, err := RatesHTML(in)
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	if refs := externalRefs(root); len(refs) > 0 {
		t.Errorf("hostile text became markup: %v", refs)
	}
	if got := root.find(named("title"))[0].text.String(); !strings.HasPrefix(got, in.Title) {
		t.Errorf("title %q: the input's title is not shown as text", got)
	}
	if box := root.byID("warnings").text.String(); !strings.Contains(box, "bell \uFFFD and escape \uFFFD[31m, invalid \uFFFD UTF-8, <img src=") {
		t.Errorf("the warning is not shown with its forbidden characters replaced: %q", box)
	}
}

// inlineSVG takes a plain drawing and refuses anything that could run or
// load: the page inlines the figure files unescaped, so this check is what
// keeps them inert.
func TestInlineSVG(t *testing.T) {
	const head = `<?xml version="1.0"?>` + "\n<!-- c -->\n"
	for _, tc := range []struct {
		name, svg string
		ok        bool
	}{
		{"plain", head + `<svg xmlns="http://www.w3.org/2000/svg"><g><path d="M0,0L1,1" style="fill:#FFFFFF"/><text>a &lt; b</text></g></svg>`, true},
		{"fragment url", `<svg xmlns="http://www.w3.org/2000/svg"><clipPath id="c"/><path clip-path="url(#c)"/></svg>`, true},
		{"script", `<svg><script>alert(1)</script></svg>`, false},
		{"event", `<svg onload="alert(1)"></svg>`, false},
		{"external href", `<svg xmlns:xlink="http://www.w3.org/1999/xlink"><a xlink:href="http://example.org/">x</a></svg>`, false},
		{"image", `<svg><image href="data:image/png;base64,AAAA"/></svg>`, false},
		{"url", `<svg><path style="fill:url(http://example.org/p.svg#g)"/></svg>`, false},
		{"foreignObject", `<svg><foreignObject><div/></foreignObject></svg>`, false},
		{"doctype", `<!DOCTYPE svg [<!ENTITY x "y">]><svg>&x;</svg>`, false},
		{"two roots", `<svg></svg><svg></svg>`, false},
		{"unclosed", `<svg><g></svg>`, false},
		{"no svg", `<html></html>`, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err := inlineSVG("f.svg", []byte(tc.svg))
			switch {
			case tc.ok && err != nil:
				t.Errorf("refused: %v", err)
			case tc.ok && !strings.HasPrefix(string(got), "<svg"):
				t.Errorf("kept the prolog: %q", got)
			case !tc.ok && (err == nil || !errors.Is(err, errUnsafeSVG)):
				t.Errorf("accepted (err %v)", err)
			}
		})
	}
}

// Every figure file internal/figures writes passes the check unchanged.
func TestFigureFilesInline(t *testing.T) {
	for _, f := range demoReport(t).Figures {
		if _, err := inlineSVG(f.Name, f.Data); err != nil {
			t.Errorf("%s: %v", f.Name, err)
		}
	}
}

// okabeIto is the colour-universal-design palette (Okabe & Ito 2008,
// "Color Universal Design (CUD): how to make figures and presentations
// that are friendly to colorblind people", J*Fly; the sRGB values as
// published there).
var okabeIto = map[string]bool{"#E69F00": true, "#56B4E9": true, "#009E73": true, "#F0E442": true,
	"#0072B2": true, "#D55E00": true, "#CC79A7": true, "#000000": true}

// luminance is the relative luminance of an sRGB colour "#RRGGBB" (WCAG
// 2.1, definition "relative luminance", W3C 2018).
func luminance(t *testing.T, hex string) float64 {
	t.Helper()
	v, err := strconv.ParseUint(strings.TrimPrefix(hex, "#"), 16, 32)
	if err != nil || len(hex) != 7 {
		t.Fatalf("colour %q", hex)
	}
	lin := func(c uint64) float64 {
		x := float64(c) / 255
		if x <= 0.03928 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	return 0.2126*lin(v>>16) + 0.7152*lin(v>>8&0xff) + 0.0722*lin(v&0xff)
}

// contrast is the WCAG 2.1 contrast ratio (L1 + 0.05)/(L2 + 0.05).
func contrast(t *testing.T, a, b string) float64 {
	la, lb := luminance(t, a), luminance(t, b)
	return (math.Max(la, lb) + 0.05) / (math.Min(la, lb) + 0.05)
}

// The page's signal colours are Okabe–Ito colours and keep their meaning
// in greyscale: luminance contrast alone (what greyscale keeps) separates
// the warnings border, the "no warnings" border and the recommended fit's
// rules from the white page and the warnings box's tint by at least 3:1,
// WCAG 2.1's minimum for graphical objects (SC 1.4.11), and the link
// colour from white by 4.5:1, its minimum for text (SC 1.4.3).
func TestPaletteContrast(t *testing.T) {
	page, err := RatesHTML(demoReport(t))
	if err != nil {
		t.Fatal(err)
	}
	vars := map[string]string{}
	for _, m := range regexp.MustCompile(`--(warn|ok|accent): (#[0-9A-Fa-f]{6})`).FindAllStringSubmatch(string(page), -1) {
		vars[m[1]] = strings.ToUpper(m[2])
	}
	tint := regexp.MustCompile(`\.warnings \{[^}]*background: (#[0-9A-Fa-f]{6})`).FindStringSubmatch(string(page))
	if len(vars) != 3 || tint == nil {
		t.Fatalf("palette not found in the style sheet: %v, box background %v", vars, tint)
	}
	for name, c := range vars {
		if !okabeIto[c] {
			t.Errorf("--%s %s is not an Okabe–Ito colour", name, c)
		}
		if r := contrast(t, c, "#FFFFFF"); r < 3 {
			t.Errorf("--%s %s on white: contrast %.2f, want ≥ 3", name, c, r)
		}
	}
	if r := contrast(t, vars["warn"], tint[1]); r < 3 {
		t.Errorf("warnings border %s on the box's %s: contrast %.2f, want ≥ 3", vars["warn"], tint[1], r)
	}
	if r := contrast(t, vars["accent"], "#FFFFFF"); r < 4.5 {
		t.Errorf("link colour %s on white: contrast %.2f, want ≥ 4.5", vars["accent"], r)
	}
	// The formula itself, against the values WCAG's examples give: black
	// on white 21:1 (exact).
	if r := contrast(t, "#000000", "#FFFFFF"); math.Abs(r-21) > 1e-12 {
		t.Errorf("contrast(black, white) = %v, want 21", r)
	}
	t.Logf("contrast on white: warn %.2f, ok %.2f, accent %.2f; warn on tint %.2f",
		contrast(t, vars["warn"], "#FFFFFF"), contrast(t, vars["ok"], "#FFFFFF"), contrast(t, vars["accent"], "#FFFFFF"), contrast(t, vars["warn"], tint[1]))
}

// The batch index is well-formed, links only to pages inside the batch's
// folder (relative paths) or to its own sections, marks a failed reaction
// in words and puts its error in the warnings box; a link that is not a
// plain relative path is not made live (html/template's URL filter).
func TestIndexHTML(t *testing.T) {
	page, err := IndexHTML(Index{Manifest: "m.yaml", Title: "two <b>reactions</b>", Rows: []IndexRow{
		{Name: "r01", Reaction: "ring -> a + b", State: "done", Forms: []string{"troe"}, MaxErrorPct: 0.8123456, Report: "../reactions/r01/report.html"},
		{Name: "r02", State: "failed", Error: "r02.yaml: grid: no pressures"},
		{Name: "r03", State: "done", Forms: []string{"plog"}, MaxErrorPct: 2, Warnings: []string{"k0/Z > 0.1"}, Report: "javascript:alert(1)"},
	}})
	if err != nil {
		t.Fatal(err)
	}
	root := parsePage(t, page)
	local := regexp.MustCompile(`^(#[a-z-]+|\.\./reactions/r0\d/report\.html)$`)
	for _, a := range root.find(func(n *node) bool { _, ok := n.attr["href"]; return ok }) {
		if !local.MatchString(a.attr["href"]) && !strings.HasPrefix(a.attr["href"], "#ZgotmplZ") {
			t.Errorf("link %q leaves the batch's folder", a.attr["href"])
		}
	}
	if bytes.Contains(page, []byte("javascript:")) {
		t.Error("a javascript: link was made")
	}
	_, rows := root.byID("reactions").cells()
	if len(rows) != 3 || rows[0][4] != "0.8123" || rows[1][2] != "FAILED" || rows[2][5] != "1" {
		t.Errorf("rows %q", rows)
	}
	box := root.byID("warnings").text.String()
	for _, want := range []string{"r02: FAILED: r02.yaml: grid: no pressures", "r03: k0/Z > 0.1"} {
		if !strings.Contains(box, want) {
			t.Errorf("the warnings box lacks %q", want)
		}
	}
}
