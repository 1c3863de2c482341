package fit

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// At a pressure whose k(T) is exactly a sum of two Arrhenius terms the
// two-term entry is kept, its error is ~0 and its held-out error (each
// interior temperature left out) is far below the single term's, the
// figure the choice is made on. Two pressures, since a PLOG form needs
// two; each its own exact double-Arrhenius, which one term misses by more
// than the 1 % tolerance (only then is a second term tried).
func TestPLOGDoubleArrhenius(t *testing.T) {
	// Exact data fitted by Gauss–Newton to near rounding: the fit error
	// of TestFitPLOGTwoTerms, 1e-6 (fraction), holds for the held-out
	// refits too, which stop earlier (refitSettings) but from the optimum.
	const tol = 1e-6
	p1, p2 := 133.322, 101325.0 // 1 Torr, 1 atm
	sums := plogSum{
		p1: {{A: 5e9, N: 0.8, Ta: 1500}, {A: 3e17, N: -0.7, Ta: 12000}},
		p2: {{A: 2e12, N: 0.5, Ta: 1000}, {A: 1e18, N: -0.5, Ta: 15000}},
	}
	tab := gridTable(sums, linGrid(300, 2500, 12), []float64{p1, p2}, "s-1")
	r, err := FitPLOG(tab, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i, pp := range r.Pressures {
		if pp.NTerms != 2 || len(r.Entries[i].Terms) != 2 {
			t.Errorf("P = %g Pa: %d terms, want 2 (%+v)", pp.P, pp.NTerms, pp)
			continue
		}
		if pp.MaxErrorPct/100 > tol {
			t.Errorf("P = %g Pa: max error %.3g %%, want ~0", pp.P, pp.MaxErrorPct)
		}
		if pp.OneTermHeldOutMaxErrorPct == nil || pp.TwoTermHeldOutMaxErrorPct == nil ||
			*pp.TwoTermHeldOutMaxErrorPct/100 > tol || *pp.OneTermHeldOutMaxErrorPct < 1 {
			t.Errorf("P = %g Pa: held-out one term %v %%, two terms %v %%", pp.P, pp.OneTermHeldOutMaxErrorPct, pp.TwoTermHeldOutMaxErrorPct)
		}
		t.Logf("P = %g Pa: one term %.3g %% (held out %.3g %%), two terms %.3g %% (held out %.3g %%)",
			pp.P, *pp.OneTermMaxErrorPct, *pp.OneTermHeldOutMaxErrorPct, *pp.TwoTermMaxErrorPct, *pp.TwoTermHeldOutMaxErrorPct)
	}
}

// Options.PLOGMaxN bounds |n| of every term, and the one-term fit at the
// bound is the constrained least-squares optimum: checked against a brute
// force scan of n over the allowed interval, each n's A and Ta from the
// 2 × 2 normal equations written out here. PLOGOneTerm keeps one term
// where two are needed.
func TestPLOGMaxNAndOneTerm(t *testing.T) {
	const bound = 1.0
	// The scan steps n by 1e-4; the cost is quadratic at the optimum, so
	// the scan's best cost is within ~1e-8 of the true one, relative.
	const nStep, costTol = 1e-4, 1e-6
	// Data from n = 2.5 with a second, small term: the free fit wants
	// |n| > 1.
	temps := linGrid(300, 2500, 15)
	sums := plogSum{}
	press := atm(0.1, 1, 10)
	for i, P := range press {
		sums[P] = []Arrhenius{{A: 1e5 * float64(i+1), N: 2.5, Ta: 3000}, {A: 1e13, N: 0, Ta: 20000}}
	}
	tab := gridTable(sums, temps, press, "s-1")
	one, err := FitPLOG(tab, Options{PLOGMaxN: bound, PLOGOneTerm: true})
	if err != nil {
		t.Fatal(err)
	}
	for i, e := range one.Entries {
		if len(e.Terms) != 1 {
			t.Fatalf("PLOGOneTerm: %d terms at %g Pa", len(e.Terms), e.P)
		}
		a := e.Terms[0]
		if math.Abs(a.N) > bound*(1+1e-12) {
			t.Errorf("n = %g beyond the bound %g", a.N, bound)
		}
		// Brute force over n ∈ [−bound, bound].
		var ts, lnk []float64
		for _, p := range tab.Points {
			if p.P == press[i] {
				ts, lnk = append(ts, p.T), append(lnk, math.Log(p.K))
			}
		}
		cost := func(n float64) (float64, float64, float64) {
			// ln k − n ln T = c0 − Ta/T: normal equations in (c0, Ta).
			var s1, sx, sxx, sy, sxy float64
			for j, T := range ts {
				x, y := -1/T, lnk[j]-n*math.Log(T)
				s1, sx, sxx, sy, sxy = s1+1, sx+x, sxx+x*x, sy+y, sxy+x*y
			}
			det := s1*sxx - sx*sx
			c0, ta := (sxx*sy-sx*sxy)/det, (s1*sxy-sx*sy)/det
			c := 0.0
			for j, T := range ts {
				d := c0 - ta/T + n*math.Log(T) - lnk[j]
				c += d * d
			}
			return c, c0, ta
		}
		best, bestN := math.Inf(1), 0.0
		for n := -bound; n <= bound+nStep/2; n += nStep {
			if c, _, _ := cost(n); c < best {
				best, bestN = c, n
			}
		}
		got, _, _ := cost(a.N)
		if got > best*(1+costTol) || math.Abs(a.N-bestN) > 2*nStep {
			t.Errorf("P = %g Pa: n = %.6g with cost %.10g; the scan's best n = %.6g with cost %.10g", e.P, a.N, got, bestN, best)
		}
	}
	if one.Pressures[0].OneTermMaxErrorPct != nil {
		t.Error("PLOGOneTerm: a two-term fit was tried")
	}
	two, err := FitPLOG(tab, Options{PLOGMaxN: bound})
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range two.Entries {
		for _, a := range e.Terms {
			if math.Abs(a.N) > bound*(1+1e-12) {
				t.Errorf("P = %g Pa: a term with n = %g beyond the bound %g", e.P, a.N, bound)
			}
		}
	}
	n0 := 0.0
	fixed, err := FitPLOG(tab, Options{Fix: Fix{N: &n0}})
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range fixed.Entries {
		for _, a := range e.Terms {
			if a.N != 0 {
				t.Errorf("Fix.N = 0: a term with n = %g", a.N)
			}
		}
	}
	if _, err := FitPLOG(tab, Options{PLOGMaxN: 0.5, Fix: Fix{N: &[]float64{2}[0]}}); err == nil {
		t.Error("a fixed n outside PLOGMaxN was accepted")
	}
}

// The error between the listed pressures by cross-validation equals an
// independent recomputation: for each inner pressure, ln k interpolated
// linearly in ln P between its neighbours' entries (Cantera's
// pressure-dependent-Arrhenius rule, written out here), compared with the
// table at that pressure.
func TestPLOGBetweenPressures(t *testing.T) {
	const tol = 1e-12 // the same arithmetic in another order
	press := atm(logGrid(0.01, 100, 6)...)
	tab := gridTable(griHCH3(), invTGrid(300, 2500, 10), press, "cm3/mol/s")
	r, err := FitPLOG(tab, Options{})
	if err != nil {
		t.Fatal(err)
	}
	sum := func(e PlogEntry, T float64) float64 {
		k := 0.0
		for _, a := range e.Terms {
			k += a.A * math.Pow(T, a.N) * math.Exp(-a.Ta/T)
		}
		return k
	}
	all, ss, n := 0.0, 0.0, 0
	for i := 1; i+1 < len(r.Entries); i++ {
		lo, hi := r.Entries[i-1], r.Entries[i+1]
		worst := 0.0
		for _, p := range tab.Points {
			if p.P != r.Entries[i].P {
				continue
			}
			x := (math.Log(p.P) - math.Log(lo.P)) / (math.Log(hi.P) - math.Log(lo.P))
			k := math.Exp((1-x)*math.Log(sum(lo, p.T)) + x*math.Log(sum(hi, p.T)))
			e := math.Abs(k/p.K - 1)
			worst, all, ss, n = math.Max(worst, e), math.Max(all, e), ss+e*e, n+1
		}
		got := r.Pressures[i].LeftOutMaxErrorPct
		if got == nil || !scalar.EqualWithinRel(*got, 100*worst, tol) {
			t.Errorf("P = %g Pa: left-out max %v %%, recomputed %.15g %%", r.Entries[i].P, got, 100*worst)
		}
	}
	h := r.HeldOut
	if h == nil || h.Method != HeldOutCV || h.Points != n || !scalar.EqualWithinRel(h.MaxErrorPct, 100*all, tol) ||
		!scalar.EqualWithinRel(h.RMSErrorPct, 100*math.Sqrt(ss/float64(n)), tol) {
		t.Errorf("held-out %+v; recomputed max %.15g %%, rms %.15g %% over %d points", h, 100*all, 100*math.Sqrt(ss/float64(n)), n)
	}
	if r.Pressures[0].LeftOutMaxErrorPct != nil || r.Pressures[len(r.Pressures)-1].LeftOutMaxErrorPct != nil {
		t.Error("an end pressure was left out (that would be extrapolation)")
	}
	t.Logf("between the pressures: max %.3g %%, rms %.3g %%; at the pressures %.3g %%", h.MaxErrorPct, h.RMSErrorPct, r.MaxErrorPct)
}

// Measured data on ragged pressure sets: each temperature at its own
// pressures, scattered by up to ±1 % around three nominal ones, and one
// pressure measured at a single temperature. Pressures within
// Options.GroupTol form one entry, at their geometric mean; the lone
// pressure gets no entry but is listed and compared with the
// interpolation. Data from k = A·(P/1 atm)^0.5·T^n·exp(−Ta/T) (plogLinear),
// whose entries are exact Arrhenius expressions at any pressure: each
// entry must equal the generating expression at its own pressure within
// the spread the ±1 % scatter of P causes (±0.5 % of k).
func TestPLOGRagged(t *testing.T) {
	const tol = 0.006 // 0.5 % from the pressure scatter, and rounding
	f := plogLinear{Arrhenius{A: 1e13, N: 0.7, Ta: 20000}}
	rng := rand.New(rand.NewPCG(2, 2))
	tab := &Table{KUnits: "s-1"}
	for _, P := range atm(0.01, 1, 100) {
		for _, T := range linGrid(500, 2000, 8) {
			T += 20 * rng.Float64() // each set its own temperatures
			p := P * (1 + 0.01*(2*rng.Float64()-1))
			tab.Points = append(tab.Points, Point{T: T, P: p, K: f.Eval(T, p)})
		}
	}
	lone := 0.1 * 101325.0
	tab.Points = append(tab.Points, Point{T: 1000, P: lone, K: f.Eval(1000, lone)})
	r, err := FitPLOG(tab, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Entries) != 3 {
		t.Fatalf("%d entries, want 3 (pressures within 1 %% are one)", len(r.Entries))
	}
	if len(r.Skipped) != 1 || r.Skipped[0].P != lone || r.Skipped[0].NPoints != 1 {
		t.Errorf("skipped %+v, want the lone pressure %g Pa", r.Skipped, lone)
	}
	for _, e := range r.Entries {
		for _, T := range []float64{500, 1000, 2000} {
			if got, want := (PlogEntry{Terms: e.Terms}).eval(T), f.Eval(T, e.P); math.Abs(got/want-1) > tol {
				t.Errorf("entry at %g Pa, %g K: k = %g, the generating expression %g", e.P, T, got, want)
			}
		}
	}
	if r.HeldOut == nil || r.HeldOut.MaxError() > tol {
		t.Errorf("held-out %+v: the lone pressure and the middle entry lie on the exact interpolation", r.HeldOut)
	}
	// Without grouping every pressure is its own, with one temperature.
	if _, err := FitPLOG(tab, Options{GroupTol: -1}); err == nil {
		t.Error("ungrouped ragged pressures gave entries")
	}
}
