package gpe

import (
	"math"
	"testing"
)

// gaussFlight is the exact x-marginal after a free flight of the packet
// gaussian1D(g, s0, k0, x0, ·) normalised to 1: |ψ(X, t)|² of a Gaussian
// wave packet, N/(√π σ(t)) exp(−(X − x0 − 2qt)²/σ(t)²) with
// σ(t) = σ₀√(1 + (ħt/mσ₀²)²) (any quantum mechanics text; ħ = 1, m = 1/2:
// ħt/mσ₀² = 2t/σ₀², velocity ħq/m = 2q).
func gaussFlight(X, s0, q, x0, t float64) float64 {
	s := s0 * math.Sqrt(1+math.Pow(2*t/(s0*s0), 2))
	u := (X - x0 - 2*q*t) / s
	return math.Exp(-u*u) / (math.Sqrt(math.Pi) * s)
}

// Finite time of flight against the free expansion of a Gaussian wave
// packet, σ(t) = σ₀√(1 + (ħt/mσ₀²)²) (any quantum mechanics text), at
// intermediate times ħt/mσ₀² = 0.3, 1, 3 — neither the near field (the
// cloud still its own size) nor the far field (the density the momentum
// distribution, X = ħqt/m) — and at 30: the whole density profile, point
// by point, within 1e-9 of its peak (the tails beyond FlightTol = 1e-10 of
// the peak momentum weight may wrap in a grown box; the Fresnel transform
// gives ~1e-15), for each method where it applies
// (Fresnel transform, grown box), in 1D and as the x column density of a
// 2D packet, with the centre moving at the mechanical velocity 2(k₀ − σκ)
// of the component (SOC gauge). The atom number is kept to 1e-12.
func TestFreeFlightGaussian(t *testing.T) {
	const s0 = 2.0
	for _, c := range []struct {
		name     string
		pts      []int
		L        []float64
		k0, kap  float64
		comp     int
		x0       float64
		wantQ    float64
		wantMeth []FlightMethod
	}{
		{"1D ↑ at rest", []int{256}, []float64{40}, 1, 1, 0, 0, 0, nil},
		{"1D ↓ moving", []int{256}, []float64{40}, -0.5, 1, 1, -3, 0.5, nil},
		{"2D ↑ moving", []int{128, 64}, []float64{40, 20}, 1.25, 1, 0, 2, 0.25, nil},
	} {
		g := MustGrid(c.pts, c.L)
		st := gaussian1D(g, s0, c.k0, c.x0, c.comp)
		for _, ratio := range []float64{0.3, 1, 3, 30} {
			tt := ratio * s0 * s0 / 2
			for _, m := range []FlightMethod{FlightAuto, FlightFresnel, FlightBox} {
				f, err := FreeFlight(st, c.kap, tt, m)
				if m == FlightFresnel && err != nil {
					t.Logf("%s, ħt/mσ₀² = %g: Fresnel not applicable (%v)", c.name, ratio, err)
					continue
				}
				if err != nil {
					t.Fatalf("%s, %v: %v", c.name, m, err)
				}
				peak := gaussFlight(c.x0+2*c.wantQ*tt, s0, c.wantQ, c.x0, tt)
				worst := 0.0
				for i, x := range f.X {
					worst = math.Max(worst, math.Abs(f.Density[c.comp][i]-gaussFlight(x, s0, c.wantQ, c.x0, tt)))
				}
				n, mean, rms := f.Moments(2)
				sig := s0 * math.Sqrt(1+ratio*ratio)
				if worst > 1e-9*peak || math.Abs(n-1) > 1e-12 {
					t.Errorf("%s, ħt/mσ₀² = %g, %v: density off by %.2e of the peak, atoms %.15f", c.name, ratio, f.Method, worst/peak, n)
				}
				if math.Abs(mean-(c.x0+2*c.wantQ*tt)) > 1e-8 || math.Abs(rms/(sig/math.Sqrt2)-1) > 1e-8 {
					t.Errorf("%s, ħt/mσ₀² = %g, %v: centre %.8g (want %.8g), rms %.8g (want %.8g)", c.name, ratio, f.Method, mean, c.x0+2*c.wantQ*tt, rms, sig/math.Sqrt2)
				}
				if m == FlightAuto {
					t.Logf("%s, ħt/mσ₀² = %g: auto → %v on %d points (R %.3g, q_max %.3g), error %.1e of the peak", c.name, ratio, f.Method, len(f.X), f.R, f.QMax, worst/peak)
				}
			}
		}
	}
}

// The method choice: at short times the Fresnel condition fails, auto
// takes the grown box and a forced Fresnel transform is refused; t = 0 is
// the state itself.
func TestFreeFlightChoice(t *testing.T) {
	g := MustGrid([]int{256}, []float64{40})
	st := gaussian1D(g, 2, 0, 0, 0)
	f, err := FreeFlight(st, 0, 0.05, FlightAuto)
	if err != nil || f.Method != FlightBox {
		t.Fatalf("t = 0.05: %v, %v; want the grown box", f, err)
	}
	if _, err := FreeFlight(st, 0, 0.05, FlightFresnel); err == nil {
		t.Error("a forced Fresnel transform at t = 0.05 was not refused")
	}
	f, err = FreeFlight(st, 0, 50, FlightAuto)
	if err != nil || f.Method != FlightFresnel {
		t.Fatalf("t = 50: %v, %v; want Fresnel", f, err)
	}
	f, err = FreeFlight(st, 0, 0, FlightAuto)
	if err != nil {
		t.Fatal(err)
	}
	d := st.DensityX()
	for i := range d {
		if math.Abs(f.Density[0][i]-d[i]) > 1e-15 {
			t.Fatalf("t = 0: density changed at %d: %g vs %g", i, f.Density[0][i], d[i])
		}
	}
	if _, err := FreeFlight(st, 0, -1, FlightAuto); err == nil {
		t.Error("a negative time was not refused")
	}
}
