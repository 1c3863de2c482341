package export

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
	"unicode"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/pkg/thermo"
)

// tolCoeff is the relative difference allowed between a coefficient and
// its value read back: issue 15 asks for 1e-7; the YAML carries 10
// significant digits (5e-11) and E15.8 nine (5e-9).
const tolCoeff = 1e-7

// testSpecies returns entries for the built-in CH4 and CO2 and, under the
// same polynomials, names a YAML writer must quote.
func testSpecies(t *testing.T) []Species {
	t.Helper()
	var out []Species
	for _, n := range []string{"CH4", "CO2"} {
		b, _ := thermo.BuiltIn(n)
		m, err := thermo.New(&b.Species, 3000)
		if err != nil {
			t.Fatal(err)
		}
		p, _, err := thermo.Fit(m, b.FormationEnthalpy, thermo.FitOptions{Range: thermo.DefaultRange})
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, Species{Name: n, Composition: b.Composition, Thermo: *p, Note: n + ": ⟨ΔE⟩ × note"})
	}
	for _, name := range []string{"1,3-C4H6", "*X", "a: b", "true", "1e5", "#c"} {
		s := out[0]
		s.Name, s.Note = name, ""
		out = append(out, s)
	}
	return out
}

func near(a, b float64) bool { return math.Abs(a-b) <= tolCoeff*math.Max(math.Abs(a), math.Abs(b)) }

// The species YAML read back with the YAML library, strictly (no unknown
// keys): names, compositions, ranges (ascending), the reference pressure
// and the 14 coefficients (Cantera's YAML reference, species.md: NASA7
// data low range first).
func TestSpeciesYAMLRoundTrip(t *testing.T) {
	sp := testSpecies(t)
	b, err := SpeciesYAML(sp)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Species []struct {
			Name        string         `yaml:"name"`
			Composition map[string]int `yaml:"composition"`
			Thermo      struct {
				Model             string      `yaml:"model"`
				TemperatureRanges []float64   `yaml:"temperature-ranges"`
				ReferencePressure string      `yaml:"reference-pressure"`
				Data              [][]float64 `yaml:"data"`
			} `yaml:"thermo"`
		} `yaml:"species"`
	}
	dec := yaml.NewDecoder(bytes.NewReader(b))
	dec.KnownFields(true)
	if err := dec.Decode(&doc); err != nil {
		t.Fatalf("%v\n%s", err, b)
	}
	if len(doc.Species) != len(sp) {
		t.Fatalf("%d species read back, want %d", len(doc.Species), len(sp))
	}
	for i, s := range sp {
		got := doc.Species[i]
		p := s.Thermo
		if got.Name != s.Name || got.Thermo.Model != "NASA7" || got.Thermo.ReferencePressure != "1 bar" ||
			len(got.Thermo.TemperatureRanges) != 3 || got.Thermo.TemperatureRanges[0] != p.TLow ||
			got.Thermo.TemperatureRanges[1] != p.TMid || got.Thermo.TemperatureRanges[2] != p.THigh {
			t.Errorf("species %d: %+v", i, got)
		}
		for _, e := range s.Composition {
			if got.Composition[e.Symbol] != e.Count {
				t.Errorf("%s: composition %v", s.Name, got.Composition)
			}
		}
		if len(got.Thermo.Data) != 2 || len(got.Thermo.Data[0]) != 7 || len(got.Thermo.Data[1]) != 7 {
			t.Fatalf("%s: data %v", s.Name, got.Thermo.Data)
		}
		for j := range 7 {
			if !near(got.Thermo.Data[0][j], p.Low[j]) || !near(got.Thermo.Data[1][j], p.High[j]) {
				t.Errorf("%s: a%d read back %v, %v; want %v, %v", s.Name, j+1, got.Thermo.Data[0][j], got.Thermo.Data[1][j], p.Low[j], p.High[j])
			}
		}
	}
	if bytes.ContainsFunc(b, func(r rune) bool { return r > 127 }) {
		t.Error("non-ASCII characters in the YAML")
	}
}

// thermoEntry is one entry of a fixed-column thermo block as the test's
// own column parser reads it.
type parsedThermo struct {
	name              string
	comp              map[string]int
	phase             string
	tLow, tHigh, tMid float64
	high, low         [7]float64
}

// parseThermoBlock reads a THERMO block by its columns (Kee, Rupley &
// Miller 1989): every entry line is 80 characters with its number in
// column 80; fields are cut at their columns, never split on spaces.
func parseThermoBlock(t *testing.T, text string) (defaults [3]float64, out []parsedThermo) {
	t.Helper()
	lines := strings.Split(strings.TrimRight(text, "\n"), "\n")
	if !strings.HasPrefix(lines[0], "THERMO") || lines[len(lines)-1] != "END" {
		t.Fatalf("block starts %q, ends %q", lines[0], lines[len(lines)-1])
	}
	for i := range 3 {
		defaults[i] = colFloat(t, lines[1], 10*i, 10*i+10)
	}
	var cur []string
	for _, l := range lines[2 : len(lines)-1] {
		if strings.HasPrefix(l, "!") {
			if len(cur) != 0 {
				t.Fatalf("comment inside an entry: %q", l)
			}
			continue
		}
		if len(l) != 80 || l[79] != byte('1'+len(cur)) {
			t.Fatalf("line %q: length %d, column 80 %q, want 80 and %d", l, len(l), l[len(l)-1:], len(cur)+1)
		}
		cur = append(cur, l)
		if len(cur) < 4 {
			continue
		}
		e := parsedThermo{comp: map[string]int{}}
		l1 := cur[0]
		e.name = strings.TrimSpace(l1[0:18])
		if strings.ContainsFunc(l1[73:79], unicode.IsLetter) {
			t.Errorf("%s: a fifth element in columns 74-79 %q", e.name, l1[73:79])
		}
		for k := range 4 {
			chunk := l1[24+5*k : 29+5*k]
			sym, cnt := strings.TrimSpace(chunk[:2]), strings.TrimSpace(chunk[2:])
			if sym == "" && cnt == "" {
				continue
			}
			n, err := strconv.Atoi(cnt)
			if err != nil {
				t.Fatalf("%s: element field %q", e.name, chunk)
			}
			e.comp[sym] = n
		}
		e.phase = l1[44:45]
		e.tLow, e.tHigh, e.tMid = colFloat(t, l1, 45, 55), colFloat(t, l1, 55, 65), colFloat(t, l1, 65, 73)
		var c []float64
		for _, l := range cur[1:] {
			for k := 0; k+15 <= 75; k += 15 {
				if f := strings.TrimSpace(l[k : k+15]); f != "" {
					c = append(c, colFloat(t, l, k, k+15))
				}
			}
		}
		if len(c) != 14 {
			t.Fatalf("%s: %d coefficients", e.name, len(c))
		}
		copy(e.high[:], c[:7])
		copy(e.low[:], c[7:])
		out = append(out, e)
		cur = nil
	}
	if len(cur) != 0 {
		t.Fatalf("unfinished entry %q", cur)
	}
	return defaults, out
}

func colFloat(t *testing.T, l string, a, b int) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(strings.TrimSpace(l[a:b]), 64)
	if err != nil {
		t.Fatalf("columns %d-%d of %q: %v", a+1, b, l, err)
	}
	return x
}

// The column parser reads a published entry: GRI-Mech 3.0's O2 (Smith et
// al. 1999, the thermo file as distributed, which writes Tmid in columns
// 66-75).
func TestThermoParserReadsGRI(t *testing.T) {
	gri := "THERMO\n   300.000  1000.000  5000.000\n" +
		"O2                TPIS89O   2               G   200.000  3500.000  1000.000    1\n" +
		" 3.28253784E+00 1.48308754E-03-7.57966669E-07 2.09470555E-10-2.16717794E-14    2\n" +
		"-1.08845772E+03 5.45323129E+00 3.78245636E+00-2.99673416E-03 9.84730201E-06    3\n" +
		"-9.68129509E-09 3.24372837E-12-1.06394356E+03 3.65767573E+00                   4\n" +
		"END\n"
	_, es := parseThermoBlock(t, gri)
	e := es[0]
	if e.name != "O2" || e.comp["O"] != 2 || e.phase != "G" || e.tLow != 200 || e.tHigh != 3500 || e.tMid != 1000 ||
		e.high[0] != 3.28253784 || e.high[6] != 5.45323129 || e.low[0] != 3.78245636 || e.low[6] != 3.65767573 {
		t.Errorf("GRI O2 read as %+v", e)
	}
}

// The thermo block read back by its columns: names, elements, phase,
// temperatures, and the coefficients (high range first, a7 moved to the
// reference pressure) to 1e-7.
func TestThermoTextRoundTrip(t *testing.T) {
	sp := testSpecies(t)[:3] // CH4, CO2, 1,3-C4H6
	for _, ref := range []float64{TextReferencePressure, thermo.StandardPressure} {
		b, err := ThermoText(sp, ref)
		if err != nil {
			t.Fatal(err)
		}
		defaults, got := parseThermoBlock(t, string(b))
		if defaults != [3]float64{200, 1000, 3000} || len(got) != len(sp) {
			t.Fatalf("defaults %v, %d entries", defaults, len(got))
		}
		shift := math.Log(ref / thermo.StandardPressure)
		for i, s := range sp {
			e, p := got[i], s.Thermo
			if e.name != s.Name || e.phase != "G" || e.tLow != p.TLow || e.tHigh != p.THigh || e.tMid != p.TMid {
				t.Errorf("entry %d: %+v", i, e)
			}
			for _, el := range s.Composition {
				if e.comp[strings.ToUpper(el.Symbol)] != el.Count {
					t.Errorf("%s: composition %v", s.Name, e.comp)
				}
			}
			wantLow, wantHigh := p.Low, p.High
			wantLow[6] -= shift
			wantHigh[6] -= shift
			for j := range 7 {
				if !near(e.low[j], wantLow[j]) || !near(e.high[j], wantHigh[j]) {
					t.Errorf("%s (%v Pa): a%d read back %v, %v; want %v, %v", s.Name, ref, j+1, e.low[j], e.high[j], wantLow[j], wantHigh[j])
				}
			}
		}
		if bytes.ContainsFunc(b, func(r rune) bool { return r > 127 }) {
			t.Error("non-ASCII characters in the thermo block")
		}
	}
}

// What the formats cannot carry is refused with the species named.
func TestSpeciesRefuses(t *testing.T) {
	base := testSpecies(t)[0]
	bad := func(f func(*Species)) []Species {
		s := base
		s.Composition = append([]thermo.Element(nil), base.Composition...)
		f(&s)
		return []Species{s}
	}
	for _, tc := range []struct {
		name string
		sp   []Species
		yaml bool // the YAML refuses it too
	}{
		{"no composition", bad(func(s *Species) { s.Composition = nil }), true},
		{"NaN", bad(func(s *Species) { s.Thermo.Low[2] = math.NaN() }), true},
		{"ranges", bad(func(s *Species) { s.Thermo.TMid = 5000 }), true},
		{"long name", bad(func(s *Species) { s.Name = strings.Repeat("C", 19) }), false},
		{"space", bad(func(s *Species) { s.Name = "a b" }), false},
		{"non-ASCII", bad(func(s *Species) { s.Name = "CH₄" }), false},
		{"five elements", bad(func(s *Species) {
			s.Composition = nil
			for _, e := range []string{"C", "H", "O", "N", "S"} {
				s.Composition = append(s.Composition, thermo.Element{Symbol: e, Count: 1})
			}
		}), false},
		{"1000 atoms", bad(func(s *Species) { s.Composition[1].Count = 1000 }), false},
		{"huge coefficient", bad(func(s *Species) { s.Thermo.Low[4] = 1e120 }), false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := ThermoText(tc.sp, TextReferencePressure); err == nil || !strings.Contains(err.Error(), fmt.Sprintf("%q", tc.sp[0].Name)) && tc.sp[0].Name != "" {
				t.Errorf("thermo block: %v", err)
			}
			if _, err := SpeciesYAML(tc.sp); (err != nil) != tc.yaml {
				t.Errorf("YAML: %v", err)
			}
		})
	}
	if _, err := ThermoText(nil, TextReferencePressure); err == nil {
		t.Error("empty block accepted")
	}
	if _, err := ThermoText([]Species{base}, 0); err == nil {
		t.Error("zero reference pressure accepted")
	}
}

// Our entries leave the date field (columns 19-24) and columns 74-79
// blank, so that readers of either midpoint width read the midpoint.
func TestThermoTextBlankFields(t *testing.T) {
	b, err := ThermoText(testSpecies(t)[:2], TextReferencePressure)
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(string(b), "\n") {
		if len(l) == 80 && l[79] == '1' && (strings.TrimSpace(l[18:24]) != "" || strings.TrimSpace(l[73:79]) != "") {
			t.Errorf("line %q: columns 19-24 or 74-79 not blank", l)
		}
	}
}

func TestElements(t *testing.T) {
	got := strings.Join(Elements(testSpecies(t)[:2]), " ") // CH4, CO2
	if got != "C H O" {
		t.Errorf("elements %q, want C H O", got)
	}
}
