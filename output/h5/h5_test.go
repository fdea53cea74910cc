package h5

import (
	"errors"
	"io/fs"
	"math"
	"math/cmplx"
	"math/rand"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"sync"
	"testing"
)

var meta = Meta{Units: "dimensionless", Description: "test data"}

func mustCreate(t *testing.T, name string) *File {
	t.Helper()
	f, err := Create(name, false)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

func TestLibrary(t *testing.T) {
	if !strings.HasPrefix(LibVersion(), "1.") {
		t.Errorf("LibVersion = %q", LibVersion())
	}
	// Debian's libhdf5-103 is built thread-safe; the package serialises
	// calls regardless, this only records what the library reported.
	t.Logf("libhdf5 %s, thread-safe: %v", LibVersion(), ThreadSafe())
}

// TestRoundTrip writes every supported dataset and attribute type, closes
// the file, reopens it read-only and compares everything bit for bit.
func TestRoundTrip(t *testing.T) {
	name := filepath.Join(t.TempDir(), "rt.h5")
	rng := rand.New(rand.NewSource(1))
	f64 := make([]float64, 2*3*4)
	for i := range f64 {
		f64[i] = rng.NormFloat64() * 1e5
	}
	f64[0], f64[1], f64[2], f64[3] = math.NaN(), math.Inf(1), math.Inf(-1), math.Copysign(0, -1)
	i8 := []int8{-128, -1, 0, 1, 127, 42}
	i32 := []int32{math.MinInt32, -7, 0, 7, math.MaxInt32, 123456}
	c128 := make([]complex128, 5*2)
	for i := range c128 {
		c128[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	c128[3] = cmplx.Inf()
	attrs := []Attr{
		{"s", "héllo ψ↑↓ 𝛀"},
		{"empty", ""},
		{"multiline", "[plan]\nx = 1\n"},
		{"f", 2.5e-7},
		{"i", int64(-3)},
		{"n", 42},
		{"fa", []float64{1, 2.5, math.Pi}},
		{"fa0", []float64{}},
		{"ia", []int64{1, -2, 1 << 40}},
	}

	f := mustCreate(t, name)
	if err := f.SetAttrs("/", attrs...); err != nil {
		t.Fatal(err)
	}
	if err := f.CreateGroup("/a/b/c"); err != nil {
		t.Fatal(err)
	}
	if err := f.CreateGroup("a/b"); err != nil { // exists: no error
		t.Fatal(err)
	}
	if err := f.SetAttrs("/a/b", attrs...); err != nil {
		t.Fatal(err)
	}
	extra := Meta{Units: "Hz", Description: "3-D floats", Attrs: attrs}
	if err := f.WriteFloat64s("/a/b/f64", f64, []int{2, 3, 4}, extra); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteInt8s("/ints/i8", i8, []int{2, 3}, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteInt32s("/ints/i32", i32, nil, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteComplex128s("/psi", c128, []int{5, 2}, Meta{Units: "1/k_R", Description: "ψ"}); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteFloat64s("/scalar", []float64{7.25}, []int{}, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteFloat64s("/empty", nil, []int{0, 3}, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.SetAttr("/a", "f", 1.0); err != nil { // replaced below
		t.Fatal(err)
	}
	if err := f.SetAttr("/a", "f", "now a string"); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}

	f, err := Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sameBits := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
				return false
			}
		}
		return true
	}
	gf, shape, err := f.ReadFloat64s("/a/b/f64")
	if err != nil || !sameBits(gf, f64) || !reflect.DeepEqual(shape, []int{2, 3, 4}) {
		t.Errorf("f64: %v %v %v", err, shape, gf[:4])
	}
	g8, shape, err := f.ReadInt8s("/ints/i8")
	if err != nil || !reflect.DeepEqual(g8, i8) || !reflect.DeepEqual(shape, []int{2, 3}) {
		t.Errorf("i8: %v %v %v", err, shape, g8)
	}
	g32, shape, err := f.ReadInt32s("/ints/i32")
	if err != nil || !reflect.DeepEqual(g32, i32) || !reflect.DeepEqual(shape, []int{6}) {
		t.Errorf("i32: %v %v %v", err, shape, g32)
	}
	// int8 read as float64 and int32 (lossless conversions)
	if g, _, err := f.ReadFloat64s("/ints/i8"); err != nil || g[0] != -128 || g[4] != 127 {
		t.Errorf("i8 as float64: %v %v", err, g)
	}
	if g, _, err := f.ReadInt32s("/ints/i8"); err != nil || g[0] != -128 {
		t.Errorf("i8 as int32: %v %v", err, g)
	}
	gc, shape, err := f.ReadComplex128s("/psi")
	if err != nil || !reflect.DeepEqual(shape, []int{5, 2}) {
		t.Fatalf("c128: %v %v", err, shape)
	}
	for i := range gc {
		if gc[i] != c128[i] && !(cmplx.IsInf(gc[i]) && cmplx.IsInf(c128[i])) {
			t.Errorf("c128[%d] = %v, want %v", i, gc[i], c128[i])
		}
	}
	if g, shape, err := f.ReadFloat64s("/scalar"); err != nil || len(shape) != 0 || g[0] != 7.25 {
		t.Errorf("scalar: %v %v %v", err, shape, g)
	}
	if g, shape, err := f.ReadFloat64s("/empty"); err != nil || !reflect.DeepEqual(shape, []int{0, 3}) || len(g) != 0 {
		t.Errorf("empty: %v %v %v", err, shape, g)
	}

	// attributes
	want := make([]Attr, len(attrs))
	copy(want, attrs)
	for i := range want {
		if n, ok := want[i].Value.(int); ok {
			want[i].Value = int64(n) // int is stored as int64
		}
	}
	sortAttrs := func(a []Attr) []Attr {
		out := append([]Attr(nil), a...)
		for i := range out {
			for j := i + 1; j < len(out); j++ {
				if out[j].Name < out[i].Name {
					out[i], out[j] = out[j], out[i]
				}
			}
		}
		return out
	}
	for _, obj := range []string{"/", "/a/b"} {
		got, err := f.Attrs(obj)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, sortAttrs(want)) {
			t.Errorf("attrs of %s:\n got %#v\nwant %#v", obj, got, sortAttrs(want))
		}
	}
	dattrs, err := f.Attrs("/a/b/f64")
	if err != nil {
		t.Fatal(err)
	}
	if len(dattrs) != len(attrs)+2 {
		t.Errorf("dataset has %d attributes, want %d", len(dattrs), len(attrs)+2)
	}
	if s, err := f.AttrString("/a/b/f64", "units"); err != nil || s != "Hz" {
		t.Errorf("units = %q, %v", s, err)
	}
	if s, err := f.AttrString("/psi", "description"); err != nil || s != "ψ" {
		t.Errorf("description = %q, %v", s, err)
	}
	if s, err := f.AttrString("/a", "f"); err != nil || s != "now a string" {
		t.Errorf("replaced attribute = %q, %v", s, err)
	}
	if x, err := f.AttrFloat64("/", "f"); err != nil || x != 2.5e-7 {
		t.Errorf("AttrFloat64 = %v, %v", x, err)
	}
	if x, err := f.AttrFloat64("/", "i"); err != nil || x != -3 {
		t.Errorf("AttrFloat64(int) = %v, %v", x, err)
	}
	if x, err := f.AttrInt64("/", "n"); err != nil || x != 42 {
		t.Errorf("AttrInt64 = %v, %v", x, err)
	}
	if x, err := f.AttrFloat64s("/", "ia"); err != nil || x[2] != 1<<40 {
		t.Errorf("AttrFloat64s(ints) = %v, %v", x, err)
	}
	if _, err := f.AttrInt64("/", "s"); !errors.Is(err, ErrType) {
		t.Errorf("AttrInt64 of a string: %v", err)
	}
	if _, err := f.AttrString("/", "nope"); !errors.Is(err, ErrNotFound) {
		t.Errorf("missing attribute: %v", err)
	}

	// structure
	ents, err := f.List("/")
	if err != nil {
		t.Fatal(err)
	}
	wantEnts := []Entry{{"a", KindGroup}, {"empty", KindDataset}, {"ints", KindGroup}, {"psi", KindDataset}, {"scalar", KindDataset}}
	if !reflect.DeepEqual(ents, wantEnts) {
		t.Errorf("List(/) = %v, want %v", ents, wantEnts)
	}
	if ents, _ := f.List("/a/b"); !reflect.DeepEqual(ents, []Entry{{"c", KindGroup}, {"f64", KindDataset}}) {
		t.Errorf("List(/a/b) = %v", ents)
	}
	if ok, err := f.Exists("/a/b/c"); !ok || err != nil {
		t.Errorf("Exists(/a/b/c) = %v %v", ok, err)
	}
	for _, p := range []string{"/a/x", "/x/y/z", "/psi/sub"} {
		if ok, err := f.Exists(p); ok || err != nil {
			t.Errorf("Exists(%s) = %v %v", p, ok, err)
		}
	}
	if _, err := f.List("/psi"); !errors.Is(err, ErrType) {
		t.Errorf("List of a dataset: %v", err)
	}
	info, err := f.Info("/psi")
	if err != nil || info.Type != Complex128 || info.TypeName != "complex128" || info.Layout != "contiguous" {
		t.Errorf("Info(/psi) = %+v, %v", info, err)
	}
	if _, _, err := f.ReadComplex128s("/a/b/f64"); !errors.Is(err, ErrType) {
		t.Errorf("complex read of floats: %v", err)
	}
	if _, _, err := f.ReadInt8s("/ints/i32"); !errors.Is(err, ErrType) {
		t.Errorf("int8 read of int32: %v", err)
	}
	// writes on a read-only file are refused
	if err := f.SetAttr("/", "x", 1.0); !errors.Is(err, ErrReadOnly) {
		t.Errorf("SetAttr on read-only file: %v", err)
	}
	if err := f.WriteFloat64s("/new", []float64{1}, nil, meta); !errors.Is(err, ErrReadOnly) {
		t.Errorf("write on read-only file: %v", err)
	}
}

func TestMetaAndArgumentErrors(t *testing.T) {
	name := filepath.Join(t.TempDir(), "m.h5")
	f := mustCreate(t, name)
	defer f.Abort()
	for _, m := range []Meta{{}, {Units: "Hz"}, {Description: "x"}, {Units: " ", Description: "x"}} {
		err := f.WriteFloat64s("/x", []float64{1}, nil, m)
		if !errors.Is(err, ErrMeta) {
			t.Errorf("meta %+v: err = %v", m, err)
		}
	}
	if ok, _ := f.Exists("/x"); ok {
		t.Error("dataset created despite missing meta")
	}
	if err := f.WriteFloat64s("/x", []float64{1, 2, 3}, []int{2, 2}, meta); err == nil {
		t.Error("shape mismatch accepted")
	}
	if err := f.WriteFloat64s("/x", []float64{1}, nil, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteFloat64s("/x", []float64{1}, nil, meta); err == nil || !strings.Contains(err.Error(), "exists") {
		t.Errorf("second write to /x: %v", err)
	}
	if err := f.WriteFloat64s("/x/y", []float64{1}, nil, meta); err == nil {
		t.Error("dataset below a dataset accepted")
	}
	if err := f.CreateGroup("/x"); err == nil {
		t.Error("group over a dataset accepted")
	}
	if err := f.SetAttr("/", "bad", []string{"a"}); !errors.Is(err, ErrType) {
		t.Errorf("unsupported attribute type: %v", err)
	}
	for _, bad := range []string{"a\x00b", "\xff\xfe"} {
		if err := f.SetAttr("/", "bad", bad); !errors.Is(err, ErrType) {
			t.Errorf("string attribute %q: %v", bad, err)
		}
	}
	if err := f.SetAttr("/nope", "a", 1.0); !errors.Is(err, ErrNotFound) {
		t.Errorf("attribute on missing object: %v", err)
	}
	if _, err := f.CreateDataset("/d", Float64, []int{4}, meta, &DatasetOptions{Fill: int32(1)}); !errors.Is(err, ErrType) {
		t.Errorf("fill of wrong type: %v", err)
	}
	if _, err := f.CreateDataset("/d", Float64, []int{4}, meta, &DatasetOptions{Chunk: []int{5}}); err == nil {
		t.Error("chunk larger than shape accepted")
	}
	if _, err := f.CreateDataset("/d", Unknown, []int{4}, meta, nil); !errors.Is(err, ErrType) {
		t.Errorf("Unknown type: %v", err)
	}
	d, err := f.CreateDataset("/d", Int32, []int{4, 5}, meta, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := d.WriteAt([]int{0, 0}, []int{1, 1}, []float64{1}); !errors.Is(err, ErrType) {
		t.Errorf("float64 into int32: %v", err)
	}
	if err := d.WriteAt([]int{3, 4}, []int{2, 1}, []int32{1, 2}); err == nil {
		t.Error("block outside shape accepted")
	}
	if err := d.WriteAt([]int{0}, []int{1}, []int32{1}); err == nil {
		t.Error("wrong rank accepted")
	}
	if err := d.WriteAt([]int{0, 0}, []int{1, 2}, []int32{1}); err == nil {
		t.Error("short data accepted")
	}
	if err := d.ReadAt([]int{0, 0}, []int{1, 1}, []complex128{0}); !errors.Is(err, ErrType) {
		t.Errorf("int32 into complex: %v", err)
	}
	var e *Error
	if err := d.WriteAt([]int{3, 4}, []int{2, 1}, []int32{1, 2}); !errors.As(err, &e) || e.File != name || e.Path != "/d" {
		t.Errorf("error does not name file and path: %#v", err)
	} else if !strings.Contains(err.Error(), name+":/d") || strings.Contains(err.Error(), "\n") {
		t.Errorf("error text %q", err)
	}
	d.Close()
	if err := d.Close(); !errors.Is(err, ErrClosed) {
		t.Errorf("second Close: %v", err)
	}
	if err := d.WriteAt([]int{0, 0}, []int{1, 1}, []int32{1}); !errors.Is(err, ErrClosed) {
		t.Errorf("write after Close: %v", err)
	}
}

// TestHyperslabChunked writes single elements and blocks into chunked
// (compressed and uncompressed) datasets of every type, reopens the file
// and checks every element, unwritten ones holding the fill value.
func TestHyperslabChunked(t *testing.T) {
	name := filepath.Join(t.TempDir(), "hs.h5")
	const ny, nx = 40, 50
	f := mustCreate(t, name)
	d, err := f.CreateDataset("/maps/energy", Float64, []int{ny, nx},
		Meta{Units: "E_R", Description: "energy per particle"},
		&DatasetOptions{Chunk: []int{8, 16}, Compress: true, Fill: math.NaN()})
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, ny*nx)
	for i := range want {
		want[i] = math.NaN()
	}
	for i := 0; i < ny; i++ {
		for j := 0; j < nx; j++ {
			if (i+j)%7 == 0 {
				v := float64(i*100 + j)
				if err := d.WriteAt([]int{i, j}, []int{1, 1}, []float64{v}); err != nil {
					t.Fatal(err)
				}
				want[i*nx+j] = v
			}
		}
	}
	// a block straddling chunk boundaries
	blk := make([]float64, 5*9)
	for k := range blk {
		blk[k] = -float64(k) - 0.5
	}
	if err := d.WriteAt([]int{6, 14}, []int{5, 9}, blk); err != nil {
		t.Fatal(err)
	}
	for a := 0; a < 5; a++ {
		for b := 0; b < 9; b++ {
			want[(6+a)*nx+14+b] = blk[a*9+b]
		}
	}
	// complex and int8 datasets, chunked without compression
	dc, err := f.CreateDataset("/maps/psi", Complex128, []int{3, 4, 5}, meta, &DatasetOptions{Chunk: []int{1, 2, 5}})
	if err != nil {
		t.Fatal(err)
	}
	if err := dc.WriteAt([]int{1, 1, 0}, []int{1, 2, 5}, []complex128{1i, 2, 3, 4, 5, 6, 7, 8, 9, 10 - 1i}); err != nil {
		t.Fatal(err)
	}
	dd, err := f.CreateDataset("/maps/done", Int8, []int{ny, nx}, meta, &DatasetOptions{Chunk: []int{ny, nx}})
	if err != nil {
		t.Fatal(err)
	}
	if err := dd.WriteAt([]int{39, 49}, []int{1, 1}, []int8{1}); err != nil {
		t.Fatal(err)
	}
	// read back while open
	got := make([]float64, 5*9)
	if err := d.ReadAt([]int{6, 14}, []int{5, 9}, got); err != nil || !reflect.DeepEqual(got, blk) {
		t.Errorf("ReadAt before close: %v %v", err, got)
	}
	if err := f.Close(); err != nil { // closes the datasets too
		t.Fatal(err)
	}

	f, err = Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	all, shape, err := f.ReadFloat64s("/maps/energy")
	if err != nil || !reflect.DeepEqual(shape, []int{ny, nx}) {
		t.Fatal(err, shape)
	}
	for k := range all {
		if !(all[k] == want[k] || math.IsNaN(all[k]) && math.IsNaN(want[k])) {
			t.Fatalf("energy[%d] = %v, want %v", k, all[k], want[k])
		}
	}
	info, err := f.Info("/maps/energy")
	if err != nil || info.Layout != "chunked" || !reflect.DeepEqual(info.Chunk, []int{8, 16}) ||
		!strings.Contains(strings.Join(info.Filters, ","), "deflate") {
		t.Errorf("Info = %+v, %v", info, err)
	}
	ro, err := f.OpenDataset("/maps/energy")
	if err != nil {
		t.Fatal(err)
	}
	one := make([]float64, 1)
	if err := ro.ReadAt([]int{7, 0}, []int{1, 1}, one); err != nil || one[0] != 700 {
		t.Errorf("element (7,0) = %v, %v", one[0], err)
	}
	if err := ro.WriteAt([]int{0, 0}, []int{1, 1}, []float64{1}); !errors.Is(err, ErrReadOnly) {
		t.Errorf("WriteAt on read-only file: %v", err)
	}
	psi, _, err := f.ReadComplex128s("/maps/psi")
	if err != nil {
		t.Fatal(err)
	}
	if psi[1*20+1*5+0] != 1i || psi[1*20+2*5+4] != 10-1i || psi[0] != 0 || psi[59] != 0 {
		t.Errorf("psi = %v", psi)
	}
	done, _, err := f.ReadInt8s("/maps/done")
	if err != nil || done[ny*nx-1] != 1 || done[0] != 0 {
		t.Errorf("done: %v", err)
	}
}

func TestAutoChunking(t *testing.T) {
	name := filepath.Join(t.TempDir(), "big.h5")
	f := mustCreate(t, name)
	big := make([]float64, 128*128) // 128 KiB ≥ ChunkThreshold
	for i := range big {
		big[i] = float64(i % 17)
	}
	if err := f.WriteFloat64s("/big", big, []int{128, 128}, meta); err != nil {
		t.Fatal(err)
	}
	if err := f.WriteFloat64s("/small", big[:100], nil, meta); err != nil {
		t.Fatal(err)
	}
	bigc := make([]complex128, 3*64*64)
	if err := f.WriteComplex128s("/bigc", bigc, []int{3, 64, 64}, meta); err != nil {
		t.Fatal(err)
	}
	ib, _ := f.Info("/big")
	is, _ := f.Info("/small")
	ic, _ := f.Info("/bigc")
	if ib.Layout != "chunked" || product(ib.Chunk)*8 > ChunkBytes || len(ib.Filters) != 2 {
		t.Errorf("big: %+v", ib)
	}
	if is.Layout != "contiguous" || len(is.Filters) != 0 {
		t.Errorf("small: %+v", is)
	}
	if ic.Layout != "chunked" || product(ic.Chunk)*16 > ChunkBytes {
		t.Errorf("bigc: %+v", ic)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	st, _ := os.Stat(name)
	if st.Size() > 64<<10 {
		t.Errorf("compressed file is %d bytes", st.Size())
	}
	f, _ = Open(name)
	defer f.Close()
	got, _, err := f.ReadFloat64s("/big")
	if err != nil || !reflect.DeepEqual(got, big) {
		t.Errorf("big round trip: %v", err)
	}
}

func TestAutoChunkShape(t *testing.T) {
	for _, c := range []struct {
		shape []int
		elem  int
	}{{[]int{1 << 20}, 8}, {[]int{1000, 3}, 8}, {[]int{7, 300, 300}, 16}, {[]int{10}, 8}} {
		ch := autoChunk(c.shape, c.elem)
		if product(ch)*c.elem > ChunkBytes && product(ch) > 1 {
			t.Errorf("autoChunk(%v) = %v too large", c.shape, ch)
		}
		for i := range ch {
			if ch[i] < 1 || ch[i] > c.shape[i] {
				t.Errorf("autoChunk(%v) = %v out of range", c.shape, ch)
			}
		}
	}
}

// tmpFiles lists the temporary files Create leaves in dir.
func tmpFiles(t *testing.T, dir string) []string {
	t.Helper()
	m, err := filepath.Glob(filepath.Join(dir, ".*.tmp"))
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func TestCreateIsAtomic(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "out.h5")
	f := mustCreate(t, name)
	if err := f.WriteFloat64s("/x", []float64{1, 2}, nil, meta); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(name); !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("final file exists before Close: %v", err)
	}
	if n := len(tmpFiles(t, dir)); n != 1 {
		t.Fatalf("%d temporary files while writing, want 1", n)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	if n := len(tmpFiles(t, dir)); n != 0 {
		t.Errorf("%d temporary files after Close", n)
	}
	st, err := os.Stat(name)
	if err != nil || st.Mode().Perm() != 0o644 {
		t.Fatalf("after Close: %v %v", st, err)
	}
	if err := f.Close(); !errors.Is(err, ErrClosed) {
		t.Errorf("second Close: %v", err)
	}

	// Abort leaves nothing.
	name2 := filepath.Join(dir, "aborted.h5")
	f = mustCreate(t, name2)
	f.WriteFloat64s("/x", []float64{1, 2}, nil, meta)
	if err := f.Abort(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(name2); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("aborted file exists: %v", err)
	}
	if n := len(tmpFiles(t, dir)); n != 0 {
		t.Errorf("%d temporary files after Abort", n)
	}
}

func TestRefuseOverwrite(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "out.h5")
	if err := os.WriteFile(name, []byte("precious"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := Create(name, false)
	if !errors.Is(err, fs.ErrExist) || !errors.Is(err, ErrExist) || !strings.Contains(err.Error(), name) {
		t.Fatalf("Create over existing file: %v", err)
	}
	// force replaces it
	f, err := Create(name, true)
	if err != nil {
		t.Fatal(err)
	}
	f.WriteFloat64s("/x", []float64{3}, nil, meta)
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	if f, err = Open(name); err != nil {
		t.Fatalf("forced file: %v", err)
	}
	f.Close()

	// a file that appears while we write is not replaced either
	name2 := filepath.Join(dir, "race.h5")
	f = mustCreate(t, name2)
	os.WriteFile(name2, []byte("other"), 0o644)
	if err := f.Close(); !errors.Is(err, fs.ErrExist) {
		t.Errorf("Close over a file created meanwhile: %v", err)
	}
	if b, _ := os.ReadFile(name2); string(b) != "other" {
		t.Errorf("file created meanwhile was replaced")
	}
	if n := len(tmpFiles(t, dir)); n != 0 {
		t.Errorf("%d temporary files left", n)
	}
}

func TestUnwritableDirectory(t *testing.T) {
	dir := t.TempDir()
	cases := []string{filepath.Join(dir, "missing", "out.h5")}
	if os.Geteuid() == 0 {
		// root ignores permission bits; sysfs refuses new files (EPERM)
		cases = append(cases, "/sys/out.h5")
	} else {
		ro := filepath.Join(dir, "ro")
		os.Mkdir(ro, 0o555)
		cases = append(cases, filepath.Join(ro, "out.h5"))
	}
	for _, name := range cases {
		f, err := Create(name, false)
		if err == nil {
			f.Abort()
			t.Errorf("Create(%s) succeeded", name)
			continue
		}
		msg := err.Error()
		if !strings.Contains(msg, name) || strings.Contains(msg, "\n") {
			t.Errorf("error %q does not name %s on one line", msg, name)
		}
		if !strings.Contains(name, "missing") && !errors.Is(err, fs.ErrPermission) {
			t.Errorf("error %q is not a permission error", msg)
		}
		t.Log(msg)
	}
}

func TestOpenBadFiles(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.h5")
	f := mustCreate(t, good)
	f.WriteFloat64s("/x", make([]float64, 1000), nil, meta)
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(good)
	trunc := filepath.Join(dir, "trunc.h5")
	os.WriteFile(trunc, b[:len(b)/2], 0o644)
	text := filepath.Join(dir, "text.h5")
	os.WriteFile(text, []byte("this is not HDF5\n"), 0o644)
	empty := filepath.Join(dir, "empty.h5")
	os.WriteFile(empty, nil, 0o644)

	stderr := captureStderr(t)
	// from several goroutines, hence OS threads (HDF5's print switch is per thread)
	var wg sync.WaitGroup
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < 20; i++ {
				if f, err := Open(trunc); err == nil {
					f.Close()
				}
			}
		}()
	}
	wg.Wait()
	for _, c := range []struct {
		name string
		is   error
	}{
		{trunc, ErrFormat}, {text, ErrFormat}, {empty, ErrFormat}, {dir, ErrFormat},
		{filepath.Join(dir, "missing.h5"), fs.ErrNotExist},
	} {
		for _, open := range []func(string) (*File, error){Open, OpenRW} {
			f, err := open(c.name)
			if err == nil {
				f.Close()
				t.Errorf("%s opened", c.name)
				continue
			}
			if !errors.Is(err, c.is) || !strings.Contains(err.Error(), c.name) || strings.Contains(err.Error(), "\n") {
				t.Errorf("open %s: %q, want one line wrapping %v", c.name, err, c.is)
			}
			t.Log(err)
		}
	}
	if out := stderr(); out != "" {
		t.Errorf("HDF5 printed to stderr:\n%s", out)
	}
}

// captureStderr redirects file descriptor 2 (where libhdf5 would print its
// error stack) to a file; the returned function restores it and returns
// what was written.
func captureStderr(t *testing.T) func() string {
	t.Helper()
	tmp, err := os.CreateTemp(t.TempDir(), "stderr")
	if err != nil {
		t.Fatal(err)
	}
	saved, err := dup(2)
	if err != nil {
		t.Fatal(err)
	}
	if err := dup2(int(tmp.Fd()), 2); err != nil {
		t.Fatal(err)
	}
	return func() string {
		dup2(saved, 2)
		closeFD(saved)
		b, _ := os.ReadFile(tmp.Name())
		tmp.Close()
		return string(b)
	}
}
