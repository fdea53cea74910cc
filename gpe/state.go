package gpe

import (
	"fmt"
	"math"

	"socmap/gpe/fft"
)

// State is a two-component wavefunction on a grid: Psi[0] = ψ↑, Psi[1] = ψ↓,
// row-major (see Grid), in units where ∫|ψ|² dV is the norm of the model
// (length in 1/k_R).
type State struct {
	Grid *Grid
	Psi  [2][]complex128
}

// NewState returns a zero state on g (buffers aligned for FFTW).
func NewState(g *Grid) *State {
	return &State{Grid: g, Psi: [2][]complex128{fft.Aligned(g.Size), fft.Aligned(g.Size)}}
}

// Clone returns a deep copy.
func (s *State) Clone() *State {
	c := NewState(s.Grid)
	copy(c.Psi[0], s.Psi[0])
	copy(c.Psi[1], s.Psi[1])
	return c
}

// Norms returns ∫|ψ↑|² dV and ∫|ψ↓|² dV.
func (s *State) Norms() (up, down float64) {
	for i := range s.Psi[0] {
		up += abs2(s.Psi[0][i])
		down += abs2(s.Psi[1][i])
	}
	return up * s.Grid.DV, down * s.Grid.DV
}

// Normalize scales the state to ∫|ψ|² dV = norm.
func (s *State) Normalize(norm float64) error {
	u, d := s.Norms()
	t := u + d
	if !(t > 0) || math.IsInf(t, 0) {
		return fmt.Errorf("gpe: cannot normalise a state of norm %g", t)
	}
	f := complex(math.Sqrt(norm/t), 0)
	for c := 0; c < 2; c++ {
		for i := range s.Psi[c] {
			s.Psi[c][i] *= f
		}
	}
	return nil
}

func (s *State) check(g *Grid) error {
	if s == nil {
		return fmt.Errorf("gpe: nil state")
	}
	if len(s.Psi[0]) != g.Size || len(s.Psi[1]) != g.Size {
		return fmt.Errorf("gpe: state has %d/%d points, grid has %d", len(s.Psi[0]), len(s.Psi[1]), g.Size)
	}
	return nil
}
