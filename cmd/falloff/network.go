package main

import (
	"fmt"
	"math"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// channelSpec is one channel out of the well as the command sees it: the
// main channel of the file's reaction, or one of its competing channels.
type channelSpec struct {
	name      string
	products  []string
	ts        *input.Molecule // nil for a barrierless channel
	l         float64         // path degeneracy
	e0        float64         // threshold, cm⁻¹
	tunnel    string          // input.NoTunnelling, Wigner or Eckart
	energy    float64         // reaction energy, cm⁻¹ (if hasEnergy)
	hasEnergy bool
	ilt       *rrkm.ILT // barrierless channels
	tc        *rrkm.Counter
}

// channelSpecs returns the file's channels, the main one first.
func channelSpecs(m *input.Model) []channelSpec {
	r, ts := m.ReactantAndTS()
	rx := m.Reaction
	var main channelSpec
	if b := rx.Barrierless; b != nil {
		main = channelSpec{name: "barrierless", products: rx.Products, l: 1, e0: b.Energy,
			ilt: &rrkm.ILT{A: b.A, T0: b.T0, N: b.N, EInf: b.Energy}, energy: rx.ReactionEnergy, hasEnergy: rx.HasReactionEnergy}
	} else {
		main = channelSpec{name: ts.Name, products: rx.Products, ts: ts, l: pathDegeneracy(m), e0: ts.E0,
			tunnel: rx.Tunnelling, energy: rx.ReactionEnergy, hasEnergy: rx.HasReactionEnergy}
	}
	specs := []channelSpec{main}
	for _, c := range rx.Competing {
		s := channelSpec{name: c.Name, products: c.Products, tunnel: c.Tunnelling, energy: c.ReactionEnergy,
			hasEnergy: c.HasReactionEnergy, l: c.PathDegeneracy}
		if c.Barrierless != nil {
			b := c.Barrierless
			s.ilt = &rrkm.ILT{A: b.A, T0: b.T0, N: b.N, EInf: b.Energy}
			s.e0, s.l = b.Energy, 1
		} else {
			s.ts = m.Molecule(c.Via)
			s.e0 = s.ts.E0
			if s.l == 0 {
				s.l = rrkm.PathDegeneracy(&r.Species, &s.ts.Species)
			}
		}
		specs = append(specs, s)
	}
	return specs
}

// label names the channel in reports: the transition state (or "barrierless")
// and its products.
func (c channelSpec) label() string {
	if len(c.products) == 0 {
		return c.name
	}
	return c.name + " -> " + strings.Join(c.products, " + ")
}

// eckart returns the channel's Eckart barrier (nil unless asked for).
func (c channelSpec) eckart() *rrkm.Eckart {
	if c.tunnel != input.Eckart {
		return nil
	}
	return &rrkm.Eckart{ImagFreq: c.ts.Imaginary, V1: c.e0, V2: c.e0 - c.energy}
}

// kInf returns the channel's canonical high-pressure rate constant in s⁻¹,
// with its tunnelling correction, or the given k∞ of a barrierless channel.
func (c channelSpec) kInf(r *rrkm.Species, tK float64) float64 {
	switch {
	case c.ilt != nil:
		return c.ilt.KInf(tK)
	case c.tunnel == input.Wigner:
		return rrkm.KInf(r, &c.ts.Species, c.l, tK) * rrkm.Wigner(c.ts.Imaginary, tK)
	case c.tunnel == input.Eckart:
		return rrkm.KInfTunnel(r, &c.ts.Species, c.l, tK, c.eckart())
	}
	return rrkm.KInf(r, &c.ts.Species, c.l, tK)
}

// newNetwork counts the states of the reactant and every transition state
// up to the automatic ceiling at the highest temperature (or the given one,
// if positive) plus the 10 kT the convergence check may add, and returns the
// master-equation channels.
func newNetwork(m *input.Model, ceiling float64) (collision.Channel, []channelSpec, error) {
	r, _ := m.ReactantAndTS()
	specs := channelSpecs(m)
	top := countTop(m, ceiling)
	rc, err := rrkm.NewCounter(&r.Species, m.EnergyGrid.Fine, top)
	if err != nil {
		return collision.Channel{}, nil, fmt.Errorf("%s: %w", m.File, err)
	}
	var chs []collision.Channel
	for i := range specs {
		c := &specs[i]
		cc := collision.Channel{Name: c.name, L: c.l, E0: c.e0}
		switch {
		case c.ilt != nil:
			ilt := *c.ilt
			cc.Micro = func(g rrkm.Grains, _ float64) (*rrkm.Micro, error) { return rrkm.ILTMicro(rc, ilt, g) }
		default:
			// With tunnelling the transition state's levels matter down to
			// the Eckart barrier's lower end, so count them that much higher.
			tsTop := top - c.e0
			if e := c.eckart(); e != nil {
				tsTop = top - e.Emin()
			}
			tc, err := rrkm.NewCounter(&c.ts.Species, m.EnergyGrid.Fine, math.Max(tsTop, m.EnergyGrid.Fine))
			if err != nil {
				return collision.Channel{}, nil, fmt.Errorf("%s: %w", m.File, err)
			}
			c.tc, cc.TS = tc, tc
			l, imag := c.l, c.ts.Imaginary
			switch c.tunnel {
			case input.Eckart:
				e := c.eckart()
				cc.Micro = func(g rrkm.Grains, _ float64) (*rrkm.Micro, error) { return rrkm.RRKMTunnel(rc, tc, l, g, e), nil }
			case input.Wigner:
				// Wigner's correction is thermal: k(E) is scaled by κ(T) at
				// each temperature, so the high-pressure limit carries it.
				cc.Micro = func(g rrkm.Grains, tK float64) (*rrkm.Micro, error) {
					mi := rrkm.RRKM(rc, tc, l, g)
					kw := rrkm.Wigner(imag, tK)
					for j := range mi.K {
						mi.K[j] *= kw
					}
					return mi, nil
				}
			}
		}
		chs = append(chs, cc)
	}
	net := chs[0]
	net.Reactant = rc
	net.Competing = chs[1:]
	return net, specs, nil
}
