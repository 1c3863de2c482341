package main

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// The benchmark cases against the output of the code before the end-to-end
// speed work (commit 217a944^, its `rates --json` stored beside the inputs
// as *-previous.json): an independent implementation of the same physics in
// the parts replaced since (row-by-row factorisation, one-level rotor
// convolution, the half-pressure by root search, the Newton fits with a
// spread of starts). Tolerances: k, k0 and Fcent 1e-9 relative (measured
// 4.6e-12: the rotor convolution's series and the band sums round
// differently); the half-pressure 1e-6 (measured 2.7e-8: interpolation and
// two solves against a root search, each to its own tolerance); every fitted
// form's max, rms and held-out errors 1e-4 relative (measured 8e-6: the fits'
// flat directions) and the same recommended form.
func TestBenchMatchesPrevious(t *testing.T) {
	if testing.Short() {
		t.Skip("about 2 s: two 30 × 20 grids")
	}
	for _, name := range []string{"ch3nc-12mode", "invented-84mode"} {
		type errs struct {
			Max     float64 `json:"max_error_pct"`
			RMS     float64 `json:"rms_error_pct"`
			HeldOut float64 `json:"heldout_max_error_pct"`
		}
		var prev struct {
			K           [][]float64     `json:"k"`
			K0          []float64       `json:"k0"`
			Fcent       []float64       `json:"fcent"`
			Half        []float64       `json:"half_pressure_Pa"`
			Recommended string          `json:"recommended"`
			Fits        map[string]errs `json:"fits"`
		}
		var now struct {
			K     [][]float64 `json:"k"`
			K0    []float64   `json:"k0"`
			Fcent []float64   `json:"fcent"`
			Half  []float64   `json:"half_pressure_Pa"`
			Fits  struct {
				Recommended string `json:"recommended"`
				Troe        *errs  `json:"troe"`
				SRI         *errs  `json:"sri"`
				PLOG        *errs  `json:"plog"`
				Chebyshev   *errs  `json:"chebyshev"`
			} `json:"fits"`
		}
		b, err := os.ReadFile("../../testdata/bench/" + name + "-previous.json")
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(b, &prev); err != nil {
			t.Fatal(err)
		}
		code, out, stderr := runCLI(t, "rates", "--json", "--jobs", "2", "../../testdata/bench/"+name+".yaml")
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", name, code, stderr)
		}
		if err := json.Unmarshal([]byte(out), &now); err != nil {
			t.Fatal(err)
		}
		worst := map[string]float64{}
		cmp := func(what string, a, b []float64, tol float64) {
			if len(a) != len(b) {
				t.Fatalf("%s: %s: %d values, previous %d", name, what, len(b), len(a))
			}
			for i := range a {
				d := math.Abs(b[i]/a[i] - 1)
				worst[what] = math.Max(worst[what], d)
				if !(d <= tol) {
					t.Errorf("%s: %s[%d] = %.12g, previous %.12g", name, what, i, b[i], a[i])
					return
				}
			}
		}
		for i := range prev.K {
			cmp("k", prev.K[i], now.K[i], 1e-9)
		}
		cmp("k0", prev.K0, now.K0, 1e-9)
		cmp("fcent", prev.Fcent, now.Fcent, 1e-9)
		cmp("half-pressure", prev.Half, now.Half, 1e-6)
		for form, got := range map[string]*errs{"troe": now.Fits.Troe, "sri": now.Fits.SRI, "plog": now.Fits.PLOG, "chebyshev": now.Fits.Chebyshev} {
			want, ok := prev.Fits[form]
			if !ok || got == nil {
				t.Errorf("%s: %s fitted now %v, before %v", name, form, got != nil, ok)
				continue
			}
			cmp(form+" errors", []float64{want.Max, want.RMS, want.HeldOut}, []float64{got.Max, got.RMS, got.HeldOut}, 1e-4)
		}
		if now.Fits.Recommended != prev.Recommended {
			t.Errorf("%s: recommended %q, previous %q", name, now.Fits.Recommended, prev.Recommended)
		}
		t.Logf("%s: worst relative differences %v", name, worst)
	}
}
