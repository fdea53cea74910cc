package gpe

import "testing"

func BenchmarkPasses(b *testing.B) {
	p := stripeProblem([]int{256})
	e := newTestEngine(b, p, Guess{Kind: GuessStripe, K: 0.94}, perf{})
	defer e.close()
	_ = e.normalize()
	e.setKinSplit(0.01)
	e.tau, e.scale = 0.01, 1
	u0 := append([]complex128(nil), e.psi[0]...)
	d0 := append([]complex128(nil), e.psi[1]...)
	b.Run("localSplit", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			copy(e.psi[0], u0)
			copy(e.psi[1], d0)
			e.localSplit(0, 256, &e.acc[0])
		}
	})
	b.Run("copyOnly", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			copy(e.psi[0], u0)
			copy(e.psi[1], d0)
		}
	})
	b.Run("kinSplit", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			e.kinSplit(0, 256, &e.acc[0])
		}
	})
	b.Run("expNeg", func(b *testing.B) {
		s := 0.0
		for i := 0; i < b.N; i++ {
			for j := 0; j < 256; j++ {
				s += expNeg(-0.01 * float64(j&7))
			}
		}
		sinkF = s
	})
	b.Run("coshSinhc", func(b *testing.B) {
		s := 0.0
		for i := 0; i < b.N; i++ {
			for j := 0; j < 256; j++ {
				c, d := coshSinhc(0.001 * float64(j&7))
				s += c + d
			}
		}
		sinkF = s
	})
}

var sinkF float64
