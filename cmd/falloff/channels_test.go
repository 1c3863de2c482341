package main

import (
	"encoding/json"
	"github.com/falloff-kinetics/falloff/pkg/job"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const channelsFile = "../../testdata/ch3nc-channels.yaml"

// Competing channels through `rates`: a transition state with Eckart
// tunnelling, a second one with Wigner's correction and a barrierless
// channel (inverse Laplace transform). Facts of the theory checked: the
// channels' rates sum to the total to rounding, branching fractions lie in
// [0, 1] and sum to 1, and each channel's high-pressure limit on the
// master-equation grains equals its canonical k∞ (TST with its tunnelling
// factor, or the given k∞ of the barrierless channel) within 1 % (grain
// error of kT/5 grains).
func TestChannelsRates(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI(t, "rates", "--json", "--skip-check", "--write-failed", "--out", dir, channelsFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r job.RatesResult
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if len(r.Channels) != 3 {
		t.Fatalf("%d channels", len(r.Channels))
	}
	for i := range r.Temperatures {
		for j := range r.Pressures {
			sum, bsum := 0.0, 0.0
			for _, c := range r.Channels {
				sum += c.K[i][j]
				b := c.Branching[i][j]
				if !(b >= 0 && b <= 1) {
					t.Errorf("branching %v", b)
				}
				bsum += b
			}
			if math.Abs(sum/r.K[i][j]-1) > 1e-12 || math.Abs(bsum-1) > 1e-12 {
				t.Errorf("T %v P %v: channels sum to %v of %v, branching %v", r.Temperatures[i], r.Pressures[j], sum, r.K[i][j], bsum)
			}
		}
		for _, c := range r.Channels {
			if d := c.KInfIntegrated[i]/c.KInf[i] - 1; math.Abs(d) > 0.01 {
				t.Errorf("%s at %v K: k∞ on the grains / canonical − 1 = %.3g", c.Name, r.Temperatures[i], d)
			}
			if c.Fits == nil {
				t.Errorf("%s: not fitted", c.Name)
			}
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, "reactions.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(string(b), "- equation:"); n != 3 {
		t.Errorf("reactions.yaml has %d entries, want one per channel (3)", n)
	}
}

const barrierlessFile = "../../testdata/ch3nc-barrierless.yaml"

// A barrierless main channel: k(E) from the inverse Laplace transform of the
// given k∞(T), so the master equation's high-pressure limit returns that k∞
// (Forst 1973) to the grain error (0.5 %); k rises with pressure and stays
// below it. `check` says it is barrierless; `micro`, which reports a
// transition state, refuses with a hint.
func TestBarrierlessRates(t *testing.T) {
	code, out, errs := runCLI(t, "rates", "--json", "--skip-check", barrierlessFile)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r job.RatesResult
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	for i, tk := range r.Temperatures {
		if d := r.KInfIntegrated[i]/r.KInf[i] - 1; math.Abs(d) > 0.005 {
			t.Errorf("%v K: k∞(ME)/k∞(given) − 1 = %.3g", tk, d)
		}
		for j := range r.Pressures {
			if r.K[i][j] > r.KInfIntegrated[i]*(1+1e-9) || j > 0 && r.K[i][j] < r.K[i][j-1] {
				t.Errorf("%v K: k not monotone or above k∞", tk)
			}
		}
	}
	if code, out, _ := runCLI(t, "check", barrierlessFile); code != exitOK || !strings.Contains(out, "via barrierless") {
		t.Errorf("check: exit %d, %q", code, out)
	}
	checkFailures(t, []failCase{{"micro", []string{"micro", barrierlessFile}, exitInput, "barrierless"}})
}
