package phases

import (
	"math"
	"testing"

	"socmap/dispersion"
)

// demoDesign is an invented 87Rb design problem of our own (the demo plan's
// setting with the gradient and the Rabi frequency free).
func demoDesign(t testing.TB, obj string) DesignProblem {
	t.Helper()
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	up, down := dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: -1}
	c, err := sp.PairCouplings(up, down)
	if err != nil {
		t.Fatal(err)
	}
	o, err := ParseObjective(obj)
	if err != nil {
		t.Fatal(err)
	}
	return DesignProblem{
		Scheme: "shake",
		Shake: dispersion.Shake{Species: sp, Up: up, Down: down, Bias: 60e-4, Gradient: 1, ShakeHz: 3000,
			Pulse: dispersion.PulseRect, PulseWidth: 10e-6, RabiHz: 20},
		Couplings:       c,
		Density:         1e20,
		BalanceDetuning: true,
		Free: []FreeSetting{
			{Name: "gradient", Lo: 0.2, Hi: 1.5, Unit: "G/cm", Factor: 1e-2},
			{Name: "rabi", Lo: 2, Hi: 40, Unit: "Hz", Factor: 1},
		},
		Objective: o,
	}
}

func TestDesignSmoke(t *testing.T) {
	p := demoDesign(t, "field")
	r, err := Design(p, &DesignSettings{Evaluations: 400, SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("status %v, %d evaluations, %d failed, %v", r.Status, len(r.Evaluations), r.Failed, r.Elapsed)
	for _, c := range r.Candidates {
		t.Logf("%v obj %.4g window %.3g Hz field %.4g µG contrast %.3g period %.3g µm binding %v closest %s", c.Settings, c.Objective, c.Merits.WindowHz, c.Merits.FieldUG, c.Merits.Contrast, c.Merits.PeriodM*1e6, c.Binding, c.Closest)
	}
	for _, tp := range r.Trade {
		t.Logf("trade %+v", tp)
	}
	_ = math.Pi
}

func TestDesignProbe(t *testing.T) {
	p := demoDesign(t, "field")
	e, err := NewDesignEvaluator(p, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range [][]float64{{1, 20}, {1, 10}, {0.5, 5}} {
		d := e.Evaluate(v)
		t.Logf("%v: feas %v err %q phase %v obj %g merits %+v", v, d.Feasible, d.Err, d.Merits.Phase, d.Objective, d.Merits)
		for _, m := range d.Margins {
			t.Logf("   %s %s %g %g %g", m.Key, m.Name, m.Value, m.Limit, m.Margin)
		}
	}
}
