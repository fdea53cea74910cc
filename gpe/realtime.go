package gpe

import (
	"fmt"
	"math/cmplx"

	"socmap/gpe/fft"
)

// Real-time evolution: the machinery shared by every time-dependent solver of
// the package.
//
// A real-time split step (split-step Fourier, Strang splitting) is a product
// of unitary factors of two kinds, each exact for its part of the
// Hamiltonian:
//
//   - a kinetic factor, diagonal in the wavenumber per component:
//     ψ_σ ← F⁻¹[f_σ(k) F ψ_σ] (KineticFactors), which carries the kinetic
//     energy and anything else diagonal in k (a spin-dependent vector
//     potential, the integral of a time-dependent impulse over the step);
//   - a local SU(2) factor, one 2×2 unitary per grid point
//     (LocalRotation), which carries a coupling between the components that
//     may vary in space (an RF or Raman coupling with a position-dependent
//     phase) together with any detuning.
//
// Stepper holds a two-component state on a grid of any shape with its own
// FFT plan (gpe/fft, planned once, reused) and applies such factors in place,
// allocating nothing. The factors are tables the solver precomputes: the
// lab-frame shaking integrator (LabFrame) builds the tables of one shaking
// period once and replays them; a solver with ramped settings builds or
// updates them as the settings change, and adds further factors of the same
// two kinds (a trap or a mean-field phase is a diagonal local factor).
// Stepper does not know units: the tables do.

// KineticFactors are the factors of a kinetic step, one per component and
// grid point in FFT order. They include the 1/N of the unnormalised inverse
// transform, so that a step is ψ_σ ← Backward(f_σ · Forward(ψ_σ)).
type KineticFactors [2][]complex128

// LocalRotation is a local SU(2) factor: at point j the matrix
//
//	U_j = [[α_j, −β_j*], [β_j, α_j*]],   |α_j|² + |β_j|² = 1,
//
// acting on (ψ↑, ψ↓). Alpha and Beta have one entry per grid point.
type LocalRotation struct {
	Alpha, Beta []complex128
}

// NewLocalRotation allocates a rotation table of n points (the identity).
func NewLocalRotation(n int) LocalRotation {
	r := LocalRotation{Alpha: make([]complex128, n), Beta: make([]complex128, n)}
	for j := range r.Alpha {
		r.Alpha[j] = 1
	}
	return r
}

// SetXY stores at point j the rotation exp(−i(θ/2)(cos φ σx + sin φ σy)) by
// the angle θ = 2·half about an axis in the x–y plane at angle φ, given as
// e = e^{iφ}: α = cos(half), β = −i sin(half) e^{iφ}.
func (r LocalRotation) SetXY(j int, cosHalf, sinHalf float64, e complex128) {
	r.Alpha[j] = complex(cosHalf, 0)
	r.Beta[j] = complex(0, -sinHalf) * e
}

// Stepper is the state and FFT plan of one real-time evolution. Use it from
// one goroutine at a time; make one Stepper per goroutine. SetWorkers lets
// one Stepper spread its own passes over goroutines.
type Stepper struct {
	// Psi holds ψ↑, ψ↓ in position space between calls (row-major on the
	// shape given to NewStepper, buffers from fft.Aligned).
	Psi [2][]complex128
	tr  fft.Transform
	tr2 fft.Transform // the transform of ψ↓ when the components run in parallel (else tr)
	tmp []complex128

	shape []int
	b     fft.Backend
	opt   fft.Options
	pool  *pool // nil: serial
	// arguments of the pass the pool runs
	la    localArgs
	kf    *KineticFactors
	kz    [2]complex128
	kbase []complex128
	kshft *[2][]complex128
	kin   int
}

// Pass codes of a Stepper's pool.
const (
	stOpLocal = iota // localRange over a chunk
	stOpKin          // Kinetic of component w
	stOpKinX         // KineticX of component w
	stOpKinM1        // KineticMinus1 of component w
)

// NewStepper makes a stepper for arrays of the given shape (1 to 3 axes) with
// its own FFT plan on the backend b (fft.Default: FFTW unless built with the
// tag purego). The state starts at zero.
func NewStepper(shape []int, b fft.Backend, opt fft.Options) (*Stepper, error) {
	tr, err := fft.New(shape, b, opt)
	if err != nil {
		return nil, fmt.Errorf("gpe: real-time stepper: %w", err)
	}
	n := tr.Len()
	return &Stepper{Psi: [2][]complex128{fft.Aligned(n), fft.Aligned(n)}, tr: tr, tr2: tr, tmp: fft.Aligned(n),
		shape: append([]int(nil), shape...), b: b, opt: opt}, nil
}

// SetWorkers spreads the stepper's passes over n goroutines (n ≤ 1:
// serial, the default): local passes in n chunks of the grid, the two
// components' transforms and kinetic factors on two goroutines at once
// (each with its own transform). Every pass is pointwise or per component,
// so the result is the same for any n, bit for bit. The goroutines live
// until Close. Call it before stepping.
func (s *Stepper) SetWorkers(n int) error {
	if s.pool != nil {
		s.pool.close()
		s.pool = nil
	}
	if n <= 1 {
		if s.tr2 != s.tr {
			s.tr2.Close()
		}
		s.tr2 = s.tr
		return nil
	}
	n = max(2, min(n, 8))
	if s.tr2 == s.tr {
		t, err := fft.New(s.shape, s.b, s.opt)
		if err != nil {
			return fmt.Errorf("gpe: real-time stepper: %w", err)
		}
		s.tr2 = t
	}
	s.pool = newPool(n, s.run)
	return nil
}

// Workers is the number of goroutines of the passes (1: serial).
func (s *Stepper) Workers() int {
	if s.pool == nil {
		return 1
	}
	return s.pool.nw
}

func (s *Stepper) run(j job) {
	switch j.op {
	case stOpLocal:
		s.localRange(&s.la, j.lo, j.hi)
	case stOpKin:
		s.kineticC(j.w)
	case stOpKinX:
		s.kineticXC(j.w)
	case stOpKinM1:
		s.kineticMinus1C(j.w)
	}
}

// pair runs a per-component pass for both components.
func (s *Stepper) pair(op int) {
	if s.pool != nil {
		s.pool.pair(op)
		return
	}
	s.run(job{op: op, w: 0})
	s.run(job{op: op, w: 1})
}

func (s *Stepper) trFor(c int) fft.Transform {
	if c == 1 {
		return s.tr2
	}
	return s.tr
}

// Close releases the FFT plans and the stepper's goroutines.
func (s *Stepper) Close() {
	if s.pool != nil {
		s.pool.close()
		s.pool = nil
	}
	if s.tr2 != s.tr {
		s.tr2.Close()
	}
	s.tr.Close()
}

// Len is the number of grid points.
func (s *Stepper) Len() int { return len(s.tmp) }

// Kinetic applies a kinetic factor: ψ_σ ← Backward(z_σ f_σ Forward(ψ_σ)),
// with z_σ a constant factor per component (e.g. the phase of a uniform
// detuning over the step; 1 for none).
func (s *Stepper) Kinetic(f *KineticFactors, z [2]complex128) {
	s.kf, s.kz = f, z
	s.pair(stOpKin)
	s.kf = nil
}

func (s *Stepper) kineticC(c int) {
	tr := s.trFor(c)
	buf := s.Psi[c]
	tr.Forward(buf)
	k := s.kf[c][:len(buf)]
	zs := s.kz[c]
	for j := range buf {
		buf[j] *= k[j] * zs
	}
	tr.Backward(buf)
}

// Rotate applies a local SU(2) factor at every point.
func (s *Stepper) Rotate(r *LocalRotation) {
	up, dn := s.Psi[0], s.Psi[1]
	al, be := r.Alpha[:len(up)], r.Beta[:len(up)]
	dn = dn[:len(up)]
	for j := range up {
		u, d := up[j], dn[j]
		a, b := al[j], be[j]
		up[j] = a*u - cmplx.Conj(b)*d
		dn[j] = cmplx.Conj(a)*d + b*u
	}
}

// SumSquares returns Σ_j |ψ_σ[j]|² (multiply by the cell volume for the
// population of component σ).
func (s *Stepper) SumSquares(sigma int) float64 {
	t := 0.0
	for _, v := range s.Psi[sigma] {
		t += real(v)*real(v) + imag(v)*imag(v)
	}
	return t
}

// Spectrum returns the forward transform of component σ (unnormalised, FFT
// order) in a scratch buffer of the stepper, valid until the next call of
// Spectrum; the state is not changed.
func (s *Stepper) Spectrum(sigma int) []complex128 {
	copy(s.tmp, s.Psi[sigma])
	s.tr.Forward(s.tmp)
	return s.tmp
}
