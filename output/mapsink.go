package output

import (
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"socmap/output/h5"
	"socmap/phases"
	"socmap/phases/label"
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
// Layout under /map (shape [ny, nx], x fastest, or [nx] for one axis):
// x, y (axes; attribute name, units), phase (int8 codes, attribute codes),
// done (int8, 1 = computed), one float64 dataset per observable; attributes
// method, observables (the observable names in order, comma-separated),
// settings (MapSpec.Key, when set), shard and shards (shard files only),
// merged_from (merged files), plus MapSpec.Attrs.

// PartialSuffix is appended to a map file's final name while it is being
// computed.
const PartialSuffix = ".partial"

// PartialName returns the name under which the map file final is computed.
func PartialName(final string) string { return final + PartialSuffix }

// ShardName returns the file name of shard i of n of the map file final:
// "map.h5" → "map.shard-1-of-4.h5" (shards are numbered from 0).
func ShardName(final string, i, n int) string {
	ext := filepath.Ext(final)
	return fmt.Sprintf("%s.shard-%d-of-%d%s", strings.TrimSuffix(final, ext), i, n, ext)
}

// ErrMapInput is matched (errors.Is) by the errors that reject a map file
// given as input: a partial file that belongs to other settings, shard files
// that do not fit together (other plan, axes, observables or method, or
// overlapping points), missing points in a merge, a file that is not a
// socmap map. The command line maps it to exit status 2.
var ErrMapInput = errors.New("map input does not fit")

// ErrMapBusy (which also matches ErrMapInput) is returned when a map file
// cannot be opened because another process holds it open for writing
// (libhdf5 locks files it writes): typically a socmap run still computing it.
var ErrMapBusy = &mapInputError{msg: "map file in use"}

type mapInputError struct {
	msg  string
	busy bool
}

func (e *mapInputError) Is(target error) bool { return target == ErrMapBusy && e.busy }

func (e *mapInputError) Error() string { return e.msg }
func (e *mapInputError) Unwrap() error { return ErrMapInput }

func inputErrorf(format string, a ...any) error {
	return &mapInputError{msg: fmt.Sprintf(format, a...)}
}

// owns reports whether linear point index p belongs to the spec's shard.
func (s MapSpec) owns(p int) bool {
	return s.Shards <= 1 || p%s.Shards == s.Shard
}

// ShardPoints returns the number of points of the spec's shard (all points
// when the map is not sharded).
func (s MapSpec) ShardPoints() int {
	nx, ny := s.Sweep.Shape()
	n := nx * ny
	if s.Shards <= 1 {
		return n
	}
	if s.Shard >= n {
		return 0
	}
	return (n-1-s.Shard)/s.Shards + 1
}

func (s MapSpec) shape() []int {
	nx, ny := s.Sweep.Shape()
	if s.Sweep.Y.Len() == 0 {
		return []int{nx}
	}
	return []int{ny, nx}
}

// observableNames returns the observable names, comma-separated.
func (s MapSpec) observableNames() string {
	names := make([]string, len(s.Sweep.Observables))
	for i, o := range s.Sweep.Observables {
		names[i] = o.Name
	}
	return strings.Join(names, ",")
}

// mapDatasets are the datasets of a laid-out map file, open for hyperslab
// writes.
type mapDatasets struct {
	phase, done *h5.Dataset
	obs         []*h5.Dataset
}

// layoutMap creates /map in f with every dataset allocated (phase and done
// 0, observables NaN) and the map's attributes.
func layoutMap(f *h5.File, spec MapSpec) (*mapDatasets, error) {
	sw := spec.Sweep
	shape := spec.shape()
	w := &Writer{F: f}
	if w.Err = f.CreateGroup("/map"); w.Err != nil {
		return nil, w.Err
	}
	w.Attr("/map", "method", spec.Method)
	w.Attr("/map", "observables", spec.observableNames())
	if spec.Key != "" {
		w.Attr("/map", "settings", spec.Key)
	}
	if spec.Shards > 0 {
		w.Attr("/map", "shard", int64(spec.Shard))
		w.Attr("/map", "shards", int64(spec.Shards))
	}
	keys := make([]string, 0, len(spec.Attrs))
	for k := range spec.Attrs {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		w.Attr("/map", k, spec.Attrs[k])
	}
	axes := []phases.Axis{sw.X}
	if sw.Y.Len() > 0 {
		axes = append(axes, sw.Y)
	}
	for i, a := range axes {
		xy := []string{"x", "y"}[i]
		if w.Err == nil {
			w.Err = f.WriteFloat64s("/map/"+xy, a.Values, nil, h5.Meta{Units: a.Unit, Description: "map axis " + xy + ": " + a.Name})
		}
		w.Attr("/map/"+xy, "name", a.Name)
	}
	if w.Err != nil {
		return nil, w.Err
	}
	ds := &mapDatasets{}
	var err error
	ds.phase, err = f.CreateDataset("/map/phase", h5.Int8, shape,
		h5.Meta{Units: "dimensionless", Description: "phase code per point, rows y, columns x",
			Attrs: []h5.Attr{{Name: "codes", Value: label.Legend()}}}, nil)
	if err != nil {
		return nil, err
	}
	ds.done, err = f.CreateDataset("/map/done", h5.Int8, shape,
		h5.Meta{Units: "dimensionless", Description: "1 where the point was computed (resume mask)"}, nil)
	if err != nil {
		return nil, err
	}
	for _, o := range sw.Observables {
		d, err := f.CreateDataset("/map/"+o.Name, h5.Float64, shape,
			h5.Meta{Units: o.Unit, Description: o.Description}, &h5.DatasetOptions{Fill: math.NaN()})
		if err != nil {
			return nil, err
		}
		ds.obs = append(ds.obs, d)
	}
	return ds, nil
}

// fillMap writes the whole of d into laid-out datasets.
func (ds *mapDatasets) fill(d *MapData) error {
	shape := d.Spec.shape()
	zero := make([]int, len(shape))
	codes := make([]int8, len(d.Phase))
	done := make([]int8, len(d.Mask))
	for i := range codes {
		codes[i] = int8(d.Phase[i])
		if d.Mask[i] {
			done[i] = 1
		}
	}
	if err := ds.phase.WriteAt(zero, shape, codes); err != nil {
		return err
	}
	for k, o := range ds.obs {
		if err := o.WriteAt(zero, shape, d.Values[k]); err != nil {
			return err
		}
	}
	return ds.done.WriteAt(zero, shape, done)
}

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
	if w.Err == nil {
		_, w.Err = layoutMap(f, spec)
	}
	if w.Err != nil {
		f.Abort()
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

func checkSpec(spec MapSpec) error {
	nx, _ := spec.Sweep.Shape()
	if nx == 0 {
		return errors.New("map file: empty x axis")
	}
	if spec.Shards < 0 || spec.Shards > 0 && (spec.Shard < 0 || spec.Shard >= spec.Shards) {
		return fmt.Errorf("map file: shard %d of %d out of range", spec.Shard, spec.Shards)
	}
	for _, o := range spec.Sweep.Observables {
		switch o.Name {
		case "x", "y", "phase", "done", "":
			return fmt.Errorf("map file: observable name %q is reserved", o.Name)
		}
		if strings.Contains(o.Name, ",") || strings.Contains(o.Name, "/") {
			return fmt.Errorf("map file: observable name %q contains ',' or '/'", o.Name)
		}
	}
	return nil
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

func shardText(s MapSpec) string {
	if s.Shards <= 0 {
		return "none"
	}
	return fmt.Sprintf("%d/%d", s.Shard, s.Shards)
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

// Finish closes the complete file and moves it to its final name: fsync,
// then a hard link (which never replaces an existing file) or, with force,
// a rename; the partial name disappears. An incomplete file is an error
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
	return promote(m.Path(), m.final, m.force)
}

// promote moves the finished file from to name, never replacing an existing
// name unless force is set, and fsyncs the directory.
func promote(from, name string, force bool) error {
	fail := func(err error) error {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return fmt.Errorf("rename %s to %s: %w", from, name, err)
	}
	if force {
		if err := os.Rename(from, name); err != nil {
			return fail(err)
		}
	} else {
		err := os.Link(from, name)
		switch {
		case err == nil:
			if err := os.Remove(from); err != nil {
				return fail(err)
			}
		case errors.Is(err, fs.ErrExist):
			return fail(ErrExist)
		default: // no hard links here: check, then rename
			if _, serr := os.Lstat(name); serr == nil {
				return fail(ErrExist)
			}
			if err := os.Rename(from, name); err != nil {
				return fail(err)
			}
		}
	}
	if d, err := os.Open(filepath.Dir(name)); err == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

// ReadMap reads a map file (complete, partial, shard or merged) into memory
// with the run information of its root.
func ReadMap(path string) (*MapData, RunInfo, error) {
	var info RunInfo
	f, err := h5.Open(path)
	if err != nil {
		if strings.Contains(err.Error(), "unable to lock file") {
			return nil, info, &mapInputError{msg: fmt.Sprintf("%s is open for writing in another process (HDF5 file lock): is a socmap run still computing it?", path), busy: true}
		}
		return nil, info, inputErrorf("%v", err)
	}
	defer f.Close()
	notMap := func(why string, err error) (*MapData, RunInfo, error) {
		if err != nil {
			why += ": " + err.Error()
		}
		return nil, info, inputErrorf("%s: not a socmap map file (%s)", path, why)
	}
	if k, err := f.Kind("/map"); err != nil || k != h5.KindGroup {
		return notMap("no /map group", nil)
	}
	info.Version, _ = f.AttrString("/", "version")
	info.CommandLine, _ = f.AttrString("/", "command_line")
	info.Plan, _ = f.AttrString("/", "plan_toml")
	info.Kind, _ = f.AttrString("/", "kind")

	var spec MapSpec
	spec.Attrs = map[string]any{}
	attrs, err := f.Attrs("/map")
	if err != nil {
		return notMap("attributes of /map", err)
	}
	var obsNames string
	haveObs := false
	for _, a := range attrs {
		switch a.Name {
		case "method":
			spec.Method, _ = a.Value.(string)
		case "observables":
			obsNames, _ = a.Value.(string)
			haveObs = true
		case "settings":
			spec.Key, _ = a.Value.(string)
		case "shard":
			v, _ := a.Value.(int64)
			spec.Shard = int(v)
		case "shards":
			v, _ := a.Value.(int64)
			spec.Shards = int(v)
		default:
			spec.Attrs[a.Name] = a.Value
		}
	}
	readAxis := func(p string) (phases.Axis, error) {
		var a phases.Axis
		v, shape, err := f.ReadFloat64s(p)
		if err != nil {
			return a, err
		}
		if len(shape) != 1 {
			return a, fmt.Errorf("%s is not 1-D", p)
		}
		a.Values = v
		a.Name, _ = f.AttrString(p, "name")
		a.Unit, _ = f.AttrString(p, "units")
		return a, nil
	}
	if spec.Sweep.X, err = readAxis("/map/x"); err != nil {
		return notMap("x axis", err)
	}
	if ok, _ := f.Exists("/map/y"); ok {
		if spec.Sweep.Y, err = readAxis("/map/y"); err != nil {
			return notMap("y axis", err)
		}
	}
	var names []string
	if haveObs {
		if obsNames != "" {
			names = strings.Split(obsNames, ",")
		}
	} else { // files without the attribute: every other dataset, in name order
		entries, err := f.List("/map")
		if err != nil {
			return notMap("listing /map", err)
		}
		for _, e := range entries {
			switch e.Name {
			case "x", "y", "phase", "done":
				continue
			}
			if e.Kind == h5.KindDataset {
				names = append(names, e.Name)
			}
		}
	}
	for _, n := range names {
		p := "/map/" + n
		o := phases.Observable{Name: n}
		o.Unit, _ = f.AttrString(p, "units")
		o.Description, _ = f.AttrString(p, "description")
		spec.Sweep.Observables = append(spec.Sweep.Observables, o)
	}
	d := NewMapData(spec)
	want := spec.shape()
	sameShape := func(s []int) bool {
		if len(s) != len(want) {
			return false
		}
		for i := range s {
			if s[i] != want[i] {
				return false
			}
		}
		return true
	}
	codes, shape, err := f.ReadInt8s("/map/phase")
	if err != nil || !sameShape(shape) {
		return notMap(fmt.Sprintf("phase dataset of shape %v, axes give %v", shape, want), err)
	}
	done, shape, err := f.ReadInt8s("/map/done")
	if err != nil || !sameShape(shape) {
		return notMap(fmt.Sprintf("done dataset of shape %v, axes give %v", shape, want), err)
	}
	for i := range codes {
		d.Phase[i] = label.Phase(codes[i])
		d.Mask[i] = done[i] != 0
	}
	for k, o := range spec.Sweep.Observables {
		v, shape, err := f.ReadFloat64s("/map/" + o.Name)
		if err != nil || !sameShape(shape) {
			return notMap(fmt.Sprintf("observable %s of shape %v, axes give %v", o.Name, shape, want), err)
		}
		d.Values[k] = v
	}
	return d, info, nil
}

// CompareMapSpecs checks that two map specs describe the same map (the
// shard is not compared): method, settings key, axes (name, unit, values
// exactly) and observables (names, units, in order). The error wraps
// ErrMapInput and names the first difference, calling the two sides
// nameA and nameB.
func CompareMapSpecs(a, b MapSpec, nameA, nameB string) error {
	differ := func(what string, va, vb any) error {
		return inputErrorf("%s and %s differ: %s %v in %s, %v in %s", nameA, nameB, what, va, nameA, vb, nameB)
	}
	if a.Method != b.Method {
		return differ("method", quoteText(a.Method), quoteText(b.Method))
	}
	if k, va, vb, ok := firstKeyDifference(a.Key, b.Key); ok {
		return differ("setting "+k, va, vb)
	}
	for i, pair := range [][2]phases.Axis{{a.Sweep.X, b.Sweep.X}, {a.Sweep.Y, b.Sweep.Y}} {
		xa, xb := pair[0], pair[1]
		xy := []string{"x", "y"}[i]
		switch {
		case xa.Name != xb.Name:
			return differ(xy+" axis", quoteText(xa.Name), quoteText(xb.Name))
		case xa.Unit != xb.Unit:
			return differ(xy+" axis unit", quoteText(xa.Unit), quoteText(xb.Unit))
		case len(xa.Values) != len(xb.Values):
			return differ(xy+" axis points", len(xa.Values), len(xb.Values))
		}
		for j := range xa.Values {
			if xa.Values[j] != xb.Values[j] && !(math.IsNaN(xa.Values[j]) && math.IsNaN(xb.Values[j])) {
				return differ(fmt.Sprintf("%s axis value %d", xy, j), xa.Values[j], xb.Values[j])
			}
		}
	}
	if a.observableNames() != b.observableNames() {
		return differ("observables", quoteText(a.observableNames()), quoteText(b.observableNames()))
	}
	for i := range a.Sweep.Observables {
		if oa, ob := a.Sweep.Observables[i], b.Sweep.Observables[i]; oa.Unit != ob.Unit {
			return differ("unit of "+oa.Name, quoteText(oa.Unit), quoteText(ob.Unit))
		}
	}
	return nil
}

func quoteText(s string) string { return fmt.Sprintf("%q", s) }

// firstKeyDifference compares two settings keys (TOML lines `name = value`;
// comment lines count as lines too) and returns the first differing name
// with both values ("(absent)" when one side lacks it).
func firstKeyDifference(a, b string) (name, va, vb string, differ bool) {
	if a == b {
		return "", "", "", false
	}
	parse := func(s string) (map[string]string, []string) {
		m := map[string]string{}
		var order []string
		for _, line := range strings.Split(s, "\n") {
			line = strings.TrimSpace(line)
			if line == "" {
				continue
			}
			k, v, ok := strings.Cut(line, " = ")
			if !ok || strings.HasPrefix(line, "#") {
				k, v = "header", line
			}
			if _, dup := m[k]; !dup {
				order = append(order, k)
			}
			m[k] = v
		}
		return m, order
	}
	ma, oa := parse(a)
	mb, ob := parse(b)
	keys := append(oa, ob...)
	sort.SliceStable(keys, func(i, j int) bool { return keys[i] == "header" && keys[j] != "header" })
	for _, k := range keys {
		x, okx := ma[k]
		y, oky := mb[k]
		if !okx {
			x = "(absent)"
		}
		if !oky {
			y = "(absent)"
		}
		if x != y {
			return k, x, y, true
		}
	}
	return "settings", "", "", true // same lines, other order or spacing
}

// WriteMapFile writes a complete in-memory map to a new file final in the
// layout of a resumable map file (temporary name until complete; without
// force an existing file is refused).
func WriteMapFile(final string, force bool, info RunInfo, d *MapData) error {
	if err := checkSpec(d.Spec); err != nil {
		return err
	}
	info.Kind = "map"
	return CreateH5(final, force, info, func(w *Writer) {
		var ds *mapDatasets
		ds, w.Err = layoutMap(w.F, d.Spec)
		if w.Err == nil {
			w.Err = ds.fill(d)
		}
	})
}

// MergeResult is the outcome of MergeMaps.
type MergeResult struct {
	Data     *MapData // the merged map (Spec without shard, Attrs with merged_from)
	Info     RunInfo  // run information of the first input
	Points   int      // points of the map
	Done     int      // points done in the merged map
	Missing  []int    // linear indices (iy·nx + ix) of the points no input holds
	PerInput []int    // points taken from each input
}

// MergeMaps reads map files (typically the shards of one sweep) and combines
// them into one map in memory. The inputs must describe the same map
// (CompareMapSpecs: method, settings, axes, observables); a point done in
// two inputs is refused (overlap), even with equal values. Errors about the
// inputs wrap ErrMapInput. Points that no input holds are listed in
// Missing; the caller decides whether an incomplete map is acceptable.
func MergeMaps(inputs []string) (*MergeResult, error) {
	if len(inputs) == 0 {
		return nil, inputErrorf("merge: no input files")
	}
	res := &MergeResult{PerInput: make([]int, len(inputs))}
	owner := []int(nil)
	for i, in := range inputs {
		for j := 0; j < i; j++ {
			if sameFile(in, inputs[j]) {
				return nil, inputErrorf("merge: %s is given twice", in)
			}
		}
		d, info, err := ReadMap(in)
		if err != nil {
			return nil, err
		}
		if i == 0 {
			res.Info = info
			spec := d.Spec
			spec.Shard, spec.Shards = 0, 0
			spec.Attrs = map[string]any{}
			for k, v := range d.Spec.Attrs {
				spec.Attrs[k] = v
			}
			res.Data = NewMapData(spec)
			res.Points = len(res.Data.Phase)
			owner = make([]int, res.Points)
			for p := range owner {
				owner[p] = -1
			}
		} else if err := CompareMapSpecs(d.Spec, res.Data.Spec, in, inputs[0]); err != nil {
			return nil, err
		}
		for p, ok := range d.Mask {
			if !ok {
				continue
			}
			if owner[p] >= 0 {
				nx := res.Data.NX
				return nil, inputErrorf("merge: point (%d, %d) is done in both %s and %s (overlapping shards)",
					p%nx, p/nx, inputs[owner[p]], in)
			}
			owner[p] = i
			res.Data.Phase[p] = d.Phase[p]
			res.Data.Mask[p] = true
			for k := range d.Values {
				res.Data.Values[k][p] = d.Values[k][p]
			}
			res.PerInput[i]++
			res.Done++
		}
	}
	for p, o := range owner {
		if o < 0 {
			res.Missing = append(res.Missing, p)
		}
	}
	names := make([]string, len(inputs))
	for i, in := range inputs {
		names[i] = filepath.Base(in)
	}
	res.Data.Spec.Attrs["merged_from"] = strings.Join(names, ",")
	return res, nil
}

func sameFile(a, b string) bool {
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}
