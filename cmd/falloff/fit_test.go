package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/spf13/pflag"

	"github.com/falloff-kinetics/falloff/pkg/fit"
)

const griTable = "../../pkg/fit/testdata/h_ch3_gri30.csv"

// `fit` on a table generated from the GRI-Mech 3.0 Troe parameters for
// H + CH3 (+M) (Smith et al., 1999) recommends Troe and recovers its
// parameters: a = 0.783, T*** = 74, T* = 2941, T** = 6964 (to 0.5 %, the
// table's 6 significant digits limit the broadening parameters).
func TestFitGRITable(t *testing.T) {
	code, out, errs := runCLI(t, "fit", "--json", "--forms", "troe,plog,chebyshev", griTable)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res fit.Results
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if res.Recommended != fit.FormTroe || res.Troe == nil || res.Troe.Troe == nil {
		t.Fatalf("recommended %q, troe %+v", res.Recommended, res.Troe)
	}
	tr := res.Troe.Troe
	for _, c := range []struct{ got, want float64 }{{tr.A, 0.783}, {tr.T3, 74}, {tr.T1, 2941}, {tr.T2, 6964}} {
		if d := c.got/c.want - 1; d > 0.005 || d < -0.005 {
			t.Errorf("Troe parameter %v, GRI-Mech 3.0 %v", c.got, c.want)
		}
	}
	code, out, _ = runCLI(t, "fit", "--forms", "troe,plog,chebyshev", griTable)
	if code != exitOK {
		t.Fatal(code)
	}
	golden(t, "fit-gri.txt", out)
}

func TestFitErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("T/K,P/atm,k/s-1\n300,1,1e3\n400,1,-5\n500,1,1e5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	checkFailures(t, []failCase{
		{"negative k", []string{"fit", bad}, exitInput, "bad.csv:3: column 3"},
		{"no file", []string{"fit"}, exitUsage, "one table"},
		{"unknown form", []string{"fit", "--forms", "troe,magic", griTable}, exitUsage, "magic"},
		{"bad order", []string{"fit", "--chebyshev-order", "seven", griTable}, exitUsage, "N_TxN_P"},
		{"missing", []string{"fit", filepath.Join(dir, "none.csv")}, exitInput, "none.csv"},
	})
}

// validate turns --forms into form names once, for runFit to use.
func TestFitOptionsForms(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		want []fit.FormName
	}{
		{"default", nil, []fit.FormName{fit.FormArrhenius, fit.FormLindemann, fit.FormTroe, fit.FormSRI, fit.FormPLOG, fit.FormChebyshev}},
		{"two", []string{"--forms", "chebyshev,troe"}, []fit.FormName{fit.FormChebyshev, fit.FormTroe}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var o fitOptions
			fs := pflag.NewFlagSet("fit", pflag.ContinueOnError)
			o.addFlags(fs)
			if err := fs.Parse(c.args); err != nil {
				t.Fatal(err)
			}
			if err := o.validate([]string{griTable}); err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(o.forms, c.want) {
				t.Errorf("forms %q, want %q", o.forms, c.want)
			}
		})
	}
}
