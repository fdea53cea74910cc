package gpe

import "math"

// RefreshEvery: the finisher recomputes ψ̂ = F(ψ) from scratch every this
// many iterations (between, ψ̂ is updated in k space by linearity).
const RefreshEvery = 25

// cg runs the preconditioned nonlinear conjugate gradient on the sphere
// ∫|ψ|² = N (after X. Antoine, A. Levitt, Q. Tang, J. Comput. Phys. 343
// (2017) 92; our own variant):
//
//	r = H[ψ]ψ − μψ                         (Riemannian gradient, up to 2)
//	g = P(r − βψ),  β = Re⟨ψ,Pr⟩/⟨ψ,Pψ⟩     (preconditioned, tangent)
//	p = −g + b·(p_old − projection on ψ),  b = max(0, Polak–Ribière)
//	ψ(θ) = cos θ ψ + sin θ q,  q = √N p/‖p‖ (retraction on the sphere)
//
// with the kinetic preconditioner P = (α + K_σ(k))⁻¹, K_σ = (k_x ∓ 1)² + k_⊥²,
// α = max(1, ⟨K⟩ + ⟨V⟩ + 2E_int/N) (per particle, E_R; measured: floors
// 0.1–3 and scales 0.3–2 change the iteration counts of trapped, TF and
// random-start test problems by less than ±30%). The energy along the curve is a
// trigonometric polynomial whose coefficients (moments of ψ and q) are
// computed in one pass, so θ is found by an exact one-dimensional search
// without further transforms. Each iteration costs four FFTs. The fixed
// point is the exact discrete stationary state H[ψ]ψ = μψ.
//
// Conditioning in a trap: the phase modes iφψ of a Thomas–Fermi cloud are
// soft, e.g. φ = x has the preconditioned Rayleigh quotient
// ρ ≈ 5b/(2αR²) (b ≈ 2 the band curvature, R = 2√μ/ω_x; 1D,
// TestPhaseModeConditioning), while the density mode reaches 2gn/α ≈ 2, so
// κ ≳ 1.6 μ²/ω_x² and CG needs ≈ 1.15√κ iterations per decade of the
// residual (μ = 330 E_R, ω = 0.25: ≈ 1900, as measured). In a harmonic trap
// the finisher therefore takes a phase step (phaseStep, the exact kinetic
// minimiser over phases φ(x)) every Settings.PhaseEvery iterations while it
// lowers the energy, restarting the recursion after each.
func (e *engine) cg(set Settings, hist func(Energies)) (int, Status) {
	e.cgSums = true
	defer func() { e.cgSums = false }()
	en := e.evaluate()
	if bad(en) {
		return 0, Diverged
	}
	a := math.Max(1, en.Kinetic+en.Potential+2*en.Interaction)
	if a != e.alpha {
		e.alpha = a
		en = e.evaluate()
	}
	hist(en)
	prevE := en.Total
	restart := true
	prevRG := 0.0
	N := e.m.Norm
	fn := float64(e.n)
	var lm lineModel
	phaseOn := e.phase != nil && set.PhaseEvery > 0
	for it := 1; it <= set.MaxIter; it++ {
		if set.isCanceled() {
			return it - 1, canceled
		}
		// the sums of the last opK2 (with cgSums)
		ks := &e.k2sum
		rg := ks[4] - e.beta*ks[1] // Re⟨r̂, P(r̂ − βψ̂)⟩
		rgOld, hpOld, rpOld, rh, hh := ks[5], ks[6], ks[7], ks[3], ks[8]
		e.bpr = 0
		if !restart && prevRG > 0 {
			e.bpr = math.Max(0, (rg-rgOld)/prevRG)
		}
		e.cproj = hpOld / hh
		// Re⟨r̂, p̂⟩ of the new direction, known before the pass: it must be
		// negative (descent), else fall back to steepest descent.
		if e.bpr != 0 && -rg+e.bpr*(rpOld-e.cproj*rh) >= 0 {
			e.bpr = 0
		}
		e.reduce(opK34, 5)
		steepest := e.bpr == 0
		prevRG = rg
		restart = false
		pp, hKp, pKp := e.sum[0], e.sum[1], e.sum[2]
		if !(pp > 0) {
			return it - 1, statusAt(en, set)
		}
		qs := math.Sqrt(N / (pp * e.dV / fn))
		e.fftPair(opBwdP)
		e.sig = qs / fn
		e.reduce(opMoments, mEnd)
		lm.set(e, qs, hKp, pKp)
		th, dE := lm.minimize()
		if !(dE < 0) {
			if steepest {
				// No descent even along the preconditioned gradient: the
				// energy is flat to rounding. Stop; the status follows
				// the residual.
				return it - 1, statusAt(en, set)
			}
			restart = true
			continue
		}
		c, s := math.Cos(th), math.Sin(th)
		sm := &e.sum
		nn := e.dV * (c*c*sm[mNa] + c*s*sm[mNb] + s*s*sm[mNd])
		e.upd = true
		e.uc, e.us, e.ut, e.usig, e.uqs = c, s, math.Sqrt(N/nn), e.sig, qs
		en = e.evalAfterLocal(it%RefreshEvery == 0)
		hist(en)
		if bad(en) {
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

// phaseStep (harmonic trap; between finisher iterations): for a common phase
// ψ_σ → e^{iφ}ψ_σ the density, and with it the potential, Rabi, detuning
// and interaction energies, is unchanged, and the kinetic energy
// Σ_σ∫|(−i∇ − σ_z x̂)ψ_σ|² changes exactly by ∫(2∇φ·j + n|∇φ|²) with the
// current j = Σ_σ Re ψ_σ*(−i∇ − σ_z x̂)ψ_σ (expand |e^{iφ}(∇φ + (−i∇ − σ_z x̂))ψ|²).
// Over phases φ(x) of x alone the minimiser is φ'(x) = −J(x)/D(x), J and D
// the transverse integrals of j_x and n (exact in 1D: the ground state
// carries no current). Phase modes are the soft modes the kinetic
// preconditioner leaves (see cg; measured at N = 2e6, μ ≈ 330 E_R: half the
// excess energy after 2800 iterations is in the common phase;
// DEVELOPERS.md, "Convergence of large clouds"). Discretely φ is the trapezoid integral of φ' (D regularised by
// 1e-8 of its maximum) and j uses the spectral derivative of the current
// ψ̂, so the step is not exact on the grid: it is kept only if the energy
// falls (else ψ is restored). Costs one FFT pair and one evaluation (two
// when it is not kept); runs serially (deterministic for any thread count). Our own construction. Uses px and pk as
// scratch: the caller restarts the conjugate-gradient recursion.
func (e *engine) phaseStep(en Energies) (Energies, bool) {
	g := e.g
	nx := g.N[0]
	inner := e.n / nx
	inv := 1 / float64(e.n)
	sz := [2]float64{+1, -1}
	for c := 0; c < 2; c++ {
		for idx, h := range e.hat[c] {
			e.px[c][idx] = h * complex((g.K[0][idx/inner]-sz[c])*inv, 0)
		}
	}
	e.fftPair(opBwdP)
	J, D, P := e.phase[:nx], e.phase[nx:2*nx], e.phase[2*nx:]
	clear(J)
	clear(D)
	for c := 0; c < 2; c++ {
		addCurrent(J, D, e.psi[c], e.px[c], inner)
	}
	phaseProfile(J, D, P, g.Dx[0])
	for c := 0; c < 2; c++ {
		applyPhase(e.psi[c], e.pk[c], J, D, inner)
	}
	en2 := e.evaluate()
	if en2.Total < en.Total && !bad(en2) {
		return en2, true
	}
	copy(e.psi[0], e.pk[0])
	copy(e.psi[1], e.pk[1])
	return e.evaluate(), false
}

// addCurrent adds to J[i] and D[i] the sums over the points of slab x_i
// (inner consecutive points) of Re ψ*·dψ and |ψ|², dψ = (−i∂_x − K)ψ: the
// transverse integrals (without dV) of one component's current j_x and
// density n, for phaseStep and the spin-1 phase step.
func addCurrent(J, D []float64, psi, dpsi []complex128, inner int) {
	for idx, p := range psi {
		q := dpsi[idx]
		i := idx / inner
		J[i] += real(p)*real(q) + imag(p)*imag(q)
		D[i] += abs2(p)
	}
}

// phaseProfile integrates φ'(x) = −J(x)/D(x) (D regularised by 1e-8 of
// its maximum) by the trapezoid rule on the x grid of spacing dx, from
// φ(x_0) = 0, into P, and overwrites J and D with cos φ and sin φ.
func phaseProfile(J, D, P []float64, dx float64) {
	dmax := 0.0
	for _, d := range D {
		dmax = math.Max(dmax, d)
	}
	prev := 0.0
	for i := range P {
		d := -J[i] / (D[i] + 1e-8*dmax)
		if i == 0 {
			P[0] = 0
		} else {
			P[i] = P[i-1] + dx*(d+prev)/2
		}
		prev = d
	}
	for i, ph := range P {
		J[i], D[i] = math.Cos(ph), math.Sin(ph)
	}
}

// applyPhase copies psi into save and multiplies psi by e^{iφ(x_i)} =
// cos[i] + i sin[i] on slab x_i (inner consecutive points).
func applyPhase(psi, save []complex128, cos, sin []float64, inner int) {
	copy(save, psi)
	for idx := range psi {
		i := idx / inner
		psi[idx] *= complex(cos[i], sin[i])
	}
}

func statusAt(en Energies, set Settings) Status {
	if en.Residual <= set.Tol {
		return Converged
	}
	return MaxIterations
}

// lineModel is the energy change along ψ(θ) = cos θ ψ + sin θ q:
// every density-like quantity is c²X_a + cs X_b + s²X_d, so
// ΔE(θ) = Σ_x Δw_x L_x + Σ_xy (w_x w_y − w⁰_x w⁰_y) U_xy with
// w = (c², cs, s²), w⁰ = (1, 0, 0), Δw = (−s², cs, s²).
type lineModel struct {
	L [3]float64    // kinetic + potential + Rabi + detuning, in E (not per particle)
	U [3][3]float64 // interaction: dV(½g↑↑ M↑↑ + ½g↓↓ M↓↓ + g↑↓ M↑↓)
}

func (l *lineModel) set(e *engine, qs, hKp, pKp float64) {
	s := &e.sum
	m := &e.m
	dv := e.dV
	fn := float64(e.n)
	kin := [3]float64{e.kinSum * dv / fn, 2 * qs * hKp * dv / fn, qs * qs * pKp * dv / fn}
	for x := 0; x < 3; x++ {
		l.L[x] = kin[x] + dv*(s[mVa+x]+m.Omega*s[mRa+x]+m.Delta/2*s[mZa+x])
	}
	sym := func(b, x, y int) float64 {
		if x > y {
			x, y = y, x
		}
		// packed aa ab ad bb bd dd
		idx := [3][3]int{{0, 1, 2}, {1, 3, 4}, {2, 4, 5}}
		return s[b+idx[x][y]]
	}
	for x := 0; x < 3; x++ {
		for y := 0; y < 3; y++ {
			l.U[x][y] = dv * (m.Guu/2*sym(mUU, x, y) + m.Gdd/2*sym(mDD, x, y) + m.Gud*s[mUD+3*x+y])
		}
	}
}

func (l *lineModel) dE(th float64) float64 {
	c, s := math.Cos(th), math.Sin(th)
	dw := [3]float64{-s * s, c * s, s * s}
	w0 := [3]float64{1, 0, 0}
	r := 0.0
	for x := 0; x < 3; x++ {
		r += dw[x] * l.L[x]
		for y := 0; y < 3; y++ {
			r += (dw[x]*w0[y] + w0[x]*dw[y] + dw[x]*dw[y]) * l.U[x][y]
		}
	}
	return r
}

// minimize returns the θ in (0, π/2] of lowest ΔE and ΔE there: a
// geometric scan θ_j = (π/2)·2^{−j/2} followed by golden-section refinement
// (to 1e-10 relative) in the bracket around the best sample.
func (l *lineModel) minimize() (float64, float64) {
	const nscan = 110
	const q = 0.7071067811865476
	bestJ, bestF := -1, 0.0
	th := math.Pi / 2
	for j := 0; j < nscan; j++ {
		f := l.dE(th)
		if f < bestF || bestJ < 0 {
			bestJ, bestF = j, f
		}
		th *= q
	}
	hiT := math.Pi / 2 * math.Pow(q, float64(bestJ-1))
	if bestJ == 0 {
		hiT = math.Pi / 2
	}
	loT := math.Pi / 2 * math.Pow(q, float64(bestJ+1))
	bestT := math.Pi / 2 * math.Pow(q, float64(bestJ))
	const gr = 0.6180339887498949
	a, b := loT, hiT
	x1 := b - gr*(b-a)
	x2 := a + gr*(b-a)
	f1, f2 := l.dE(x1), l.dE(x2)
	for k := 0; k < 80 && b-a > 1e-10*b; k++ {
		if f1 < f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - gr*(b-a)
			f1 = l.dE(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + gr*(b-a)
			f2 = l.dE(x2)
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
