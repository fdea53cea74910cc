package gpe

import (
	"math"
	"testing"

	"socmap/dispersion"
)

// TestGridAxes: coordinates and FFT-ordered wavenumbers follow the usual DFT
// conventions (numpy.fft.fftfreq order: 0, 1, …, N/2−1, −N/2, …, −1, times
// 2π/L; common practice, no source).
func TestGridAxes(t *testing.T) {
	g := MustGrid([]int{8, 5}, []float64{4, 10})
	wantK := []float64{0, 1, 2, 3, -4, -3, -2, -1}
	for j, m := range wantK {
		if math.Abs(g.K[0][j]-2*math.Pi*m/4) > 1e-15 {
			t.Errorf("K[0][%d] = %g", j, g.K[0][j])
		}
	}
	wantK5 := []float64{0, 1, 2, -2, -1}
	for j, m := range wantK5 {
		if math.Abs(g.K[1][j]-2*math.Pi*m/10) > 1e-15 {
			t.Errorf("K[1][%d] = %g", j, g.K[1][j])
		}
	}
	if g.X[0][4] != 0 || g.X[0][0] != -2 || g.Size != 40 || math.Abs(g.DV-0.5*2) > 1e-15 {
		t.Errorf("X %v size %d dV %g", g.X[0], g.Size, g.DV)
	}
	i, j, l := g.Coords(23)
	if i != 4 || j != 3 || l != 0 {
		t.Errorf("Coords(23) = %d %d %d", i, j, l)
	}
	if _, err := NewGrid([]int{8}, []float64{-1}); err == nil {
		t.Error("negative length accepted")
	}
	if _, err := NewGrid([]int{8, 8, 8, 8}, []float64{1, 1, 1, 1}); err == nil {
		t.Error("4D accepted")
	}
}

// TestBoxHelpers: CommensurateLength admits ±k1 exactly; AutoBox and the
// resolution warning use k_max = π/dx ≥ 4 k_R.
func TestBoxHelpers(t *testing.T) {
	k1 := 0.87
	L := CommensurateLength(k1, 30)
	m := L * k1 / (2 * math.Pi)
	if math.Abs(m-math.Round(m)) > 1e-12 || math.Abs(L-30) > math.Pi/k1 {
		t.Errorf("L = %g gives k1 L/2π = %g", L, m)
	}
	g := MustGrid([]int{64}, []float64{L})
	if d := math.Abs(g.SnapK(k1) - k1); d > 1e-12 {
		t.Errorf("box does not admit k1: snapped %g", g.SnapK(k1))
	}
	L2, n := AutoBox(k1, 30, 0)
	if math.Pi*float64(n)/L2 < 4 || math.Pi*float64(n/2)/L2 >= 4 {
		t.Errorf("AutoBox: %d points on %g", n, L2)
	}
	coarse := MustGrid([]int{16}, []float64{20})
	if coarse.ResolutionWarning() == "" || CheckResolution(coarse) == nil {
		t.Error("k_max = 2.5 k_R not flagged")
	}
	if CheckResolution(MustGrid([]int{64}, []float64{20})) != nil {
		t.Error("k_max = 10 k_R flagged")
	}
}

// TestUnits: SI conversions against direct arithmetic with the SI constants
// (h = 6.62607015e-34 J s exact).
func TestUnits(t *testing.T) {
	u, err := UnitsHz(7.95e6, 3.68e3)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(u.EnergyHz(2.5) - 2.5*3.68e3); d > 1e-9 {
		t.Errorf("EnergyHz off by %g", d)
	}
	if d := math.Abs(u.EnergyFromHz(u.EnergyHz(0.37)) - 0.37); d > 1e-15 {
		t.Errorf("energy round trip off by %g", d)
	}
	if d := math.Abs(u.LengthSI(u.Length(3e-6)) - 3e-6); d > 1e-20 {
		t.Errorf("length round trip off by %g", d)
	}
	if d := math.Abs(u.TimeSI(1) - dispersion.Hbar/(3.68e3*dispersion.Planck)); d > 1e-18 {
		t.Errorf("time unit off by %g", d)
	}
	// E_R = ħ²k_R²/2m gives back the mass.
	m := u.Mass()
	if d := math.Abs(dispersion.Hbar*dispersion.Hbar*u.KR*u.KR/(2*m)/u.ER - 1); d > 1e-14 {
		t.Errorf("mass inconsistent by %g", d)
	}
	if _, err := NewUnits(0, 1); err == nil {
		t.Error("k_R = 0 accepted")
	}
}

// TestHardBoxFiniteWell: g = 0, Ω = 0 in a hard box of width W and wall
// height V0: the ground energy is that of the finite square well, k² with
// k tan(kW/2) = √(V0 − k²) (textbook finite square well, common practice,
// no source; m = 1/2, ħ = 1 so E = k²), solved here by bisection. With the
// walls at midpoints between grid points the error of the sampled step
// falls as dx² (measured: 5.1e-4, 1.3e-4 at dx = 1/32, 1/64).
func TestHardBoxFiniteWell(t *testing.T) {
	var errs []float64
	for _, n := range []int{512, 1024} {
		dx := 16.0 / float64(n)
		W, V0 := 6.0+dx, 100.0
		f := func(k float64) float64 { return k*math.Tan(k*W/2) - math.Sqrt(V0-k*k) }
		a, b := 1e-6, math.Pi/W-1e-12
		for i := 0; i < 200; i++ {
			c := (a + b) / 2
			if f(c) < 0 {
				a = c
			} else {
				b = c
			}
		}
		want := a * a
		g := MustGrid([]int{n}, []float64{16})
		m := Model{Norm: 1, Potential: Potential{Kind: HardBox, Width: [3]float64{W}, Height: V0}}
		r := solveOrFatal(t, Problem{Grid: g, Model: m}, Guess{Kind: GuessPlaneWave, K: 1}, nil)
		e := math.Abs(r.Energies.Total/want - 1)
		errs = append(errs, e)
		t.Logf("finite well, %d points: GPE %.8f exact %.8f rel. error %.2e (%v, res %.1e)", n, r.Energies.Total, want, e, r.Status, r.Residual)
		if r.Status != Converged {
			t.Errorf("status %v", r.Status)
		}
	}
	if errs[1] > 2e-4 || errs[0]/errs[1] < 3 || errs[0]/errs[1] > 5 {
		t.Errorf("hard box errors %v: not second order in dx", errs)
	}
}

// TestDivergedStatus: an infinite potential everywhere gives a NaN energy;
// the solver reports Diverged instead of a result.
func TestDivergedStatus(t *testing.T) {
	g := MustGrid([]int{32}, []float64{10})
	m := Model{Norm: 1, Potential: Potential{Kind: HardBox, Width: [3]float64{1e-9}, Height: math.Inf(1)}}
	r := solveOrFatal(t, Problem{Grid: g, Model: m}, Guess{Kind: GuessRandom, Seed: 1}, nil)
	if r.Status != Diverged {
		t.Errorf("status %v, want diverged (E = %g)", r.Status, r.Energies.Total)
	}
}
