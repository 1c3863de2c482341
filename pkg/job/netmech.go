package job

import (
	"crypto/sha256"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/export"
	"github.com/falloff-kinetics/falloff/pkg/fit"
	"github.com/falloff-kinetics/falloff/pkg/input"
)

// NetworkChannel is one phenomenological rate coefficient of a network,
// from a well to a well or to a fragment set, with its fits.
type NetworkChannel struct {
	// Reactants are the species the entry starts from: the well (From), or
	// the source's fragments for a chemically activated channel.
	Reactants   []string     `json:"reactants"`
	From        string       `json:"from"`
	To          string       `json:"to"`
	Products    []string     `json:"products"`
	Points      int          `json:"points"` // (T, P) points fitted (not refused, k > 0)
	Fits        *fit.Results `json:"fits,omitempty"`
	Written     bool         `json:"written"` // in the mechanism files
	WhyNot      string       `json:"why_not_written,omitempty"`
	Recommended string       `json:"recommended,omitempty"`
	// Falloff says whether k rises with pressure at every temperature (a
	// falloff curve, so Troe is fitted too) or why not.
	Falloff string `json:"falloff"`
}

// networkFitForms are the forms fitted to a network's rate coefficients:
// PLOG and Chebyshev describe any k(T,P); a falloff form describes only a
// falloff curve, which a phenomenological coefficient (say, a chemically
// activated one, which falls with pressure) need not be.
var networkFitForms = []fit.FormName{fit.FormPLOG, fit.FormChebyshev}

// networkMinPoints is the fewest (T, P) points a channel is fitted on.
const networkMinPoints = 6

// FitNetwork fits PLOG and Chebyshev forms to every phenomenological rate
// coefficient of res on the points it did not refuse: each well pair once,
// from the well listed first (the reverse follows from the equilibrium
// constant in a simulator), and every well to every fragment set. tolerance
// is the largest acceptable relative error (0: fit.DefaultTolerance).
func (res *NetworkRatesResult) FitNetwork(m *input.Model, tolerance float64) []NetworkChannel {
	var out []NetworkChannel
	add := func(reactants []string, fromName string, products []string, toName string, kUnits string, k func(i, j int) (float64, bool)) {
		ch := NetworkChannel{Reactants: reactants, From: fromName, To: toName, Products: products}
		var pts []fit.Point
		for i, t := range res.Temperatures {
			for j, p := range res.Pressures {
				if x, ok := k(i, j); ok && x > 0 && !math.IsInf(x, 0) {
					pts = append(pts, fit.Point{T: t, P: p, K: x})
				}
			}
		}
		ch.Points = len(pts)
		if len(pts) < networkMinPoints {
			ch.WhyNot = fmt.Sprintf("only %d of %d points computed (the others refused or zero)", len(pts), len(res.Temperatures)*len(res.Pressures))
			out = append(out, ch)
			return
		}
		forms := networkFitForms
		if why := notFalloff(pts); why == "" {
			ch.Falloff = "a falloff curve: Troe fitted too"
			forms = append(append([]fit.FormName{}, forms...), fit.FormTroe)
		} else {
			ch.Falloff = "not a falloff curve (" + why + "): no Troe form"
		}
		r, err := fit.FitAll(&fit.Table{Name: m.File, KUnits: kUnits, Points: pts}, forms, fit.Options{Tolerance: tolerance})
		if err != nil {
			ch.WhyNot = err.Error()
			out = append(out, ch)
			return
		}
		ch.Fits, ch.Recommended = r, string(r.Recommended)
		if r.Recommended == "" {
			ch.WhyNot = "no form meets the tolerance: " + r.Reason
		} else {
			ch.Written = true
		}
		out = append(out, ch)
	}
	for a := range res.Wells {
		for b := a + 1; b < len(res.Wells); b++ {
			add([]string{res.Wells[a]}, res.Wells[a], []string{res.Wells[b]}, res.Wells[b], "s-1", func(i, j int) (float64, bool) {
				k := res.K[i][j]
				if k == nil {
					return 0, false
				}
				return k[b][a], true
			})
		}
		for x, p := range res.Products {
			f := m.Network.FragmentSet(productSet(m.Network, p))
			add([]string{res.Wells[a]}, res.Wells[a], f.Species, p, "s-1", func(i, j int) (float64, bool) {
				kx := res.KProducts[i][j]
				if kx == nil {
					return 0, false
				}
				return kx[x][a], true
			})
		}
	}
	// The source's chemically activated channels to the other products,
	// k_capture × yield: new reaction pairs. Its stabilisation into each
	// well is the reverse of that well's entry to the source's fragments
	// (detailed balance), which the reversible entries above already give.
	if src := res.Source; src != nil && src.KCapture != nil {
		own := m.Network.FragmentSet(m.Network.Source.Fragments).Species
		units := "s-1"
		if len(own) == 2 {
			units = "cm3 molecule-1 s-1"
		}
		if len(own) <= 2 {
			for x, p := range res.Products {
				if p == src.Fragments {
					continue
				}
				f := m.Network.FragmentSet(productSet(m.Network, p))
				add(own, src.Fragments, f.Species, p, units, func(i, j int) (float64, bool) {
					if src.Activated[i][j] == nil {
						return 0, false
					}
					return src.KCapture[i][j] * src.Activated[i][j][x], true
				})
			}
		}
	}
	return out
}

// productSet returns the fragment set whose products read name.
func productSet(net *input.Network, name string) string {
	for _, f := range net.Fragments {
		if productName(net, f.Name) == name {
			return f.Name
		}
	}
	return ""
}

// NetworkMechanismFiles renders the channels that passed their fits as
// Cantera YAML and keyword text, each entry reversible (its reverse from
// the simulator's equilibrium constant), with the header of a rates run.
func (res *NetworkRatesResult) NetworkMechanismFiles(m *input.Model, chs []NetworkChannel, u export.Units, writeFailed bool) (yaml, text []byte, err error) {
	sum := sha256.Sum256(m.Source)
	h := export.Header{Title: m.Title, Input: m.File, Checksum: fmt.Sprintf("sha256:%x", sum), Program: "falloff " + Version,
		TMin: res.Temperatures[0], TMax: res.Temperatures[len(res.Temperatures)-1],
		PMin: res.Pressures[0], PMax: res.Pressures[len(res.Pressures)-1],
		Lines: []string{
			"Phenomenological rate coefficients of a network of wells (" + res.Note + ")",
			"Each entry is written once, reversible: its reverse comes from the equilibrium constant, consistent only with thermochemistry from the same partition functions",
		}}
	var rs []export.Reaction
	for _, ch := range chs {
		name, mark := fit.FormName(ch.Recommended), ""
		if !ch.Written && writeFailed && ch.Fits != nil {
			// The form of the smallest error on the points, marked.
			best := math.Inf(1)
			for f, rep := range ch.Fits.Reports() {
				if rep.MaxErrorPct < best || rep.MaxErrorPct == best && f < name {
					name, best = f, rep.MaxErrorPct
				}
			}
			mark = "FAILED (" + ch.WhyNot + "): "
		}
		if name == "" {
			h.Lines = append(h.Lines, fmt.Sprintf("Not written: %s -> %s: %s", strings.Join(ch.Reactants, " + "), ch.To, ch.WhyNot))
			continue
		}
		rep := ch.Fits.Reports()[name]
		rs = append(rs, export.Reaction{Reactants: ch.Reactants, Products: ch.Products, Order: len(ch.Reactants),
			Form: ch.Fits.Form(name), Note: fmt.Sprintf("%s%s, max error %.3g %% on %d points", mark, name, rep.MaxErrorPct, ch.Points)})
	}
	if len(rs) == 0 {
		return nil, nil, fmt.Errorf("%s: no rate coefficient of the network has a fit within the tolerance (hint: more grid points, a larger --tolerance, or --write-failed to write the best forms marked FAILED)", m.File)
	}
	if yaml, err = export.YAML(h, u, rs); err != nil {
		return nil, nil, err
	}
	if text, err = export.Text(h, u, rs); err != nil {
		return nil, nil, err
	}
	return yaml, text, nil
}

// notFalloff returns "" when k rises (or stays) with pressure at every
// temperature of pts with at least three pressures, as a falloff curve
// does, and otherwise where it falls: a chemically activated coefficient,
// for one, falls with pressure, which no Troe form describes.
func notFalloff(pts []fit.Point) string {
	byT := map[float64][]fit.Point{}
	var temps []float64
	for _, p := range pts {
		if _, ok := byT[p.T]; !ok {
			temps = append(temps, p.T)
		}
		byT[p.T] = append(byT[p.T], p)
	}
	sort.Float64s(temps)
	for _, t := range temps {
		row := byT[t]
		if len(row) < 3 {
			return fmt.Sprintf("fewer than three pressures at %g K", t)
		}
		sort.Slice(row, func(i, j int) bool { return row[i].P < row[j].P })
		for i := 1; i < len(row); i++ {
			if row[i].K < row[i-1].K*(1-1e-9) {
				return fmt.Sprintf("k falls with pressure at %g K", t)
			}
		}
	}
	return ""
}
