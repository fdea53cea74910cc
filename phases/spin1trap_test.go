package phases

import (
	"math"
	"testing"

	"socmap/dispersion"
	"socmap/gpe"
)

func rb87Spin1Trap(t *testing.T, rabiHz, eps float64) (dispersion.Spin1Model, dispersion.Spin1Couplings) {
	t.Helper()
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	m, _, err := Spin1FromScheme(dispersion.Raman{Species: sp, Wavelength: 790e-9, Angle: math.Pi, RabiHz: rabiHz}, eps)
	if err != nil {
		t.Fatal(err)
	}
	c, err := sp.Spin1Couplings()
	if err != nil {
		t.Fatal(err)
	}
	return m, c
}

// A trapped polar gas (Ω = 0, large quadratic Zeeman shift: all atoms in
// m = 0) against the Thomas–Fermi limit of one component with coupling c0
// in 1D: μ = (3Nc0ω/8)^{2/3} above the bottom E_0, and E/N − E_0 = 3μ/5
// (E ∝ N^{5/3} since μ = dE/dN ∝ N^{2/3}; C. J. Pethick and H. Smith,
// Bose–Einstein Condensation in Dilute Gases (2002), ch. 6, from memory).
// The kinetic energy makes both larger, by ≈ 1e-5 at this μ/ħω ≈ 450.
func TestSpin1GroundTrapThomasFermi(t *testing.T) {
	if testing.Short() {
		t.Skip("a 3456-point trapped multi-start (≈ 25 s; minutes under -race)")
	}
	m, c := rb87Spin1Trap(t, 0, 5)
	p := Spin1GroundProblem{Model: m, Trap: &Spin1Trap{Atoms: 2e5, FreqHz: [3]float64{20, 400, 400}, Couplings: c}}
	r, err := Spin1Ground(p, nil)
	if err != nil {
		t.Fatal(err)
	}
	b := r.Multi.Best
	e0 := m.E[1]
	mu := gpe.ThomasFermiMuG(1, gpe.Model{Potential: r.Problem.Model.Potential, Norm: r.Problem.Model.Norm}, r.Problem.Model.C0)
	t.Logf("grid %v L %.4g: %v, ρ0 = %.9f, μ − E0 = %.6f (TF %.6f), E/N − E0 = %.6f (3μ_TF/5 = %.6f), ω = %.4g, notes %v",
		r.Problem.Grid.N, r.Problem.Grid.L[0], r.Status, r.Observed.Populations[1], b.Energies.Mu-e0, mu, b.Energies.Total-e0, 0.6*mu, r.Problem.Model.Potential.AngularFreq[0], r.Notes)
	if r.Status != gpe.Converged || r.Observed.Populations[1] < 1-1e-9 {
		t.Fatalf("not a converged polar state: %v ρ0 %g", r.Status, r.Observed.Populations[1])
	}
	if d := (b.Energies.Mu - e0) / mu; d < 1 || d > 1.001 {
		t.Errorf("μ/μ_TF = %.5f", d)
	}
	if d := (b.Energies.Total - e0) / (0.6 * mu); d < 1 || d > 1.001 {
		t.Errorf("E/(3μ_TF/5) = %.5f", d)
	}
	if r.VariationalWhere == "uniform box" || !(r.PeakDensity > 0) {
		t.Errorf("variational reference %q at n₀ = %g", r.VariationalWhere, r.PeakDensity)
	}
	// the box rule of GroundProblem: 2.6 × max(R_TF, 4 a_osc)
	rtf := 2 * math.Sqrt(mu) / r.Problem.Model.Potential.AngularFreq[0]
	if want := 2.6 * math.Max(rtf, 4*gpe.OscillatorLength(r.Problem.Model.Potential.AngularFreq[0])); math.Abs(r.Problem.Grid.L[0]-want) > 1e-9*want {
		t.Errorf("box %g, want %g", r.Problem.Grid.L[0], want)
	}
}

// A Raman-dressed ⁸⁷Rb cloud in a trap at fixed magnetisation keeps
// ⟨F_z⟩ = M to 1e-8 (the constraint is exact; the state is the GPE's).
func TestSpin1GroundTrapMagnetization(t *testing.T) {
	if testing.Short() {
		t.Skip("a trapped multi-start (≈ 15 s; minutes under -race)")
	}
	m, c := rb87Spin1Trap(t, 2000, 0.5)
	p := Spin1GroundProblem{Model: m, Trap: &Spin1Trap{Atoms: 1e4, FreqHz: [3]float64{40, 400, 400}, Couplings: c},
		FixMagnetization: true, Magnetization: 0.4, Points: []int{512}}
	r, err := Spin1Ground(p, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%v: F_z = %.12f, λ = %.6f, populations %v, phase %v, variational F_z %.10f", r.Status, r.Observed.Fz, r.Multi.Best.Energies.Lambda, r.Observed.Populations, r.Observed.Phase, r.Variational.Fz)
	if r.Status != gpe.Converged || math.Abs(r.Observed.Fz-0.4) > 1e-8 || math.Abs(r.Variational.Fz-0.4) > 1e-8 {
		t.Errorf("%v, ⟨F_z⟩ = %.12f (variational %.12f)", r.Status, r.Observed.Fz, r.Variational.Fz)
	}
	if _, err := Spin1Ground(Spin1GroundProblem{Model: dispersion.RamanSpin1(1, 0, 0.5), Trap: p.Trap}, nil); err == nil {
		t.Error("a trap with a direct model (no k_R) accepted")
	}
}
