package gpe

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// Uniform spin-1 gas without coupling at fixed magnetisation M: the GPE
// (split step + finisher with the two-multiplier projection) against the
// single-mode minimum of testdata/ref_spin1_magnetization.py (scipy SLSQP
// over the full spinor with the constraints |ζ| = 1, F_z = M). The reduced
// form the script cross-checks, derived here: with ρ₀ = 1 − s,
// ρ± = (s ± M)/2 and the relative phase θ = χ₊ + χ₋ − 2χ₀ at cos θ = −sgn c,
// |F_+|² = 2ρ₀(√ρ₊ ∓ √ρ₋)² = 2(1 − s)(s ∓ √(s² − M²)), so
// e(s) = q s + (c/2)M² + c(1 − s)(s ∓ √(s² − M²)) (upper sign c < 0).
// Checks: M = 0 gives ρ₀ = 1/2 + q/(4|c|) (Stamper-Kurn & Ueda, Rev. Mod.
// Phys. 85, 1191 (2013)); q = 0 gives the rotated ferromagnet
// ρ₀ = (1 − M²)/2 (from memory; it is e(s)'s minimum at |F| = 1); the other
// two cases are the script's numbers. ⟨F_z⟩ must equal M to 1e-8.
func TestSpin1FixedMagnetization(t *testing.T) {
	raw, err := os.ReadFile("../testdata/ref_spin1_magnetization.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []struct {
			Q     float64 `json:"q"`
			C2n   float64 `json:"c2n"`
			M     float64 `json:"M"`
			Rho0  float64 `json:"rho0"`
			ESpin float64 `json:"e_spin"`
		} `json:"cases"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) < 4 {
		t.Fatalf("%d reference cases", len(ref.Cases))
	}
	g := MustGrid([]int{16}, []float64{2 * math.Pi})
	const g0 = 10.0
	for _, c := range ref.Cases {
		d := dispersion.RamanSpin1(0, 0.3, c.Q) // a linear Zeeman shift: it must not matter at fixed M
		p := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, g0, c.C2n), FixMagnetization: true, Magnetization: c.M}
		mr, err := Spin1MultiStart(p, d, nil, nil)
		if err != nil {
			t.Fatal(err)
		}
		r := mr.Best
		ob, err := Spin1Observe(p, r, d, label.DefaultThresholds)
		if err != nil {
			t.Fatal(err)
		}
		// E/N = n c0/2 + Σ E_m ρ_m + e_spin − q ρ₊₁ − qρ₋₁ + q(ρ₊₁ + ρ₋₁): E_m = δ_m + q m²
		// shifted by the pair gauge (E_0 + E_−1 = 0 → −(q − δ)/2 on every level)
		wantE := g0/2 + c.ESpin + 0.3*c.M - (c.Q-0.3)/2
		if c.Q == 0 && c.M != 0 {
			if w := (1 - c.M*c.M) / 2; math.Abs(c.Rho0-w) > 1e-12 {
				t.Errorf("reference ρ0 %.15f, closed form (1 − M²)/2 = %.15f", c.Rho0, w)
			}
		}
		if c.M == 0 && c.C2n < 0 {
			if w := 0.5 + c.Q/(4*math.Abs(c.C2n)); math.Abs(c.Rho0-w) > 1e-12 {
				t.Errorf("reference ρ0 %.15f, formula %.15f", c.Rho0, w)
			}
		}
		t.Logf("q = %g, c2 n = %g, M = %g: %v after %d+%d, ρ0 = %.10f (ref %.10f), E = %.12f (ref %.12f), F_z = %.3e, λ = %.6f, residual %.2e, %v",
			c.Q, c.C2n, c.M, r.Status, r.SplitSteps, r.Iterations, ob.Populations[1], c.Rho0, r.Energies.Total, wantE, ob.Fz-c.M, r.Energies.Lambda, r.Residual, ob.Phase)
		if r.Status != Converged {
			t.Errorf("M = %g: %v", c.M, r.Status)
		}
		if math.Abs(ob.Fz-c.M) > 1e-8 {
			t.Errorf("M = %g: ⟨F_z⟩ = %.12f", c.M, ob.Fz)
		}
		if math.Abs(ob.Populations[1]-c.Rho0) > 1e-7 || math.Abs(r.Energies.Total-wantE) > 1e-9 {
			t.Errorf("q=%g c2n=%g M=%g: ρ0 %.10f (ref %.10f) E %.12f (ref %.12f)", c.Q, c.C2n, c.M, ob.Populations[1], c.Rho0, r.Energies.Total, wantE)
		}
	}
}

// The projection holds N and M exactly and is the identity on a state
// that already has them.
func TestSpin1Projection(t *testing.T) {
	g := MustGrid([]int{8}, []float64{3})
	d := dispersion.RamanSpin1(1, 0, 0.5)
	m := Spin1UniformBox(g, d, 1, -0.5)
	e, err := newSpin1Engine(g, m, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer e.close()
	e.fixM, e.mag = true, -0.37
	for c := 0; c < 3; c++ {
		for i := range e.psi[c] {
			e.psi[c][i] = complex(float64(c+1)+0.1*float64(i), 0.2*float64(c*i))
		}
	}
	if err := e.project(); err != nil {
		t.Fatal(err)
	}
	P := e.pops(&e.psi)
	if n, fz := P[0]+P[1]+P[2], (P[0]-P[2])/m.Norm; math.Abs(n-m.Norm) > 1e-12*m.Norm || math.Abs(fz+0.37) > 1e-14 {
		t.Fatalf("N = %g (want %g), M = %.16f", n, m.Norm, fz)
	}
	before := e.psi[1][3]
	if err := e.project(); err != nil {
		t.Fatal(err)
	}
	if math.Abs(real(e.psi[1][3]-before)) > 1e-14 {
		t.Errorf("second projection moved the state")
	}
}
