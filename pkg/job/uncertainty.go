package job

import (
	"context"
	"errors"
	"fmt"

	"github.com/falloff-kinetics/falloff/pkg/collision"
)

// This file holds what an uncertainty propagation (pkg/uncertainty) needs
// of a run: the master equation alone, without the convergence check, the
// held-out points and the fits, and the state counts kept between runs
// that differ only in their collisions.

// StateCounts are the state counts of a network's well and channels for the
// master equation, with the grain and ceiling of the run they were counted
// for. They are read-only and may be shared by concurrent runs.
type StateCounts struct {
	well           collision.Channel
	grain, ceiling float64
}

// CountStates counts the states of the network for the master equation with
// opt's grain and ceiling (or the file's), as Rates does, after the same
// checks of the matrix size and the work.
func (n *Network) CountStates(ctx context.Context, opt Options) (*StateCounts, error) {
	m := n.Model
	if err := n.needPressures("uncertainty"); err != nil {
		return nil, err
	}
	grain := opt.Grain.or(m.EnergyGrid.MEGrain)
	ceiling := opt.Ceiling.or(m.EnergyGrid.Ceiling)
	if opt.Ceiling.given() && ceiling <= n.highestE0() {
		return nil, opt.Ceiling.optionError("", "not above the threshold %.0f cm-1", n.highestE0())
	}
	if err := n.checkMatrixSize(grain, ceiling, opt.Grain, opt.Ceiling, false); err != nil {
		return nil, err
	}
	well, err := n.masterEquation(ctx, ceiling)
	if err != nil {
		return nil, err
	}
	return &StateCounts{well: well, grain: grain, ceiling: ceiling}, nil
}

// Limits are the k(T,P) grid of a run in the forward direction with its
// limits: K[iT][iP] and KInf in s⁻¹, K0 in cm³ molecule⁻¹ s⁻¹, on the
// file's temperatures and pressures.
type Limits struct {
	K    [][]float64
	KInf []float64 // canonical k∞ (Network.KInf), as RatesResult.KInf
	K0   []float64
}

// Solve runs the master equation of network n over the file's grid with
// the state counts c, which must be those of n or of a network that
// differs from n only in its collision rate and energy transfer (the
// counts do not depend on them); a nil c counts them first. It skips the
// convergence check, the held-out points and the fits; its K, KInf and K0
// are those Rates gives with the same grain and ceiling, number for number.
// opt.Jobs sets the workers over temperatures.
func (n *Network) Solve(ctx context.Context, c *StateCounts, opt Options) (*Limits, error) {
	if c == nil {
		var err error
		if c, err = n.CountStates(ctx, opt); err != nil {
			return nil, err
		}
	}
	m := n.Model
	res, err := collision.RunContext(ctx, c.well, n.Collider, n.Transfer, m.Temperatures, m.Pressures,
		collision.Options{Grain: c.grain, Ceiling: c.ceiling, Jobs: opt.Jobs, SkipConvergence: true, Progress: opt.Progress})
	switch {
	case errors.Is(err, collision.ErrTooLarge):
		return nil, fmt.Errorf("%s: master equation: %w", m.File, err)
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		return nil, err
	case err != nil:
		return nil, &NumericalError{fmt.Errorf("%s: master equation: %w", m.File, err)}
	}
	out := &Limits{K: res.K()}
	for _, row := range res.Rows {
		out.KInf = append(out.KInf, n.KInf(row.T))
		out.K0 = append(out.K0, row.K0)
	}
	for _, xs := range append([][]float64{out.KInf, out.K0}, out.K...) {
		if err := finite("rates", xs...); err != nil {
			return nil, err
		}
	}
	return out, nil
}
