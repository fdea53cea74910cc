package gpe

import (
	"context"
	"errors"
	"fmt"
	"math"

	"socmap/gpe/fft"
)

// Atomic Bragg diffraction: a two-photon Bragg pulse simulated on a state.
//
// Two far-detuned beams whose wavevectors differ by Q along x and whose
// frequencies differ by ω_B make a moving, spin-independent lattice
//
//	V(x, t) = ħΩ_B cos(Qx − ω_B t + φ),
//
// which couples the plane waves p and p + Q with the matrix element ħΩ_B/2
// (Ω_B the two-photon Rabi frequency: a resonant pair oscillates as
// sin²(Ω_B t/2); common practice, no source) and transfers the energy ħω_B:
// the transition p → p + Q is resonant at ħω_B = E(p + Q) − E(p). The
// pulse is evolved with the real-time GPE (RealTime, the lattice as
// RTHamiltonian.Lattice*), with everything else of the Hamiltonian on.

// BraggPulse is a two-photon Bragg probe, in the units of the grid.
type BraggPulse struct {
	Q         float64 // lattice wavenumber (k_ref); the stripe's 2k₁
	Rabi      float64 // two-photon Rabi frequency Ω_B (E_ref/ħ): V = Ω_B cos(Qx − ω_B t + φ)
	Frequency float64 // beam frequency difference ω_B (E_ref/ħ)
	Duration  float64 // pulse length (ħ/E_ref); rectangular
	Phase     float64 // lattice phase φ at the start of the pulse (rad)
	// Order, OrderWidth (k_ref): the momentum order whose population
	// change BraggTransfer also reports, the canonical k_x within
	// OrderWidth of Order (OrderWidth 0: none).
	Order, OrderWidth float64
}

// BraggResult is the outcome of one pulse.
type BraggResult struct {
	// Moved: the fraction of the atoms whose momentum the lattice changed,
	// ½ Σ_{σ,k} |P_σ(k) − P⁰_σ(k)| (see BraggTransfer).
	Moved float64
	// Order: the change of the population of the order BraggPulse.Order
	// (signed, fraction of the atoms; 0 without an order).
	Order float64
}

// BraggTransfer applies the pulse p to st (under h, the Hamiltonian held
// during the pulse) for each lattice phase in phases (p.Phase ignored) and
// returns for each the diffracted fraction — the fraction of the atoms
// whose momentum the lattice changed,
//
//	D = ½ Σ_{σ,k} |P_σ(k) − P⁰_σ(k)|,
//
// P the momentum distribution (canonical k, per component, normalised to
// 1) after the pulse and P⁰ after the same time without the lattice (so
// that the evolution the state makes anyway, e.g. in a trap, is not
// counted). D is the total-variation distance of the two distributions; for
// a weak resonant pulse on a single plane wave it is the population of the
// diffracted order, (Ω_B τ/2)²·|⟨χ(p + Q)|χ(p)⟩|² (first-order perturbation
// theory, textbook), χ the spinors — and the population change of the
// order p.Order. s: settings of the evolution (EMax is raised to that of h
// with the lattice when smaller). ctx (may be nil) interrupts it (the
// error is then ctx.Err()).
func BraggTransfer(ctx context.Context, st *State, h RTHamiltonian, p BraggPulse, phases []float64, s RTSettings) ([]BraggResult, error) {
	if st == nil || st.Grid == nil {
		return nil, errors.New("gpe: Bragg pulse: no state")
	}
	if !(p.Duration >= 0) || math.IsInf(p.Duration, 0) || math.IsNaN(p.Rabi) || math.IsInf(p.Rabi, 0) || math.IsNaN(p.Q) || math.IsNaN(p.Frequency) {
		return nil, fmt.Errorf("gpe: Bragg pulse: duration %g, Rabi frequency %g, Q %g, frequency %g: need finite values and a duration ≥ 0", p.Duration, p.Rabi, p.Q, p.Frequency)
	}
	g := st.Grid
	np := 0.0
	for i := range st.Psi[0] {
		np = math.Max(np, abs2(st.Psi[0][i])+abs2(st.Psi[1][i]))
	}
	hl := h
	hl.LatticeAmp, hl.LatticeQ = p.Rabi, p.Q
	if e := RTMaxEnergy(g, hl, np); e > s.EMax {
		s.EMax = e
	}
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	defer tr.Close()
	buf := fft.Aligned(g.Size)
	dist := func(x *State, out [2][]float64) {
		tot := 0.0
		for c := 0; c < 2; c++ {
			copy(buf, x.Psi[c])
			tr.Forward(buf)
			for i, v := range buf {
				out[c][i] = abs2(v)
				tot += out[c][i]
			}
		}
		for c := 0; c < 2; c++ {
			for i := range out[c] {
				out[c][i] /= tot
			}
		}
	}
	evolve := func(sched RTSchedule) (*State, error) {
		r, err := NewRealTime(st, s)
		if err != nil {
			return nil, err
		}
		defer r.Close()
		if _, err := r.Evolve(ctx, p.Duration, sched); err != nil {
			return nil, err
		}
		return r.State(), nil
	}
	ref, err := evolve(func(float64) RTHamiltonian { return h })
	if err != nil {
		return nil, err
	}
	p0 := [2][]float64{make([]float64, g.Size), make([]float64, g.Size)}
	p1 := [2][]float64{make([]float64, g.Size), make([]float64, g.Size)}
	dist(ref, p0)
	out := make([]BraggResult, len(phases))
	inner := g.Size / g.N[0]
	for j, phi := range phases {
		phi := phi
		x, err := evolve(func(t float64) RTHamiltonian {
			y := hl
			y.LatticePhase = phi - p.Frequency*t
			return y
		})
		if err != nil {
			return nil, err
		}
		dist(x, p1)
		d, o := 0.0, 0.0
		for c := 0; c < 2; c++ {
			for i := range p1[c] {
				d += math.Abs(p1[c][i] - p0[c][i])
				if p.OrderWidth > 0 && math.Abs(g.K[0][i/inner]-p.Order) < p.OrderWidth {
					o += p1[c][i] - p0[c][i]
				}
			}
		}
		out[j] = BraggResult{Moved: d / 2, Order: o}
	}
	return out, nil
}
