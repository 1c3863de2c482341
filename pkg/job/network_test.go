package job_test

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/job"
)

// A network with competing channels and tunnelling, built by the library
// alone (this once needed code of the command line: a Go caller got k0 150×
// too low for this file at 500 K). Checks against outside references:
//   - each channel's high-pressure limit, the thermal average of its k(E)
//     on the master-equation grains, equals its canonical k∞ (TST with the
//     Eckart or Wigner correction, or the given k∞ of the barrierless
//     channel): the TST identity of the design (docs/design.md §3), within the
//     0.5 % grain error it allows;
//   - channel shares of k, k∞ and k0 sum to the totals (one slowest mode,
//     common practice, no source), to 1e-12.
//
// (k/[M] at 1 Torr is only 0.5 % of k0 at 500 K here: with Eckart
// tunnelling k0 counts grains far below the barrier as reactive, a known
// open question of the low-pressure limit's definition, not checked here.)
func TestChannelsThroughLibrary(t *testing.T) {
	n := network(t, "../../testdata/ch3nc-channels.yaml")
	if len(n.Channels) != 3 || n.Channels[0].Tunnelling != input.Eckart || n.Channels[1].Tunnelling != input.Wigner || n.Channels[2].ILT == nil {
		t.Fatalf("channels %+v: want Eckart, Wigner and barrierless", n.Channels)
	}
	res, err := n.Rates(context.Background(), job.Options{SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	const tstTol = 0.005 // the grain error the TST identity allows
	const sumTol = 1e-12
	worst := 0.0
	defer func() { t.Logf("worst TST deviation over channels and temperatures: %.2g", worst) }()
	for i, tK := range res.Temperatures {
		var kInf, k0 float64
		for _, c := range res.Channels {
			d := math.Abs(c.KInfIntegrated[i]/c.KInf[i] - 1)
			worst = math.Max(worst, d)
			if d > tstTol {
				t.Errorf("%s at %g K: <k(E)> = %.6g, canonical k∞ = %.6g (%.2g)", c.Name, tK, c.KInfIntegrated[i], c.KInf[i], d)
			}
			kInf += c.KInfIntegrated[i]
			k0 += c.K0[i]
		}
		if d := math.Abs(kInf/res.KInfIntegrated[i] - 1); d > sumTol {
			t.Errorf("%g K: channel k∞ sum to %.12g, total %.12g", tK, kInf, res.KInfIntegrated[i])
		}
		if d := math.Abs(k0/res.K0[i] - 1); d > sumTol {
			t.Errorf("%g K: channel k0 sum to %.12g, total %.12g", tK, k0, res.K0[i])
		}
	}
}

// check and rates refuse the same files: every check New makes is made
// before any work, so a file New accepts runs, and Rates refuses nothing
// of the file that New accepted, except what only Rates needs (pressures).
func TestNewRefusesBeforeWork(t *testing.T) {
	n := network(t, "../../testdata/hcn-isomerization.yaml")
	_, err := n.Rates(context.Background(), job.Options{})
	var fe *input.FieldError
	if !asFieldError(err, &fe) || fe.Path != "grid.pressures" {
		t.Errorf("rates without pressures: %v, want a FieldError at grid.pressures", err)
	}
}

func asFieldError(err error, fe **input.FieldError) bool { return errors.As(err, fe) }

// micro reports the main channel as rates computes it: with Eckart
// tunnelling k(E) reaches below E0 and its thermal average equals the
// canonical k∞·κ(T) (the TST identity through the Laplace convolution
// theorem, Miller, J. Am. Chem. Soc. 101, 6810, 1979) within the 0.5 %
// grain error; and micro's k∞ is the k∞ rates gives for that channel.
func TestMicroWithTunnelling(t *testing.T) {
	const tstTol = 0.005
	n := network(t, "../../testdata/ch3nc-channels.yaml")
	mi, err := n.Micro(job.ReportGrid{})
	if err != nil {
		t.Fatal(err)
	}
	mc := mi.Channels[0]
	if mc.Tunnelling != string(input.Eckart) {
		t.Fatalf("tunnelling %q, want eckart", mc.Tunnelling)
	}
	below := 0
	for i, e := range mc.Energies {
		if e < mc.E0 && mc.K[i] > 0 {
			below++
		}
	}
	if below == 0 {
		t.Error("k(E) is zero below E0 with Eckart tunnelling")
	}
	res, err := n.Rates(context.Background(), job.Options{SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	defer func() { t.Logf("worst TST deviation with Eckart tunnelling: %.2g", worst) }()
	for i, tK := range mc.Temperatures {
		d := math.Abs(mc.KInfIntegrated[i]/mc.KInf[i] - 1)
		worst = math.Max(worst, d)
		if d > tstTol {
			t.Errorf("%g K: <k(E)> %.6g, k∞·κ %.6g", tK, mc.KInfIntegrated[i], mc.KInf[i])
		}
		if mc.KInf[i] != res.Channels[0].KInf[i] {
			t.Errorf("%g K: micro k∞ %.6g, rates k∞ of the channel %.6g", tK, mc.KInf[i], res.Channels[0].KInf[i])
		}
	}
}

// A reporting grain so coarse that fewer than ten grains lie between E0 and
// the ceiling is refused by New, for every verb alike, naming the field
// (it crashed states once: its top grain reached beyond the transition
// state's count).
func TestCoarseReportGrainRefused(t *testing.T) {
	m, err := input.ReadFile("../../testdata/catalogue-base.yaml")
	if err != nil {
		t.Fatal(err)
	}
	m.EnergyGrid.Grain = 1e5
	_, err = job.New(m)
	var fe *input.FieldError
	if !errors.As(err, &fe) || fe.Path != "energy-grid.grain" {
		t.Errorf("New: %v, want a FieldError at energy-grid.grain", err)
	}
}

// A report of more than 10⁵ grains is refused before any count, naming the
// option (states --ceiling "1e7 cm-1" once ran for minutes).
func TestReportGrainsBounded(t *testing.T) {
	n := network(t, "../../testdata/catalogue-base.yaml")
	_, err := n.States(job.ReportGrid{Ceiling: job.Setting{Cm1: 1e7, Option: "--ceiling", Text: "1e7 cm-1"}})
	var oe *job.OptionError
	if !errors.As(err, &oe) || oe.Option != "--ceiling" || !strings.Contains(err.Error(), "grains") {
		t.Errorf("States: %v, want an OptionError on --ceiling about the grains", err)
	}
}

// network reads the input at path and builds its network.
func network(t *testing.T, path string) *job.Network {
	t.Helper()
	m, err := input.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	n, err := job.New(m)
	if err != nil {
		t.Fatal(err)
	}
	return n
}
