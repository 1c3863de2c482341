package rrkm

import "math"

// WhittenRabinovitch returns the Whitten–Rabinovitch approximations to the
// harmonic sum of states W(E) and density ρ(E) (per cm⁻¹) of the oscillators
// freqs (cm⁻¹) at energy e cm⁻¹ (Whitten & Rabinovitch, J. Chem. Phys. 38,
// 2466, 1963; also Holbrook, Pilling & Robertson 1996, §4.5):
//
//	W(E) = (E + a·E_z)^s / (s!·Πν),  a = 1 − β·ω(E'),  E' = E/E_z,
//	β = ((s−1)/s)·⟨ν²⟩/⟨ν⟩²,
//	ω = (5E' + 2.73·E'^½ + 3.51)⁻¹ for E' < 1,  exp(−2.4191·E'^¼) for E' ≥ 1,
//
// with E_z the zero-point energy, and ρ = dW/dE (which carries the factor
// 1 − β·dω/dE'). Valid for E' ≳ 0.1; it is an independent check on the direct
// count and the density Troe's low-pressure formulas use.
func WhittenRabinovitch(freqs []float64, e float64) (sum, density float64) {
	s := float64(len(freqs))
	if s == 0 {
		return 1, 0
	}
	var ez, m1, m2, logProd float64
	for _, v := range freqs {
		ez += v / 2
		m1 += v
		m2 += v * v
		logProd += math.Log(v)
	}
	m1 /= s
	m2 /= s
	beta := (s - 1) / s * m2 / (m1 * m1)
	x := e / ez
	var w, dw float64 // ω and dω/dE'
	if x < 1 {
		d := 5*x + 2.73*math.Sqrt(x) + 3.51
		w = 1 / d
		dw = -(5 + 1.365/math.Sqrt(x)) / (d * d)
	} else {
		q := math.Pow(x, 0.25)
		w = math.Exp(-2.4191 * q)
		dw = -2.4191 * 0.25 / (q * q * q) * w
	}
	u := e + (1-beta*w)*ez
	lg, _ := math.Lgamma(s + 1)
	sum = math.Exp(s*math.Log(u) - lg - logProd)
	density = sum * s / u * (1 - beta*dw)
	return sum, density
}
