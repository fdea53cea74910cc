// Package atomicfile is the one place where socmap's result files move
// from their temporary name to their final name (output.WriteFileAtomic,
// h5.Create/Close, the map files' partial → final step).
package atomicfile

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
)

// ErrExist is returned when the final name exists and force is not set. It
// also matches fs.ErrExist.
var ErrExist error = existError{}

type existError struct{}

func (existError) Error() string        { return "file exists (use --force to overwrite)" }
func (existError) Is(target error) bool { return target == fs.ErrExist }

// Commit moves the finished file tmp to name: fsync of tmp, permissions
// 0644, then a hard link (which fails if name exists, so nothing is ever
// replaced without force) and removal of tmp, or, with force, a rename; on
// file systems without hard links, a check and a rename. Finally the
// directory is fsynced (best effort: some file systems refuse). Errors are
// the causes without the temporary path (Pathless) or ErrExist; the caller
// decides whether to remove tmp.
func Commit(tmp, name string, force bool) error {
	fh, err := os.OpenFile(tmp, os.O_RDWR, 0)
	if err != nil {
		return Pathless(err)
	}
	err = fh.Sync()
	if cerr := fh.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return Pathless(err)
	}
	if err := os.Chmod(tmp, 0o644); err != nil {
		return Pathless(err)
	}
	if force {
		if err := os.Rename(tmp, name); err != nil {
			return Pathless(err)
		}
	} else {
		err := os.Link(tmp, name)
		switch {
		case err == nil:
			if err := os.Remove(tmp); err != nil {
				return Pathless(err)
			}
		case errors.Is(err, fs.ErrExist):
			return ErrExist
		default: // no hard links here: check, then rename
			if _, serr := os.Lstat(name); serr == nil {
				return ErrExist
			}
			if err := os.Rename(tmp, name); err != nil {
				return Pathless(err)
			}
		}
	}
	if d, err := os.Open(filepath.Dir(name)); err == nil {
		d.Sync()
		d.Close()
	}
	return nil
}

// Pathless drops the path of an *fs.PathError or *os.LinkError (a
// temporary name the user never chose), keeping the cause, which still
// matches fs.ErrPermission and the like.
func Pathless(err error) error {
	var pe *fs.PathError
	var le *os.LinkError
	switch {
	case errors.As(err, &pe):
		return pe.Err
	case errors.As(err, &le):
		return le.Err
	}
	return err
}
