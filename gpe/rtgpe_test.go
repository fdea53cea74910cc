package gpe

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"testing"
)

func constH(h RTHamiltonian) RTSchedule { return func(float64) RTHamiltonian { return h } }

func newRT(t testing.TB, st *State, h RTHamiltonian, dt float64) *RealTime {
	t.Helper()
	np := 0.0
	for i := range st.Psi[0] {
		np = math.Max(np, abs2(st.Psi[0][i])+abs2(st.Psi[1][i]))
	}
	r, err := NewRealTime(st, RTSettings{Dt: dt, EMax: RTMaxEnergy(st.Grid, h, np)})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func gaussian1D(g *Grid, s0, k0, x0 float64, comp int) *State {
	st := NewState(g)
	for idx := range st.Psi[0] {
		i, j, l := g.Coords(idx)
		e := (g.X[0][i] - x0) * (g.X[0][i] - x0)
		if g.Dim > 1 {
			e += g.X[1][j] * g.X[1][j]
		}
		if g.Dim > 2 {
			e += g.X[2][l] * g.X[2][l]
		}
		st.Psi[comp][idx] = cmplx.Rect(math.Exp(-e/(2*s0*s0)), k0*g.X[0][i])
	}
	if err := st.Normalize(1); err != nil {
		panic(err)
	}
	return st
}

// Free expansion of a Gaussian wave packet ψ ∝ exp(−x²/2σ₀²): the width
// parameter grows as σ(t) = σ₀√(1 + (ħt/mσ₀²)²) (any quantum mechanics
// text); the rms width of |ψ|² is σ/√2 per axis. Internal units ħ = 1,
// m = 1/2: ħt/mσ₀² = 2t/σ₀². In 1D and 2D, with the SOC term on (Ω = 0:
// a spin-polarised packet at its band minimum k = κ moves with zero
// mechanical velocity and spreads like a free particle).
func TestRTGaussianExpansion(t *testing.T) {
	for _, c := range []struct {
		pts []int
		L   []float64
	}{{[]int{1024}, []float64{160}}, {[]int{128, 128}, []float64{120, 120}}} {
		g := MustGrid(c.pts, c.L)
		s0 := 3.0
		st := gaussian1D(g, s0, 1, 0, 0)
		h := RTHamiltonian{Kappa: 1}
		r := newRT(t, st, h, 0)
		for _, tt := range []float64{2, 6, 12} {
			if _, err := r.Evolve(context.Background(), tt-r.T, constH(h)); err != nil {
				t.Fatal(err)
			}
			m := r.Moments(1)
			want := s0 * math.Sqrt(1+math.Pow(2*tt/(s0*s0), 2)) / math.Sqrt2
			for a := 0; a < g.Dim; a++ {
				if d := math.Abs(m.Width[a]/want - 1); d > 1e-9 {
					t.Errorf("%dD t=%g axis %d: rms width %.10g, want %.10g (rel %.2e)", g.Dim, tt, a, m.Width[a], want, d)
				}
			}
			if math.Abs(m.Center[0]) > 1e-9 {
				t.Errorf("%dD t=%g: centre moved to %g (mechanical velocity 0 at k = κ)", g.Dim, tt, m.Center[0])
			}
		}
		r.Close()
	}
}

// scalingODE integrates the Castin–Dum scaling equations for an isotropic
// release in d dimensions, λ̈ = ω²/λ^{d+1} (Y. Castin and R. Dum, Phys. Rev.
// Lett. 77, 5315 (1996); Yu. Kagan, E. L. Surkov, G. V. Shlyapnikov,
// Phys. Rev. A 54, R1753 (1996)), λ(0) = 1, λ̇(0) = 0, by RK4.
func scalingODE(d int, w, t float64) float64 {
	n := 20000
	h := t / float64(n)
	f := func(l float64) float64 { return w * w / math.Pow(l, float64(d+1)) }
	l, v := 1.0, 0.0
	for i := 0; i < n; i++ {
		k1l, k1v := v, f(l)
		k2l, k2v := v+h/2*k1v, f(l+h/2*k1l)
		k3l, k3v := v+h/2*k2v, f(l+h/2*k2l)
		k4l, k4v := v+h*k3v, f(l+h*k3l)
		l += h / 6 * (k1l + 2*k2l + 2*k3l + k4l)
		v += h / 6 * (k1v + 2*k2v + 2*k3v + k4v)
	}
	return l
}

// Release of a Thomas–Fermi condensate from an isotropic harmonic trap: the
// cloud expands self-similarly, its rms width growing by the scaling factor
// λ(t) of Castin & Dum (PRL 77, 5315 (1996)) and Kagan, Surkov & Shlyapnikov
// (PRA 54, R1753 (1996)), exact in the Thomas–Fermi limit. The initial state
// is the GP ground state from Solve (Ω = 0, all g equal: one effective
// component); residual deviations are the quantum pressure, O((ħω/μ)²).
func TestRTCastinDum(t *testing.T) {
	cases := []struct {
		dim  int
		pts  []int
		L    float64
		w, g float64
		tol  float64
	}{
		{1, []int{1024}, 360, 0.1, 50, 0.004},
		{3, []int{48, 48, 48}, 48, 0.5, 3000, 0.02},
	}
	if testing.Short() {
		cases = cases[:1]
	}
	for _, c := range cases {
		L := make([]float64, c.dim)
		for a := range L {
			L[a] = c.L
		}
		g := MustGrid(c.pts, L)
		m := Model{Guu: c.g, Gdd: c.g, Gud: c.g, Norm: 1, Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{c.w, c.w, c.w}}}
		res := solveOrFatal(t, Problem{Grid: g, Model: m}, Guess{Kind: GuessPlaneWave, K: 1}, &Settings{Tol: 1e-6})
		mu := ThomasFermiMu(c.dim, m)
		t.Logf("%dD: μ = %.4g (TF %.4g), μ/ħω = %.1f, status %v", c.dim, res.Energies.Mu, mu, mu/c.w, res.Status)
		h := RTHamiltonian{Kappa: 1, TrapAngular: [3]float64{c.w, c.w, c.w}, Guu: c.g, Gdd: c.g, Gud: c.g}
		r := newRT(t, res.State, h, 0)
		w0 := r.Moments(1).Width[0]
		free := h
		free.TrapAngular = [3]float64{}
		for _, wt := range []float64{1, 2, 3} {
			tt := wt / c.w
			if _, err := r.Evolve(context.Background(), tt-r.T, constH(free)); err != nil {
				t.Fatal(err)
			}
			lam := scalingODE(c.dim, c.w, tt)
			got := r.Moments(1).Width
			for a := 0; a < c.dim; a++ {
				if d := math.Abs(got[a]/w0/lam - 1); d > c.tol {
					t.Errorf("%dD ωt = %g axis %d: width ratio %.5f, scaling solution λ = %.5f (rel %.2e > %.0e)", c.dim, wt, a, got[a]/w0, lam, d, c.tol)
				} else {
					t.Logf("%dD ωt = %g axis %d: width ratio %.5f, λ = %.5f (rel %.1e)", c.dim, wt, a, got[a]/w0, lam, d)
				}
			}
		}
		r.Close()
	}
}

// A plane wave e^{ikx} in ↑ oscillates to ↓ at the two-level frequency
// Ω_eff = √(Ω² + (δ − 4k)²) with P↓ = (Ω/Ω_eff)² sin²(Ω_eff t/2) (h(k) =
// (k − σz)² + (Ω/2)σx + (δ/2)σz has the σz coefficient δ/2 − 2k; textbook
// two-level physics). The Strang error falls as τ²: halving τ divides the
// largest deviation by about 4.
func TestRTRabiPlaneWave(t *testing.T) {
	g := MustGrid([]int{64}, []float64{8 * math.Pi}) // admits k = 0.5
	k, om, de := 0.5, 1.3, 0.4
	h := RTHamiltonian{Omega: om, Delta: de, Kappa: 1}
	weff := math.Hypot(om, de-4*k)
	worst := func(dt float64) float64 {
		st := NewState(g)
		for i, x := range g.X[0] {
			st.Psi[0][i] = cmplx.Rect(1, k*x)
		}
		st.Normalize(1)
		r := newRT(t, st, h, dt)
		defer r.Close()
		w := 0.0
		for i := 1; i <= 40; i++ {
			tt := float64(i) * 0.25
			r.Evolve(context.Background(), tt-r.T, constH(h))
			pd := r.st.SumSquares(1) * g.DV
			want := om * om / (weff * weff) * math.Pow(math.Sin(weff*tt/2), 2)
			w = math.Max(w, math.Abs(pd-want))
		}
		return w
	}
	e1 := worst(0)
	st := NewState(g)
	np := 1 / g.Volume()
	dt0 := RTStepPhase / RTMaxEnergy(g, h, np)
	e2 := worst(dt0 / 2)
	t.Logf("default τ = %.4g: largest |ΔP↓| %.2e; τ/2: %.2e (ratio %.2f)", dt0, e1, e2, e1/e2)
	_ = st
	if e1 > 2e-3 {
		t.Errorf("largest deviation from the two-level formula %.2e at the default step, want < 2e-3", e1)
	}
	if r := e1 / e2; r < 3.5 || r > 4.5 {
		t.Errorf("error ratio for τ → τ/2 is %.2f, want ≈ 4 (second order)", r)
	}
}

// Synthetic electric force: with Ω = 0 the Hamiltonian (k − κσz)² is
// diagonal in the canonical momentum k, so a ramp of κ by Δκ leaves ⟨k⟩
// unchanged and changes the mechanical momentum k − κσz of a ↑ (↓) packet
// by −Δκ (+Δκ): a velocity change ∓ħΔk/m, i.e. ∓2Δκ in units ħ = 1,
// m = 1/2 (the gauge-field picture of Y.-J. Lin et al., Nature Physics 7,
// 531 (2011), from memory). The packet's centre moves by ∫2(k − σκ(t)) dt.
func TestRTSyntheticElectricForce(t *testing.T) {
	g := MustGrid([]int{512}, []float64{200})
	k0, dk, T := 1.0, 0.5, 10.0
	for comp := 0; comp < 2; comp++ {
		sgn := 1.0 - 2*float64(comp)
		st := gaussian1D(g, 4, sgn*k0, 0, comp) // at its band minimum: mechanical momentum 0
		sched := func(tt float64) RTHamiltonian { return RTHamiltonian{Kappa: k0 + dk*tt/T} }
		r := newRT(t, st, sched(T), 0)
		before := r.Moments(k0)
		if _, err := r.Evolve(context.Background(), T, sched); err != nil {
			t.Fatal(err)
		}
		after := r.Moments(k0 + dk)
		if d := math.Abs(after.KCanonical[comp] - before.KCanonical[comp]); d > 1e-12 {
			t.Errorf("comp %d: canonical momentum changed by %g", comp, d)
		}
		dv := 2 * (after.KMechanical[comp] - before.KMechanical[comp])
		if want := -sgn * 2 * dk; math.Abs(dv-want) > 1e-12 {
			t.Errorf("comp %d: velocity change %.12g, want %g", comp, dv, want)
		}
		// x(T) = ∫₀ᵀ 2(σk₀ − σκ(t)) dt = −σ dk T (mechanical momentum starts at 0).
		if want := -sgn * dk * T; math.Abs(after.Center[0]-want) > 1e-6 {
			t.Errorf("comp %d: centre at %.8g, want %.8g", comp, after.Center[0], want)
		}
		r.Close()
	}
}

// trappedMix is a two-component trapped cloud with SOC, interactions and a
// coupling: the ground state of the mixture at Ω = 0 rotated by a π/3 pulse.
func trappedMix(t testing.TB, g *Grid) (*State, RTHamiltonian) {
	h := RTHamiltonian{Omega: 1.2, Delta: 0.3, Kappa: 1, TrapAngular: [3]float64{0.2, 0.2, 0.2}, Guu: 4, Gdd: 3.6, Gud: 3}
	st := gaussian1D(g, 4, 1, 0.5, 0)
	for i := range st.Psi[0] {
		st.Psi[1][i] = 0.6 * st.Psi[0][i] * cmplx.Rect(1, -2*g.X[0][i%g.N[0]])
	}
	st.Normalize(1)
	return st, h
}

// Norm conservation: every factor of the split step is unitary, so 10⁴ steps
// of an interacting, trapped, coupled cloud with ramped Ω, δ, κ and trap keep
// the norm to 1e-12 (an identity of the method).
func TestRTNormConserved(t *testing.T) {
	g := MustGrid([]int{256}, []float64{80})
	st, h := trappedMix(t, g)
	sched := func(tt float64) RTHamiltonian {
		x := h
		x.Omega = h.Omega * (1 + 0.5*math.Sin(tt))
		x.Delta = h.Delta * math.Cos(0.3*tt)
		x.Kappa = 1 + 0.2*math.Sin(0.7*tt)
		x.TrapAngular[0] = h.TrapAngular[0] * (1 + 0.1*tt/50)
		return x
	}
	for _, c := range []struct {
		name  string
		sched RTSchedule
	}{{"ramped", sched}, {"held", constH(h)}} {
		r := newRT(t, st, h, 0)
		n0 := r.Norm()
		dur := float64(10000) * r.Dt
		n, err := r.Evolve(context.Background(), dur, c.sched)
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(r.Norm()/n0 - 1); d > 1e-12 {
			t.Errorf("%s: norm changed by %.2e over %d steps, want ≤ 1e-12", c.name, d, n)
		} else {
			t.Logf("%s: norm change %.2e over %d steps", c.name, d, n)
		}
		r.Close()
	}
}

// Energy conservation when nothing is ramped: the split step conserves a
// modified energy, so the GP energy oscillates by O(τ²) without drift; over
// 10⁴ default steps of the trapped, interacting, coupled cloud it stays within
// 1e-4 E_R, and the deviation falls about fourfold when τ is halved.
func TestRTEnergyConserved(t *testing.T) {
	g := MustGrid([]int{256}, []float64{80})
	st, h := trappedMix(t, g)
	dev := func(dt float64, steps int) float64 {
		r := newRT(t, st, h, dt)
		defer r.Close()
		e0 := r.Energies(h).Total
		worst := 0.0
		for i := 0; i < 50; i++ {
			r.Evolve(context.Background(), float64(steps/50)*r.Dt, constH(h))
			worst = math.Max(worst, math.Abs(r.Energies(h).Total-e0))
		}
		return worst
	}
	r0 := newRT(t, st, h, 0)
	dt := r0.Dt
	r0.Close()
	d1 := dev(dt, 10000)
	d2 := dev(dt/2, 20000)
	t.Logf("τ = %.4g: largest |ΔE| %.2e E_R over 10⁴ steps; τ/2: %.2e (ratio %.2f)", dt, d1, d2, d1/d2)
	if d1 > 1e-4 {
		t.Errorf("energy deviation %.2e E_R over 10⁴ steps, want ≤ 1e-4", d1)
	}
	if d1/d2 < 3 {
		t.Errorf("energy deviation ratio %.2f for τ → τ/2, want ≈ 4", d1/d2)
	}
}

// A forced time step at or beyond the stability limit is refused.
func TestRTUnstableStepRefused(t *testing.T) {
	g := MustGrid([]int{128}, []float64{40})
	st, h := trappedMix(t, g)
	em := RTMaxEnergy(g, h, 1)
	_, err := NewRealTime(st, RTSettings{Dt: 3.2 / em, EMax: em})
	if !errors.Is(err, ErrUnstableStep) {
		t.Fatalf("τ·E_max = 3.2: err = %v, want ErrUnstableStep", err)
	}
	if _, err := NewRealTime(st, RTSettings{Dt: 3.0 / em, EMax: em}); err != nil {
		t.Fatalf("τ·E_max = 3.0 refused: %v", err)
	}
}

// Cancelling the context stops the evolution with a valid state at time T.
func TestRTCancel(t *testing.T) {
	g := MustGrid([]int{128}, []float64{40})
	st, h := trappedMix(t, g)
	r := newRT(t, st, h, 0)
	defer r.Close()
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	sched := func(tt float64) RTHamiltonian {
		calls++
		if calls == 30 {
			cancel()
		}
		return h
	}
	n, err := r.Evolve(ctx, 1000*r.Dt, sched)
	if !errors.Is(err, context.Canceled) || n >= 1000 || n < 5 {
		t.Fatalf("steps %d, err %v: want an early stop with context.Canceled", n, err)
	}
	if d := math.Abs(r.Norm() - 1); d > 1e-13 {
		t.Errorf("norm after the stop off by %g", d)
	}
	if math.Abs(r.T-float64(n)*r.Dt) > 1e-9 {
		t.Errorf("T = %g after %d steps of %g", r.T, n, r.Dt)
	}
}
