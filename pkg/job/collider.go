package job

import (
	"errors"
	"fmt"
	"strings"

	"github.com/falloff-kinetics/falloff/pkg/collision"
	"github.com/falloff-kinetics/falloff/pkg/input"
)

// BathInfo describes the collider for reports.
type BathInfo struct {
	Gas    string  `json:"gas"`
	Mass   float64 `json:"mass_amu"`
	Sigma  float64 `json:"sigma_angstrom,omitempty"`
	Eps    float64 `json:"epsilon_K,omitempty"`
	Source string  `json:"source"`
}

// collider combines the reactant's and the bath gas's data into the
// collision rate constant, from the built-in table unless the file overrides
// them or gives the rate constant itself.
func collider(m *input.Model) (collision.Collider, BathInfo, error) {
	r, _ := m.ReactantAndTS()
	return colliderWith(m, r)
}

// colliderWith is collider for the molecule r colliding with the bath gas.
func colliderWith(m *input.Model, r *input.Molecule) (collision.Collider, BathInfo, error) {
	b := m.Bath
	info := BathInfo{Gas: b.Gas, Mass: b.Mass, Source: "input file"}
	if b.CollisionRate > 0 {
		info.Source = fmt.Sprintf("collision rate %g cm3/molecule/s given in the input file", b.CollisionRate)
		return collision.Collider{Fixed: b.CollisionRate}, info, nil
	}
	table, known := collision.LookupBath(b.Gas)
	if known {
		info.Source = table.Source
	}
	if info.Mass == 0 {
		info.Mass = table.Mass
	}
	lj := table.LJ
	if b.LJ != nil {
		lj = collision.LennardJones{Sigma: b.LJ.Sigma, Epsilon: b.LJ.Epsilon}
	} else if !known {
		return collision.Collider{}, info, m.FieldError("bath.gas", errors.New("not in the built-in bath-gas table"),
			"give bath.mass and bath.lennard-jones, or bath.collision-rate; the table has "+strings.Join(collision.BathNames(), ", "))
	}
	if info.Mass == 0 {
		return collision.Collider{}, info, m.FieldError("bath.mass", fmt.Errorf("missing: no mass for bath gas %q", b.Gas), "give bath.mass, e.g. 28.01 amu")
	}
	info.Sigma, info.Eps = lj.Sigma, lj.Epsilon
	if r.LJ == nil {
		return collision.Collider{}, info, m.FieldError("molecules."+r.Name+".lennard-jones",
			errors.New("missing: the collision rate with the bath gas needs the reactant's Lennard-Jones parameters"),
			"add lennard-jones: {sigma: 5.0 angstrom, epsilon: 400 K} to the reactant, or give bath.collision-rate")
	}
	if r.Mass == 0 {
		return collision.Collider{}, info, m.FieldError("molecules."+r.Name+".mass",
			errors.New("missing: the collision rate needs the reactant's mass"), "add mass: e.g. 70.09 amu")
	}
	pair := collision.Combine(collision.LennardJones{Sigma: r.LJ.Sigma, Epsilon: r.LJ.Epsilon}, lj)
	return collision.Collider{LJ: pair, Mu: collision.ReducedMass(r.Mass, info.Mass)}, info, nil
}

// transfer maps the input's energy-transfer model.
func transfer(m *input.Model) collision.Transfer {
	t := m.Transfer
	if t.Model == input.StrongCollider {
		return collision.Transfer{Strong: true, Efficiency: t.Efficiency}
	}
	return collision.Transfer{Alpha300: t.Alpha300, Exponent: t.AlphaExponent}
}
