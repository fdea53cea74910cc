package gpe

import (
	"math"
	"math/cmplx"
)

// Factors of the real-time spinor GPE on the Stepper (see realtime.go): a
// uniform SU(2) factor for a coupling that is the same at every point, a
// local diagonal factor for the trap and the mean field, and a kinetic
// factor whose spin-dependent part depends on k_x only (a time-dependent
// recoil). RealTime combines them into a Strang split step.

// SU2 is a uniform 2×2 unitary [[A, −B*], [B, A*]] (|A|² + |B|² = 1) acting
// on (ψ↑, ψ↓) at every point.
type SU2 struct {
	A, B complex128
	reM1 float64 // Re A − 1, formed without cancellation (CouplingSU2)
}

// Identity2 is the identity factor.
var Identity2 = SU2{A: 1}

// CouplingSU2 returns exp(−iτ[(Ω/2)σx + (δ/2)σz]) for Ω, δ in E_R and τ in
// ħ/E_R: with b = ½√(Ω² + δ²) and n̂ = (Ω, 0, δ)/(2b),
// exp(−iτ b n̂·σ) = cos(bτ) − i sin(bτ) n̂·σ (textbook spin-½ algebra),
// i.e. A = cos bτ − i sin bτ n_z, B = −i sin bτ n_x.
func CouplingSU2(omega, delta, tau float64) SU2 {
	b := 0.5 * math.Hypot(omega, delta)
	if b == 0 || tau == 0 {
		return Identity2
	}
	s, c := math.Sincos(b * tau)
	nx, nz := omega/(2*b), delta/(2*b)
	ar, ai, bi := c, -s*nz, -s*nx
	sh := math.Sin(b * tau / 2)
	rm1 := -2 * sh * sh
	// Best-rounded: among ±2 ulp of Re A and Im B the pair nearest to
	// |A|² + |B|² = 1 (the factor of a hold is reused at every step; see
	// unitPhase).
	best, br, bb := math.Inf(1), ar, bi
	x := math.Nextafter(math.Nextafter(ar, math.Inf(-1)), math.Inf(-1))
	for i := -2; i <= 2; i++ {
		y := math.Nextafter(math.Nextafter(bi, math.Inf(-1)), math.Inf(-1))
		for j := -2; j <= 2; j++ {
			r := math.Abs(math.FMA(y, y, math.FMA(ai, ai, math.FMA(x, x, -1))))
			if r < best {
				best, br, bb = r, x, y
			}
			y = math.Nextafter(y, math.Inf(1))
		}
		x = math.Nextafter(x, math.Inf(1))
	}
	return SU2{A: complex(br, ai), B: complex(0, bb), reM1: rm1 + (br - ar)}
}

// DiagonalPhase is the local diagonal factor of the trap and the mean field
// over a time τ: at point j
//
//	ψ↑ ← exp(−iτ[V_j + g↑↑|ψ↑|² + g↑↓|ψ↓|²]) ψ↑,
//	ψ↓ ← exp(−iτ[V_j + g↓↓|ψ↓|² + g↑↓|ψ↑|²]) ψ↓,
//
// exact because it leaves |ψ_σ|² unchanged at every point. V has one entry
// per point (nil: V = 0); units are the solver's (E_R, ħ/E_R, g in
// E_R·(1/k_R)^d for ψ normalised to the atom number).
type DiagonalPhase struct {
	Tau           float64
	V             []float64
	Guu, Gdd, Gud float64
}

// Local applies, at every point, the uniform factor before, then the
// diagonal phase d, then the uniform factor after (one pass over the state;
// the fused local part of a Strang step). Each factor F is applied as
// ψ + (F − 1)ψ with F − 1 formed without cancellation (1 − cos x as
// 2 sin²(x/2)): the rounding of one application is then that of the final
// sum, a fraction of an ulp of ψ, rather than that of a full complex
// product, which over 10⁴ steps of slowly changing data would add up to a
// norm drift of ~1e-12. It allocates nothing.
func (s *Stepper) Local(before SU2, d *DiagonalPhase, after SU2) {
	up, dn := s.Psi[0], s.Psi[1][:len(s.Psi[0])]
	c1, c2 := before != Identity2, after != Identity2
	a1, b1 := before.A-1, before.B
	a2, b2 := after.A-1, after.B
	if c1 {
		a1 = before.am1()
	}
	if c2 {
		a2 = after.am1()
	}
	tau, guu, gdd, gud := d.Tau, d.Guu, d.Gdd, d.Gud
	v := d.V
	if v != nil {
		v = v[:len(up)]
	}
	for j := range up {
		u, w := up[j], dn[j]
		if c1 {
			u, w = u+(a1*u-cmplx.Conj(b1)*w), w+(b1*u+cmplx.Conj(a1)*w)
		}
		nu := real(u)*real(u) + imag(u)*imag(u)
		nd := real(w)*real(w) + imag(w)*imag(w)
		var vj float64
		if v != nil {
			vj = v[j]
		}
		u += u * phaseMinus1(tau*(vj+guu*nu+gud*nd))
		w += w * phaseMinus1(tau*(vj+gdd*nd+gud*nu))
		if c2 {
			u, w = u+(a2*u-cmplx.Conj(b2)*w), w+(b2*u+cmplx.Conj(a2)*w)
		}
		up[j], dn[j] = u, w
	}
}

// phaseMinus1 returns e^{−ix} − 1 = (−2 sin²(x/2), −sin x) without
// cancellation.
func phaseMinus1(x float64) complex128 {
	if x == 0 {
		return 0
	}
	sh := math.Sin(x / 2)
	return complex(-2*sh*sh, -math.Sin(x))
}

// am1 returns A − 1 of a CouplingSU2 factor without cancellation: A = cos θ
// − i sin θ n_z with Re A − 1 = −2 sin²(θ/2) (θ from cos θ = Re A, |A| ≤ 1).
func (u SU2) am1() complex128 {
	return complex(u.reM1, imag(u.A))
}

// KineticX applies a kinetic factor that is a common table times a factor
// per component and k_x: ψ̂_σ[j] ← base[j]·shift[σ][i]·z_σ·ψ̂_σ[j], with i
// the x index of the flat index j (row-major, x slowest; inner = points
// per x slice). base includes the 1/N of the inverse transform. With
// base = exp(−iτk²)/N and shift[σ][i] = exp(2iστκk_x,i) this is
// exp(−iτ(k_x − σκ)²) up to the global phase exp(−iτκ²) (in z). It
// allocates nothing.
func (s *Stepper) KineticX(base []complex128, shift *[2][]complex128, inner int, z [2]complex128) {
	for c := range s.Psi {
		buf := s.Psi[c]
		s.tr.Forward(buf)
		b := base[:len(buf)]
		sh := shift[c]
		zs := z[c]
		for i := range sh {
			f := sh[i] * zs
			row := buf[i*inner : (i+1)*inner]
			br := b[i*inner : (i+1)*inner]
			for j := range row {
				row[j] *= br[j] * f
			}
		}
		s.tr.Backward(buf)
	}
}

// unitPhase returns e^{iφ} as the pair (cos, sin) of float64 nearest to the
// unit circle among the neighbours (±2 ulp) of the correctly rounded values:
// a table of factors applied at every step then changes the norm by less
// than the ≈1e-16 per step that plain rounding would add systematically
// (the same |f(k)| ≠ 1 at every step). Used for tables that are reused.
func unitPhase(phi float64) complex128 {
	s0, c0 := math.Sincos(phi)
	best, bc, bs := math.Inf(1), c0, s0
	c := c0
	for i := 0; i < 2; i++ {
		c = math.Nextafter(c, math.Inf(-1))
	}
	for i := -2; i <= 2; i++ {
		s := s0
		for k := 0; k < 2; k++ {
			s = math.Nextafter(s, math.Inf(-1))
		}
		for j := -2; j <= 2; j++ {
			r := math.Abs(math.FMA(s, s, math.FMA(c, c, -1)))
			if r < best {
				best, bc, bs = r, c, s
			}
			s = math.Nextafter(s, math.Inf(1))
		}
		c = math.Nextafter(c, math.Inf(1))
	}
	return complex(bc, bs)
}

// KineticMinus1 applies a kinetic factor given as f_σ − 1 (fm1, without the
// 1/N of the inverse transform): ψ̂_σ ← (ψ̂_σ + fm1_σ ψ̂_σ)/N. As in Local,
// the rounding is that of one sum per mode, not of a full complex product,
// so that a table reused at every step (a hold) does not drift the norm;
// 1/N is exact for grids of 2ⁿ points. It allocates nothing.
func (s *Stepper) KineticMinus1(fm1 *KineticFactors) {
	inv := complex(1/float64(len(s.tmp)), 0)
	for c := range s.Psi {
		buf := s.Psi[c]
		s.tr.Forward(buf)
		k := fm1[c][:len(buf)]
		for j := range buf {
			buf[j] = (buf[j] + k[j]*buf[j]) * inv
		}
		s.tr.Backward(buf)
	}
}
