package output

import (
	"context"
	"fmt"
	"os"
	"sort"
	"time"

	"socmap/output/h5"
	"socmap/output/internal/atomicfile"
	"socmap/phases"
)

// Resumable map files.
//
// A map that is computed point by point lives, until its last point is
// written, under the fixed name PartialName(final) = final + ".partial",
// next to the final name. The life of a map file:
//
//  1. CreateMapFile lays the partial file out completely (axes, phase codes 0,
//     done mask 0, every observable NaN; contiguous storage allocated at
//     creation) under a temporary name and renames it to final.partial (the
//     h5 package's Create/Close), so a partial file is always a valid layout.
//  2. WritePoint writes one point in place: the phase code and every
//     observable by hyperslab, Flush, then its done mark, Flush (the
//     crash-safe protocol of package h5: a point marked done holds its
//     values whatever instant the process is killed at, SIGKILL included; a
//     point whose values were written but not its done mark is computed
//     again). SetFlushEvery lets cheap points share the two flushes: values
//     of n points, Flush, their n done marks, Flush. Each point is written
//     exactly once: WritePoint refuses a point already done.
//  3. Finish, once every point (of the shard) is done, fsyncs the file and
//     renames final.partial to final (never replacing an existing final
//     file unless force is set). Close without Finish keeps the partial
//     file for a later ResumeMapFile.
//
// ResumeMapFile reopens final.partial, checks that it holds the same map
// (method, settings key, axes, observables, shard) and reads its done mask,
// so a sweep continues without recomputing or duplicating any point.
//

// MapFile is a map file being computed point by point: a phases.PointSink
// backed by HDF5 (see the life cycle above). Its methods must be called
// from one goroutine (phases.Run does so).
type MapFile struct {
	f      *h5.File
	final  string
	force  bool
	spec   MapSpec
	nx, ny int
	ds     *mapDatasets
	mask   []bool
	done   int // points of the shard marked done
	total  int // points of the shard
	resume int // points already done when the file was opened

	at, one []int // reused hyperslab offset and count

	batch int       // points per flush (SetFlushEvery)
	since time.Time // when the oldest pending point was written
	// Pending points (values not yet written), in arrival order: index,
	// phase code, nobs values each; order and run buffers for commit.
	pending  []int
	pendCode []int8
	pendVals []float64
	order    []int
	runCode  []int8
	runVals  []float64
}

// MaxFlushAge bounds how long written points wait for their done marks when
// SetFlushEvery batches them: a WritePoint that finds the oldest pending
// point older than this commits the batch early.
const MaxFlushAge = time.Second

// SetFlushEvery sets the number of points committed together (default 1).
// A commit writes the phase codes and observables of its points (runs of
// neighbouring points in one row as one hyperslab), then Flush, their done
// marks, Flush. A killed process loses at most the points of one batch,
// which are not marked done and are computed again on resume; batches spare
// the per-point writes and the two flushes (together some 30 µs) for cheap
// points such as the variational ones. Use 1 for expensive points (GPE
// solves), which are then on disk as soon as they are computed.
func (m *MapFile) SetFlushEvery(n int) {
	if n < 1 {
		n = 1
	}
	m.batch = n
}

// CreateMapFile starts the map file final: it lays out PartialName(final)
// (see the life cycle above) and opens it for WritePoint. Without force it
// refuses (error wrapping ErrExist) when final or its partial file exists;
// with force a stale partial file is replaced now and final at Finish.
func CreateMapFile(final string, force bool, info RunInfo, spec MapSpec) (*MapFile, error) {
	return CreateMapFileContext(context.Background(), final, force, info, spec)
}

// CreateMapFileContext is CreateMapFile that can be interrupted: the
// initial values are written in blocks (about a megabyte each) under the
// temporary name, and when ctx is done between two blocks the temporary
// file is removed and ctx's error returned (wrapped). No partial file then
// exists: an interrupted allocation leaves nothing to resume and nothing
// damaged.
func CreateMapFileContext(ctx context.Context, final string, force bool, info RunInfo, spec MapSpec) (*MapFile, error) {
	if err := checkSpec(spec); err != nil {
		return nil, err
	}
	partial := PartialName(final)
	if !force {
		for _, p := range []string{final, partial} {
			if _, err := os.Lstat(p); err == nil {
				return nil, fmt.Errorf("create %s: %w", p, ErrExist)
			}
		}
	}
	info.Kind = "map"
	f, err := h5.Create(partial, true)
	if err != nil {
		return nil, err
	}
	w := &Writer{F: f}
	w.Root(info)
	var ds *mapDatasets
	if w.Err == nil {
		ds, w.Err = layoutMap(f, spec)
	}
	if w.Err == nil {
		w.Err = ds.initialise(ctx, spec)
	}
	if w.Err != nil {
		f.Abort()
		if ctx.Err() != nil {
			return nil, fmt.Errorf("laying out %s: %w (nothing written)", partial, w.Err)
		}
		return nil, w.Err
	}
	if err := f.Close(); err != nil {
		return nil, err
	}
	return openMapFile(final, force, spec, false)
}

// ResumeMapFile reopens PartialName(final) for writing. The file must hold
// the same map as spec: the same method, settings key, axes (names, units,
// values), observables and shard; otherwise the error wraps ErrMapInput and
// names the first difference. The done mask is read so that Done reports
// the points already computed.
func ResumeMapFile(final string, force bool, spec MapSpec) (*MapFile, error) {
	if err := checkSpec(spec); err != nil {
		return nil, err
	}
	return openMapFile(final, force, spec, true)
}

func openMapFile(final string, force bool, spec MapSpec, resume bool) (*MapFile, error) {
	partial := PartialName(final)
	if resume {
		// Check the layout read-only first: a mismatch never opens the
		// file for writing.
		have, _, err := ReadMap(partial)
		if err != nil {
			return nil, err
		}
		if err := CompareMapSpecs(have.Spec, spec, partial, "this run"); err != nil {
			return nil, err
		}
		if have.Spec.Shards != spec.Shards || have.Spec.Shard != spec.Shard {
			return nil, inputErrorf("%s: shard %s in the file, %s in this run", partial, shardText(have.Spec), shardText(spec))
		}
	}
	f, err := h5.OpenRW(partial)
	if err != nil {
		return nil, err
	}
	m := &MapFile{f: f, final: final, force: force, spec: spec, total: spec.ShardPoints(),
		batch: 1}
	m.nx, m.ny = spec.Sweep.Shape()
	fail := func(err error) (*MapFile, error) {
		f.Close()
		return nil, err
	}
	m.ds = &mapDatasets{}
	if m.ds.phase, err = f.OpenDataset("/map/phase"); err != nil {
		return fail(err)
	}
	if m.ds.done, err = f.OpenDataset("/map/done"); err != nil {
		return fail(err)
	}
	for _, o := range spec.Sweep.Observables {
		d, err := f.OpenDataset("/map/" + o.Name)
		if err != nil {
			return fail(err)
		}
		m.ds.obs = append(m.ds.obs, d)
	}
	done, _, err := f.ReadInt8s("/map/done")
	if err != nil {
		return fail(err)
	}
	if len(done) != m.nx*m.ny {
		return fail(inputErrorf("%s: done mask has %d points, map %d", partial, len(done), m.nx*m.ny))
	}
	m.mask = make([]bool, len(done))
	for p, v := range done {
		if v != 0 {
			if !spec.owns(p) {
				return fail(inputErrorf("%s: point %d is done but not in shard %s", partial, p, shardText(spec)))
			}
			m.mask[p] = true
			m.done++
		}
	}
	m.resume = m.done
	if len(spec.shape()) == 2 {
		m.at, m.one = []int{0, 0}, []int{1, 1}
	} else {
		m.at, m.one = []int{0}, []int{1}
	}
	return m, nil
}

// Path returns the name of the file being written (PartialName(final)).
func (m *MapFile) Path() string { return PartialName(m.final) }

// Final returns the name the file gets when it is complete.
func (m *MapFile) Final() string { return m.final }

// Progress returns the number of points of the shard written (committed or
// pending in the current batch) and their total.
func (m *MapFile) Progress() (done, total int) { return m.done + len(m.pending), m.total }

// Resumed returns the number of points that were already done when the file
// was opened.
func (m *MapFile) Resumed() int { return m.resume }

// Complete reports whether every point of the shard is written.
func (m *MapFile) Complete() bool { return m.done+len(m.pending) == m.total }

// Done reports whether point (ix, iy) is stored (phases.PointSink).
func (m *MapFile) Done(ix, iy int) bool { return m.mask[iy*m.nx+ix] }

// WritePoint stores one point (phases.PointSink). The point is committed
// with its batch (SetFlushEvery; by default at once: phase code and
// observables, Flush, done mark, Flush). Writing a point that is already
// done, or that belongs to another shard, is an error.
func (m *MapFile) WritePoint(ix, iy int, r phases.PointResult) error {
	if m.f == nil {
		return fmt.Errorf("%s: %w", m.Path(), h5.ErrClosed)
	}
	if ix < 0 || ix >= m.nx || iy < 0 || iy >= m.ny {
		return fmt.Errorf("%s: point (%d, %d) outside the %d × %d map", m.Path(), ix, iy, m.nx, m.ny)
	}
	p := iy*m.nx + ix
	if !m.spec.owns(p) {
		return fmt.Errorf("%s: point (%d, %d) is not in shard %s", m.Path(), ix, iy, shardText(m.spec))
	}
	if m.mask[p] {
		return fmt.Errorf("%s: point (%d, %d) is already done", m.Path(), ix, iy)
	}
	if len(r.Values) != len(m.ds.obs) {
		return fmt.Errorf("%s: point (%d, %d): %d values, map has %d observables", m.Path(), ix, iy, len(r.Values), len(m.ds.obs))
	}
	if len(m.pending) == 0 {
		m.since = time.Now()
	}
	m.pending = append(m.pending, p)
	m.pendCode = append(m.pendCode, int8(r.Phase))
	m.pendVals = append(m.pendVals, r.Values...)
	m.mask[p] = true
	if len(m.pending) >= m.batch || time.Since(m.since) >= MaxFlushAge {
		return m.commit()
	}
	return nil
}

// writeRun writes n values starting at linear index p (all in one row) into
// dataset d.
func (m *MapFile) writeRun(d *h5.Dataset, p, n int, data any) error {
	if len(m.at) == 2 {
		m.at[0], m.at[1], m.one[1] = p/m.nx, p%m.nx, n
	} else {
		m.at[0], m.one[0] = p, n
	}
	return d.WriteAt(m.at, m.one, data)
}

// commit writes the pending points (values, Flush, done marks, Flush).
func (m *MapFile) commit() error {
	np := len(m.pending)
	if np == 0 {
		return nil
	}
	nobs := len(m.ds.obs)
	m.order = m.order[:0]
	for i := range m.pending {
		m.order = append(m.order, i)
	}
	sort.Slice(m.order, func(a, b int) bool { return m.pending[m.order[a]] < m.pending[m.order[b]] })
	// Runs of consecutive indices within one row.
	forRuns := func(f func(start, n int, idx []int) error) error {
		for a := 0; a < np; {
			b := a + 1
			for b < np && m.pending[m.order[b]] == m.pending[m.order[b-1]]+1 && m.pending[m.order[b]]%m.nx != 0 {
				b++
			}
			if err := f(m.pending[m.order[a]], b-a, m.order[a:b]); err != nil {
				return err
			}
			a = b
		}
		return nil
	}
	err := forRuns(func(start, n int, idx []int) error {
		m.runCode = m.runCode[:0]
		for _, i := range idx {
			m.runCode = append(m.runCode, m.pendCode[i])
		}
		if err := m.writeRun(m.ds.phase, start, n, m.runCode); err != nil {
			return err
		}
		for k, d := range m.ds.obs {
			m.runVals = m.runVals[:0]
			for _, i := range idx {
				m.runVals = append(m.runVals, m.pendVals[i*nobs+k])
			}
			if err := m.writeRun(d, start, n, m.runVals); err != nil {
				return err
			}
		}
		return nil
	})
	if err == nil {
		err = m.f.Flush()
	}
	if err == nil {
		err = forRuns(func(start, n int, idx []int) error {
			m.runCode = m.runCode[:0]
			for range idx {
				m.runCode = append(m.runCode, 1)
			}
			return m.writeRun(m.ds.done, start, n, m.runCode)
		})
	}
	if err == nil {
		err = m.f.Flush()
	}
	if err != nil {
		return err
	}
	m.done += np
	m.pending, m.pendCode, m.pendVals = m.pending[:0], m.pendCode[:0], m.pendVals[:0]
	return nil
}

// Close commits the pending points, closes the file and keeps it under its
// partial name (an interrupted sweep; ResumeMapFile continues it).
func (m *MapFile) Close() error {
	if m.f == nil {
		return nil
	}
	err := m.commit()
	if serr := m.f.Sync(); err == nil {
		err = serr
	}
	if cerr := m.f.Close(); err == nil {
		err = cerr
	}
	m.f = nil
	return err
}

// Finish closes the complete file and moves it to its final name
// (atomicfile.Commit: fsync, then a hard link, which never replaces an
// existing file, or, with force, a rename); the partial name disappears. An incomplete file is an error
// (and stays open).
func (m *MapFile) Finish() error {
	if m.f == nil {
		return fmt.Errorf("%s: %w", m.Path(), h5.ErrClosed)
	}
	if !m.Complete() {
		return fmt.Errorf("%s: %d of %d points done, not complete", m.Path(), m.done+len(m.pending), m.total)
	}
	if err := m.Close(); err != nil {
		return err
	}
	if err := atomicfile.Commit(m.Path(), m.final, m.force); err != nil {
		return fmt.Errorf("rename %s to %s: %w", m.Path(), m.final, err)
	}
	return nil
}
