package phases

import (
	"context"
	"errors"
	"fmt"
	"runtime"
	"sync"
	"sync/atomic"
	"time"

	"socmap/phases/label"
)

// Axis is one axis of a map: a name (e.g. "omega"), its unit (e.g. "E_R")
// and the values in that unit.
type Axis struct {
	Name, Unit string
	Values     []float64
}

// Len returns the number of points on the axis.
func (a Axis) Len() int { return len(a.Values) }

// Observable names one float observable of a map point and its unit.
type Observable struct {
	Name, Unit, Description string
}

// Sweep is a one- or two-axis map. Y with no values makes a one-axis map
// (then iy is always 0). Observables lists the float observables every point
// carries, in the order of PointResult.Values.
type Sweep struct {
	X, Y        Axis
	Observables []Observable
}

// Shape returns the number of points along x and y (ny = 1 for a one-axis
// map).
func (s Sweep) Shape() (nx, ny int) {
	nx, ny = s.X.Len(), s.Y.Len()
	if ny == 0 {
		ny = 1
	}
	return nx, ny
}

// Index returns the linear index p = iy·nx + ix of a point (x runs fastest);
// it is the order in which points are handed out and the basis of sharding.
func (s Sweep) Index(ix, iy int) int {
	nx, _ := s.Shape()
	return iy*nx + ix
}

// PointResult is what a point function returns for one map point.
type PointResult struct {
	Phase  label.Phase
	Values []float64 // aligned with Sweep.Observables
}

// PointFunc computes one map point. It is called concurrently from several
// goroutines; it should return promptly with ctx.Err() when ctx is
// cancelled. A non-convergence is a result (Phase label.NotConverged), not an
// error; an error stops the run.
type PointFunc func(ctx context.Context, ix, iy int) (PointResult, error)

// PointSink receives the computed points. Run calls its methods from a
// single goroutine only (the caller's), so an implementation needs no
// locking (HDF5, for instance, is not parallel).
type PointSink interface {
	// WritePoint stores one computed point.
	WritePoint(ix, iy int, r PointResult) error
	// Done reports whether a point is already stored (resume).
	Done(ix, iy int) bool
}

// RunSettings of Run. The zero value (or nil) gives the defaults.
type RunSettings struct {
	// Workers: number of goroutines computing points. Default
	// runtime.NumCPU().
	Workers int
	// Shard, Shards: compute only the points with linear index
	// p % Shards == Shard (Sweep.Index). Default Shards = 1 (all points).
	Shard, Shards int
	// Progress, if set, is called from the caller's goroutine after every
	// point that is written (and once at the start) with the number of
	// points of this shard done so far (including points already done
	// before the run), the shard's total and the time since the start.
	Progress func(done, total int, elapsed time.Duration)
}

// RunStatus is the outcome of Run.
type RunStatus int

const (
	RunComplete RunStatus = iota + 1 // every point of the shard is done
	RunCanceled                      // the context was cancelled; finished points were written
	RunFailed                        // a point function or the sink returned an error
)

func (s RunStatus) String() string {
	switch s {
	case RunComplete:
		return "complete"
	case RunCanceled:
		return "canceled"
	case RunFailed:
		return "failed"
	}
	return fmt.Sprintf("runstatus(%d)", int(s))
}

// RunResult summarises a Run.
type RunResult struct {
	Status   RunStatus
	Total    int // points in this shard
	Skipped  int // points already done before the run (PointSink.Done)
	Computed int // points computed and written by this run
	Elapsed  time.Duration
}

// Run computes every point of the sweep that belongs to the shard and is
// not yet done, in parallel over Workers goroutines, and writes each result
// through sink from the calling goroutine. Points are handed to the workers
// in increasing linear index (Sweep.Index); they are written in completion
// order. Run returns when all points are written, when ctx is cancelled
// (points that finished are still written; the error is ctx.Err()), or on
// the first error of a point function or of the sink (the run is then
// stopped and the error returned, naming the point).
func Run(ctx context.Context, sw Sweep, f PointFunc, sink PointSink, s *RunSettings) (RunResult, error) {
	start := time.Now()
	var rs RunSettings
	if s != nil {
		rs = *s
	}
	if rs.Workers <= 0 {
		rs.Workers = runtime.NumCPU()
	}
	if rs.Shards <= 0 {
		rs.Shards = 1
	}
	if rs.Shard < 0 || rs.Shard >= rs.Shards {
		return RunResult{Status: RunFailed}, fmt.Errorf("phases: shard %d of %d out of range", rs.Shard, rs.Shards)
	}
	if f == nil || sink == nil {
		return RunResult{Status: RunFailed}, errors.New("phases: nil point function or sink")
	}
	nx, ny := sw.Shape()
	if nx == 0 {
		return RunResult{Status: RunFailed}, errors.New("phases: empty x axis")
	}
	nobs := len(sw.Observables)

	// Pending points of this shard, in index order (Done is asked here, in
	// the caller's goroutine).
	var res RunResult
	var pending []int
	for p := rs.Shard; p < nx*ny; p += rs.Shards {
		res.Total++
		if sink.Done(p%nx, p/nx) {
			res.Skipped++
			continue
		}
		pending = append(pending, p)
	}
	if rs.Progress != nil {
		rs.Progress(res.Skipped, res.Total, time.Since(start))
	}

	ctx, cancel := context.WithCancel(ctx)
	defer cancel()

	type done struct {
		p   int
		r   PointResult
		err error
	}
	// Workers take the next pending point from a shared counter (no
	// hand-off through a channel: for cheap points such as variational ones,
	// ~15 µs, a channel hand-off per point cost as much as the point) and
	// send results through a buffered channel.
	results := make(chan done, 64*rs.Workers)
	var wg sync.WaitGroup
	workers := rs.Workers
	if workers > len(pending) {
		workers = len(pending)
	}
	var next atomic.Int64
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ctx.Err() == nil {
				k := int(next.Add(1) - 1)
				if k >= len(pending) {
					return
				}
				p := pending[k]
				r, err := f(ctx, p%nx, p/nx)
				results <- done{p, r, err}
			}
		}()
	}
	go func() {
		wg.Wait()
		close(results)
	}()

	var firstErr error
	for d := range results {
		if firstErr != nil {
			continue // drain
		}
		ix, iy := d.p%nx, d.p/nx
		if d.err != nil {
			if ctx.Err() != nil && errors.Is(d.err, ctx.Err()) {
				continue // a point abandoned because of cancellation
			}
			firstErr = fmt.Errorf("phases: point (%d, %d): %w", ix, iy, d.err)
			cancel()
			continue
		}
		if len(d.r.Values) != nobs {
			firstErr = fmt.Errorf("phases: point (%d, %d): %d observables, sweep declares %d", ix, iy, len(d.r.Values), nobs)
			cancel()
			continue
		}
		if err := sink.WritePoint(ix, iy, d.r); err != nil {
			firstErr = fmt.Errorf("phases: writing point (%d, %d): %w", ix, iy, err)
			cancel()
			continue
		}
		res.Computed++
		if rs.Progress != nil {
			rs.Progress(res.Skipped+res.Computed, res.Total, time.Since(start))
		}
	}
	res.Elapsed = time.Since(start)
	switch {
	case firstErr != nil:
		res.Status = RunFailed
		return res, firstErr
	case res.Skipped+res.Computed == res.Total:
		res.Status = RunComplete
		return res, nil
	default:
		res.Status = RunCanceled
		err := context.Cause(ctx)
		if err == nil {
			err = context.Canceled
		}
		return res, err
	}
}

// Value returns the observable called name of point r (false when the sweep
// declares no such observable or r lacks the value).
func (s Sweep) Value(r PointResult, name string) (float64, bool) {
	for i, o := range s.Observables {
		if o.Name == name && i < len(r.Values) {
			return r.Values[i], true
		}
	}
	return 0, false
}
