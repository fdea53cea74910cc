package h5

import (
	"errors"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// A file locked by someone else (here an flock(2) held on another open
// file description, as libhdf5 1.10 itself takes for a file it writes) is
// refused with ErrLocked, for reading and for writing, and not as a damaged
// file; once the lock is released it opens.
func TestOpenLockedFile(t *testing.T) {
	if os.Getenv("HDF5_USE_FILE_LOCKING") == "FALSE" {
		t.Skip("HDF5 file locking is switched off in this environment")
	}
	name := filepath.Join(t.TempDir(), "locked.h5")
	f, err := Create(name, false)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.WriteFloat64s("/a", []float64{1}, nil, Meta{Units: "m", Description: "test"}); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	other, err := os.OpenFile(name, os.O_RDWR, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer other.Close()
	if err := syscall.Flock(int(other.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		t.Fatal(err)
	}
	for _, rw := range []bool{false, true} {
		g, err := open(name, rw)
		if err == nil {
			g.Close()
			t.Fatalf("open (rw %v) of a locked file succeeded", rw)
		}
		if !errors.Is(err, ErrLocked) || errors.Is(err, ErrFormat) {
			t.Errorf("open (rw %v) of a locked file: %v, want ErrLocked (not ErrFormat)", rw, err)
		}
	}
	if err := syscall.Flock(int(other.Fd()), syscall.LOCK_UN); err != nil {
		t.Fatal(err)
	}
	g, err := Open(name)
	if err != nil {
		t.Fatalf("open after unlock: %v", err)
	}
	g.Close()
}
