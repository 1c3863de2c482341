package job_test

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/job"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// spectrumTSTTol bounds |⟨k⟩/k∞ − 1| for the thermal average of the
// spectrum's k(E) over its ρ(E): the 0.5 % the design allows the grain
// error of the TST identity (docs/design.md §3).
const spectrumTSTTol = 5e-3

// The spectrum the figures draw (the master equation's grains merged over
// the temperatures, finest first) carries k(E) and ρ(E) in their units:
// its Boltzmann average Σ k ρ e^(−E/kT) / Σ ρ e^(−E/kT) at the lowest and
// the highest temperature equals canonical TST k∞(T) (Eyring 1935; the
// identity of Holbrook, Pilling & Robertson 1996, eq. 4.26) to
// spectrumTSTTol, and its energies rise strictly (no grain counted twice);
// on the test file (3 temperatures) and the 12-mode benchmark (30, from
// 300 to 2500 K, where the merged grid changes width 29 times).
func TestSpectrumTST(t *testing.T) {
	for _, file := range []string{"../../testdata/ch3nc-falloff.yaml", "../../testdata/bench/ch3nc-12mode.yaml"} {
		t.Run(file, func(t *testing.T) {
			if testing.Short() && strings.Contains(file, "bench") {
				t.Skip("the 30 × 20 benchmark grid")
			}
			n := network(t, file)
			r, err := n.Rates(context.Background(), job.Options{SkipCheck: true, SkipHeldOut: true})
			if err != nil {
				t.Fatal(err)
			}
			sp := r.Spectrum
			if sp == nil {
				t.Fatal("no spectrum")
			}
			for i := 1; i < len(sp.Energies); i++ {
				if !(sp.Energies[i] > sp.Energies[i-1]) {
					t.Fatalf("energies not rising at %d: %v, %v", i, sp.Energies[i-1], sp.Energies[i])
				}
			}
			ts := r.Temperatures
			for _, tK := range []float64{ts[0], ts[len(ts)-1]} {
				num, den := 0.0, 0.0
				for i, e := range sp.Energies {
					// Relative to E0 to stay in range; the grain's width
					// is in ρ (per cm⁻¹) times the spacing, which the
					// ratio needs: Σ over grains of ρ·ΔE.
					w := sp.Density[i] * width(sp.Energies, i) * math.Exp(-(e-sp.E0)/units.KT(tK))
					num += sp.K[i] * w
					den += w
				}
				want := n.Main().KInf(&n.Wells[0].Molecule.Species, tK)
				d := num/den/want - 1
				if math.Abs(d) > spectrumTSTTol {
					t.Errorf("%g K: ⟨k(E)⟩ = %.6g s-1, canonical TST %.6g s-1 (rel. %.2g)", tK, num/den, want, d)
				}
				t.Logf("%g K: ⟨k(E)⟩/k∞ − 1 = %.2g", tK, d)
			}
		})
	}
}

// width returns the width of grain i of a grid of grain centres that may
// change spacing: half the gaps to its neighbours on each side.
func width(e []float64, i int) float64 {
	switch {
	case len(e) == 1:
		return 1
	case i == 0:
		return e[1] - e[0]
	case i == len(e)-1:
		return e[i] - e[i-1]
	}
	return (e[i+1] - e[i-1]) / 2
}

// The whole result of Rates — grid, limits, half-pressures, held-out
// points and every fit of the reaction and of each competing channel — is
// the same, byte for byte in its JSON, on one worker and on three: each
// temperature, form and channel is computed by one goroutine alone in the
// same operations, whatever the order they finish in.
func TestRatesWorkersIdentical(t *testing.T) {
	n := network(t, "../../testdata/ch3nc-channels.yaml")
	var ref []byte
	for _, jobs := range []int{1, 3} {
		r, err := n.Rates(context.Background(), job.Options{Jobs: jobs})
		if err != nil {
			t.Fatal(err)
		}
		b, err := json.Marshal(r)
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = b
			continue
		}
		if !bytes.Equal(b, ref) {
			t.Errorf("jobs %d: the JSON differs from one worker's", jobs)
		}
	}
}
