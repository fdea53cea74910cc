package output

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"socmap/output/h5"
	"socmap/output/internal/atomicfile"
)

// ErrExist is returned (wrapped) when a result file exists and force is not
// set, by WriteFileAtomic and by the HDF5 layer (it is h5.ErrExist, which
// also matches fs.ErrExist).
var ErrExist = h5.ErrExist

// WriteFileAtomic writes a file through write under a temporary name in the
// same directory (".base.*.tmp"), flushes and fsyncs it, sets mode 0644 and
// moves it to path, then fsyncs the directory: path either holds the
// complete result or is untouched. Without force an existing path is
// refused, before writing and again at the move (a hard link, which never
// replaces a file; on file systems without hard links a check and a
// rename). On any failure, including a panic in write, the temporary file
// is removed. Errors are one line naming path.
func WriteFileAtomic(path string, force bool, write func(io.Writer) error) (err error) {
	fail := func(e error) error { return fmt.Errorf("write %s: %w", path, e) }
	if !force {
		if _, err := os.Lstat(path); err == nil {
			return fail(ErrExist)
		}
	}
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return fail(pathless(err))
	}
	tmp := f.Name()
	committed := false
	defer func() {
		if !committed {
			f.Close()
			os.Remove(tmp)
		}
	}()
	bw := bufio.NewWriter(f)
	if err := write(bw); err != nil {
		return fail(err)
	}
	if err := bw.Flush(); err != nil {
		return fail(pathless(err))
	}
	if err := f.Close(); err != nil {
		return fail(pathless(err))
	}
	if err := atomicfile.Commit(tmp, path, force); err != nil {
		return fail(err)
	}
	committed = true
	return nil
}

// pathless drops the path of an *fs.PathError or *os.LinkError (a
// temporary name the user never chose), keeping the cause.
func pathless(err error) error { return atomicfile.Pathless(err) }
