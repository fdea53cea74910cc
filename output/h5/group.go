package h5

/*
#include <stdlib.h>
#include "shim.h"
*/
import "C"

import (
	"errors"
	"fmt"
	"path"
	"strings"
)

// Kind is the kind of an object in a file.
type Kind int

const (
	KindOther   Kind = iota // soft/external link, named datatype, or unknown
	KindGroup               // group
	KindDataset             // dataset
)

func (k Kind) String() string {
	switch k {
	case KindGroup:
		return "group"
	case KindDataset:
		return "dataset"
	}
	return "other"
}

// Entry is one member of a group.
type Entry struct {
	Name string // link name within the group
	Kind Kind
}

// clean makes p an absolute, cleaned object path.
func clean(p string) string {
	return path.Clean("/" + p)
}

// checkWritable reports ErrClosed or ErrReadOnly.
func (f *File) checkWritable(op, p string) error {
	if f.id < 0 {
		return f.err(op, p, ErrClosed)
	}
	if f.mode == modeRead {
		return f.err(op, p, ErrReadOnly)
	}
	return nil
}

// kindLocked returns the kind of the object at absolute path p, or an error
// wrapping ErrNotFound if some component of p does not exist. Soft and
// external links are not followed (their kind is KindOther).
func (f *File) kindLocked(op, p string) (Kind, error) {
	if f.id < 0 {
		return 0, f.err(op, p, ErrClosed)
	}
	if p == "/" {
		return KindGroup, nil
	}
	parts := strings.Split(p[1:], "/")
	cur := ""
	for i, part := range parts {
		cur += "/" + part
		cs := cstr(cur)
		r := C.H5Lexists(f.id, cs, C.H5P_DEFAULT)
		if r < 0 {
			cfree(cs)
			return 0, f.err(op, p, stackError())
		}
		if r == 0 {
			cfree(cs)
			return 0, f.err(op, p, ErrNotFound)
		}
		var li C.H5L_info_t
		if C.H5Lget_info(f.id, cs, &li, C.H5P_DEFAULT) < 0 {
			cfree(cs)
			return 0, f.err(op, p, stackError())
		}
		if li._type != C.H5L_TYPE_HARD {
			cfree(cs)
			if i == len(parts)-1 {
				return KindOther, nil
			}
			return 0, f.err(op, p, fmt.Errorf("%w (%s is a soft or external link)", ErrNotFound, cur))
		}
		var oi C.H5O_info_t
		r2 := C.H5Oget_info_by_name2(f.id, cs, &oi, C.H5O_INFO_BASIC, C.H5P_DEFAULT)
		cfree(cs)
		if r2 < 0 {
			return 0, f.err(op, p, stackError())
		}
		k := KindOther
		switch oi._type {
		case C.H5O_TYPE_GROUP:
			k = KindGroup
		case C.H5O_TYPE_DATASET:
			k = KindDataset
		}
		if i == len(parts)-1 {
			return k, nil
		}
		if k != KindGroup {
			return 0, f.err(op, p, fmt.Errorf("%w (%s is not a group)", ErrNotFound, cur))
		}
	}
	return KindGroup, nil
}

// Kind returns the kind of the object at path p; an error wrapping
// ErrNotFound if there is none.
func (f *File) Kind(p string) (Kind, error) {
	lock()
	defer unlock()
	return f.kindLocked("stat", clean(p))
}

// Exists reports whether an object exists at path p.
func (f *File) Exists(p string) (bool, error) {
	lock()
	defer unlock()
	_, err := f.kindLocked("stat", clean(p))
	if err == nil {
		return true, nil
	}
	if errors.Is(err, ErrNotFound) {
		return false, nil
	}
	return false, err
}

// CreateGroup creates the group at path p together with any missing parent
// groups. An existing group is not an error (like mkdir -p); an existing
// object of another kind is.
func (f *File) CreateGroup(p string) error {
	lock()
	defer unlock()
	p = clean(p)
	if err := f.checkWritable("create group", p); err != nil {
		return err
	}
	k, err := f.kindLocked("create group", p)
	if err == nil {
		if k == KindGroup {
			return nil
		}
		return f.err("create group", p, fmt.Errorf("a %s exists at this path", k))
	}
	lcpl := C.sm_lcpl()
	if lcpl < 0 {
		return f.err("create group", p, stackError())
	}
	defer C.H5Pclose(lcpl)
	cs := cstr(p)
	defer cfree(cs)
	g := C.H5Gcreate2(f.id, cs, lcpl, C.H5P_DEFAULT, C.H5P_DEFAULT)
	if g < 0 {
		return f.err("create group", p, stackError())
	}
	if C.H5Gclose(g) < 0 {
		return f.err("create group", p, stackError())
	}
	return nil
}

// List returns the members of the group at path p in name order.
func (f *File) List(p string) ([]Entry, error) {
	lock()
	defer unlock()
	p = clean(p)
	const op = "list"
	k, err := f.kindLocked(op, p)
	if err != nil {
		return nil, err
	}
	if k != KindGroup {
		return nil, f.err(op, p, fmt.Errorf("%w: not a group", ErrType))
	}
	cs := cstr(p)
	defer cfree(cs)
	g := C.H5Gopen2(f.id, cs, C.H5P_DEFAULT)
	if g < 0 {
		return nil, f.err(op, p, stackError())
	}
	defer C.H5Gclose(g)
	var gi C.H5G_info_t
	if C.H5Gget_info(g, &gi) < 0 {
		return nil, f.err(op, p, stackError())
	}
	dot := cstr(".")
	defer cfree(dot)
	out := make([]Entry, 0, int(gi.nlinks))
	for i := C.hsize_t(0); i < gi.nlinks; i++ {
		n := C.H5Lget_name_by_idx(g, dot, C.H5_INDEX_NAME, C.H5_ITER_INC, i, nil, 0, C.H5P_DEFAULT)
		if n < 0 {
			return nil, f.err(op, p, stackError())
		}
		buf := make([]C.char, int(n)+1)
		if C.H5Lget_name_by_idx(g, dot, C.H5_INDEX_NAME, C.H5_ITER_INC, i, &buf[0], C.size_t(n+1), C.H5P_DEFAULT) < 0 {
			return nil, f.err(op, p, stackError())
		}
		name := C.GoString(&buf[0])
		child := path.Join(p, name)
		ck, err := f.kindLocked(op, child)
		if err != nil {
			return nil, err
		}
		out = append(out, Entry{Name: name, Kind: ck})
	}
	return out, nil
}

// openObject opens the group or dataset at absolute path p (H5Oopen); the
// caller closes it with H5Oclose.
func (f *File) openObject(op, p string) (C.hid_t, error) {
	if _, err := f.kindLocked(op, p); err != nil {
		return -1, err
	}
	cs := cstr(p)
	defer cfree(cs)
	id := C.H5Oopen(f.id, cs, C.H5P_DEFAULT)
	if id < 0 {
		return -1, f.err(op, p, stackError())
	}
	return id, nil
}
