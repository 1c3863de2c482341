package job

import (
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// Caution goes with every report of rate coefficients.
const Caution = "Caution: computed rate coefficients are model estimates; validate them against experiment " +
	"before using them in safety, hazard or design decisions, which remain subject to local codes and qualified review."

// ReportGrid overrides the file's reporting grid (energy-grid.grain and
// energy-grid.ceiling) for States and Micro.
type ReportGrid struct {
	Grain, Ceiling Setting
}

// maxReportGrains bounds the grains of a States or Micro report: each
// costs a state sum with the rotor convolution, and a million grains took
// minutes (states --ceiling "1e7 cm-1").
const maxReportGrains = 100_000

// minReportGrains is the fewest grains between the threshold and the
// ceiling that States and Micro accept.
const minReportGrains = 10

// counted is the main channel's reactant and transition state with their
// state counts on the reporting grains.
type counted struct {
	name         string
	channel      Channel // the main channel
	reactant, ts *input.Molecule
	l            float64
	grains       rrkm.Grains
	rc, tc       *rrkm.Counter
}

// reportGrid returns the grain and ceiling in cm⁻¹ of the States and
// Micro reports with opt over the file's energy-grid.grain and .ceiling
// (the ceiling AutoCeiling at the highest temperature unless given), or
// the error that refuses them. New applies it with the file's settings.
func (n *Network) reportGrid(opt ReportGrid) (grain, ceiling float64, err error) {
	m := n.Model
	main := n.Main()
	fine := m.EnergyGrid.Fine
	grain, ceiling = opt.Grain.or(m.EnergyGrid.Grain), opt.Ceiling.or(m.EnergyGrid.Ceiling)
	if !(grain > 0) {
		return 0, 0, opt.Grain.optionError("", "the grain must be positive")
	}
	if grain < fine {
		return 0, 0, opt.Grain.optionError("", "below the fine counting grain %g cm-1", fine)
	}
	if ceiling == 0 {
		ts := m.Temperatures
		ceiling = n.AutoCeiling(ts[len(ts)-1])
	}
	if ceiling <= main.E0+grain {
		err := fmt.Errorf("ceiling %g cm-1 is not above the threshold %g cm-1 by a grain", ceiling, main.E0)
		switch {
		case opt.Ceiling.given():
			return 0, 0, &OptionError{Option: opt.Ceiling.Option, Text: opt.Ceiling.Text, Err: err}
		case opt.Grain.given():
			return 0, 0, &OptionError{Option: opt.Grain.Option, Text: opt.Grain.Text, Err: err}
		}
		return 0, 0, m.FieldError("energy-grid.ceiling", err, "raise the ceiling, or delete it to have it chosen automatically")
	}
	// A grain so coarse that few grains lie above E0 says nothing of k(E),
	// and its top grain would reach beyond the transition state's count.
	if most := (ceiling - main.E0) / minReportGrains; grain > most {
		hint := fmt.Sprintf("a grain of at most %s cm-1", num(most))
		err := fmt.Errorf("too coarse: fewer than %d grains between E0 = %s cm-1 and the ceiling %s cm-1", minReportGrains, num(main.E0), num(ceiling))
		if opt.Grain.given() {
			return 0, 0, &OptionError{Option: opt.Grain.Option, Text: opt.Grain.Text, Err: err, Hint: hint}
		}
		return 0, 0, m.FieldError("energy-grid.grain", err, hint)
	}
	if grains := ceiling / grain; grains > maxReportGrains {
		hint := fmt.Sprintf("a grain of at least %s cm-1, or a lower ceiling", num(roundUp(ceiling/maxReportGrains, 2)))
		err := fmt.Errorf("the report would have %s grains up to %s cm-1; the limit is %g", num(grains), num(ceiling), float64(maxReportGrains))
		switch {
		case opt.Ceiling.given():
			return 0, 0, &OptionError{Option: opt.Ceiling.Option, Text: opt.Ceiling.Text, Err: err, Hint: hint}
		case opt.Grain.given():
			return 0, 0, &OptionError{Option: opt.Grain.Option, Text: opt.Grain.Text, Err: err, Hint: hint}
		case m.EnergyGrid.Ceiling > 0:
			return 0, 0, m.FieldError("energy-grid.ceiling", err, hint)
		}
		return 0, 0, m.FieldError("energy-grid.grain", err, hint)
	}
	if bins := fineBins(fine, ceiling); opt.Ceiling.given() && bins > rrkm.MaxFineBins {
		limit := float64(rrkm.MaxFineBins)
		return 0, 0, opt.Ceiling.optionError(fmt.Sprintf("a ceiling of at most %s cm-1", num(math.Floor((limit-2)*fine))),
			"the state count would need %s bins of %s cm-1, %s of memory; the limit is %s",
			num(bins), num(fine), byteSize(bins*bytesPerEntry), byteSize(limit*bytesPerEntry))
	}
	return grain, ceiling, nil
}

// countMain counts the states of the reactant and the main channel's
// transition state up to the reporting ceiling (reportGrid).
func (n *Network) countMain(opt ReportGrid) (*counted, error) {
	m := n.Model
	main := n.Main()
	if main.TS == nil {
		return nil, n.errBarrierless()
	}
	fine := m.EnergyGrid.Fine
	grain, ceiling, err := n.reportGrid(opt)
	if err != nil {
		return nil, err
	}
	r := n.reactant()
	c := &counted{name: r.Name + " -> " + main.TS.Name, channel: main, reactant: r, ts: main.TS, l: main.L, grains: rrkm.GrainsTo(grain, ceiling)}
	top := c.grains.Top()
	if c.rc, err = rrkm.NewCounter(&r.Species, fine, top); err != nil {
		return nil, fmt.Errorf("%s: %w", m.File, err)
	}
	// With Eckart tunnelling the transition state's levels matter down to
	// the barrier's lower end (as in the master equation).
	tsTop := top - main.E0
	if e := main.Eckart(); e != nil {
		tsTop = top - e.Emin()
	}
	if c.tc, err = rrkm.NewCounter(&main.TS.Species, fine, math.Max(tsTop, fine)); err != nil {
		return nil, fmt.Errorf("%s: %w", m.File, err)
	}
	return c, nil
}

// PartitionFunction is one species' partition function at one temperature
// and its factors.
type PartitionFunction struct {
	T       float64 `json:"T_K"`
	Q       float64 `json:"Q"`
	Vib     float64 `json:"Q_vib"`
	Rot     float64 `json:"Q_rot"`
	El      float64 `json:"Q_el"`
	Hind    float64 `json:"Q_hindered"`
	Counted float64 `json:"Q_from_counts"` // the Boltzmann sum over the reported grains
}

// SpeciesStates are one species' partition functions, densities and sums
// of states on the reporting grains (energies from its own zero-point
// level).
type SpeciesStates struct {
	Name      string              `json:"name"`
	Q         []PartitionFunction `json:"partition_function"`
	Grain     float64             `json:"grid_cm-1"`
	Energies  []float64           `json:"energies_cm-1"`
	Density   []float64           `json:"density_per_cm-1"`
	SumStates []float64           `json:"sum_of_states"`
	// Log10Density and Log10SumStates are given instead of Density and
	// SumStates (then null) when some value lies beyond the floating-point
	// range (a molecule of 100 atoms or more at the energies of its thermal
	// distribution); an empty grain is then −1e308 (log10 of 0).
	Log10Density   []float64 `json:"log10_density_per_cm-1,omitempty"`
	Log10SumStates []float64 `json:"log10_sum_of_states,omitempty"`
}

// StatesResult is the result of States (the JSON of `falloff states`).
type StatesResult struct {
	File    string          `json:"file"`
	Note    string          `json:"note"`
	Species []SpeciesStates `json:"species"`
}

// statesNote says what the partition functions of States include.
const statesNote = "Q excludes external symmetry numbers and optical isomers (they enter through the path degeneracy); " +
	"energies are measured from each species' own zero-point level; Q_from_counts is the Boltzmann sum over the reported grains"

// Counts are the state counts of the reactant and the main channel's
// transition state on a reporting grid, from which States and Micro
// report.
type Counts struct {
	n *Network
	c *counted
}

// Count counts the states of the reactant and the main channel's
// transition state on the reporting grid.
func (n *Network) Count(opt ReportGrid) (*Counts, error) {
	c, err := n.countMain(opt)
	if err != nil {
		return nil, err
	}
	return &Counts{n, c}, nil
}

// States counts the states of the reactant and the main channel's
// transition state and returns their partition functions at the file's
// temperatures, with densities and sums of states on the reporting grains.
func (n *Network) States(opt ReportGrid) (*StatesResult, error) {
	cs, err := n.Count(opt)
	if err != nil {
		return nil, err
	}
	return cs.States()
}

// Micro returns the main channel's RRKM k(E), with Eckart tunnelling if the
// channel has it, and the TST check: canonical k∞(T), with the channel's
// tunnelling correction as in Rates, beside the thermal average of k(E) on
// the same grains, which must agree.
func (n *Network) Micro(opt ReportGrid) (*MicroResult, error) {
	cs, err := n.Count(opt)
	if err != nil {
		return nil, err
	}
	return cs.Micro()
}

// ReactantDensity returns the reactant's name and its density of states
// ρ(E) in states per cm⁻¹ on the reporting grains, at the grain energies
// in cm⁻¹.
func (cs *Counts) ReactantDensity() (name string, energies, density []float64) {
	g := cs.c.grains
	energies = make([]float64, g.N)
	for i := range energies {
		energies[i] = g.Energy(i)
	}
	return cs.c.reactant.Name, energies, cs.c.rc.Densities(g)
}

// States returns the partition functions of the counted species at the
// file's temperatures, with densities and sums of states on the reporting
// grains.
func (cs *Counts) States() (*StatesResult, error) {
	n, c := cs.n, cs.c
	tsGrains := rrkm.GrainsTo(c.grains.Width, c.tc.Ceiling())
	res := &StatesResult{File: n.Model.File, Note: statesNote}
	for _, x := range []struct {
		sp *rrkm.Species
		c  *rrkm.Counter
		g  rrkm.Grains
	}{{&c.reactant.Species, c.rc, c.grains}, {&c.ts.Species, c.tc, tsGrains}} {
		st, err := statesOf(x.sp, x.c, x.g, n.Model.Temperatures)
		if err != nil {
			return nil, err
		}
		res.Species = append(res.Species, st)
	}
	return res, nil
}

// statesOf reports one counted species on grains g.
func statesOf(sp *rrkm.Species, c *rrkm.Counter, g rrkm.Grains, temps []float64) (SpeciesStates, error) {
	out := SpeciesStates{Name: sp.Name, Grain: g.Width,
		Density: c.Densities(g), SumStates: c.SumsAt(g), Energies: make([]float64, g.N)}
	if !allFinite(out.Density) || !allFinite(out.SumStates) {
		out.Density, out.SumStates = nil, nil
		out.Log10Density, out.Log10SumStates = c.Log10Densities(g), c.Log10SumsAt(g)
		for _, xs := range [][]float64{out.Log10Density, out.Log10SumStates} {
			for i, x := range xs {
				if math.IsInf(x, -1) {
					xs[i] = -math.MaxFloat64 // JSON has no −Inf: an empty grain
				}
			}
		}
	}
	for i := range out.Energies {
		out.Energies[i] = g.Energy(i)
	}
	for _, t := range temps {
		// The Boltzmann sum over the counts in log space: the counts of a
		// large molecule pass float64 where Q does not.
		q := PartitionFunction{T: t, Q: sp.InternalQ(t), Vib: sp.VibrationalQ(t), Rot: sp.RotationalQ(t), El: sp.ElectronicQ(t), Hind: sp.HinderedQ(t),
			Counted: math.Exp(c.LogCountedQ(g, t))}
		if err := finite(sp.Name+" partition function", q.Q, q.Counted); err != nil {
			return out, err
		}
		out.Q = append(out.Q, q)
	}
	if err := finite(sp.Name+" density", append(out.Density, out.Log10Density...)...); err != nil {
		return out, err
	}
	return out, finite(sp.Name+" sum of states", append(out.SumStates, out.Log10SumStates...)...)
}

// MicroChannel is one channel's RRKM k(E) on the reporting grains, with
// canonical k∞(T) beside the Boltzmann average of k(E).
type MicroChannel struct {
	Name           string    `json:"name"`
	E0             float64   `json:"E0_cm-1"`
	L              float64   `json:"path_degeneracy"`
	Grain          float64   `json:"grid_cm-1"`
	Energies       []float64 `json:"energies_cm-1"`
	K              []float64 `json:"k_per_s"`
	Temperatures   []float64 `json:"temperatures_K"`
	KInf           []float64 `json:"k_inf"`
	KInfIntegrated []float64 `json:"k_inf_integrated"`
	// Tunnelling says how k(E), k_inf and k_inf_integrated include
	// tunnelling: "none"; "eckart" (k(E) through the Eckart barrier, also
	// below E0; k_inf = k∞·κ(T)); "wigner" (k(E) without it, since Wigner's
	// correction is thermal: k_inf and k_inf_integrated carry κ(T)).
	Tunnelling string `json:"tunnelling"`
	// Rotation is the treatment of the external rotation. With adiabatic
	// J the energies are the active energy (vibrations, K rotor, torsions),
	// K is k(E, J = 0), KJ[j] is k(E, J[j]) with its threshold E0J[j], and
	// k_inf_integrated averages over E and the thermal J distribution.
	Rotation string      `json:"external_rotation"`
	J        []int       `json:"J,omitempty"`
	E0J      []float64   `json:"E0_at_J_cm-1,omitempty"`
	KJ       [][]float64 `json:"k_at_J_per_s,omitempty"`
}

// MicroResult is the result of Micro (the JSON of `falloff micro`).
type MicroResult struct {
	File     string         `json:"file"`
	Note     string         `json:"note"`
	Caution  string         `json:"caution"`
	Channels []MicroChannel `json:"channels"`
}

// microNote says what Micro reports.
const microNote = "energies from the reactant zero-point level; k in s-1; k_inf is canonical TST, " +
	"k_inf_integrated the Boltzmann average of k(E) on the same grains"

// Micro returns the main channel's RRKM k(E) on the counted grains, with
// the TST check.
func (cs *Counts) Micro() (*MicroResult, error) {
	n, c := cs.n, cs.c
	if r := n.Model.Reaction.Rotation; r == input.AdiabaticJ || r == input.AdiabaticJAveraged {
		return cs.microAdiabatic()
	}
	mi := rrkm.RRKMTunnel(c.rc, c.tc, c.l, c.grains, c.channel.Eckart())
	temps := n.Model.Temperatures
	tunnel := c.channel.Tunnelling
	if tunnel == "" {
		tunnel = input.NoTunnelling
	}
	mc := MicroChannel{Name: c.name, E0: c.ts.E0, L: c.l, Grain: c.grains.Width,
		Energies: make([]float64, c.grains.N), K: mi.K, Temperatures: temps, Tunnelling: string(tunnel), Rotation: n.RotationNote()}
	for i := range mc.Energies {
		mc.Energies[i] = c.grains.Energy(i)
	}
	for _, t := range temps {
		kw := 1.0
		if tunnel == input.Wigner {
			kw = rrkm.Wigner(c.ts.Imaginary, t)
		}
		mc.KInf = append(mc.KInf, c.channel.KInf(&c.reactant.Species, t))
		mc.KInfIntegrated = append(mc.KInfIntegrated, mi.ThermalK(t)*kw)
	}
	for _, xs := range [][]float64{mc.K, mc.KInf, mc.KInfIntegrated} {
		if err := finite("k", xs...); err != nil {
			return nil, err
		}
	}
	return &MicroResult{File: n.Model.File, Note: microNote, Caution: Caution, Channels: []MicroChannel{mc}}, nil
}

// MicroJs returns the J at which Micro reports k(E, J) for the J rotor jr:
// 0 and 1, 2 and 3 times the most populated J at tK.
func MicroJs(jr rrkm.JRotor, tK float64) []int {
	if jr.B <= 0 {
		return []int{0}
	}
	peak := max(1, int(math.Round(math.Sqrt(units.KT(tK)/(2*jr.B)))))
	return []int{0, peak, 2 * peak, 3 * peak}
}

// microAdiabatic is Micro with adiabatic J: k(E, J) at a few J on the
// active energy, and the TST check averaged over E and J.
func (cs *Counts) microAdiabatic() (*MicroResult, error) {
	n, c := cs.n, cs.c
	m := n.Model
	temps := m.Temperatures
	ra, jr := rrkm.SplitExternalRotation(&c.reactant.Species)
	tsa, jts := rrkm.SplitExternalRotation(&c.ts.Species)
	top := c.grains.Top()
	rc, err := rrkm.NewCounter(ra, m.EnergyGrid.Fine, top)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", m.File, err)
	}
	tc, err := rrkm.NewCounter(tsa, m.EnergyGrid.Fine, math.Max(top-c.ts.E0+rrkm.MaxJShift(jr, jts, temps[len(temps)-1]), m.EnergyGrid.Fine))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", m.File, err)
	}
	tab := tc.NewSumTable(tc.Ceiling())
	tunnel := c.channel.Tunnelling
	if tunnel == "" {
		tunnel = input.NoTunnelling
	}
	mc := MicroChannel{Name: c.name, E0: c.ts.E0, L: c.l, Grain: c.grains.Width,
		Energies: make([]float64, c.grains.N), Temperatures: temps, Tunnelling: string(tunnel), Rotation: n.RotationNote(),
		J: MicroJs(jr, temps[len(temps)/2])}
	for i := range mc.Energies {
		mc.Energies[i] = c.grains.Energy(i)
	}
	for _, j := range mc.J {
		mi := rrkm.RRKMAtJ(rc, tc, c.l, c.grains, jr, jts, j)
		mc.E0J = append(mc.E0J, mi.E0)
		mc.KJ = append(mc.KJ, mi.K)
	}
	mc.K = mc.KJ[0]
	for _, t := range temps {
		kw := 1.0
		if tunnel == input.Wigner {
			kw = rrkm.Wigner(c.ts.Imaginary, t)
		}
		mc.KInf = append(mc.KInf, c.channel.KInf(&c.reactant.Species, t))
		mc.KInfIntegrated = append(mc.KInfIntegrated, rrkm.RRKMAdiabatic(rc, tab, c.l, c.grains, jr, jts, t).ThermalK(t)*kw)
	}
	for _, xs := range append([][]float64{mc.KInf, mc.KInfIntegrated}, mc.KJ...) {
		if err := finite("k", xs...); err != nil {
			return nil, err
		}
	}
	return &MicroResult{File: m.File, Note: microNote, Caution: Caution, Channels: []MicroChannel{mc}}, nil
}

// JStates are one species' J-resolved state counts for the adiabatic J
// treatment, on the reporting grains (energies from its zero-point level):
// the active density ρ_act(E) (vibrations, K rotor, torsions, electronic
// levels) and, at each J, ρ(E, J) = (2J+1)·ρ_act(E − B̄J(J+1)) and
// W(E, J) = (2J+1)·W_act(E − B̄J(J+1)), the 2J+1 being the degeneracy of the
// space-fixed projection M (Holbrook, Pilling & Robertson 1996, §4.6).
type JStates struct {
	Name          string      `json:"name"`
	B             float64     `json:"J_rotor_B_cm-1"`
	Grain         float64     `json:"grain_cm-1"`
	Energies      []float64   `json:"energies_cm-1"`
	ActiveDensity []float64   `json:"active_density_per_cm-1"`
	J             []int       `json:"J"`
	Density       [][]float64 `json:"density_at_J_per_cm-1"`
	SumStates     [][]float64 `json:"sum_of_states_at_J"`
}

// StatesJ returns the J-resolved counts of the reactant and the main
// transition state at the J Micro reports (MicroJs at the middle
// temperature of the file).
func (cs *Counts) StatesJ() ([]JStates, error) {
	n, c := cs.n, cs.c
	m := n.Model
	_, jr := rrkm.SplitExternalRotation(&c.reactant.Species)
	js := MicroJs(jr, m.Temperatures[len(m.Temperatures)/2])
	var out []JStates
	for _, x := range []struct {
		sp  *rrkm.Species
		top float64
	}{{&c.reactant.Species, c.grains.Top()}, {&c.ts.Species, c.tc.Ceiling()}} {
		act, jrot := rrkm.SplitExternalRotation(x.sp)
		g := rrkm.GrainsTo(c.grains.Width, x.top)
		counter, err := rrkm.NewCounter(act, m.EnergyGrid.Fine, g.Top())
		if err != nil {
			return nil, fmt.Errorf("%s: %w", m.File, err)
		}
		st := JStates{Name: x.sp.Name, B: jrot.B, Grain: g.Width, Energies: make([]float64, g.N),
			ActiveDensity: counter.Densities(g), J: js}
		for i := range st.Energies {
			st.Energies[i] = g.Energy(i)
		}
		for _, j := range js {
			erot := jrot.Energy(j)
			deg := float64(2*j + 1)
			counts := counter.Counts(g, erot)
			rho := make([]float64, g.N)
			sums := make([]float64, g.N)
			for i := range rho {
				rho[i] = deg * counts[i] / g.Width
				if e := g.Energy(i) - erot; e > 0 {
					sums[i] = deg * counter.Sum(e)
				}
			}
			st.Density = append(st.Density, rho)
			st.SumStates = append(st.SumStates, sums)
		}
		for _, xs := range append(append([][]float64{st.ActiveDensity}, st.Density...), st.SumStates...) {
			if err := finite(x.sp.Name+" J-resolved count", xs...); err != nil {
				return nil, err
			}
		}
		out = append(out, st)
	}
	return out, nil
}

func allFinite(xs []float64) bool {
	for _, x := range xs {
		if math.IsInf(x, 0) || math.IsNaN(x) {
			return false
		}
	}
	return true
}
