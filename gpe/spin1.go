package gpe

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"socmap/dispersion"
	"socmap/gpe/fft"
)

// Three-component (F = 1) Gross–Pitaevskii ground states.
//
// Units as in the rest of the package (k_R, 1/k_R, E_R, ħ = 1, m = 1/2).
// Components in the order m = +1, 0, −1 (Spin1State.Psi[0..2]). The energy
// functional is
//
//	E[ψ] = ∫ Σ_m ψ_m* [(k_x − K_m)² + k_⊥² + V + E_m] ψ_m + (Ω/2)·2Re(ψ₊₁*ψ₀ + ψ₀*ψ₋₁)
//	       + (c0/2) n² + (c2/2)(F_z² + |F_+|²)  dV,
//
// n = Σ|ψ_m|², F_z = |ψ₊₁|² − |ψ₋₁|², F_+ = F_x + iF_y = √2(ψ₊₁*ψ₀ + ψ₀*ψ₋₁)
// (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998); T. Ohmi and K. Machida,
// J. Phys. Soc. Jpn. 67, 1822 (1998)); |F_+|² contains the spin-changing term
// 2Re(ψ₊₁*ψ₋₁*ψ₀²). The single-particle part is dispersion.Spin1Model. The
// Gross–Pitaevskii operator is H = K + L[ψ] with K = diag((k − K_m)² + k_⊥²)
// in k space and the local Hermitian 3×3 matrix
//
//	L = diag(V + E_m + c0 n) + c2 F_z diag(1, 0, −1)
//	    + [(Ω/2) + c2 F_−/√2] (|+1⟩⟨0| + |0⟩⟨−1|) + h.c.,  F_− = F_+*.
//
// μ = ⟨ψ, Hψ⟩/N; residual ‖Hψ − μψ‖ as in the package documentation.

// Spin1Model holds the parameters of the three-component GPE.
type Spin1Model struct {
	K     [3]float64 // K_m (k_R), order m = +1, 0, −1
	E     [3]float64 // E_m (E_R)
	Omega float64    // Ω (E_R): the term (Ω/√2)F_x
	// C0, C2: spin-1 couplings in E_R·(1/k_R)^d for ψ normalised to Norm.
	C0, C2    float64
	Potential Potential
	Norm      float64 // ∫ n dV
}

// Spin1FromDispersion copies the single-particle part of d into a model.
func Spin1FromDispersion(d dispersion.Spin1Model) Spin1Model {
	return Spin1Model{K: d.K, E: d.E, Omega: d.Omega}
}

// Spin1UniformBox is the uniform gas in the periodic box of g with n·c0 and
// n·c2 in E_R: Norm = box volume (mean density 1), C0 = n c0, C2 = n c2.
func Spin1UniformBox(g *Grid, d dispersion.Spin1Model, nc0, nc2 float64) Spin1Model {
	m := Spin1FromDispersion(d)
	m.C0, m.C2, m.Norm = nc0, nc2, g.Volume()
	return m
}

// Validate checks the model for use on grid g.
func (m Spin1Model) Validate(g *Grid) error {
	for _, v := range []float64{m.K[0], m.K[1], m.K[2], m.E[0], m.E[1], m.E[2], m.Omega, m.C0, m.C2} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("gpe: spin-1 model has a non-finite parameter: %+v", m)
		}
	}
	if !(m.Norm > 0) || math.IsInf(m.Norm, 0) {
		return fmt.Errorf("gpe: spin-1 model norm %g, need > 0", m.Norm)
	}
	if m.Potential.Kind == Harmonic {
		for a := 0; a < g.Dim; a++ {
			if !(m.Potential.AngularFreq[a] > 0) {
				return fmt.Errorf("gpe: harmonic trap needs ω > 0 on axis %d (got %g)", a, m.Potential.AngularFreq[a])
			}
		}
	}
	return nil
}

// Spin1State is a three-component wavefunction on a grid (order m = +1, 0, −1).
type Spin1State struct {
	Grid *Grid
	Psi  [3][]complex128
}

// NewSpin1State returns a zero state on g.
func NewSpin1State(g *Grid) *Spin1State {
	return &Spin1State{Grid: g, Psi: [3][]complex128{fft.Aligned(g.Size), fft.Aligned(g.Size), fft.Aligned(g.Size)}}
}

// Clone returns a deep copy.
func (s *Spin1State) Clone() *Spin1State {
	c := NewSpin1State(s.Grid)
	for m := 0; m < 3; m++ {
		copy(c.Psi[m], s.Psi[m])
	}
	return c
}

func (s *Spin1State) check(g *Grid) error {
	if s == nil {
		return errors.New("gpe: nil spin-1 state")
	}
	for m := 0; m < 3; m++ {
		if len(s.Psi[m]) != g.Size {
			return fmt.Errorf("gpe: spin-1 state component %d has %d points, grid has %d", m, len(s.Psi[m]), g.Size)
		}
	}
	return nil
}

// Spin1Problem is a three-component ground-state problem.
type Spin1Problem struct {
	Grid  *Grid
	Model Spin1Model
	// FixMagnetization: hold ⟨F_z⟩ = ∫F_z/∫n at Magnetization (−1 < M < 1)
	// besides the norm (the collisions conserve F_z; experiments prepare
	// it). Default false: ⟨F_z⟩ is free.
	FixMagnetization bool
	// Magnetization: M, the fixed ⟨F_z⟩ per particle when FixMagnetization.
	Magnetization float64
}

// Spin1Energies of a state, per particle (divided by Norm), E_R.
type Spin1Energies struct {
	Kinetic   float64 // ⟨(k_x − K_m)² + k_⊥²⟩
	Potential float64 // ⟨V⟩
	Zeeman    float64 // ⟨E_m⟩ (detunings, quadratic Zeeman, micromotion)
	Coupling  float64 // ⟨(Ω/√2)F_x⟩
	Density   float64 // (c0/2)∫n²/N
	Spin      float64 // (c2/2)∫|F|²/N, spin-changing term included
	Total     float64 // E/N
	// Mu: ⟨ψ,Hψ⟩/⟨ψ,ψ⟩; at fixed magnetisation the multiplier of the norm
	// in Hψ ≈ μψ + λF_zψ (least squares), E_R.
	Mu float64
	// Lambda: at fixed magnetisation the multiplier λ of F_z (an effective
	// linear Zeeman shift, E_R: the state is stationary for E − λ∫F_z at
	// fixed norm); 0 when ⟨F_z⟩ is free.
	Lambda      float64
	Residual    float64    // ‖Hψ − μψ − λF_zψ‖, E_R
	Norm        float64    // ∫n dV
	Populations [3]float64 // ∫|ψ_m|²/∫n
}

// Spin1Result of Spin1Solve.
type Spin1Result struct {
	Status          Status
	State           *Spin1State
	Energies        Spin1Energies // of the returned state, evaluated afresh
	SplitSteps      int
	Iterations      int
	Dtau            float64
	Residual        float64
	EnergyHistory   []float64
	ResidualHistory []float64
}

// spin1Engine holds the buffers of one three-component solve. Nothing is
// allocated after newSpin1Engine.
type spin1Engine struct {
	g   *Grid
	m   Spin1Model
	n   int
	dV  float64
	tr  fft.Transform
	V   []float64
	kin [3][]float64 // (k_x − K_m)² + k_⊥²
	ek  [3][]float64 // exp(−τK)/n
	ekT float64

	psi, hpsi, tmp, q, p, gr, gOld, r [3][]complex128
	alpha                             float64

	// fixM: hold ∫F_z = mag·Norm (Spin1Problem.FixMagnetization).
	fixM bool
	mag  float64

	phase []float64 // 3·N_x scratch of phaseStep (harmonic trap only)
}

func newSpin1Engine(g *Grid, m Spin1Model, b fft.Backend) (*spin1Engine, error) {
	e := &spin1Engine{g: g, m: m, n: g.Size, dV: g.DV, ekT: math.NaN(), alpha: 1}
	t, err := fft.New(g.Shape(), b, fft.Options{})
	if err != nil {
		return nil, err
	}
	e.tr = t
	for c := 0; c < 3; c++ {
		for _, buf := range []*[3][]complex128{&e.psi, &e.hpsi, &e.tmp, &e.q, &e.p, &e.gr, &e.gOld, &e.r} {
			buf[c] = fft.Aligned(e.n)
		}
		e.kin[c] = make([]float64, e.n)
		e.ek[c] = make([]float64, e.n)
	}
	if m.Potential.Kind != NoPotential {
		e.V = make([]float64, e.n)
	}
	if m.Potential.Kind == Harmonic {
		e.phase = make([]float64, 3*g.N[0])
	}
	for idx := 0; idx < e.n; idx++ {
		i, j, l := g.Coords(idx)
		kx, ky, kz := g.K[0][i], g.K[1][j], g.K[2][l]
		for c := 0; c < 3; c++ {
			d := kx - m.K[c]
			e.kin[c][idx] = d*d + ky*ky + kz*kz
		}
		if e.V != nil {
			e.V[idx] = m.Potential.At(g.X[0][i], g.X[1][j], g.X[2][l])
		}
	}
	return e, nil
}

func (e *spin1Engine) close() {
	if e.tr != nil {
		e.tr.Close()
		e.tr = nil
	}
}

// localMatrix fills L (see the package notes above) at point i for the
// spinor (a, b, c) = (ψ₊₁, ψ₀, ψ₋₁).
func (e *spin1Engine) localMatrix(i int, a, b, c complex128) (L [3][3]complex128) {
	m := &e.m
	v := 0.0
	if e.V != nil {
		v = e.V[i]
	}
	na, nb, nc := abs2(a), abs2(b), abs2(c)
	n := na + nb + nc
	fz := na - nc
	fp := complex(math.Sqrt2, 0) * (cmplx.Conj(a)*b + cmplx.Conj(b)*c)
	base := v + m.C0*n
	L[0][0] = complex(base+m.E[0]+m.C2*fz, 0)
	L[1][1] = complex(base+m.E[1], 0)
	L[2][2] = complex(base+m.E[2]-m.C2*fz, 0)
	off := complex(m.Omega/2, 0) + complex(m.C2/math.Sqrt2, 0)*cmplx.Conj(fp)
	L[0][1], L[1][2] = off, off
	L[1][0], L[2][1] = cmplx.Conj(off), cmplx.Conj(off)
	return
}

// expHerm3 returns exp(−τA) of a Hermitian 3×3 A: the mean of the diagonal
// a is split off (a scalar factor e^{−τa}), the rest is scaled by 2^{−s}
// until its ∞-norm times τ is ≤ 1/4, exponentiated by its Taylor series to
// the order at which the next term is below 1e-17 (at most 12: truncation
// < 3e-18 relative) and squared s times (C. Moler and
// C. Van Loan, SIAM Rev. 45, 3 (2003), "scaling and squaring", common
// practice). The result is the exact exponential to rounding, so the step is
// norm-correct up to the renormalisation of imaginary time.
func expHerm3(A [3][3]complex128, tau float64) [3][3]complex128 {
	a := real(A[0][0]+A[1][1]+A[2][2]) / 3
	var B [3][3]complex128
	nrm := 0.0
	for i := 0; i < 3; i++ {
		row := 0.0
		for j := 0; j < 3; j++ {
			B[i][j] = complex(-tau, 0) * A[i][j]
			if i == j {
				B[i][j] += complex(tau*a, 0)
			}
			row += cmplx.Abs(B[i][j])
		}
		nrm = math.Max(nrm, row)
	}
	s := 0
	for nrm > 0.25 {
		nrm /= 2
		s++
	}
	f := complex(math.Ldexp(1, -s), 0)
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			B[i][j] *= f
		}
	}
	// Horner: X = I + B(I + B/2(I + B/3(…))), to the order K at which the
	// next term ‖B‖^{K+1}/(K+1)! falls below 1e-17 (K ≤ 12 for ‖B‖ ≤ 1/4)
	order, term := 1, nrm
	for order < 12 && term > 1e-17 {
		order++
		term *= nrm / float64(order)
	}
	X := [3][3]complex128{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}
	for k := order; k >= 1; k-- {
		var Y [3][3]complex128
		c := complex(1/float64(k), 0)
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				Y[i][j] = c * (B[i][0]*X[0][j] + B[i][1]*X[1][j] + B[i][2]*X[2][j])
			}
			Y[i][i] += 1
		}
		X = Y
	}
	for ; s > 0; s-- {
		var Y [3][3]complex128
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				Y[i][j] = X[i][0]*X[0][j] + X[i][1]*X[1][j] + X[i][2]*X[2][j]
			}
		}
		X = Y
	}
	ea := complex(math.Exp(-tau*a), 0)
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			X[i][j] *= ea
		}
	}
	return X
}

// localStep applies ψ ← exp(−τL[ψ])ψ pointwise (L frozen at the current ψ).
func (e *spin1Engine) localStep(tau float64) {
	P := &e.psi
	for i := 0; i < e.n; i++ {
		a, b, c := P[0][i], P[1][i], P[2][i]
		X := expHerm3(e.localMatrix(i, a, b, c), tau)
		P[0][i] = X[0][0]*a + X[0][1]*b + X[0][2]*c
		P[1][i] = X[1][0]*a + X[1][1]*b + X[1][2]*c
		P[2][i] = X[2][0]*a + X[2][1]*b + X[2][2]*c
	}
}

func (e *spin1Engine) setKinSplit(tau float64) {
	if tau == e.ekT {
		return
	}
	inv := 1 / float64(e.n)
	for c := 0; c < 3; c++ {
		for i, k := range e.kin[c] {
			e.ek[c][i] = math.Exp(-tau*k) * inv
		}
	}
	e.ekT = tau
}

func (e *spin1Engine) norm(x *[3][]complex128) float64 {
	s := 0.0
	for c := 0; c < 3; c++ {
		for _, v := range x[c] {
			s += abs2(v)
		}
	}
	return s * e.dV
}

func (e *spin1Engine) normalize() error {
	if e.fixM {
		return e.project()
	}
	s := e.norm(&e.psi)
	if !(s > 0) || math.IsInf(s, 0) {
		return fmt.Errorf("gpe: spin-1 state has norm %g", s)
	}
	f := complex(math.Sqrt(e.m.Norm/s), 0)
	for c := 0; c < 3; c++ {
		for i := range e.psi[c] {
			e.psi[c][i] *= f
		}
	}
	return nil
}

// pops returns the populations ∫|x_m|² dV of the three components.
func (e *spin1Engine) pops(x *[3][]complex128) [3]float64 {
	var p [3]float64
	for c := 0; c < 3; c++ {
		for _, v := range x[c] {
			p[c] += abs2(v)
		}
		p[c] *= e.dV
	}
	return p
}

// project scales the components by σ_m = a·b^m so that ∫n = Norm and
// ∫F_z = M·Norm: the normalisation of the gradient flow with two Lagrange
// multipliers, e^{−τ(H − μ − λF_z)} after a step of e^{−τH}, whose factors
// e^{τ(μ+λm)} have exactly this form (W. Bao and F. Y. Lim, SIAM J. Sci.
// Comput. 30, 1925 (2008), their continuous normalised gradient flow for
// spin-1, from memory; the algebra derived here). With n_m = N_m/Norm and
// x = b²: a²(x n₊ + n₀ + n₋/x) = 1 and a²(x n₊ − n₋/x) = M give
// (1 − M) n₊ x² − M n₀ x − (1 + M) n₋ = 0, whose positive root is
// x = [M n₀ + √(M²n₀² + 4(1 − M²) n₊n₋)] / (2(1 − M) n₊).
// The root exists when n₊ > 0 and n₋ > 0 (Solve seeds empty components).
func (e *spin1Engine) project() error {
	P := e.pops(&e.psi)
	N, M := e.m.Norm, e.mag
	np, n0, nm := P[0]/N, P[1]/N, P[2]/N
	if np == 0 && nm == 0 && M == 0 && n0 > 0 { // a polar state holds M = 0
		f := complex(math.Sqrt(1/n0), 0)
		for i := range e.psi[1] {
			e.psi[1][i] *= f
		}
		return nil
	}
	if !(np > 0) || !(nm > 0) || math.IsInf(np+n0+nm, 0) {
		return fmt.Errorf("gpe: spin-1 state cannot hold ⟨F_z⟩ = %g (populations %g, %g, %g)", M, np, n0, nm)
	}
	x := (M*n0 + math.Sqrt(M*M*n0*n0+4*(1-M*M)*np*nm)) / (2 * (1 - M) * np)
	a2 := 1 / (x*np + n0 + nm/x)
	f := [3]complex128{complex(math.Sqrt(a2*x), 0), complex(math.Sqrt(a2), 0), complex(math.Sqrt(a2/x), 0)}
	for c := 0; c < 3; c++ {
		for i := range e.psi[c] {
			e.psi[c][i] *= f[c]
		}
	}
	return nil
}

// seedEmpty gives a component with less than 1e-8 of the atoms the
// amplitude 1e-4·√n(x) (real), so that project can reach any M in (−1, 1);
// then projects. A documented, deterministic choice.
func (e *spin1Engine) seedEmpty() error {
	P := e.pops(&e.psi)
	tot := P[0] + P[1] + P[2]
	for c := 0; c < 3; c++ {
		if P[c] >= 1e-8*tot {
			continue
		}
		for i := 0; i < e.n; i++ {
			n := abs2(e.psi[0][i]) + abs2(e.psi[1][i]) + abs2(e.psi[2][i])
			e.psi[c][i] += complex(1e-4*math.Sqrt(n), 0)
		}
	}
	return e.project()
}

// splitSteps takes n Strang steps exp(−τL/2) exp(−τK) exp(−τL/2) with
// renormalisation to Norm after each kinetic factor (normalised gradient
// flow). The local half steps of consecutive steps are fused into one
// exp(−τL) (L taken at the state it acts on, as in the two-component
// engine).
func (e *spin1Engine) splitSteps(tau float64, n int) {
	e.setKinSplit(tau)
	e.localStep(tau / 2)
	for it := 0; it < n; it++ {
		for c := 0; c < 3; c++ {
			e.tr.Forward(e.psi[c])
			for i := range e.psi[c] {
				e.psi[c][i] *= complex(e.ek[c][i], 0)
			}
			e.tr.Backward(e.psi[c])
		}
		_ = e.normalize()
		if it == n-1 {
			e.localStep(tau / 2)
		} else {
			e.localStep(tau)
		}
	}
	_ = e.normalize()
}

// applyK writes K x into dst (both in x space); tmp is used for transforms.
func (e *spin1Engine) applyK(dst, x *[3][]complex128, factor func(c, i int) float64) {
	inv := complex(1/float64(e.n), 0)
	for c := 0; c < 3; c++ {
		copy(dst[c], x[c])
		e.tr.Forward(dst[c])
		for i := range dst[c] {
			dst[c][i] *= complex(factor(c, i), 0) * inv
		}
		e.tr.Backward(dst[c])
	}
}

// localEnergy returns the local energy parts (not per particle) of x.
func (e *spin1Engine) localEnergy(x *[3][]complex128) (pot, zee, cpl, den, spin float64) {
	m := &e.m
	for i := 0; i < e.n; i++ {
		a, b, c := x[0][i], x[1][i], x[2][i]
		na, nb, nc := abs2(a), abs2(b), abs2(c)
		n := na + nb + nc
		if e.V != nil {
			pot += e.V[i] * n
		}
		zee += m.E[0]*na + m.E[1]*nb + m.E[2]*nc
		fp := complex(math.Sqrt2, 0) * (cmplx.Conj(a)*b + cmplx.Conj(b)*c)
		cpl += m.Omega / math.Sqrt2 * real(fp) // (Ω/√2)F_x, F_x = Re F_+
		fz := na - nc
		den += n * n
		spin += fz*fz + abs2(fp)
	}
	dv := e.dV
	return pot * dv, zee * dv, cpl * dv, m.C0 / 2 * den * dv, m.C2 / 2 * spin * dv
}

// kinEnergy returns Σ_k K|x̂|² dV/n of x (uses tmp).
func (e *spin1Engine) kinEnergy(x *[3][]complex128) float64 {
	s := 0.0
	for c := 0; c < 3; c++ {
		copy(e.tmp[c], x[c])
		e.tr.Forward(e.tmp[c])
		for i, v := range e.tmp[c] {
			s += e.kin[c][i] * abs2(v)
		}
	}
	return s * e.dV / float64(e.n)
}

// evaluate computes the energies of ψ, Hψ into hpsi and the residual into r.
func (e *spin1Engine) evaluate() Spin1Energies {
	var en Spin1Energies
	N := e.m.Norm
	e.applyK(&e.hpsi, &e.psi, func(c, i int) float64 { return e.kin[c][i] })
	kin := 0.0
	for c := 0; c < 3; c++ {
		for i := range e.psi[c] {
			kin += real(cmplx.Conj(e.psi[c][i]) * e.hpsi[c][i])
		}
	}
	kin *= e.dV
	for i := 0; i < e.n; i++ {
		a, b, c := e.psi[0][i], e.psi[1][i], e.psi[2][i]
		L := e.localMatrix(i, a, b, c)
		e.hpsi[0][i] += L[0][0]*a + L[0][1]*b + L[0][2]*c
		e.hpsi[1][i] += L[1][0]*a + L[1][1]*b + L[1][2]*c
		e.hpsi[2][i] += L[2][0]*a + L[2][1]*b + L[2][2]*c
	}
	pot, zee, cpl, den, spin := e.localEnergy(&e.psi)
	nrm := 0.0
	var pops [3]float64
	hh := 0.0
	for c := 0; c < 3; c++ {
		for i, v := range e.psi[c] {
			a := abs2(v)
			pops[c] += a
			hh += real(cmplx.Conj(v) * e.hpsi[c][i])
		}
		pops[c] *= e.dV
		nrm += pops[c]
	}
	hh *= e.dV
	en.Norm = nrm
	for c := 0; c < 3; c++ {
		en.Populations[c] = pops[c] / nrm
	}
	en.Mu = hh / nrm
	if e.fixM {
		// least squares Hψ ≈ μψ + λF_zψ: the Gram system of ψ and F_zψ
		// (⟨ψ,ψ⟩ = N, ⟨ψ,F_zψ⟩ = N₊ − N₋, ⟨F_zψ,F_zψ⟩ = N₊ + N₋)
		hz := 0.0
		for i := range e.psi[0] {
			hz += real(cmplx.Conj(e.psi[0][i])*e.hpsi[0][i]) - real(cmplx.Conj(e.psi[2][i])*e.hpsi[2][i])
		}
		hz *= e.dV
		a, b, d := nrm, pops[0]-pops[2], pops[0]+pops[2]
		if det := a*d - b*b; det > 1e-12*a*a {
			en.Mu = (d*hh - b*hz) / det
			en.Lambda = (a*hz - b*hh) / det
		}
	}
	rr := 0.0
	zf := [3]float64{1, 0, -1}
	for c := 0; c < 3; c++ {
		sh := complex(en.Mu+en.Lambda*zf[c], 0)
		for i, v := range e.psi[c] {
			d := e.hpsi[c][i] - sh*v
			e.r[c][i] = d
			rr += abs2(d)
		}
	}
	en.Residual = math.Sqrt(rr * e.dV / nrm)
	en.Kinetic, en.Potential, en.Zeeman, en.Coupling, en.Density, en.Spin = kin/N, pot/N, zee/N, cpl/N, den/N, spin/N
	en.Total = (kin + pot + zee + cpl + den + spin) / N
	return en
}

func spin1Bad(en Spin1Energies) bool {
	return math.IsNaN(en.Total) || math.IsInf(en.Total, 0) || math.IsNaN(en.Residual) || math.IsInf(en.Residual, 0)
}

func reDot(a, b *[3][]complex128) float64 {
	s := 0.0
	for c := 0; c < 3; c++ {
		for i := range a[c] {
			s += real(a[c][i])*real(b[c][i]) + imag(a[c][i])*imag(b[c][i])
		}
	}
	return s
}

// cg is the preconditioned nonlinear conjugate gradient on the sphere
// ∫n = N of the two-component finisher (cg.go), carried over to three
// components (X. Antoine, A. Levitt, Q. Tang, J. Comput. Phys. 343, 92
// (2017); our own variant): g = P(r − βψ) with the kinetic preconditioner
// P = (α + K_m)⁻¹, α = max(1, ⟨K⟩ + ⟨V⟩ + 2E_int/N), β making ⟨ψ, g⟩ = 0;
// p = −g + b(p_old − projection), b = max(0, Polak–Ribière); ψ(θ) =
// cos θ ψ + sin θ q on the sphere. The kinetic energy along the curve is
// c²T_ψψ + 2cs T_ψq + s²T_qq (three numbers from one transform of q); the
// local energy change is evaluated pointwise for each trial θ (no
// transforms, see lineSearch), and θ is found by a geometric scan and
// golden-section refinement in (0, π/2]. In a harmonic trap it takes a
// phase step (phaseStep) every Settings.PhaseEvery iterations while that
// lowers the energy, restarting the recursion after each, as the
// two-component finisher does (see cg in cg.go for the conditioning of the
// phase modes of a Thomas–Fermi cloud).
func (e *spin1Engine) cg(set Settings, hist func(Spin1Energies)) (int, Status) {
	en := e.evaluate()
	if spin1Bad(en) {
		return 0, Diverged
	}
	e.alpha = math.Max(1, en.Kinetic+en.Potential+2*(en.Density+en.Spin))
	hist(en)
	N := e.m.Norm
	prevE := en.Total
	prevRG := 0.0
	restart := true
	for c := 0; c < 3; c++ {
		for i := range e.p[c] {
			e.p[c][i] = 0
		}
	}
	pre := func(c, i int) float64 { return 1 / (e.alpha + e.kin[c][i]) }
	phaseOn := e.phase != nil && set.PhaseEvery > 0
	for it := 1; it <= set.MaxIter; it++ {
		if set.isCanceled() {
			return it - 1, canceled
		}
		// g = P r − β P ψ
		e.applyK(&e.gr, &e.r, pre)
		e.applyK(&e.tmp, &e.psi, pre)
		if e.fixM {
			// g ⊥ ψ and ⊥ F_zψ: g = P r − βPψ − γF_zPψ (P and F_z commute)
			a, b, d := reDot(&e.psi, &e.tmp), reDotZ(&e.psi, &e.tmp), reDotZZ(&e.psi, &e.tmp)
			u, v := reDot(&e.psi, &e.gr), reDotZ(&e.psi, &e.gr)
			beta, gamma := u/a, 0.0
			if det := a*d - b*b; det > 1e-12*a*a {
				beta, gamma = (d*u-b*v)/det, (a*v-b*u)/det
			}
			for c := 0; c < 3; c++ {
				f := complex(beta+gamma*spin1Fz[c], 0)
				for i := range e.gr[c] {
					e.gr[c][i] -= f * e.tmp[c][i]
				}
			}
		} else {
			beta := reDot(&e.psi, &e.gr) / reDot(&e.psi, &e.tmp)
			for c := 0; c < 3; c++ {
				for i := range e.gr[c] {
					e.gr[c][i] -= complex(beta, 0) * e.tmp[c][i]
				}
			}
		}
		rg := reDot(&e.r, &e.gr)
		b := 0.0
		if !restart && prevRG > 0 {
			b = math.Max(0, (rg-reDot(&e.r, &e.gOld))/prevRG)
		}
		prevRG = rg
		restart = false
		// p = −g + b(p − ⟨ψ,p⟩ψ/‖ψ‖²)
		pp := reDot(&e.psi, &e.p) / (N / e.dV)
		for c := 0; c < 3; c++ {
			for i := range e.p[c] {
				e.p[c][i] = -e.gr[c][i] + complex(b, 0)*(e.p[c][i]-complex(pp, 0)*e.psi[c][i])
			}
			copy(e.gOld[c], e.gr[c])
		}
		if reDot(&e.r, &e.p) >= 0 { // not a descent direction: steepest descent
			for c := 0; c < 3; c++ {
				for i := range e.p[c] {
					e.p[c][i] = -e.gr[c][i]
				}
			}
		}
		// q = √N (p − ⟨ψ,p⟩ψ/N·dV…)/‖·‖, tangent and of norm N
		pp = reDot(&e.psi, &e.p) * e.dV / N
		for c := 0; c < 3; c++ {
			for i := range e.q[c] {
				e.q[c][i] = e.p[c][i] - complex(pp, 0)*e.psi[c][i]
			}
		}
		if e.fixM {
			e.tangentZ(&e.q) // also ⊥ F_zψ: ∫F_z changes at second order only
		}
		qn := e.norm(&e.q)
		if !(qn > 0) {
			return it - 1, spin1StatusAt(en, set)
		}
		f := complex(math.Sqrt(N/qn), 0)
		for c := 0; c < 3; c++ {
			for i := range e.q[c] {
				e.q[c][i] *= f
			}
		}
		th, dE := e.lineSearch(en.Lambda)
		if !(dE < 0) {
			if b == 0 {
				return it - 1, spin1StatusAt(en, set)
			}
			restart = true
			continue
		}
		cs, sn := complex(math.Cos(th), 0), complex(math.Sin(th), 0)
		for c := 0; c < 3; c++ {
			for i := range e.psi[c] {
				e.psi[c][i] = cs*e.psi[c][i] + sn*e.q[c][i]
			}
		}
		_ = e.normalize()
		en = e.evaluate()
		hist(en)
		if spin1Bad(en) {
			return it, Diverged
		}
		if en.Residual <= set.Tol && math.Abs(en.Total-prevE) <= set.EnergyTol {
			return it, Converged
		}
		prevE = en.Total
		if phaseOn && it%set.PhaseEvery == 0 {
			var lower bool
			en, lower = e.phaseStep(en)
			phaseOn = lower
			prevE = en.Total
			restart = true
		}
	}
	return set.MaxIter, MaxIterations
}

// phaseStep (harmonic trap; between finisher iterations) multiplies every
// component by one phase, ψ_m → e^{iφ(x)}ψ_m. That leaves |ψ_m|² and every
// local term unchanged: n, F_z, F_+ = √2(ψ₊₁*ψ₀ + ψ₀*ψ₋₁), the Ω coupling
// and the spin-changing term ψ₊₁*ψ₋₁*ψ₀² are invariant, so are the norm and
// ∫F_z (the step keeps a fixed magnetisation exactly, and E − λ∫F_z
// changes as E does). The kinetic energy Σ_m∫|(−i∇ − K_m x̂)ψ_m|² changes
// exactly by ∫(2∇φ·j + n|∇φ|²), j = Σ_m Re ψ_m*(−i∇ − K_m x̂)ψ_m (expand
// |e^{iφ}(∇φ + (−i∇ − K_m x̂))ψ_m|²), minimal over φ(x) of x alone at
// φ'(x) = −J(x)/D(x), J and D the transverse integrals of j_x and n: the
// two-component phaseStep with σ_z replaced by K_m, sharing its
// integration (addCurrent, phaseProfile, applyPhase). (−i∂_x − K_m)ψ_m is
// the spectral derivative, φ the trapezoid integral, so the step is kept
// only if the energy falls (else ψ is restored). Costs three FFT pairs and
// one evaluation (two when it is not kept); serial, no allocation. Our own
// construction. Uses tmp and q as scratch: the caller restarts the
// recursion.
func (e *spin1Engine) phaseStep(en Spin1Energies) (Spin1Energies, bool) {
	g := e.g
	nx := g.N[0]
	inner := e.n / nx
	inv := 1 / float64(e.n)
	J, D, P := e.phase[:nx], e.phase[nx:2*nx], e.phase[2*nx:]
	clear(J)
	clear(D)
	for c := 0; c < 3; c++ {
		copy(e.tmp[c], e.psi[c])
		e.tr.Forward(e.tmp[c])
		for idx := range e.tmp[c] {
			e.tmp[c][idx] *= complex((g.K[0][idx/inner]-e.m.K[c])*inv, 0)
		}
		e.tr.Backward(e.tmp[c])
		addCurrent(J, D, e.psi[c], e.tmp[c], inner)
	}
	phaseProfile(J, D, P, g.Dx[0])
	for c := 0; c < 3; c++ {
		applyPhase(e.psi[c], e.q[c], J, D, inner)
	}
	en2 := e.evaluate()
	if en2.Total < en.Total && !spin1Bad(en2) {
		return en2, true
	}
	for c := 0; c < 3; c++ {
		copy(e.psi[c], e.q[c])
	}
	return e.evaluate(), false
}

// spin1Fz is F_z on the components m = +1, 0, −1.
var spin1Fz = [3]float64{1, 0, -1}

// reDotZ is Re⟨a, F_z b⟩ (sum over points, no dV).
func reDotZ(a, b *[3][]complex128) float64 {
	s := 0.0
	for _, c := range []int{0, 2} {
		t := 0.0
		for i := range a[c] {
			t += real(a[c][i])*real(b[c][i]) + imag(a[c][i])*imag(b[c][i])
		}
		s += spin1Fz[c] * t
	}
	return s
}

// reDotZZ is Re⟨F_z a, F_z b⟩ (sum over points, no dV).
func reDotZZ(a, b *[3][]complex128) float64 {
	s := 0.0
	for _, c := range []int{0, 2} {
		for i := range a[c] {
			s += real(a[c][i])*real(b[c][i]) + imag(a[c][i])*imag(b[c][i])
		}
	}
	return s
}

// tangentZ removes from x (already ⊥ ψ) its part along ψ and F_zψ together
// (the Gram system of the two), so that x is tangent to both constraints.
func (e *spin1Engine) tangentZ(x *[3][]complex128) {
	a, b, d := reDot(&e.psi, &e.psi), reDotZ(&e.psi, &e.psi), reDotZZ(&e.psi, &e.psi)
	u, v := reDot(&e.psi, x), reDotZ(&e.psi, x)
	det := a*d - b*b
	if !(det > 1e-12*a*a) {
		return
	}
	al, be := (d*u-b*v)/det, (a*v-b*u)/det
	for c := 0; c < 3; c++ {
		f := complex(al+be*spin1Fz[c], 0)
		for i := range x[c] {
			x[c][i] -= f * e.psi[c][i]
		}
	}
}

func spin1StatusAt(en Spin1Energies, set Settings) Status {
	if en.Residual <= set.Tol {
		return Converged
	}
	return MaxIterations
}

// lineSearch returns the θ ∈ (0, π/2] of lowest E(cos θ ψ + sin θ q) and
// ΔE(θ) = E(θ) − E(0) (not per particle); with λ ≠ 0 (fixed
// magnetisation) it minimises the Lagrangian ΔE − λΔ∫F_z instead: the
// projection back onto ∫F_z = M·Norm that follows the step moves ψ within
// span{ψ, F_zψ} and changes E by −λΔ∫F_z to first order. ΔE is computed without
// cancellation: every bilinear X of the state changes by
// ΔX = −s²X_ψψ + cs X_ψq + s²X_qq (c = cos θ, s = sin θ) and every square by
// ΔX(2X + ΔX), so that descents far below the rounding of E itself are seen
// (the finisher works at residuals ~1e-8, where ΔE ~ 1e-16 E). The kinetic
// part is ΔT = −s²T_ψψ + 2cs T_ψq + s²T_qq from three transforms.
func (e *spin1Engine) lineSearch(lambda float64) (float64, float64) {
	tpp := e.kinEnergy(&e.psi)
	tqq := e.kinEnergy(&e.q)
	var sum [3][]complex128
	for c := 0; c < 3; c++ {
		sum[c] = e.hpsi[c] // scratch: ψ + q
		for i := range sum[c] {
			sum[c][i] = e.psi[c][i] + e.q[c][i]
		}
	}
	tpq := (e.kinEnergy(&sum) - tpp - tqq) / 2
	m := &e.m
	sq2 := complex(math.Sqrt2, 0)
	dE := func(th float64) float64 {
		c, s := math.Cos(th), math.Sin(th)
		cs, s2 := c*s, s*s
		var lin, den, spin, mz float64
		for i := 0; i < e.n; i++ {
			var n0, dn [3]float64
			var pv [3]complex128
			var qv [3]complex128
			for k := 0; k < 3; k++ {
				a, b := e.psi[k][i], e.q[k][i]
				pv[k], qv[k] = a, b
				n0[k] = abs2(a)
				dn[k] = -s2*n0[k] + 2*cs*(real(a)*real(b)+imag(a)*imag(b)) + s2*abs2(b)
			}
			f0 := sq2 * (cmplx.Conj(pv[0])*pv[1] + cmplx.Conj(pv[1])*pv[2])
			fpq := sq2 * (cmplx.Conj(pv[0])*qv[1] + cmplx.Conj(qv[0])*pv[1] + cmplx.Conj(pv[1])*qv[2] + cmplx.Conj(qv[1])*pv[2])
			fqq := sq2 * (cmplx.Conj(qv[0])*qv[1] + cmplx.Conj(qv[1])*qv[2])
			df := complex(-s2, 0)*f0 + complex(cs, 0)*fpq + complex(s2, 0)*fqq
			nt, dnt := n0[0]+n0[1]+n0[2], dn[0]+dn[1]+dn[2]
			v := 0.0
			if e.V != nil {
				v = e.V[i]
			}
			lin += v*dnt + m.E[0]*dn[0] + m.E[1]*dn[1] + m.E[2]*dn[2] + m.Omega/math.Sqrt2*real(df)
			den += dnt * (2*nt + dnt)
			fz, dfz := n0[0]-n0[2], dn[0]-dn[2]
			spin += dfz*(2*fz+dfz) + 2*(real(f0)*real(df)+imag(f0)*imag(df)) + abs2(df)
			mz += dfz
		}
		return -s2*tpp + 2*cs*tpq + s2*tqq + (lin+m.C0/2*den+m.C2/2*spin-lambda*mz)*e.dV
	}
	const nscan = 60
	const q = 0.7071067811865476
	bestJ, bestF := 0, math.Inf(1)
	th := math.Pi / 2
	for j := 0; j < nscan; j++ {
		if f := dE(th); f < bestF {
			bestJ, bestF = j, f
		}
		th *= q
	}
	hi := math.Pi / 2 * math.Pow(q, float64(bestJ-1))
	if bestJ == 0 {
		hi = math.Pi / 2
	}
	lo := math.Pi / 2 * math.Pow(q, float64(bestJ+1))
	bestT := math.Pi / 2 * math.Pow(q, float64(bestJ))
	const gr = 0.6180339887498949
	a, b := lo, hi
	x1, x2 := b-gr*(b-a), a+gr*(b-a)
	f1, f2 := dE(x1), dE(x2)
	for k := 0; k < 60 && b-a > 1e-10*b; k++ {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - gr*(b-a)
			f1 = dE(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + gr*(b-a)
			f2 = dE(x2)
		}
	}
	if f1 < bestF {
		bestT, bestF = x1, f1
	}
	if f2 < bestF {
		bestT, bestF = x2, f2
	}
	return bestT, bestF
}

// Spin1Solve finds the ground state of p from init (not modified; normalised
// first), in the stages of Solve: split-step imaginary time with Δτ lowered as
// the energy settles (Settings.Dtau, DtauFactor, DtauLevels, CheckEvery,
// SplitEnergyTol, MaxSplitSteps), then the conjugate-gradient finisher
// (MaxIter; in a harmonic trap with a common-phase step every PhaseEvery
// iterations, see phaseStep), unless Settings.Method says otherwise.
// Converged means residual ≤ Tol and energy change ≤ EnergyTol, confirmed
// by a fresh evaluation. The local split step is the exact exponential of
// the 3×3 local operator (expHerm3), spin-mixing term included. Settings.Threads, FFTMode and
// Progress are not used (one goroutine).
//
// With p.FixMagnetization the flow holds ∫F_z = M·Norm too: every
// renormalisation is the two-multiplier projection (see project; components
// with less than 1e-8 of the atoms are seeded first), the finisher's
// gradient and search directions are tangent to both constraints, its line
// search minimises E − λ∫F_z, and each step ends on the projection; the
// residual is that of Hψ = μψ + λF_zψ.
func Spin1Solve(p Spin1Problem, init *Spin1State, s *Settings) (*Spin1Result, error) {
	var set Settings
	if s != nil {
		set = *s
	}
	set = set.withDefaults()
	if p.Grid == nil {
		return nil, errors.New("gpe: spin-1 problem without grid")
	}
	if err := p.Model.Validate(p.Grid); err != nil {
		return nil, err
	}
	if err := init.check(p.Grid); err != nil {
		return nil, err
	}
	if err := p.checkMagnetization(); err != nil {
		return nil, err
	}
	e, err := newSpin1Engine(p.Grid, p.Model, set.Backend)
	if err != nil {
		return nil, err
	}
	defer e.close()
	e.fixM, e.mag = p.FixMagnetization, p.Magnetization
	for c := 0; c < 3; c++ {
		copy(e.psi[c], init.Psi[c])
	}
	if e.fixM {
		err = e.seedEmpty()
	} else {
		err = e.normalize()
	}
	if err != nil {
		return nil, err
	}
	res := &Spin1Result{Status: MaxIterations}
	stage, tau, cgCalls := "split", set.Dtau, 0
	hist := func(en Spin1Energies) {
		res.EnergyHistory = append(res.EnergyHistory, en.Total)
		res.ResidualHistory = append(res.ResidualHistory, en.Residual)
		if set.Progress != nil { // as Solve's
			pr := Progress{Start: set.startIndex, Stage: stage, Energy: en.Total, Residual: en.Residual}
			if stage == "split" {
				pr.Step, pr.Dtau = res.SplitSteps, tau
			} else {
				pr.Step = cgCalls
				cgCalls++
			}
			set.Progress(pr)
		}
	}
	if set.Method != CGOnly {
		level := 0
		prev := e.evaluate()
		hist(prev)
		for res.SplitSteps < set.MaxSplitSteps {
			n := min(set.CheckEvery, set.MaxSplitSteps-res.SplitSteps)
			e.splitSteps(tau, n)
			res.SplitSteps += n
			en := e.evaluate()
			hist(en)
			if spin1Bad(en) {
				res.Status = Diverged
				break
			}
			if set.isCanceled() {
				return nil, set.Context.Err()
			}
			if set.Method == SplitOnly && en.Residual <= set.Tol && math.Abs(en.Total-prev.Total) <= set.EnergyTol {
				res.Status = Converged
				break
			}
			if set.DtauLevels >= 0 && math.Abs(en.Total-prev.Total) < set.SplitEnergyTol*tau/set.Dtau {
				if level == set.DtauLevels {
					break
				}
				level++
				tau /= set.DtauFactor
			}
			prev = en
		}
		res.Dtau = tau
	}
	if set.Method != SplitOnly && res.Status != Diverged {
		stage = "cg"
		res.Iterations, res.Status = e.cg(set, hist)
		if res.Status == canceled {
			return nil, set.Context.Err()
		}
	}
	res.State = NewSpin1State(p.Grid)
	for c := 0; c < 3; c++ {
		copy(res.State.Psi[c], e.psi[c])
	}
	res.Energies = e.evaluate()
	res.Residual = res.Energies.Residual
	if spin1Bad(res.Energies) {
		res.Status = Diverged
	} else if res.Status == Converged && res.Residual > set.Tol {
		res.Status = MaxIterations
	}
	return res, nil
}

func (p Spin1Problem) checkMagnetization() error {
	if p.FixMagnetization && !(p.Magnetization > -1 && p.Magnetization < 1) {
		return fmt.Errorf("gpe: magnetisation %g: a fixed ⟨F_z⟩ must lie in (−1, 1)", p.Magnetization)
	}
	return nil
}

// Spin1Evaluate returns the energies of st for p (with p.FixMagnetization
// the multipliers μ, λ and the residual of the constrained problem; st is
// not projected).
func Spin1Evaluate(p Spin1Problem, st *Spin1State, b fft.Backend) (Spin1Energies, error) {
	if err := p.Model.Validate(p.Grid); err != nil {
		return Spin1Energies{}, err
	}
	if err := st.check(p.Grid); err != nil {
		return Spin1Energies{}, err
	}
	e, err := newSpin1Engine(p.Grid, p.Model, b)
	if err != nil {
		return Spin1Energies{}, err
	}
	defer e.close()
	e.fixM, e.mag = p.FixMagnetization, p.Magnetization
	for c := 0; c < 3; c++ {
		copy(e.psi[c], st.Psi[c])
	}
	return e.evaluate(), nil
}
