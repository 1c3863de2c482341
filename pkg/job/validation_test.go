package job

import (
	"context"
	"math"
	"testing"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Methyl isocyanide isomerisation CH3NC → CH3CN, end to end from quantum
// chemistry (testdata/ch3nc-validation.yaml: Psi4 1.3.2 B3LYP/6-31G(d)
// frequencies and geometries, CCSD(T)/cc-pVTZ energies, imported with
// `falloff import`) against the measured high-pressure rate of Schneider &
// Rabinovitch, J. Am. Chem. Soc. 84, 4215 (1962): k∞ = 10^13.60 ·
// exp(−38.4 kcal/mol / RT) s⁻¹ at 199.4, 230.4 and 260.0 °C (log A and E
// from memory, high confidence; E∞ = 38.4 kcal/mol is quoted as
// Rabinovitch's value in Theor. Chim. Acta, doi:10.1007/BF00528489).
//
// The agreement docs/validation.md states, and this test keeps: k∞ within
// a factor 1.5 of the measured expression at the three temperatures
// (measured: 1.17–1.25), and the activation energy over 472.55–533.15 K
// within 1 kcal/mol of 38.4 (measured: +0.4). The factor allows for the
// barrier's uncertainty at CCSD(T)/cc-pVTZ, ±0.5 kcal/mol, a factor 1.65 at
// 500 K (common practice, no source), and for the harmonic-oscillator,
// rigid-rotor model of the B3LYP frequencies.
//
// The barrier-adjusted variant (E0 moved so the computed activation energy
// equals the measured 38.4 kcal/mol) and the falloff curves are logged for
// the docs: the measured k/k∞ points and half-pressure of the 1962 paper
// are not available here (docs/validation.md says why), so the falloff is
// not yet checked against experiment.
func TestCH3NCAgainstExperiment(t *testing.T) {
	m, err := input.ReadFile("../../testdata/ch3nc-validation.yaml")
	if err != nil {
		t.Fatal(err)
	}
	n, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	rCal := units.Boltzmann * units.Avogadro / units.Calorie // cal/(mol K)
	measured := func(tK float64) float64 { return math.Pow(10, 13.60) * math.Exp(-38400/(rCal*tK)) }
	temps := []float64{472.55, 503.55, 533.15}
	for _, tK := range temps {
		ratio := n.KInf(tK) / measured(tK)
		t.Logf("T = %.2f K: k∞ = %.4g s⁻¹, measured %.4g s⁻¹, ratio %.3f", tK, n.KInf(tK), measured(tK), ratio)
		if ratio > 1.5 || ratio < 1/1.5 {
			t.Errorf("T = %.2f K: computed/measured k∞ = %.3f, outside the factor 1.5 the docs state", tK, ratio)
		}
	}
	ea := func(n *Network) float64 {
		t1, t2 := temps[0], temps[len(temps)-1]
		return rCal * math.Log(n.KInf(t2)/n.KInf(t1)) / (1/t1 - 1/t2) / 1000 // kcal/mol
	}
	eaComputed := ea(n)
	logA := math.Log10(n.KInf(503.55)) + eaComputed*1000/(rCal*503.55*math.Ln10)
	t.Logf("Arrhenius over %.2f–%.2f K: Ea = %.2f kcal/mol (measured 38.4), log10 A = %.2f (measured 13.60)", temps[0], temps[2], eaComputed, logA)
	if math.Abs(eaComputed-38.4) > 1 {
		t.Errorf("Ea = %.2f kcal/mol, more than 1 kcal/mol from the measured 38.4", eaComputed)
	}

	// The barrier-adjusted variant, for the docs.
	ts := m.Molecule(m.Reaction.Via)
	e0 := ts.E0
	ts.E0 += (38.4 - eaComputed) * units.Cm1PerKcalPerMol
	adj, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("barrier adjusted to the measured Ea: E0 %.2f → %.2f kcal/mol, Ea %.2f, k∞(503.55 K)/measured %.3f",
		e0/units.Cm1PerKcalPerMol, ts.E0/units.Cm1PerKcalPerMol, ea(adj), adj.KInf(503.55)/measured(503.55))
	ts.E0 = e0

	if testing.Short() {
		return
	}
	res, err := n.Rates(context.Background(), Options{SkipCheck: true, SkipHeldOut: true})
	if err != nil {
		t.Fatal(err)
	}
	for i, tK := range res.Temperatures {
		t.Logf("strong collider, T = %.2f K: p½ = %.3g Torr, k0 = %.3g cm³ molecule⁻¹ s⁻¹", tK, res.HalfPressure[i]/units.TorrPa, res.K0[i])
	}
	cmp, err := n.Compare(context.Background(), CompareOptions{Alpha300: []float64{400, 1000, 2000}})
	if err != nil {
		t.Fatal(err)
	}
	for _, md := range cmp.Models {
		t.Logf("%s: p½(503.55 K) = %.3g Torr", md.Name, halfPressure(cmp.Pressures, md.K[1], cmp.KInf[1])/units.TorrPa)
	}
}

// halfPressure interpolates log k/k∞ against log P for k/k∞ = 1/2.
func halfPressure(ps, k []float64, kInf float64) float64 {
	for j := 1; j < len(ps); j++ {
		a, b := math.Log(k[j-1]/kInf), math.Log(k[j]/kInf)
		if target := math.Log(0.5); a <= target && b >= target {
			f := (target - a) / (b - a)
			return math.Exp(math.Log(ps[j-1]) + f*(math.Log(ps[j])-math.Log(ps[j-1])))
		}
	}
	return math.NaN()
}
