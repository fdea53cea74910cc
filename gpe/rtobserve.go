package gpe

import (
	"math"
	"math/cmplx"
)

// RTEnergies are the parts of the GP energy of a RealTime state for a
// Hamiltonian h, per particle (divided by the norm), in E_ref.
type RTEnergies struct {
	Kinetic     float64 // ⟨(k_x − κσ_z)² + k_⊥²⟩
	Potential   float64 // ⟨V⟩
	Rabi        float64 // ⟨(Ω/2)σ_x⟩
	Detuning    float64 // ⟨(δ/2)σ_z⟩
	Interaction float64 // ∫(g↑↑n↑²/2 + g↓↓n↓²/2 + g↑↓n↑n↓)/N
	Total       float64 // the sum: E/N
	Norm        float64 // ∫|ψ|² dV
}

// Energies returns the energy parts of the current state under h.
func (r *RealTime) Energies(h RTHamiltonian) RTEnergies {
	g := r.Grid
	var e RTEnergies
	up, dn := r.st.Psi[0], r.st.Psi[1]
	v := r.potential(&h)
	var nu, nd, pot, inter float64
	var ud complex128
	for j := range up {
		a, b := abs2(up[j]), abs2(dn[j])
		nu += a
		nd += b
		if v != nil {
			pot += v[j] * (a + b)
		}
		inter += h.Guu/2*a*a + h.Gdd/2*b*b + h.Gud*a*b
		ud += cmplx.Conj(up[j]) * dn[j]
	}
	dv := g.DV
	kin := 0.0
	inner := r.inner
	for c := 0; c < 2; c++ {
		sgn := 1.0 - 2*float64(c)
		sp := r.st.Spectrum(c)
		for idx, z := range sp {
			i := idx / inner
			_, j, l := g.Coords(idx)
			kx := g.K[0][i] - sgn*h.Kappa
			k2 := kx * kx
			if g.Dim > 1 {
				k2 += g.K[1][j] * g.K[1][j]
			}
			if g.Dim > 2 {
				k2 += g.K[2][l] * g.K[2][l]
			}
			kin += abs2(z) * k2
		}
	}
	kin *= dv / float64(g.Size)
	e.Norm = (nu + nd) * dv
	N := e.Norm
	e.Kinetic = kin / N
	e.Potential = pot * dv / N
	e.Rabi = h.Omega * real(ud) * dv / N
	e.Detuning = h.Delta / 2 * (nu - nd) * dv / N
	e.Interaction = inter * dv / N
	e.Total = e.Kinetic + e.Potential + e.Rabi + e.Detuning + e.Interaction
	return e
}

// RTMoments are moments of a RealTime state.
type RTMoments struct {
	// Center and Width: mean position and rms width of the total density
	// along each used axis, 1/k_ref.
	Center, Width [3]float64
	// KCanonical: ⟨k_x⟩ of each component (canonical momentum, k_ref;
	// NaN for an empty component).
	KCanonical [2]float64
	// KMechanical: ⟨k_x − σκ⟩ of each component (mechanical momentum,
	// σ = +1 for ↑, −1 for ↓; velocity 2k in units k_ref·E_ref... i.e.
	// ħk/m = 2k E_ref/(ħk_ref)).
	KMechanical [2]float64
	// Sz, Sx: ⟨σ_z⟩ and ⟨σ_x⟩ per particle.
	Sz, Sx float64
	// FracUp: fraction of atoms in ↑.
	FracUp float64
}

// Moments returns the moments of the current state; kappa is the recoil of
// the Hamiltonian the mechanical momentum refers to.
func (r *RealTime) Moments(kappa float64) RTMoments {
	g := r.Grid
	var m RTMoments
	up, dn := r.st.Psi[0], r.st.Psi[1]
	var s0 float64
	var s1, s2 [3]float64
	var nu, nd float64
	var ud complex128
	for idx := range up {
		a, b := abs2(up[idx]), abs2(dn[idx])
		n := a + b
		nu += a
		nd += b
		ud += cmplx.Conj(up[idx]) * dn[idx]
		i, j, l := g.Coords(idx)
		x := [3]float64{g.X[0][i], g.X[1][j], g.X[2][l]}
		s0 += n
		for ax := 0; ax < g.Dim; ax++ {
			s1[ax] += n * x[ax]
			s2[ax] += n * x[ax] * x[ax]
		}
	}
	for ax := 0; ax < g.Dim; ax++ {
		m.Center[ax] = s1[ax] / s0
		m.Width[ax] = math.Sqrt(math.Max(0, s2[ax]/s0-m.Center[ax]*m.Center[ax]))
	}
	m.Sz = (nu - nd) / s0
	m.Sx = 2 * real(ud) / s0
	m.FracUp = nu / s0
	for c := 0; c < 2; c++ {
		sgn := 1.0 - 2*float64(c)
		sp := r.st.Spectrum(c)
		var w, wk float64
		for idx, z := range sp {
			p := abs2(z)
			w += p
			wk += p * g.K[0][idx/r.inner]
		}
		m.KCanonical[c] = wk / w
		m.KMechanical[c] = wk/w - sgn*kappa
		if w == 0 {
			m.KCanonical[c], m.KMechanical[c] = math.NaN(), math.NaN()
		}
	}
	return m
}
