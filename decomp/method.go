package decomp

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
)

// RoundState is what a price-update method sees after a round. Methods
// must not modify it.
type RoundState struct {
	Round int
	Sense Sense
	Rows  []Row
	// Value is L at the current prices; Bound is the best L so far.
	Value, Bound float64
	// Improved reports whether this round improved the best bound.
	Improved bool
	// Target is the value the step aims at: the best plan value when a
	// plan exists, else an estimate beyond the bound.
	Target  float64
	HasPlan bool
	// Subgradient is use − rhs, projected: components that would push a
	// price at zero out of its valid sign are set to zero.
	Subgradient []float64
	// BestPrices are the prices that gave Bound.
	BestPrices []float64
	// Answers are the block answers of this round (for rules that use
	// block primal answers).
	Answers []Answer
}

// Step is what a method reports after moving the prices.
type Step struct {
	// Length is the step length used (recorded in the history).
	Length float64
	// Stop ends the run after this round with Status MethodStopped and
	// Reason as the method's own explanation.
	Stop   bool
	Reason string
}

// Method updates prices between rounds. The engine projects the prices
// onto their valid signs after every update and owns the round loop,
// limits and bookkeeping.
//
// A method whose state must survive a checkpoint also implements
// [StatefulMethod]; its state is then part of the run's [State].
type Method interface {
	// Init prepares the method for a problem with the given rows.
	Init(sense Sense, rows []Row)
	// Update moves prices in place. It may end the run (Step.Stop) or fail;
	// an error ends Solve with that error.
	Update(s *RoundState, prices []float64) (Step, error)
}

// StatefulMethod is a Method whose state can be captured and restored, so
// that a resumed run continues exactly where it stopped. UnmarshalState is
// called after Init and must refuse data it did not write with an error.
type StatefulMethod interface {
	Method
	MarshalState() ([]byte, error)
	UnmarshalState(data []byte) error
}

// Subgradient is the classical subgradient rule with a Polyak-type step
//
//	t = θ · |target − L| / ||g||²
//
// moving the prices along g (towards a better bound), where θ is halved
// after Patience rounds in a row without a better bound (Held & Karp
// 1971; Held, Wolfe & Crowder 1974). The zero value uses θ = 2 and
// Patience = 20.
type Subgradient struct {
	Theta    float64 // starting θ; <= 0 means 2
	Patience int     // non-improving rounds before halving θ; <= 0 means 20
	MinTheta float64 // θ never drops below this; <= 0 means 1e-6
	// StopTheta, when positive, ends the run (Step.Stop) as soon as a
	// halving takes θ below it: the steps are then too short to move the
	// bound (a short node re-solve uses it).
	StopTheta float64

	theta float64
	idle  int
}

// Init implements Method.
func (m *Subgradient) Init(Sense, []Row) {
	m.theta = m.Theta
	if m.theta <= 0 {
		m.theta = 2
	}
	m.idle = 0
}

// CurrentTheta returns the θ in use.
func (m *Subgradient) CurrentTheta() float64 { return m.theta }

// Idle returns the rounds since the last better bound, as the rule counts
// them towards Patience.
func (m *Subgradient) Idle() int { return m.idle }

// subgradientStateTag starts a Subgradient's state (version 1).
const subgradientStateTag = "subgrad1"

// MarshalState implements StatefulMethod: θ and the idle count.
func (m *Subgradient) MarshalState() ([]byte, error) {
	b := make([]byte, 0, len(subgradientStateTag)+16)
	b = append(b, subgradientStateTag...)
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.theta))
	b = binary.LittleEndian.AppendUint64(b, uint64(m.idle))
	return b, nil
}

// UnmarshalState implements StatefulMethod.
func (m *Subgradient) UnmarshalState(data []byte) error {
	n := len(subgradientStateTag)
	if len(data) != n+16 || string(data[:n]) != subgradientStateTag {
		return errors.New("decomp: not a subgradient rule's state")
	}
	theta := math.Float64frombits(binary.LittleEndian.Uint64(data[n:]))
	idle := binary.LittleEndian.Uint64(data[n+8:])
	if !(theta > 0) || math.IsInf(theta, 0) || idle > math.MaxInt32 {
		return fmt.Errorf("decomp: subgradient state out of range (θ %v, idle %d)", theta, idle)
	}
	m.theta, m.idle = theta, int(idle)
	return nil
}

// Update implements Method.
func (m *Subgradient) Update(s *RoundState, prices []float64) (Step, error) {
	patience := m.Patience
	if patience <= 0 {
		patience = 20
	}
	minTheta := m.MinTheta
	if minTheta <= 0 {
		minTheta = 1e-6
	}
	if s.Improved {
		m.idle = 0
	} else {
		m.idle++
		if m.idle >= patience {
			m.theta = math.Max(m.theta/2, minTheta)
			m.idle = 0
			if m.StopTheta > 0 && m.theta < m.StopTheta {
				return Step{Stop: true, Reason: fmt.Sprintf("step factor %.3g below %.3g", m.theta, m.StopTheta)}, nil
			}
		}
	}
	norm2 := 0.0
	for _, g := range s.Subgradient {
		norm2 += g * g
	}
	if norm2 == 0 {
		return Step{}, nil
	}
	t := m.theta * math.Abs(s.Target-s.Value) / norm2
	dir := 1.0
	if s.Sense == Maximise {
		dir = -1
	}
	for r, g := range s.Subgradient {
		prices[r] += dir * t * g
	}
	return Step{Length: t}, nil
}
