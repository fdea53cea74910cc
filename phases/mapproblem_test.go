package phases

import (
	"context"
	"math"
	"strings"
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

// demoShakeLab is a shaking-scheme lab like the demo plan's (87Rb, |1,0>,
// |1,−1>, 60 G, 100 G/cm at 3 kHz, delta pulses, 20 Hz, RF detuning
// 145.4 Hz, 1e14 cm⁻³): our own invented setting.
func demoShakeLab(t *testing.T) Lab {
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
	return Lab{Scheme: dispersion.Shake{Species: sp, Up: up, Down: down, Bias: 60e-4, Gradient: 1, ShakeHz: 3000,
		RabiHz: 20, DetuningHz: 145.4}, HaveSI: true, Couplings: c, Density: 1e20}
}

// TestHoldDelta: balance puts δ at δ_b = (n g↓↓ − n g↑↑)/2 at every point
// (δ/2 + Δg = 0: the two plane waves degenerate); compensate keeps δ/2π at
// its base value, which is what retuning the RF by the change of the
// micromotion shift gives (the shake scheme evaluated at the RF detuning
// D = D₀ + δ_base/(dδ/dD), D₀ its zero-δ detuning, without any hold); the
// held modes are refused with the axes that set δ.
func TestHoldDelta(t *testing.T) {
	base := demoShakeLab(t)
	m0, err := base.Model()
	if err != nil {
		t.Fatal(err)
	}
	deltaHz := m0.DeltaOverER * m0.ERHz()
	for _, mode := range []HoldMode{HoldToBalance, HoldCompensate} {
		p := &MapProblem{Lab: base, X: LinearAxis(AxisGradient, 0.4, 1.6, 7), HoldDelta: mode}
		if err := p.Check(); err != nil {
			t.Fatal(err)
		}
		for ix, g := range p.X.Values {
			u, err := p.Uniform(ix, 0)
			if err != nil {
				t.Fatal(err)
			}
			_, _, dg := u.Couplings()
			switch mode {
			case HoldToBalance:
				if math.Abs(u.Delta/2+dg) > 1e-15*math.Abs(dg) {
					t.Errorf("balance, %g T/m: δ/2 + Δg = %g", g, u.Delta/2+dg)
				}
			case HoldCompensate:
				sh := base.Scheme.(dispersion.Shake)
				sh.Gradient = g
				r0, err := sh.Evaluate()
				if err != nil {
					t.Fatal(err)
				}
				sh.DetuningHz = r0.ZeroDeltaDetuningHz + 1
				r1, _ := sh.Evaluate()
				slope := r1.DeltaHz // dδ/dD, ±1
				sh.DetuningHz = r0.ZeroDeltaDetuningHz + deltaHz/slope
				r, _ := sh.Evaluate()
				if math.Abs(math.Abs(slope)-1) > 1e-9 || math.Abs(r.Model.DeltaOverER-u.Delta) > 1e-9*math.Abs(u.Delta) {
					t.Errorf("compensate, %g T/m: held δ/E_R %g, RF retuned %g (slope %g)", g, u.Delta, r.Model.DeltaOverER, slope)
				}
				if ix == 3 && math.Abs(u.Delta-m0.DeltaOverER) > 1e-12*math.Abs(u.Delta) {
					t.Errorf("compensate at the base gradient: %g, unheld %g", u.Delta, m0.DeltaOverER)
				}
			}
		}
		if !strings.Contains(p.Identity().String(), string(mode)) {
			t.Errorf("identity without hold-delta %s", mode)
		}
		q := &MapProblem{Lab: base, X: LinearAxis(AxisRFDetuning, 140, 150, 3), HoldDelta: mode}
		if err := q.Check(); err == nil {
			t.Errorf("%s with the rf-detuning axis accepted", mode)
		}
	}
	d := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{}, G1: 1, G2: 0.1, G1Set: true, G2Set: true}, X: LinearAxis(AxisCoupling, 0, 4, 3), HoldDelta: HoldCompensate}
	if err := d.Check(); err == nil {
		t.Error("compensate without an atom accepted")
	}
}

// TestLogAxis: ":log" spaces the points evenly in log with exact ends, and
// the identity names it as such.
func TestLogAxis(t *testing.T) {
	a, err := ParseAxis("density=1e13:1e15 cm^-3:5:log")
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1e19, 1e19 * math.Sqrt(10), 1e20, 1e20 * math.Sqrt(10), 1e21}
	for i, v := range a.Values {
		if math.Abs(v-want[i]) > 1e-12*want[i] {
			t.Errorf("value %d: %g, want %g", i, v, want[i])
		}
	}
	if a.Values[0] != 1e19 || a.Values[4] != 1e21 {
		t.Error("ends not exact")
	}
	if s := axisText(a); s != "density=1e+19:1e+21:5:log" {
		t.Errorf("identity text %q", s)
	}
	for _, bad := range []string{"density=0:1e15 cm^-3:5:log", "omega=-1:2:5:log", "omega=1:2:5:lin", "omega=1:2:5:log:x"} {
		if _, err := ParseAxis(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}
