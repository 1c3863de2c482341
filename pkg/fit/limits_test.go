package fit

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// Tolerances of the held-limit checks.
const (
	// heldArrTol: held limits are the very Arrhenius fits of the given
	// values, so A, n and Ta must agree with an independent FitArrhenius
	// call to rounding.
	heldArrTol = 1e-12
	// departureTol: the departure is a ratio of two evaluations of the
	// same expressions; it agrees with the test's own ratio to rounding.
	departureTol = 1e-12
	// griFcentTol: exact data, exact limits, so only the stopping rule of
	// the broadening fit (relative change of the mean square residual
	// below 1e-10) limits how well Fcent comes back. 1e-6 is far above
	// what that leaves (1e-10 measured) and far below any difference in
	// Fcent a simulator would notice.
	griFcentTol = 1e-6
	// freeLimitTol: with Limits.Free the fit recovers the exact limits the
	// table was made from; 1e-6 relative is well above the 1e-10 the
	// stopping rule leaves and well below the factors of 1.2–2 by which
	// the given limits are wrong.
	freeLimitTol = 1e-6
)

// griFcent is Fcent of the GRI-Mech 3.0 H+CH3(+M) Troe parameters (Smith
// et al., 1999: TROE .783 74 2941 6964), written out here from the
// formula of Gilbert, Luther & Troe (Ber. Bunsenges. Phys. Chem. 87, 169,
// 1983), Fcent = (1−a)exp(−T/T***) + a·exp(−T/T*) + exp(−T**/T),
// independently of Troe.Fcent.
func griFcent(T float64) float64 {
	return (1-0.783)*math.Exp(-T/74) + 0.783*math.Exp(-T/2941) + math.Exp(-6964/T)
}

// perturbedLimits returns the GRI-Mech 3.0 H+CH3(+M) limits at temps,
// k0 times 2(1 + 0.1 cos(T/400 K)) and k∞ times 1 + 0.2 sin(T/300 K):
// wrong by factors that no Arrhenius expression can absorb.
func perturbedLimits(temps []float64) (k0, kinf []float64) {
	gri := griHCH3()
	k0, kinf = make([]float64, len(temps)), make([]float64, len(temps))
	for i, T := range temps {
		k0[i] = 2 * (1 + 0.1*math.Cos(T/400)) * gri.Low.At(T)
		kinf[i] = (1 + 0.2*math.Sin(T/300)) * gri.High.At(T)
	}
	return k0, kinf
}

func TestHeldLimits(t *testing.T) {
	// Table: GRI-Mech 3.0 H+CH3(+M) (Smith et al., 1999), 12 temperatures
	// 300–2500 K × 9 pressures 0.01–100 atm, k in cm³ mol⁻¹ s⁻¹.
	gri := griHCH3()
	temps := linGrid(300, 2500, 12)
	tab := gridTable(gri, temps, atm(logGrid(0.01, 100, 9)...), "cm3/mol/s")
	exactK0, exactKInf := make([]float64, len(temps)), make([]float64, len(temps))
	for i, T := range temps {
		exactK0[i], exactKInf[i] = gri.Low.At(T), gri.High.At(T)
	}
	badK0, badKInf := perturbedLimits(temps)
	for _, c := range []struct {
		name      string
		k0, kinf  []float64
		exact     bool // the limits are those of the table
		minFactor float64
	}{
		// Exact limits: the broadening alone reproduces the table and
		// must come back as GRI's four-parameter Troe.
		{"exact GRI limits", exactK0, exactKInf, true, 1},
		// Wrong limits: held all the same (the old code refitted them),
		// the fit misses the tolerance, and the departure shows the
		// Arrhenius-fit error of the given values.
		{"non-Arrhenius limits", badK0, badKInf, false, 1.05},
	} {
		t.Run(c.name, func(t *testing.T) {
			r, err := FitFalloff(tab, FormTroe, Options{Limits: &Limits{K0: c.k0, KInf: c.kinf}})
			if err != nil {
				t.Fatal(err)
			}
			low, err := FitArrhenius(temps, c.k0, nil)
			if err != nil {
				t.Fatal(err)
			}
			high, err := FitArrhenius(temps, c.kinf, nil)
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range []struct {
				name      string
				got, want Arrhenius
			}{{"low", r.Low, low}, {"high", r.High, high}} {
				if !scalar.EqualWithinAbsOrRel(p.got.A, p.want.A, 0, heldArrTol) ||
					!scalar.EqualWithinAbsOrRel(p.got.N, p.want.N, heldArrTol, heldArrTol) ||
					!scalar.EqualWithinAbsOrRel(p.got.Ta, p.want.Ta, heldArrTol, heldArrTol) {
					t.Errorf("%s = %+v, FitArrhenius of the given limits %+v", p.name, p.got, p.want)
				}
			}
			if r.LimitsRefined {
				t.Error("limits refined without Limits.Free")
			}
			if len(r.LimitDeparture) != len(temps) {
				t.Fatalf("%d departures for %d temperatures", len(r.LimitDeparture), len(temps))
			}
			worst := 1.0
			for i, d := range r.LimitDeparture {
				T := temps[i]
				w0, wi := low.At(T)/c.k0[i], high.At(T)/c.kinf[i]
				worst = max(worst, w0, 1/w0, wi, 1/wi)
				if d.T != T || !scalar.EqualWithinRel(d.K0Ratio, w0, departureTol) || !scalar.EqualWithinRel(d.KInfRatio, wi, departureTol) {
					t.Errorf("departure %+v, want T %g, k0 %.15g, k∞ %.15g", d, T, w0, wi)
				}
			}
			if !scalar.EqualWithinRel(r.MaxLimitDeparture, worst, departureTol) || worst < c.minFactor {
				t.Errorf("max departure %.15g, want %.15g (at least %g)", r.MaxLimitDeparture, worst, c.minFactor)
			}
			t.Logf("max error %.3g %%, failed %v (%s), max departure %.6g; %s", r.MaxErrorPct, r.Failed, r.FailReason, r.MaxLimitDeparture, r.Describe())
			if !c.exact {
				if !r.Failed {
					t.Errorf("held wrong limits: max error %.3g %%, not marked failed", r.MaxErrorPct)
				}
				return
			}
			if r.Failed || r.Broadening != "four-parameter Troe (T** needed)" {
				t.Errorf("failed %v (%s), broadening %q", r.Failed, r.FailReason, r.Broadening)
			}
			dev := 0.0
			for _, T := range linGrid(300, 2500, 45) {
				dev = math.Max(dev, math.Abs(r.Troe.Fcent(T)/griFcent(T)-1))
			}
			t.Logf("Fcent: largest relative deviation from GRI-Mech 3.0 %.3g", dev)
			if dev > griFcentTol {
				t.Errorf("Fcent deviates from GRI-Mech 3.0 by %.3g relative; troe %+v", dev, *r.Troe)
			}
		})
	}
}

func TestFreeLimits(t *testing.T) {
	// The GRI-Mech 3.0 H+CH3(+M) table (Smith et al., 1999) with the
	// perturbed limits of perturbedLimits: with Limits.Free the fit
	// leaves them for the table's own limits, GRI's, and the departure
	// says by how much: GRI/given at each temperature.
	gri := griHCH3()
	temps := linGrid(300, 2500, 12)
	tab := gridTable(gri, temps, atm(logGrid(0.01, 100, 9)...), "cm3/mol/s")
	k0, kinf := perturbedLimits(temps)
	r, err := FitFalloff(tab, FormTroe, Options{Limits: &Limits{K0: k0, KInf: kinf, Free: true}})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("max error %.3g %%, max departure %.6g; %s", r.MaxErrorPct, r.MaxLimitDeparture, r.Describe())
	if !r.LimitsRefined || r.Failed {
		t.Errorf("refined %v, failed %v (%s)", r.LimitsRefined, r.Failed, r.FailReason)
	}
	worst, dev := 1.0, 0.0
	for i, d := range r.LimitDeparture {
		T := temps[i]
		w0, wi := gri.Low.At(T)/k0[i], gri.High.At(T)/kinf[i]
		worst = max(worst, w0, 1/w0, wi, 1/wi)
		dev = max(dev, math.Abs(d.K0Ratio/w0-1), math.Abs(d.KInfRatio/wi-1))
	}
	t.Logf("departure vs GRI/given: largest relative deviation %.3g; max factor %.6g", dev, worst)
	if dev > freeLimitTol || !scalar.EqualWithinRel(r.MaxLimitDeparture, worst, freeLimitTol) {
		t.Errorf("departures deviate by %.3g from GRI/given; max %.6g, want %.6g", dev, r.MaxLimitDeparture, worst)
	}
}
