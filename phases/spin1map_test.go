package phases

import (
	"context"
	"math"
	"testing"

	"socmap/dispersion"
)

// MethodSpin1 points are Spin1Variational at the point's model: the omega
// and delta axes set Ω and the pair detuning (WithPairDetuning), and the
// identity carries the three-level settings.
func TestSpin1MapPoints(t *testing.T) {
	p := &MapProblem{Lab: Lab{Scheme: dispersion.Direct{CouplingOverER: 1}}, Method: MethodSpin1,
		X: LinearAxis(AxisCoupling, 0.5, 2, 3), Y: LinearAxis(AxisDetuning, -0.2, 0.2, 2),
		Spin1: Spin1MapSettings{Epsilon: 0.7, G0: 1, G2: -0.1, FixMagnetization: true, Magnetization: -0.3}}
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	pf := p.Points()
	r, err := pf(context.Background(), 2, 1)
	if err != nil {
		t.Fatal(err)
	}
	u := Spin1Uniform{Model: WithPairDetuning(dispersion.RamanSpin1(2, 0, 0.7), 0.2), G0: 1, G2: -0.1}
	want, err := Spin1Variational(u, &Spin1Settings{FixMagnetization: true, Magnetization: -0.3})
	if err != nil {
		t.Fatal(err)
	}
	if r.Phase != want.Phase || math.Abs(r.Values[0]-want.Energy) > 1e-12 || math.Abs(r.Values[1]+0.3) > 1e-8 {
		t.Errorf("point %v %v, want %v E = %g", r.Phase, r.Values, want.Phase, want.Energy)
	}
	found := map[string]bool{}
	for _, s := range p.Identity() {
		found[s.Name] = true
	}
	for _, k := range []string{"levels", "epsilon-er", "nc0-er", "nc2-er", "magnetization"} {
		if !found[k] {
			t.Errorf("identity lacks %q", k)
		}
	}
	p.X = LinearAxis(AxisG1, 0, 1, 2)
	if err := p.Check(); err == nil {
		t.Error("G1 axis accepted for a spin-1 map")
	}
}
