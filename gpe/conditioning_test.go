package gpe

import (
	"math"
	"testing"
)

// TestPhaseModeConditioning checks the diagnosis of slow finisher
// convergence in large trapped clouds (cg.go, DEVELOPERS.md "Convergence of
// large clouds"): the phase-gradient mode u = i x ψ₀ of a converged 1D
// Thomas–Fermi cloud has the preconditioned Rayleigh quotient
//
//	ρ = ⟨u, A u⟩ / (α⟨u, u⟩) ≈ 5b/(2αR²),  ⟨u, A u⟩ = ½ d²E/dε² along e^{iεx}ψ₀,
//
// with E the total energy, b = d²E_band/dk² the curvature of the lower band
// at its minimum (≈ 2 here; a phase gradient ε shifts every atom's momentum
// by ε and leaves the density unchanged), α the finisher's shift (≈ μ) and
// ⟨x²⟩ = R²/5 for the 1D Thomas–Fermi profile n ∝ 1 − x²/R², R = 2√μ/ω
// (common practice, no source). The largest preconditioned eigenvalue is
// ≈ 2 (the density mode, 2gn/α), so the condition number is
// κ ≳ 2/ρ ≈ 1.6 μ²/ω² on any grid that resolves the cloud (a Rayleigh
// quotient bounds the lowest eigenvalue from above, hence ≳). The model is
// the demo plan's 1D cloud with N = 3e5 (matched couplings, μ ≈ 31.6 E_R);
// measured ρ = 7.98e-5 agrees with the estimate to 0.4 %.
func TestPhaseModeConditioning(t *testing.T) {
	g, err := NewGrid([]int{256}, []float64{115.93614009831313})
	if err != nil {
		t.Fatal(err)
	}
	const om = 0.2519123146080108
	m := Model{Omega: 0.2519123146080108, Delta: -0.02327888978251113,
		Guu: 0.006273390841720539, Gdd: 0.006244366561553954, Gud: 0.006244366561553954,
		Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{om}}, Norm: 3e5}
	p := Problem{Grid: g, Model: m}
	mins := BandMinima(m.Omega, m.Delta)
	st, err := Guess{Kind: GuessStripe, K: (mins[1] - mins[0]) / 2}.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Solve(p, st, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != Converged {
		t.Fatalf("status %v, residual %g", r.Status, r.Residual)
	}
	en := r.Energies
	alpha := math.Max(1, en.Kinetic+en.Potential+2*en.Interaction) // as in cg
	uu := 0.0
	for j := 0; j < g.Size; j++ {
		uu += g.X[0][j] * g.X[0][j] * (abs2(r.State.Psi[0][j]) + abs2(r.State.Psi[1][j]))
	}
	uu *= g.DV
	E := func(eps float64) float64 {
		s := NewState(g)
		for j := 0; j < g.Size; j++ {
			ph := complex(math.Cos(eps*g.X[0][j]), math.Sin(eps*g.X[0][j]))
			s.Psi[0][j] = r.State.Psi[0][j] * ph
			s.Psi[1][j] = r.State.Psi[1][j] * ph
		}
		e, err := Evaluate(p, s, 0)
		if err != nil {
			t.Fatal(err)
		}
		return e.Total * m.Norm
	}
	const h = 1e-3
	rho := (E(h) - 2*E(0) + E(-h)) / (h * h) / 2 / (alpha * uu)
	// band curvature at the minima (central difference; both minima within 0.1 %)
	curv := func(k float64) float64 {
		const d = 1e-4
		ep, _, _ := LowerBand(k+d, m.Omega, m.Delta)
		e0, _, _ := LowerBand(k, m.Omega, m.Delta)
		em, _, _ := LowerBand(k-d, m.Omega, m.Delta)
		return (ep - 2*e0 + em) / (d * d)
	}
	R := 2 * math.Sqrt(en.Mu) / om
	want := 5 * (curv(mins[0]) + curv(mins[1])) / 2 / (2 * alpha * R * R)
	if math.Abs(rho/want-1) > 0.03 {
		t.Errorf("phase-mode Rayleigh quotient %.4g, Thomas–Fermi estimate %.4g", rho, want)
	}
	t.Logf("ρ = %.4g (estimate %.4g), κ ≳ 2/ρ = %.3g, α = %.2f, R = %.2f", rho, want, 2/rho, alpha, R)
}
