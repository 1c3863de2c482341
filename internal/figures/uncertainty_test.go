package figures

import (
	"bytes"
	"encoding/xml"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/uncertainty"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// The figures of an uncertainty run are three well-formed SVG documents
// (two without sensitivities) whose labels carry the display units and
// the inputs; the result here is made up, as the figures only draw.
func TestUncertaintyFigures(t *testing.T) {
	temps, ps := []float64{500, 1000, 1500}, []float64{1e3, 1e5, 1e7}
	res := &uncertainty.Result{Samples: 50, Temperatures: temps, Pressures: ps,
		Inputs:        []uncertainty.Input{{Path: "molecules.TS.energy", Sensitivity: "dln k/dx per kcal/mol"}, {Path: "energy-transfer.alpha-300", Relative: true}},
		FactorT:       []float64{3, 2, 1.8},
		Sensitivities: []uncertainty.Sensitivity{{Path: "molecules.TS.energy"}, {Path: "energy-transfer.alpha-300"}}}
	for i := range temps {
		var row []uncertainty.Band
		var nom []float64
		for j := range ps {
			k := float64(i+1) * float64(j+1) * 100
			nom = append(nom, k)
			row = append(row, uncertainty.Band{Median: k, Low: k / 2, High: 2 * k, F: 2})
		}
		res.K, res.NominalK = append(res.K, row), append(res.NominalK, nom)
		res.NominalKInf = append(res.NominalKInf, 4*nom[len(nom)-1])
		for s := range res.Sensitivities {
			res.Sensitivities[s].K = append(res.Sensitivities[s].K, []float64{-0.5, 0.3, float64(s)})
		}
	}
	res.Factor = uncertainty.FitFactor(temps, res.FactorT)
	d := Units{Pressure: "bar", PaPerUnit: units.BarPa, Quantity: export.Units{}}
	files, err := Uncertainty(res, d)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]string{BandPlot: "P / bar", SensitivityPlot: "molecules.TS.energy (per kcal/mol)", FactorPlot: "sqrt(k97.5/k2.5)"}
	if len(files) != len(want) {
		t.Fatalf("%d files, want %d", len(files), len(want))
	}
	for _, f := range files {
		label, ok := want[f.Name]
		if !ok {
			t.Errorf("unexpected file %s", f.Name)
			continue
		}
		if err := xml.Unmarshal(f.Data, new(struct{})); err != nil || !bytes.Contains(f.Data, []byte("<svg")) {
			t.Errorf("%s: not an SVG document: %v", f.Name, err)
		}
		if !strings.Contains(string(f.Data), label) {
			t.Errorf("%s: no label %q", f.Name, label)
		}
	}
	res.Sensitivities = nil
	if files, err := Uncertainty(res, d); err != nil || len(files) != 2 {
		t.Errorf("without sensitivities: %d files, %v; want 2", len(files), err)
	}
}
