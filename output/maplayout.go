package output

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"socmap/output/h5"
	"socmap/phases"
	"socmap/phases/label"
)

// The layout of a map file, the same for partial, shard, complete and
// merged files (mapwriter.go computes a map into one point by point), and
// its reader.
//
// Under /map (shape [ny, nx], x fastest, or [nx] for one axis): x, y (axes;
// attribute name, units), phase (int8 codes, attribute codes), done (int8,
// 1 = computed), one float64 dataset per observable; attributes method,
// observables (the observable names in order, comma-separated), settings
// (MapSpec.Key: the map's identity, phases.Identity text, when set), shard
// and shards (shard files only), merged_from (merged files), plus
// MapSpec.Attrs. The root holds the run information (RunInfo: version,
// command line, effective plan).

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

// mapDatasets are the datasets of a laid-out map file, open for hyperslab
// writes.
type mapDatasets struct {
	phase, done *h5.Dataset
	obs         []*h5.Dataset
}

// layoutMap creates /map in f with every dataset allocated (not yet
// written: the caller writes every element, ds.fill from memory or
// ds.initialise with phase and done 0, observables NaN) and the map's
// attributes.
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
			Attrs: []h5.Attr{{Name: "codes", Value: label.Legend()}}}, &h5.DatasetOptions{NoFill: true})
	if err != nil {
		return nil, err
	}
	ds.done, err = f.CreateDataset("/map/done", h5.Int8, shape,
		h5.Meta{Units: "dimensionless", Description: "1 where the point was computed (resume mask)"}, &h5.DatasetOptions{NoFill: true})
	if err != nil {
		return nil, err
	}
	for _, o := range sw.Observables {
		d, err := f.CreateDataset("/map/"+o.Name, h5.Float64, shape,
			h5.Meta{Units: o.Unit, Description: o.Description}, &h5.DatasetOptions{Fill: math.NaN(), NoFill: true})
		if err != nil {
			return nil, err
		}
		ds.obs = append(ds.obs, d)
	}
	return ds, nil
}

// initBlockBytes is the size of one block of initialise's writes: small
// enough that cancellation is seen within a few milliseconds, large enough
// that the per-call cost of HDF5 does not matter.
const initBlockBytes = 1 << 20

// initialise writes the initial values of an empty map into laid-out
// datasets (phase and done 0, observables NaN), in blocks of whole rows (of
// whole points for a one-axis map) of about initBlockBytes, and stops with
// ctx's error between two blocks once ctx is done. A map of n points and k
// observables is n·(2 + 8k) bytes: a large map takes seconds to minutes to
// write, and a signal must end it promptly.
func (ds *mapDatasets) initialise(ctx context.Context, spec MapSpec) error {
	shape := spec.shape()
	nx, ny := spec.Sweep.Shape()
	rows, perRow := ny, nx // blocks of whole rows
	if len(shape) == 1 {
		rows, perRow = nx, 1
	}
	step := max(1, initBlockBytes/(8*perRow))
	nan := make([]float64, min(step, rows)*perRow)
	for i := range nan {
		nan[i] = math.NaN()
	}
	zero := make([]int8, len(nan))
	for r := 0; r < rows; r += step {
		if err := ctx.Err(); err != nil {
			return context.Cause(ctx)
		}
		n := min(step, rows-r)
		var at, count []int
		if len(shape) == 2 {
			at, count = []int{r, 0}, []int{n, nx}
		} else {
			at, count = []int{r}, []int{n}
		}
		m := n * perRow
		if err := ds.phase.WriteAt(at, count, zero[:m]); err != nil {
			return err
		}
		if err := ds.done.WriteAt(at, count, zero[:m]); err != nil {
			return err
		}
		for _, o := range ds.obs {
			if err := o.WriteAt(at, count, nan[:m]); err != nil {
				return err
			}
		}
	}
	return nil
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

// ReadMap reads a map file (complete, partial, shard or merged) into memory
// with the run information of its root.
func ReadMap(path string) (*MapData, RunInfo, error) {
	var info RunInfo
	f, err := h5.Open(path)
	if err != nil {
		if errors.Is(err, h5.ErrLocked) {
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
