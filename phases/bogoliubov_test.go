package phases

import (
	"errors"
	"math"
	"testing"

	"socmap/phases/label"
)

func mustExcite(t *testing.T, p ExcitationProblem, s *ExcitationSettings) ExcitationResult {
	t.Helper()
	r, err := Excitations(p, s)
	if err != nil {
		t.Fatalf("Excitations(%+v): %v", p.Uniform, err)
	}
	return r
}

// Single-minimum phase: sound velocity and effective mass against the
// hydrodynamic/Bogoliubov result of S. Martone, Y. Li, L. P. Pitaevskii,
// S. Stringari, Phys. Rev. A 86, 063621 (2012):
// c = √(n(g + g↑↓)/2 · 1/m*), m/m* = 1 − 4E_R/(ħΩ + 4G2) (symmetric case).
// In units ħk_R/m and E_R: c = √(G1 · m/m*); along y the mass is bare,
// c_y = √G1.
func TestSoundSingleMinimumMartone(t *testing.T) {
	for _, c := range []struct{ om, g1, g2 float64 }{{4, 1, 0.1}, {5, 1, 0.1}, {8, 1, 0.1}, {5, 0.5, 0.2}, {3.5, 0.3, 0.3}} {
		u := Symmetric(c.om, c.g1, c.g2)
		r := mustExcite(t, ExcitationProblem{Uniform: u, Q: []float64{0.5}}, nil)
		if r.State.Phase != label.SingleMinimum || r.Status != Stable {
			t.Fatalf("%+v: phase %v status %v, want a stable single minimum", c, r.State.Phase, r.Status)
		}
		mm := 1 - 4/(c.om+4*c.g2)
		want := math.Sqrt(c.g1 * mm)
		for name, got := range map[string]float64{"+x": r.CPlusX[0], "-x": r.CMinusX[0]} {
			if math.Abs(got-want) > 1e-6*want {
				t.Errorf("%+v: c(%s) = %.10g, Martone et al. %.10g", c, name, got, want)
			}
		}
		if math.Abs(r.CY[0]-math.Sqrt(c.g1)) > 1e-6 {
			t.Errorf("%+v: c_y = %.10g, want √G1 = %.10g", c, r.CY[0], math.Sqrt(c.g1))
		}
		if math.Abs(r.EffectiveMass-mm) > 1e-6 {
			t.Errorf("%+v: m/m* = %.10g, want %.10g", c, r.EffectiveMass, mm)
		}
	}
}

// At Ω → ∞ the spin is locked and the lower branch is the ordinary
// Bogoliubov spectrum ω = √(ε(ε + 2gn)), ε = q² (E_R), with gn the density
// coupling (g↑↑ + g↓↓ + 2g↑↓)n/4 = 2G1 (L. Pitaevskii, S. Stringari,
// Bose–Einstein Condensation and Superfluidity, Oxford 2016). Corrections
// are O(1/Ω): Ω = 1e7 leaves ~1e-6.
func TestBogoliubovLimit(t *testing.T) {
	u := Symmetric(1e7, 1, 0.1)
	q := []float64{-2, -1, -0.3, 0.05, 0.3, 1, 2}
	r := mustExcite(t, ExcitationProblem{Uniform: u, Q: q}, nil)
	for i, x := range q {
		e := x * x
		want := math.Sqrt(e * (e + 4))
		if got := r.Modes[i][0].Omega; math.Abs(got-want) > 2e-6*want {
			t.Errorf("q = %g: ω = %.10g, Bogoliubov %.10g", x, got, want)
		}
		// All the density weight is in the lower branch: S(q) = ε/ω.
		if got := r.Modes[i][0].Density; math.Abs(got-e/want) > 1e-5 {
			t.Errorf("q = %g: Z = %.8g, want ε/ω = %.8g", x, got, e/want)
		}
	}
}

// f-sum rule for the density channel: Σ_modes ω|δn|² summed over ±q is 2q²
// (⟨[ρ_q, [H, ρ_q†]]⟩ = N ħ²q²/m; Pitaevskii & Stringari 2016), and q² for
// each sign in parity-symmetric states (single minimum, symmetric stripe).
// The plane wave breaks parity: m₁(q) ≠ m₁(−q), only the sum is fixed.
func TestFSumRule(t *testing.T) {
	q := []float64{-2.3, -1, -0.4, 0.4, 1, 2.3}
	for _, c := range []struct {
		u         Uniform
		symmetric bool
		phase     label.Phase
	}{
		{Symmetric(5, 1, 0.1), true, label.SingleMinimum},
		{Symmetric(2.6, 1, 0.1), false, label.PlaneWave},
		{Uniform{Omega: 2.5, Delta: 0.3, Guu: 2.4, Gdd: 2.0, Gud: 1.8}, false, label.PlaneWave},
		{Symmetric(1, 1, 0.1), true, label.Stripe},
		{Uniform{Omega: 1, Delta: 0.05, Guu: 2.3, Gdd: 2.2, Gud: 1.8}, false, label.Stripe},
	} {
		r := mustExcite(t, ExcitationProblem{Uniform: c.u, Q: q}, nil)
		if r.State.Phase != c.phase {
			t.Fatalf("%+v: phase %v, want %v", c.u, r.State.Phase, c.phase)
		}
		for i := 0; i < len(q)/2; i++ {
			j := len(q) - 1 - i
			if sum, want := r.FSum[i]+r.FSum[j], 2*q[j]*q[j]; math.Abs(sum-want) > 1e-9*want {
				t.Errorf("%v %+v: m1(%g) + m1(%g) = %.12g, want %.12g", c.phase, c.u, q[i], q[j], sum, want)
			}
			if c.symmetric {
				for _, k := range []int{i, j} {
					if math.Abs(r.FSum[k]-q[k]*q[k]) > 1e-9*q[k]*q[k] {
						t.Errorf("%v: m1(%g) = %.12g, want %.12g", c.phase, q[k], r.FSum[k], q[k]*q[k])
					}
				}
			}
		}
	}
}

// Gapless modes at q = 0 (Goldstone theorem, common practice, no source):
// one (the phase) for the uniform phases, two (phase and translation) for
// the stripe; the next mode is gapped.
func TestZeroModes(t *testing.T) {
	for _, c := range []struct {
		u    Uniform
		zero int
	}{{Symmetric(5, 1, 0.1), 1}, {Symmetric(2.6, 1, 0.1), 1}, {Symmetric(1, 1, 0.1), 2}, {Symmetric(0.5, 0.5, 0.2), 2}} {
		r := mustExcite(t, ExcitationProblem{Uniform: c.u, Q: []float64{0}}, nil)
		n := 0
		for _, m := range r.Modes[0] {
			if math.Abs(m.Omega) < 1e-6 {
				n++
			}
		}
		if n != c.zero || r.Modes[0][c.zero].Omega < 0.1 {
			t.Errorf("%+v (%v): %d zero modes (want %d), next %.3g", c.u, r.State.Phase, n, c.zero, r.Modes[0][c.zero].Omega)
		}
		if len(r.CPlusX) != c.zero {
			t.Errorf("%+v: %d sound velocities, want %d", c.u, len(r.CPlusX), c.zero)
		}
		for _, v := range r.CPlusX {
			if !(v > 0.05) {
				t.Errorf("%+v: sound velocity %g of a gapless branch", c.u, v)
			}
		}
	}
}

// Roton softening in the plane-wave phase: as Ω decreases towards the
// stripe transition the roton gap falls monotonically and the roton sits
// near q ≈ −2k₁ (opposite to the condensate momentum), the behaviour
// measured by Bragg spectroscopy in Raman-coupled 87Rb (S.-C. Ji et al.,
// Phys. Rev. Lett. 114, 105301 (2015); A. Khamehchi et al., Phys. Rev. A
// 90, 063624 (2014)), qualitative, from memory.
func TestRotonSoftening(t *testing.T) {
	prev := math.Inf(1)
	for _, om := range []float64{3.0, 2.8, 2.6, 2.4, 2.3, 2.2} {
		r := mustExcite(t, ExcitationProblem{Uniform: Symmetric(om, 1, 0.1), Q: []float64{0.1}}, nil)
		if r.State.Phase != label.PlaneWave {
			t.Fatalf("Ω = %g: phase %v", om, r.State.Phase)
		}
		k1 := r.State.K0
		if math.IsNaN(r.RotonGap) || !(r.RotonGap < prev) || r.RotonGap <= 0 {
			t.Fatalf("Ω = %g: roton gap %g after %g (want positive, decreasing)", om, r.RotonGap, prev)
		}
		if r.RotonQ*k1 >= 0 || math.Abs(math.Abs(r.RotonQ)-2*math.Abs(k1)) > 0.25*2*math.Abs(k1) {
			t.Errorf("Ω = %g: roton at q = %g, k1 = %g (want ≈ −2k1)", om, r.RotonQ, k1)
		}
		prev = r.RotonGap
	}
	// The single-minimum phase far from the transition has no roton.
	r := mustExcite(t, ExcitationProblem{Uniform: Symmetric(8, 1, 0.1), Q: []float64{0.1}}, nil)
	if !math.IsNaN(r.RotonGap) {
		t.Errorf("Ω = 8: roton gap %g, want none", r.RotonGap)
	}
}

// A plane wave requested where the stripe is the ground state: the roton
// has gone soft, and the instability is reported, never hidden.
func TestPlaneWaveInstability(t *testing.T) {
	r := mustExcite(t, ExcitationProblem{Uniform: Symmetric(1, 1, 0.1), Q: []float64{0.5}, Branch: BranchPlaneWave}, nil)
	if !r.Metastable {
		t.Errorf("plane wave at Ω = 1 not marked metastable")
	}
	if r.Status != DynamicallyUnstable && r.Status != EnergeticallyUnstable {
		t.Errorf("status %v, want an instability", r.Status)
	}
	if r.Status == DynamicallyUnstable && !(r.MaxGrowth > 0) {
		t.Errorf("dynamically unstable without growth rate")
	}
}

func TestExcitationsBadInput(t *testing.T) {
	u := Symmetric(5, 1, 0.1)
	for _, q := range [][]float64{nil, {math.NaN()}, {0, math.Inf(1)}} {
		if _, err := Excitations(ExcitationProblem{Uniform: u, Q: q}, nil); !errors.Is(err, ErrBadMomenta) {
			t.Errorf("q = %v: err %v, want ErrBadMomenta", q, err)
		}
	}
	if _, err := Excitations(ExcitationProblem{Uniform: Symmetric(8, 1, 0.1), Q: []float64{1}, Branch: BranchStripe}, nil); !errors.Is(err, ErrNotStripe) {
		t.Errorf("stripe at Ω = 8: err %v, want ErrNotStripe", err)
	}
	if _, err := ParseBranch("roton"); err == nil {
		t.Errorf("ParseBranch accepted an unknown branch")
	}
}

// The point-level observables agree with the full calculation and are NaN
// at stripe points.
func TestUniformPointExcitations(t *testing.T) {
	u := Symmetric(2.6, 1, 0.1)
	vr, _ := Variational(u, nil)
	pe, err := UniformPointExcitations(u, vr, nil)
	if err != nil {
		t.Fatal(err)
	}
	r := mustExcite(t, ExcitationProblem{Uniform: u, Q: []float64{1}}, nil)
	if math.Abs(pe.RotonGap-r.RotonGap) > 1e-12 || math.Abs(pe.SoundPlusX-r.CPlusX[0]) > 1e-12 || math.Abs(pe.SoundMinusX-r.CMinusX[0]) > 1e-12 {
		t.Errorf("point %+v, full roton %g c %g %g", pe, r.RotonGap, r.CPlusX, r.CMinusX)
	}
	us := Symmetric(1, 1, 0.1)
	vs, _ := Variational(us, nil)
	ps, _ := UniformPointExcitations(us, vs, nil)
	if !math.IsNaN(ps.RotonGap) || !math.IsNaN(ps.SoundPlusX) {
		t.Errorf("stripe point gives %+v, want NaN", ps)
	}
}
