package h5

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sync"
	"testing"
)

// cycle runs one create/write/read/fail/close sequence touching every
// wrapped call, including failing ones.
func cycle(t *testing.T, dir string, i int) {
	name := filepath.Join(dir, fmt.Sprintf("leak%d.h5", i%3))
	os.Remove(name)
	f, err := Create(name, false)
	if err != nil {
		t.Fatal(err)
	}
	big := make([]float64, 10000)
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(f.SetAttrs("/", Attr{"s", "x"}, Attr{"f", 1.0}, Attr{"i", 2}, Attr{"a", []float64{1, 2}}))
	must(f.WriteFloat64s("/g/big", big, []int{100, 100}, meta))
	must(f.WriteComplex128s("/g/c", []complex128{1, 2i}, nil, meta))
	d, err := f.CreateDataset("/m/e", Complex128, []int{8, 8}, meta, &DatasetOptions{Chunk: []int{4, 4}, Compress: true, Fill: complex(math.NaN(), 0)})
	must(err)
	must(d.WriteAt([]int{1, 2}, []int{2, 2}, []complex128{1, 2, 3, 4}))
	f.WriteFloat64s("/x", []float64{1}, nil, Meta{})              // fails: no meta
	f.SetAttr("/nope", "a", 1.0)                                  // fails: no object
	d.WriteAt([]int{7, 7}, []int{2, 2}, []complex128{1, 2, 3, 4}) // fails: outside
	must(f.Close())                                               // also closes d

	f, err = Open(name)
	must(err)
	_, _, err = f.ReadFloat64s("/g/big")
	must(err)
	_, _, err = f.ReadComplex128s("/m/e")
	must(err)
	_, err = f.Attrs("/")
	must(err)
	_, err = f.List("/g")
	must(err)
	_, err = f.Info("/m/e")
	must(err)
	if _, _, err := f.ReadInt8s("/g/big"); !errors.Is(err, ErrType) {
		t.Fatal(err)
	}
	must(f.Close())
	if _, err := Open(filepath.Join(dir, "trunc.h5")); err == nil {
		t.Fatal("truncated file opened")
	}
	f, err = Create(filepath.Join(dir, "ab.h5"), true)
	must(err)
	must(f.WriteInt8s("/d", []int8{1}, nil, meta))
	must(f.Abort())
}

// TestNoLeaks repeats cycle and checks that no HDF5 identifier stays
// open: files, groups, datasets and attributes by H5Fget_obj_count, and
// dataspaces, datatypes and property lists by checking every identifier
// number issued during the loop with H5Iis_valid. A control leak of three
// dataspaces shows that the count sees leaks.
func TestNoLeaks(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "trunc.h5"), []byte("\x89HDF\r\n\x1a\n\x00\x00\x00\x00"), 0o644)
	n := 200
	if testing.Short() {
		n = 50
	}
	cycle(t, dir, 0) // lazily created library state
	m0 := markIDs()
	for i := 1; i <= n; i++ {
		cycle(t, dir, i)
	}
	m1 := markIDs()
	sp, ty, pl := liveIDs(m0, m1)
	objs := OpenObjects()
	t.Logf("after %d cycles: %d open files/groups/datasets/attributes, %d dataspaces, %d datatypes, %d property lists (identifiers issued: %d, %d, %d)",
		n, objs, sp, ty, pl, m1[0]-m0[0], m1[1]-m0[1], m1[2]-m0[2])
	if objs != 0 || sp != 0 || ty != 0 || pl != 0 {
		t.Errorf("leaked: %d objects, %d dataspaces, %d datatypes, %d property lists", objs, sp, ty, pl)
	}
	if int(m1[0]-m0[0]) < n || int(m1[1]-m0[1]) < n || int(m1[2]-m0[2]) < n {
		t.Errorf("identifier marks did not advance: %v -> %v", m0, m1)
	}
	leakDataspaces(3)
	if sp, _, _ := liveIDs(m0, markIDs()); sp != 3 {
		t.Errorf("control: 3 leaked dataspaces counted as %d", sp)
	}
}

// TestConcurrentUse drives one file from several goroutines (serialised by
// the package lock; run with -race).
func TestConcurrentUse(t *testing.T) {
	name := filepath.Join(t.TempDir(), "conc.h5")
	f := mustCreate(t, name)
	const n, m = 8, 50
	d, err := f.CreateDataset("/map", Float64, []int{n, m}, meta, nil)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	errs := make(chan error, n)
	for g := 0; g < n; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			for j := 0; j < m; j++ {
				if err := d.WriteAt([]int{g, j}, []int{1, 1}, []float64{float64(g*m + j)}); err != nil {
					errs <- err
					return
				}
				if err := f.SetAttr("/", fmt.Sprintf("g%d", g), j); err != nil {
					errs <- err
					return
				}
			}
			errs <- f.WriteFloat64s(fmt.Sprintf("/per/%d", g), []float64{float64(g)}, nil, meta)
		}(g)
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		if err != nil {
			t.Fatal(err)
		}
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	f, _ = Open(name)
	defer f.Close()
	got, _, err := f.ReadFloat64s("/map")
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range got {
		if v != float64(k) {
			t.Fatalf("map[%d] = %v", k, v)
		}
	}
}
