package gpe

import (
	"context"
	"math"
	"math/cmplx"
	"testing"
)

// A plane wave of momentum k₀ in a free box under a Bragg pulse: a two-level
// Rabi problem between k₀ and k₀ + Q with coupling Ω_B and detuning
// Δ = ω_B − [(k₀ + Q)² − k₀²], so that the diffracted fraction is
// Ω_B²/(Ω_B² + Δ²)·sin²(√(Ω_B² + Δ²)τ/2) (textbook two-level physics;
// the other orders are detuned by ≥ 2Q², a leakage ≲ (Ω_B/4Q²)²).
func TestBraggTransferRabi(t *testing.T) {
	g := MustGrid([]int{128}, []float64{8 * math.Pi})
	st := NewState(g)
	k0 := 0.25
	for i := range st.Psi[0] {
		st.Psi[0][i] = cmplx.Rect(1, k0*g.X[0][i])
	}
	st.Normalize(1)
	h := RTHamiltonian{}
	q, om := 2.0, 0.2
	res := (k0+q)*(k0+q) - k0*k0
	for _, c := range []struct{ det, tau float64 }{{0, math.Pi / om}, {0, math.Pi / (2 * om)}, {0.1, 20}, {-0.3, 7}} {
		p := BraggPulse{Q: q, Rabi: om, Frequency: res + c.det, Duration: c.tau}
		d, err := BraggTransfer(context.Background(), st, h, p, []float64{0, 1.3}, RTSettings{EMax: RTMaxEnergy(g, h, 1)})
		if err != nil {
			t.Fatal(err)
		}
		w := math.Hypot(om, c.det)
		want := om * om / (w * w) * math.Pow(math.Sin(w*c.tau/2), 2)
		for j, r := range d {
			v := r.Moved
			if math.Abs(v-want) > 2e-3 {
				t.Errorf("Δ = %g, τ = %.4g, phase %d: diffracted %.5f, want %.5f (Rabi formula)", c.det, c.tau, j, v, want)
			}
		}
		t.Logf("Δ = %g, τ = %.4g: diffracted %.5f, Rabi formula %.5f", c.det, c.tau, d[0].Moved, want)
	}
}

// lowerSpinor is the lower-band spinor of h(k) = (k − σz)² + (Ω/2)σx at k
// (closed form of the 2×2 eigenproblem).
func lowerSpinor(k, om float64) (float64, float64) {
	b := math.Hypot(2*k, om/2)
	u, d := om/2, 2*k-b
	n := math.Hypot(u, d)
	return u / n, d / n
}

// The stripe against a plane wave under a static 2k₁ lattice (ω_B = 0: the
// two band minima ±k₁ are degenerate at δ = 0), non-interacting, in a box.
// First-order time-dependent perturbation theory (textbook), derived here:
// the lattice couples the dressed states χ₊e^{ik₁x} and χ₋e^{−ik₁x} with
// (Ω_B/2)e^{±iφ}s, s = ⟨χ₊|χ₋⟩, so a stripe a χ₊e^{ik₁x} + b χ₋e^{−ik₁x}
// moves the population Δw = Ω_Bτ·s·a·b·sin(φ + β) between the two (β the
// relative phase), first order in Ω_Bτ and of the sign of the lattice's
// position against the stripe's; its contrast is C = 2ab|s|, so
// max_φ D = Ω_Bτ·C/2. A plane wave (a = 1) only Rabi-oscillates into the
// empty order: D = sin²(Ω_Bτ s/2) ≈ (Ω_Bτ s/2)², second order.
func TestBraggTransferStripeVsPlaneWave(t *testing.T) {
	om := 2.0
	k1 := math.Sqrt(1 - om*om/16)
	g := MustGrid([]int{64}, []float64{8 * math.Pi / k1})
	u1, d1 := lowerSpinor(k1, om)
	u2, d2 := lowerSpinor(-k1, om)
	s := u1*u2 + d1*d2
	mk := func(a, b float64) *State {
		st := NewState(g)
		for i, x := range g.X[0] {
			ep, em := cmplx.Rect(a, k1*x), cmplx.Rect(b, -k1*x)
			st.Psi[0][i] = complex(u1, 0)*ep + complex(u2, 0)*em
			st.Psi[1][i] = complex(d1, 0)*ep + complex(d2, 0)*em
		}
		st.Normalize(1)
		return st
	}
	h := RTHamiltonian{Omega: om, Kappa: 1}
	ob, tau := 0.002, 20.0 // long and weak: off-resonant orders (detuned ≳ 2 E_R) stay below 1 %
	// the order −k₁ (the stripe's second wave, the plane wave's empty one)
	p := BraggPulse{Q: 2 * k1, Rabi: ob, Frequency: 0, Duration: tau, Order: -k1, OrderWidth: k1}
	phases := make([]float64, 16)
	for j := range phases {
		phases[j] = 2 * math.Pi * float64(j) / 16
	}
	set := RTSettings{EMax: RTMaxEnergy(g, h, 1)}
	ds, err := BraggTransfer(context.Background(), mk(1/math.Sqrt2, 1/math.Sqrt2), h, p, phases, set)
	if err != nil {
		t.Fatal(err)
	}
	dp, err := BraggTransfer(context.Background(), mk(1, 0), h, p, phases, set)
	if err != nil {
		t.Fatal(err)
	}
	mx, mean := 0.0, 0.0
	for j, r := range ds {
		v := r.Moved
		mx = math.Max(mx, v)
		mean += v / 16
		// |sin(φ + β)| with β = 0 for this stripe
		if w := ob * tau * math.Abs(s) / 2 * math.Abs(math.Sin(phases[j])); math.Abs(v-w) > 0.02*ob*tau*math.Abs(s)/2 {
			t.Errorf("stripe, φ = %.3f: diffracted %.3e, first order %.3e", phases[j], v, w)
		}
		// signed: the −k₁ order gains Ω_Bτ s a b sin φ (s > 0 here)
		if w := -ob * tau * s / 2 * math.Sin(phases[j]); math.Abs(r.Order-w) > 0.02*ob*tau*math.Abs(s)/2 {
			t.Errorf("stripe, φ = %.3f: order −k₁ changed by %.3e, first order %.3e", phases[j], r.Order, w)
		}
	}
	wantPW := math.Pow(math.Sin(ob*tau*s/2), 2)
	for _, r := range dp {
		if math.Abs(r.Moved-wantPW) > 0.02*wantPW || math.Abs(r.Order-wantPW) > 0.02*wantPW {
			t.Errorf("plane wave: diffracted %.3e, into −k₁ %.3e, want sin²(Ω_Bτs/2) = %.3e", r.Moved, r.Order, wantPW)
		}
	}
	t.Logf("s = %.4f (contrast %.4f): stripe max %.3e (first order %.3e), mean over φ %.3e; plane wave %.3e", s, math.Abs(s), mx, ob*tau*math.Abs(s)/2, mean, dp[0].Moved)
}
