package job

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/input"
	"github.com/falloff-kinetics/falloff/pkg/rrkm"
)

// Direction is the direction in which rate coefficients are written.
type Direction string

// Directions.
const (
	Forward       Direction = "forward"       // the unimolecular step as computed
	Recombination Direction = "recombination" // the reverse A + B (+M) -> AB (+M)
)

// ParseDirection reads a direction's name.
func ParseDirection(s string) (Direction, error) {
	switch d := Direction(s); d {
	case Forward, Recombination:
		return d, nil
	}
	return "", fmt.Errorf("unknown direction %q: use forward or recombination", s)
}

// recombinationProducts returns the products' species for K_c, or the
// input error that makes the recombination direction impossible.
func (n *Network) recombinationProducts() ([]*rrkm.Species, error) {
	m := n.Model
	if len(m.Reaction.Products) != 2 {
		return nil, &input.FieldError{File: m.File, Path: "reaction.products", Value: strings.Join(m.Reaction.Products, ", "),
			Err: errors.New("a recombination needs exactly two products"), Hint: "write products: [A, B], or use --direction forward"}
	}
	if !m.Reaction.HasReactionEnergy {
		return nil, &input.FieldError{File: m.File, Path: "reaction.reaction-energy",
			Err:  errors.New("missing: the recombination direction needs the reaction energy"),
			Hint: "add reaction-energy: (ΔE0 of the products above the reactant, zero-point corrected), e.g. 85 kcal/mol"}
	}
	var prods []*rrkm.Species
	for i, name := range m.Reaction.Products {
		p := m.Molecule(name)
		path := fmt.Sprintf("reaction.products[%d]", i)
		if p == nil {
			return nil, &input.FieldError{File: m.File, Path: path, Value: name,
				Err:  errors.New("not described in molecules: K_c needs its partition function"),
				Hint: "add the product to molecules with mass, vibrations, rotation (with symmetry) and electronic levels"}
		}
		if p.IsTS || !(p.Mass > 0) {
			return nil, &input.FieldError{File: m.File, Path: "molecules." + name, Value: name,
				Err: errors.New("a product must be a stable molecule with a mass"), Hint: "give mass: and no energy:"}
		}
		prods = append(prods, &p.Species)
	}
	return prods, nil
}

// recombine turns the forward result into the reverse recombination. It
// divides k, k∞ and k0 by K_c(T) from the partition functions of the
// reactant and products (rrkm.EquilibriumConstant), so that k_f/k_r = K_c
// holds exactly at every grid point.
func (n *Network) recombine(out *RatesResult) error {
	m := n.Model
	prods, err := n.recombinationProducts()
	if err != nil {
		return err
	}
	r := n.reactant()
	out.Direction = string(Recombination)
	out.Order, out.Reactants, out.Products = 2, m.Reaction.Products, []string{r.Name}
	out.KUnits, out.K0Units = "cm3 molecule-1 s-1", "cm6 molecule-2 s-1"
	out.Reaction = strings.Join(out.Reactants, " + ") + " -> " + strings.Join(out.Products, " + ")
	k := make([][]float64, len(out.K))
	for i, t := range out.Temperatures {
		kc := rrkm.EquilibriumConstant(&r.Species, prods, m.Reaction.ReactionEnergy, t)
		if !(kc > 0) || math.IsInf(kc, 0) {
			return numericalf("K_c(%g K) = %v: not a finite positive number (hint: check reaction-energy)", t, kc)
		}
		k[i] = make([]float64, len(out.K[i]))
		for j, x := range out.K[i] {
			k[i][j] = x / kc
		}
		out.KInf[i] /= kc
		out.KInfIntegrated[i] /= kc
		out.K0[i] /= kc
	}
	out.K = k
	if h := out.HeldOut; h != nil {
		for i, t := range h.Temperatures {
			kc := rrkm.EquilibriumConstant(&r.Species, prods, m.Reaction.ReactionEnergy, t)
			if !(kc > 0) || math.IsInf(kc, 0) {
				return numericalf("K_c(%g K) = %v: not a finite positive number (hint: check reaction-energy)", t, kc)
			}
			row := make([]float64, len(h.K[i]))
			for j, x := range h.K[i] {
				row[j] = x / kc
			}
			h.K[i] = row
		}
	}
	return nil
}
