package h5

/*
#include <stdlib.h>
#include "shim.h"
*/
import "C"

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"syscall"

	"socmap/output/internal/atomicfile"
)

type fileMode int

const (
	modeRead fileMode = iota
	modeRW
	modeCreate
)

// File is an open HDF5 file. Its methods may be called from several
// goroutines; calls are serialised by the package lock.
type File struct {
	id    C.hid_t
	name  string // final file name as given by the caller
	tmp   string // temporary file name while being created
	force bool
	mode  fileMode
	dsets map[*Dataset]struct{}
}

// Name returns the file name as given to Create, Open or OpenRW.
func (f *File) Name() string { return f.name }

func (f *File) err(op, path string, cause error) error {
	return &Error{Op: op, File: f.name, Path: path, Err: cause}
}

// Create starts a new HDF5 file that will appear under name only when Close
// succeeds. The data are written to a temporary file in the same directory
// (".name.*.tmp"), which Close renames to name and Abort removes. If name
// exists already, Create fails with an error wrapping ErrExist unless force
// is set; the check is repeated at Close, where without force an existing
// file is never replaced.
func Create(name string, force bool) (*File, error) {
	if initErr != nil {
		return nil, initErr
	}
	fail := func(cause error) error { return &Error{Op: "create", File: name, Err: cause} }
	if !force {
		if _, err := os.Lstat(name); err == nil {
			return nil, fail(ErrExist)
		}
	}
	dir, base := filepath.Split(name)
	if dir == "" {
		dir = "."
	}
	tf, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return nil, fail(osCause(err))
	}
	tmp := tf.Name()
	tf.Close()

	lock()
	defer unlock()
	cs := cstr(tmp)
	defer cfree(cs)
	id := C.sm_fcreate(cs)
	if id < 0 {
		err := stackError()
		os.Remove(tmp)
		return nil, fail(err)
	}
	return &File{id: id, name: name, tmp: tmp, force: force, mode: modeCreate,
		dsets: map[*Dataset]struct{}{}}, nil
}

// osCause strips the wrapper whose path is a temporary name and keeps the
// errno, which still matches fs.ErrPermission etc.
func osCause(err error) error { return atomicfile.Pathless(err) }

// Open opens an existing HDF5 file read-only. A file that is not HDF5, or is
// truncated or damaged, gives an error wrapping ErrFormat.
func Open(name string) (*File, error) { return open(name, false) }

// OpenRW opens an existing HDF5 file for reading and writing in place, to
// resume an interrupted sweep. See the package documentation for the write
// protocol that survives a killed process.
func OpenRW(name string) (*File, error) { return open(name, true) }

func open(name string, rw bool) (*File, error) {
	if initErr != nil {
		return nil, initErr
	}
	op := "open"
	flag := os.O_RDONLY
	if rw {
		op, flag = "open for writing", os.O_RDWR
	}
	fail := func(cause error) error { return &Error{Op: op, File: name, Err: cause} }
	if st, err := os.Stat(name); err == nil && st.IsDir() {
		return nil, fail(fmt.Errorf("%w: is a directory", ErrFormat))
	}
	// Let the OS report missing files and permissions in its own words.
	of, err := os.OpenFile(name, flag, 0)
	if err != nil {
		return nil, fail(osCause(err))
	}
	st, err := of.Stat()
	of.Close()
	if err != nil {
		return nil, fail(osCause(err))
	}
	if st.IsDir() {
		return nil, fail(fmt.Errorf("%w: is a directory", ErrFormat))
	}

	if err := checkGlobalHeaps(name); err != nil {
		return nil, fail(err)
	}
	lock()
	defer unlock()
	cs := cstr(name)
	defer cfree(cs)
	switch r := C.H5Fis_hdf5(cs); {
	case r == 0:
		return nil, fail(fmt.Errorf("%w: no HDF5 signature (not an HDF5 file)", ErrFormat))
	case r < 0:
		err := stackError()
		if errors.Is(err, ErrLocked) {
			return nil, fail(err)
		}
		return nil, fail(fmt.Errorf("%w: %v", ErrFormat, err))
	}
	var irw C.int
	if rw {
		irw = 1
	}
	id := C.sm_fopen(cs, irw)
	if id < 0 {
		err := stackError()
		if errors.Is(err, ErrLocked) {
			return nil, fail(err)
		}
		return nil, fail(fmt.Errorf("%w: truncated or damaged: %v", ErrFormat, err))
	}
	m := modeRead
	if rw {
		m = modeRW
	}
	return &File{id: id, name: name, mode: m, dsets: map[*Dataset]struct{}{}}, nil
}

// closeLocked closes the open datasets and the HDF5 file identifier.
func (f *File) closeLocked() error {
	for d := range f.dsets {
		d.closeLocked()
	}
	var err error
	if r, cerr := C.H5Fclose(f.id); r < 0 {
		err = stackErrno(cerr)
	}
	f.id = -1
	return err
}

// Close closes the file. For a file from Create it closes the temporary
// file, fsyncs it and renames it to the final name (without force an
// existing file is never replaced); on any failure the temporary file is
// removed and nothing appears under the final name. Closing also closes any
// Dataset still open. Close on a closed file returns an error wrapping
// ErrClosed.
func (f *File) Close() error {
	lock()
	if f.id < 0 {
		unlock()
		return f.err("close", "", ErrClosed)
	}
	err := f.closeLocked()
	unlock()
	if f.mode != modeCreate {
		if err != nil {
			return f.err("close", "", err)
		}
		return nil
	}
	tmp := f.tmp
	f.tmp = ""
	if err == nil {
		err = atomicfile.Commit(tmp, f.name, f.force)
	}
	if err != nil {
		os.Remove(tmp)
		return f.err("close", "", err)
	}
	return nil
}

// Abort closes the file without keeping it: a file from Create is removed
// (nothing appears under the final name). For a file from OpenRW, Abort is
// Close: what was written stays written.
func (f *File) Abort() error {
	lock()
	if f.id < 0 {
		unlock()
		return f.err("abort", "", ErrClosed)
	}
	err := f.closeLocked()
	unlock()
	if f.mode == modeCreate {
		rerr := os.Remove(f.tmp)
		f.tmp = ""
		if rerr != nil {
			return f.err("abort", "", osCause(rerr))
		}
		return nil // a close error does not matter: the file is gone
	}
	if err != nil {
		return f.err("abort", "", err)
	}
	return nil
}

// Flush writes HDF5's buffers for the whole file to the operating system
// (H5Fflush, global scope). Data flushed survive the process being killed.
func (f *File) Flush() error {
	lock()
	defer unlock()
	return f.flushLocked()
}

func (f *File) flushLocked() error {
	if f.id < 0 {
		return f.err("flush", "", ErrClosed)
	}
	if f.mode == modeRead {
		return nil
	}
	if r, cerr := C.H5Fflush(f.id, C.H5F_SCOPE_GLOBAL); r < 0 {
		return f.err("flush", "", stackErrno(cerr))
	}
	return nil
}

// Sync is Flush followed by fsync of the file descriptor, so that the data
// also survive a crash of the machine.
func (f *File) Sync() error {
	lock()
	defer unlock()
	if err := f.flushLocked(); err != nil || f.mode == modeRead {
		return err
	}
	fd := C.sm_fd(f.id)
	if fd < 0 {
		return f.err("sync", "", stackError())
	}
	if err := syscall.Fsync(int(fd)); err != nil {
		return f.err("sync", "", err)
	}
	return nil
}
