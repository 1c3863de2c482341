package thermo

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// NASA7 is a pair of NASA 7-coefficient polynomials (McBride, Zehe &
// Gordon, NASA/TP-2002-211556, 2002; the two-range form of the keyword
// thermo block and of Cantera's NASA7 model): Low holds a1…a7 for
// [TLow, TMid], High for [TMid, THigh], in units of R and K with H
// absolute (H°(298.15 K) = ΔfH°(298.15 K)).
type NASA7 struct {
	TLow  float64    `json:"T_low_K"`
	TMid  float64    `json:"T_mid_K"`
	THigh float64    `json:"T_high_K"`
	Low   [7]float64 `json:"low"`
	High  [7]float64 `json:"high"`
}

// coeffs returns the polynomial of the range that holds tK; the midpoint
// belongs to the low range, as in Cantera and the keyword format.
func (p *NASA7) coeffs(tK float64) *[7]float64 {
	if tK <= p.TMid {
		return &p.Low
	}
	return &p.High
}

// CpR returns Cp°/R at tK.
func (p *NASA7) CpR(tK float64) float64 { return cpR(p.coeffs(tK), tK) }

// HRT returns H°/(R·T) at tK, H° absolute (with ΔfH°(298.15 K)).
func (p *NASA7) HRT(tK float64) float64 { return hRT(p.coeffs(tK), tK) }

// SR returns S°/R at tK.
func (p *NASA7) SR(tK float64) float64 { return sR(p.coeffs(tK), tK) }

// GRT returns G°/(R·T) = H°/RT − S°/R at tK.
func (p *NASA7) GRT(tK float64) float64 { return p.HRT(tK) - p.SR(tK) }

func cpR(a *[7]float64, t float64) float64 {
	return a[0] + t*(a[1]+t*(a[2]+t*(a[3]+t*a[4])))
}

func hRT(a *[7]float64, t float64) float64 {
	return a[0] + t*(a[1]/2+t*(a[2]/3+t*(a[3]/4+t*a[4]/5))) + a[5]/t
}

func sR(a *[7]float64, t float64) float64 {
	return a[0]*math.Log(t) + t*(a[1]+t*(a[2]/2+t*(a[3]/3+t*a[4]/4))) + a[6]
}

// dCpR returns d(Cp/R)/dT of one range at t, in K⁻¹.
func dCpR(a *[7]float64, t float64) float64 {
	return a[1] + t*(2*a[2]+t*(3*a[3]+t*4*a[4]))
}

// Check reports a polynomial pair that a mechanism file cannot carry: a
// range that is not TLow < TMid < THigh, or a coefficient that is not a
// finite number.
func (p *NASA7) Check() error {
	if !(p.TLow > 0 && p.TLow < p.TMid && p.TMid < p.THigh) || math.IsInf(p.THigh, 0) {
		return fmt.Errorf("thermo: NASA7 temperature ranges %v, %v, %v K: need 0 < Tlow < Tmid < Thigh", p.TLow, p.TMid, p.THigh)
	}
	for i := range 7 {
		for _, x := range []float64{p.Low[i], p.High[i]} {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return fmt.Errorf("thermo: NASA7 coefficient a%d = %v is not a finite number", i+1, x)
			}
		}
	}
	return nil
}

// EquilibriumConstant returns K_c(T) of reactants ⇌ products from NASA
// polynomials, in (molecules cm⁻³)^Δn with Δn = len(products) −
// len(reactants), the units of rrkm.EquilibriumConstant:
// K_p = exp(−ΔG°/RT) at p° = 1 bar and K_c = K_p·(p°/k_BT)^Δn.
func EquilibriumConstant(reactants, products []*NASA7, tK float64) float64 {
	lk := 0.0
	for _, p := range reactants {
		lk += p.GRT(tK)
	}
	for _, p := range products {
		lk -= p.GRT(tK)
	}
	dn := float64(len(products) - len(reactants))
	perCm3 := StandardPressure / (units.Boltzmann * tK) * 1e-6 // p°/k_BT in cm⁻³
	return math.Exp(lk + dn*math.Log(perCm3))
}
