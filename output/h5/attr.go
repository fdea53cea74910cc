package h5

/*
#include <stdlib.h>
#include "shim.h"
*/
import "C"

import (
	"fmt"
	"strings"
	"unicode/utf8"
	"unsafe"
)

// Attr is a named attribute value. Values written may be string (valid
// UTF-8 without NUL bytes, stored as a variable-length UTF-8 string), float64,
// int64, int (stored as int64), []float64 or []int64. Values read back are
// string, float64, int64, []string, []float64, []int64 (integers of any
// HDF5 width are read as int64, floats as float64, a scalar dataspace gives
// a scalar, a simple one a slice), or Unsupported for other types.
type Attr struct {
	Name  string
	Value any
}

// Unsupported is the value read for an attribute of a type this package
// does not convert; it holds a description of the HDF5 type.
type Unsupported string

// SetAttr sets the attribute name on the object (group or dataset) at path
// obj; "/" is the file's root group, which holds the file attributes. An
// existing attribute of that name is replaced.
func (f *File) SetAttr(obj, name string, value any) error {
	lock()
	defer unlock()
	obj = clean(obj)
	if err := f.checkWritable("set attribute", obj); err != nil {
		return err
	}
	id, err := f.openObject("set attribute", obj)
	if err != nil {
		return err
	}
	defer C.H5Oclose(id)
	if err := setAttr(id, name, value); err != nil {
		return f.err("set attribute", obj+"@"+name, err)
	}
	return nil
}

// SetAttrs sets several attributes on the object at path obj.
func (f *File) SetAttrs(obj string, attrs ...Attr) error {
	for _, a := range attrs {
		if err := f.SetAttr(obj, a.Name, a.Value); err != nil {
			return err
		}
	}
	return nil
}

// setAttr writes one attribute on the open object id (lock held).
func setAttr(id C.hid_t, name string, value any) error {
	var (
		ftype, mtype C.hid_t
		owned        bool // ftype/mtype must be closed
		dims         []C.hsize_t
		scalar       = true
		buf          unsafe.Pointer
		keep         any // keeps Go memory referenced by buf alive
	)
	switch v := value.(type) {
	case string:
		if !utf8.ValidString(v) || strings.IndexByte(v, 0) >= 0 {
			return fmt.Errorf("%w: string attribute must be valid UTF-8 without NUL bytes", ErrType)
		}
		ftype = C.sm_vlen_string()
		if ftype < 0 {
			return stackError()
		}
		mtype, owned = ftype, true
		cs := C.CString(v)
		defer C.free(unsafe.Pointer(cs))
		p := new(*C.char)
		*p = cs
		buf = unsafe.Pointer(p)
	case float64:
		ftype, mtype = C.sm_type(C.SM_IEEE_F64LE), C.sm_type(C.SM_NATIVE_DOUBLE)
		buf = unsafe.Pointer(&v)
	case int64:
		ftype, mtype = C.sm_type(C.SM_STD_I64LE), C.sm_type(C.SM_NATIVE_INT64)
		buf = unsafe.Pointer(&v)
	case int:
		w := int64(v)
		ftype, mtype = C.sm_type(C.SM_STD_I64LE), C.sm_type(C.SM_NATIVE_INT64)
		buf = unsafe.Pointer(&w)
	case []float64:
		ftype, mtype = C.sm_type(C.SM_IEEE_F64LE), C.sm_type(C.SM_NATIVE_DOUBLE)
		scalar, dims = false, []C.hsize_t{C.hsize_t(len(v))}
		if len(v) == 0 {
			v = make([]float64, 1)
		}
		buf, keep = unsafe.Pointer(&v[0]), v
	case []int64:
		ftype, mtype = C.sm_type(C.SM_STD_I64LE), C.sm_type(C.SM_NATIVE_INT64)
		scalar, dims = false, []C.hsize_t{C.hsize_t(len(v))}
		if len(v) == 0 {
			v = make([]int64, 1)
		}
		buf, keep = unsafe.Pointer(&v[0]), v
	default:
		return fmt.Errorf("%w: attribute value of Go type %T (want string, float64, int64, int, []float64 or []int64)", ErrType, value)
	}
	_ = keep
	if owned {
		defer C.H5Tclose(ftype)
	}
	var space C.hid_t
	if scalar {
		space = C.H5Screate(C.H5S_SCALAR)
	} else {
		space = C.H5Screate_simple(1, &dims[0], nil)
	}
	if space < 0 {
		return stackError()
	}
	defer C.H5Sclose(space)
	cn := cstr(name)
	defer cfree(cn)
	dot := cstr(".")
	defer cfree(dot)
	switch r := C.H5Aexists(id, cn); {
	case r < 0:
		return stackError()
	case r > 0:
		if C.H5Adelete(id, cn) < 0 {
			return stackError()
		}
	}
	a := C.H5Acreate2(id, cn, ftype, space, C.H5P_DEFAULT, C.H5P_DEFAULT)
	if a < 0 {
		return stackError()
	}
	if C.H5Awrite(a, mtype, buf) < 0 {
		err := stackError()
		C.H5Aclose(a)
		return err
	}
	if C.H5Aclose(a) < 0 {
		return stackError()
	}
	return nil
}

// GetAttr reads the attribute name of the object at path obj.
func (f *File) GetAttr(obj, name string) (any, error) {
	lock()
	defer unlock()
	obj = clean(obj)
	id, err := f.openObject("read attribute", obj)
	if err != nil {
		return nil, err
	}
	defer C.H5Oclose(id)
	cn := cstr(name)
	defer cfree(cn)
	switch r := C.H5Aexists(id, cn); {
	case r < 0:
		return nil, f.err("read attribute", obj+"@"+name, stackError())
	case r == 0:
		return nil, f.err("read attribute", obj+"@"+name, ErrNotFound)
	}
	v, err := readAttr(id, name)
	if err != nil {
		return nil, f.err("read attribute", obj+"@"+name, err)
	}
	return v, nil
}

// AttrString reads a string attribute.
func (f *File) AttrString(obj, name string) (string, error) {
	v, err := f.GetAttr(obj, name)
	if err != nil {
		return "", err
	}
	s, ok := v.(string)
	if !ok {
		return "", f.err("read attribute", clean(obj)+"@"+name, fmt.Errorf("%w: %T, not a string", ErrType, v))
	}
	return s, nil
}

// AttrFloat64 reads a scalar numeric attribute as float64.
func (f *File) AttrFloat64(obj, name string) (float64, error) {
	v, err := f.GetAttr(obj, name)
	if err != nil {
		return 0, err
	}
	switch x := v.(type) {
	case float64:
		return x, nil
	case int64:
		return float64(x), nil
	}
	return 0, f.err("read attribute", clean(obj)+"@"+name, fmt.Errorf("%w: %T, not a number", ErrType, v))
}

// AttrInt64 reads a scalar integer attribute.
func (f *File) AttrInt64(obj, name string) (int64, error) {
	v, err := f.GetAttr(obj, name)
	if err != nil {
		return 0, err
	}
	x, ok := v.(int64)
	if !ok {
		return 0, f.err("read attribute", clean(obj)+"@"+name, fmt.Errorf("%w: %T, not an integer", ErrType, v))
	}
	return x, nil
}

// AttrFloat64s reads a numeric array attribute as []float64.
func (f *File) AttrFloat64s(obj, name string) ([]float64, error) {
	v, err := f.GetAttr(obj, name)
	if err != nil {
		return nil, err
	}
	switch x := v.(type) {
	case []float64:
		return x, nil
	case []int64:
		out := make([]float64, len(x))
		for i, n := range x {
			out[i] = float64(n)
		}
		return out, nil
	}
	return nil, f.err("read attribute", clean(obj)+"@"+name, fmt.Errorf("%w: %T, not a numeric array", ErrType, v))
}

// Attrs returns all attributes of the object at path obj in name order.
func (f *File) Attrs(obj string) ([]Attr, error) {
	lock()
	defer unlock()
	obj = clean(obj)
	const op = "read attributes"
	id, err := f.openObject(op, obj)
	if err != nil {
		return nil, err
	}
	defer C.H5Oclose(id)
	var oi C.H5O_info_t
	if C.H5Oget_info2(id, &oi, C.H5O_INFO_NUM_ATTRS) < 0 {
		return nil, f.err(op, obj, stackError())
	}
	dot := cstr(".")
	defer cfree(dot)
	out := make([]Attr, 0, int(oi.num_attrs))
	for i := C.hsize_t(0); i < oi.num_attrs; i++ {
		n := C.H5Aget_name_by_idx(id, dot, C.H5_INDEX_NAME, C.H5_ITER_INC, i, nil, 0, C.H5P_DEFAULT)
		if n < 0 {
			return nil, f.err(op, obj, stackError())
		}
		buf := make([]C.char, int(n)+1)
		if C.H5Aget_name_by_idx(id, dot, C.H5_INDEX_NAME, C.H5_ITER_INC, i, &buf[0], C.size_t(n+1), C.H5P_DEFAULT) < 0 {
			return nil, f.err(op, obj, stackError())
		}
		name := C.GoString(&buf[0])
		v, err := readAttr(id, name)
		if err != nil {
			return nil, f.err(op, obj+"@"+name, err)
		}
		out = append(out, Attr{Name: name, Value: v})
	}
	return out, nil
}

// readAttr reads attribute name of the open object id (lock held).
func readAttr(id C.hid_t, name string) (any, error) {
	cn := cstr(name)
	defer cfree(cn)
	a := C.H5Aopen(id, cn, C.H5P_DEFAULT)
	if a < 0 {
		return nil, stackError()
	}
	defer C.H5Aclose(a)
	space := C.H5Aget_space(a)
	if space < 0 {
		return nil, stackError()
	}
	defer C.H5Sclose(space)
	ftype := C.H5Aget_type(a)
	if ftype < 0 {
		return nil, stackError()
	}
	defer C.H5Tclose(ftype)
	scalar := C.H5Sget_simple_extent_type(space) == C.H5S_SCALAR
	np := C.H5Sget_simple_extent_npoints(space)
	if np < 0 {
		return nil, stackError()
	}
	n := int(np)
	// A damaged file can declare more data than the attribute stores, and
	// libhdf5 1.10 then reads past its own buffer (found by
	// FuzzDamagedMapFile): check the stored size of fixed-size data first.
	// A variable-length element is stored as its length and a global-heap
	// ID (4 + address size + 4 bytes, at least 12).
	stored := uint64(C.H5Aget_storage_size(a))
	if C.H5Tis_variable_str(ftype) > 0 {
		if want := uint64(n) * 12; stored < want {
			return nil, fmt.Errorf("%w: attribute %q stores %d bytes, %d strings need at least %d", ErrFormat, name, stored, n, want)
		}
	} else if want := uint64(n) * uint64(C.H5Tget_size(ftype)); stored != want {
		return nil, fmt.Errorf("%w: attribute %q stores %d bytes, its type and shape need %d", ErrFormat, name, stored, want)
	}
	switch C.H5Tget_class(ftype) {
	case C.H5T_STRING:
		strs, err := readStrings(a, ftype, n)
		if err != nil {
			return nil, err
		}
		if scalar && len(strs) == 1 {
			return strs[0], nil
		}
		return strs, nil
	case C.H5T_INTEGER:
		v := make([]int64, n+1) // +1: never pass a nil buffer
		if C.H5Aread(a, C.sm_type(C.SM_NATIVE_INT64), unsafe.Pointer(&v[0])) < 0 {
			return nil, stackError()
		}
		if scalar {
			return v[0], nil
		}
		return v[:n], nil
	case C.H5T_FLOAT:
		v := make([]float64, n+1)
		if C.H5Aread(a, C.sm_type(C.SM_NATIVE_DOUBLE), unsafe.Pointer(&v[0])) < 0 {
			return nil, stackError()
		}
		if scalar {
			return v[0], nil
		}
		return v[:n], nil
	}
	return Unsupported(typeName(ftype)), nil
}

// readStrings reads n strings (fixed or variable length) from attribute a.
func readStrings(a, ftype C.hid_t, n int) ([]string, error) {
	mtype := C.H5Tcopy(ftype)
	if mtype < 0 {
		return nil, stackError()
	}
	defer C.H5Tclose(mtype)
	out := make([]string, n)
	if C.H5Tis_variable_str(ftype) > 0 {
		ptrs := (**C.char)(C.calloc(C.size_t(n+1), C.size_t(unsafe.Sizeof((*C.char)(nil)))))
		defer C.free(unsafe.Pointer(ptrs))
		if C.H5Aread(a, mtype, unsafe.Pointer(ptrs)) < 0 {
			return nil, stackError()
		}
		s := unsafe.Slice(ptrs, n)
		for i, p := range s {
			if p != nil {
				out[i] = C.GoString(p)
				C.H5free_memory(unsafe.Pointer(p))
			}
		}
		return out, nil
	}
	size := int(C.H5Tget_size(ftype))
	if size <= 0 {
		return nil, stackError()
	}
	buf := make([]byte, n*size+1)
	if C.H5Aread(a, mtype, unsafe.Pointer(&buf[0])) < 0 {
		return nil, stackError()
	}
	for i := range out {
		s := string(buf[i*size : (i+1)*size])
		if j := strings.IndexByte(s, 0); j >= 0 {
			s = s[:j]
		}
		out[i] = strings.TrimRight(s, " ")
	}
	return out, nil
}
