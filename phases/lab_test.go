package phases

import (
	"math"
	"testing"

	"socmap/dispersion"
)

func rbLab(t *testing.T) Lab {
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	up, down := dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: -1}
	c, err := sp.PairCouplings(up, down)
	if err != nil {
		t.Fatal(err)
	}
	return Lab{Scheme: dispersion.Shake{Species: sp, Up: up, Down: down, Bias: 60e-4, Gradient: 1, ShakeHz: 3e3, RabiHz: 20},
		HaveSI: true, Couplings: c, Density: 1e20}
}

// The chain reproduces n g/E_R by hand: for 87Rb at 1e14 cm⁻³, g n/h ≈ 780 Hz
// for a = 100 a_B (fact of the trade, from memory), divided by E_R/h.
func TestLabResolveChain(t *testing.T) {
	l := rbLab(t)
	u, m, err := l.Resolve()
	if err != nil {
		t.Fatal(err)
	}
	want := l.Density * l.Couplings.Gdd / m.ER
	if math.Abs(u.Gdd-want) > 1e-12*want {
		t.Errorf("Gdd %g, want %g", u.Gdd, want)
	}
	if f := u.Gdd * m.ERHz(); math.Abs(f-780*1.004) > 20 {
		t.Errorf("n g↓↓/h = %g Hz, want ≈ 780 Hz", f)
	}
	// Halving the shaking frequency doubles k_t and quadruples E_R (k_t ∝ 1/ω),
	// so n g/E_R drops by 4.
	l2, err := l.Set("shake", 1.5e3)
	if err != nil {
		t.Fatal(err)
	}
	u2, _, _ := l2.Resolve()
	if math.Abs(u.Gdd/u2.Gdd-4) > 1e-9 {
		t.Errorf("ratio %g, want 4", u.Gdd/u2.Gdd)
	}
	// Overrides.
	l3, _ := l.Set("G2", 0.5)
	l3, _ = l3.Set("G1", 2)
	u3, _, _ := l3.Resolve()
	g1, g2, dg := u3.Couplings()
	_, _, dg0 := u.Couplings()
	if math.Abs(g1-2) > 1e-12 || math.Abs(g2-0.5) > 1e-12 || math.Abs(dg-dg0) > 1e-12 {
		t.Errorf("G overrides: %g %g %g", g1, g2, dg)
	}
	l4, _ := l.Set("ratio", 0.9)
	u4, _, _ := l4.Resolve()
	if math.Abs(u4.Gud-0.9*(u4.Guu+u4.Gdd)/2) > 1e-12 {
		t.Errorf("ratio override %+v", u4)
	}
	if _, err := l.Set("wavelength", 790e-9); err == nil {
		t.Error("wavelength axis accepted for the shake scheme")
	}
	if _, err := l.Set("nonsense", 1); err == nil {
		t.Error("unknown axis accepted")
	}
	d := Lab{Scheme: dispersion.Direct{CouplingOverER: 1}, Guu: 1, Gdd: 1, Gud: 1}
	if _, err := d.Set("density", 1); err == nil {
		t.Error("density axis accepted without SI interactions")
	}
}
