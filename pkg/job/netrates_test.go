package job

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"go.yaml.in/yaml/v3"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// A network of one well with one exit to fragments is the one-well
// problem: its phenomenological k(well → fragments) equals the one-well
// master equation's k(T,P) of the same molecules (the CH3NC validation
// data, exponential-down in Ar), at 800 and 1200 K, 0.01–100 bar, to
// 1e-10 (issue 18), the two solvers' rounding (the network's block
// iteration against the one-well inverse iteration): both put a grain edge on the threshold, and
// for a species with a classical rotor the plain counts the network
// weights grains by equal the one-well path's in-grain Boltzmann sums
// (NewWell). Measured 5.3e-12.
func TestNetworkOneWellEqualsSingleWell(t *testing.T) {
	body := `molecules:
  CH3NC:
    mass: 41.0265 amu
    vibrations: {unit: cm-1, values: [278.6, 278.6, 969.7, 1162.4, 1162.4, 1481.5, 1517.0, 1517.0, 2249.9, 3064.2, 3138.0, 3138.0]}
    rotation: {constants: {unit: cm-1, values: [5.27235, 0.333999, 0.333999]}, symmetry: 3}
    lennard-jones: {sigma: 4.47 angstrom, epsilon: 380 K}
  TS:
    energy: 38.0989 kcal/mol
    imaginary-frequency: 440.4 cm-1
    vibrations: {unit: cm-1, values: [208.6, 621.9, 999.6, 1002.0, 1350.0, 1492.8, 1506.8, 2020.7, 3113.7, 3204.7, 3245.0]}
    rotation: {constants: {unit: cm-1, values: [1.35081, 0.526916, 0.409692]}, symmetry: 1}
bath: {gas: Ar}
energy-transfer: {model: exponential-down, alpha-300: 300 cm-1}
grid:
  temperatures: {unit: K, values: [800, 1200]}
  pressures: {unit: bar, values: [0.01, 1, 100]}
`
	netFile := "title: one-well network\n" + body + `network:
  reference: CH3NC
  wells: {CH3NC: {}}
  fragments: {iso: {species: [CH3CN], energy: -24.18585 kcal/mol}}
  steps: [{from: CH3NC, to: iso, via: TS}]
`
	oneFile := "title: one well\n" + body + "reaction: {reactant: CH3NC, via: TS, products: [CH3CN]}\n"
	mn, err := input.Parse("net.yaml", []byte(netFile))
	if err != nil {
		t.Fatal(err)
	}
	net, err := NetworkRates(context.Background(), mn, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	mo, err := input.Parse("one.yaml", []byte(oneFile))
	if err != nil {
		t.Fatal(err)
	}
	n, err := New(mo)
	if err != nil {
		t.Fatal(err)
	}
	one, err := n.Rates(context.Background(), Options{SkipCheck: true, SkipHeldOut: true})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for i := range one.Temperatures {
		for j := range one.Pressures {
			if net.KProducts[i][j] == nil {
				t.Fatalf("%g K, %g Pa refused: %v", one.Temperatures[i], one.Pressures[j], net.Refused)
			}
			got, want := net.KProducts[i][j][0][0], one.K[i][j]
			worst = math.Max(worst, math.Abs(got/want-1))
			if math.Abs(got/want-1) > 1e-10 {
				t.Errorf("%g K, %g Pa: network k = %.12g, one well %.12g", one.Temperatures[i], one.Pressures[j], got, want)
			}
		}
	}
	t.Logf("worst relative difference %.2g", worst)
}

// The demo network's rate coefficients (invented data) keep the laws of a
// rate matrix at every point it does not refuse: population is conserved
// (a well's loss, −K[i][i], is the sum of its rates to the other wells and
// to the products, 1e-9), and chain ⇌ ring obeys detailed balance with the
// equilibrium fractions, k(chain→ring)·x_chain = k(ring→chain)·x_ring, to
// rounding (1e-12) after symmetrise, whose change the reported departure
// bounds: it stays below the separation of the eigenvalues (the order of
// the rate law's own ambiguity; Bartis & Widom 1974). The refused points
// name the reason; the merged ones are checked below.
func TestNetworkDemoRates(t *testing.T) {
	if testing.Short() {
		t.Skip("16 network solves")
	}
	m, err := input.Parse(demo.NetworkName, demo.NetworkText)
	if err != nil {
		t.Fatal(err)
	}
	res, err := NetworkRates(context.Background(), m, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	solved := 0
	for i := range res.Temperatures {
		for j := range res.Pressures {
			k, kx := res.K[i][j], res.KProducts[i][j]
			if k == nil {
				continue
			}
			solved++
			for w := range res.Wells {
				out := 0.0
				for v := range res.Wells {
					if v != w {
						out += k[v][w]
					}
				}
				for x := range res.Products {
					out += kx[x][w]
				}
				if math.Abs(out+k[w][w]) > 1e-9*math.Abs(k[w][w]) {
					t.Errorf("point %d,%d well %s: loss %g, outflows %g", i, j, res.Wells[w], -k[w][w], out)
				}
			}
			x := res.Equilibrium[i]
			f, r := k[1][0]*x[0], k[0][1]*x[1]
			if math.Abs(f-r) > 1e-12*math.Max(f, r) {
				t.Errorf("point %d,%d: k_f x_chain = %g, k_r x_ring = %g", i, j, f, r)
			}
			if res.Balance[i][j] > res.Separation[i][j] {
				t.Errorf("point %d,%d: departure from detailed balance before symmetrising %g, above the separation %g", i, j, res.Balance[i][j], res.Separation[i][j])
			}
		}
	}
	if solved == 0 {
		t.Fatal("every point refused")
	}
	// Where chain and ring interconvert as fast as energy relaxes, they
	// are merged into one species; its loss is the sum of its rates to the
	// products (conservation, 1e-9) and its wells lie within the merge
	// tolerance of equilibrium.
	for at, mp := range res.Merged {
		if len(mp.Species) != 1 || mp.Species[0] != "chain+ring" || mp.Departure > 0.5 {
			t.Errorf("%s: merged %v (departure %g)", at, mp.Species, mp.Departure)
		}
		out := 0.0
		for x := range res.Products {
			out += mp.KProducts[x][0]
		}
		if math.Abs(out+mp.K[0][0]) > 1e-9*math.Abs(mp.K[0][0]) {
			t.Errorf("%s: loss %g, outflows %g", at, -mp.K[0][0], out)
		}
	}
	for at, why := range res.Refused {
		if !strings.Contains(why, "separation") && !strings.Contains(why, "rounding") {
			t.Errorf("refused at %s without a reason: %s", at, why)
		}
	}
}

// The work is estimated before any and refused beyond the limit, with the
// flag that raises it.
func TestNetworkWorkLimit(t *testing.T) {
	m, err := input.Parse(demo.NetworkName, demo.NetworkText)
	if err != nil {
		t.Fatal(err)
	}
	_, err = NetworkRates(context.Background(), m, nil, 1e-3)
	if err == nil || !strings.Contains(err.Error(), "--work-limit") || !strings.Contains(err.Error(), "CPU time") {
		t.Errorf("1 ms limit: %v", err)
	}
}

// The source of a one-well network (CH3CN "associating" into CH3NC
// through the isomerisation read backwards; CH3CN described, so K_c is
// known): the yields sum to 1 at every point; the capture rate constant is
// the high-pressure dissociation on the grid over K_c, which equals
// canonical TST for the reverse reaction, L(kT/h)(Q‡/Q_CH3CN)e^(−E0'/kT)
// (rrkm.KInf / rrkm.EquilibriumConstant, the same partition functions), to
// the grain error of the network grid, 1e-4 (measured 4e-6); and
// stabilisation rises with pressure at each temperature.
func TestNetworkSource(t *testing.T) {
	src := `title: one-well network with a source
molecules:
  CH3NC:
    mass: 41.0265 amu
    vibrations: {unit: cm-1, values: [278.6, 278.6, 969.7, 1162.4, 1162.4, 1481.5, 1517.0, 1517.0, 2249.9, 3064.2, 3138.0, 3138.0]}
    rotation: {constants: {unit: cm-1, values: [5.27235, 0.333999, 0.333999]}, symmetry: 3}
    lennard-jones: {sigma: 4.47 angstrom, epsilon: 380 K}
  CH3CN:
    mass: 41.0265 amu
    vibrations: {unit: cm-1, values: [387.2, 387.2, 935.7, 1076.9, 1076.9, 1439.2, 1501.4, 1501.4, 2380.4, 3066.8, 3140.0, 3140.0]}
    rotation: {constants: {unit: cm-1, values: [5.29231, 0.305505, 0.305505]}, symmetry: 3}
  TS:
    energy: 38.0989 kcal/mol
    imaginary-frequency: 440.4 cm-1
    vibrations: {unit: cm-1, values: [208.6, 621.9, 999.6, 1002.0, 1350.0, 1492.8, 1506.8, 2020.7, 3113.7, 3204.7, 3245.0]}
    rotation: {constants: {unit: cm-1, values: [1.35081, 0.526916, 0.409692]}, symmetry: 1}
network:
  reference: CH3NC
  wells: {CH3NC: {}}
  fragments: {iso: {species: [CH3CN], energy: -24.18585 kcal/mol}}
  steps: [{from: CH3NC, to: iso, via: TS}]
  source: {fragments: iso, into: CH3NC}
bath: {gas: Ar}
energy-transfer: {model: exponential-down, alpha-300: 300 cm-1}
grid:
  temperatures: {unit: K, values: [800, 1200]}
  pressures: {unit: bar, values: [0.01, 1, 100]}
`
	m, err := input.Parse("src.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	res, err := NetworkRates(context.Background(), m, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	s := res.Source
	if s == nil || s.KCapture == nil {
		t.Fatalf("source %+v", s)
	}
	r, ts, p := m.Molecule("CH3NC"), m.Molecule("TS"), m.Molecule("CH3CN")
	worst := 0.0
	for i, tK := range res.Temperatures {
		prev := -1.0
		for j := range res.Pressures {
			if s.Stabilised[i][j] == nil {
				t.Fatalf("point %d,%d refused: %v", i, j, res.Refused)
			}
			sum := s.Stabilised[i][j][0]
			for _, y := range s.Activated[i][j] {
				sum += y
			}
			if math.Abs(sum-1) > 1e-9 {
				t.Errorf("%g K: yields sum to %.12g", tK, sum)
			}
			if y := s.Stabilised[i][j][0]; y < prev {
				t.Errorf("%g K: stabilisation falls with pressure (%g after %g)", tK, y, prev)
			} else {
				prev = y
			}
			kc := rrkm.EquilibriumConstant(&r.Species, []*rrkm.Species{&p.Species}, -24.18585*units.Cm1PerKcalPerMol, tK)
			want := rrkm.KInf(&r.Species, &ts.Species, rrkm.PathDegeneracy(&r.Species, &ts.Species), tK) / kc
			worst = math.Max(worst, math.Abs(s.KCapture[i][j]/want-1))
			if math.Abs(s.KCapture[i][j]/want-1) > 1e-4 {
				t.Errorf("%g K: k_capture %.6g, canonical reverse TST %.6g", tK, s.KCapture[i][j], want)
			}
		}
	}
	t.Logf("k_capture against canonical TST: worst %.2g", worst)

	// With a second exit, the source's chemically activated channel to it
	// is fitted as a new reaction pair, CH3CN -> X + Y, from k_capture ×
	// yield; the source's own fragments get no channel (their reverse is
	// the well's entry).
	two := strings.Replace(src, "  steps: [{from: CH3NC, to: iso, via: TS}]",
		"    xy: {species: [X, Y], energy: 70 kcal/mol}\n  steps: [{from: CH3NC, to: iso, via: TS}, {from: CH3NC, to: xy, barrierless: {A: 1e15 s-1, energy: 75 kcal/mol}}]", 1)
	two = strings.Replace(two, "  fragments: {iso: {species: [CH3CN], energy: -24.18585 kcal/mol}}", "  fragments:\n    iso: {species: [CH3CN], energy: -24.18585 kcal/mol}", 1)
	m2, err := input.Parse("src2.yaml", []byte(two))
	if err != nil {
		t.Fatal(err)
	}
	res2, err := NetworkRates(context.Background(), m2, nil, 0)
	if err != nil {
		t.Fatal(err)
	}
	var found *NetworkChannel
	chs := res2.FitNetwork(m2, 0.05)
	for i, ch := range chs {
		if strings.Join(ch.Reactants, "+") == "CH3CN" {
			if strings.Join(ch.Products, "+") != "X+Y" {
				t.Errorf("a source channel to %v", ch.Products)
			}
			found = &chs[i]
		}
	}
	if found == nil || found.Points != len(res2.Temperatures)*len(res2.Pressures) {
		t.Fatalf("source channel %+v", found)
	}
}

// symmetrise on a three-well rate matrix a little out of detailed balance
// (invented numbers): afterwards k_ji·x_i = k_ij·x_j for every pair to
// rounding, every column sums to zero with the product row, a balanced
// matrix is left as it was, and each pair's geometric mean lies between its
// two fluxes (so the change is bounded by their departure).
func TestSymmetrise(t *testing.T) {
	x := []float64{0.5, 0.3, 0.2}
	k := [][]float64{{0, 3.0, 1.0}, {1.9, 0, 4.1}, {0.41, 2.6, 0}} // k[j][i]: i → j
	kx := [][]float64{{0.7, 0.2, 0.05}}
	before := [][]float64{{k[1][0] * x[0], k[0][1] * x[1]}, {k[2][0] * x[0], k[0][2] * x[2]}, {k[2][1] * x[1], k[1][2] * x[2]}}
	symmetrise(k, kx, x)
	pairs := [][2]int{{0, 1}, {0, 2}, {1, 2}}
	for n, p := range pairs {
		i, j := p[0], p[1]
		f, r := k[j][i]*x[i], k[i][j]*x[j]
		if math.Abs(f-r) > 1e-15*f {
			t.Errorf("pair %d,%d: %g vs %g", i, j, f, r)
		}
		lo, hi := math.Min(before[n][0], before[n][1]), math.Max(before[n][0], before[n][1])
		if f < lo || f > hi {
			t.Errorf("pair %d,%d: %g outside [%g, %g]", i, j, f, lo, hi)
		}
	}
	for i := range 3 {
		sum := kx[0][i]
		for j := range 3 {
			sum += k[j][i]
		}
		if math.Abs(sum) > 1e-14 {
			t.Errorf("column %d sums to %g", i, sum)
		}
	}
	again := [][]float64{append([]float64(nil), k[0]...), append([]float64(nil), k[1]...), append([]float64(nil), k[2]...)}
	symmetrise(again, kx, x)
	for j := range 3 {
		for i := range 3 {
			if math.Abs(again[j][i]-k[j][i]) > 1e-15*math.Abs(k[j][i]) {
				t.Errorf("a balanced matrix changed at %d,%d", j, i)
			}
		}
	}
}

// A coefficient is a falloff curve when k rises with pressure at every
// temperature; a chemically activated one falls, and gets no Troe form.
func TestNotFalloff(t *testing.T) {
	rising := []fit.Point{{T: 800, P: 1, K: 1}, {T: 800, P: 10, K: 2}, {T: 800, P: 100, K: 2.5}, {T: 900, P: 1, K: 3}, {T: 900, P: 10, K: 5}, {T: 900, P: 100, K: 6}}
	if why := notFalloff(rising); why != "" {
		t.Errorf("rising: %q", why)
	}
	falling := append(append([]fit.Point{}, rising[:3]...), fit.Point{T: 900, P: 1, K: 6}, fit.Point{T: 900, P: 10, K: 5}, fit.Point{T: 900, P: 100, K: 3})
	if why := notFalloff(falling); !strings.Contains(why, "falls with pressure at 900 K") {
		t.Errorf("falling: %q", why)
	}
	if why := notFalloff(rising[:2]); !strings.Contains(why, "fewer than three") {
		t.Errorf("two points: %q", why)
	}
}

// The populations from the rate law conserve the total (the columns of
// the rate matrix sum to zero), start all in the reference well, and, for
// A ⇌ B with A → P, approach at long times the products only, with the
// exact two-state solution of the same K at an intermediate time (the
// matrix exponential against the closed form of a 2 × 2 system plus its
// product; Atkins' consecutive-reaction algebra, common textbook result).
// Tolerance 1e-9: gonum's Padé matrix exponential to rounding.
func TestPopulationsConserve(t *testing.T) {
	kab, kba, kap := 3.0, 1.0, 0.5
	res := &NetworkRatesResult{Reference: "A", Wells: []string{"A", "B"}, Products: []string{"P"},
		Temperatures: []float64{1000}, Pressures: []float64{1e5},
		K:         [][][][]float64{{{{-(kab + kap), kba}, {kab, -kba}}}},
		KProducts: [][][][]float64{{{{kap, 0}}}}}
	names, times, frac, err := res.Populations(0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(names) != 3 || frac[0][0] < 0.99 {
		t.Fatalf("names %v, A at the first time %g", names, frac[0][0])
	}
	// Eigenvalues of [[-(kab+kap), kba], [kab, -kba]].
	tr, det := -(kab + kap + kba), kap*kba
	l1 := (tr + math.Sqrt(tr*tr-4*det)) / 2
	l2 := (tr - math.Sqrt(tr*tr-4*det)) / 2
	for i, tt := range times {
		sum := frac[0][i] + frac[1][i] + frac[2][i]
		if math.Abs(sum-1) > 1e-9 {
			t.Fatalf("t = %g: Σ = %.12g", tt, sum)
		}
		// B(t) from A(0) = 1: kab (e^{l1 t} − e^{l2 t})/(l1 − l2).
		b := kab * (math.Exp(l1*tt) - math.Exp(l2*tt)) / (l1 - l2)
		if math.Abs(frac[1][i]-b) > 1e-9 {
			t.Fatalf("t = %g: B = %.12g, closed form %.12g", tt, frac[1][i], b)
		}
	}
	if last := len(times) - 1; frac[2][last] < 0.99 {
		t.Errorf("at the last time P = %g, want nearly all", frac[2][last])
	}
}

// TestNetworkWorkers: the temperatures of a network run on a worker pool;
// the result is the same, bit for bit (compared as JSON, which keeps every
// float64 digit), with one worker and with four (common practice, no
// source: results must not depend on scheduling).
func TestNetworkWorkers(t *testing.T) {
	m, err := input.Parse(demo.NetworkName, demo.NetworkText)
	if err != nil {
		t.Fatal(err)
	}
	run := func(procs int) []byte {
		old := runtime.GOMAXPROCS(procs)
		defer runtime.GOMAXPROCS(old)
		res, err := NetworkRates(context.Background(), m, nil, 0)
		if err != nil {
			t.Fatal(err)
		}
		out, err := json.Marshal(res)
		if err != nil {
			t.Fatal(err)
		}
		return out
	}
	one, four := run(1), run(4)
	if !bytes.Equal(one, four) {
		t.Errorf("network rates differ between 1 and 4 workers (%d and %d bytes of JSON)", len(one), len(four))
	}
}

// TestNetworkOneWellTestdata: every single-well input of testdata with a
// pressure grid, rewritten as a network of one well whose steps are the
// reaction's channels (transition states with their tunnelling and path
// degeneracy, barrierless channels) into fragment sets, gives each
// channel's k(T,P) of the one-well master equation to 1e-10 (issue 18):
// two independent solvers (the network's block iteration on its own
// grid against the one-well inverse iteration) on the same states. The
// fragment sets sit at the reaction energy where the file gives it (the
// Eckart barrier's far side) and at the well's level otherwise (an exit's
// k(E) does not depend on it).
func TestNetworkOneWellTestdata(t *testing.T) {
	if testing.Short() {
		t.Skip("every testdata input twice")
	}
	files, err := filepath.Glob("../../testdata/*.yaml")
	if err != nil || len(files) == 0 {
		t.Fatalf("no testdata: %v", err)
	}
	compared := 0
	for _, file := range files {
		t.Run(filepath.Base(file), func(t *testing.T) {
			text, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			var doc map[string]any
			if err := yaml.Unmarshal(text, &doc); err != nil {
				t.Fatal(err)
			}
			grid, _ := doc["grid"].(map[string]any)
			rx, _ := doc["reaction"].(map[string]any)
			if grid["pressures"] == nil || rx == nil {
				t.Skip("no pressure grid or no reaction: no master equation to compare")
			}
			if r, _ := rx["rotation"].(string); r != "" && r != "all-active" {
				t.Skip("a network's rotations are all active")
			}
			channels := []map[string]any{rx}
			if cs, ok := rx["competing"].([]any); ok {
				for _, c := range cs {
					channels = append(channels, c.(map[string]any))
				}
			}
			frags := map[string]any{}
			var steps []any
			reactant := rx["reactant"].(string)
			for i, c := range channels {
				name := fmt.Sprintf("out%d", i)
				energy := any("0 kcal/mol")
				if e, ok := c["reaction-energy"]; ok {
					energy = e
				}
				frags[name] = map[string]any{"species": c["products"], "energy": energy}
				st := map[string]any{"from": reactant, "to": name}
				for _, k := range []string{"via", "barrierless", "tunnelling", "path-degeneracy"} {
					if v, ok := c[k]; ok {
						st[k] = v
					}
				}
				steps = append(steps, st)
			}
			delete(doc, "reaction")
			doc["network"] = map[string]any{"reference": reactant, "wells": map[string]any{reactant: map[string]any{}}, "fragments": frags, "steps": steps}
			netText, err := yaml.Marshal(doc)
			if err != nil {
				t.Fatal(err)
			}
			mn, err := input.Parse("net-"+filepath.Base(file), netText)
			if err != nil {
				t.Fatalf("the network form: %v\n%s", err, netText)
			}
			net, err := NetworkRates(context.Background(), mn, nil, 0)
			if err != nil {
				t.Fatal(err)
			}
			mo, err := input.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			n, err := New(mo)
			if err != nil {
				t.Fatal(err)
			}
			one, err := n.Rates(context.Background(), Options{SkipCheck: true, SkipHeldOut: true})
			if err != nil {
				t.Fatal(err)
			}
			ks := [][][]float64{one.K}
			if len(one.Channels) > 0 {
				ks = ks[:0]
				for _, c := range one.Channels {
					ks = append(ks, c.K)
				}
			}
			if len(ks) != len(channels) || len(net.Products) != len(channels) {
				t.Fatalf("%d channels one-well, %d products in the network, %d in the file", len(ks), len(net.Products), len(channels))
			}
			worst := 0.0
			for c := range ks {
				for i := range one.Temperatures {
					for j := range one.Pressures {
						if net.KProducts[i][j] == nil {
							t.Fatalf("%g K, %g Pa refused: %v", one.Temperatures[i], one.Pressures[j], net.Refused)
						}
						got, want := net.KProducts[i][j][c][0], ks[c][i][j]
						d := math.Abs(got/want - 1)
						worst = math.Max(worst, d)
						if !(d <= 1e-10) {
							t.Errorf("channel %d (%s), %g K, %g Pa: network k = %.12g, one well %.12g (relative %.2g)", c, net.Products[c], one.Temperatures[i], one.Pressures[j], got, want, d)
						}
					}
				}
			}
			compared++
			t.Logf("%d channels, %d × %d points: worst relative difference %.2g", len(ks), len(one.Temperatures), len(one.Pressures), worst)
		})
	}
	if compared < 5 {
		t.Errorf("only %d testdata inputs compared", compared)
	}
}
