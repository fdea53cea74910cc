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
	if Legend() != "0=not-computed, 1=single-minimum, 2=plane-wave, 3=stripe, 4=not-converged, 5=no-coupling, 6=under-resolved" {
		t.Errorf("legend %q", Legend())
	}
}
