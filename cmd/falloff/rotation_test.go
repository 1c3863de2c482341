package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// adiabaticFile writes the CH3NC validation input with rotation: adiabatic-j.
func adiabaticFile(t *testing.T) string {
	t.Helper()
	src, err := os.ReadFile("../../testdata/ch3nc-validation.yaml")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(src), "  via: TS\n", "  via: TS\n  rotation: adiabatic-j\n", 1)
	path := filepath.Join(t.TempDir(), "adiabatic.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// micro with adiabatic J reports k(E, J) at a few J with their thresholds
// E0(J) = E0 + (B̄‡ − B̄)J(J+1) (the B̄ of the split tops), k(E, J) = 0
// below each, and the TST check over E and J (canonical TST, 1e-3 on
// 10 cm⁻¹ grains as in rrkm.TestAdiabaticThermalAverage).
func TestMicroAdiabatic(t *testing.T) {
	file := adiabaticFile(t)
	code, out, errs := runCLI(t, "micro", file, "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var res struct {
		Channels []struct {
			E0       float64     `json:"E0_cm-1"`
			Energies []float64   `json:"energies_cm-1"`
			Rotation string      `json:"external_rotation"`
			J        []int       `json:"J"`
			E0J      []float64   `json:"E0_at_J_cm-1"`
			KJ       [][]float64 `json:"k_at_J_per_s"`
			KInf     []float64   `json:"k_inf"`
			KInt     []float64   `json:"k_inf_integrated"`
		} `json:"channels"`
	}
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	mc := res.Channels[0]
	if !strings.Contains(mc.Rotation, "J adiabatic") || len(mc.J) != 4 || mc.J[0] != 0 {
		t.Fatalf("rotation %q, J %v", mc.Rotation, mc.J)
	}
	// B̄ = sqrt(BC) of the file's tops: CH3NC 0.333999, TS sqrt(0.526916·0.409692).
	db := math.Sqrt(0.526916*0.409692) - 0.333999
	for k, j := range mc.J {
		want := mc.E0 + db*float64(j*(j+1))
		if math.Abs(mc.E0J[k]-want) > 1e-6*want {
			t.Errorf("E0(J=%d) = %g, want %g", j, mc.E0J[k], want)
		}
		for i, e := range mc.Energies {
			if e+5 < want && mc.KJ[k][i] != 0 {
				t.Fatalf("J = %d: k = %g at %g cm-1, below E0(J) = %g", j, mc.KJ[k][i], e, want)
			}
		}
	}
	for i := range mc.KInf {
		if math.Abs(mc.KInt[i]/mc.KInf[i]-1) > 1e-3 {
			t.Errorf("<k(E,J)>/k∞ = %g", mc.KInt[i]/mc.KInf[i])
		}
	}
	code, out, _ = runCLI(t, "micro", file)
	if code != exitOK || !strings.Contains(out, "k(E, J=0)") || !strings.Contains(out, "E0(J=0) = ") {
		t.Errorf("micro terminal report: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI(t, "states", file, "--j-resolved")
	if code != exitOK || !strings.Contains(out, "rho(E,J=0)") || !strings.Contains(out, "J rotor B = 0.334 cm-1") {
		t.Errorf("states --j-resolved: exit %d\n%s", code, out)
	}
	dir := t.TempDir()
	if code, _, errs := runCLI(t, "rates", "-q", "--skip-check", "--plots", dir, file); code != exitOK {
		t.Fatalf("rates --plots: exit %d: %s", code, errs)
	}
	svg, err := os.ReadFile(filepath.Join(dir, "micro.svg"))
	if err != nil || !strings.Contains(string(svg), "J = 0") || !strings.Contains(string(svg), "k(E, J)") {
		t.Errorf("micro.svg should draw k(E, J) for several J (%v)", err)
	}
}
