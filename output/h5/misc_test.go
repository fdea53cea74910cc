package h5

import (
	"errors"
	"path/filepath"
	"reflect"
	"testing"
)

func TestOpenRWAndMisc(t *testing.T) {
	name := filepath.Join(t.TempDir(), "rw.h5")
	f := mustCreate(t, name)
	if err := f.WriteInt32s("/a", []int32{1, 2, 3}, nil, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.Sync(); err != nil {
		t.Errorf("Sync of a file being created: %v", err)
	}
	if f.Name() != name {
		t.Errorf("Name = %q", f.Name())
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}

	f, err := OpenRW(name)
	if err != nil {
		t.Fatal(err)
	}
	if k, err := f.Kind("/a"); err != nil || k != KindDataset || k.String() != "dataset" {
		t.Errorf("Kind(/a) = %v, %v", k, err)
	}
	if k, err := f.Kind("/"); err != nil || k != KindGroup || k.String() != "group" {
		t.Errorf("Kind(/) = %v, %v", k, err)
	}
	if _, err := f.Kind("/zz"); !errors.Is(err, ErrNotFound) {
		t.Errorf("Kind(/zz): %v", err)
	}
	d, err := f.OpenDataset("a")
	if err != nil {
		t.Fatal(err)
	}
	if d.Path() != "/a" || d.Type() != Int32 || !reflect.DeepEqual(d.Shape(), []int{3}) {
		t.Errorf("dataset %s %v %v", d.Path(), d.Type(), d.Shape())
	}
	if err := d.WriteAt([]int{1}, []int{2}, []int32{20, 30}); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteFloat64s("/b/c", []float64{1}, nil, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.SetAttr("/b", "k", "v"); err != nil {
		t.Fatal(err)
	}
	if _, err := f.OpenDataset("/b"); !errors.Is(err, ErrType) {
		t.Errorf("OpenDataset of a group: %v", err)
	}
	if err := f.Sync(); err != nil {
		t.Errorf("Sync: %v", err)
	}
	if err := f.Abort(); err != nil { // for OpenRW, Abort is Close
		t.Fatal(err)
	}
	if err := f.Abort(); !errors.Is(err, ErrClosed) {
		t.Errorf("second Abort: %v", err)
	}
	if err := f.Flush(); !errors.Is(err, ErrClosed) {
		t.Errorf("Flush after Close: %v", err)
	}
	if _, err := f.Attrs("/"); !errors.Is(err, ErrClosed) {
		t.Errorf("Attrs after Close: %v", err)
	}

	f, err = Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if v, _, err := f.ReadInt32s("/a"); err != nil || !reflect.DeepEqual(v, []int32{1, 20, 30}) {
		t.Errorf("after OpenRW: %v %v", v, err)
	}
	if s, err := f.AttrString("/b", "k"); err != nil || s != "v" {
		t.Errorf("attribute written in place: %q %v", s, err)
	}
	if err := f.Flush(); err != nil {
		t.Errorf("Flush of a read-only file: %v", err)
	}
	if err := f.Sync(); err != nil {
		t.Errorf("Sync of a read-only file: %v", err)
	}
	for dt, s := range map[DType]string{Float64: "float64", Int8: "int8", Int32: "int32", Complex128: "complex128", Unknown: "unknown"} {
		if dt.String() != s {
			t.Errorf("%d.String() = %q", dt, dt.String())
		}
	}
}
