package job

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// Network is the one representation of the calculation an input file
// describes: its wells, the channels out of them, the bath gas and the
// energy-transfer model, with the file's grids. New builds it and applies
// every check that needs more than the file itself (the bath-gas table, the
// memory the state counts and the master equation would take), so that a
// Network is a calculation that can run.
//
// Today a network has one well; Channel.Well and the Wells slice are where
// further wells enter.
type Network struct {
	Model    *input.Model
	Wells    []Well
	Channels []Channel // the main channel first, then the competing ones
	// Transfer is the energy-transfer model; Collider the collision rate
	// constant with the bath gas, and Bath its description. Collider and
	// Bath are set only when the file has a pressure grid.
	Transfer collision.Transfer
	Collider collision.Collider
	Bath     BathInfo
}

// Well is a stable species whose population the master equation follows.
type Well struct {
	Name     string
	Molecule *input.Molecule
}

// Channel is one reaction channel out of a well: over a transition state,
// or barrierless with k(E) from the inverse Laplace transform of a given
// k∞(T).
type Channel struct {
	Name     string // the transition state's name, "barrierless", or the file's channel name
	Well     int    // index in Network.Wells of the well it leaves
	Products []string
	TS       *input.Molecule // nil for a barrierless channel
	ILT      *rrkm.ILT       // barrierless channels only
	L        float64         // reaction-path degeneracy
	E0       float64         // threshold, cm⁻¹ above the well's zero-point level
	// Tunnelling is the correction applied to the channel's k(E) and k∞.
	Tunnelling input.Tunnelling
	// ReactionEnergy is ΔE0 of the products above the well (cm⁻¹), if
	// HasReactionEnergy.
	ReactionEnergy    float64
	HasReactionEnergy bool
}

// New builds the network of model m and checks that it can be computed: the
// collision partners when the file has pressures, and the memory of the
// state counts and of the master equation with the file's settings. The
// errors are *input.FieldError naming the field to change.
func New(m *input.Model) (*Network, error) {
	if m.Network != nil {
		return nil, ErrNetworkNotSolved(m)
	}
	r, _ := m.ReactantAndTS()
	n := &Network{Model: m, Wells: []Well{{Name: r.Name, Molecule: r}}, Channels: channels(m),
		Transfer: transfer(m)}
	if len(m.Pressures) > 0 {
		var err error
		if n.Collider, n.Bath, err = collider(m); err != nil {
			return nil, err
		}
	}
	if err := n.checkRotation(); err != nil {
		return nil, err
	}
	if err := n.checkCountSize(); err != nil {
		return nil, err
	}
	if n.Main().TS != nil {
		if _, _, err := n.reportGrid(ReportGrid{}); err != nil {
			return nil, err
		}
	}
	if len(m.Pressures) > 0 {
		if err := n.checkMatrixSize(m.EnergyGrid.MEGrain, m.EnergyGrid.Ceiling, Setting{}, Setting{}, false); err != nil {
			return nil, err
		}
	}
	return n, nil
}

// channels returns the file's channels, the main one first.
func channels(m *input.Model) []Channel {
	r, ts := m.ReactantAndTS()
	rx := m.Reaction
	var main Channel
	if b := rx.Barrierless; b != nil {
		main = Channel{Name: "barrierless", Products: rx.Products, L: 1, E0: b.Energy,
			ILT: &rrkm.ILT{A: b.A, T0: b.T0, N: b.N, EInf: b.Energy}, ReactionEnergy: rx.ReactionEnergy, HasReactionEnergy: rx.HasReactionEnergy}
	} else {
		main = Channel{Name: ts.Name, Products: rx.Products, TS: ts, L: pathDegeneracy(m), E0: ts.E0,
			Tunnelling: rx.Tunnelling, ReactionEnergy: rx.ReactionEnergy, HasReactionEnergy: rx.HasReactionEnergy}
	}
	out := []Channel{main}
	for _, c := range rx.Competing {
		ch := Channel{Name: c.Name, Products: c.Products, Tunnelling: c.Tunnelling, ReactionEnergy: c.ReactionEnergy,
			HasReactionEnergy: c.HasReactionEnergy, L: c.PathDegeneracy}
		if b := c.Barrierless; b != nil {
			ch.ILT = &rrkm.ILT{A: b.A, T0: b.T0, N: b.N, EInf: b.Energy}
			ch.E0, ch.L = b.Energy, 1
		} else {
			ch.TS = m.Molecule(c.Via)
			ch.E0 = ch.TS.E0
			if ch.L == 0 {
				ch.L = rrkm.PathDegeneracy(&r.Species, &ch.TS.Species)
			}
		}
		out = append(out, ch)
	}
	return out
}

// pathDegeneracy returns the file's L for the main channel, or L from the
// symmetry numbers and optical isomers when it says auto (1 for a
// barrierless channel, whose A includes it).
func pathDegeneracy(m *input.Model) float64 {
	if l := m.Reaction.PathDegeneracy; l > 0 {
		return l
	}
	r, ts := m.ReactantAndTS()
	if ts == nil {
		return 1
	}
	return rrkm.PathDegeneracy(&r.Species, &ts.Species)
}

// Label names the channel in reports: the transition state (or
// "barrierless") and its products.
func (c Channel) Label() string {
	if len(c.Products) == 0 {
		return c.Name
	}
	return c.Name + " -> " + strings.Join(c.Products, " + ")
}

// Eckart returns the channel's Eckart barrier, nil unless the channel asks
// for Eckart tunnelling.
func (c Channel) Eckart() *rrkm.Eckart {
	if c.Tunnelling != input.Eckart {
		return nil
	}
	return &rrkm.Eckart{ImagFreq: c.TS.Imaginary, V1: c.E0, V2: c.E0 - c.ReactionEnergy}
}

// KInf returns the channel's canonical high-pressure rate constant in s⁻¹
// out of the well species w at tK, with its tunnelling correction, or the
// given k∞ of a barrierless channel.
func (c Channel) KInf(w *rrkm.Species, tK float64) float64 {
	switch {
	case c.ILT != nil:
		return c.ILT.KInf(tK)
	case c.Tunnelling == input.Wigner:
		return rrkm.KInf(w, &c.TS.Species, c.L, tK) * rrkm.Wigner(c.TS.Imaginary, tK)
	case c.Tunnelling == input.Eckart:
		return rrkm.KInfTunnel(w, &c.TS.Species, c.L, tK, c.Eckart())
	}
	return rrkm.KInf(w, &c.TS.Species, c.L, tK)
}

// reactant is the species of the (one) well.
func (n *Network) reactant() *input.Molecule { return n.Wells[0].Molecule }

// Main returns the main channel, the reaction the file names first.
func (n *Network) Main() Channel { return n.Channels[0] }

// KInf returns the canonical high-pressure rate constant of the well, the
// sum over its channels, in s⁻¹ at tK.
func (n *Network) KInf(tK float64) float64 {
	k := 0.0
	for _, c := range n.Channels {
		k += c.KInf(&n.reactant().Species, tK)
	}
	return k
}

// masterEquation counts the states of the well and of every transition
// state up to the highest energy the master equation can reach with the
// ceiling in cm⁻¹ (0: automatic; CountTop) and returns the well with its
// channels for collision.Run.
func (n *Network) masterEquation(ctx context.Context, ceiling float64) (collision.Channel, error) {
	return n.masterEquationJobs(ctx, ceiling, 1)
}

// masterEquationJobs is masterEquation counting the reactant's states on
// a goroutine of its own while the transition states are counted, when
// jobs (0: GOMAXPROCS) allows more than one.
func (n *Network) masterEquationJobs(ctx context.Context, ceiling float64, jobs int) (collision.Channel, error) {
	m := n.Model
	fine := m.EnergyGrid.Fine
	top := n.CountTop(ceiling)
	adiabatic := m.Reaction.Rotation == input.AdiabaticJ || m.Reaction.Rotation == input.AdiabaticJAveraged
	resolved := m.Reaction.Rotation == input.AdiabaticJ
	jx, jw := rrkm.JQuadrature(jNodes)
	reactant, jr := &n.reactant().Species, rrkm.JRotor{}
	if adiabatic {
		reactant, jr = rrkm.SplitExternalRotation(reactant)
	}
	// rc is used below only inside the channels' closures, which run after
	// this function has waited for it.
	var rc *rrkm.Counter
	var rcErr error
	rcDone := make(chan struct{})
	countReactant := func() {
		defer close(rcDone)
		rc, rcErr = rrkm.NewCounterContext(ctx, reactant, fine, top)
	}
	if jobs == 1 || (jobs <= 0 && runtime.GOMAXPROCS(0) == 1) {
		countReactant()
	} else {
		go countReactant()
	}
	defer func() { <-rcDone }() // never leave it running on an early return
	waitReactant := func() error {
		<-rcDone
		if rcErr != nil {
			return countError(m.File, rcErr)
		}
		return nil
	}
	if jobs == 1 {
		if err := waitReactant(); err != nil {
			return collision.Channel{}, err
		}
	}
	tMax := m.Temperatures[len(m.Temperatures)-1]
	var chs []collision.Channel
	// thresholds give each transition-state channel's threshold in J
	// component q at tK.
	var thresholds []func(tK float64, q int) float64
	for _, c := range n.Channels {
		cc := collision.Channel{Name: c.Name, L: c.L, E0: c.E0}
		if c.ILT != nil {
			ilt := *c.ILT
			cc.Micro = func(g rrkm.Grains, _ float64) (*rrkm.Micro, error) { return rrkm.ILTMicro(rc, ilt, g) }
			chs = append(chs, cc)
			continue
		}
		// With tunnelling the transition state's levels matter down to the
		// Eckart barrier's lower end, so count them that much higher.
		tsTop := top - c.E0
		if e := c.Eckart(); e != nil {
			tsTop = top - e.Emin()
		}
		if adiabatic {
			// The K rotor and the J average: the transition state is counted
			// as far above the grid as the centrifugal threshold falls.
			ts, jts := rrkm.SplitExternalRotation(&c.TS.Species)
			tc, err := rrkm.NewCounterContext(ctx, ts, fine, math.Max(tsTop+rrkm.MaxJShift(jr, jts, tMax), fine))
			if err != nil {
				return collision.Channel{}, countError(m.File, err)
			}
			cc.TS = tc
			tab := tc.NewSumTable(tc.Ceiling())
			l, imag, wigner := c.L, c.TS.Imaginary, c.Tunnelling == input.Wigner
			withWigner := func(mi *rrkm.Micro, tK float64) *rrkm.Micro {
				if wigner {
					kw := rrkm.Wigner(imag, tK)
					for j := range mi.K {
						mi.K[j] *= kw
					}
				}
				return mi
			}
			cc.Micro = func(g rrkm.Grains, tK float64) (*rrkm.Micro, error) {
				return withWigner(rrkm.RRKMAdiabatic(rc, tab, l, g, jr, jts, tK), tK), nil
			}
			if resolved {
				cc.MicroJ = func(g rrkm.Grains, tK float64, q int) (*rrkm.Micro, error) {
					return withWigner(rrkm.RRKMShifted(rc, tab, l, g, rrkm.JNodeShift(jr, jts, jx[q], tK), tK), tK), nil
				}
				e0 := c.E0
				thresholds = append(thresholds, func(tK float64, q int) float64 { return e0 + rrkm.JNodeShift(jr, jts, jx[q], tK) })
			}
			chs = append(chs, cc)
			continue
		}
		tc, err := rrkm.NewCounterContext(ctx, &c.TS.Species, fine, math.Max(tsTop, fine))
		if err != nil {
			return collision.Channel{}, countError(m.File, err)
		}
		cc.TS = tc
		l, imag := c.L, c.TS.Imaginary
		switch c.Tunnelling {
		case input.Eckart:
			e := c.Eckart()
			cc.Micro = func(g rrkm.Grains, _ float64) (*rrkm.Micro, error) { return rrkm.RRKMTunnel(rc, tc, l, g, e), nil }
		case input.Wigner:
			// Wigner's correction is thermal: k(E) is scaled by κ(T) at each
			// temperature, so the high-pressure limit carries it.
			cc.Micro = func(g rrkm.Grains, tK float64) (*rrkm.Micro, error) {
				mi := rrkm.RRKM(rc, tc, l, g)
				kw := rrkm.Wigner(imag, tK)
				for j := range mi.K {
					mi.K[j] *= kw
				}
				return mi, nil
			}
		}
		chs = append(chs, cc)
	}
	if err := waitReactant(); err != nil {
		return collision.Channel{}, err
	}
	well := chs[0]
	well.Reactant = rc
	well.Competing = chs[1:]
	if resolved {
		well.JWeights = func(float64) []float64 { return jw }
		lowest := n.lowestE0()
		well.JThreshold = func(tK float64, q int) float64 {
			e := lowest // a barrierless channel's threshold does not move
			if len(thresholds) == len(n.Channels) {
				e = math.Inf(1)
			}
			for _, f := range thresholds {
				e = math.Min(e, f(tK, q))
			}
			return e
		}
	}
	return well, nil
}

// JNodes is the number of J at which the adiabatic-j treatment solves the
// master equation: Gauss–Laguerre nodes of the thermal J distribution
// (rrkm.JQuadrature), exact for rates polynomial of degree below 2·JNodes
// in J(J+1). The rates' J dependence is close to an exponential in J(J+1)
// (the centrifugal threshold); TestJNodesConverged bounds the error.
const JNodes = 4

// jNodes is JNodes, a variable so that a test can check convergence.
var jNodes = JNodes

// checkRotation refuses an adiabatic J treatment the model cannot carry:
// Eckart tunnelling (its barrier would have to move with the centrifugal
// threshold of every J; not implemented) and a reactant and transition state
// of which only one has external rotation.
func (n *Network) checkRotation() error {
	m := n.Model
	if m.Reaction.Rotation == input.AllActive || m.Reaction.Rotation == "" {
		return nil
	}
	for _, c := range n.Channels {
		if c.TS == nil {
			continue
		}
		if c.Tunnelling == input.Eckart {
			return &input.FieldError{File: m.File, Path: "reaction.rotation", Value: string(m.Reaction.Rotation),
				Err:  fmt.Errorf("channel %s: Eckart tunnelling with the adiabatic J rotation is not implemented", c.Label()),
				Hint: "use rotation: all-active with Eckart tunnelling, or tunnelling: wigner"}
		}
		if err := rrkm.CheckAdiabaticPair(&n.reactant().Species, &c.TS.Species); err != nil {
			return &input.FieldError{File: m.File, Path: "reaction.rotation", Value: string(m.Reaction.Rotation),
				Err:  fmt.Errorf("channel %s: %w", c.Label(), err),
				Hint: "give rotation: to both the reactant and the transition state, or use rotation: all-active"}
		}
	}
	return nil
}

// countError wraps a state-count error with the file's name; a cancelled
// context passes unchanged.
func countError(file string, err error) error {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return err
	}
	return fmt.Errorf("%s: %w", file, err)
}

// needPressures is the error of a calculation that needs a pressure grid on
// a file without one.
func (n *Network) needPressures(what string) error {
	if len(n.Model.Pressures) > 0 {
		return nil
	}
	return &input.FieldError{File: n.Model.File, Path: "grid.pressures", Err: fmt.Errorf("missing: %s needs a pressure grid", what),
		Hint: "add pressures: {from: 0.001 bar, to: 1000 bar, points: 13}"}
}

// errBarrierless is returned by the calculations that report a transition
// state (States, Micro) on a barrierless main channel.
func (n *Network) errBarrierless() error {
	return &input.FieldError{File: n.Model.File, Path: "reaction.barrierless",
		Err:  errors.New("states and micro report a transition state, and this reaction's main channel is barrierless"),
		Hint: "run rates for the barrierless channel's k(T,P)"}
}

// ErrNetworkNotSolved is the error of a one-well calculation asked of a
// file with a network: section: check summarises such a file and rates
// computes it (NetworkRates); the other verbs are for one well.
func ErrNetworkNotSolved(m *input.Model) error {
	return m.FieldError("network", errors.New("a network of several wells: only check and rates take it in this version"),
		"`falloff check` summarises the network and `falloff rates` gives its rate coefficients; compare, states, micro and thermo take a one-well file (reaction:)")
}
