package export

import (
	"fmt"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// fuzzForms are fixed valid forms, one of each fit.Form type, in internal
// units: the GRI-Mech 3.0 falloff of H + CH3 (+M) (Smith et al. 1999), and
// an invented PLOG, Chebyshev and Arrhenius. Only the names and the text
// around them are fuzzed; the numbers are checked elsewhere.
func fuzzForms() []fit.Form {
	na := units.Avogadro
	ta := func(calPerMol float64) float64 { return calPerMol * units.Calorie / gasConstant } // Ea/R in K
	return []fit.Form{
		&fit.Falloff{
			High: fit.Arrhenius{A: 1.39e16 / na, N: -0.534, Ta: ta(536)},
			Low:  fit.Arrhenius{A: 2.62e33 / (na * na), N: -4.76, Ta: ta(2440)},
			Troe: &fit.Troe{A: 0.783, T3: 74, T1: 2941, T2: 6964, HasT2: true},
		},
		&fit.PLOG{Entries: []fit.PlogEntry{
			{P: 1e3, Terms: []fit.Arrhenius{{A: 1e10, N: 0.5, Ta: 15000}}},
			{P: 1e5, Terms: []fit.Arrhenius{{A: 1e12, N: 0.2, Ta: 17000}, {A: 1e9, N: 1, Ta: 12000}}},
		}},
		&fit.Chebyshev{Tmin: 300, Tmax: 2500, Pmin: 1e3, Pmax: 1e7,
			Coef: [][]float64{{-7.5, 0.8, -0.1}, {-0.9, 0.3, 0.02}, {0.2, -0.05, 0.01}}},
		&fit.Arrhenius{A: 3e13, N: -0.5, Ta: 100},
	}
}

// auxKeywords are the keywords that may open a non-comment line of the
// keyword text other than REACTIONS, END and a reaction line.
var auxKeywords = map[string]bool{"LOW": true, "TROE": true, "SRI": true, "PLOG": true,
	"TCHEB": true, "PCHEB": true, "CHEB": true, "DUPLICATE": true}

// FuzzWriters writes one reaction with fuzzed species names, title, note,
// header line and input name, and each fixed form in turn (form selects it;
// its bit 2 writes the reaction as a recombination), through YAML and Text.
// Each writer must refuse with a one-line error or give a file that parses:
// the YAML with go.yaml.in/yaml/v3, into a map whose "reactions" list holds
// one entry whose equation names the species exactly as given (and the
// phase skeleton, PhaseSkeleton, with the same names, its species); the keyword
// text by a line check (every line at most maxLine bytes of printable
// ASCII; every line a '!' comment, blank, REACTIONS, END, the reaction line
// with the species as given, or an auxiliary keyword line without '=').
// The keyword format is line-based: any control character, or a byte
// beyond ASCII that an old reader cannot take, breaks it for some reader.
func FuzzWriters(f *testing.F) {
	seeds := []struct {
		a, b, c, title, note, line, input string
		form                              uint8
	}{
		{"CH4", "CH3", "H", "GRI-Mech check", "troe fit", "collision model: exponential-down", "ch4.yaml", 0},
		{"ring", "frag-a", "frag-b", "Ring opening (invented)", "max error 0.3 %", "bath: Ar", "demo.yaml", 1},
		{"C2H6", "CH3", "CH3", "Ethane ⇌ 2 CH₃ — α, β, ∞", "fit error ±1 %", "ΔE = 250 cm⁻¹", "éthane.yaml", 6},
		{"A", "B", "C", "title: with: colons", "# not a comment", "- [list]", "a: b.yaml", 3},
		{"X*", "&Y", "Z:", "line\nbreak", "tab\there", "cr\rhere", "new\nline.yaml", 2},
		{"a", "b", "c", "esc \x1b[31m red", "nel \u0085 ls \u2028 ps \u2029", "bom \ufeff", "nul\x00.yaml", 7},
		{"s", "t", "u", "\xff\xfe invalid utf-8", strings.Repeat("long ", 100), strings.Repeat("x", 300), "in.yaml", 5},
		{"'q'", "\"d\"", "%p", "{flow}", "[seq]", "!tag", "@at", 4},
		{"Ar", "M", "HV", "reserved names", "", "", "r.yaml", 0},
		{"Ä", "b", "c", "non-ASCII name", "", "", "n.yaml", 1},
		{strings.Repeat("L", 60), "b", "c", "long name", "", "", "l.yaml", 2},
	}
	for _, s := range seeds {
		f.Add(s.a, s.b, s.c, s.title, s.note, s.line, s.input, s.form)
	}
	forms := fuzzForms()
	f.Fuzz(func(t *testing.T, a, b, c, title, note, line, input string, form uint8) {
		r := Reaction{Reactants: []string{a}, Products: []string{b, c}, Order: 1,
			Form: forms[int(form)%len(forms)], Note: note}
		if form&4 != 0 {
			r.Reactants, r.Products, r.Order = r.Products, r.Reactants, 2
		}
		h := Header{Title: title, Input: input, Checksum: "sha256:0", Program: "falloff fuzz",
			TMin: 300, TMax: 2500, PMin: 1e3, PMax: 1e7, Lines: []string{line}}
		if out, err := YAML(h, DefaultUnits, []Reaction{r}); err != nil {
			checkRefusal(t, "YAML", err)
		} else {
			checkYAML(t, out, r)
			// The names YAML accepts also go into the phase skeleton.
			checkSkeleton(t, PhaseSkeleton("reactions.yaml", []string{a, b, c}), []string{a, b, c})
		}
		if out, err := Text(h, DefaultUnits, []Reaction{r}); err != nil {
			checkRefusal(t, "Text", err)
		} else {
			checkText(t, out, r)
		}
	})
}

// checkRefusal fails unless err is one non-empty line.
func checkRefusal(t *testing.T, writer string, err error) {
	t.Helper()
	if msg := err.Error(); msg == "" || strings.ContainsAny(msg, "\n\r") {
		t.Fatalf("%s: refusal is not one line: %q", writer, msg)
	}
}

// checkYAML parses a YAML reactions file and checks its one equation.
func checkYAML(t *testing.T, out []byte, r Reaction) {
	t.Helper()
	var doc map[string]any
	if err := yaml.Unmarshal(out, &doc); err != nil {
		t.Fatalf("YAML does not parse: %v\n%s", err, out)
	}
	list, ok := doc["reactions"].([]any)
	if !ok || len(list) != 1 {
		t.Fatalf("YAML: reactions is %T with %v, want a list of one\n%s", doc["reactions"], doc["reactions"], out)
	}
	entry, ok := list[0].(map[string]any)
	if !ok {
		t.Fatalf("YAML: reaction is %T, want a map\n%s", list[0], out)
	}
	if got, want := entry["equation"], r.equation(true); got != want {
		t.Fatalf("YAML: equation %q, want %q\n%s", got, want, out)
	}
	// The species as a simulator splits the equation: at " + " and
	// " <=> ", without the collider.
	eq := strings.ReplaceAll(entry["equation"].(string), " (+M)", "")
	sides := strings.Split(eq, " <=> ")
	if len(sides) != 2 || strings.Join(strings.Split(sides[0], " + "), "\x00") != strings.Join(r.Reactants, "\x00") ||
		strings.Join(strings.Split(sides[1], " + "), "\x00") != strings.Join(r.Products, "\x00") {
		t.Fatalf("YAML: equation %q does not split into the species %q and %q", eq, r.Reactants, r.Products)
	}
}

// checkSkeleton parses a phase skeleton and checks its species list.
func checkSkeleton(t *testing.T, out []byte, species []string) {
	t.Helper()
	var doc struct {
		Phases []struct {
			Species []string `yaml:"species"`
		} `yaml:"phases"`
	}
	if err := yaml.Unmarshal(out, &doc); err != nil {
		t.Fatalf("phase skeleton does not parse: %v\n%s", err, out)
	}
	if len(doc.Phases) != 1 || strings.Join(doc.Phases[0].Species, "\x00") != strings.Join(species, "\x00") {
		t.Fatalf("phase skeleton: phases %+v, want one with species %q\n%s", doc.Phases, species, out)
	}
}

// checkText checks the keyword text line by line.
func checkText(t *testing.T, out []byte, r Reaction) {
	t.Helper()
	if !utf8.Valid(out) {
		t.Fatalf("Text: not valid UTF-8\n%q", out)
	}
	want := r.equation(false)
	sawReactions, sawEnd, reactions := false, false, 0
	for i, l := range strings.Split(strings.TrimSuffix(string(out), "\n"), "\n") {
		where := fmt.Sprintf("Text line %d %q", i+1, l)
		if len(l) > maxLine {
			t.Fatalf("%s: %d bytes, at most %d", where, len(l), maxLine)
		}
		for j := 0; j < len(l); j++ {
			if l[j] < 0x20 || l[j] > 0x7e {
				t.Fatalf("%s: byte %#x is not printable ASCII", where, l[j])
			}
		}
		f := strings.Fields(l)
		switch {
		case len(f) == 0 || strings.HasPrefix(l, "!"):
		case sawEnd:
			t.Fatalf("%s: after END", where)
		case f[0] == "REACTIONS":
			sawReactions = true
		case f[0] == "END":
			sawEnd = true
		case auxKeywords[f[0]]:
			if strings.Contains(l, "=") {
				t.Fatalf("%s: '=' on an auxiliary line", where)
			}
		default:
			if !sawReactions || len(f) != 4 || f[0] != want {
				t.Fatalf("%s: not the reaction line %q with A, n, Ea", where, want)
			}
			for _, x := range f[1:] {
				if _, err := strconv.ParseFloat(x, 64); err != nil {
					t.Fatalf("%s: %v", where, err)
				}
			}
			reactions++
		}
	}
	if !sawReactions || !sawEnd || reactions != 1 {
		t.Fatalf("Text: REACTIONS %v, END %v, %d reaction lines\n%s", sawReactions, sawEnd, reactions, out)
	}
}
