package dispersion

import (
	"math"
	"reflect"
	"testing"
)

// sampled is a waveform whose type is not comparable (a slice field): it
// must bypass the cycle cache and still be integrated correctly.
type sampled struct{ v []float64 }

func (sampled) Name() string { return "sampled-sine" }
func (w sampled) Value(phi float64) float64 {
	return math.Sin(phi) * w.v[0]
}

// The cached cycle integrals are the ones NewCycle computes, and a
// non-comparable waveform gives the same result as its comparable twin.
func TestCycleCache(t *testing.T) {
	for _, w := range []Waveform{Sine{}, Square{}} {
		a, err := cycleOf(w)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := cycleOf(w)
		if a != b {
			t.Errorf("%s: second call did not use the cache", w.Name())
		}
		fresh, _ := NewCycle(w)
		if !reflect.DeepEqual(a, fresh) {
			t.Errorf("%s: cached cycle differs from NewCycle", w.Name())
		}
	}
	p := naShake()
	r1, err := p.Evaluate()
	if err != nil {
		t.Fatal(err)
	}
	p.Waveform = sampled{v: []float64{1}}
	r2, err := p.Evaluate()
	if err != nil {
		t.Fatal(err)
	}
	if r1.KtMean != r2.KtMean || r1.MicroShiftHz != r2.MicroShiftHz {
		t.Errorf("non-comparable waveform: k_t %g vs %g, micromotion %g vs %g", r2.KtMean, r1.KtMean, r2.MicroShiftHz, r1.MicroShiftHz)
	}
}

// BenchmarkShakeEvaluate: one evaluation of the shaking scheme (what a
// design search does per candidate), Gaussian pulses.
func BenchmarkShakeEvaluate(b *testing.B) {
	p := naShake()
	p.Pulse, p.PulseWidth = PulseGauss, 20e-6
	for b.Loop() {
		if _, err := p.Evaluate(); err != nil {
			b.Fatal(err)
		}
	}
}
