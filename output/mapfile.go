package output

import (
	"fmt"
	"math"

	"socmap/phases"
	"socmap/phases/label"
)

// MapSpec describes a map file: the sweep (axes and observables), the method
// that filled it, and extra root attributes (thresholds, fixed settings).
type MapSpec struct {
	Sweep  phases.Sweep
	Method string         // "variational" or "gpe"
	Attrs  map[string]any // extra attributes of /map
	// Key identifies the settings that determine the map's values: the
	// text of a phases.Identity (MapProblem.Identity: TOML lines
	// name = "value", by value, without run-only settings or the program
	// version). Resume and merge refuse files whose Key differs in value
	// (CompareMapSpecs). Stored as the /map attribute "settings".
	Key string
	// Shard, Shards: the file holds only the points p = iy·nx + ix with
	// p % Shards == Shard (phases.RunSettings); Shards = 0: not sharded.
	Shard, Shards int
}

// MapData is a map held in memory: phase codes, done mask and observables,
// row-major with x running fastest (index iy·nx + ix).
type MapData struct {
	Spec   MapSpec
	NX, NY int
	Phase  []label.Phase
	Mask   []bool      // true where the point is computed
	Values [][]float64 // one slice per observable
}

// NewMapData allocates an empty map (every point not computed, values NaN).
func NewMapData(spec MapSpec) *MapData {
	nx, ny := spec.Sweep.Shape()
	d := &MapData{Spec: spec, NX: nx, NY: ny, Phase: make([]label.Phase, nx*ny), Mask: make([]bool, nx*ny)}
	for range spec.Sweep.Observables {
		v := make([]float64, nx*ny)
		for i := range v {
			v[i] = math.NaN()
		}
		d.Values = append(d.Values, v)
	}
	return d
}

// WritePoint stores a point in memory (phases.PointSink).
func (d *MapData) WritePoint(ix, iy int, r phases.PointResult) error {
	i := iy*d.NX + ix
	if len(r.Values) != len(d.Values) {
		return fmt.Errorf("point (%d,%d): %d values, map has %d observables", ix, iy, len(r.Values), len(d.Values))
	}
	d.Phase[i], d.Mask[i] = r.Phase, true
	for k, v := range r.Values {
		d.Values[k][i] = v
	}
	return nil
}

// Done reports whether a point is stored (phases.PointSink).
func (d *MapData) Done(ix, iy int) bool { return d.Mask[iy*d.NX+ix] }

// Observable returns the values of the named observable, or nil.
func (d *MapData) Observable(name string) []float64 {
	for k, o := range d.Spec.Sweep.Observables {
		if o.Name == name {
			return d.Values[k]
		}
	}
	return nil
}

// WriteMap writes a map held in memory to a new HDF5 file (temporary name
// until complete), in the layout of a resumable map file (maplayout.go):
// /map/x (and /map/y) axis values with attributes name and units;
// /map/phase (int8 codes, attribute codes spelling them out); /map/done
// (int8 mask, 1 = computed); one float64 dataset per observable under
// /map/; shape [ny, nx] (x fastest) or [nx] for a one-axis map.
func WriteMap(path string, force bool, info RunInfo, d *MapData) error {
	return WriteMapFile(path, force, info, d)
}

// WriteMapData writes the map datasets into an open file (same layout).
func (w *Writer) WriteMapData(d *MapData) {
	if w.Err != nil {
		return
	}
	if w.Err = checkSpec(d.Spec); w.Err != nil {
		return
	}
	var ds *mapDatasets
	if ds, w.Err = layoutMap(w.F, d.Spec); w.Err == nil {
		w.Err = ds.fill(d)
	}
}
