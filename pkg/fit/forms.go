package fit

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Units inside this package: T in K, P in Pa, concentrations in molecules
// cm⁻³, activation energies as activation temperatures Ta = Ea/R in K.
// Rate constants are in whatever units the table has ("k units"); a
// low-pressure rate constant k0 is in k units × cm³ molecule⁻¹.

// FormName names a fitted form, as written in reports, JSON results and
// input files.
type FormName string

// The forms this package fits.
const (
	FormArrhenius FormName = "arrhenius" // pressure-independent modified Arrhenius
	FormLindemann FormName = "lindemann" // falloff without broadening
	FormTroe      FormName = "troe"      // falloff with Troe broadening
	FormSRI       FormName = "sri"       // falloff with SRI broadening
	FormPLOG      FormName = "plog"      // log k interpolated in log P
	FormChebyshev FormName = "chebyshev" // Chebyshev series in 1/T and log P
)

// ParseFormName returns the form named s, one of Forms, or an error naming
// the known forms.
func ParseFormName(s string) (FormName, error) {
	if f := FormName(s); slices.Contains(Forms, f) {
		return f, nil
	}
	known := make([]string, len(Forms))
	for i, f := range Forms {
		known[i] = string(f)
	}
	return "", fmt.Errorf("fit: unknown form %q (known: %s)", s, strings.Join(known, ", "))
}

// Form is a fitted k(T,P) expression. *Arrhenius, *Falloff, *PLOG and
// *Chebyshev implement it; Name, NParams and Describe have pointer
// receivers so that a Form always holds one of those pointers, the types
// pkg/export writes.
type Form interface {
	// Eval returns k at tK K and pPa Pa in the table's units.
	Eval(tK, pPa float64) float64
	// Name says which form it is.
	Name() FormName
	// NParams returns the number of fitted parameters, as in Report.NParams.
	NParams() int
	// Describe returns the parameters on one line, for reports: numbers to
	// 4 significant digits, Ea as Ea/R in K, pressures in bar.
	Describe() string
	// DescribeIn is Describe with activation energies and pressures in
	// the units u.
	DescribeIn(u ReportUnits) string
}

// ReportUnits choose the units of DescribeIn. The zero value is Describe's:
// Ea as Ea/R in K, pressures in bar.
type ReportUnits struct {
	Energy     string  // activation-energy unit, e.g. "kcal/mol"; "" means Ea/R in K
	EnergyPerK float64 // Ea in Energy of Ea/R = 1 K (R in that unit)
	Pressure   string  // pressure unit; "" means bar
	PaPerUnit  float64 // Pa in one Pressure unit
}

// ea writes an activation temperature ta (K) in u's energy unit.
func (u ReportUnits) ea(ta float64) string {
	if u.Energy == "" || u.Energy == "K" || !(u.EnergyPerK > 0) {
		return "Ea/R=" + g4(ta) + " K"
	}
	return "Ea=" + g4(ta*u.EnergyPerK) + " " + u.Energy
}

// p writes a pressure in Pa in u's pressure unit.
func (u ReportUnits) p(pa float64) string {
	if u.Pressure == "" || !(u.PaPerUnit > 0) {
		return g4(pa/units.BarPa) + " bar"
	}
	return g4(pa/u.PaPerUnit) + " " + u.Pressure
}

var (
	_ Form = (*Arrhenius)(nil)
	_ Form = (*Falloff)(nil)
	_ Form = (*PLOG)(nil)
	_ Form = (*Chebyshev)(nil)
)

// g4 formats x to 4 significant digits, as Describe writes numbers.
func g4(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// Concentration returns the gas number density [M] = P/(k_B·T) in molecules
// cm⁻³ for P in Pa.
func Concentration(p, t float64) float64 { return p / (units.Boltzmann * t) * 1e-6 }

// Arrhenius is the modified Arrhenius form k = A·T^N·exp(−Ta/T).
type Arrhenius struct {
	A  float64 `json:"A"`    // k units · K^−N
	N  float64 `json:"n"`    // temperature exponent
	Ta float64 `json:"Ea_K"` // Ea/R in K
}

// At returns k at t K.
func (a Arrhenius) At(t float64) float64 { return a.A * math.Pow(t, a.N) * math.Exp(-a.Ta/t) }

// Eval returns k at t K; it does not depend on the pressure.
func (a Arrhenius) Eval(t, _ float64) float64 { return a.At(t) }

// Name returns FormArrhenius.
func (a *Arrhenius) Name() FormName { return FormArrhenius }

// NParams returns 3, or 2 for n = 0: the two-parameter form FitArrhenius
// fits to two temperatures.
func (a *Arrhenius) NParams() int {
	if a.N == 0 {
		return 2
	}
	return 3
}

// Describe returns "A=… n=… Ea/R=… K".
func (a *Arrhenius) Describe() string { return a.DescribeIn(ReportUnits{}) }

// DescribeIn returns "A=… n=… Ea=… UNIT" (or Ea/R in K).
func (a *Arrhenius) DescribeIn(u ReportUnits) string {
	return fmt.Sprintf("A=%s n=%s %s", g4(a.A), g4(a.N), u.ea(a.Ta))
}

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

// Kind names the form: "lindemann", "troe" or "sri" (Name as a string).
func (f Falloff) Kind() string { return string(f.Name()) }

// Name returns FormLindemann, FormTroe or FormSRI.
func (f *Falloff) Name() FormName {
	switch {
	case f.Troe != nil:
		return FormTroe
	case f.SRI != nil:
		return FormSRI
	}
	return FormLindemann
}

// NParams returns 6 (k0 and k∞) plus the broadening parameters: 1 for a
// constant Fcent (Troe with T3 ≤ 1e-20 K, T1 ≥ 1e20 K, no T2: only A is
// fitted), 3 for Troe, 4 with T2; 3 for SRI, 5 with d and e (d ≠ 0).
func (f *Falloff) NParams() int {
	n := 6
	if constantFcent(f.Troe) {
		return n + 1
	}
	if f.Troe != nil {
		n += 3
		if f.Troe.HasT2 {
			n++
		}
	}
	if f.SRI != nil {
		n += 3
		if f.SRI.D != 0 {
			n += 2
		}
	}
	return n
}

// Describe returns k∞ and k0 ("high: …; low: …") and the broadening,
// with its kind in words ("(constant Fcent = 0.5)", "(three-parameter
// Troe)", …).
func (f *Falloff) Describe() string { return f.DescribeIn(ReportUnits{}) }

// DescribeIn is Describe with Ea in u's unit.
func (f *Falloff) DescribeIn(u ReportUnits) string {
	s := "high: " + f.High.DescribeIn(u) + "; low: " + f.Low.DescribeIn(u)
	if t := f.Troe; t != nil {
		s += fmt.Sprintf("; Troe a=%s T3=%s T1=%s", g4(t.A), g4(t.T3), g4(t.T1))
		if t.HasT2 {
			s += " T2=" + g4(t.T2)
		}
	}
	if r := f.SRI; r != nil {
		s += fmt.Sprintf("; SRI a=%s b=%s c=%s", g4(r.A), g4(r.B), g4(r.C))
		if r.D != 0 {
			s += fmt.Sprintf(" d=%s e=%s", g4(r.D), g4(r.E))
		}
	}
	if f.Troe != nil || f.SRI != nil {
		s += " (" + broadeningWords(f) + ")"
	}
	return s
}

// Eval returns k at t K and p Pa.
func (f Falloff) Eval(t, p float64) float64 {
	kinf := f.High.At(t)
	pr := f.Low.At(t) * Concentration(p, t) / kinf
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
		s += a.At(t)
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

// Name returns FormPLOG.
func (pl *PLOG) Name() FormName { return FormPLOG }

// NParams returns 3 per Arrhenius term.
func (pl *PLOG) NParams() int { return 3 * pl.nTerms() }

func (pl *PLOG) nTerms() int {
	n := 0
	for _, e := range pl.Entries {
		n += len(e.Terms)
	}
	return n
}

// Describe returns the numbers of pressures and of Arrhenius terms.
func (pl *PLOG) Describe() string { return pl.DescribeIn(ReportUnits{}) }

// DescribeIn is Describe, with the range of pressures in u's unit.
func (pl *PLOG) DescribeIn(u ReportUnits) string {
	s := fmt.Sprintf("%d pressures, %d Arrhenius terms", len(pl.Entries), pl.nTerms())
	if n := len(pl.Entries); n > 0 && u.Pressure != "" {
		s += " over " + u.p(pl.Entries[0].P) + " to " + u.p(pl.Entries[n-1].P)
	}
	return s
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
	return c.evalReduced(tr, pr)
}

// evalReduced returns k at the reduced coordinates (tr, pr) (reduced).
func (c Chebyshev) evalReduced(tr, pr float64) float64 {
	nT := len(c.Coef)
	if nT == 0 {
		return math.NaN()
	}
	nP := len(c.Coef[0])
	var bt, bp [24]float64 // no allocation for the usual orders
	ft, fp := bt[:0], bp[:0]
	if nT <= len(bt) && nP <= len(bp) {
		ft, fp = bt[:nT], bp[:nP]
	} else {
		ft, fp = make([]float64, nT), make([]float64, nP)
	}
	chebyshevT(tr, ft)
	chebyshevT(pr, fp)
	// Σ_i T_i(tr)·(Σ_j c_ij·T_j(pr)): the rows' sums are independent, so
	// the processor overlaps them. 10^s as e^(s·ln 10) (half the cost of
	// math.Pow; the two differ by a few units in the last place).
	s := 0.0
	for i := range nT {
		row := c.Coef[i][:nP]
		r := 0.0
		for j, v := range row {
			r += v * fp[j]
		}
		s += ft[i] * r
	}
	return math.Exp(s * math.Ln10)
}

// Name returns FormChebyshev.
func (c *Chebyshev) Name() FormName { return FormChebyshev }

// NParams returns the number of coefficients, N_T·N_P.
func (c *Chebyshev) NParams() int {
	nT, nP := c.order()
	return nT * nP
}

// order returns N_T and N_P.
func (c *Chebyshev) order() (nT, nP int) {
	if len(c.Coef) == 0 {
		return 0, 0
	}
	return len(c.Coef), len(c.Coef[0])
}

// Describe returns the order and the range in T and P (bar).
func (c *Chebyshev) Describe() string { return c.DescribeIn(ReportUnits{}) }

// DescribeIn is Describe with the pressure range in u's unit.
func (c *Chebyshev) DescribeIn(u ReportUnits) string {
	nT, nP := c.order()
	return fmt.Sprintf("%d x %d coefficients over %s-%s K, %s to %s", nT, nP,
		g4(c.Tmin), g4(c.Tmax), u.p(c.Pmin), u.p(c.Pmax))
}
