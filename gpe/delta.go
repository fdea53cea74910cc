package gpe

import (
	"math"
	"math/cmplx"

	"socmap/dispersion"
)

// DeltaSolver is the exact pulse-by-pulse solution for infinitely short RF
// pulses. A plane wave |↑, q⟩ (canonical wavenumber q, mean velocity ħq/m)
// couples only to |↓, q + k_t(θ)⟩. One shaking period from pulse to pulse
// multiplies the two amplitudes by exp(−iφ_σ) with
//
//	φ↑ = [ħq²/2m + ⟨A↑²⟩/2mħ + Δ/2] T,   φ↓ = [ħ(q+k_t)²/2m + ⟨A↓²⟩/2mħ − Δ/2] T,
//
// exact because ∫A_σ dt = 0 over a period (the term linear in A drops out),
// and a pulse is the rotation exp(−i a σ_x/2) of area a = ∫Ω dt. Nothing is
// expanded in a, Δ or T.
type DeltaSolver struct {
	d  *ShakeDrive
	kt float64 // k_t(θ), 1/m
	mu float64 // micromotion shift (⟨A↑²⟩−⟨A↓²⟩)/2mħ, rad/s
}

// NewDeltaSolver prepares the delta-pulse solution of d's setting (the
// setting's pulse shape is ignored: pulses are taken as delta pulses of the
// same area at the same phase).
func NewDeltaSolver(d *ShakeDrive) *DeltaSolver {
	return &DeltaSolver{d: d, kt: d.Result.KtDelta,
		mu: 2 * math.Pi * (d.Result.MicroKinUpHz - d.Result.MicroKinDownHz)}
}

// Flip returns the population of ↓ after each of n pulses (trace, may be
// nil; length ≥ n if not nil) for an atom starting in |↑, q⟩ at RF detuning
// Δ (rad/s, see ShakeDrive.Detuning), and the final population.
func (s *DeltaSolver) Flip(q, delta float64, n int, trace []float64) float64 {
	m, T := s.d.Mass, s.d.Period
	hb := dispersion.Hbar
	q2 := q + s.kt
	// Only the phase difference matters for populations.
	dphi := (hb*(q2*q2-q*q)/(2*m) - s.mu - delta) * T
	ph := cmplx.Exp(complex(0, -dphi)) // relative phase of ↓ after a period
	c, sn := math.Cos(s.d.Area/2), math.Sin(s.d.Area/2)
	cu, cd := complex(1, 0), complex(0, 0)
	for i := 0; i < n; i++ {
		// pulse: exp(−i a σx/2)
		cu, cd = complex(c, 0)*cu-complex(0, sn)*cd, complex(c, 0)*cd-complex(0, sn)*cu
		// free period: relative phase
		cd *= ph
		if trace != nil {
			trace[i] = real(cd)*real(cd) + imag(cd)*imag(cd)
		}
	}
	return real(cd)*real(cd) + imag(cd)*imag(cd)
}

// FlipPacket averages Flip over a Gaussian momentum distribution of mean q0
// and rms sigmaK (1/m) (61 nodes over ±6σ, trapezoid rule, spectrally accurate
// for the Gaussian); trace (may be nil) receives the averaged populations.
func (s *DeltaSolver) FlipPacket(q0, sigmaK, delta float64, n int, trace []float64) float64 {
	if sigmaK == 0 {
		return s.Flip(q0, delta, n, trace)
	}
	const nodes = 61
	var tmp []float64
	if trace != nil {
		tmp = make([]float64, n)
		for i := range trace[:n] {
			trace[i] = 0
		}
	}
	sw, sum := 0.0, 0.0
	for j := 0; j < nodes; j++ {
		u := -6 + 12*float64(j)/(nodes-1)
		w := math.Exp(-u * u / 2)
		sw += w
		sum += w * s.Flip(q0+u*sigmaK, delta, n, tmp)
		if trace != nil {
			for i := range tmp {
				trace[i] += w * tmp[i]
			}
		}
	}
	if trace != nil {
		for i := range trace[:n] {
			trace[i] /= sw
		}
	}
	return sum / sw
}
