package main

import (
	"encoding/json"
	"encoding/xml"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// `compare` orders the models as physics requires (Troe, J. Chem. Phys. 66,
// 4758, 1977: the strong collider is the upper bound of collisional
// activation; a larger ⟨ΔE⟩down transfers more energy per collision): at the
// same collision rate exponential-down k ≤ strong-collider k, and k grows with
// ⟨ΔE⟩down, at every grid point and in k0. Its plot is well-formed SVG with
// one curve per model and plotted temperature.
func TestCompareOrdering(t *testing.T) {
	svg := filepath.Join(t.TempDir(), "compare.svg")
	code, out, errs := runCLI(t, "compare", "--json", "--plot", svg,
		"--alpha", "100 cm-1", "--alpha", "200 cm-1", "--alpha", "400 cm-1", "--alpha", "800 cm-1", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r job.CompareResult
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Models) != 5 || r.Models[0].Name != "strong collider" {
		t.Fatalf("models %+v", r.Models)
	}
	for i := range r.Temperatures {
		for j := range r.Pressures {
			for m := 1; m < len(r.Models); m++ {
				k, prev := r.Models[m].K[i][j], r.Models[m-1].K[i][j]
				if m == 1 && k > prev*(1+1e-9) {
					t.Errorf("T %v P %v: exp-down %v > strong collider %v", r.Temperatures[i], r.Pressures[j], k, prev)
				}
				if m > 1 && k < prev*(1-1e-9) {
					t.Errorf("T %v P %v: k falls from %v to %v as ⟨ΔE⟩down grows", r.Temperatures[i], r.Pressures[j], prev, k)
				}
			}
		}
		for m := 2; m < len(r.Models); m++ {
			if r.Models[m].K0[i] < r.Models[m-1].K0[i] || r.Models[m].K0[i] > r.Models[0].K0[i] {
				t.Errorf("T %v: k0 out of order", r.Temperatures[i])
			}
		}
	}
	if got, want := svgCurves(t, svg), 3*5; got != want { // 3 temperatures × 5 models
		t.Errorf("%d curves in the legend, want %d", got, want)
	}
}

// svgCurves checks that the file is well-formed XML and counts the legend
// entries of the form "T K, model".
func svgCurves(t *testing.T, path string) int {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	dec := xml.NewDecoder(f)
	legend := 0
	inText := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("%s is not well-formed XML: %v", path, err)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			inText = v.Name.Local == "text"
		case xml.CharData:
			if inText && strings.Contains(string(v), " K, ") {
				legend++
			}
		}
	}
	return legend
}

// compare --plot-temperatures draws the curves at the grid temperature
// nearest each one asked (here one of the file's three), and refuses one
// outside the grid or without --plot.
func TestComparePlotTemperatures(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "c.svg")
	code, _, errs := runCLI(t, "compare", "-q", "--alpha", "300 cm-1", "--plot", plot, "--plot-temperatures", "800 K", ch3ncFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	svg, err := os.ReadFile(plot)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(svg), "800 K, strong collider") || strings.Contains(string(svg), "500 K") || strings.Contains(string(svg), "1200 K") {
		t.Errorf("the figure should hold the 800 K curves only")
	}
	checkFailures(t, []failCase{
		{"outside", []string{"compare", "-q", "--plot", plot, "--plot-temperatures", "300 K", ch3ncFile}, exitUsage, "outside the grid"},
		{"without plot", []string{"compare", "--plot-temperatures", "800 K", ch3ncFile}, exitUsage, "goes with --plot"},
	})
}
