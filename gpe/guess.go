package gpe

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// GuessKind selects an initial state.
type GuessKind int

const (
	GuessPlaneWave GuessKind = iota // lower-band spinor at momentum K (snapped to the grid)
	GuessStripe                     // equal superposition of the lower-band spinors at ±K
	GuessRandom                     // complex Gaussian noise from Seed
	GuessGiven                      // the caller's State
)

// Guess is an initial state. In a harmonic trap every guess but GuessGiven
// is multiplied by a Gaussian envelope whose widths are the larger of the
// oscillator length and half the Thomas–Fermi radius.
type Guess struct {
	Name  string
	Kind  GuessKind
	K     float64 // k_R, for plane wave and stripe
	Seed  uint64  // for random
	State *State  // for GuessGiven
}

// DefaultGuesses returns the starts of DESIGN.md §5: a plane wave at each
// single-particle minimum, a stripe at ±k₁ (when there are two minima) and a
// random state with seed 1.
func DefaultGuesses(m Model) []Guess {
	var gs []Guess
	mins := BandMinima(m.Omega, m.Delta)
	for _, k := range mins {
		gs = append(gs, Guess{Name: fmt.Sprintf("plane-wave k=%+.4f", k), Kind: GuessPlaneWave, K: k})
	}
	if len(mins) == 2 {
		k1 := (mins[1] - mins[0]) / 2
		gs = append(gs, Guess{Name: fmt.Sprintf("stripe k1=%.4f", k1), Kind: GuessStripe, K: k1})
	}
	gs = append(gs, Guess{Name: "random seed=1", Kind: GuessRandom, Seed: 1})
	return gs
}

// SnapK returns the grid momentum 2πm/L_x nearest to k.
func (g *Grid) SnapK(k float64) float64 {
	dk := 2 * math.Pi / g.L[0]
	return math.Round(k/dk) * dk
}

// Build makes the initial state on p's grid, normalised to p.Model.Norm.
func (gs Guess) Build(p Problem) (*State, error) {
	g, m := p.Grid, p.Model
	st := NewState(g)
	switch gs.Kind {
	case GuessGiven:
		if err := gs.State.check(g); err != nil {
			return nil, err
		}
		copy(st.Psi[0], gs.State.Psi[0])
		copy(st.Psi[1], gs.State.Psi[1])
		return st, st.Normalize(m.Norm)
	case GuessPlaneWave, GuessStripe:
		k := g.SnapK(gs.K)
		_, u1, d1 := LowerBand(k, m.Omega, m.Delta)
		_, u2, d2 := LowerBand(-k, m.Omega, m.Delta)
		for idx := 0; idx < g.Size; idx++ {
			i, _, _ := g.Coords(idx)
			x := g.X[0][i]
			ph := complex(math.Cos(k*x), math.Sin(k*x))
			if gs.Kind == GuessPlaneWave {
				st.Psi[0][idx] = complex(u1, 0) * ph
				st.Psi[1][idx] = complex(d1, 0) * ph
			} else {
				pm := complex(real(ph), -imag(ph))
				st.Psi[0][idx] = complex(u1, 0)*ph + complex(u2, 0)*pm
				st.Psi[1][idx] = complex(d1, 0)*ph + complex(d2, 0)*pm
			}
		}
	case GuessRandom:
		r := rand.New(rand.NewPCG(gs.Seed, 0x50c3a9))
		for c := 0; c < 2; c++ {
			for i := range st.Psi[c] {
				st.Psi[c][i] = complex(r.NormFloat64(), r.NormFloat64())
			}
		}
	default:
		return nil, fmt.Errorf("gpe: unknown guess kind %d", gs.Kind)
	}
	if m.Potential.Kind == Harmonic {
		applyEnvelope(st, m)
	}
	return st, st.Normalize(m.Norm)
}

func applyEnvelope(st *State, m Model) {
	g := st.Grid
	var w [3]float64
	mu := ThomasFermiMu(g.Dim, m)
	for a := 0; a < g.Dim; a++ {
		om := m.Potential.AngularFreq[a]
		w[a] = OscillatorLength(om)
		if mu > 0 {
			w[a] = math.Max(w[a], math.Sqrt(mu)/om) // half the TF radius 2√μ/ω
		}
	}
	for idx := 0; idx < g.Size; idx++ {
		i, j, l := g.Coords(idx)
		c := [3]float64{g.X[0][i], g.X[1][j], g.X[2][l]}
		s := 0.0
		for a := 0; a < g.Dim; a++ {
			s += c[a] * c[a] / (2 * w[a] * w[a])
		}
		f := complex(math.Exp(-s), 0)
		st.Psi[0][idx] *= f
		st.Psi[1][idx] *= f
	}
}
