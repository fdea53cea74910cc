package output

import (
	"fmt"
	"math"

	"socmap/output/h5"
	"socmap/phases"
	"socmap/phases/label"
)

// MapSpec describes a map file: the sweep (axes and observables), the method
// that filled it, and extra root attributes (thresholds, fixed settings).
type MapSpec struct {
	Sweep  phases.Sweep
	Method string         // "variational" or "gpe"
	Attrs  map[string]any // extra attributes of /map
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

func (d *MapData) shape() []int {
	if d.Spec.Sweep.Y.Len() == 0 {
		return []int{d.NX}
	}
	return []int{d.NY, d.NX}
}

// WriteMap writes a complete map to a new HDF5 file (temporary name until
// complete). Layout: /map/x (and /map/y) axis values with attributes name
// and units; /map/phase (int8 codes, attribute codes spelling them out);
// /map/done (int8 mask, 1 = computed); one float64 dataset per observable
// under /map/; shape [ny, nx] (x fastest) or [nx] for a one-axis map.
func WriteMap(path string, force bool, info RunInfo, d *MapData) error {
	return CreateH5(path, force, info, func(w *Writer) { w.WriteMapData(d) })
}

// WriteMapData writes the map datasets into an open file.
func (w *Writer) WriteMapData(d *MapData) {
	sw := d.Spec.Sweep
	shape := d.shape()
	if w.Err != nil {
		return
	}
	if w.Err = w.F.CreateGroup("/map"); w.Err != nil {
		return
	}
	w.Attr("/map", "method", d.Spec.Method)
	for k, v := range d.Spec.Attrs {
		w.Attr("/map", k, v)
	}
	axes := []phases.Axis{sw.X}
	if sw.Y.Len() > 0 {
		axes = append(axes, sw.Y)
	}
	for i, a := range axes {
		p := "/map/" + []string{"x", "y"}[i]
		w.Array(p, a.Values, nil, a.Unit, "map axis "+[]string{"x", "y"}[i]+": "+a.Name)
		w.Attr(p, "name", a.Name)
	}
	codes := make([]int8, len(d.Phase))
	done := make([]int8, len(d.Mask))
	for i := range codes {
		codes[i] = int8(d.Phase[i])
		if d.Mask[i] {
			done[i] = 1
		}
	}
	if w.Err == nil {
		w.Err = w.F.WriteInt8s("/map/phase", codes, shape, h5.Meta{Units: "dimensionless", Description: "phase code per point, rows y, columns x",
			Attrs: []h5.Attr{{Name: "codes", Value: label.Legend()}}})
	}
	if w.Err == nil {
		w.Err = w.F.WriteInt8s("/map/done", done, shape, h5.Meta{Units: "dimensionless", Description: "1 where the point was computed (resume mask)"})
	}
	for k, o := range sw.Observables {
		w.Array("/map/"+o.Name, d.Values[k], shape, o.Unit, o.Description)
	}
}
