package main

import (
	"errors"
	"fmt"
	"math"

	"github.com/falloff-kinetics/falloff/internal/demo"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"github.com/falloff-kinetics/falloff/pkg/units"
)

// loadModel reads the file named in args, or the built-in demo when there is
// none (and says so on stderr unless quiet). Warnings go to stderr.
func loadModel(args []string, quiet bool, s streams) (*input.Model, error) {
	var m *input.Model
	var err error
	switch len(args) {
	case 0:
		if !quiet {
			fmt.Fprintln(s.err, "falloff: no input file given; running the built-in demo (an invented molecule; see `falloff example`)")
		}
		m, err = input.Parse(demo.Name, demo.Text)
	case 1:
		m, err = input.ReadFile(args[0])
	default:
		return nil, usagef("expected one input file, got %d arguments", len(args))
	}
	if err != nil {
		return nil, err
	}
	if !quiet {
		for _, w := range m.Warnings {
			fmt.Fprintln(s.err, "warning:", w)
		}
	}
	if err := preflight(m); err != nil {
		return nil, err
	}
	return m, nil
}

// ceilingKT is the default energy ceiling above the threshold, in units of
// kT at the highest temperature: the thermal distribution and the integrand
// of the TST identity are below e^-40 there.
const ceilingKT = 40

// channel is one reaction channel ready for state counting.
type channel struct {
	name         string
	reactant, ts *input.Molecule
	l            float64 // reaction-path degeneracy
	grains       rrkm.Grains
	rc, tc       *rrkm.Counter
}

// energyOptions are the flags that override the file's energy grid.
type energyOptions struct {
	grain, ceiling string
}

func (o *energyOptions) addFlags(fs interface {
	StringVar(p *string, name, value, usage string)
}) {
	fs.StringVar(&o.grain, "grain", "", `reporting grain with its unit, e.g. "20 cm-1" (default: the file's energy-grid.grain, else 10 cm-1)`)
	fs.StringVar(&o.ceiling, "ceiling", "", `highest energy with its unit, e.g. "60000 cm-1" (default: E0 + 40 kT at the highest temperature, more for a large molecule)`)
}

// check parses the flags' values, so a mistake is reported before any work.
func (o *energyOptions) check() error {
	for _, f := range []struct{ name, v string }{{"--grain", o.grain}, {"--ceiling", o.ceiling}} {
		if f.v == "" {
			continue
		}
		if x, err := units.Parse(f.v, units.Energy); err != nil {
			return usagef("%s: %v", f.name, err)
		} else if !(x > 0) {
			return usagef("%s %q: must be positive", f.name, f.v)
		}
	}
	return nil
}

// resolve returns the grain and ceiling in cm⁻¹ for model m.
func (o *energyOptions) resolve(m *input.Model, e0 float64) (grain, ceiling float64, err error) {
	grain, ceiling = m.EnergyGrid.Grain, m.EnergyGrid.Ceiling
	if o.grain != "" {
		if grain, err = units.Parse(o.grain, units.Energy); err != nil {
			return 0, 0, usagef("--grain: %v", err)
		}
	}
	if o.ceiling != "" {
		if ceiling, err = units.Parse(o.ceiling, units.Energy); err != nil {
			return 0, 0, usagef("--ceiling: %v", err)
		}
	}
	if !(grain > 0) {
		return 0, 0, usagef("--grain %q: the grain must be positive", o.grain)
	}
	if grain < m.EnergyGrid.Fine {
		return 0, 0, usagef("--grain %q: below the fine counting grain %g cm-1", o.grain, m.EnergyGrid.Fine)
	}
	if ceiling == 0 {
		// E0 + 40 kT, or higher where a large molecule's thermal
		// distribution reaches further (rrkm.Species.ThermalCeiling).
		tmax := m.Temperatures[len(m.Temperatures)-1]
		r, ts := m.ReactantAndTS()
		ceiling = math.Max(e0+ceilingKT*units.KT(tmax), r.ThermalCeiling(tmax))
		if ts != nil {
			ceiling = math.Max(ceiling, e0+ts.ThermalCeiling(tmax))
		}
	}
	if ceiling <= e0+grain {
		return 0, 0, usagef("ceiling %g cm-1 is not above the threshold %g cm-1", ceiling, e0)
	}
	if bins := fineBins(m.EnergyGrid.Fine, ceiling); o.ceiling != "" && bins > rrkm.MaxFineBins {
		limit := float64(rrkm.MaxFineBins)
		return 0, 0, usagef("--ceiling %q: the state count would need %s bins of %s cm-1, %s of memory; the limit is %s (hint: a ceiling of at most %s cm-1)",
			o.ceiling, num(bins), num(m.EnergyGrid.Fine), byteSize(bins*bytesPerEntry), byteSize(limit*bytesPerEntry), num(math.Floor((limit-2)*m.EnergyGrid.Fine)))
	}
	return grain, ceiling, nil
}

// newChannel counts the states of the model's reactant and transition state.
func newChannel(m *input.Model, eo *energyOptions) (*channel, error) {
	r, ts := m.ReactantAndTS()
	if ts == nil {
		return nil, &input.FieldError{File: m.File, Path: "reaction.barrierless", Err: errors.New("states and micro report a transition state, and this reaction's main channel is barrierless"),
			Hint: "run rates for the barrierless channel's k(T,P)"}
	}
	grain, ceiling, err := eo.resolve(m, ts.E0)
	if err != nil {
		return nil, err
	}
	ch := &channel{name: r.Name + " -> " + ts.Name, reactant: r, ts: ts, l: pathDegeneracy(m)}
	ch.grains = rrkm.GrainsTo(grain, ceiling)
	return ch, ch.count(m, ch.grains.Top())
}

// pathDegeneracy returns the file's L, or L from the symmetry numbers and
// optical isomers when it says auto.
func pathDegeneracy(m *input.Model) float64 {
	if l := m.Reaction.PathDegeneracy; l > 0 {
		return l
	}
	r, ts := m.ReactantAndTS()
	if ts == nil {
		return 1 // a barrierless channel's A includes it
	}
	return rrkm.PathDegeneracy(&r.Species, &ts.Species)
}

// count builds the state counters of the reactant and transition state up to
// top cm⁻¹ above the reactant's zero-point level.
func (ch *channel) count(m *input.Model, top float64) error {
	var err error
	if ch.rc, err = rrkm.NewCounter(&ch.reactant.Species, m.EnergyGrid.Fine, top); err != nil {
		return fmt.Errorf("%s: %w", m.File, err)
	}
	if ch.tc, err = rrkm.NewCounter(&ch.ts.Species, m.EnergyGrid.Fine, math.Max(top-ch.ts.E0, m.EnergyGrid.Fine)); err != nil {
		return fmt.Errorf("%s: %w", m.File, err)
	}
	return nil
}

// finite reports a numerical failure if any value is NaN or infinite.
func finite(what string, xs ...float64) error {
	for i, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return &numericalError{fmt.Errorf("%s[%d] = %v: not a finite number (hint: check the grain and ceiling)", what, i, x)}
		}
	}
	return nil
}
