package fit

import (
	"encoding/json"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Units inside this package: T in K, P in Pa, concentrations in molecules
// cm⁻³, activation energies as activation temperatures Ta = Ea/R in K.
// Rate constants are in whatever units the table has ("k units"); a
// low-pressure rate constant k0 is in k units × cm³ molecule⁻¹.

// Concentration returns the gas number density [M] = P/(k_B·T) in molecules
// cm⁻³ for P in Pa.
func Concentration(p, t float64) float64 { return p / (units.Boltzmann * t) * 1e-6 }

// Arrhenius is the modified Arrhenius form k = A·T^N·exp(−Ta/T).
type Arrhenius struct {
	A  float64 `json:"A"`    // k units · K^−N
	N  float64 `json:"n"`    // temperature exponent
	Ta float64 `json:"Ea_K"` // Ea/R in K
}

// Eval returns k at t K.
func (a Arrhenius) Eval(t float64) float64 { return a.A * math.Pow(t, a.N) * math.Exp(-a.Ta/t) }

// Troe holds the broadening parameters of Gilbert, Luther & Troe (Ber.
// Bunsenges. Phys. Chem. 87, 169, 1983): Fcent = (1−A)exp(−T/T3) +
// A·exp(−T/T1) + exp(−T2/T), the last term only if HasT2.
type Troe struct {
	A, T3, T1, T2 float64 // T3 = T***, T1 = T*, T2 = T** in K
	HasT2         bool
}

// troeJSON is the JSON form of Troe: T2_K is present only with HasT2.
type troeJSON struct {
	A  float64  `json:"A"`
	T3 float64  `json:"T3_K"`
	T1 float64  `json:"T1_K"`
	T2 *float64 `json:"T2_K,omitempty"`
}

// MarshalJSON writes {"A", "T3_K", "T1_K"} and "T2_K" only if HasT2.
func (tr Troe) MarshalJSON() ([]byte, error) {
	j := troeJSON{A: tr.A, T3: tr.T3, T1: tr.T1}
	if tr.HasT2 {
		t2 := tr.T2
		j.T2 = &t2
	}
	return json.Marshal(j)
}

// UnmarshalJSON reads the form written by MarshalJSON; HasT2 is set when
// "T2_K" is present.
func (tr *Troe) UnmarshalJSON(b []byte) error {
	var j troeJSON
	if err := json.Unmarshal(b, &j); err != nil {
		return err
	}
	*tr = Troe{A: j.A, T3: j.T3, T1: j.T1}
	if j.T2 != nil {
		tr.T2, tr.HasT2 = *j.T2, true
	}
	return nil
}

// Fcent returns the centre broadening factor at t K.
func (tr Troe) Fcent(t float64) float64 {
	f := (1-tr.A)*math.Exp(-t/tr.T3) + tr.A*math.Exp(-t/tr.T1)
	if tr.HasT2 {
		f += math.Exp(-tr.T2 / t)
	}
	return f
}

// F returns the broadening factor F(T, Pr) (Gilbert, Luther & Troe 1983):
// log F = log Fcent / (1 + ((log Pr + c)/(N − d(log Pr + c)))²) with
// c = −0.4 − 0.67 log Fcent, N = 0.75 − 1.27 log Fcent, d = 0.14.
func (tr Troe) F(t, pr float64) float64 {
	lf := math.Log10(tr.Fcent(t))
	c := -0.4 - 0.67*lf
	n := 0.75 - 1.27*lf
	x := math.Log10(pr) + c
	y := x / (n - 0.14*x)
	return math.Pow(10, lf/(1+y*y))
}

// SRI holds the parameters of the SRI broadening factor (Stewart, Larson &
// Golden, Combust. Flame 75, 25, 1989): F = D·(A·exp(−B/T) + exp(−T/C))^X·T^E,
// X = 1/(1 + (log Pr)²). D = 1 and E = 0 in the three-parameter form.
type SRI struct {
	A float64 `json:"a"`
	B float64 `json:"b_K"` // K
	C float64 `json:"c_K"` // K
	D float64 `json:"d,omitempty"`
	E float64 `json:"e,omitempty"`
}

// F returns the broadening factor at t K and reduced pressure pr.
func (s SRI) F(t, pr float64) float64 {
	lp := math.Log10(pr)
	x := 1 / (1 + lp*lp)
	d := s.D
	if d == 0 {
		d = 1
	}
	return d * math.Pow(s.A*math.Exp(-s.B/t)+math.Exp(-t/s.C), x) * math.Pow(t, s.E)
}

// Falloff is a Lindemann (no broadening), Troe or SRI falloff form:
// k = k∞·Pr/(1+Pr)·F with Pr = k0[M]/k∞.
type Falloff struct {
	Low  Arrhenius `json:"low"`            // k0, k units × cm³ molecule⁻¹
	High Arrhenius `json:"high"`           // k∞, k units
	Troe *Troe     `json:"troe,omitempty"` // nil unless Troe
	SRI  *SRI      `json:"sri,omitempty"`  // nil unless SRI
}

// Kind names the form: "lindemann", "troe" or "sri".
func (f Falloff) Kind() string {
	switch {
	case f.Troe != nil:
		return "troe"
	case f.SRI != nil:
		return "sri"
	}
	return "lindemann"
}

// Eval returns k at t K and p Pa.
func (f Falloff) Eval(t, p float64) float64 {
	kinf := f.High.Eval(t)
	pr := f.Low.Eval(t) * Concentration(p, t) / kinf
	k := kinf * pr / (1 + pr)
	switch {
	case f.Troe != nil:
		k *= f.Troe.F(t, pr)
	case f.SRI != nil:
		k *= f.SRI.F(t, pr)
	}
	return k
}

// PlogEntry is one pressure of a PLOG form: the sum of its Arrhenius terms.
type PlogEntry struct {
	P     float64     `json:"P_Pa"`
	Terms []Arrhenius `json:"terms"`
}

// PLOG is k(T) tabulated against pressure, interpolated linearly in log k
// against log P and held at the end values outside the table (the
// convention of Cantera's pressure-dependent-Arrhenius reactions).
type PLOG struct {
	Entries []PlogEntry `json:"entries"` // ascending P
}

func (e PlogEntry) eval(t float64) float64 {
	s := 0.0
	for _, a := range e.Terms {
		s += a.Eval(t)
	}
	return s
}

// Eval returns k at t K and p Pa.
func (pl PLOG) Eval(t, p float64) float64 {
	es := pl.Entries
	if len(es) == 0 {
		return math.NaN()
	}
	if p <= es[0].P {
		return es[0].eval(t)
	}
	for i := 1; i < len(es); i++ {
		if p <= es[i].P {
			lo, hi := math.Log(es[i-1].eval(t)), math.Log(es[i].eval(t))
			x := (math.Log(p) - math.Log(es[i-1].P)) / (math.Log(es[i].P) - math.Log(es[i-1].P))
			return math.Exp(lo + x*(hi-lo))
		}
	}
	return es[len(es)-1].eval(t)
}

// Chebyshev is log10 k = Σ_t Σ_p Coef[t][p]·φ_t(T̃)·φ_p(P̃) with Chebyshev
// polynomials φ of the first kind, T̃ = (2/T − 1/Tmin − 1/Tmax)/(1/Tmax −
// 1/Tmin) and P̃ = (2 log P − log Pmin − log Pmax)/(log Pmax − log Pmin)
// (the convention of Cantera's Chebyshev reactions: rows are the
// temperature index). Coefficients are for k in the table's units.
type Chebyshev struct {
	Tmin float64     `json:"T_min_K"`
	Tmax float64     `json:"T_max_K"`
	Pmin float64     `json:"P_min_Pa"`
	Pmax float64     `json:"P_max_Pa"`
	Coef [][]float64 `json:"coef_log10k"` // [N_T][N_P], log10 of k in k units
}

// reduced returns T̃ and P̃; a range of one value (Tmin = Tmax or Pmin =
// Pmax, a form with one coefficient in that variable) reduces to 0.
func (c Chebyshev) reduced(t, p float64) (float64, float64) {
	tr, pr := 0.0, 0.0
	if c.Tmax != c.Tmin {
		tr = (2/t - 1/c.Tmin - 1/c.Tmax) / (1/c.Tmax - 1/c.Tmin)
	}
	if c.Pmax != c.Pmin {
		lp, l0, l1 := math.Log10(p), math.Log10(c.Pmin), math.Log10(c.Pmax)
		pr = (2*lp - l0 - l1) / (l1 - l0)
	}
	return tr, pr
}

// chebyshevT returns T_0(x)..T_{n−1}(x) into out.
func chebyshevT(x float64, out []float64) {
	for i := range out {
		switch i {
		case 0:
			out[i] = 1
		case 1:
			out[i] = x
		default:
			out[i] = 2*x*out[i-1] - out[i-2]
		}
	}
}

// Eval returns k at t K and p Pa.
func (c Chebyshev) Eval(t, p float64) float64 {
	tr, pr := c.reduced(t, p)
	nT := len(c.Coef)
	if nT == 0 {
		return math.NaN()
	}
	nP := len(c.Coef[0])
	ft, fp := make([]float64, nT), make([]float64, nP)
	chebyshevT(tr, ft)
	chebyshevT(pr, fp)
	s := 0.0
	for i := range nT {
		for j := range nP {
			s += c.Coef[i][j] * ft[i] * fp[j]
		}
	}
	return math.Pow(10, s)
}
