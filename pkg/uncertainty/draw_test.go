package uncertainty

import (
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
)

// drawMany draws n values of the single uncertain value u.
func drawMany(t *testing.T, u input.Uncertain, n int) []float64 {
	t.Helper()
	out := make([]float64, n)
	for i := range out {
		xs, _, err := Draw([]input.Uncertain{u}, 5, i)
		if err != nil {
			t.Fatal(err)
		}
		out[i] = xs[0]
	}
	return out
}

// The distributions mean what docs/uncertainty.md says: factor F puts 95 %
// of the draws between x/F and x·F (a lognormal with sd ln F/1.96); a
// normal's plus-minus is its 95 % half-width, 1.96 sd; a uniform fills its
// range. Checked on 20000 draws: a fraction's standard error there is
// sqrt(0.95·0.05/20000) = 0.0015, a mean's sd/141; the tolerances are
// three of them.
func TestDistributions(t *testing.T) {
	const n = 20000
	within := func(xs []float64, lo, hi float64) float64 {
		k := 0
		for _, x := range xs {
			if x >= lo && x <= hi {
				k++
			}
		}
		return float64(k) / float64(len(xs))
	}
	fracTol := 3 * math.Sqrt(0.95*0.05/n)
	lognormal := input.Uncertain{Path: "a", Quantity: input.Alpha300, Nominal: 250, Dist: input.LogNormal, SDLog: math.Log(2) / z975, Relative: true}
	if f := within(drawMany(t, lognormal, n), 125, 500); math.Abs(f-0.95) > fracTol {
		t.Errorf("factor 2: %.4f of the draws within ×/÷ 2, want 0.95 ± %.4f", f, fracTol)
	}
	normal := input.Uncertain{Path: "e", Quantity: input.TSEnergy, Nominal: 14000, Dist: input.Normal, SD: 350 / z975}
	if f := within(drawMany(t, normal, n), 14000-350, 14000+350); math.Abs(f-0.95) > fracTol {
		t.Errorf("plus-minus 350 (normal): %.4f of the draws within ± 350, want 0.95 ± %.4f", f, fracTol)
	}
	uniform := input.Uncertain{Path: "n", Quantity: input.AlphaExponent, Nominal: 0.8, Dist: input.Uniform, Low: 0.6, High: 1.1}
	xs := drawMany(t, uniform, n)
	mean := 0.0
	for _, x := range xs {
		if x < 0.6 || x > 1.1 {
			t.Fatalf("uniform [0.6, 1.1]: draw %v outside", x)
		}
		mean += x / n
	}
	if sd := 0.5 / math.Sqrt(12); math.Abs(mean-0.85) > 3*sd/math.Sqrt(n) {
		t.Errorf("uniform [0.6, 1.1]: mean %.5f, want 0.85 ± %.5f", mean, 3*sd/math.Sqrt(n))
	}
}

// A draw depends on (seed, index) alone, a distribution of zero width
// returns the nominal value exactly, and draws outside the physical range
// are drawn again: a normal barrier of 1 ± 2 kcal/mol never goes below 0.
func TestDrawRules(t *testing.T) {
	us := []input.Uncertain{
		{Path: "e", Quantity: input.TSEnergy, Nominal: 350, Dist: input.Normal, SD: 700},
		{Path: "z", Quantity: input.Alpha300, Nominal: 250, Dist: input.LogNormal},
	}
	a, redrawn, err := Draw(us, 9, 17)
	if err != nil {
		t.Fatal(err)
	}
	b, _, _ := Draw(us, 9, 17)
	c, _, _ := Draw(us, 9, 18)
	if a[0] != b[0] || a[0] == c[0] {
		t.Errorf("draws (9, 17) = %v, again %v, (9, 18) = %v: want the same for the same index, other for another", a, b, c)
	}
	if a[1] != 250 {
		t.Errorf("zero-width lognormal drew %v, want 250 exactly", a[1])
	}
	total := redrawn
	for i := range 2000 {
		xs, r, err := Draw(us, 1, i)
		if err != nil {
			t.Fatal(err)
		}
		if xs[0] < 0 {
			t.Fatalf("sample %d: barrier %v below zero", i, xs[0])
		}
		total += r
	}
	// P(x < 0) = Φ(−0.5) = 0.31 for 1 ± 2: hundreds of redraws.
	if total == 0 {
		t.Error("no draw was redrawn, though a third fall below zero")
	}
}

// FitFactor recovers the parameters of factors that follow its form
// exactly (the envelope then touches every point), is nowhere below the
// factors, holds g ≥ 0 for factors that fall away from 298 K (the largest
// factor then), and says how far above the factors it lies. The envelope
// of scattered factors is checked against a brute-force search over a
// fine grid of (ln f298, g): the linear program's optimum is no worse than
// any feasible point of the grid.
func TestFitFactor(t *testing.T) {
	temps := []float64{300, 500, 800, 1200, 2000}
	want := FactorFit{F298: 1.7, G: 230}
	var f []float64
	for _, tK := range temps {
		f = append(f, want.At(tK))
	}
	got := FitFactor(temps, f)
	if math.Abs(got.F298-want.F298) > 1e-12 || math.Abs(got.G-want.G) > 1e-9 || got.MaxDeviation-1 > 1e-12 {
		t.Errorf("exact factors: fit %+v, want f298 1.7, g 230, deviation 1", got)
	}
	if got.TMin != 300 || got.TMax != 2000 {
		t.Errorf("range %v-%v K, want 300-2000", got.TMin, got.TMax)
	}
	// Factors falling with |1/T − 1/298|: g would be negative, so it is
	// held at 0 and f298 is the largest factor.
	down := []float64{3, 2.5, 2, 1.8, 1.5}
	g := FitFactor(temps, down)
	if g.G != 0 || math.Abs(g.F298-3) > 1e-12 || math.Abs(g.MaxDeviation-2) > 1e-12 {
		t.Errorf("falling factors: fit %+v, want g = 0, f298 = 3, deviation 2", g)
	}
	// Scattered factors: nowhere below them, and no feasible point of a
	// grid of (ln f298, g) has a smaller total excess.
	scattered := []float64{1.9, 1.6, 2.2, 2.0, 2.9}
	fit := FitFactor(temps, scattered)
	excess := func(a, g float64) (float64, bool) {
		e := 0.0
		for i, tK := range temps {
			d := a + g*math.Abs(1/tK-1/TRef) - math.Log(scattered[i])
			if d < -1e-12 {
				return 0, false
			}
			e += d
		}
		return e, true
	}
	least, ok := excess(math.Log(fit.F298), fit.G)
	if !ok {
		t.Fatalf("scattered factors: fit %+v passes below a factor", fit)
	}
	for a := 0.0; a <= 1.2; a += 0.005 {
		for g := 0.0; g <= 400; g += 2 {
			if e, ok := excess(a, g); ok && e < least-1e-12 {
				t.Fatalf("scattered factors: fit %+v has excess %.6g, the grid point ln f298 = %.3f, g = %g has %.6g", fit, least, a, g, e)
			}
		}
	}
}
