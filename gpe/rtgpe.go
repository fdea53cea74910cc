package gpe

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"

	"socmap/gpe/fft"
)

// Real-time spinor GPE with time-dependent settings, on the Stepper.
//
// In the units of the grid (momentum k_ref, length 1/k_ref, energy
// E_ref = ħ²k_ref²/2m, time ħ/E_ref; ħ = 1, m = 1/2) the state evolves
// with
//
//	i∂ψ/∂t = [(k_x − κσ_z)² + k_⊥² + V(r) + (Ω/2)σ_x + (δ/2)σ_z
//	          + diag(g↑↑n↑ + g↑↓n↓, g↓↓n↓ + g↑↓n↑)] ψ,
//
// V = Σ_a ω_a² x_a²/4, where κ = k_R(t)/k_ref, Ω, δ, ω_a and g may all
// change in time (RTHamiltonian). A changing κ at fixed canonical momentum
// changes the mechanical momentum k_x − κσ_z: a synthetic electric field.
//
// One step of length τ is the Strang splitting (second order)
//
//	e^{−iAτ/2} e^{−iBτ/2} e^{−iKτ} e^{−iBτ/2} e^{−iAτ/2}
//
// (in time order, right to left as operators), with K = (k_x − κσ_z)² + k_⊥²
// exact in k (Stepper.KineticX), B = (Ω/2)σ_x + (δ/2)σ_z exact as a
// uniform SU(2) (CouplingSU2) and A = V + mean field exact as a local phase
// (DiagonalPhase). K takes the settings at the step's midpoint, the first
// A, B those at its start and the last A, B those at its end; the last
// A/2·B/2 of a step and the first of the next are fused into one local
// pass B/2·A·B/2 at the common time (exact for A: it keeps |ψ_σ|²).
// Every factor is unitary: the norm is kept to rounding.

// RTHamiltonian is the Hamiltonian of RealTime at one instant, in the units
// of the grid (see above).
type RTHamiltonian struct {
	Omega float64 // Rabi coupling Ω in E_ref: term (Ω/2)σ_x
	Delta float64 // detuning δ in E_ref: term (δ/2)σ_z
	// Kappa is the recoil κ = k_R/k_ref of the SOC term (k_x − κσ_z)²
	// (signed; 0: no spin–orbit coupling).
	Kappa float64
	// TrapAngular: harmonic trap angular frequencies ω_a in E_ref/ħ per axis
	// (V = Σ ω_a² x_a²/4); 0 means no confinement along that axis (trap off).
	TrapAngular [3]float64
	// Couplings in E_ref·(1/k_ref)^d for ψ normalised to the atom number.
	Guu, Gdd, Gud float64
	// A spin-independent lattice along x, V_L = LatticeAmp·cos(LatticeQ·x
	// + LatticePhase) (E_ref, k_ref, rad; 0: none): the moving lattice of a
	// Bragg probe has LatticePhase = φ − ω_B t (BraggPulse). Its matrix
	// element between plane waves p and p + Q is LatticeAmp/2.
	LatticeAmp, LatticeQ, LatticePhase float64
}

// RTSchedule returns the Hamiltonian at time t (ħ/E_ref since the start of
// the evolution it is given to).
type RTSchedule func(t float64) RTHamiltonian

// RTStepPhase is the default phase per step of the fastest mode, rad: the
// default time step is RTStepPhase/E_max (RTMaxEnergy). A choice of this
// project (common practice, no source): small against 1 rad, so that the
// splitting error of the resolved dynamics is small; tests of this package
// check the resulting accuracy (norm, energy, Rabi frequency, expansion).
const RTStepPhase = 0.5

// RTStableLimit is the largest allowed τ·E_max, rad. Beyond π the phase per
// step of the fastest grid modes wraps and the split-step scheme for the
// nonlinear Schrödinger equation develops spurious instabilities
// (J. A. C. Weideman and B. M. Herbst, SIAM J. Numer. Anal. 23, 485 (1986),
// from memory); a time step with τ·E_max ≥ π is refused.
const RTStableLimit = math.Pi

// ErrUnstableStep is returned (wrapped) for a time step at or beyond the
// stability limit RTStableLimit.
var ErrUnstableStep = errors.New("time step beyond the split-step stability limit")

// RTMaxEnergy returns the largest energy scale of h on grid g for a peak
// density nPeak (atoms per (1/k_ref)^d), in E_ref: the largest kinetic
// energy on the grid (|k_x|max + |κ|)² + Σ_⊥ k_max², plus the coupling
// ½√(Ω² + δ²), the largest trap potential on the grid and the largest mean
// field (max(|g↑↑|, |g↓↓|) + |g↑↓|)·nPeak. The phase of every factor of a
// step of length τ stays below τ·RTMaxEnergy.
func RTMaxEnergy(g *Grid, h RTHamiltonian, nPeak float64) float64 {
	kin := 0.0
	v := 0.0
	for a := 0; a < g.Dim; a++ {
		km := 0.0
		if g.N[a] > 1 {
			km = math.Pi / g.Dx[a]
		}
		if a == 0 {
			km += math.Abs(h.Kappa)
		}
		kin += km * km
		xm := g.L[a] / 2
		v += h.TrapAngular[a] * h.TrapAngular[a] * xm * xm / 4
	}
	mf := (math.Max(math.Abs(h.Guu), math.Abs(h.Gdd)) + math.Abs(h.Gud)) * nPeak
	return kin + 0.5*math.Hypot(h.Omega, h.Delta) + v + mf + math.Abs(h.LatticeAmp)
}

// RTSettings configure RealTime. Zero fields take the documented defaults.
type RTSettings struct {
	// Dt: the time step in ħ/E_ref. Default RTStepPhase/EMax. A given step
	// with Dt·EMax ≥ RTStableLimit is refused (ErrUnstableStep).
	Dt float64
	// EMax: the largest energy scale of the evolution in E_ref
	// (RTMaxEnergy over every Hamiltonian it will see). Required.
	EMax float64
	// Backend: FFT backend. Default fft.Default.
	Backend fft.Backend
	// Threads: goroutines for the passes of a step (Stepper.SetWorkers:
	// local passes split over the grid, the two components transformed at
	// once). Default 0: 2 on grids of at least ParallelMin points when
	// GOMAXPROCS ≥ 2, else 1; negative: 1. The result does not depend on it.
	Threads int
}

// RealTime is a real-time spinor GPE evolution on a grid: the state, its
// Stepper (own FFT plan) and the step tables. Use it from one goroutine.
type RealTime struct {
	Grid *Grid
	// Dt is the time step in ħ/E_ref (RTSettings); Evolve shortens it so
	// that a duration is a whole number of steps.
	Dt float64
	// EMax is the energy scale the step was chosen from (E_ref).
	EMax float64
	// T is the time evolved so far, ħ/E_ref; Steps the steps taken.
	T     float64
	Steps int

	st    *Stepper
	inner int

	// kinetic tables: base = exp(−iτk²)/N for τ = baseTau; shift for κ.
	base     []complex128
	baseTau  float64
	shift    [2][]complex128
	shiftKap float64
	shiftTau float64
	// full tables exp(−iτ[(k_x − σκ)² + k_⊥²]) − 1 (Stepper.KineticMinus1),
	// for κ = fullKap held over consecutive steps; prevKap is the κ of the
	// last kinetic step.
	full             KineticFactors
	fullKap, fullTau float64
	prevKap          float64

	// trap potential on the grid for the angular frequencies vTrap.
	v      []float64
	vTrap  [3]float64
	vValid bool
	// trap + lattice (vl), with cos Qx, sin Qx of the lattice wavenumber latQ.
	vl, latC, latS []float64
	latQ           float64
}

// NewRealTime starts an evolution of init (copied; normalisation kept) on
// its grid. Errors: a bad step or energy scale, a failed FFT plan.
func NewRealTime(init *State, s RTSettings) (*RealTime, error) {
	if init == nil || init.Grid == nil {
		return nil, errors.New("gpe: real time: no initial state")
	}
	g := init.Grid
	if err := init.check(g); err != nil {
		return nil, err
	}
	if !(s.EMax > 0) || math.IsInf(s.EMax, 0) {
		return nil, fmt.Errorf("gpe: real time: energy scale %g, need > 0 and finite", s.EMax)
	}
	dt := s.Dt
	switch {
	case dt == 0:
		dt = RTStepPhase / s.EMax
	case !(dt > 0) || math.IsInf(dt, 0):
		return nil, fmt.Errorf("gpe: real time: time step %g, need > 0", dt)
	case dt*s.EMax >= RTStableLimit:
		return nil, fmt.Errorf("%w: τ·E_max = %.3g rad ≥ π (τ = %.4g ħ/E_R, E_max = %.4g E_R); use τ < %.4g ħ/E_R", ErrUnstableStep, dt*s.EMax, dt, s.EMax, RTStableLimit/s.EMax)
	}
	st, err := NewStepper(g.Shape(), s.Backend, fft.Options{})
	if err != nil {
		return nil, err
	}
	th := s.Threads
	if th == 0 {
		th = 1
		if g.Size >= ParallelMin && runtime.GOMAXPROCS(0) >= 2 {
			th = 2
		}
	}
	if err := st.SetWorkers(th); err != nil {
		st.Close()
		return nil, err
	}
	copy(st.Psi[0], init.Psi[0])
	copy(st.Psi[1], init.Psi[1])
	r := &RealTime{Grid: g, Dt: dt, EMax: s.EMax, st: st, inner: g.Size / g.N[0],
		base: fft.Aligned(g.Size), baseTau: math.NaN(), shiftKap: math.NaN(), shiftTau: math.NaN(), fullKap: math.NaN(), prevKap: math.NaN(),
		shift: [2][]complex128{make([]complex128, g.N[0]), make([]complex128, g.N[0])}, v: make([]float64, g.Size)}
	return r, nil
}

// Close releases the FFT plans and the goroutines of the step.
func (r *RealTime) Close() { r.st.Close() }

// Workers is the number of goroutines a step runs on (RTSettings.Threads).
func (r *RealTime) Workers() int { return r.st.Workers() }

// Psi returns the two components (position space; the stepper's buffers,
// valid until the next Evolve).
func (r *RealTime) Psi() [2][]complex128 { return r.st.Psi }

// State returns a copy of the current state.
func (r *RealTime) State() *State {
	s := NewState(r.Grid)
	copy(s.Psi[0], r.st.Psi[0])
	copy(s.Psi[1], r.st.Psi[1])
	return s
}

// SetState replaces the state (same grid).
func (r *RealTime) SetState(s *State) error {
	if err := s.check(r.Grid); err != nil {
		return err
	}
	copy(r.st.Psi[0], s.Psi[0])
	copy(r.st.Psi[1], s.Psi[1])
	return nil
}

// Norm is ∫(|ψ↑|² + |ψ↓|²) dV.
func (r *RealTime) Norm() float64 {
	return (r.st.SumSquares(0) + r.st.SumSquares(1)) * r.Grid.DV
}

func (r *RealTime) setBase(tau float64) {
	if tau == r.baseTau {
		return
	}
	g := r.Grid
	inv := 1 / float64(g.Size)
	for idx := range r.base {
		i, j, l := g.Coords(idx)
		k2 := g.K[0][i]*g.K[0][i] + g.K[1][j]*g.K[1][j] + g.K[2][l]*g.K[2][l]
		if g.Dim < 3 {
			k2 -= g.K[2][l] * g.K[2][l]
		}
		if g.Dim < 2 {
			k2 -= g.K[1][j] * g.K[1][j]
		}
		r.base[idx] = unitPhase(-tau*k2) * complex(inv, 0)
	}
	r.baseTau = tau
}

func (r *RealTime) setShift(kappa, tau float64) {
	if kappa == r.shiftKap && tau == r.shiftTau {
		return
	}
	for i, kx := range r.Grid.K[0] {
		e := unitPhase(2 * tau * kappa * kx)
		r.shift[0][i] = e
		r.shift[1][i] = cmplx.Conj(e)
	}
	r.shiftKap, r.shiftTau = kappa, tau
}

// potential returns the potential table for h: the trap, plus the lattice
// when h has one (nil: no potential).
func (r *RealTime) potential(h *RTHamiltonian) []float64 {
	v := r.trapTable(h)
	if h.LatticeAmp == 0 {
		return v
	}
	g := r.Grid
	if r.vl == nil {
		r.vl, r.latC, r.latS = make([]float64, g.Size), make([]float64, g.Size), make([]float64, g.Size)
		r.latQ = math.NaN()
	}
	if h.LatticeQ != r.latQ {
		for idx := range r.latC {
			r.latS[idx], r.latC[idx] = math.Sincos(h.LatticeQ * g.X[0][idx/r.inner])
		}
		r.latQ = h.LatticeQ
	}
	// cos(Qx + φ) = cos Qx cos φ − sin Qx sin φ
	sp, cp := math.Sincos(h.LatticePhase)
	a, b := h.LatticeAmp*cp, h.LatticeAmp*sp
	for idx := range r.vl {
		w := a*r.latC[idx] - b*r.latS[idx]
		if v != nil {
			w += v[idx]
		}
		r.vl[idx] = w
	}
	return r.vl
}

// trapTable returns the trap table for h (nil without a trap).
func (r *RealTime) trapTable(h *RTHamiltonian) []float64 {
	g := r.Grid
	any := false
	for a := 0; a < g.Dim; a++ {
		any = any || h.TrapAngular[a] != 0
	}
	if !any {
		return nil
	}
	if r.vValid && h.TrapAngular == r.vTrap {
		return r.v
	}
	var w2 [3]float64
	for a := 0; a < g.Dim; a++ {
		w2[a] = h.TrapAngular[a] * h.TrapAngular[a] / 4
	}
	for idx := range r.v {
		i, j, l := g.Coords(idx)
		x, y, z := g.X[0][i], g.X[1][j], g.X[2][l]
		v := w2[0] * x * x
		if g.Dim > 1 {
			v += w2[1] * y * y
		}
		if g.Dim > 2 {
			v += w2[2] * z * z
		}
		r.v[idx] = v
	}
	r.vTrap, r.vValid = h.TrapAngular, true
	return r.v
}

func (r *RealTime) local(h *RTHamiltonian, tauBefore, tauA, tauAfter float64) {
	d := DiagonalPhase{Tau: tauA, V: r.potential(h), Guu: h.Guu, Gdd: h.Gdd, Gud: h.Gud}
	r.st.Local(CouplingSU2(h.Omega, h.Delta, tauBefore), &d, CouplingSU2(h.Omega, h.Delta, tauAfter))
}

// kinetic applies exp(−iτK). While κ is held (the same as at the previous
// step) it uses full best-rounded tables, so that the norm does not drift
// by a systematic rounding per step; while κ changes, the common table
// times a per-k_x factor (Stepper.KineticX), whose rounding varies from step
// to step. The global phase exp(−iτκ²) is left out of the full tables (it
// changes no observable).
func (r *RealTime) kinetic(h *RTHamiltonian, tau float64) {
	k := h.Kappa
	held := k == r.prevKap
	r.prevKap = k
	if held {
		if k != r.fullKap || tau != r.fullTau {
			r.setFull(k, tau)
		}
		r.st.KineticMinus1(&r.full)
		return
	}
	r.setBase(tau)
	r.setShift(k, tau)
	z := cmplx.Rect(1, -tau*k*k)
	r.st.KineticX(r.base, &r.shift, r.inner, [2]complex128{z, z})
}

func (r *RealTime) setFull(kappa, tau float64) {
	g := r.Grid
	if r.full[0] == nil {
		r.full = KineticFactors{fft.Aligned(g.Size), fft.Aligned(g.Size)}
	}
	for idx := range r.full[0] {
		i, j, l := g.Coords(idx)
		kp := 0.0
		if g.Dim > 1 {
			kp += g.K[1][j] * g.K[1][j]
		}
		if g.Dim > 2 {
			kp += g.K[2][l] * g.K[2][l]
		}
		ku, kd := g.K[0][i]-kappa, g.K[0][i]+kappa
		r.full[0][idx] = phaseMinus1(tau * (ku*ku + kp))
		r.full[1][idx] = phaseMinus1(tau * (kd*kd + kp))
	}
	r.fullKap, r.fullTau = kappa, tau
}

// Evolve advances the state by duration (ħ/E_ref) with the Hamiltonian
// sched(t), t measured from the start of this call, in n = ⌈duration/Dt⌉
// equal steps (the state is at the end time when Evolve returns: sample
// observables between calls). ctx (may be nil) is checked between steps;
// when it is cancelled the step in progress is completed and closed, and
// Evolve returns the steps taken with ctx.Err() (the state is then at the
// time T). Allocates nothing per step.
func (r *RealTime) Evolve(ctx context.Context, duration float64, sched RTSchedule) (int, error) {
	if !(duration >= 0) || math.IsInf(duration, 0) {
		return 0, fmt.Errorf("gpe: real time: duration %g, need ≥ 0", duration)
	}
	if duration == 0 {
		return 0, nil
	}
	n := int(math.Ceil(duration/r.Dt - 1e-9))
	if n < 1 {
		n = 1
	}
	tau := duration / float64(n)
	h0 := sched(0)
	r.local(&h0, 0, tau/2, tau/2)
	for i := 0; i < n; i++ {
		t0 := float64(i) * tau
		hm := sched(t0 + tau/2)
		r.kinetic(&hm, tau)
		h1 := sched(t0 + tau)
		r.T += tau
		r.Steps++
		var err error
		if ctx != nil {
			err = ctx.Err()
		}
		if i == n-1 || err != nil {
			r.local(&h1, tau/2, tau/2, 0)
			return i + 1, err
		}
		r.local(&h1, tau/2, tau, tau/2)
	}
	return n, nil
}
