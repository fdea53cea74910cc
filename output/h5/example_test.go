package h5_test

import (
	"fmt"
	"log"
	"math"
	"os"
	"path/filepath"

	"socmap/output/h5"
)

// A map is laid out once (the file appears atomically under its name), then
// filled point by point in place, as a resumable sweep does.
func Example() {
	dir, _ := os.MkdirTemp("", "h5example")
	defer os.RemoveAll(dir)
	name := filepath.Join(dir, "map.h5")

	f, err := h5.Create(name, false)
	if err != nil {
		log.Fatal(err)
	}
	f.SetAttr("/", "command_line", "socmap map --out map.h5")
	f.WriteFloat64s("/map/x", []float64{0, 0.5, 1}, nil, h5.Meta{Units: "E_R", Description: "coupling ħΩ"})
	f.CreateDataset("/map/energy", h5.Float64, []int{3}, h5.Meta{Units: "E_R", Description: "energy per particle"},
		&h5.DatasetOptions{Fill: math.NaN()})
	f.CreateDataset("/map/done", h5.Int8, []int{3}, h5.Meta{Units: "dimensionless", Description: "1 where computed"}, nil)
	if err := f.Close(); err != nil {
		log.Fatal(err)
	}

	f, err = h5.OpenRW(name)
	if err != nil {
		log.Fatal(err)
	}
	e, _ := f.OpenDataset("/map/energy")
	done, _ := f.OpenDataset("/map/done")
	for i := 0; i < 2; i++ { // the sweep is interrupted after two points
		e.WriteAt([]int{i}, []int{1}, []float64{-1 - float64(i)})
		f.Flush()
		done.WriteAt([]int{i}, []int{1}, []int8{1})
		f.Flush()
	}
	f.Close()

	f, _ = h5.Open(name)
	defer f.Close()
	v, shape, _ := f.ReadFloat64s("/map/energy")
	d, _, _ := f.ReadInt8s("/map/done")
	u, _ := f.AttrString("/map/energy", "units")
	fmt.Println(v, shape, d, u)
	// Output: [-1 -2 NaN] [3] [1 1 0] E_R
}
