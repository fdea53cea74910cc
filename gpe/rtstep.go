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
// norm drift of ~1e-12. The phase factors come from cisMinus1 (one
// polynomial per component and point, exactly unitary by construction),
// the coupling factors of CouplingSU2 (B purely imaginary) from rotPure;
// both are written out in the loop. They use math.FMA: one instruction on
// amd64 with FMA3 (since 2013) and arm64, a slower software fused
// multiply–add elsewhere (same results). It allocates nothing.
func (s *Stepper) Local(before SU2, d *DiagonalPhase, after SU2) {
	s.la.set(before, d, after)
	if s.pool != nil {
		s.pool.do(stOpLocal, len(s.Psi[0]))
	} else {
		s.localRange(&s.la, 0, len(s.Psi[0]))
	}
	s.la.v = nil
}

// localArgs are the parameters of one local pass, prepared once and shared
// by the goroutines that run its ranges.
type localArgs struct {
	a1, b1, a2, b2     complex128
	c1, c2             bool
	tau, guu, gdd, gud float64
	v                  []float64
}

func (a *localArgs) set(before SU2, d *DiagonalPhase, after SU2) {
	a.c1, a.c2 = before != Identity2, after != Identity2
	a.a1, a.b1 = before.A-1, before.B
	a.a2, a.b2 = after.A-1, after.B
	if a.c1 {
		a.a1 = before.am1()
	}
	if a.c2 {
		a.a2 = after.am1()
	}
	a.tau, a.guu, a.gdd, a.gud, a.v = d.Tau, d.Guu, d.Gdd, d.Gud, d.V
}

// localRange applies the local pass a to the points [lo, hi).
func (s *Stepper) localRange(a *localArgs, lo, hi int) {
	up, dn := s.Psi[0][lo:hi], s.Psi[1][lo:hi]
	dn = dn[:len(up)]
	c1, c2 := a.c1, a.c2
	a1, b1, a2, b2 := a.a1, a.b1, a.a2, a.b2
	tau, guu, gdd, gud := a.tau, a.guu, a.gdd, a.gud
	pure := real(b1) == 0 && real(b2) == 0
	bi1, bi2 := imag(b1), imag(b2)
	ar1, ai1, ar2, ai2 := real(a1), imag(a1), real(a2), imag(a2)
	var v []float64
	if a.v != nil {
		v = a.v[lo:hi]
		v = v[:len(up)]
	}
	for j := range up {
		u, w := up[j], dn[j]
		if c1 {
			if pure {
				// rotPure, written out (not inlined by the compiler)
				ur, ui, wr, wi := real(u), imag(u), real(w), imag(w)
				cur := math.FMA(ar1, ur, math.FMA(-ai1, ui, -bi1*wi))
				cui := math.FMA(ar1, ui, math.FMA(ai1, ur, bi1*wr))
				cwr := math.FMA(ar1, wr, math.FMA(ai1, wi, -bi1*ui))
				cwi := math.FMA(ar1, wi, math.FMA(-ai1, wr, bi1*ur))
				u, w = complex(ur+cur, ui+cui), complex(wr+cwr, wi+cwi)
			} else {
				u, w = u+(a1*u-cmplx.Conj(b1)*w), w+(b1*u+cmplx.Conj(a1)*w)
			}
		}
		nu := real(u)*real(u) + imag(u)*imag(u)
		nd := real(w)*real(w) + imag(w)*imag(w)
		var vj float64
		if v != nil {
			vj = v[j]
		}
		xu, xd := tau*(vj+guu*nu+gud*nd), tau*(vj+gdd*nd+gud*nu)
		hu, hd := 0.5*xu, 0.5*xd
		if hu <= cisMaxHalf && hu >= -cisMaxHalf && hd <= cisMaxHalf && hd >= -cisMaxHalf {
			// cisMinus1 of both phases, written out (the compiler does
			// not inline it; the two chains interleave).
			zu, zd := hu*hu, hd*hd
			zu2, zd2 := zu*zu, zd*zd
			zu4, zd4 := zu2*zu2, zd2*zd2
			scu := math.FMA(zu4, math.FMA(zu, -1.0/39916800, 1.0/362880), math.FMA(zu2, math.FMA(zu, -1.0/5040, 1.0/120), math.FMA(zu, -1.0/6, 1)))
			scd := math.FMA(zd4, math.FMA(zd, -1.0/39916800, 1.0/362880), math.FMA(zd2, math.FMA(zd, -1.0/5040, 1.0/120), math.FMA(zd, -1.0/6, 1)))
			cmu := math.FMA(zu4*zu, math.FMA(zu, 1.0/479001600, -1.0/3628800), zu*math.FMA(zu2, math.FMA(zu, 1.0/40320, -1.0/720), math.FMA(zu, 1.0/24, -0.5)))
			cmd := math.FMA(zd4*zd, math.FMA(zd, 1.0/479001600, -1.0/3628800), zd*math.FMA(zd2, math.FMA(zd, 1.0/40320, -1.0/720), math.FMA(zd, 1.0/24, -0.5)))
			su, sd := hu*scu, hd*scd
			ssu, ssd := su*su, sd*sd
			iu, id := 1-math.FMA(cmu, 2+cmu, ssu), 1-math.FMA(cmd, 2+cmd, ssd)
			u += u * complex(-2*ssu*iu, -2*su*(1+cmu)*iu)
			w += w * complex(-2*ssd*id, -2*sd*(1+cmd)*id)
		} else {
			u += u * cisMinus1(xu)
			w += w * cisMinus1(xd)
		}
		if c2 {
			if pure {
				// rotPure, written out (not inlined by the compiler)
				ur, ui, wr, wi := real(u), imag(u), real(w), imag(w)
				cur := math.FMA(ar2, ur, math.FMA(-ai2, ui, -bi2*wi))
				cui := math.FMA(ar2, ui, math.FMA(ai2, ur, bi2*wr))
				cwr := math.FMA(ar2, wr, math.FMA(ai2, wi, -bi2*ui))
				cwi := math.FMA(ar2, wi, math.FMA(-ai2, wr, bi2*ur))
				u, w = complex(ur+cur, ui+cui), complex(wr+cwr, wi+cwi)
			} else {
				u, w = u+(a2*u-cmplx.Conj(b2)*w), w+(b2*u+cmplx.Conj(a2)*w)
			}
		}
		up[j], dn[j] = u, w
	}
}

// rotPure applies a uniform SU(2) factor with A − 1 = (ar, ai) and
// B = i·bi (CouplingSU2 gives a purely imaginary B) as ψ + (F − 1)ψ:
// u ← u + (A − 1)u + i·bi·w, w ← w + i·bi·u + (A − 1)*w, each correction
// formed first (fused multiply–adds) and added to ψ last, so that its
// rounding is one sum at the scale of ψ.
func rotPure(u, w complex128, ar, ai, bi float64) (complex128, complex128) {
	ur, ui, wr, wi := real(u), imag(u), real(w), imag(w)
	cur := math.FMA(ar, ur, math.FMA(-ai, ui, -bi*wi))
	cui := math.FMA(ar, ui, math.FMA(ai, ur, bi*wr))
	cwr := math.FMA(ar, wr, math.FMA(ai, wi, -bi*ui))
	cwi := math.FMA(ar, wi, math.FMA(-ai, wr, bi*ur))
	return complex(ur+cur, ui+cui), complex(wr+cwr, wi+cwi)
}

// cisMaxHalf is the largest |x/2| for which cisMinus1 uses its polynomial
// (beyond it, phaseMinus1 with math.Sin). The local phases of a step of the
// default length, τ(V + g n) ≤ τE_max = RTStepPhase, stay below 2·cisMaxHalf.
const cisMaxHalf = 0.25

// cisMinus1 returns e^{−ix} − 1 for the local pass, exactly unitary up to
// the rounding of its last operations. With h = x/2, s ≈ sin h and
// c ≈ cos h from their Taylor series (|h| ≤ cisMaxHalf: sin to h¹¹,
// relative truncation h¹²/13! < 1e-17; cos − 1 to h¹², truncation
// h¹⁴/14! < 1e-19; fused multiply–adds) it returns
//
//	F − 1 = (c − is)²/(s² + c²) − 1 = (−2s², −2sc)/(s² + c²),
//
// whose 1 + (F − 1) has modulus 1 for any real s, c: the truncation and the
// rounding of s, c change only the phase (by ~1e-17 rad), never the norm.
// 1/(s² + c²) is taken as 1 − ε with ε = s² + (c − 1)(2 + (c − 1)) formed
// from c − 1 directly (no cancellation); ε ~ 1e-17, so the error of the
// first-order inverse, ε², is nil in float64. Half-angle identities:
// textbook trigonometry. Written out in the local pass, where it costs
// about a third of the two math.Sin calls of phaseMinus1; tested against
// math.Sin (TestCisMinus1).
func cisMinus1(x float64) complex128 {
	h := 0.5 * x
	if !(h <= cisMaxHalf && h >= -cisMaxHalf) {
		return phaseMinus1(x)
	}
	z := h * h
	z2 := z * z
	z4 := z2 * z2
	// sin h / h = Σ_{n=0..5} (−z)ⁿ/(2n+1)!
	sc := math.FMA(z4, math.FMA(z, -1.0/39916800, 1.0/362880), math.FMA(z2, math.FMA(z, -1.0/5040, 1.0/120), math.FMA(z, -1.0/6, 1)))
	// cos h − 1 = Σ_{n=1..6} (−z)ⁿ/(2n)!
	cm := math.FMA(z4*z, math.FMA(z, 1.0/479001600, -1.0/3628800), z*math.FMA(z2, math.FMA(z, 1.0/40320, -1.0/720), math.FMA(z, 1.0/24, -0.5)))
	s := h * sc
	ss := s * s
	inv := 1 - math.FMA(cm, 2+cm, ss)
	return complex(-2*ss*inv, -2*s*(1+cm)*inv)
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
	s.kbase, s.kshft, s.kin, s.kz = base, shift, inner, z
	s.pair(stOpKinX)
	s.kbase, s.kshft = nil, nil
}

func (s *Stepper) kineticXC(c int) {
	tr := s.trFor(c)
	buf := s.Psi[c]
	tr.Forward(buf)
	inner := s.kin
	b := s.kbase[:len(buf)]
	sh := s.kshft[c]
	zs := s.kz[c]
	for i := range sh {
		f := sh[i] * zs
		row := buf[i*inner : (i+1)*inner]
		br := b[i*inner : (i+1)*inner]
		for j := range row {
			row[j] *= br[j] * f
		}
	}
	tr.Backward(buf)
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
	s.kf = fm1
	s.pair(stOpKinM1)
	s.kf = nil
}

func (s *Stepper) kineticMinus1C(c int) {
	tr := s.trFor(c)
	inv := complex(1/float64(len(s.tmp)), 0)
	buf := s.Psi[c]
	tr.Forward(buf)
	k := s.kf[c][:len(buf)]
	for j := range buf {
		buf[j] = (buf[j] + k[j]*buf[j]) * inv
	}
	tr.Backward(buf)
}
