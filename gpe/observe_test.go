package gpe

import (
	"math"
	"testing"

	"socmap/phases/label"
)

// TestPhasesUniform1D: MultiStart with the default guesses finds the three
// phases in a uniform 1D and 2D box where the variational theory of Li, Pitaevskii,
// Stringari, PRL 108, 225301 (2012) puts them clearly (G2 < 0: plane wave;
// Ω > 4: single minimum; small Ω with G2 > 0: stripe).
func TestPhasesUniform1D(t *testing.T) {
	cases := []struct {
		name       string
		om, G1, G2 float64
		want       label.Phase
	}{
		{"stripe", 1, 0.3, 0.05, label.Stripe},
		{"plane-wave", 2, 1, -0.1, label.PlaneWave},
		{"single-minimum", 6, 1, 0.1, label.SingleMinimum},
	}
	for ci := 0; ci < 2*len(cases); ci++ {
		c := cases[ci%len(cases)]
		k1 := math.Sqrt(math.Max(0, 1-math.Pow(c.om/(4+2*c.G1), 2)))
		L := CommensurateLength(k1, 25)
		g := MustGrid([]int{256}, []float64{L})
		if ci >= len(cases) { // the same in 2D
			g = MustGrid([]int{128, 16}, []float64{L, 8})
		}
		p := Problem{Grid: g, Model: UniformBoxG1G2(g, c.om, 0, c.G1, c.G2)}
		mr, err := MultiStart(p, nil, nil, label.Thresholds{})
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range mr.Starts {
			t.Logf("%s: start %-22s %v E=%.10f phase %v k1=%.3f res %.1e split %d cg %d", c.name, s.Name, s.Status, s.Energy, s.Phase, s.K1, s.Residual, s.SplitSteps, s.Iterations)
		}
		o := mr.Observed
		t.Logf("%s: best %d phase %v spread %.2e sz %.3f sx %.3f k1 %.4f F2k1 %.4f contrast %.4f", c.name, mr.BestIndex, o.Phase, mr.Spread, o.Sz, o.Sx, o.K1, o.Fourier2K1, o.Contrast)
		if o.Phase != c.want {
			t.Errorf("%s: phase %v, want %v", c.name, o.Phase, c.want)
		}
		switch c.want {
		case label.Stripe:
			if o.Fourier2K1 < 0.01 || math.Abs(o.Sz) > 1e-6 {
				t.Errorf("stripe: F(2k1) = %g, sz = %g", o.Fourier2K1, o.Sz)
			}
		case label.PlaneWave:
			if o.Contrast > 1e-6 || math.Abs(o.Sz) < 0.1 {
				t.Errorf("plane wave: contrast %g, sz %g", o.Contrast, o.Sz)
			}
		}
	}
}

// TestStripeFourierAmplitude: at weak coupling the density modulation of
// the stripe approaches the variational n ∝ 1 + sin 2θ cos 2k₁x with
// sin 2θ = Ω/(4 + 2G1), k₁ = cos 2θ (Li, Pitaevskii, Stringari, PRL 108,
// 225301 (2012), re-derived in uniform_test.go): |ñ(2k₁)|/ñ(0) = sin 2θ/2,
// the relative gap shrinking in proportion to G1.
func TestStripeFourierAmplitude(t *testing.T) {
	om := 0.5
	var gaps []float64
	for _, G1 := range []float64{0.05, 0.01} {
		G2 := G1 / 10
		s2 := om / (4 + 2*G1)
		k1 := math.Sqrt(1 - s2*s2)
		L := CommensurateLength(k1, 25)
		g := MustGrid([]int{256}, []float64{L})
		p := Problem{Grid: g, Model: UniformBoxG1G2(g, om, 0, G1, G2)}
		r := solveOrFatal(t, p, Guess{Kind: GuessStripe, K: k1}, nil)
		o, err := r.Observe(p, label.Thresholds{})
		if err != nil {
			t.Fatal(err)
		}
		gap := math.Abs(o.Fourier2K1/(s2/2) - 1)
		gaps = append(gaps, gap)
		t.Logf("G1 %g: F(2k1) = %.5f variational %.5f (gap %.2e); k1 %.4f (%.4f); period %.4f contrast %.4f", G1, o.Fourier2K1, s2/2, gap, o.K1, k1, o.StripePeriod, o.Contrast)
		if math.Abs(o.K1-k1) > 1e-9 || o.Phase != label.Stripe {
			t.Errorf("k1 %g vs %g, phase %v", o.K1, k1, o.Phase)
		}
		if math.Abs(o.StripePeriod-math.Pi/k1) > 1e-9 {
			t.Errorf("period %g, want π/k1 = %g", o.StripePeriod, math.Pi/k1)
		}
		// Contrast of 1 + C cos 2k₁x is C = 2|ñ(2k₁)|/ñ(0), up to harmonics.
		if math.Abs(o.Contrast-2*o.Fourier2K1) > 0.05*o.Contrast {
			t.Errorf("contrast %g vs 2F(2k1) %g", o.Contrast, 2*o.Fourier2K1)
		}
	}
	if gaps[1] > 0.01 || gaps[1] > gaps[0]/3 {
		t.Errorf("stripe amplitude gap to the variational value does not shrink with G1: %v", gaps)
	}
}

// TestPhasesTrapped1D: in a weak 1D harmonic trap (ω = 0.05 E_R/ħ, TF
// radius ≈ 29/k_R, many stripe periods) the three phases appear in the order
// of the uniform theory as Ω grows (Li, Pitaevskii, Stringari, PRL 108,
// 225301 (2012): stripe at small Ω for g↑↓ < g, then plane wave, then single
// minimum above Ω ≈ 4E_R).
func TestPhasesTrapped1D(t *testing.T) {
	g := MustGrid([]int{512}, []float64{120})
	for _, c := range []struct {
		om   float64
		want label.Phase
	}{{0.5, label.Stripe}, {2, label.PlaneWave}, {5, label.SingleMinimum}} {
		m := Model{Omega: c.om, Guu: 20, Gdd: 20, Gud: 16, Norm: 1, Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{0.05}}}
		p := Problem{Grid: g, Model: m}
		gs := DefaultGuesses(m)
		gs = gs[:len(gs)-1] // leave out the random start (slow in a trap)
		mr, err := MultiStart(p, gs, nil, label.Thresholds{})
		if err != nil {
			t.Fatal(err)
		}
		o := mr.Observed
		t.Logf("Ω=%g: %v (E %.8f, μ %.4f, μ_TF %.4f, contrast %.3f, F(2k1) %.3f, k1 %.3f; spread %.1e)", c.om, o.Phase, o.Energies.Total, o.Energies.Mu, o.MuTF, o.Contrast, o.Fourier2K1, o.K1, mr.Spread)
		if o.Phase != c.want {
			t.Errorf("Ω=%g: phase %v, want %v", c.om, o.Phase, c.want)
		}
	}
}
