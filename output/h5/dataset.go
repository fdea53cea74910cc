package h5

/*
#include <stdlib.h>
#include "shim.h"
*/
import "C"

import (
	"errors"
	"fmt"
	"strings"
	"unsafe"
)

// DType is the element type of a dataset.
type DType int

const (
	Unknown    DType = iota // a type this package does not write
	Float64                 // IEEE 754 binary64, little-endian in the file
	Int8                    // signed 8-bit integer
	Int32                   // signed 32-bit integer, little-endian
	Complex128              // compound {r float64, i float64}
)

func (t DType) String() string {
	switch t {
	case Float64:
		return "float64"
	case Int8:
		return "int8"
	case Int32:
		return "int32"
	case Complex128:
		return "complex128"
	}
	return "unknown"
}

func (t DType) size() int {
	switch t {
	case Float64:
		return 8
	case Int8:
		return 1
	case Int32:
		return 4
	case Complex128:
		return 16
	}
	return 0
}

// Storage defaults for datasets written whole (WriteFloat64s etc.).
const (
	// ChunkThreshold: datasets of at least this many bytes are stored chunked
	// and compressed (shuffle + deflate); smaller ones contiguous.
	ChunkThreshold = 1 << 16
	// ChunkBytes is the target size of an automatically chosen chunk.
	ChunkBytes = 1 << 17
	// DeflateLevel is the zlib level used for compressed datasets.
	DeflateLevel = 4
)

// Meta is the mandatory description of a dataset (DESIGN.md §4): its units
// (SI, or "E_R", "1/k_R", "dimensionless") and a short description, both
// stored as string attributes "units" and "description", plus any further
// attributes.
type Meta struct {
	Units       string
	Description string
	Attrs       []Attr
}

func (m Meta) check() error {
	if strings.TrimSpace(m.Units) == "" || strings.TrimSpace(m.Description) == "" {
		return ErrMeta
	}
	return nil
}

// DatasetOptions are the storage options of CreateDataset. The zero value
// (or nil) gives contiguous storage, allocated and filled with zeros at
// creation, which is safe for in-place writes of single points (see the
// package documentation).
type DatasetOptions struct {
	// Chunk is the chunk shape (one entry per dimension, each between 1 and
	// the dimension). Nil: contiguous, unless Compress is set, in which case
	// a chunk of about ChunkBytes is chosen.
	Chunk []int
	// Compress stores chunks with shuffle + deflate (DeflateLevel). Rewriting
	// compressed chunks moves them in the file: not crash-safe for resumable
	// writes.
	Compress bool
	// Fill is the value of elements never written: a float64, int8, int32 or
	// complex128 matching the dataset type (e.g. math.NaN()). Nil: zero.
	Fill any
	// NoFill allocates the contiguous storage at creation without writing
	// it (HDF5's fill time "never"; Fill is still recorded as the dataset's
	// fill value): creation is then instant whatever the size, and the
	// caller must write every element itself before the data are read, in
	// blocks it can interrupt (a map file's layout does so, checking for
	// cancellation between blocks). Ignored for compressed datasets.
	NoFill bool
}

// Dataset is an open dataset, for hyperslab writes and reads. Close it when
// done (File.Close closes datasets left open).
type Dataset struct {
	f        *File
	id       C.hid_t
	path     string
	dtype    DType
	typeName string
	shape    []int
}

// Path returns the dataset's absolute path in the file.
func (d *Dataset) Path() string { return d.path }

// Type returns the dataset's element type (Unknown for foreign types).
func (d *Dataset) Type() DType { return d.dtype }

// Shape returns a copy of the dataset's dimensions (empty for a scalar).
func (d *Dataset) Shape() []int { return append([]int(nil), d.shape...) }

// memType returns the memory type for dt; owned types must be closed.
func memType(dt DType) (id C.hid_t, owned bool) {
	switch dt {
	case Float64:
		return C.sm_type(C.SM_NATIVE_DOUBLE), false
	case Int8:
		return C.sm_type(C.SM_NATIVE_INT8), false
	case Int32:
		return C.sm_type(C.SM_NATIVE_INT32), false
	case Complex128:
		return C.sm_complex(0), true
	}
	return -1, false
}

func fileType(dt DType) (id C.hid_t, owned bool) {
	switch dt {
	case Float64:
		return C.sm_type(C.SM_IEEE_F64LE), false
	case Int8:
		return C.sm_type(C.SM_STD_I8LE), false
	case Int32:
		return C.sm_type(C.SM_STD_I32LE), false
	case Complex128:
		return C.sm_complex(1), true
	}
	return -1, false
}

// isComplex reports whether t is a compound of two float members r and i.
func isComplex(t C.hid_t) bool {
	if C.H5Tget_class(t) != C.H5T_COMPOUND || C.H5Tget_nmembers(t) != 2 {
		return false
	}
	for i, want := range []string{"r", "i"} {
		n := C.H5Tget_member_name(t, C.uint(i))
		if n == nil {
			C.H5Eclear2(C.H5E_DEFAULT)
			return false
		}
		name := C.GoString(n)
		C.H5free_memory(unsafe.Pointer(n))
		if name != want || C.H5Tget_member_class(t, C.uint(i)) != C.H5T_FLOAT {
			return false
		}
	}
	return true
}

// dtypeOf classifies a file type.
func dtypeOf(t C.hid_t) DType {
	size := int(C.H5Tget_size(t))
	switch C.H5Tget_class(t) {
	case C.H5T_FLOAT:
		if size == 8 {
			return Float64
		}
	case C.H5T_INTEGER:
		if C.H5Tget_sign(t) == C.H5T_SGN_2 {
			switch size {
			case 1:
				return Int8
			case 4:
				return Int32
			}
		}
	case C.H5T_COMPOUND:
		if size == 16 && isComplex(t) {
			return Complex128
		}
	}
	return Unknown
}

// typeName describes an HDF5 type in numpy-like words ("float64", "int8",
// "uint16", "complex128", "string", "compound{a,b}", ...).
func typeName(t C.hid_t) string {
	size := int(C.H5Tget_size(t))
	switch C.H5Tget_class(t) {
	case C.H5T_INTEGER:
		if C.H5Tget_sign(t) == C.H5T_SGN_NONE {
			return fmt.Sprintf("uint%d", 8*size)
		}
		return fmt.Sprintf("int%d", 8*size)
	case C.H5T_FLOAT:
		return fmt.Sprintf("float%d", 8*size)
	case C.H5T_STRING:
		if C.H5Tis_variable_str(t) > 0 {
			return "string"
		}
		return fmt.Sprintf("string[%d]", size)
	case C.H5T_COMPOUND:
		if isComplex(t) {
			return fmt.Sprintf("complex%d", 8*size)
		}
		n := int(C.H5Tget_nmembers(t))
		names := make([]string, 0, n)
		for i := 0; i < n; i++ {
			if p := C.H5Tget_member_name(t, C.uint(i)); p != nil {
				names = append(names, C.GoString(p))
				C.H5free_memory(unsafe.Pointer(p))
			}
		}
		return "compound{" + strings.Join(names, ",") + "}"
	case C.H5T_ENUM:
		return "enum"
	case C.H5T_ARRAY:
		return "array"
	case C.H5T_VLEN:
		return "vlen"
	case C.H5T_OPAQUE:
		return "opaque"
	case C.H5T_BITFIELD:
		return "bitfield"
	case C.H5T_REFERENCE:
		return "reference"
	case C.H5T_TIME:
		return "time"
	}
	C.H5Eclear2(C.H5E_DEFAULT)
	return "unknown"
}

// elemOf returns the element type, a pointer to the first element (nil for
// an empty slice) and the length of a supported Go slice.
func elemOf(data any) (DType, unsafe.Pointer, int) {
	switch v := data.(type) {
	case []float64:
		if len(v) == 0 {
			return Float64, nil, 0
		}
		return Float64, unsafe.Pointer(&v[0]), len(v)
	case []int8:
		if len(v) == 0 {
			return Int8, nil, 0
		}
		return Int8, unsafe.Pointer(&v[0]), len(v)
	case []int32:
		if len(v) == 0 {
			return Int32, nil, 0
		}
		return Int32, unsafe.Pointer(&v[0]), len(v)
	case []complex128:
		if len(v) == 0 {
			return Complex128, nil, 0
		}
		return Complex128, unsafe.Pointer(&v[0]), len(v)
	}
	return Unknown, nil, 0
}

func product(shape []int) int {
	n := 1
	for _, s := range shape {
		n *= s
	}
	return n
}

// autoChunk halves the largest dimension until a chunk holds at most
// ChunkBytes.
func autoChunk(shape []int, elem int) []int {
	c := append([]int(nil), shape...)
	for product(c)*elem > ChunkBytes {
		j := 0
		for i := range c {
			if c[i] > c[j] {
				j = i
			}
		}
		if c[j] == 1 {
			break
		}
		c[j] = (c[j] + 1) / 2
	}
	return c
}

func hsizes(v []int) []C.hsize_t {
	out := make([]C.hsize_t, len(v)+1) // +1: never empty
	for i, x := range v {
		out[i] = C.hsize_t(x)
	}
	return out
}

func makeSpace(shape []int) C.hid_t {
	if len(shape) == 0 {
		return C.H5Screate(C.H5S_SCALAR)
	}
	d := hsizes(shape)
	return C.H5Screate_simple(C.int(len(shape)), &d[0], nil)
}

// createLocked creates the dataset at absolute path p with its attributes
// and returns its identifier. fill points to a value of the memory type (or
// is nil for zero).
func (f *File) createLocked(op, p string, dt DType, shape []int, m Meta, chunk []int, compress bool, fill unsafe.Pointer, noFill bool) (C.hid_t, error) {
	if err := f.checkWritable(op, p); err != nil {
		return -1, err
	}
	if err := m.check(); err != nil {
		return -1, f.err(op, p, err)
	}
	for _, s := range shape {
		if s < 0 {
			return -1, f.err(op, p, fmt.Errorf("negative dimension in shape %v", shape))
		}
	}
	if _, err := f.kindLocked(op, p); err == nil {
		return -1, f.err(op, p, errors.New("an object exists at this path"))
	}
	if compress && chunk == nil {
		chunk = autoChunk(shape, dt.size())
	}
	if chunk != nil {
		if len(chunk) != len(shape) || len(shape) == 0 {
			return -1, f.err(op, p, fmt.Errorf("chunk %v does not fit shape %v", chunk, shape))
		}
		for i, c := range chunk {
			if c < 1 || c > shape[i] {
				return -1, f.err(op, p, fmt.Errorf("chunk %v does not fit shape %v", chunk, shape))
			}
		}
	}
	ftype, fown := fileType(dt)
	mtype, mown := memType(dt)
	if ftype < 0 || mtype < 0 {
		return -1, f.err(op, p, stackError())
	}
	if fown {
		defer C.H5Tclose(ftype)
	}
	if mown {
		defer C.H5Tclose(mtype)
	}
	space := makeSpace(shape)
	if space < 0 {
		return -1, f.err(op, p, stackError())
	}
	defer C.H5Sclose(space)
	dcpl := C.sm_dcpl()
	if dcpl < 0 {
		return -1, f.err(op, p, stackError())
	}
	defer C.H5Pclose(dcpl)
	if chunk != nil {
		cd := hsizes(chunk)
		if C.H5Pset_chunk(dcpl, C.int(len(chunk)), &cd[0]) < 0 {
			return -1, f.err(op, p, stackError())
		}
	}
	if compress {
		if C.H5Pset_shuffle(dcpl) < 0 || C.H5Pset_deflate(dcpl, DeflateLevel) < 0 {
			return -1, f.err(op, p, stackError())
		}
	} else if C.H5Pset_alloc_time(dcpl, C.H5D_ALLOC_TIME_EARLY) < 0 {
		return -1, f.err(op, p, stackError())
	}
	zero := make([]byte, 16)
	if fill == nil {
		fill = unsafe.Pointer(&zero[0])
	}
	fillTime := C.H5D_fill_time_t(C.H5D_FILL_TIME_ALLOC)
	if noFill && !compress {
		fillTime = C.H5D_FILL_TIME_NEVER
	}
	if C.H5Pset_fill_value(dcpl, mtype, fill) < 0 || C.H5Pset_fill_time(dcpl, fillTime) < 0 {
		return -1, f.err(op, p, stackError())
	}
	lcpl := C.sm_lcpl()
	if lcpl < 0 {
		return -1, f.err(op, p, stackError())
	}
	defer C.H5Pclose(lcpl)
	cs := cstr(p)
	defer cfree(cs)
	id, cerr := C.H5Dcreate2(f.id, cs, ftype, space, lcpl, dcpl, C.H5P_DEFAULT)
	if id < 0 {
		return -1, f.err(op, p, stackErrno(cerr))
	}
	attrs := append([]Attr{{"units", m.Units}, {"description", m.Description}}, m.Attrs...)
	for _, a := range attrs {
		if err := setAttr(id, a.Name, a.Value); err != nil {
			C.H5Dclose(id)
			C.H5Ldelete(f.id, cs, C.H5P_DEFAULT)
			return -1, f.err(op, p+"@"+a.Name, err)
		}
	}
	return id, nil
}

// CreateDataset creates an N-dimensional dataset of type dt at path p
// (parent groups are created as needed), filled with opt.Fill, and returns
// it open for WriteAt/ReadAt. A nil opt means the zero DatasetOptions.
// shape may be empty for a scalar dataset.
func (f *File) CreateDataset(p string, dt DType, shape []int, m Meta, opt *DatasetOptions) (*Dataset, error) {
	lock()
	defer unlock()
	p = clean(p)
	const op = "create dataset"
	if opt == nil {
		opt = &DatasetOptions{}
	}
	if dt.size() == 0 {
		return nil, f.err(op, p, fmt.Errorf("%w: cannot create datasets of type %v", ErrType, dt))
	}
	var fill unsafe.Pointer
	if opt.Fill != nil {
		var v any
		switch x := opt.Fill.(type) {
		case float64:
			v = []float64{x}
		case int8:
			v = []int8{x}
		case int32:
			v = []int32{x}
		case complex128:
			v = []complex128{x}
		}
		ft, ptr, _ := elemOf(v)
		if ft != dt {
			return nil, f.err(op, p, fmt.Errorf("%w: fill value %T for a %v dataset", ErrType, opt.Fill, dt))
		}
		fill = ptr
	}
	id, err := f.createLocked(op, p, dt, shape, m, opt.Chunk, opt.Compress, fill, opt.NoFill)
	if err != nil {
		return nil, err
	}
	d := &Dataset{f: f, id: id, path: p, dtype: dt, typeName: dt.String(), shape: append([]int{}, shape...)}
	f.dsets[d] = struct{}{}
	return d, nil
}

// OpenDataset opens the dataset at path p.
func (f *File) OpenDataset(p string) (*Dataset, error) {
	lock()
	defer unlock()
	return f.openDatasetLocked("open dataset", clean(p))
}

func (f *File) openDatasetLocked(op, p string) (*Dataset, error) {
	k, err := f.kindLocked(op, p)
	if err != nil {
		return nil, err
	}
	if k != KindDataset {
		return nil, f.err(op, p, fmt.Errorf("%w: a %v, not a dataset", ErrType, k))
	}
	cs := cstr(p)
	defer cfree(cs)
	id := C.H5Dopen2(f.id, cs, C.H5P_DEFAULT)
	if id < 0 {
		return nil, f.err(op, p, stackError())
	}
	d := &Dataset{f: f, id: id, path: p}
	if err := d.describe(); err != nil {
		C.H5Dclose(id)
		return nil, f.err(op, p, err)
	}
	f.dsets[d] = struct{}{}
	return d, nil
}

// describe fills type and shape from the open dataset.
func (d *Dataset) describe() error {
	t := C.H5Dget_type(d.id)
	if t < 0 {
		return stackError()
	}
	d.dtype, d.typeName = dtypeOf(t), typeName(t)
	C.H5Tclose(t)
	s := C.H5Dget_space(d.id)
	if s < 0 {
		return stackError()
	}
	defer C.H5Sclose(s)
	rank := int(C.H5Sget_simple_extent_ndims(s))
	if rank < 0 {
		return stackError()
	}
	dims := make([]C.hsize_t, rank+1)
	if C.H5Sget_simple_extent_dims(s, &dims[0], nil) < 0 {
		return stackError()
	}
	d.shape = make([]int, rank)
	for i := range d.shape {
		d.shape[i] = int(dims[i])
	}
	return nil
}

func (d *Dataset) closeLocked() error {
	delete(d.f.dsets, d)
	if d.id < 0 {
		return nil
	}
	r := C.H5Dclose(d.id)
	d.id = -1
	if r < 0 {
		return stackError()
	}
	return nil
}

// Close closes the dataset.
func (d *Dataset) Close() error {
	lock()
	defer unlock()
	if d.id < 0 {
		return d.f.err("close dataset", d.path, ErrClosed)
	}
	if err := d.closeLocked(); err != nil {
		return d.f.err("close dataset", d.path, err)
	}
	return nil
}

// selection checks offset/count against the shape and returns the file and
// memory dataspaces for the block (caller closes both).
func (d *Dataset) selection(offset, count []int) (fspace, mspace C.hid_t, n int, err error) {
	if len(offset) != len(d.shape) || len(count) != len(d.shape) {
		return -1, -1, 0, fmt.Errorf("offset %v and count %v do not match the rank of shape %v", offset, count, d.shape)
	}
	for i := range d.shape {
		if offset[i] < 0 || count[i] < 0 || offset[i]+count[i] > d.shape[i] {
			return -1, -1, 0, fmt.Errorf("block at %v of size %v outside shape %v", offset, count, d.shape)
		}
	}
	n = product(count)
	fspace = C.H5Dget_space(d.id)
	if fspace < 0 {
		return -1, -1, 0, stackError()
	}
	if len(d.shape) > 0 {
		st, ct := hsizes(offset), hsizes(count)
		if C.H5Sselect_hyperslab(fspace, C.H5S_SELECT_SET, &st[0], nil, &ct[0], nil) < 0 {
			C.H5Sclose(fspace)
			return -1, -1, 0, stackError()
		}
	}
	mspace = makeSpace(count)
	if mspace < 0 {
		C.H5Sclose(fspace)
		return -1, -1, 0, stackError()
	}
	return fspace, mspace, n, nil
}

// WriteAt writes the block of the given count (size per dimension) at offset
// into the dataset; data is a []float64, []int8, []int32 or []complex128 of
// the dataset's type, row-major, of length product(count). For a scalar
// dataset offset and count are empty.
func (d *Dataset) WriteAt(offset, count []int, data any) error {
	lock()
	defer unlock()
	const op = "write"
	if d.id < 0 {
		return d.f.err(op, d.path, ErrClosed)
	}
	if err := d.f.checkWritable(op, d.path); err != nil {
		return err
	}
	dt, ptr, n := elemOf(data)
	if dt != d.dtype || dt == Unknown {
		return d.f.err(op, d.path, fmt.Errorf("%w: %T data for a %s dataset", ErrType, data, d.typeName))
	}
	fspace, mspace, want, err := d.selection(offset, count)
	if err != nil {
		return d.f.err(op, d.path, err)
	}
	defer C.H5Sclose(fspace)
	defer C.H5Sclose(mspace)
	if n != want {
		return d.f.err(op, d.path, fmt.Errorf("%d values for a block of %v", n, count))
	}
	if n == 0 {
		return nil
	}
	mtype, own := memType(dt)
	if mtype < 0 {
		return d.f.err(op, d.path, stackError())
	}
	if own {
		defer C.H5Tclose(mtype)
	}
	if r, cerr := C.H5Dwrite(d.id, mtype, mspace, fspace, C.H5P_DEFAULT, ptr); r < 0 {
		return d.f.err(op, d.path, stackErrno(cerr))
	}
	return nil
}

// readable reports whether Go elements of type want can hold the dataset's
// values without loss: float64 from floats and integers up to 32 bits, int32 from
// signed integers up to 32 bits, complex128 from any {r, i} float compound,
// int8 only from int8.
func (d *Dataset) readable(want DType) bool {
	if want == d.dtype && want != Unknown {
		return true
	}
	t := C.H5Dget_type(d.id)
	if t < 0 {
		C.H5Eclear2(C.H5E_DEFAULT)
		return false
	}
	defer C.H5Tclose(t)
	cls, size := C.H5Tget_class(t), int(C.H5Tget_size(t))
	switch want {
	case Float64:
		return cls == C.H5T_FLOAT || (cls == C.H5T_INTEGER && size <= 4)
	case Int32:
		return cls == C.H5T_INTEGER && (size < 4 || (size == 4 && C.H5Tget_sign(t) == C.H5T_SGN_2))
	case Complex128:
		return isComplex(t) // e.g. complex64: {r float32, i float32}
	}
	return false
}

// ReadAt reads the block of the given count at offset into dst, a
// []float64, []int8, []int32 or []complex128 of length product(count) (see
// readable for the conversions allowed).
func (d *Dataset) ReadAt(offset, count []int, dst any) error {
	lock()
	defer unlock()
	return d.readAtLocked(offset, count, dst)
}

func (d *Dataset) readAtLocked(offset, count []int, dst any) error {
	const op = "read"
	if d.id < 0 {
		return d.f.err(op, d.path, ErrClosed)
	}
	dt, ptr, n := elemOf(dst)
	if dt == Unknown || !d.readable(dt) {
		return d.f.err(op, d.path, fmt.Errorf("%w: cannot read a %s dataset into %T", ErrType, d.typeName, dst))
	}
	fspace, mspace, want, err := d.selection(offset, count)
	if err != nil {
		return d.f.err(op, d.path, err)
	}
	defer C.H5Sclose(fspace)
	defer C.H5Sclose(mspace)
	if n != want {
		return d.f.err(op, d.path, fmt.Errorf("buffer of %d for a block of %v", n, count))
	}
	if n == 0 {
		return nil
	}
	mtype, own := memType(dt)
	if mtype < 0 {
		return d.f.err(op, d.path, stackError())
	}
	if own {
		defer C.H5Tclose(mtype)
	}
	if C.H5Dread(d.id, mtype, mspace, fspace, C.H5P_DEFAULT, ptr) < 0 {
		return d.f.err(op, d.path, stackError())
	}
	return nil
}

// writeWhole creates the dataset at p and writes data (a slice of a
// supported type) into it. Storage: contiguous below ChunkThreshold bytes,
// else chunked (about ChunkBytes per chunk) with shuffle + deflate. A nil
// shape means one dimension of len(data); an empty non-nil shape a scalar.
func (f *File) writeWhole(p string, data any, shape []int, m Meta) error {
	lock()
	defer unlock()
	p = clean(p)
	const op = "write dataset"
	dt, ptr, n := elemOf(data)
	if shape == nil {
		shape = []int{n}
	}
	if product(shape) != n {
		return f.err(op, p, fmt.Errorf("%d values do not fill shape %v", n, shape))
	}
	compress := n*dt.size() >= ChunkThreshold && len(shape) > 0
	id, err := f.createLocked(op, p, dt, shape, m, nil, compress, nil, false)
	if err != nil {
		return err
	}
	defer C.H5Dclose(id)
	if n == 0 {
		return nil
	}
	mtype, own := memType(dt)
	if mtype < 0 {
		return f.err(op, p, stackError())
	}
	if own {
		defer C.H5Tclose(mtype)
	}
	if r, cerr := C.H5Dwrite(id, mtype, C.H5S_ALL, C.H5S_ALL, C.H5P_DEFAULT, ptr); r < 0 {
		return f.err(op, p, stackErrno(cerr))
	}
	return nil
}

// WriteFloat64s writes data, row-major with the given shape (nil: 1-D), as
// a new float64 dataset at path p with the units and description of m.
func (f *File) WriteFloat64s(p string, data []float64, shape []int, m Meta) error {
	return f.writeWhole(p, data, shape, m)
}

// WriteInt8s writes data as a new int8 dataset (see WriteFloat64s).
func (f *File) WriteInt8s(p string, data []int8, shape []int, m Meta) error {
	return f.writeWhole(p, data, shape, m)
}

// WriteInt32s writes data as a new int32 dataset (see WriteFloat64s).
func (f *File) WriteInt32s(p string, data []int32, shape []int, m Meta) error {
	return f.writeWhole(p, data, shape, m)
}

// WriteComplex128s writes data as a new dataset of the compound
// {r float64, i float64} (see WriteFloat64s).
func (f *File) WriteComplex128s(p string, data []complex128, shape []int, m Meta) error {
	return f.writeWhole(p, data, shape, m)
}

// readWhole opens the dataset at p and reads all of it into a new slice
// made by mk.
func readWhole[T any](f *File, p string) ([]T, []int, error) {
	lock()
	defer unlock()
	d, err := f.openDatasetLocked("read", clean(p))
	if err != nil {
		return nil, nil, err
	}
	defer d.closeLocked()
	out := make([]T, product(d.shape))
	off := make([]int, len(d.shape))
	if err := d.readAtLocked(off, d.shape, out); err != nil {
		return nil, nil, err
	}
	return out, d.Shape(), nil
}

// ReadFloat64s reads the whole dataset at p (float, or integer up to 32 bits) as
// float64, with its shape.
func (f *File) ReadFloat64s(p string) ([]float64, []int, error) { return readWhole[float64](f, p) }

// ReadInt8s reads the whole int8 dataset at p with its shape.
func (f *File) ReadInt8s(p string) ([]int8, []int, error) { return readWhole[int8](f, p) }

// ReadInt32s reads the whole dataset at p (signed integers up to 32 bits,
// unsigned up to 16) as int32, with its shape.
func (f *File) ReadInt32s(p string) ([]int32, []int, error) { return readWhole[int32](f, p) }

// ReadComplex128s reads the whole complex dataset at p (a compound of two
// float members r and i, e.g. complex64 written by h5py) with its shape.
func (f *File) ReadComplex128s(p string) ([]complex128, []int, error) {
	return readWhole[complex128](f, p)
}

// DatasetInfo describes a dataset's type and storage.
type DatasetInfo struct {
	Path     string
	Type     DType  // Unknown for types this package does not write
	TypeName string // e.g. "float64", "complex128", "uint16", "string"
	Shape    []int  // empty for a scalar
	Layout   string // "contiguous", "chunked", "compact" or "virtual"
	Chunk    []int  // chunk shape if chunked
	Filters  []string
}

// Info describes the dataset at path p.
func (f *File) Info(p string) (DatasetInfo, error) {
	lock()
	defer unlock()
	const op = "describe"
	d, err := f.openDatasetLocked(op, clean(p))
	if err != nil {
		return DatasetInfo{}, err
	}
	defer d.closeLocked()
	info := DatasetInfo{Path: d.path, Type: d.dtype, TypeName: d.typeName, Shape: d.Shape()}
	dcpl := C.H5Dget_create_plist(d.id)
	if dcpl < 0 {
		return info, f.err(op, d.path, stackError())
	}
	defer C.H5Pclose(dcpl)
	switch C.H5Pget_layout(dcpl) {
	case C.H5D_CONTIGUOUS:
		info.Layout = "contiguous"
	case C.H5D_COMPACT:
		info.Layout = "compact"
	case C.H5D_VIRTUAL:
		info.Layout = "virtual"
	case C.H5D_CHUNKED:
		info.Layout = "chunked"
		rank := len(d.shape)
		cd := make([]C.hsize_t, rank+1)
		if C.H5Pget_chunk(dcpl, C.int(rank), &cd[0]) < 0 {
			return info, f.err(op, d.path, stackError())
		}
		info.Chunk = make([]int, rank)
		for i := range info.Chunk {
			info.Chunk[i] = int(cd[i])
		}
	default:
		return info, f.err(op, d.path, stackError())
	}
	nf := int(C.H5Pget_nfilters(dcpl))
	for i := 0; i < nf; i++ {
		var flags, config C.uint
		var nelm C.size_t
		var name [64]C.char
		if C.H5Pget_filter2(dcpl, C.uint(i), &flags, &nelm, nil, C.size_t(len(name)), &name[0], &config) < 0 {
			return info, f.err(op, d.path, stackError())
		}
		info.Filters = append(info.Filters, C.GoString(&name[0]))
	}
	return info, nil
}
