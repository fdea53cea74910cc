package phases

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/gpe"
	"socmap/phases/label"
)

// The stripe solved in the plane-wave basis against the gpe package: the
// same state is a converged ground state of the spinor GPE in a periodic box
// of two stripe periods (gpe.Solve from a random start, split step +
// conjugate gradient on FFTW grids), with the same energy per particle and
// the same harmonic weights. Two symmetric cases (δ = 0, g↑↑ = g↓↓: the
// quasi-momentum k₀ = K/2 lies on the grid of a box of whole periods).
func TestStripeAgainstGPE(t *testing.T) {
	for _, u := range []Uniform{Symmetric(1, 1, 0.1), Symmetric(0.6, 0.4, 0.3)} {
		vr, _ := Variational(u, nil)
		st := (&ExcitationSettings{}).withDefaults(u)
		ss, err := newStripeSpectrum(u, vr, &st)
		if err != nil {
			t.Fatal(err)
		}
		ss = ss.converge(&st)
		if ss.st.Phase != label.Stripe || ss.st.Residual > 1e-12 {
			t.Fatalf("%+v: %v residual %g", u, ss.st.Phase, ss.st.Residual)
		}
		L := 2 * 2 * math.Pi / ss.K
		grid := gpe.MustGrid([]int{128}, []float64{L})
		p := gpe.Problem{Grid: grid, Model: gpe.UniformBox(grid, u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud)}
		init, err := gpe.Guess{Kind: gpe.GuessRandom, Seed: 3}.Build(p)
		if err != nil {
			t.Fatal(err)
		}
		r, err := gpe.Solve(p, init, &gpe.Settings{Tol: 1e-10, Threads: 1})
		if err != nil || r.Status != gpe.Converged {
			t.Fatalf("%+v: gpe %v %v", u, err, r.Status)
		}
		if d := math.Abs(r.Energies.Total - ss.st.Energy); d > 1e-9 {
			t.Errorf("%+v: energy %.12g, gpe %.12g (diff %.2g)", u, ss.st.Energy, r.Energies.Total, d)
		}
		// Harmonic weights |a_m|² (both spins) against the gpe momentum
		// distribution at k₀ + mK (up to the mirror image k → −k, a degenerate
		// choice of the random start).
		w := func(k float64, c int) float64 {
			var s complex128
			for i, x := range grid.X[0] {
				s += r.State.Psi[c][i] * cmplx.Exp(complex(0, -k*x))
			}
			s /= complex(float64(grid.N[0]), 0)
			return real(s)*real(s) + imag(s)*imag(s)
		}
		for _, sign := range []float64{1, -1} {
			worst := 0.0
			for i, m := range ss.st.M {
				k := sign * (ss.st.K0 + float64(m)*ss.st.K)
				a := ss.st.Amp[i]
				worst = math.Max(worst, math.Abs(w(k, 0)+w(k, 1)-a[0]*a[0]-a[1]*a[1]))
			}
			if worst < 1e-7 {
				break
			}
			if sign == -1 {
				t.Errorf("%+v: harmonic weights differ from gpe by %.2g", u, worst)
			}
		}
	}
}

// Two gapless stripe branches with their sound velocities, and the
// harmonics reported.
func TestStripeBands(t *testing.T) {
	r := mustExcite(t, ExcitationProblem{Uniform: Symmetric(1, 1, 0.1), Q: []float64{-3, -1, 0.5, 2, 4}}, nil)
	if r.State.Phase != label.Stripe || r.Status != Stable || r.State.Harmonics < 4 || r.State.HarmonicChange > 1e-9 {
		t.Fatalf("phase %v status %v harmonics %d change %g", r.State.Phase, r.Status, r.State.Harmonics, r.State.HarmonicChange)
	}
	if len(r.CPlusX) != 2 || !(r.CPlusX[0] > 0.1 && r.CPlusX[1] > r.CPlusX[0]) {
		t.Errorf("stripe sound velocities %v", r.CPlusX)
	}
	// The spectrum is periodic in q with period K (extended zones).
	K := r.State.K
	a := mustExcite(t, ExcitationProblem{Uniform: Symmetric(1, 1, 0.1), Q: []float64{0.3, 0.3 + K, 0.3 - 2*K}}, nil)
	for b := range a.Modes[0] {
		if math.Abs(a.Modes[1][b].Omega-a.Modes[0][b].Omega) > 1e-10 || math.Abs(a.Modes[2][b].Omega-a.Modes[0][b].Omega) > 1e-10 {
			t.Errorf("band %d not periodic: %g %g %g", b, a.Modes[0][b].Omega, a.Modes[1][b].Omega, a.Modes[2][b].Omega)
		}
	}
}
