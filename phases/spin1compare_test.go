package phases

import (
	"math"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// The three-level stripe window of a Raman-dressed ⁸⁷Rb gas tends to the
// pseudo-spin window of its pair (0, −1) as the third level moves away
// (ε → ∞ at fixed pair detuning: the far-level limit of the issue's
// checks; the two-level window is checked against the closed form of Li,
// Pitaevskii & Stringari, PRL 108, 225301 (2012) in compare_test.go). The
// pair couplings are those of c0, c2 (spin1PairCouplings); the pair is
// balanced at δ_b including the far level's second-order shift.
func TestSpin1StripeWindowFarLevel(t *testing.T) {
	g0, g2 := 1.0, -0.01 // n c0, n c2 in E_R (⁸⁷Rb-like |c2|/c0 ≈ 0.5 %, a dense gas)
	gg := spin1PairCouplings(0, -1, g0, g2)
	u := Uniform{Guu: gg[0], Gdd: gg[1], Gud: gg[2]}
	u.Delta = BalancingDetuning(u.Guu, u.Gdd)
	g1, _, _ := u.Couplings()
	omMax := 2*(2+math.Max(g1, 0)) + 1
	two, err := StripeWindow(u, omMax, 400, 1e-7, nil)
	if err != nil || !two.Found {
		t.Fatalf("two-level window %+v %v", two, err)
	}
	prevErr := math.Inf(1)
	for _, eps := range []float64{1, 4, 40} {
		w, err := Spin1BalancedWindow(Spin1Uniform{Model: dispersion.RamanSpin1Pair(0, 0, eps), G0: g0, G2: g2}, u.Delta, omMax, 60, 1e-5, nil)
		if err != nil {
			t.Fatal(err)
		}
		e := math.Abs(w.Hi - two.Hi)
		t.Logf("ε = %4g: three-level window [%.5f, %.5f], two-level [%.5f, %.5f] E_R, |ΔΩ_hi| = %.2e, differ (5 %% rule): %v",
			eps, w.Lo, w.Hi, two.Lo, two.Hi, e, WindowsDiffer(two, w))
		if !w.Found || w.Lo != 0 || !(e < prevErr) {
			t.Errorf("ε = %g: window %+v does not approach %+v", eps, w, two)
		}
		prevErr = e
	}
	if prevErr > 0.005*two.Hi {
		t.Errorf("at ε = 40 the upper edge is still %.3g away (%.2g %%)", prevErr, 100*prevErr/two.Hi)
	}
}

// WithPairDetuning sets δ_pair and keeps the other transition's offset.
func TestWithPairDetuning(t *testing.T) {
	m := dispersion.RamanSpin1(1, 0.3, 0.7) // δ_pair = δ − ε = −0.4, other transition δ + ε = 1.0
	w := WithPairDetuning(m, 0.25)
	want := dispersion.RamanSpin1Pair(1, 0.25, 0.7)
	for i := range w.E {
		if math.Abs(w.E[i]-want.E[i]) > 1e-14 || w.K[i] != want.K[i] {
			t.Fatalf("E %v K %v, want E %v K %v", w.E, w.K, want.E, want.K)
		}
	}
	if !SamePhase(label.Stripe, label.Stripe3) || SamePhase(label.PlaneWave, label.Antiferromagnetic) {
		t.Error("SamePhase")
	}
}
