package phases

import (
	"context"
	"errors"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"socmap/phases/label"
)

// memSink is an in-memory PointSink that records every write and fails the
// test on concurrent use or on a second write of the same point.
type memSink struct {
	t      *testing.T
	nx     int
	pts    map[int]PointResult
	writes map[int]int
	busy   atomic.Int32
}

func newMemSink(t *testing.T, nx int) *memSink {
	return &memSink{t: t, nx: nx, pts: map[int]PointResult{}, writes: map[int]int{}}
}

func (m *memSink) enter() {
	if m.busy.Add(1) != 1 {
		m.t.Error("sink used from two goroutines at once")
	}
}

func (m *memSink) WritePoint(ix, iy int, r PointResult) error {
	m.enter()
	defer m.busy.Add(-1)
	p := iy*m.nx + ix
	m.pts[p] = r
	m.writes[p]++
	return nil
}

func (m *memSink) Done(ix, iy int) bool {
	m.enter()
	defer m.busy.Add(-1)
	_, ok := m.pts[iy*m.nx+ix]
	return ok
}

func testSweep(nx, ny int) Sweep {
	x := Axis{Name: "omega", Unit: "E_R"}
	for i := 0; i < nx; i++ {
		x.Values = append(x.Values, 0.1+4*float64(i)/float64(nx))
	}
	y := Axis{Name: "G2", Unit: "E_R"}
	for i := 0; i < ny; i++ {
		y.Values = append(y.Values, -0.1+0.5*float64(i)/float64(ny))
	}
	return Sweep{X: x, Y: y, Observables: VariationalObservables}
}

func symProblem(sw Sweep) func(ix, iy int) (Uniform, error) {
	return func(ix, iy int) (Uniform, error) {
		g2 := 0.1
		if sw.Y.Len() > 0 {
			g2 = sw.Y.Values[iy]
		}
		return Symmetric(sw.X.Values[ix], 0.5, g2), nil
	}
}

func TestRunAllPointsOnce(t *testing.T) {
	sw := testSweep(13, 7)
	sink := newMemSink(t, 13)
	var calls sync.Map
	inner := VariationalPoints(symProblem(sw), nil)
	f := func(ctx context.Context, ix, iy int) (PointResult, error) {
		if _, dup := calls.LoadOrStore(iy*13+ix, true); dup {
			t.Errorf("point (%d,%d) computed twice", ix, iy)
		}
		return inner(ctx, ix, iy)
	}
	var lastDone, lastTotal int
	res, err := Run(context.Background(), sw, f, sink, &RunSettings{Workers: 3,
		Progress: func(d, tot int, _ time.Duration) { lastDone, lastTotal = d, tot }})
	if err != nil || res.Status != RunComplete {
		t.Fatal(err, res.Status)
	}
	if v, ok := sw.Value(sink.pts[5], "energy"); !ok || v != sink.pts[5].Values[0] {
		t.Fatal("Sweep.Value")
	}
	if len(sink.pts) != 13*7 || res.Computed != 13*7 || lastDone != 13*7 || lastTotal != 13*7 {
		t.Fatalf("%d points written, result %+v, progress %d/%d", len(sink.pts), res, lastDone, lastTotal)
	}
	for p, n := range sink.writes {
		if n != 1 {
			t.Fatalf("point %d written %d times", p, n)
		}
		// The written point is the one computed for that index.
		u, _ := symProblem(sw)(p%13, p/13)
		r, _ := Variational(u, nil)
		if sink.pts[p].Phase != r.Phase || sink.pts[p].Values[0] != r.Energy {
			t.Fatalf("point %d holds another point's result", p)
		}
	}
	// One-axis map.
	sw1 := testSweep(9, 0)
	sink1 := newMemSink(t, 9)
	if res, err := Run(context.Background(), sw1, VariationalPoints(symProblem(sw1), nil), sink1, nil); err != nil || res.Computed != 9 {
		t.Fatal(err, res)
	}
}

func TestRunResumeSkipsDone(t *testing.T) {
	sw := testSweep(10, 5)
	sink := newMemSink(t, 10)
	for p := 0; p < 50; p += 3 {
		sink.pts[p] = PointResult{Phase: label.Stripe, Values: make([]float64, len(VariationalObservables))}
	}
	pre := len(sink.pts)
	var n atomic.Int32
	inner := VariationalPoints(symProblem(sw), nil)
	f := func(ctx context.Context, ix, iy int) (PointResult, error) {
		if (iy*10+ix)%3 == 0 {
			t.Errorf("done point (%d,%d) recomputed", ix, iy)
		}
		n.Add(1)
		return inner(ctx, ix, iy)
	}
	res, err := Run(context.Background(), sw, f, sink, &RunSettings{Workers: 2})
	if err != nil || res.Status != RunComplete || res.Skipped != pre || res.Computed != 50-pre || int(n.Load()) != 50-pre {
		t.Fatalf("%v %+v calls=%d", err, res, n.Load())
	}
	if len(sink.pts) != 50 {
		t.Fatalf("%d points after resume", len(sink.pts))
	}
}

func TestRunShardsPartition(t *testing.T) {
	sw := testSweep(11, 6)
	count := map[int]int{}
	for shard := 0; shard < 4; shard++ {
		sink := newMemSink(t, 11)
		res, err := Run(context.Background(), sw, VariationalPoints(symProblem(sw), nil), sink,
			&RunSettings{Workers: 2, Shard: shard, Shards: 4})
		if err != nil || res.Status != RunComplete {
			t.Fatal(err)
		}
		for p := range sink.pts {
			if p%4 != shard {
				t.Fatalf("shard %d computed point %d", shard, p)
			}
			count[p]++
		}
	}
	if len(count) != 66 {
		t.Fatalf("shards cover %d of 66 points", len(count))
	}
	for p, c := range count {
		if c != 1 {
			t.Fatalf("point %d in %d shards", p, c)
		}
	}
	if _, err := Run(context.Background(), sw, VariationalPoints(symProblem(sw), nil), newMemSink(t, 11),
		&RunSettings{Shard: 4, Shards: 4}); err == nil {
		t.Fatal("shard out of range accepted")
	}
}

func TestRunCancel(t *testing.T) {
	sw := testSweep(40, 40)
	sink := newMemSink(t, 40)
	ctx, cancel := context.WithCancel(context.Background())
	var started atomic.Int32
	f := func(ctx context.Context, ix, iy int) (PointResult, error) {
		if started.Add(1) == 20 {
			cancel()
		}
		select {
		case <-ctx.Done():
			return PointResult{}, ctx.Err()
		case <-time.After(100 * time.Microsecond):
		}
		return PointResult{Phase: label.PlaneWave, Values: make([]float64, len(VariationalObservables))}, nil
	}
	res, err := Run(ctx, sw, f, sink, &RunSettings{Workers: 4})
	if !errors.Is(err, context.Canceled) || res.Status != RunCanceled {
		t.Fatalf("err=%v status=%v", err, res.Status)
	}
	if res.Computed != len(sink.pts) || res.Computed >= 1600 || int(started.Load()) > 30 {
		t.Fatalf("computed %d, written %d, started %d", res.Computed, len(sink.pts), started.Load())
	}
	// Resume finishes the map without recomputing.
	res2, err := Run(context.Background(), sw, f, sink, &RunSettings{Workers: 4})
	if err != nil || res2.Skipped != res.Computed || len(sink.pts) != 1600 {
		t.Fatalf("resume: %v %+v", err, res2)
	}
}

func TestRunErrorStops(t *testing.T) {
	sw := testSweep(20, 20)
	sink := newMemSink(t, 20)
	boom := errors.New("boom")
	f := func(ctx context.Context, ix, iy int) (PointResult, error) {
		if ix == 3 && iy == 2 {
			return PointResult{}, boom
		}
		return PointResult{Values: make([]float64, len(VariationalObservables))}, nil
	}
	res, err := Run(context.Background(), sw, f, sink, &RunSettings{Workers: 2})
	if !errors.Is(err, boom) || res.Status != RunFailed {
		t.Fatalf("err=%v status=%v", err, res.Status)
	}
	if _, ok := sink.pts[2*20+3]; ok {
		t.Fatal("failed point written")
	}
	// Wrong number of observables is an error.
	bad := func(ctx context.Context, ix, iy int) (PointResult, error) { return PointResult{}, nil }
	if _, err := Run(context.Background(), sw, bad, newMemSink(t, 20), nil); err == nil {
		t.Fatal("missing observables accepted")
	}
}

// The variational point function reports the phases expected from the
// closed forms along a line in Ω (symmetric case).
func TestVariationalPointsMap(t *testing.T) {
	sw := testSweep(30, 0)
	sink := newMemSink(t, 30)
	if _, err := Run(context.Background(), sw, VariationalPoints(symProblem(sw), nil), sink, nil); err != nil {
		t.Fatal(err)
	}
	for ix, om := range sw.X.Values {
		r := sink.pts[ix]
		want := label.PlaneWave
		switch {
		case om < StripePlaneWaveOmega(0.5, 0.1):
			want = label.Stripe
		case om > SingleMinimumLabelOmega(0.1, label.DefaultThresholds.SingleMinimumK):
			want = label.SingleMinimum
		}
		if r.Phase != want {
			t.Errorf("Ω=%g: %v, want %v", om, r.Phase, want)
		}
	}
}

// BenchmarkVariationalMap1D: a one-axis variational map of 200 points in Ω
// (symmetric, G1 = 0.5, G2 = 0.1) through Run with the default workers.
func BenchmarkVariationalMap1D(b *testing.B) {
	sw := Sweep{X: Axis{Name: "omega", Unit: "E_R"}, Observables: VariationalObservables}
	for i := 0; i < 200; i++ {
		sw.X.Values = append(sw.X.Values, 5*float64(i)/200)
	}
	f := VariationalPoints(func(ix, _ int) (Uniform, error) { return Symmetric(sw.X.Values[ix], 0.5, 0.1), nil }, nil)
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		sink := &discardSink{}
		if _, err := Run(context.Background(), sw, f, sink, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkVariationalMap100x100: a 100×100 map over (Ω, δ) of an
// asymmetric problem.
func BenchmarkVariationalMap100x100(b *testing.B) {
	sw := Sweep{X: Axis{Name: "omega", Unit: "E_R"}, Y: Axis{Name: "delta", Unit: "E_R"}, Observables: VariationalObservables}
	for i := 0; i < 100; i++ {
		sw.X.Values = append(sw.X.Values, 5*float64(i)/100)
		sw.Y.Values = append(sw.Y.Values, -1+2*float64(i)/100)
	}
	f := VariationalPoints(func(ix, iy int) (Uniform, error) {
		return Uniform{Omega: sw.X.Values[ix], Delta: sw.Y.Values[iy], Guu: 1.2, Gdd: 0.9, Gud: 0.85}, nil
	}, nil)
	for i := 0; i < b.N; i++ {
		if _, err := Run(context.Background(), sw, f, &discardSink{}, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkVariationalMap200x200: a 200×200 map over (Ω, G2), symmetric,
// G1 = 0.5.
func BenchmarkVariationalMap200x200(b *testing.B) {
	sw := Sweep{X: Axis{Name: "omega", Unit: "E_R"}, Y: Axis{Name: "G2", Unit: "E_R"}, Observables: VariationalObservables}
	for i := 0; i < 200; i++ {
		sw.X.Values = append(sw.X.Values, 5*float64(i)/200)
		sw.Y.Values = append(sw.Y.Values, -0.2+0.8*float64(i)/200)
	}
	f := VariationalPoints(func(ix, iy int) (Uniform, error) {
		return Symmetric(sw.X.Values[ix], 0.5, sw.Y.Values[iy]), nil
	}, nil)
	for i := 0; i < b.N; i++ {
		if _, err := Run(context.Background(), sw, f, &discardSink{}, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkVariational: one point (stripe region, asymmetric).
func BenchmarkVariational(b *testing.B) {
	u := Uniform{Omega: 1, Delta: -0.1, Guu: 1.2, Gdd: 0.9, Gud: 0.85}
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		if _, err := Variational(u, nil); err != nil {
			b.Fatal(err)
		}
	}
}

type discardSink struct{ n int }

func (d *discardSink) WritePoint(int, int, PointResult) error { d.n++; return nil }
func (d *discardSink) Done(int, int) bool                     { return false }
