package h5

import (
	"path/filepath"
	"testing"
)

// BenchmarkWritePoint measures one resumable point write: value, Flush,
// done flag, Flush (the protocol of the package documentation).
func BenchmarkWritePoint(b *testing.B) {
	name := filepath.Join(b.TempDir(), "bench.h5")
	f, err := Create(name, false)
	if err != nil {
		b.Fatal(err)
	}
	const n = 100
	if _, err := f.CreateDataset("/e", Float64, []int{n, n}, meta, nil); err != nil {
		b.Fatal(err)
	}
	if _, err := f.CreateDataset("/done", Int8, []int{n, n}, meta, nil); err != nil {
		b.Fatal(err)
	}
	if err := f.Close(); err != nil {
		b.Fatal(err)
	}
	f, err = OpenRW(name)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	e, err := f.OpenDataset("/e")
	if err != nil {
		b.Fatal(err)
	}
	d, err := f.OpenDataset("/done")
	if err != nil {
		b.Fatal(err)
	}
	v, one := []float64{1}, []int8{1}
	cnt := []int{1, 1}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		at := []int{(i / n) % n, i % n}
		if err := e.WriteAt(at, cnt, v); err != nil {
			b.Fatal(err)
		}
		f.Flush()
		d.WriteAt(at, cnt, one)
		f.Flush()
	}
}

// BenchmarkWriteFloat64s measures writing a 512×512 float64 array whole
// (chunked, shuffle + deflate).
func BenchmarkWriteFloat64s(b *testing.B) {
	dir := b.TempDir()
	data := make([]float64, 512*512)
	for i := range data {
		data[i] = float64(i%977) * 0.001
	}
	b.SetBytes(int64(8 * len(data)))
	for i := 0; i < b.N; i++ {
		f, err := Create(filepath.Join(dir, "w.h5"), true)
		if err != nil {
			b.Fatal(err)
		}
		if err := f.WriteFloat64s("/x", data, []int{512, 512}, meta); err != nil {
			b.Fatal(err)
		}
		if err := f.Close(); err != nil {
			b.Fatal(err)
		}
	}
}
