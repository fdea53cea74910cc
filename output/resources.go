package output

import (
	"bufio"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"

	"socmap/phases"
)

// ErrTooLarge marks a computation whose up-front estimate exceeds what the
// machine offers (CheckEstimate).
var ErrTooLarge = errors.New("too large for this machine")

// FreeMemory returns the memory available to a new process in bytes: the
// kernel's MemAvailable (/proc/meminfo), the memory that can be used
// without swapping. ok is false where it cannot be read (not Linux).
func FreeMemory() (bytes float64, ok bool) {
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return 0, false
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		name, rest, found := strings.Cut(sc.Text(), ":")
		if !found || name != "MemAvailable" {
			continue
		}
		fields := strings.Fields(rest)
		if len(fields) != 2 || fields[1] != "kB" {
			return 0, false
		}
		v, err := strconv.ParseFloat(fields[0], 64)
		if err != nil {
			return 0, false
		}
		return v * 1024, true
	}
	return 0, false
}

// FreeDisk returns the bytes an unprivileged process can still write on
// the file system that holds path (statfs: available blocks × block size);
// path need not exist, its nearest existing parent directory is asked.
func FreeDisk(path string) (bytes float64, ok bool) {
	dir := filepath.Dir(filepath.Clean(path))
	for {
		var st syscall.Statfs_t
		if err := syscall.Statfs(dir, &st); err == nil {
			return float64(st.Bavail) * float64(st.Bsize), true
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return 0, false
		}
		dir = parent
	}
}

// CheckEstimate compares an estimate with the machine: its memory with
// FreeMemory, and, when out is not empty (the result file's path), its
// disk size with FreeDisk(out). It returns nil when both fit (or cannot be
// measured), else an error wrapping ErrTooLarge, one line with the
// estimate and the limit, e.g. "needs ≈ 800 GB of memory, 23 GB are free
// (MemAvailable)".
func CheckEstimate(e phases.Estimate, out string) error {
	if free, ok := FreeMemory(); ok && e.MemoryBytes > free {
		return fmt.Errorf("%w: %s needs ≈ %s of memory, %s are free (MemAvailable)", ErrTooLarge, e.What, phases.Bytes(e.MemoryBytes), phases.Bytes(free))
	}
	if out != "" {
		if free, ok := FreeDisk(out); ok && e.DiskBytes > free {
			return fmt.Errorf("%w: %s needs ≈ %s of disk for %s, %s are free there", ErrTooLarge, e.What, phases.Bytes(e.DiskBytes), out, phases.Bytes(free))
		}
	}
	return nil
}
