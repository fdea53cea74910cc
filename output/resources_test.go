package output

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"socmap/phases"
)

// TestCheckEstimate: an estimate beyond the free memory or disk is refused
// with one line naming both numbers; one that fits passes.
func TestCheckEstimate(t *testing.T) {
	mem, ok := FreeMemory()
	if !ok {
		t.Skip("no /proc/meminfo")
	}
	dir := t.TempDir()
	disk, ok := FreeDisk(filepath.Join(dir, "not-yet", "m.h5"))
	if !ok || !(disk > 0) {
		t.Fatalf("FreeDisk: %v %v", disk, ok)
	}
	small := phases.Estimate{What: "small", MemoryBytes: 1e6, DiskBytes: 1e3}
	if err := CheckEstimate(small, filepath.Join(dir, "m.h5")); err != nil {
		t.Errorf("small estimate refused: %v", err)
	}
	for _, c := range []struct {
		e    phases.Estimate
		out  string
		want string
	}{
		{phases.Estimate{What: "big", MemoryBytes: 2 * mem}, "", "MemAvailable"},
		{phases.Estimate{What: "big", MemoryBytes: 1, DiskBytes: 2 * disk}, filepath.Join(dir, "m.h5"), "free there"},
	} {
		err := CheckEstimate(c.e, c.out)
		if !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%+v: %v", c.e, err)
		}
	}
	// Disk is not checked without an output.
	if err := CheckEstimate(phases.Estimate{DiskBytes: math.Inf(1)}, ""); err != nil {
		t.Errorf("disk checked without a file: %v", err)
	}
}

// TestCreateMapFileCancelled: a cancelled layout leaves no file at all
// (neither the partial file nor a temporary one).
func TestCreateMapFileCancelled(t *testing.T) {
	dir := t.TempDir()
	spec := testSpec(testSweep(300, 200))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := CreateMapFileContext(ctx, filepath.Join(dir, "m.h5"), false, RunInfo{Version: "test"}, spec)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	if left, _ := os.ReadDir(dir); len(left) > 0 {
		t.Errorf("files left: %v", left)
	}
	// Not cancelled: the layout is complete, every observable NaN and
	// nothing done, although the storage was not filled by libhdf5.
	m, err := CreateMapFileContext(context.Background(), filepath.Join(dir, "m.h5"), false, RunInfo{Version: "test"}, spec)
	if err != nil {
		t.Fatal(err)
	}
	if err := m.Close(); err != nil {
		t.Fatal(err)
	}
	d, _, err := ReadMap(m.Path())
	if err != nil {
		t.Fatal(err)
	}
	for p := range d.Mask {
		if d.Mask[p] || d.Phase[p] != 0 {
			t.Fatalf("point %d done %v phase %v in a new file", p, d.Mask[p], d.Phase[p])
		}
		for k := range d.Values {
			if !math.IsNaN(d.Values[k][p]) {
				t.Fatalf("point %d observable %d = %v, want NaN", p, k, d.Values[k][p])
			}
		}
	}
}
