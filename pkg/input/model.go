package input

import (
	"errors"
	"fmt"
	"io"
	"os"
	"syscall"

	"github.com/falloff-kinetics/falloff/pkg/rrkm"
	"go.yaml.in/yaml/v3"
)

// Model is the content of an input file, checked and converted to internal
// units: energies in cm⁻¹, temperatures in K, masses in amu, lengths in Å,
// pressures in Pa.
type Model struct {
	File      string // name used in messages
	Title     string
	Molecules []*Molecule // in file order
	// Reaction is the one well's reaction; empty when Network is set.
	Reaction Reaction
	// Network, if set, is the file's network of wells (network:), in place
	// of Reaction.
	Network  *Network
	Bath     Bath
	Transfer EnergyTransfer
	// Temperatures are the grid temperatures in K, ascending.
	Temperatures []float64
	// Pressures are the grid pressures in Pa, ascending; nil if the file
	// has none (a high-pressure-limit calculation).
	Pressures []float64
	// Fits names the fitted forms asked for, in file order: arrhenius,
	// lindemann, troe, sri, plog, chebyshev.
	Fits       []string
	EnergyGrid EnergyGrid
	// Warnings are physically odd but accepted inputs, one line each,
	// naming the file and the field.
	Warnings []string
	// Source is the file's content as read (for provenance checksums).
	Source []byte

	index     *nodeIndex // where each field is in the file, for FieldError
	tempPaths []string   // tempPaths[i]: the field giving Temperatures[i]
}

// Molecule is a stable species or a transition state.
type Molecule struct {
	rrkm.Species
	IsTS bool          // the molecule has an energy: key (a transition state)
	LJ   *LennardJones // nil if not given
}

// LennardJones holds Lennard-Jones collision parameters.
type LennardJones struct {
	Sigma   float64 // σ in Å
	Epsilon float64 // ε/k_B in K
}

// Reaction names the unimolecular channel: a reactant passing a transition
// state to products.
type Reaction struct {
	Reactant string   // name of a stable molecule
	Via      string   // name of a transition state
	Products []string // names used in exported equations; need not be molecules
	// PathDegeneracy is the reaction-path degeneracy L given by the user;
	// 0 means auto, to be computed by rrkm.PathDegeneracy.
	PathDegeneracy float64
	// ReactionEnergy is ΔE0 of the products above the reactant (zero-point
	// corrected, cm⁻¹); needed with the products' molecular data to write
	// the reverse (recombination) direction. HasReactionEnergy says whether
	// the file gave it.
	ReactionEnergy    float64
	HasReactionEnergy bool
	// Tunnelling is NoTunnelling (default), Wigner or Eckart.
	Tunnelling Tunnelling
	// Rotation is how the external rotation of the well and its transition
	// states exchanges energy: AllActive (default) or AdiabaticJ. It is one
	// choice for the whole well, since the master equation's energy variable
	// (total or active energy) is the well's.
	Rotation Rotation
	// Barrierless, if set, makes the main channel barrierless (Via is then
	// empty): k(E) from the inverse Laplace transform of its k∞(T).
	Barrierless *Barrierless
	// Competing are further channels out of the same reactant.
	Competing []Channel
}

// Tunnelling names a tunnelling correction, as written in the input file.
type Tunnelling string

// Tunnelling corrections.
const (
	NoTunnelling Tunnelling = "none"
	Wigner       Tunnelling = "wigner"
	Eckart       Tunnelling = "eckart"
)

// Rotation names a treatment of the external rotation, as written in the
// input file.
type Rotation string

// Treatments of the external rotation.
const (
	// AllActive lets all three external rotations exchange energy freely
	// with the vibrations.
	AllActive Rotation = "all-active"
	// AdiabaticJ keeps the two-dimensional J rotation adiabatic, with
	// centrifugal thresholds, and lets the K rotor mix; the master equation
	// is solved at a few J of the thermal J distribution, J conserved in
	// collisions, and the rates averaged (rrkm.JQuadrature).
	AdiabaticJ Rotation = "adiabatic-j"
	// AdiabaticJAveraged is the standard one-dimensional reduction: one
	// master equation on the active energy with k(E) averaged over the
	// thermal J distribution (rrkm.RRKMAdiabatic).
	AdiabaticJAveraged Rotation = "adiabatic-j-averaged"
)

// Channel is a competing channel: through a transition state (Via) or
// barrierless, described by its high-pressure rate constant.
type Channel struct {
	Name              string
	Via               string // transition state, "" if barrierless
	Barrierless       *Barrierless
	Products          []string
	PathDegeneracy    float64 // 0 = auto
	ReactionEnergy    float64
	HasReactionEnergy bool
	Tunnelling        Tunnelling
}

// Barrierless is a channel without a barrier, given by
// k∞(T) = A·(T/T0)^N·exp(−Energy/kT); its k(E) comes from the inverse
// Laplace transform.
type Barrierless struct {
	A      float64 // s⁻¹
	T0     float64 // K
	N      float64 // ≥ 0
	Energy float64 // cm⁻¹, ≥ 0
}

// Bath describes the bath gas.
type Bath struct {
	Gas  string        // name, such as Ar or N2
	Mass float64       // amu; 0 means take it from the built-in table
	LJ   *LennardJones // nil means take it from the built-in table
	// CollisionRate is the collision rate constant Z/[M] in
	// cm³ molecule⁻¹ s⁻¹; 0 means compute it from Lennard-Jones parameters.
	CollisionRate float64
}

// EnergyTransfer names the collisional energy-transfer model.
type EnergyTransfer struct {
	Model TransferModel // ExponentialDown or StrongCollider; "" if not given
	// Alpha300 is α at 300 K in cm⁻¹ (exponential-down), ⟨ΔE⟩down.
	Alpha300 float64
	// AlphaExponent is n in α(T) = α300·(T/300 K)^n (exponential-down).
	AlphaExponent float64
	// Efficiency is the collision efficiency βc of the strong collider, in
	// (0, 1]; 1 unless given.
	Efficiency float64
}

// TransferModel names a collisional energy-transfer model, as written in
// the input file.
type TransferModel string

// Energy-transfer models.
const (
	ExponentialDown TransferModel = "exponential-down"
	StrongCollider  TransferModel = "strong-collider"
)

// EnergyGrid sets the grains of state counting and of the master equation.
type EnergyGrid struct {
	Fine  float64 // fine counting grain δ in cm⁻¹ (default 1)
	Grain float64 // reporting grain of states and micro in cm⁻¹ (default 10)
	// MEGrain is the master-equation grain in cm⁻¹; 0 means automatic,
	// min(α, kT)/5 at each temperature.
	MEGrain float64
	Ceiling float64 // top of the grid in cm⁻¹; 0 means choose automatically
}

// Default grains in cm⁻¹.
const (
	DefaultFineGrain = 1.0
	DefaultGrain     = 10.0
)

// Parse reads an input file's content; name is used in messages. A problem
// with a field is returned as a *FieldError; so is content longer than
// MaxFileBytes.
func Parse(name string, data []byte) (*Model, error) {
	p := &parser{file: name}
	if len(data) > MaxFileBytes {
		return nil, p.fileError(0, tooLarge(), hintTooLarge)
	}
	raw, err := p.decode(data)
	if err != nil {
		return nil, err
	}
	m, err := p.model(raw)
	if err != nil {
		return nil, err
	}
	m.Warnings = p.warnings
	m.Source = data
	m.index = p.index
	return m, nil
}

// FieldError returns a *FieldError about the field at path (a dotted path as
// in messages, such as bath.gas) with the field's line and its value as
// written, for checks a caller makes after Parse: against a built-in table,
// or of the memory a calculation would take.
func (m *Model) FieldError(path string, err error, hint string) *FieldError {
	p := &parser{file: m.File, index: m.index}
	var n *yaml.Node
	if m.index != nil {
		n = m.index.byPath[path]
	}
	return p.errAt(path, n, err, hint)
}

// Has reports whether the file gives the field at path.
func (m *Model) Has(path string) bool {
	if m.index == nil {
		return false
	}
	_, ok := m.index.byPath[path]
	return ok
}

// TemperaturePath returns the path of the field that gives Temperatures[i]:
// grid.temperatures.from or grid.temperatures.to at the ends of a range,
// grid.temperatures inside it, grid.temperatures.values[k] for a list.
func (m *Model) TemperaturePath(i int) string {
	if i < 0 || i >= len(m.tempPaths) {
		return "grid.temperatures"
	}
	return m.tempPaths[i]
}

// MaxFileBytes is the largest input file Parse and ReadFile accept, 1 MiB.
// An input describes one reaction network: the demo takes 1.3 kB, and a
// molecule of 150 atoms with its transition state about 10 kB, so a
// larger file is the wrong file (a table, a log, a device). The bound also
// caps the memory of parsing, which takes several hundred bytes per
// value.
const MaxFileBytes = 1 << 20

// ReadFile reads and parses the input file at path; path is used in
// messages. An error opening or reading the file is returned as it is (an
// *fs.PathError). It reads at most MaxFileBytes, so an endless stream
// (/dev/zero) or a huge file ends with a *FieldError at once; a named pipe
// is opened without waiting for a writer, so one that has none reads as
// empty instead of hanging.
func ReadFile(path string) (*Model, error) {
	data, err := readLimited(path, MaxFileBytes)
	if errors.Is(err, errTooLarge) {
		p := &parser{file: path}
		return nil, p.fileError(0, tooLarge(), hintTooLarge)
	}
	if err != nil {
		return nil, err
	}
	return Parse(path, data)
}

// errTooLarge marks a file longer than the limit readLimited was given.
var errTooLarge = errors.New("file too large")

// readLimited reads the file at path, up to limit bytes; a longer file is
// errTooLarge. O_NONBLOCK lets open return for a FIFO without a writer
// (reads then see end of file); it does not affect a regular file.
func readLimited(path string, limit int64) ([]byte, error) {
	f, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, limit+1))
	if err != nil {
		return nil, err
	}
	if int64(len(data)) > limit {
		return nil, errTooLarge
	}
	return data, nil
}

// tooLarge is the problem of a file beyond MaxFileBytes.
func tooLarge() error {
	return problemf("larger than %d MiB (%d bytes), the limit for an input file", MaxFileBytes>>20, MaxFileBytes)
}

const hintTooLarge = "an input file describes one reaction in a few kilobytes: is this the right file? (a table for fit is a .csv file)"

// Molecule returns the molecule called name, or nil if there is none.
func (m *Model) Molecule(name string) *Molecule {
	for _, mol := range m.Molecules {
		if mol.Name == name {
			return mol
		}
	}
	return nil
}

// ReactantAndTS returns the reactant and the transition state of the
// reaction. For a Model from Parse both exist.
// ts is nil for a barrierless main channel.
func (m *Model) ReactantAndTS() (reactant, ts *Molecule) {
	return m.Molecule(m.Reaction.Reactant), m.Molecule(m.Reaction.Via)
}

// parser carries the file name, the node index and the warnings through
// the checks.
type parser struct {
	// network says the file has a network: section: transition-state
	// energies are then measured from the reference well and may be
	// negative.
	inNetwork bool
	file      string
	data      []byte // the file's content, for messages about its lines
	index     *nodeIndex
	warnings  []string
	renames   []renameUse // old key names the file uses, for warnings
}

// threshold is one channel's threshold energy, for checks.
type threshold struct {
	name string  // the transition state, or "the barrierless channel NAME"
	e0   float64 // cm⁻¹
	path string  // the field that gives it
}

// thresholds lists the threshold of every channel out of the reactant: the
// main channel first, then the competing ones.
func (m *Model) thresholds() []threshold {
	var out []threshold
	add := func(via string, b *Barrierless, label, section string) {
		switch {
		case b != nil:
			out = append(out, threshold{label, b.Energy, section + ".barrierless.energy"})
		case m.Molecule(via) != nil:
			out = append(out, threshold{via, m.Molecule(via).E0, "molecules." + via + ".energy"})
		}
	}
	add(m.Reaction.Via, m.Reaction.Barrierless, "the barrierless main channel", "reaction")
	for i, c := range m.Reaction.Competing {
		label := fmt.Sprintf("the barrierless channel reaction.competing[%d]", i)
		if c.Name != "" {
			label = "the barrierless channel " + c.Name
		}
		add(c.Via, c.Barrierless, label, fmt.Sprintf("reaction.competing[%d]", i))
	}
	return out
}
