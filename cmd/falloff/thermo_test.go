package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

const thermoFile = "../../pkg/thermo/testdata/ring-thermo.yaml" // invented data

// The terminal report on the invented ring input (golden). The NASA
// coefficients, printed with 9 digits, are compared at 4: least squares
// may round differently on another platform.
func TestThermoReport(t *testing.T) {
	code, out, errs := runCLI(t, "thermo", thermoFile, "--step", "500 K")
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	out = coefficient.ReplaceAllStringFunc(out, func(c string) string {
		x, _ := strconv.ParseFloat(c, 64)
		return strconv.FormatFloat(x, 'e', 3, 64)
	})
	golden(t, "thermo-ring.txt", strings.ReplaceAll(out, thermoFile, "ring-thermo.yaml"))
}

var coefficient = regexp.MustCompile(`-?\d\.\d{8}e[-+]\d\d`)

// --json prints one object with the documented field names; argon, the
// bath gas, has Cp = 5R/2 at every temperature (a monatomic ideal gas;
// R = 8.314462618 J/(mol K), CODATA 2018).
func TestThermoJSON(t *testing.T) {
	const tol = 1e-9 // relative
	code, out, errs := runCLI(t, "thermo", thermoFile, "--json", "--midpoint", "auto")
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var doc struct {
		File             string  `json:"file"`
		StandardPressure float64 `json:"standard_pressure_Pa"`
		Species          []struct {
			Name        string `json:"name"`
			Composition []struct {
				Symbol string `json:"symbol"`
				Count  int    `json:"count"`
			} `json:"composition"`
			Basis string  `json:"formation_enthalpy_basis"`
			H298  float64 `json:"H298_J_per_mol"`
			Table []struct {
				T  float64 `json:"T_K"`
				Cp float64 `json:"Cp_J_per_mol_K"`
				S  float64 `json:"S_J_per_mol_K"`
				H  float64 `json:"H_minus_H298_J_per_mol"`
				G  float64 `json:"G_minus_H298_J_per_mol"`
			} `json:"table"`
			NASA struct {
				TLow  float64    `json:"T_low_K"`
				TMid  float64    `json:"T_mid_K"`
				THigh float64    `json:"T_high_K"`
				Low   [7]float64 `json:"low"`
				High  [7]float64 `json:"high"`
			} `json:"nasa7"`
			Fit struct {
				CpPct float64 `json:"max_Cp_error_pct"`
				SPct  float64 `json:"max_S_error_pct"`
			} `json:"fit_error"`
		} `json:"species"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, s := range doc.Species {
		names = append(names, s.Name+"/"+s.Basis)
		if len(s.Table) == 0 || s.NASA.TMid <= s.NASA.TLow || s.NASA.TMid >= s.NASA.THigh || s.Fit.CpPct > 0.1 || s.Fit.SPct > 0.1 {
			t.Errorf("%s: %d rows, NASA %v-%v-%v K, fit errors %v %%, %v %%", s.Name, len(s.Table), s.NASA.TLow, s.NASA.TMid, s.NASA.THigh, s.Fit.CpPct, s.Fit.SPct)
		}
		if s.Name == "Ar" {
			for _, r := range s.Table {
				if math.Abs(r.Cp/(2.5*8.314462618)-1) > tol {
					t.Errorf("Ar Cp(%v K) = %v", r.T, r.Cp)
				}
			}
		}
	}
	if got := strings.Join(names, " "); got != "ring/given frag-a/derived frag-b/given Ar/given" || doc.StandardPressure != 1e5 {
		t.Errorf("species %s, p° %v", got, doc.StandardPressure)
	}
}

func TestThermoFailures(t *testing.T) {
	dir := t.TempDir()
	src, err := os.ReadFile(thermoFile)
	if err != nil {
		t.Fatal(err)
	}
	bad := filepath.Join(dir, "bad.yaml")
	if err := os.WriteFile(bad, []byte(strings.Replace(string(src), "{C: 3, H: 6}", "{C: 3, Hq: 6}", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	checkFailures(t, []failCase{
		{"no unit", []string{"thermo", thermoFile, "--from", "300"}, exitUsage, "--from"},
		{"midpoint outside", []string{"thermo", thermoFile, "--midpoint", "5000 K"}, exitUsage, "Tmid"},
		{"from above to", []string{"thermo", thermoFile, "--from", "2000 K", "--to", "1000 K"}, exitUsage, "not below"},
		{"too many rows", []string{"thermo", thermoFile, "--step", "0.01 K"}, exitUsage, "--step"},
		{"empty step", []string{"thermo", thermoFile, "--step", ""}, exitUsage, "--step"},
		{"two files", []string{"thermo", thermoFile, thermoFile}, exitUsage, "at most one"},
		{"bad element", []string{"thermo", bad}, exitInput, "thermo.molecules.frag-a.composition.Hq"},
	})
}
