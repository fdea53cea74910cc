package output

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// ErrExist is returned when a result file exists and force is not set.
var ErrExist = errors.New("file exists (use --force to overwrite)")

// WriteFileAtomic writes a file through write under a temporary name in the
// same directory, syncs it and renames it to path, so that path either holds
// the complete result or is untouched. Without force an existing path is
// refused. On any failure the temporary file is removed.
func WriteFileAtomic(path string, force bool, write func(io.Writer) error) (err error) {
	if !force {
		if _, err := os.Lstat(path); err == nil {
			return fmt.Errorf("%s: %w", path, ErrExist)
		}
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return fmt.Errorf("%s: cannot create: %v", path, errors.Unwrap(err))
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriter(f)
	if err = write(bw); err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	if err = f.Sync(); err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	if err = os.Chmod(tmp, 0o644); err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	if !force {
		if _, e := os.Lstat(path); e == nil {
			err = fmt.Errorf("%s: %w", path, ErrExist)
			return err
		}
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("%s: %v", path, err)
	}
	return nil
}
