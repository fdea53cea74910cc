package label

import (
	"math"
	"testing"
)

func TestClassify(t *testing.T) {
	th := DefaultThresholds
	cases := []struct {
		f    Features
		want Phase
	}{
		{Features{MeanAbsK: 0.01, FracPlus: 0.5, FracMinus: 0.5, Converged: true}, SingleMinimum},
		{Features{MeanAbsK: 0.8, FracPlus: 1, FracMinus: 0, Converged: true}, PlaneWave},
		{Features{MeanAbsK: 0.8, FracPlus: 0.95, FracMinus: 0.05, Converged: true}, PlaneWave},
		{Features{MeanAbsK: 0.8, FracPlus: 0.5, FracMinus: 0.5, Converged: true}, Stripe},
		{Features{MeanAbsK: 0.8, FracPlus: 0.89, FracMinus: 0.11, Converged: true}, Stripe},
		{Features{MeanAbsK: 0.8, FracPlus: 0.5, FracMinus: 0.5, Converged: false}, NotConverged},
		{Features{MeanAbsK: math.NaN(), Converged: true}, NotConverged},
	}
	for _, c := range cases {
		if got := Classify(c.f, th); got != c.want {
			t.Errorf("%+v: %v, want %v", c.f, got, c.want)
		}
	}
}

func TestNamesRoundTrip(t *testing.T) {
	for _, p := range All {
		q, err := Parse(p.String())
		if err != nil || q != p {
			t.Errorf("%v: %v %v", p, q, err)
		}
	}
	if _, err := Parse("supersolid"); err == nil {
		t.Error("unknown name parsed")
	}
	if Legend() != "0=not-computed, 1=single-minimum, 2=plane-wave, 3=stripe, 4=not-converged, 5=no-coupling, 6=under-resolved, 7=stripe-3, 8=broken-axisymmetry, 9=antiferromagnetic, 10=spin-domains" {
		t.Errorf("legend %q", Legend())
	}
}

// The spin-1 naming rule on the local orders of states of known form
// (derived here from F_α = ψ†F_αψ): the ±1 mixture of magnetisation M has
// F = (0, 0, M) n, so L = M² and L − F_z² = 0 (its Ω = 0 limit is the
// antiferromagnetic gas at fixed M, D. M. Stamper-Kurn and M. Ueda, Rev.
// Mod. Phys. 85, 1191 (2013)); a ferromagnetic spinor rotated along x has
// L = 1 (T.-L. Ho, Phys. Rev. Lett. 81, 742 (1998)); the broken-axisymmetry
// spinor at M = 0 with ρ0 has L = P = 4ρ0(1 − ρ0); the two-component spinor
// (a, b e^{iqx}, 0) has L = |a|²(2 − |a|²), P = 2|a|²|b|², F_z = |a|²;
// domains of pure m = ±1 have L = 1, P = 0, F_z = M.
func TestSpin1Name(t *testing.T) {
	ba := func(rho0 float64) Spin1Order {
		return Spin1Order{Local: 4 * rho0 * (1 - rho0), Transverse: 4 * rho0 * (1 - rho0)}
	}
	cases := []struct {
		name      string
		waves     int
		one, unif bool
		o         Spin1Order
		want      Phase
	}{
		{"one wave, one minimum", 1, true, true, Spin1Order{Local: 1, Fz: 1}, SingleMinimum},
		{"one wave", 1, false, true, Spin1Order{Local: 1, Fz: 0.2}, PlaneWave},
		{"±1 mixture M = 0.3", 2, false, true, Spin1Order{Local: 0.09, Fz: 0.3}, Antiferromagnetic},
		{"±1 mixture M = 0.998", 2, false, true, Spin1Order{Local: 0.998 * 0.998, Fz: 0.998}, Antiferromagnetic},
		{"helix F_z = 0.6, third wave below the floor", 2, false, true, Spin1Order{Local: 1, Transverse: 0.64, Fz: 0.6}, BrokenAxisymmetry},
		{"three-wave helix F_z = 0", 3, false, true, Spin1Order{Local: 1, Transverse: 1}, BrokenAxisymmetry},
		{"BA ρ0 = 0.575", 3, false, true, ba(0.575), BrokenAxisymmetry},
		{"BA ρ0 = 0.75", 3, false, true, ba(0.75), BrokenAxisymmetry},
		{"BA ρ0 = 0.52", 3, false, true, ba(0.52), BrokenAxisymmetry}, // L = 0.9984: the same phase as ρ0 = 0.75
		{"(a, b e^{iqx}, 0), |a|² = 1/2", 2, false, true, Spin1Order{Local: 0.75, Transverse: 0.5, Fz: 0.5}, BrokenAxisymmetry},
		{"domains of F_z = ±n, M = 0.4", 2, false, true, Spin1Order{Local: 1, Fz: 0.4}, SpinDomains},
		{"domains with a wide wall", 2, false, true, Spin1Order{Local: 0.8, Transverse: 0.001, Fz: 0.45}, SpinDomains},
		{"BA near the polar boundary, ρ0 = 0.995", 3, false, true, ba(0.995), BrokenAxisymmetry},
		{"modulated, two", 2, false, false, Spin1Order{Local: 1, Fz: 0.6}, Stripe},
		{"modulated, three", 3, false, false, Spin1Order{Local: 0.1}, Stripe3},
	}
	for _, c := range cases {
		if got := Spin1Name(c.waves, c.one, c.unif, c.o); got != c.want {
			t.Errorf("%s: %v, want %v", c.name, got, c.want)
		}
	}
	for _, p := range Spin1Codes {
		if q, err := Parse(p.String()); err != nil || q != p {
			t.Errorf("%v: %v %v", p, q, err)
		}
	}
	if SpinDomains != 10 || SpinDomains.String() != "spin-domains" {
		t.Errorf("new code %d %q", int8(SpinDomains), SpinDomains)
	}
}
