package phases

import (
	"fmt"
	"math"

	"socmap/dispersion"
)

// The library path from a lab setting to a GPE ground state: the shaking
// scheme of the built-in demo plan (cmd/socmap/plans/demo.toml, our own
// invented setting: 87Rb, ↑ = |1,0⟩, ↓ = |1,−1⟩, 100 G/cm shaken at 3 kHz,
// 30 µs RF pulses, 20 Hz Rabi frequency, 1e14 cm⁻³) → the effective model →
// the variational phase of the uniform gas → the ground state of the spinor
// GPE in a 1D periodic box sized by the automatic-grid rule.
func Example() {
	rb, _ := dispersion.LookupSpecies("Rb87")
	up, down := dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: -1}
	coup, _ := rb.PairCouplings(up, down)
	lab := Lab{
		Scheme: dispersion.Shake{Species: rb, Up: up, Down: down,
			Bias:     60 * dispersion.Gauss,
			Gradient: 100 * dispersion.Gauss / 1e-2, // 100 G/cm in T/m
			ShakeHz:  3e3, Waveform: dispersion.Sine{},
			Pulse: dispersion.PulseRect, PulseWidth: 30e-6,
			RabiHz: 20, DetuningHz: 145.4},
		HaveSI: true, Couplings: coup, Density: 1e20, // 1e14 cm⁻³
	}
	u, model, err := lab.Resolve()
	if err != nil {
		fmt.Println(err)
		return
	}
	g1, g2, _ := u.Couplings()
	fmt.Printf("k_R = %.4f 1/µm, E_R/h = %.2f Hz\n", math.Abs(model.KR)*1e-6, model.ERHz())
	fmt.Printf("Ω/E_R = %.4f, δ/E_R = %.4f, G1 = %.3f E_R, G2 = %.4f E_R\n", u.Omega, u.Delta, g1, g2)

	vr, err := Variational(u, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("variational: %s, k₁ = %.4f k_R, contrast %.3f, energy %.6f E_R\n", vr.Phase, vr.K1, vr.Contrast, vr.Energy)

	gr, err := Ground(GroundProblem{Lab: lab, Dims: 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	o := gr.Multi.Observed
	g := gr.Problem.Grid
	fmt.Printf("GPE box: %d points, L = %.3f/k_R = %.2f µm\n", g.N[0], g.L[0], gr.Units.LengthSI(g.L[0])*1e6)
	fmt.Printf("GPE: %s (%s), k₁ = %.4f k_R, contrast %.3f, energy %.6f E_R\n", o.Phase, gr.Status, o.K1, o.Contrast, o.Energies.Total)
	fmt.Printf("GPE energy at or below the variational one: %v\n", o.Energies.Total <= vr.Energy+1e-9)
	// Output:
	// k_R = 1.1685 1/µm, E_R/h = 79.39 Hz
	// Ω/E_R = 0.2519, δ/E_R = -0.0233, G1 = 4.896 E_R, G2 = 0.0057 E_R
	// variational: stripe, k₁ = 0.9998 k_R, contrast 0.018, energy 4.894602 E_R
	// GPE box: 256 points, L = 25.137/k_R = 21.51 µm
	// GPE: stripe (converged), k₁ = 0.9998 k_R, contrast 0.011, energy 4.893435 E_R
	// GPE energy at or below the variational one: true
}
