package output

import (
	"context"
	"fmt"
	"path/filepath"
	"testing"

	"socmap/phases"
)

// BenchmarkMapFileWritePoint measures the cost of one crash-safe point write
// (phase, observables, Flush, done mark, Flush) into a laid-out file.
func BenchmarkMapFileWritePoint(b *testing.B) {
	sw := testSweep(1000, 100)
	spec := testSpec(sw)
	dir := b.TempDir()
	m, err := CreateMapFile(filepath.Join(dir, "b.h5"), false, RunInfo{Version: "bench"}, spec)
	if err != nil {
		b.Fatal(err)
	}
	defer m.Close()
	r := phases.PointResult{Phase: 3, Values: []float64{1, 2}}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		p := i % (1000 * 100)
		if m.mask[p] { // wrapped around: clear the in-memory mask only
			m.mask[p] = false
		}
		if err := m.WritePoint(p%1000, p/1000, r); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "points/s")
}

// variationalSweep is a 1-D variational map along Ω (symmetric couplings
// G1 = 1, G2 = 0.1 E_R, across stripe, plane-wave and single-minimum).
func variationalSweep(n int) (phases.Sweep, phases.PointFunc) {
	sw := phases.Sweep{X: phases.Axis{Name: "omega", Unit: "E_R", Values: make([]float64, n)},
		Observables: phases.VariationalObservables}
	for i := range sw.X.Values {
		sw.X.Values[i] = 0.01 + 3.99*float64(i)/float64(n-1)
	}
	problem := func(ix, iy int) (phases.Uniform, error) {
		return phases.Symmetric(sw.X.Values[ix], 1, 0.1), nil
	}
	return sw, phases.VariationalPoints(problem, nil)
}

// BenchmarkVariationalSweep measures the throughput (points/s) of a 1-D
// variational map of 2000 points with 1 and 2 workers, into memory (the
// engine alone) and into a resumable map file (engine + crash-safe writes),
// flushing after every point or every 256 points.
// The speed-up is the ratio of the points/s of workers=2 and workers=1.
func BenchmarkVariationalSweep(b *testing.B) {
	const n = 2000
	sw, f := variationalSweep(n)
	for _, sink := range []string{"memory", "file", "file-batch256"} {
		for _, w := range []int{1, 2} {
			b.Run(fmt.Sprintf("%s/workers=%d", sink, w), func(b *testing.B) {
				dir := b.TempDir()
				for i := 0; i < b.N; i++ {
					spec := MapSpec{Sweep: sw, Method: "variational"}
					var s phases.PointSink
					var m *MapFile
					if sink == "memory" {
						s = NewMapData(spec)
					} else {
						var err error
						m, err = CreateMapFile(filepath.Join(dir, fmt.Sprintf("b%d.h5", i)), false, RunInfo{Version: "bench"}, spec)
						if err != nil {
							b.Fatal(err)
						}
						if sink == "file-batch256" {
							m.SetFlushEvery(256)
						}
						s = m
					}
					res, err := phases.Run(context.Background(), sw, f, s, &phases.RunSettings{Workers: w})
					if err != nil || res.Computed != n {
						b.Fatal(res, err)
					}
					if m != nil {
						if err := m.Finish(); err != nil {
							b.Fatal(err)
						}
					}
				}
				b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "points/s")
			})
		}
	}
}

// BenchmarkVariationalDirect is the serial loop over the same points without
// the sweep engine: the engine's overhead per point is the difference to
// BenchmarkVariationalSweep/memory/workers=1.
func BenchmarkVariationalDirect(b *testing.B) {
	const n = 2000
	sw, f := variationalSweep(n)
	d := NewMapData(MapSpec{Sweep: sw, Method: "variational"})
	for i := 0; i < b.N; i++ {
		for ix := 0; ix < n; ix++ {
			r, err := f(context.Background(), ix, 0)
			if err != nil {
				b.Fatal(err)
			}
			d.Mask[ix] = false
			d.WritePoint(ix, 0, r)
		}
	}
	b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "points/s")
}

// spin is a CPU-bound point function of a fixed cost (iterations of a
// logistic map), standing in for an expensive point (a GPE solve) to show
// how the engine scales when the point cost dominates.
func spin(iters int) phases.PointFunc {
	return func(ctx context.Context, ix, iy int) (phases.PointResult, error) {
		x := 0.3 + 1e-6*float64(ix)
		for i := 0; i < iters; i++ {
			x = 3.9 * x * (1 - x)
		}
		return phases.PointResult{Phase: 1, Values: []float64{x}}, nil
	}
}

// BenchmarkHeavyPointSweep: 200 points of about 1 ms each, 1 and 2 workers.
func BenchmarkHeavyPointSweep(b *testing.B) {
	const n = 200
	sw := phases.Sweep{X: phases.Axis{Name: "omega", Unit: "E_R", Values: make([]float64, n)},
		Observables: []phases.Observable{{Name: "xval", Unit: "dimensionless", Description: "logistic map value"}}}
	f := spin(400000)
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				d := NewMapData(MapSpec{Sweep: sw, Method: "test"})
				if _, err := phases.Run(context.Background(), sw, f, d, &phases.RunSettings{Workers: w}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "points/s")
		})
	}
}
