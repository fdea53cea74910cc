package gpe

import (
	"fmt"
	"math"

	"socmap/dispersion"
)

// ShakeDrive is the time dependence of one setting of the gradient-shaking +
// RF-pulse scheme, for solving its dynamics without the cycle average (the
// lab-frame solvers DeltaSolver and LabFrame, the measurements of Verify):
// impulses, the RF envelope and the detuning convention. It is read-only
// after NewShakeDrive and may be shared between goroutines. Unlike the
// ground-state solvers of this package it works in SI units (m, s, 1/m,
// rad/s; frequencies named …Hz are ordinary frequencies), for one atom.
//
// # Physics (DESIGN.md, "Magnetic-gradient shaking + RF pulses")
//
// One atom moves along the gradient axis x in the lab frame. Its two
// pseudo-spin states feel the spin-dependent uniform force F_σ s(ωt) = μ_σ b′
// s(ωt), and the RF couples them with Rabi frequency Ω(t) (pulses centred at
// waveform phase θ, one per cycle). In the frame rotating with the RF carrier
//
//	iħ∂ψ_σ = [p²/2m − F_σ s(ωt) x ± ħΔ/2] ψ_σ + (ħΩ(t)/2) ψ_σ̄,   (+ for ↑)
//
// with Δ = 2π sgn(f0)(f_RF − |f0|) (so that the cycle average gives the
// model's (ħδ/2)σ_z with δ = Δ + micromotion shift, as in dispersion.Shake).
// The uniform force is carried exactly by the impulse A_σ(t) = ∫F_σ dt (zero
// cycle mean): ψ_σ(x,t) = exp(iA_σ(t)x/ħ) φ_σ(x,t), where φ_σ evolves under
// the kinetic energy (ħq + A_σ(t))²/2m, diagonal in the canonical wavenumber
// q, and the RF term becomes (ħΩ/2) exp(±iκ(t)x) with κ(t) = (A↑ − A↓)/ħ =
// k_t(ωt): an RF flip at time t moves the canonical momentum by ħκ(t). This is
// an exact rewriting of the lab-frame equation (no averaging); the kinetic
// momentum is p = ħq + A_σ(t) and |ψ_σ|² = |φ_σ|². The cycle-averaged momentum
// of a state is ħq, which is what "mean velocity" v = ħq/m means below.
//
// Position x = 0 is the null of the oscillating gradient (where the field is
// B0); the atoms start there. Away from it the oscillating field b′s(ωt)x
// shifts the RF resonance during a pulse: in the canonical picture this is
// the variation of κ(t) across the pulse, exp(iκ(t)x). A flipped atom moves
// at ħk_t/m relative to the unflipped one, so over an interrogation of length
// t it samples |x| ~ ħk_t t/m; when the spread of κ over a pulse times that
// distance is not small, the pulses' couplings no longer add up coherently
// and the effective Rabi frequency falls below the cycle average. Verify
// shows this; the cycle average does not.
//
// Two solvers of these equations:
//
//   - DeltaSolver: infinitely short pulses. A velocity class q couples only to
//     |↓, q + k_t(θ)⟩; over one period each state gains the exact phase
//     ∫(ħq_σ + A_σ)²/2mħ dt = [ħq_σ²/2m + ⟨A_σ²⟩/2mħ] T (the cross term
//     vanishes because ⟨A_σ⟩ = 0), and a pulse is the exact SU(2) rotation
//     exp(−i a σ_x/2) of area a. Iterated pulse by pulse: all orders in a.
//   - LabFrame (with LabWorker): finite pulses (rectangular, gaussian) and
//     the continuous drive, a split-step Fourier integration of φ on a
//     periodic 1-D grid (Strang splitting of the RF coupling, local in x,
//     and the kinetic part, exact in q including ∫A_σ and ∫A_σ² over each
//     step). Every step is unitary. It runs on the real-time machinery of
//     this package (Stepper).
type ShakeDrive struct {
	Shake  dispersion.Shake
	Result dispersion.ShakeResult // the effective (cycle-averaged) model of Shake

	Mass        float64 // kg
	AngularFreq float64 // shaking angular frequency ω = 2π f_shake, rad/s (not the Rabi coupling Ω)
	Period      float64 // T = 1/f_shake, s
	SignF0      float64 // sgn(f0), f0 = (E↓ − E↑)/h

	// A_σ(t) = AmpUp/AmpDown × S(ωt) (N s), S the zero-mean cycle integral
	// of the waveform (dispersion.Cycle): AmpUp = μ↑ b′/ω.
	AmpUp, AmpDown float64

	RabiPeak float64 // peak Rabi frequency of a pulse, rad/s (continuous: 2πΩ/2π)
	Area     float64 // pulse area per cycle ∫Ω dt, rad
	Tc       float64 // time of the first pulse centre, θ/ω (θ = Shake.PulsePhase), s

	cyc *dispersion.Cycle
}

// NewShakeDrive evaluates the effective model of p and prepares its drive.
func NewShakeDrive(p dispersion.Shake) (*ShakeDrive, error) {
	if p.Waveform == nil {
		p.Waveform = dispersion.Sine{}
	}
	r, err := p.Evaluate()
	if err != nil {
		return nil, err
	}
	cyc, err := dispersion.NewCycle(p.Waveform)
	if err != nil {
		return nil, err
	}
	d := &ShakeDrive{Shake: p, Result: r, Mass: p.Species.Mass, AngularFreq: 2 * math.Pi * p.ShakeHz,
		Period: 1 / p.ShakeHz, cyc: cyc}
	d.SignF0 = math.Copysign(1, p.Species.TransitionHz(p.Up, p.Down, p.Bias))
	d.AmpUp = r.MomentUp * p.Gradient / d.AngularFreq
	d.AmpDown = r.MomentDown * p.Gradient / d.AngularFreq
	d.Area = r.PulseArea
	d.RabiPeak = 2 * math.Pi * r.PeakRabiHz
	if p.Pulse == dispersion.PulseContinuous {
		d.RabiPeak = 2 * math.Pi * p.RabiHz
	}
	d.Tc = p.PulsePhase / d.AngularFreq
	return d, nil
}

// A returns the impulse A_σ(t) (N s) of state σ (0 = ↑, 1 = ↓).
func (d *ShakeDrive) A(sigma int, t float64) float64 {
	s := d.cyc.Impulse(d.AngularFreq * t)
	if sigma == 0 {
		return d.AmpUp * s
	}
	return d.AmpDown * s
}

// Kappa returns κ(t) = (A↑(t) − A↓(t))/ħ (1/m): the canonical momentum
// transfer of a flip ↑→↓ at time t; κ(θ/ω) = k_t of a delta pulse.
func (d *ShakeDrive) Kappa(t float64) float64 {
	return (d.AmpUp - d.AmpDown) * d.cyc.Impulse(d.AngularFreq*t) / dispersion.Hbar
}

// Detuning returns Δ = 2π sgn(f0)(f_RF − |f0|) in rad/s for an RF detuning
// f_RF − |f0| given in Hz.
func (d *ShakeDrive) Detuning(rfDetuningHz float64) float64 {
	return 2 * math.Pi * d.SignF0 * rfDetuningHz
}

// ModelResonanceHz is the effective model's flip resonance for an atom of
// mean velocity v (m/s) in ↑, as an RF detuning f_RF − |f0| in Hz:
//
//	sgn(f0)(f_RF − |f0|) = k_t v/2π + ħk_t²/(4πm) − (⟨A↑²⟩ − ⟨A↓²⟩)/(2mh)
//
// from equating the model energies of |↑, k⟩ and |↓, k⟩ (ħ(k ∓ k_R) = p),
// i.e. Doppler shift + 4E_R/h − micromotion shift.
func (d *ShakeDrive) ModelResonanceHz(v float64) float64 {
	kt := d.Result.KtMean
	return d.SignF0 * (kt*v/(2*math.Pi) + dispersion.Hbar*kt*kt/(4*math.Pi*d.Mass) - d.Result.MicroShiftHz)
}

// pulseHalf returns the half-length (s) of the part of a window, centred on
// the pulse, where the RF is on: rect τ/2, gauss 3·FWHM, continuous and
// pulses longer than a period T/2, delta 0.
func (d *ShakeDrive) pulseHalf() float64 {
	p := d.Shake
	switch p.Pulse {
	case dispersion.PulseRect:
		return math.Min(p.PulseWidth/2, d.Period/2)
	case dispersion.PulseGauss:
		return math.Min(3*p.PulseWidth, d.Period/2)
	case dispersion.PulseContinuous:
		return d.Period / 2
	}
	return 0
}

// RabiArea returns ∫Ω dt (rad) over [u1, u2], times relative to a pulse
// centre (|u| ≤ T/2). Gaussian pulses sum the neighbouring pulses of the
// train (Ω(u) = Ω_p exp(−4 ln2 u²/τ²), area Ω_p τ √(π/4ln2)); a rectangular
// pulse is Ω_p on |u| ≤ τ/2.
func (d *ShakeDrive) RabiArea(u1, u2 float64) float64 {
	p := d.Shake
	switch p.Pulse {
	case dispersion.PulseRect:
		lo, hi := math.Max(u1, -p.PulseWidth/2), math.Min(u2, p.PulseWidth/2)
		if hi <= lo {
			return 0
		}
		return d.RabiPeak * (hi - lo)
	case dispersion.PulseGauss:
		a := 2 * math.Sqrt(math.Ln2) / p.PulseWidth
		s := 0.0
		for k := -4; k <= 4; k++ {
			sh := float64(k) * d.Period
			s += math.Erf(a*(u2+sh)) - math.Erf(a*(u1+sh))
		}
		return d.RabiPeak * p.PulseWidth * math.Sqrt(math.Pi/(4*math.Ln2)) / 2 * s
	case dispersion.PulseContinuous:
		return d.RabiPeak * (u2 - u1)
	}
	return 0
}

// rabiAt returns Ω(u) (rad/s) at time u from a pulse centre.
func (d *ShakeDrive) rabiAt(u float64) float64 {
	p := d.Shake
	switch p.Pulse {
	case dispersion.PulseRect:
		if math.Abs(u) <= p.PulseWidth/2 {
			return d.RabiPeak
		}
		return 0
	case dispersion.PulseGauss:
		s := 0.0
		for k := -4; k <= 4; k++ {
			v := (u + float64(k)*d.Period) / p.PulseWidth
			s += math.Exp(-4 * math.Ln2 * v * v)
		}
		return d.RabiPeak * s
	case dispersion.PulseContinuous:
		return d.RabiPeak
	}
	return 0
}

// impulseIntegrals returns ∫A_σ dt and ∫A_σ² dt (σ = ↑, ↓) over [t1, t2]
// by composite Simpson with n (even) intervals.
func (d *ShakeDrive) impulseIntegrals(t1, t2 float64, n int) (iu, id, iu2, id2 float64) {
	if n%2 == 1 {
		n++
	}
	h := (t2 - t1) / float64(n)
	var s1, s2 float64
	for i := 0; i <= n; i++ {
		w := 2.0
		if i == 0 || i == n {
			w = 1
		} else if i%2 == 1 {
			w = 4
		}
		v := d.cyc.Impulse(d.AngularFreq * (t1 + float64(i)*h))
		s1 += w * v
		s2 += w * v * v
	}
	s1 *= h / 3
	s2 *= h / 3
	return d.AmpUp * s1, d.AmpDown * s1, d.AmpUp * d.AmpUp * s2, d.AmpDown * d.AmpDown * s2
}

func (d *ShakeDrive) String() string {
	return fmt.Sprintf("%s %v↔%v, %g Hz %s, %s", d.Shake.Species.Name, d.Shake.Up, d.Shake.Down,
		d.Shake.ShakeHz, d.Shake.Waveform.Name(), d.Shake.Pulse)
}
