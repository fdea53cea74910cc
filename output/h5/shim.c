#include <string.h>
#include <stdio.h>
#include "shim.h"

hid_t sm_type(int code) {
	switch (code) {
	case SM_NATIVE_DOUBLE: return H5T_NATIVE_DOUBLE;
	case SM_NATIVE_INT8: return H5T_NATIVE_INT8;
	case SM_NATIVE_INT32: return H5T_NATIVE_INT32;
	case SM_NATIVE_INT64: return H5T_NATIVE_INT64;
	case SM_IEEE_F64LE: return H5T_IEEE_F64LE;
	case SM_STD_I8LE: return H5T_STD_I8LE;
	case SM_STD_I32LE: return H5T_STD_I32LE;
	case SM_STD_I64LE: return H5T_STD_I64LE;
	case SM_C_S1: return H5T_C_S1;
	}
	return -1;
}

herr_t sm_quiet(void) { return H5Eset_auto2(H5E_DEFAULT, NULL, NULL); }

struct walk {
	char first[256];
	char last[256];
	int n;
	int locked;
	int write;
};

// clause copies the first clause of an HDF5 error description (up to the
// first ':'), which names what failed; the rest holds call details (time,
// file descriptor, buffer addresses) that mean nothing to a user.
static void clause(char *dst, size_t n, const char *d) {
	size_t k = 0;
	while (d[k] && d[k] != ':' && k + 1 < n) {
		dst[k] = d[k];
		k++;
	}
	dst[k] = 0;
}

static herr_t walk_cb(unsigned n, const H5E_error2_t *e, void *data) {
	struct walk *w = data;
	const char *d = (e->desc && e->desc[0]) ? e->desc : (e->func_name ? e->func_name : "?");
	if (w->n == 0) {
		clause(w->first, sizeof w->first, d);
	}
	clause(w->last, sizeof w->last, d);
	if (e->min_num == H5E_CANTLOCKFILE) w->locked = 1;
	if (e->maj_num == H5E_IO && (e->min_num == H5E_WRITEERROR || e->min_num == H5E_SEEKERROR || e->min_num == H5E_TRUNCATED)) w->write = 1;
	w->n++;
	return 0;
}

int sm_errmsg(char *buf, size_t n) {
	struct walk w;
	memset(&w, 0, sizeof w);
	H5Ewalk2(H5E_DEFAULT, H5E_WALK_DOWNWARD, walk_cb, &w);
	H5Eclear2(H5E_DEFAULT);
	if (w.n == 0) {
		snprintf(buf, n, "unknown HDF5 error");
	} else if (w.n == 1 || strcmp(w.first, w.last) == 0) {
		snprintf(buf, n, "%s", w.first);
	} else {
		snprintf(buf, n, "%s: %s", w.first, w.last);
	}
	// keep the message on one line
	for (char *p = buf; *p; p++) {
		if (*p == '\n' || *p == '\r') *p = ' ';
	}
	return w.locked | (w.write << 1);
}

// fapl is the file-access property list of every file: the strong close
// degree makes H5Fclose close every object still open in the file. It is
// created once (callers hold the package lock) and never closed, so that a
// failing H5Fopen leaves its error stack intact for sm_errmsg.
static hid_t fapl = -1;

static hid_t get_fapl(void) {
	if (fapl < 0) {
		hid_t p = H5Pcreate(H5P_FILE_ACCESS);
		if (p < 0) return -1;
		if (H5Pset_fclose_degree(p, H5F_CLOSE_STRONG) < 0) { H5Pclose(p); return -1; }
		fapl = p;
	}
	return fapl;
}

// cfapl is the file-access property list of new files: fapl's settings
// and the 1.8 file format (superblock version 2, version-2 object headers,
// new-style groups), whose metadata carry checksums that libhdf5 verifies
// on every read, so that a damaged file gives an error instead of garbage
// that the library may crash on (found by FuzzDamagedMapFile). The 1.10
// format (superblock version 3) is not used: its consistency flags make a
// file whose writer was killed unreadable without h5clear, and map files
// must survive that.
static hid_t cfapl = -1;

hid_t sm_fcreate(const char *name) {
	if (cfapl < 0) {
		hid_t p = H5Pcreate(H5P_FILE_ACCESS);
		if (p < 0) return -1;
		if (H5Pset_fclose_degree(p, H5F_CLOSE_STRONG) < 0 ||
		    H5Pset_libver_bounds(p, H5F_LIBVER_V18, H5F_LIBVER_V18) < 0) { H5Pclose(p); return -1; }
		cfapl = p;
	}
	return H5Fcreate(name, H5F_ACC_TRUNC, H5P_DEFAULT, cfapl);
}

hid_t sm_fopen(const char *name, int rw) {
	hid_t p = get_fapl();
	if (p < 0) return -1;
	return H5Fopen(name, rw ? H5F_ACC_RDWR : H5F_ACC_RDONLY, p);
}

// sm_fd returns the POSIX descriptor of a file opened with the default
// (sec2) driver, or -1.
int sm_fd(hid_t file) {
	void *h = NULL;
	if (H5Fget_vfd_handle(file, H5P_DEFAULT, &h) < 0 || h == NULL) return -1;
	return *(int *)h;
}

ssize_t sm_open_objects(void) { return H5Fget_obj_count((hid_t)H5F_OBJ_ALL, H5F_OBJ_ALL); }

// sm_probe_id creates and closes an identifier of the given kind (0:
// dataspace, 1: datatype, 2: property list) and returns its value. HDF5
// 1.10 numbers the identifiers of each kind consecutively, so two probes
// bracket every identifier of that kind created in between.
hid_t sm_probe_id(int kind) {
	hid_t id = -1;
	switch (kind) {
	case 0: id = H5Screate(H5S_SCALAR); if (id >= 0) H5Sclose(id); break;
	case 1: id = H5Tcopy(H5T_NATIVE_INT); if (id >= 0) H5Tclose(id); break;
	case 2: id = H5Pcreate(H5P_DATASET_CREATE); if (id >= 0) H5Pclose(id); break;
	}
	return id;
}

// sm_count_live counts the identifiers strictly between lo and hi that are
// still valid (open).
long long sm_count_live(hid_t lo, hid_t hi) {
	long long n = 0;
	for (hid_t id = lo + 1; id < hi; id++) {
		if (H5Iis_valid(id) > 0) n++;
	}
	H5Eclear2(H5E_DEFAULT);
	return n;
}

// sm_leak_dataspaces deliberately leaks n dataspaces (used by the leak test
// to show that its count detects a leak).
void sm_leak_dataspaces(int n) {
	for (int i = 0; i < n; i++) H5Screate(H5S_SCALAR);
}

hid_t sm_lcpl(void) {
	hid_t p = H5Pcreate(H5P_LINK_CREATE);
	if (p < 0) return -1;
	if (H5Pset_create_intermediate_group(p, 1) < 0 ||
	    H5Pset_char_encoding(p, H5T_CSET_UTF8) < 0) { H5Pclose(p); return -1; }
	return p;
}

hid_t sm_dcpl(void) { return H5Pcreate(H5P_DATASET_CREATE); }

// sm_complex builds the compound {r float64, i float64} used for complex
// numbers (the member names h5py maps to numpy complex). file selects the
// little-endian IEEE file type; otherwise the native memory type, whose
// layout matches Go's complex128.
hid_t sm_complex(int file) {
	hid_t base = file ? H5T_IEEE_F64LE : H5T_NATIVE_DOUBLE;
	hid_t t = H5Tcreate(H5T_COMPOUND, 16);
	if (t < 0) return -1;
	if (H5Tinsert(t, "r", 0, base) < 0 || H5Tinsert(t, "i", 8, base) < 0) { H5Tclose(t); return -1; }
	return t;
}

// sm_vlen_string is a variable-length UTF-8 string type (read by h5py as str).
hid_t sm_vlen_string(void) {
	hid_t t = H5Tcopy(H5T_C_S1);
	if (t < 0) return -1;
	if (H5Tset_size(t, H5T_VARIABLE) < 0 || H5Tset_cset(t, H5T_CSET_UTF8) < 0) { H5Tclose(t); return -1; }
	return t;
}
