// Package h5 is socmap's thin cgo layer over the HDF5 C library (Debian
// libhdf5 1.10, pkg-config name "hdf5"). It wraps only what socmap's result
// files need:
//
//   - files: Create writes under a temporary name in the target directory and
//     renames it to the final name on a successful Close (Abort, or a failed
//     Close, removes the temporary file); an existing file is refused unless
//     force is set. Open opens read-only, OpenRW read-write in place for
//     resumable sweeps;
//   - groups by path (intermediate groups are created as needed), listing;
//   - attributes on files (the root group), groups and datasets: string
//     (variable-length UTF-8, read by h5py as str), float64, int64, []float64,
//     []int64;
//   - datasets of float64, int8, int32 and complex128, N-dimensional, written
//     whole (chunked and deflate-compressed from ChunkThreshold bytes on) or
//     created empty and written by hyperslabs (Dataset.WriteAt/ReadAt).
//
// # Conventions
//
// Every dataset carries the attributes "units" and "description" (DESIGN.md
// §4); the dataset writers take a Meta and refuse an empty Units or
// Description. Complex numbers are stored as the compound {r float64,
// i float64}, which h5py and numpy read as complex128. Object paths are
// absolute ("/maps/energy"); a relative path is taken from the root.
//
// # Errors
//
// Every libhdf5 failure is returned as an *Error naming the operation, the
// file and the object path, with a one-line summary of HDF5's error stack.
// HDF5's automatic printing of the error stack to stderr is switched off.
// A file that is not HDF5, or is truncated or damaged, gives an error that
// wraps ErrFormat; a file that libhdf5 cannot lock (another process writes
// it) one that wraps ErrLocked, detected from the error stack's minor code
// H5E_CANTLOCKFILE, never from message text.
//
// # Resumable writing and crash safety
//
// A file opened with OpenRW is written in place; there is no copy. The
// protocol that survives SIGKILL at any instant is:
//
//  1. lay the file out completely with Create, CreateDataset (the default
//     storage: contiguous or uncompressed chunks, allocated and filled at
//     creation) and a "done" mask of zeros, then Close (the file appears
//     atomically under its final name);
//  2. open it with OpenRW and, per point: WriteAt the point's values, Flush,
//     WriteAt done=1, Flush.
//
// Because the storage of such datasets is allocated at creation, a point
// write changes raw data only, never HDF5 metadata, so a process killed at
// any moment leaves a valid file in which every point marked done holds its
// values. Flush hands the data to the operating system (enough for a killed
// process); Sync also fsyncs (needed against power loss). Compressed
// datasets relocate chunks when rewritten and are not crash-safe in this
// sense: use them for data written once. The whole-array writers
// (WriteFloat64s etc.) compress arrays of ChunkThreshold bytes or more, so a
// map to be resumed is laid out with CreateDataset.
//
// # Concurrency
//
// The Debian build of libhdf5 is thread-safe in the sense that it reports
// H5is_library_threadsafe and serialises every API call with one global lock,
// so parallel HDF5 calls gain nothing. This package never relies on that: all
// calls into libhdf5 are funnelled through one package-level mutex, and the
// calling goroutine is pinned to its OS thread while it holds the mutex
// (HDF5's error stack and its print setting are per thread). File and
// Dataset values may therefore be used from several goroutines, but calls are
// executed one at a time. ThreadSafe reports what the library said at init.
package h5

/*
#cgo pkg-config: hdf5
#include <stdlib.h>
#include "shim.h"
*/
import "C"

import (
	"errors"
	"fmt"
	"runtime"
	"sync"
	"syscall"
	"unsafe"

	"socmap/output/internal/atomicfile"
)

var (
	mu         sync.Mutex
	threadSafe bool
	initErr    error
	libVersion string
)

func init() {
	lock()
	defer unlock()
	if C.H5open() < 0 {
		initErr = errors.New("h5: cannot initialise the HDF5 library")
		return
	}
	var ts C.hbool_t
	if C.H5is_library_threadsafe(&ts) >= 0 {
		threadSafe = bool(ts)
	}
	var maj, min, rel C.uint
	if C.H5get_libversion(&maj, &min, &rel) >= 0 {
		libVersion = fmt.Sprintf("%d.%d.%d", maj, min, rel)
	}
}

// ThreadSafe reports whether the linked libhdf5 declared itself thread-safe
// (H5is_library_threadsafe). The package serialises all calls either way.
func ThreadSafe() bool { return threadSafe }

// LibVersion returns the version of the linked libhdf5, e.g. "1.10.8".
func LibVersion() string { return libVersion }

// lock acquires the package mutex, pins the goroutine to its OS thread and
// silences HDF5's error printing on that thread.
func lock() {
	mu.Lock()
	runtime.LockOSThread()
	C.sm_quiet()
}

func unlock() {
	runtime.UnlockOSThread()
	mu.Unlock()
}

// OpenObjects returns the number of HDF5 files, groups, datasets, datatypes
// and attributes currently open in the process (H5Fget_obj_count over all
// files). It is meant for leak tests and diagnostics.
func OpenObjects() int {
	lock()
	defer unlock()
	return int(C.sm_open_objects())
}

// idMarks brackets identifier numbers: one probe per kind (dataspace,
// datatype, property list), see sm_probe_id.
type idMarks [3]C.hid_t

func markIDs() (m idMarks) {
	lock()
	defer unlock()
	for k := range m {
		m[k] = C.sm_probe_id(C.int(k))
	}
	return m
}

// liveIDs counts the dataspaces, datatypes and property lists created
// between the two marks that are still open (for the leak test; libhdf5
// 1.10 has no public count of these, H5Fget_obj_count ignores them and
// H5Inmembers refuses library types).
func liveIDs(a, b idMarks) (spaces, types, plists int) {
	lock()
	defer unlock()
	n := func(k int) int { return int(C.sm_count_live(a[k], b[k])) }
	return n(0), n(1), n(2)
}

// leakDataspaces leaks n HDF5 dataspaces on purpose: the leak test uses it
// to prove that its measure would see a leak.
func leakDataspaces(n int) {
	lock()
	defer unlock()
	C.sm_leak_dataspaces(C.int(n))
}

// Sentinel errors, matched with errors.Is.
var (
	// ErrFormat: the file is not an HDF5 file, or it is truncated or damaged.
	ErrFormat = errors.New("not a readable HDF5 file")
	// ErrNotFound: no object at the given path.
	ErrNotFound = errors.New("no such object")
	// ErrType: the data or attribute has a type other than the one asked for.
	ErrType = errors.New("type mismatch")
	// ErrMeta: a dataset was written without units or description.
	ErrMeta = errors.New("dataset needs non-empty units and description")
	// ErrClosed: the file or dataset was already closed.
	ErrClosed = errors.New("already closed")
	// ErrReadOnly: a write was attempted on a file opened read-only.
	ErrReadOnly = errors.New("file opened read-only")
	// ErrLocked: libhdf5 could not lock the file (it locks every file it
	// opens; another process has it open for writing, or the file is open
	// for reading elsewhere and this open asks to write).
	ErrLocked = errors.New("file is locked by another process (HDF5 file lock)")
	// ErrWrite: writing to the file failed in the operating system (a full
	// disk, a quota, an I/O error); the error also wraps the errno when
	// known (errors.Is(err, syscall.ENOSPC)).
	ErrWrite = errors.New("writing the file failed")
)

// ErrExist is returned (wrapped) when Create would replace an existing file
// without force, or a dataset would replace an existing object. It also
// matches fs.ErrExist.
var ErrExist = atomicfile.ErrExist

// Error is the error type of every failing operation of the package.
type Error struct {
	Op   string // operation, e.g. "create dataset"
	File string // file name as given by the caller
	Path string // object path inside the file ("" for file-level operations)
	Err  error  // cause: a sentinel, an OS error, or HDF5's error-stack summary
}

func (e *Error) Error() string {
	s := "h5: " + e.Op + " " + e.File
	if e.Path != "" {
		s += ":" + e.Path
	}
	return s + ": " + e.Err.Error()
}

func (e *Error) Unwrap() error { return e.Err }

// stackError reads (and clears) the calling thread's HDF5 error stack.
// The caller holds the lock, so the stack belongs to the failed call.
// An error stack that holds HDF5's "unable to lock file" entry (minor
// error H5E_CANTLOCKFILE) gives an error wrapping ErrLocked.
func stackError() error { return stackErrno(nil) }

// stackErrno is stackError for a call that writes to the file; cerr is the
// errno cgo returned with the call. When the stack says that a write to the
// file itself failed, the error wraps ErrWrite and the operating system's
// cause (syscall.ENOSPC for a full disk, EDQUOT, EFBIG, EIO, …), so that it
// reads "writing the file failed: no space left on device" instead of
// HDF5's description of the failed call.
func stackErrno(cerr error) error {
	var buf [600]C.char
	flags := C.sm_errmsg(&buf[0], C.size_t(len(buf)))
	err := errors.New("hdf5: " + C.GoString(&buf[0]))
	if flags&1 != 0 {
		return fmt.Errorf("%w: %v", ErrLocked, err)
	}
	if flags&2 != 0 {
		var en syscall.Errno
		if errors.As(cerr, &en) && en != 0 {
			return fmt.Errorf("%w: %w", ErrWrite, en)
		}
		return fmt.Errorf("%w (%v)", ErrWrite, err)
	}
	return err
}

func cstr(s string) *C.char { return C.CString(s) }

func cfree(p *C.char) { C.free(unsafe.Pointer(p)) }
