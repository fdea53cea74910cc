package phases

import (
	"math"
	"testing"
)

// The window found by scanning and bisection equals the closed-form
// stripe ↔ plane-wave boundary Ω_c (derived in symmetric.go; agrees with
// Y. Li, L. P. Pitaevskii, S. Stringari, PRL 108, 225301 (2012)).
func TestStripeWindowSymmetric(t *testing.T) {
	for _, c := range []struct{ g1, g2 float64 }{{0.5, 0.05}, {1, 0.1}, {2, 0.2}} {
		w, err := StripeWindow(Symmetric(0, c.g1, c.g2), 5, 0, 1e-8, nil)
		if err != nil {
			t.Fatal(err)
		}
		want := UpperStripeOmega(c.g1, c.g2)
		if !w.Found || w.Lo != 0 || math.Abs(w.Hi-want) > 1e-5 {
			t.Errorf("G1=%g G2=%g: window %+v, want [0, %g]", c.g1, c.g2, w, want)
		}
	}
	w, err := StripeWindow(Symmetric(0, 1, -0.1), 5, 0, 0, nil)
	if err != nil || w.Found {
		t.Errorf("G2 < 0: window %+v (%v), want none", w, err)
	}
}

// Unequal couplings act like a detuning: the stripe window in δ is centred
// near the balancing detuning δ_b = (Gdd − Guu)/2 (derived in symmetric.go),
// and contains it.
func TestDetuningWindowBalancing(t *testing.T) {
	u := Uniform{Omega: 0.5, Guu: 2.4, Gdd: 2.2, Gud: 2.0}
	db := BalancingDetuning(u.Guu, u.Gdd)
	w, err := DetuningWindow(u, db, 1, 0, 1e-8, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !w.Found || !(w.Lo < db && db < w.Hi) {
		t.Fatalf("window %+v does not contain δ_b = %g", w, db)
	}
	if c := (w.Lo + w.Hi) / 2; math.Abs(c-db) > 0.05*(w.Hi-w.Lo) {
		t.Errorf("window centre %g, δ_b %g, width %g", c, db, w.Hi-w.Lo)
	}
}
