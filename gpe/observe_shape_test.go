package gpe

import (
	"math"
	"testing"

	"socmap/gpe/fft"
	"socmap/phases/label"
)

// translated returns st moved by s along x (1/k_R) through its
// trigonometric interpolant: ψ̂(k) → ψ̂(k) e^{−ik_x s}.
func translated(t *testing.T, st *State, s float64) *State {
	t.Helper()
	g := st.Grid
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer tr.Close()
	out := NewState(g)
	for c := 0; c < 2; c++ {
		b := fft.Aligned(g.Size)
		copy(b, st.Psi[c])
		tr.Forward(b)
		for i := range b {
			ix, _, _ := g.Coords(i)
			k := g.K[0][ix]
			if 2*ix == g.N[0] {
				k = 0 // the Nyquist bin carries no weight; keep it real
			}
			b[i] *= complex(math.Cos(k*s), -math.Sin(k*s)) / complex(float64(g.Size), 0)
		}
		tr.Backward(b)
		copy(out.Psi[c], b)
	}
	return out
}

// The uniform stripe contrast and k₁ do not move when the converged stripe
// is translated by a fraction of a grid step (the issue saw 0.12388 against
// 0.12450 from the grid-point extrema): the extrema of the continuous
// density are translation invariant. Reference: the exact invariance of
// |ψ̂| and of the interpolant under translation (common practice, no
// source).
func TestStripeContrastTranslationInvariant(t *testing.T) {
	om, G1, G2 := 1.0, 1.0, 0.1
	k1 := 0.9 // a start; the box admits the variational k₁ ≈ 0.93 closely enough
	L := CommensurateLength(k1, 8*math.Pi/k1)
	g := MustGrid([]int{64}, []float64{L}) // coarse on purpose: few points per period
	p := Problem{Grid: g, Model: UniformBoxG1G2(g, om, 0, G1, G2)}
	r := solveOrFatal(t, p, Guess{Kind: GuessStripe, K: k1}, nil)
	o0, err := r.Observe(p, label.Thresholds{})
	if err != nil {
		t.Fatal(err)
	}
	if o0.Phase != label.Stripe {
		t.Fatalf("phase %v", o0.Phase)
	}
	for _, frac := range []float64{0.13, 0.5, 0.77} {
		st := translated(t, r.State, frac*g.Dx[0])
		o, err := Observe(p, st, true, label.Thresholds{})
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(o.Contrast/o0.Contrast - 1); d > 1e-9 {
			t.Errorf("shift %.2f dx: contrast %.12f vs %.12f (rel %.1e)", frac, o.Contrast, o0.Contrast, d)
		}
		if o.K1 != o0.K1 || math.Abs(o.Fourier2K1/o0.Fourier2K1-1) > 1e-9 {
			t.Errorf("shift %.2f dx: k1 %v vs %v, F %v vs %v", frac, o.K1, o0.K1, o.Fourier2K1, o0.Fourier2K1)
		}
	}
	// The continuous extrema lie at or beyond the grid-point extrema.
	n := r.State.DensityX()
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range n {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if grid := (hi - lo) / (hi + lo); o0.Contrast < grid-1e-12 {
		t.Errorf("contrast %g below the grid-point value %g", o0.Contrast, grid)
	}
	t.Logf("contrast %.6f, 2F(2k1) %.6f, k1 %.6f", o0.Contrast, 2*o0.Fourier2K1, o0.K1)
}

// A trapped plane wave: k₁ is the maximum of the continuous momentum
// distribution, checked against a brute-force scan of the discrete-time
// Fourier transform (independent of the Newton search; the scan is what
// zero padding by a factor 2000 would give), and it does not move when the
// cloud is translated by part of a grid step; the trapped contrast of a
// plane wave is 0 to < 1e-3 (the envelope removed).
func TestTrappedPlaneWaveK1(t *testing.T) {
	g := MustGrid([]int{512}, []float64{120})
	m := Model{Omega: 2, Guu: 20, Gdd: 20, Gud: 16, Norm: 1, Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{0.05}}}
	p := Problem{Grid: g, Model: m}
	k := BandMinima(m.Omega, 0)[1]
	r := solveOrFatal(t, p, Guess{Kind: GuessPlaneWave, K: k}, nil)
	if r.Status != Converged {
		t.Fatalf("status %v residual %g", r.Status, r.Residual)
	}
	o, err := r.Observe(p, label.Thresholds{})
	if err != nil {
		t.Fatal(err)
	}
	if o.Phase != label.PlaneWave {
		t.Fatalf("phase %v", o.Phase)
	}
	// brute-force scan of n(k) = Σ_c |Σ_x ψ_c e^{−ikx}|² over ±1 bin
	dk := 2 * math.Pi / g.L[0]
	bestK, bestN := 0.0, -1.0
	kb := math.Round(o.K1/dk) * dk
	for j := -2000; j <= 2000; j++ {
		kk := kb + float64(j)*dk/2000
		s := 0.0
		for c := 0; c < 2; c++ {
			var f complex128
			for i, x := range g.X[0] {
				f += r.State.Psi[c][i] * complex(math.Cos(kk*x), -math.Sin(kk*x))
			}
			s += abs2(f)
		}
		if s > bestN {
			bestK, bestN = kk, s
		}
	}
	if math.Abs(o.K1-math.Abs(bestK)) > dk/2000 {
		t.Errorf("k1 %.8f, scan %.8f (bin %.5f)", o.K1, bestK, dk)
	}
	for _, frac := range []float64{0.3, 0.5} {
		o2, err := Observe(p, translated(t, r.State, frac*g.Dx[0]), true, label.Thresholds{})
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(o2.K1-o.K1) > 1e-9*o.K1 || math.Abs(o2.Contrast-o.Contrast) > 1e-9 {
			t.Errorf("shift %.1f dx: k1 %.12f vs %.12f, contrast %g vs %g", frac, o2.K1, o.K1, o2.Contrast, o.Contrast)
		}
	}
	if !(o.Contrast < 1e-3) {
		t.Errorf("trapped plane wave contrast %g, want < 1e-3", o.Contrast)
	}
	t.Logf("k1 %.6f (scan %.6f, grid bin %.6f, band minimum %.6f), contrast %.2e, F(2k1) %.2e", o.K1, bestK, kb, k, o.Contrast, o.Fourier2K1)
}
