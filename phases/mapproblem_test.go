package phases

import (
	"context"
	"math"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// TestLabObservables: a map over the Raman wavelength stores per point
// |k_R| = (2π/λ) sin(α/2) (the two-beam recoil, common practice, no
// source), E_R/h = h k_R²/(8π² m) with h = 6.62607015e-34 J s (CODATA
// 2018, exact) and m(87Rb) = 86.909180527 u, u = 1.66053906660e-27 kg
// (CODATA 2018, from memory), Ω/E_R and δ/E_R, and the SI values of energy,
// k1 and stripe period; the method's observables come first, unchanged.
func TestLabObservables(t *testing.T) {
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	c, err := sp.PairCouplings(dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: -1})
	if err != nil {
		t.Fatal(err)
	}
	alpha := 102 * math.Pi / 180
	p := &MapProblem{
		Lab: Lab{Scheme: dispersion.Raman{Species: sp, Wavelength: 790e-9, Angle: alpha, RabiHz: 300, DetuningHz: -1.8},
			HaveSI: true, Couplings: c, Density: 1e20},
		X: LinearAxis(AxisWavelength, 700e-9, 1064e-9, 5),
	}
	if !p.HasLabUnits() {
		t.Fatal("a Raman lab has lab units")
	}
	sw := p.Sweep()
	nb := len(VariationalObservables)
	if len(sw.Observables) != nb+len(LabObservables) {
		t.Fatalf("%d observables", len(sw.Observables))
	}
	for i, o := range VariationalObservables {
		if sw.Observables[i] != o {
			t.Fatalf("observable %d is %v, want %v", i, sw.Observables[i], o)
		}
	}
	f := p.Points()
	const h, u = 6.62607015e-34, 1.66053906660e-27
	m := 86.909180527 * u
	stripes := 0
	for ix, lam := range p.X.Values {
		r, err := f(context.Background(), ix, 0)
		if err != nil {
			t.Fatal(err)
		}
		un, err := p.Uniform(ix, 0)
		if err != nil {
			t.Fatal(err)
		}
		base, _ := VariationalPoints(func(int, int) (Uniform, error) { return un, nil }, nil)(context.Background(), 0, 0)
		for i := 0; i < nb; i++ {
			if x, y := r.Values[i], base.Values[i]; x != y && !(math.IsNaN(x) && math.IsNaN(y)) {
				t.Errorf("λ %g: %s %g, without lab units %g", lam, VariationalObservables[i].Name, x, y)
			}
		}
		v := r.Values[nb:]
		kr := 2 * math.Pi / lam * math.Sin(alpha/2)
		er := h * kr * kr / (8 * math.Pi * math.Pi * m)
		rel := func(a, b float64) float64 { return math.Abs(a-b) / math.Abs(b) }
		if rel(v[0], kr) > 1e-9 || rel(v[1], er) > 1e-8 {
			t.Errorf("λ %g: k_R %g E_R/h %g, want %g %g", lam, v[0], v[1], kr, er)
		}
		if rel(v[2], 300/er) > 1e-8 || rel(v[3], -1.8/er) > 1e-8 {
			t.Errorf("λ %g: Ω/E_R %g δ/E_R %g, want %g %g", lam, v[2], v[3], 300/er, -1.8/er)
		}
		if rel(v[4], r.Values[0]*er) > 1e-8 || rel(v[5], r.Values[1]*kr) > 1e-9 {
			t.Errorf("λ %g: energy %g Hz, k1 %g /m", lam, v[4], v[5])
		}
		if r.Phase == label.Stripe {
			stripes++
			if rel(v[6], r.Values[8]/kr*1e6) > 1e-9 {
				t.Errorf("λ %g: period %g µm, %g/k_R", lam, v[6], r.Values[8])
			}
		} else if !math.IsNaN(v[6]) {
			t.Errorf("λ %g: %v with a period", lam, r.Phase)
		}
	}
	if stripes == 0 {
		t.Error("no stripe point: the period is not tested")
	}
	// A direct model has no lab units.
	d := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{}, G1: 1, G2: 0.1, G1Set: true, G2Set: true}, X: LinearAxis(AxisCoupling, 0, 4, 3)}
	if d.HasLabUnits() || len(d.Sweep().Observables) != nb {
		t.Error("direct model with lab units")
	}
}
