package gpe

import (
	"context"
	"math"
	"testing"
)

// benchRT times real-time steps of a trapped, interacting, coupled cloud
// with Ω ramped at every step (the table-rebuilding path) and κ held.
// Metrics: wall s/run and µs/step, and the process's CPU time per run and
// per step (cpu-s/run, cpu-µs/step: on a shared machine the wall time
// depends on the load, the CPU time much less).
func benchRT(b *testing.B, pts []int, L float64, steps, threads int) {
	l := make([]float64, len(pts))
	for i := range l {
		l[i] = L
	}
	g := MustGrid(pts, l)
	st, h := trappedMix(b, g)
	np := 0.0
	for i := range st.Psi[0] {
		np = math.Max(np, abs2(st.Psi[0][i])+abs2(st.Psi[1][i]))
	}
	r, err := NewRealTime(st, RTSettings{EMax: RTMaxEnergy(g, h, np), Threads: threads})
	if err != nil {
		b.Fatal(err)
	}
	defer r.Close()
	sched := func(t float64) RTHamiltonian {
		x := h
		x.Omega = h.Omega * (1 + 0.1*math.Sin(t))
		return x
	}
	b.ResetTimer()
	cpu0 := cpuSeconds()
	for i := 0; i < b.N; i++ {
		r.Evolve(context.Background(), float64(steps)*r.Dt, sched)
	}
	cpu := cpuSeconds() - cpu0
	n := float64(b.N)
	b.ReportMetric(b.Elapsed().Seconds()/n, "s/run")
	b.ReportMetric(b.Elapsed().Seconds()/(n*float64(steps))*1e6, "µs/step")
	b.ReportMetric(cpu/n, "cpu-s/run")
	b.ReportMetric(cpu/(n*float64(steps))*1e6, "cpu-µs/step")
	b.ReportMetric(float64(r.Workers()), "workers")
}

// The speed targets: 10⁵ steps on 1024 points in 1D, 10⁴ steps on 256×256
// (default threads: one goroutine in 1D, two in 2D).
func BenchmarkRT1D1024x1e5(b *testing.B) { benchRT(b, []int{1024}, 200, 100000, 0) }
func BenchmarkRT2D256x1e4(b *testing.B)  { benchRT(b, []int{256, 256}, 80, 10000, 0) }

// The 2D target on one goroutine, for the gain of the second.
func BenchmarkRT2D256x1e4Serial(b *testing.B) { benchRT(b, []int{256, 256}, 80, 10000, 1) }
