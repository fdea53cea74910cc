package output

import (
	"os"
	"path/filepath"
	"strings"
)

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
func MergeMaps(inputs []string) (*MergeResult, error) { return MergeMapsProgress(inputs, nil) }

// MergeMapsProgress is MergeMaps that calls progress (if not nil) after
// each input is read, with the number read and the number of inputs.
func MergeMapsProgress(inputs []string, progress func(done, total int)) (*MergeResult, error) {
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
		if progress != nil {
			progress(i+1, len(inputs))
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
