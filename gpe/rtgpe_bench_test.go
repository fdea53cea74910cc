package gpe

import (
	"context"
	"math"
	"testing"
)

// benchRT times real-time steps of a trapped, interacting, coupled cloud
// with Ω ramped at every step (the table-rebuilding path) and κ held.
func benchRT(b *testing.B, pts []int, L float64, steps int) {
	l := make([]float64, len(pts))
	for i := range l {
		l[i] = L
	}
	g := MustGrid(pts, l)
	st, h := trappedMix(b, g)
	r := newRT(b, st, h, 0)
	defer r.Close()
	sched := func(t float64) RTHamiltonian {
		x := h
		x.Omega = h.Omega * (1 + 0.1*math.Sin(t))
		return x
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r.Evolve(context.Background(), float64(steps)*r.Dt, sched)
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N), "s/run")
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N*steps)*1e6, "µs/step")
}

// The speed targets: 10⁵ steps on 1024 points in 1D, 10⁴ steps on 256×256.
func BenchmarkRT1D1024x1e5(b *testing.B) { benchRT(b, []int{1024}, 200, 100000) }
func BenchmarkRT2D256x1e4(b *testing.B)  { benchRT(b, []int{256, 256}, 80, 10000) }
