package job

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// ratesWith runs the CH3NC validation input (real B3LYP/6-31G(d) and
// CCSD(T) data, strong collider) with the rotation treatment rot and the
// master-equation grain in cm⁻¹.
func ratesWith(t *testing.T, rot input.Rotation, grain float64) (*input.Model, *RatesResult) {
	t.Helper()
	m, err := input.ReadFile("../../testdata/ch3nc-validation.yaml")
	if err != nil {
		t.Fatal(err)
	}
	m.Reaction.Rotation = rot
	m.Fits = nil
	n, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	res, err := n.Rates(context.Background(), Options{SkipCheck: true, SkipHeldOut: true,
		Grain: Setting{Cm1: grain, Option: "--grain", Text: "test"}})
	if err != nil {
		t.Fatal(err)
	}
	return m, res
}

// whittenRabinovitchA returns a(E) = 1 − β·w(E/Ez) of the Whitten–
// Rabinovitch approximation (Whitten & Rabinovitch, J. Chem. Phys. 38,
// 2466, 1963; the w(E') fits of Whitten & Rabinovitch, J. Chem. Phys. 41,
// 1883, 1964, from memory): w = (5E' + 2.73E'^½ + 3.51)⁻¹ for E' < 1,
// exp(−2.4191E'^¼) above; β = (s−1)/s·⟨ν²⟩/⟨ν⟩².
func whittenRabinovitchA(freqs []float64, e float64) (a, ez float64) {
	s := float64(len(freqs))
	var sum, sum2 float64
	for _, v := range freqs {
		sum += v
		sum2 += v * v
		ez += v / 2
	}
	beta := (s - 1) / s * (sum2 / s) / ((sum / s) * (sum / s))
	x := e / ez
	w := math.Exp(-2.4191 * math.Pow(x, 0.25))
	if x < 1 {
		w = 1 / (5*x + 2.73*math.Sqrt(x) + 3.51)
	}
	return 1 - beta*w, ez
}

// The low-pressure limit with adiabatic J against Troe's factorised k0
// (Troe, J. Chem. Phys. 66, 4745, 1977): k0 = Z·ρ_vib,h(E0)·kT/Q_vib·
// e^(−E0/kT)·F_E·F_anh·F_rot. The collision number, the vibrational density
// and F_anh are the same for every treatment of the rotation, so the ratio
// of the strong-collider k0 with adiabatic J to that with all rotations
// active is F_rot(K active, J adiabatic)/F_rot(three active rotors) (F_E of
// the two differs by 2 % here and is left out). Troe's factor for r active
// classical rotor degrees of freedom is Γ(s)/Γ(s + r/2)·((E0 + aEz)/kT)^(r/2)
// (from memory), so the K rotor against all three gives
// (s + ½)·kT/(E0 + aEz); the centrifugal threshold E0(J) = E0 + (B̄‡ − B̄)J(J+1)
// averaged over the thermal J distribution, with ρ(E0 + Δ) ≈ ρ(E0)·
// e^((s−½)Δ/(E0 + aEz)), gives F_J = 1/(q − (q − 1)(s − ½)kT/(E0 + aEz)),
// q = B̄‡/B̄, derived here with the same Laplace-transform approximations
// (Troe's own centrifugal formula for tight complexes, from memory, has this
// structure). The tolerance, 15 %, covers the classical-rotor and
// Whitten–Rabinovitch approximations of the formula; the master equation is
// run on 10 cm⁻¹ grains, so that a grain straddling a shifted threshold
// (the first-order grain error of the low-pressure limit) costs little.
func TestAdiabaticLowPressureTroe(t *testing.T) {
	if testing.Short() {
		t.Skip("three master-equation runs on fine grains")
	}
	m, active := ratesWith(t, input.AllActive, 10)
	_, adiabatic := ratesWith(t, input.AdiabaticJ, 10)
	_, averaged := ratesWith(t, input.AdiabaticJAveraged, 10)
	r, ts := m.Molecule(m.Reaction.Reactant), m.Molecule(m.Reaction.Via)
	ra, jr := rrkm.SplitExternalRotation(&r.Species)
	_, jts := rrkm.SplitExternalRotation(&ts.Species)
	s := float64(len(r.Vibrations))
	// An independent algorithm for the same ratio: the strong-collider
	// low-pressure limit is the equilibrium population above threshold,
	// k0/Z = Σ_J P(J)·Σ_{E ≥ E0(J)} f(E) with adiabatic J (discrete quantum J
	// sum, JDistribution) and Σ_{E ≥ E0} f(E) with every rotation active,
	// summed here on 1 cm⁻¹ grains of the exact counts. It and the master
	// equation (4 J nodes, 10 cm⁻¹ grains) agree within 1 %.
	top := ts.E0 + 40*units.KT(m.Temperatures[len(m.Temperatures)-1])
	cAll, err := rrkm.NewCounter(&r.Species, 1, top)
	if err != nil {
		t.Fatal(err)
	}
	cAct, err := rrkm.NewCounter(ra, 1, top)
	if err != nil {
		t.Fatal(err)
	}
	fine := rrkm.GrainsTo(1, top-1)
	nAll, nAct := cAll.Counts(fine, 0), cAct.Counts(fine, 0)
	above := func(n []float64, from, kt float64) float64 {
		num, q := 0.0, 0.0
		for i, x := range n {
			w := x * math.Exp(-fine.Energy(i)/kt)
			q += w
			if fine.Energy(i) >= from {
				num += w
			}
		}
		return num / q
	}
	a, ez := whittenRabinovitchA(r.Vibrations, ts.E0)
	q := jts.B / jr.B
	for i, tK := range m.Temperatures {
		kt := units.KT(tK)
		x := kt / (ts.E0 + a*ez)
		fJ := 1 / (q - (q-1)*(s-0.5)*x)
		troe := (s + 0.5) * x * fJ
		got := adiabatic.K0[i] / active.K0[i]
		avg := averaged.K0[i] / active.K0[i]
		t.Logf("%.2f K: k0(adiabatic J)/k0(all active) = %.4f, Troe %.4f (F_J %.3f); J-averaged reduction %.4f", tK, got, troe, fJ, avg)
		if math.Abs(got/troe-1) > 0.15 {
			t.Errorf("%.2f K: k0 ratio %.4f, Troe's factorised %.4f: beyond 15 %%", tK, got, troe)
		}
		direct := 0.0
		for j, pj := range jr.JDistribution(tK) {
			direct += pj * above(nAct, ts.E0+(jts.B-jr.B)*float64(j*(j+1)), kt)
		}
		direct /= above(nAll, ts.E0, kt)
		t.Logf("%.2f K: direct population sum %.4f", tK, direct)
		if math.Abs(got/direct-1) > 0.01 {
			t.Errorf("%.2f K: k0 ratio %.4f from the master equation, %.4f from the population sums", tK, got, direct)
		}
		// k∞ is the same canonical TST in every treatment (to the grain
		// error of 10 cm⁻¹ grains, 1e-3).
		for _, res := range []*RatesResult{active, adiabatic, averaged} {
			if r := res.KInfIntegrated[i] / res.KInf[i]; math.Abs(r-1) > 1e-3 {
				t.Errorf("%.2f K: k∞(ME)/k∞ = %.6f", tK, r)
			}
		}
	}
}

// The J quadrature has converged: 4 Gauss–Laguerre nodes against 12 change
// k(T,P), k0 and p½ by less than 2e-3 (the rates' J dependence is nearly
// exponential in J(J+1), which a 4-node rule integrates to ~1e-4; common
// practice, no source).
func TestJNodesConverged(t *testing.T) {
	if testing.Short() {
		t.Skip("two master-equation runs")
	}
	_, four := ratesWith(t, input.AdiabaticJ, 0)
	jNodes = 12
	defer func() { jNodes = JNodes }()
	_, many := ratesWith(t, input.AdiabaticJ, 0)
	worst := 0.0
	for i := range four.Temperatures {
		for j := range four.Pressures {
			worst = math.Max(worst, math.Abs(four.K[i][j]/many.K[i][j]-1))
		}
		worst = math.Max(worst, math.Abs(four.K0[i]/many.K0[i]-1))
		worst = math.Max(worst, math.Abs(four.HalfPressure[i]/many.HalfPressure[i]-1))
	}
	t.Logf("4 against 12 J nodes: worst relative change %.2g", worst)
	if worst > 2e-3 {
		t.Errorf("4 J nodes differ from 12 by %.2g", worst)
	}
}

// The quadrature integrates e^(−x)·x^k exactly for k < 2n: Σ w·x^k = k!
// (the Laguerre moments; Abramowitz & Stegun 25.4.45).
func TestJQuadratureMoments(t *testing.T) {
	for _, n := range []int{1, 3, 4, 8} {
		x, w := rrkm.JQuadrature(n)
		fact := 1.0
		for k := 0; k < 2*n; k++ {
			if k > 0 {
				fact *= float64(k)
			}
			s := 0.0
			for q := range x {
				s += w[q] * math.Pow(x[q], float64(k))
			}
			if math.Abs(s/fact-1) > 1e-10 {
				t.Errorf("n = %d: Σ w x^%d = %.12g, want %g", n, k, s, fact)
			}
		}
	}
}

// An adiabatic treatment the model cannot carry is refused at the field:
// Eckart tunnelling, and a transition state without external rotation.
func TestAdiabaticRefused(t *testing.T) {
	m, err := input.ReadFile("../../testdata/ch3nc-channels.yaml")
	if err != nil {
		t.Fatal(err)
	}
	m.Reaction.Rotation = input.AdiabaticJ
	if _, err := New(m); err == nil || !containsAll(err.Error(), "reaction.rotation", "Eckart") {
		t.Errorf("Eckart with adiabatic J: %v", err)
	}
	m, _ = input.ReadFile("../../testdata/ch3nc-validation.yaml")
	m.Reaction.Rotation = input.AdiabaticJ
	m.Molecule("TS").Rotors = nil
	if _, err := New(m); err == nil || !containsAll(err.Error(), "reaction.rotation", "external rotation") {
		t.Errorf("TS without rotation: %v", err)
	}
}

func containsAll(s string, subs ...string) bool {
	for _, x := range subs {
		if !contains(s, x) {
			return false
		}
	}
	return true
}

func contains(s, sub string) bool {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return true
		}
	}
	return false
}

// BenchmarkRotation times the master equation on the benchmark grid,
// 30 temperatures (300–2500 K, even in 1/T) × 20 pressures (1e-3–1e3 bar),
// exponential-down (α300 = 250 cm⁻¹, n = 0.85), for the CH3NC validation
// molecules with every rotation active (the reference) and with adiabatic
// J, resolved and averaged; it reports each treatment's time over the
// reference's (target for adiabatic-j: ≤ 3).
func BenchmarkRotation(b *testing.B) {
	m, err := input.ReadFile("../../testdata/ch3nc-validation.yaml")
	if err != nil {
		b.Fatal(err)
	}
	m.Fits = nil
	m.Transfer = input.EnergyTransfer{Model: input.ExponentialDown, Alpha300: 250, AlphaExponent: 0.85}
	m.Temperatures = make([]float64, 30)
	for i := range m.Temperatures {
		m.Temperatures[i] = 1 / (1/300.0 + (1/2500.0-1/300.0)*float64(i)/29)
	}
	m.Pressures = make([]float64, 20)
	for i := range m.Pressures {
		m.Pressures[i] = 1e2 * math.Pow(10, 6*float64(i)/19)
	}
	run := func(rot input.Rotation) time.Duration {
		m.Reaction.Rotation = rot
		n, err := New(m)
		if err != nil {
			b.Fatal(err)
		}
		start := time.Now()
		if _, err := n.Rates(context.Background(), Options{SkipCheck: true, SkipHeldOut: true}); err != nil {
			b.Fatal(err)
		}
		return time.Since(start)
	}
	var active, resolved, averaged time.Duration
	for b.Loop() {
		active += run(input.AllActive)
		resolved += run(input.AdiabaticJ)
		averaged += run(input.AdiabaticJAveraged)
	}
	b.ReportMetric(float64(resolved)/float64(active), "adiabatic-j/all-active")
	b.ReportMetric(float64(averaged)/float64(active), "j-averaged/all-active")
}

// The J-resolved densities add up to the whole density: Σ_J (2J+1)·
// ρ_act(E − B̄J(J+1)) over every J is ρ_act convolved with the J rotor's
// levels, which for B̄ ≪ the energy scale of ρ_act is the all-active
// density ρ(E) with the classical 2D rotor (density 1/B̄) — the
// convolution behind the split (Holbrook, Pilling & Robertson 1996, §4.6).
// Checked for CH3NC at 10 000–30 000 cm⁻¹ on 10 cm⁻¹ grains, within 1 %
// (the discrete J sum against the classical rotor: ≈ B̄/(3·E/s), common
// practice, no source).
func TestStatesJSumToWholeDensity(t *testing.T) {
	m, err := input.ReadFile("../../testdata/ch3nc-validation.yaml")
	if err != nil {
		t.Fatal(err)
	}
	n, err := New(m)
	if err != nil {
		t.Fatal(err)
	}
	cs, err := n.Count(ReportGrid{Grain: Setting{Cm1: 10, Option: "--grain", Text: "10 cm-1"}, Ceiling: Setting{Cm1: 31000, Option: "--ceiling", Text: "31000 cm-1"}})
	if err != nil {
		t.Fatal(err)
	}
	res, err := cs.StatesJ()
	if err != nil {
		t.Fatal(err)
	}
	st := res[0]
	full, err := cs.States()
	if err != nil {
		t.Fatal(err)
	}
	whole := full.Species[0].Density
	g := st.Grain
	for i, e := range st.Energies {
		if e < 10000 || e > 30000 || i%100 != 0 {
			continue
		}
		sum := 0.0
		for j := 0; ; j++ {
			erot := st.B * float64(j*(j+1))
			if erot > e {
				break
			}
			// ρ_act at e − erot by linear interpolation between grains.
			x := (e - erot) / g
			k := int(x)
			f := x - float64(k)
			rho := st.ActiveDensity[k]*(1-f) + st.ActiveDensity[min(k+1, len(st.ActiveDensity)-1)]*f
			sum += float64(2*j+1) * rho
		}
		if math.Abs(sum/whole[i]-1) > 0.01 {
			t.Errorf("E = %g cm-1: Σ_J ρ(E,J) = %.6g, all-active ρ = %.6g", e, sum, whole[i])
		}
	}
}
