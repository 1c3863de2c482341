package job

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/mat"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/network"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// NetworkRatesResult holds the phenomenological rate coefficients of a
// network of wells on the file's grid (the JSON of `rates` on a network
// file). K[iT][iP][j][i] is k(i→j) between wells in s⁻¹ (the diagonal minus
// the total loss of well i), KProducts[iT][iP][x][i] is k(i→x) to the
// fragment set x. A point whose chemically significant eigenvalues are not
// separated from the relaxation (or are lost in rounding) has nil there
// and its reason in Refused.
type NetworkRatesResult struct {
	File         string            `json:"file"`
	Reference    string            `json:"reference"`
	Wells        []string          `json:"wells"`
	Products     []string          `json:"products"`
	Temperatures []float64         `json:"temperatures_K"`
	Pressures    []float64         `json:"pressures_Pa"`
	K            [][][][]float64   `json:"k_wells_per_s"`
	KProducts    [][][][]float64   `json:"k_products_per_s"`
	Separation   [][]float64       `json:"separation"`
	Balance      [][]float64       `json:"detailed_balance_departure"`
	Equilibrium  [][]float64       `json:"equilibrium_fractions"`
	Refused      map[string]string `json:"refused,omitempty"`
	// Merged holds the points where wells in fast equilibrium were merged
	// into one species each (their K and KProducts are then nil): the
	// rate coefficients between the merged species there.
	Merged map[string]*MergedPoint `json:"merged,omitempty"`
	// Source, if the network has one, holds per (T, P) the yields per
	// captured molecule: Stabilised[iT][iP][w] in each well and
	// Activated[iT][iP][x] carried to each product (redissociation to the
	// source's fragments included), summing to 1.
	Source  *NetworkSource `json:"source,omitempty"`
	Grain   []float64      `json:"grain_cm-1"`
	Ceiling []float64      `json:"ceiling_cm-1"`
	Note    string         `json:"note"`
	Caution string         `json:"caution"`
}

// MergedPoint is one (T, P) point solved over merged species: K[j][i]
// from species i to j, KProducts[x][i] to product x, in s⁻¹ (as
// NetworkRatesResult, over Species instead of the wells).
type MergedPoint struct {
	Species   []string    `json:"species"` // member wells joined by "+"
	K         [][]float64 `json:"k_species_per_s"`
	KProducts [][]float64 `json:"k_products_per_s"`
	// Departure is how far the merged wells are from equilibrium within
	// their species (0: exactly).
	Departure float64 `json:"departure"`
}

// NetworkSource is the bimolecular source of a network result.
type NetworkSource struct {
	Fragments  string        `json:"fragments"` // the products' name of the fragment set
	Into       string        `json:"into"`
	Stabilised [][][]float64 `json:"stabilised_yield"`
	Activated  [][][]float64 `json:"activated_yield"`
	// KDissociation[iT][iP] is the high-pressure rate coefficient of the
	// well's dissociation to the fragments on the grid, s⁻¹.
	KDissociation [][]float64 `json:"k_dissociation_inf_per_s"`
	// KCapture[iT][iP] is the association rate coefficient at the high-
	// pressure limit, k_diss∞/K_c in cm³ molecule⁻¹ s⁻¹, K_c of the well ⇌
	// fragments from the same partition functions; nil unless every
	// fragment species is described under molecules. The bimolecular rate
	// coefficients are KCapture times the yields.
	KCapture [][]float64 `json:"k_capture_cm3_per_molecule_per_s,omitempty"`
}

// networkNoteRates says what NetworkRates computes and leaves out.
const networkNoteRates = "phenomenological rate coefficients from the chemically significant eigenpairs of the " +
	"network's master equation (banded block inverse iteration); the collision frequency is the reference well's with the bath gas; " +
	"every rotation active"

// bandedSecondsFactor and bandedSecondsSolve are the CPU times of the
// banded network solver per grain × bandwidth² (the factorisation) and per
// grain × bandwidth × vector and iteration (the solves), s, on the 2-core
// CI machine.
const (
	bandedSecondsFactor = 1.5e-10
	bandedSecondsSolve  = 1.2e-9
)

// networkCeiling returns the top of the network's grid at tK, cm⁻¹ above
// the grid's zero: for every step, the one-well bound of its well and
// transition state (collision.CeilingBound: 60 kT above the threshold, or
// higher where a species' thermal distribution reaches further), so that
// the network's grains hold every population the one-well master equation
// holds.
func networkCeiling(m *input.Model, zero, tK float64) float64 {
	net := m.Network
	top := 0.0
	for _, st := range net.Steps {
		off := net.EnergyOf(st.From) - zero
		from := &m.Molecule(st.From).Species
		var ts *rrkm.Species
		var e0 float64 // above the from-well
		if st.Barrierless != nil {
			e0 = st.Barrierless.Energy
		} else {
			ts = &m.Molecule(st.Via).Species
			e0 = ts.E0 - net.EnergyOf(st.From)
		}
		top = math.Max(top, off+collision.CeilingBound(from, ts, e0, tK))
	}
	return top
}

// NetworkRates solves the master equation of the network of m at every
// (T, P) of its grid. Every rotation is active, one grid (the single-well
// default grain at each temperature) holds all wells from the lowest
// well's zero-point level, and every well collides with the bath gas at the
// reference well's Lennard-Jones rate. progress, if set, is called after
// each temperature.
func NetworkRates(ctx context.Context, m *input.Model, progress func(), workLimit float64) (*NetworkRatesResult, error) {
	net := m.Network
	if net == nil {
		return nil, errors.New("job: NetworkRates on a file without network:")
	}
	if len(m.Pressures) == 0 {
		return nil, &input.FieldError{File: m.File, Path: "grid.pressures", Err: errors.New("missing: a network's rate coefficients need a pressure grid"),
			Hint: "add pressures: {from: 0.01 bar, to: 100 bar, points: 9}"}
	}
	ref := m.Molecule(net.Reference)
	col, _, err := colliderWith(m, ref)
	if err != nil {
		return nil, err
	}
	tr := transfer(m)
	zero := math.Inf(1) // the lowest well's energy: the grid's zero
	for _, w := range net.Wells {
		zero = math.Min(zero, w.Energy)
	}
	top := math.Inf(-1)   // the highest threshold above the grid's zero
	lowest := math.Inf(1) // the lowest
	for _, st := range net.Steps {
		var e float64
		if st.Barrierless != nil {
			e = net.EnergyOf(st.From) + st.Barrierless.Energy - zero
		} else {
			e = m.Molecule(st.Via).E0 - zero
		}
		top, lowest = math.Max(top, e), math.Min(lowest, e)
	}
	// The work before any, per (T, P): the banded solver factorises n
	// grains of half-bandwidth b ≈ wells × kernel band (wells, for a
	// strong collider, whose rank-one terms cost a few solves more) once
	// and iterates a block of 2·wells vectors, about
	// bandedSecondsFactor·n·b² + bandedSecondsSolve·n·b·60·wells (fitted
	// to pkg/network BenchmarkSolvePoint: 777 grains, b = 78 and 222, in
	// 10 and 18 ms, with up to 30 iterations allowed for).
	if workLimit <= 0 {
		workLimit = DefaultWorkLimit
	}
	est := 0.0
	for _, tK := range m.Temperatures {
		grain := collision.GrainFor(tr, tK)
		g, entries := collision.MatrixSize(tr, tK, grain, networkCeiling(m, zero, tK), lowest)
		nw := float64(len(net.Wells))
		n := nw * float64(g.N)
		b := nw * entries / float64(g.N)
		est += float64(len(m.Pressures)) * (bandedSecondsFactor*n*b*b + bandedSecondsSolve*n*b*60*nw)
	}
	if est > workLimit {
		return nil, m.FieldError("grid", fmt.Errorf("the network's master equation over %d temperatures × %d pressures would take about %s of CPU time; the limit is %s",
			len(m.Temperatures), len(m.Pressures), duration(est), duration(workLimit)),
			"use fewer temperatures or pressures, or raise the limit with --work-limit")
	}
	res := &NetworkRatesResult{File: m.File, Reference: net.Reference, Temperatures: m.Temperatures, Pressures: m.Pressures,
		Refused: map[string]string{}, Merged: map[string]*MergedPoint{}, Note: networkNoteRates, Caution: Caution}
	for _, w := range net.Wells {
		res.Wells = append(res.Wells, w.Name)
	}
	var fragSpecies []*rrkm.Species // the source's fragments, all described, or nil
	if src := net.Source; src != nil {
		res.Source = &NetworkSource{Fragments: productName(net, src.Fragments), Into: src.Into}
		for _, name := range net.FragmentSet(src.Fragments).Species {
			mol := m.Molecule(name)
			if mol == nil || mol.IsTS || mol.Mass == 0 {
				fragSpecies = nil
				break
			}
			fragSpecies = append(fragSpecies, &mol.Species)
		}
	}
	// The states are counted once, to the highest top any temperature's
	// grid reaches, and reused at every temperature.
	maxTop := 0.0
	for _, tK := range m.Temperatures {
		maxTop = math.Max(maxTop, rrkm.GrainsTo(collision.GrainFor(tr, tK), networkCeiling(m, zero, tK)).Top()+collision.GrainFor(tr, tK))
	}
	counts, err := countNetwork(m, zero, maxTop)
	if err != nil {
		return nil, err
	}
	// The temperatures run on a worker pool (the network's k(E) and master
	// equation at one temperature are independent of the others'); rows are
	// assembled in temperature order, so the result and the first error
	// reported do not depend on the number of workers.
	rows := make([]*networkRow, len(m.Temperatures))
	errs := make([]error, len(m.Temperatures))
	jobs := make(chan int)
	var mu sync.Mutex
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(m.Temperatures)) {
		wg.Go(func() {
			for i := range jobs {
				if errs[i] = ctx.Err(); errs[i] != nil {
					continue
				}
				rows[i], errs[i] = networkTemperature(m, m.Temperatures[i], networkGrid{zero: zero, top: top, lowest: lowest, tr: tr, col: col, counts: counts, fragments: fragSpecies})
				if errs[i] == nil && progress != nil {
					mu.Lock()
					progress()
					mu.Unlock()
				}
			}
		})
	}
	for i := range m.Temperatures {
		jobs <- i
	}
	close(jobs)
	wg.Wait()
	for i, row := range rows {
		if errs[i] != nil {
			return nil, errs[i]
		}
		for k, v := range row.merged {
			res.Merged[k] = v
		}
		for k, v := range row.refused {
			res.Refused[k] = v
		}
		if res.Products == nil {
			res.Products = row.products
		}
		res.K, res.KProducts = append(res.K, row.k), append(res.KProducts, row.kProducts)
		res.Separation, res.Balance, res.Equilibrium = append(res.Separation, row.sep), append(res.Balance, row.bal), append(res.Equilibrium, row.eq)
		res.Grain, res.Ceiling = append(res.Grain, row.grain), append(res.Ceiling, row.ceiling)
		if res.Source != nil {
			res.Source.Stabilised, res.Source.Activated = append(res.Source.Stabilised, row.stab), append(res.Source.Activated, row.act)
			res.Source.KDissociation, res.Source.KCapture = append(res.Source.KDissociation, row.kd), append(res.Source.KCapture, row.kc)
		}
	}
	// JSON has no NaN: a refused point's separation and balance are -1, as
	// are the source's rate coefficients there (and the capture everywhere
	// when a fragment is not described: then KCapture is nil).
	all := append(append([][]float64{}, res.Separation...), res.Balance...)
	if res.Source != nil {
		if fragSpecies == nil {
			res.Source.KCapture = nil
		}
		all = append(append(all, res.Source.KDissociation...), res.Source.KCapture...)
	}
	for _, xs := range all {
		for i, x := range xs {
			if math.IsNaN(x) {
				xs[i] = -1
			}
		}
	}
	return res, nil
}

// buildNetwork counts the wells' states and every step's k(E) on the
// common grains g (energies from zero, the lowest well).
func buildNetwork(m *input.Model, g rrkm.Grains, zero float64, tr collision.Transfer, counters map[string]*rrkm.Counter, tK float64) (*network.Network, error) {
	net := m.Network
	nw := &network.Network{Grains: g}
	index := map[string]int{}
	offset := func(name string) float64 { return net.EnergyOf(name) - zero }
	for i, w := range net.Wells {
		c := counters[w.Name]
		index[w.Name] = i
		// The grains' Boltzmann weights from the exact in-grain sums, as the
		// one-well master equation takes them (collision.NewWell).
		nw.Wells = append(nw.Wells, network.Well{Name: w.Name, Counts: c.ScaledCounts(g, offset(w.Name)), CountScale: c.Scale(), Transfer: tr,
			Weights: c.ScaledBoltzmannCountsFrom(g, tK, offset(w.Name))})
	}
	for _, st := range net.Steps {
		from := counters[st.From]
		counts := from.Counts(g, offset(st.From))
		k := make([]float64, g.N)
		name := st.To
		if st.ToFragments {
			name = productName(net, st.To)
		}
		if st.Barrierless != nil {
			if err := iltOnGrid(k, from, st.Barrierless, g, offset(st.From)); err != nil {
				return nil, fmt.Errorf("%s: step %s → %s: %w", m.File, st.From, st.To, err)
			}
		} else {
			ts := m.Molecule(st.Via)
			e0 := ts.E0 - zero
			tc := counters[st.Via]
			l := st.PathDegeneracy
			if l == 0 {
				l = rrkm.PathDegeneracy(&m.Molecule(st.From).Species, &ts.Species)
			}
			var sums []float64
			if st.Tunnelling == input.Eckart {
				// The barrier's sides from the step's two ends (RRKM with
				// tunnelling through an Eckart barrier, as for one well,
				// on the grid of the network).
				rel := ts.Species
				rel.E0 = ts.E0 - net.EnergyOf(st.From)
				eck, err := rrkm.NewEckart(&rel, ts.E0-net.EnergyOf(st.To))
				if err != nil {
					return nil, fmt.Errorf("%s: step %s → %s: %w", m.File, st.From, st.To, err)
				}
				sums = tc.AveragedTunnelSumsFrom(g, *eck, offset(st.From))
			} else {
				sums = tc.AveragedSums(g, e0)
			}
			kw := 1.0
			if st.Tunnelling == input.Wigner {
				// Wigner's correction is thermal: k(E) scaled by κ(T), as
				// for one well.
				kw = rrkm.Wigner(ts.Imaginary, tK)
			}
			for i, n := range counts {
				if n > 0 && sums[i] > 0 {
					k[i] = kw * l * units.LightCm * sums[i] * g.Width / n
				}
			}
		}
		if st.ToFragments {
			nw.Exits = append(nw.Exits, network.Exit{Name: name, Well: index[st.From], K: k})
			if src := net.Source; src != nil && src.Into == st.From && src.Fragments == st.To {
				nw.Sources = []network.Source{{Name: name + " -> " + st.From, Well: index[st.From], Exit: name}}
			}
		} else {
			nw.Isomerisations = append(nw.Isomerisations, network.Isomerisation{Name: st.Via, From: index[st.From], To: index[st.To], K: k})
		}
	}
	return nw, nil
}

// countNetwork counts the states of every well and transition state of
// m's network from its own zero-point level to top cm⁻¹ above the grid's
// zero (the lowest well), keyed by name.
func countNetwork(m *input.Model, zero, top float64) (map[string]*rrkm.Counter, error) {
	net := m.Network
	fine := m.EnergyGrid.Fine
	out := map[string]*rrkm.Counter{}
	count := func(name string, e float64) error {
		if _, done := out[name]; done {
			return nil
		}
		c, err := rrkm.NewCounter(&m.Molecule(name).Species, fine, math.Max(top-(e-zero), fine))
		if err != nil {
			return fmt.Errorf("%s: %w", m.File, err)
		}
		out[name] = c
		return nil
	}
	for _, w := range net.Wells {
		if err := count(w.Name, w.Energy); err != nil {
			return nil, err
		}
	}
	// A transition state is counted from its zero-point level, or, with
	// Eckart tunnelling, from the higher end of its step, the lowest
	// energy at which the tunnelling sum is not zero.
	from := map[string]float64{}
	var order []string
	for _, st := range net.Steps {
		if st.Via == "" {
			continue
		}
		e := m.Molecule(st.Via).E0
		if st.Tunnelling == input.Eckart {
			e = math.Max(net.EnergyOf(st.From), net.EnergyOf(st.To))
		}
		if prev, ok := from[st.Via]; !ok || e < prev {
			if !ok {
				order = append(order, st.Via)
			}
			from[st.Via] = e
		}
	}
	for _, name := range order {
		if err := count(name, from[name]); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// productName names a fragment set's products in equations: A + B.
func productName(net *input.Network, set string) string {
	f := net.FragmentSet(set)
	s := ""
	for i, x := range f.Species {
		if i > 0 {
			s += " + "
		}
		s += x
	}
	return s
}

// iltOnGrid fills k with the barrierless k(E) of the well counted by c, by
// the inverse Laplace transform of its k∞ with the grain-averaged sums of
// the one-well path (rrkm.ILTMicroFrom), on the common grains g, on which
// the well's zero lies at off.
func iltOnGrid(k []float64, c *rrkm.Counter, b *input.Barrierless, g rrkm.Grains, off float64) error {
	mi, err := rrkm.ILTMicroFrom(c, rrkm.ILT{A: b.A, T0: b.T0, N: b.N, EInf: b.Energy}, g, off)
	if err != nil {
		return err
	}
	copy(k, mi.K)
	return nil
}

// symmetrise makes the well-to-well rate coefficients k (k[j][i] from i to
// j) obey detailed balance with the equilibrium fractions x exactly: each
// pair's two fluxes at equilibrium, k[j][i]·x_i and k[i][j]·x_j, are
// replaced by their geometric mean, and the diagonal is set again so that
// each well's loss is the sum of its rates (with the products', kx). The
// chemically significant eigenpairs define a rate law only to the order of
// their separation from relaxation, within which the two fluxes may differ
// (Bartis & Widom 1974; Miller & Klippenstein 2006); the departure before
// (Result.Balance, reported as detailed_balance_departure) bounds what this
// changes. A mechanism's reversible entries need the balanced form.
func symmetrise(k, kx [][]float64, x []float64) {
	n := len(k)
	for i := range n {
		for j := i + 1; j < n; j++ {
			f, r := k[j][i]*x[i], k[i][j]*x[j]
			if f > 0 && r > 0 {
				g := math.Sqrt(f * r)
				k[j][i], k[i][j] = g/x[i], g/x[j]
			}
		}
	}
	for i := range n {
		loss := 0.0
		for j := range n {
			if j != i {
				loss += k[j][i]
			}
		}
		for _, row := range kx {
			loss += row[i]
		}
		k[i][i] = -loss
	}
}

// populationTimes is the number of times populations.svg is drawn at.
const populationTimes = 80

// Populations returns, at the point (it, ip) of res, the fractions of the
// wells and products against time after a start in the reference well,
// from the phenomenological rate law dX/dt = K·X, dP/dt = K_exit·X
// (X(t) = exp(A·t)·X(0) with A the rate matrix of wells and products,
// gonum's matrix exponential), at populationTimes times spaced evenly in
// log t from 1e-3 of the fastest loss's time to 10 times the slowest's.
// names lists the wells, then the products; frac[k][i] is species k at
// times[i].
func (res *NetworkRatesResult) Populations(it, ip int) (names []string, times []float64, frac [][]float64, err error) {
	k, kx := res.K[it][ip], res.KProducts[it][ip]
	if k == nil {
		return nil, nil, nil, errors.New("job: the point was refused")
	}
	nw, np := len(res.Wells), len(res.Products)
	n := nw + np
	a := mat.NewDense(n, n, nil)
	fast, slow := 0.0, math.Inf(1)
	for i := range nw {
		for j := range nw {
			a.Set(j, i, k[j][i])
		}
		for x := range np {
			a.Set(nw+x, i, kx[x][i])
		}
		if l := -k[i][i]; l > 0 {
			fast, slow = math.Max(fast, l), math.Min(slow, l)
		}
	}
	if !(fast > 0) {
		return nil, nil, nil, errors.New("job: no well reacts at this point")
	}
	// The slowest time is that of the rate matrix's smallest nonzero
	// eigenvalue, which may be far below every diagonal loss (a well that
	// feeds back into another).
	var eig mat.Eigen
	if eig.Factorize(a.Slice(0, nw, 0, nw), mat.EigenNone) {
		for _, v := range eig.Values(nil) {
			if r := math.Abs(real(v)); r > 1e-12*fast {
				slow = math.Min(slow, r)
			}
		}
	}
	start := -1
	for i, w := range res.Wells {
		if w == res.Reference {
			start = i
		}
	}
	if start < 0 {
		start = 0
	}
	names = append(append(names, res.Wells...), res.Products...)
	frac = make([][]float64, n)
	lo, hi := math.Log10(1e-3/fast), math.Log10(10/slow)
	var at, e mat.Dense
	for s := range populationTimes {
		t := math.Pow(10, lo+(hi-lo)*float64(s)/(populationTimes-1))
		at.Scale(t, a)
		e.Exp(&at)
		times = append(times, t)
		for k := range n {
			frac[k] = append(frac[k], e.At(k, start))
		}
	}
	return names, times, frac, nil
}

// networkGrid holds what every temperature of NetworkRates shares.
type networkGrid struct {
	zero, top, lowest float64 // cm⁻¹: the grid's zero; the highest and lowest threshold above it
	tr                collision.Transfer
	col               collision.Collider
	counts            map[string]*rrkm.Counter
	fragments         []*rrkm.Species // the source's fragments, all described, or nil
}

// networkRow is one temperature's part of a NetworkRatesResult.
type networkRow struct {
	k, kProducts   [][][]float64
	sep, bal, eq   []float64
	stab, act      [][]float64
	kd, kc         []float64
	merged         map[string]*MergedPoint
	refused        map[string]string
	products       []string
	grain, ceiling float64
}

// networkTemperature solves the network of m at tK and every pressure.
func networkTemperature(m *input.Model, tK float64, ng networkGrid) (*networkRow, error) {
	net := m.Network
	row := &networkRow{merged: map[string]*MergedPoint{}, refused: map[string]string{}}
	// A grain edge on the lowest threshold, as the one-well master
	// equation puts one on its E0, so that no grain straddles it.
	grain := collision.GrainFor(ng.tr, tK)
	if k := math.Round(ng.lowest/grain - 0.5); k >= 1 {
		grain = ng.lowest / (k + 0.5)
	}
	g := rrkm.GrainsTo(grain, networkCeiling(m, ng.zero, tK))
	nw, err := buildNetwork(m, g, ng.zero, ng.tr, ng.counts, tK)
	if err != nil {
		return nil, err
	}
	if err := network.CheckSize(nw, tK); err != nil {
		return nil, m.FieldError("network", fmt.Errorf("%d wells on %d grains of %.3g cm-1 at %g K: %w", len(net.Wells), g.N, g.Width, tK, err),
			"fewer wells or a narrower temperature range")
	}
	row.grain, row.ceiling = g.Width, g.Top()+ng.zero
	for _, pPa := range m.Pressures {
		omega := ng.col.Z(tK) * collision.Concentration(pPa, tK)
		opt := network.Options{Merge: true}
		if len(nw.Wells) == 1 {
			// One well's rate coefficient is its slowest eigenvalue however
			// poorly separated, as the one-well master equation reports it
			// (with the separation beside it): nothing could be merged.
			opt.MaxSeparation = 1
		}
		r, err := network.Solve(nw, tK, omega, opt)
		var pe *network.PrecisionError
		switch {
		case err == nil && r.Merge != nil:
			row.merged[fmt.Sprintf("%g K, %g Pa", tK, pPa)] = &MergedPoint{Species: r.GroupNames, K: r.K, KProducts: r.KExit, Departure: r.Merge.Departure}
			if row.products == nil {
				row.products = r.Exits
			}
			row.k, row.kProducts = append(row.k, nil), append(row.kProducts, nil)
			row.sep, row.bal = append(row.sep, r.Separation), append(row.bal, r.Balance)
			row.stab, row.act, row.kd, row.kc = append(row.stab, nil), append(row.act, nil), append(row.kd, math.NaN()), append(row.kc, math.NaN())
			continue
		case errors.Is(err, network.ErrNotSeparated), errors.As(err, &pe):
			row.refused[fmt.Sprintf("%g K, %g Pa", tK, pPa)] = err.Error()
			row.k, row.kProducts = append(row.k, nil), append(row.kProducts, nil)
			row.sep, row.bal = append(row.sep, math.NaN()), append(row.bal, math.NaN())
			row.stab, row.act, row.kd, row.kc = append(row.stab, nil), append(row.act, nil), append(row.kd, math.NaN()), append(row.kc, math.NaN())
			continue
		case err != nil:
			return nil, &NumericalError{Err: fmt.Errorf("network at %g K, %g Pa: %w", tK, pPa, err)}
		}
		if row.products == nil {
			row.products = r.Exits
		}
		symmetrise(r.K, r.KExit, r.Equilibrium)
		row.k, row.kProducts = append(row.k, r.K), append(row.kProducts, r.KExit)
		row.sep, row.bal, row.eq = append(row.sep, r.Separation), append(row.bal, r.Balance), r.Equilibrium
		if len(r.Sources) > 0 {
			sr := r.Sources[0]
			row.stab, row.act, row.kd = append(row.stab, sr.Wells), append(row.act, sr.Exits), append(row.kd, sr.KInf)
			capture := math.NaN()
			if ng.fragments != nil {
				into := net.Well(net.Source.Into)
				kcEq := rrkm.EquilibriumConstant(&m.Molecule(into.Name).Species, ng.fragments, net.FragmentSet(net.Source.Fragments).Energy-into.Energy, tK)
				capture = sr.KInf / kcEq
			}
			row.kc = append(row.kc, capture)
		}
	}
	return row, nil
}
