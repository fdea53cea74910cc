// Small C helpers for package h5: HDF5 exposes many of its constants as
// macros that expand to function calls (H5open), which cgo cannot evaluate,
// and the error stack is walked through a callback.
#ifndef SOCMAP_H5_SHIM_H
#define SOCMAP_H5_SHIM_H

#include <stddef.h>
#include <hdf5.h>

// Predefined type identifiers, selected by code (see shim.c). They are owned
// by the library and must not be closed.
enum {
	SM_NATIVE_DOUBLE = 1,
	SM_NATIVE_INT8,
	SM_NATIVE_INT32,
	SM_NATIVE_INT64,
	SM_IEEE_F64LE,
	SM_STD_I8LE,
	SM_STD_I32LE,
	SM_STD_I64LE,
	SM_C_S1,
};
hid_t sm_type(int code);

// sm_quiet switches off the automatic printing of the error stack for the
// calling thread (error stacks are per thread in a thread-safe build).
herr_t sm_quiet(void);

// sm_errmsg writes a one-line summary of the calling thread's error stack
// into buf (the first clause of the outermost and innermost descriptions)
// and clears the stack. It returns a bit set: 1 when an entry of the stack
// is HDF5's "unable to lock file" (minor error H5E_CANTLOCKFILE), 2 when an
// entry is a failed write, seek or truncation of the file itself (major
// H5E_IO, minor H5E_WRITEERROR, H5E_SEEKERROR or H5E_TRUNCATED).
int sm_errmsg(char *buf, size_t n);

hid_t sm_fcreate(const char *name);
hid_t sm_fopen(const char *name, int rw);
int sm_fd(hid_t file);
ssize_t sm_open_objects(void);
hid_t sm_probe_id(int kind);
long long sm_count_live(hid_t lo, hid_t hi);
void sm_leak_dataspaces(int n);
hid_t sm_lcpl(void);
hid_t sm_dcpl(void);
hid_t sm_complex(int file);
hid_t sm_vlen_string(void);
#endif
