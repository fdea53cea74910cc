package phases

import "testing"

func grid(lo, hi float64, n int) []float64 {
	q := make([]float64, n)
	for i := range q {
		q[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	return q
}

// BenchmarkUniformSpectrum1000: the BdG spectrum with weights of a plane
// wave at 1000 momenta (target < 0.1 s).
func BenchmarkUniformSpectrum1000(b *testing.B) {
	u := Symmetric(2.6, 1, 0.1)
	vr, _ := Variational(u, nil)
	st := (&ExcitationSettings{}).withDefaults(u)
	us, _ := newUniformSpectrum(u, vr.PlaneWaveState, &st)
	q := grid(-3, 3, 1000)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for _, x := range q {
			if _, _, err := us.modes(x, QAlongX, true); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// BenchmarkUniformExcitations1000: the whole Excitations call of a plane
// wave (state, 1000 momenta, sound, roton scan, stripe comparison).
func BenchmarkUniformExcitations1000(b *testing.B) {
	p := ExcitationProblem{Uniform: Symmetric(2.6, 1, 0.1), Q: grid(-3, 3, 1000)}
	for i := 0; i < b.N; i++ {
		if _, err := Excitations(p, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkStripeExcitations200: a converged stripe spectrum at 200 Bloch
// momenta, from the parameters (target < 2 s on one core).
func BenchmarkStripeExcitations200(b *testing.B) {
	p := ExcitationProblem{Uniform: Symmetric(1, 1, 0.1), Q: grid(-3, 3, 200)}
	for i := 0; i < b.N; i++ {
		if _, err := Excitations(p, nil); err != nil {
			b.Fatal(err)
		}
	}
}
