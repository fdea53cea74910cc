package phases

import (
	"math"
	"testing"

	"socmap/gpe"
	"socmap/phases/label"
)

// The trapped stripe contrast (the 2k₁ amplitude over the local mean density
// at the cloud centre, gpe observe_shape.go) agrees within 20 % with the
// variational contrast of the uniform gas at the Thomas–Fermi peak density
// (the local-density picture, common practice, no source); a trapped plane
// wave and a trapped single-minimum state have contrast < 1e-3 (before, the
// trap envelope alone gave ≈ 0.02).
func TestTrappedContrastAgainstUniform(t *testing.T) {
	g := gpe.MustGrid([]int{512}, []float64{120})
	for _, c := range []struct {
		om   float64
		want label.Phase
	}{{0.5, label.Stripe}, {1, label.Stripe}, {2, label.PlaneWave}, {5, label.SingleMinimum}} {
		m := gpe.Model{Omega: c.om, Guu: 20, Gdd: 20, Gud: 16, Norm: 1, Potential: gpe.Potential{Kind: gpe.Harmonic, AngularFreq: [3]float64{0.05}}}
		p := gpe.Problem{Grid: g, Model: m}
		gs := gpe.DefaultGuesses(m)
		mr, err := gpe.MultiStart(p, gs[:len(gs)-1], nil, label.Thresholds{})
		if err != nil {
			t.Fatal(err)
		}
		o := mr.Observed
		if o.Phase != c.want || mr.Best.Status != gpe.Converged {
			t.Fatalf("Ω=%g: %v %v, want %v", c.om, o.Phase, mr.Best.Status, c.want)
		}
		geff := (m.Guu + m.Gdd + 2*m.Gud) / 4
		n0 := gpe.ThomasFermiMuG(1, m, geff) / geff
		vr, err := Variational(Uniform{Omega: c.om, Guu: n0 * m.Guu, Gdd: n0 * m.Gdd, Gud: n0 * m.Gud}, nil)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("Ω=%g: %v, contrast %.5f (window %.3g/k_R), variational at n₀ %v %.5f; k1 %.5f vs %.5f", c.om, o.Phase, o.Contrast, o.ContrastWindow, vr.Phase, vr.Contrast, o.K1, vr.K1)
		if c.want == label.Stripe {
			if vr.Phase != label.Stripe || math.Abs(o.Contrast/vr.Contrast-1) > 0.2 {
				t.Errorf("Ω=%g: trapped contrast %g, uniform at the peak density %g (%v)", c.om, o.Contrast, vr.Contrast, vr.Phase)
			}
		} else if !(o.Contrast < 1e-3) {
			t.Errorf("Ω=%g (%v): contrast %g, want < 1e-3", c.om, o.Phase, o.Contrast)
		}
	}
}
