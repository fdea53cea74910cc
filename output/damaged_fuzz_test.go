package output

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"socmap/phases"
)

// A real small map file (16 × 12 points, made by the map writer), built once
// per test process; the fuzz target damages copies of it.
var (
	mapFileOnce  sync.Once
	mapFileBytes []byte
	mapFileErr   error
)

func smallMapFile(t testing.TB) []byte {
	mapFileOnce.Do(func() {
		dir, err := os.MkdirTemp("", "socmap-fuzz-")
		if err != nil {
			mapFileErr = err
			return
		}
		defer os.RemoveAll(dir)
		sw := testSweep(16, 12)
		d := NewMapData(testSpec(sw))
		if _, err := phases.Run(context.Background(), sw, testPoint(nil, 16), d, &phases.RunSettings{Workers: 1}); err != nil {
			mapFileErr = err
			return
		}
		name := filepath.Join(dir, "m.h5")
		if mapFileErr = WriteMapFile(name, false, RunInfo{Version: "fuzz", CommandLine: "socmap map (fuzz)", Plan: testKey}, d); mapFileErr == nil {
			mapFileBytes, mapFileErr = os.ReadFile(name)
		}
	})
	if mapFileErr != nil {
		t.Fatal(mapFileErr)
	}
	return mapFileBytes
}

// FuzzDamagedMapFile: a map file truncated and with bytes flipped must not
// panic or hang inspect, the map reader or merge: each gives a result or an
// error of its kind (ErrBadFile for Inspect, ErrMapInput for ReadMap and
// MergeMaps), one line. The damage is cut (keep that many bytes; 0: the
// whole file) and two flips (offset modulo the length, XOR mask). Seeds are
// in testdata/fuzz/FuzzDamagedMapFile and below.
func FuzzDamagedMapFile(f *testing.F) {
	n := uint32(len(smallMapFile(f)))
	f.Add(uint32(0), uint32(0), byte(0), uint32(0), byte(0)) // intact
	for _, cut := range []uint32{1, 8, 96, 512, 2048, n / 2, n - 1} {
		f.Add(cut, uint32(0), byte(0), uint32(0), byte(0))
	}
	for _, off := range []uint32{0, 8, 40, 64, 100, 200, 400, 800, 1200, 2000, 3000, n / 3, n / 2, n - 8} {
		f.Add(uint32(0), off, byte(0xff), off+1, byte(0x01))
	}
	f.Fuzz(func(t *testing.T, cut, off1 uint32, x1 byte, off2 uint32, x2 byte) {
		data := append([]byte(nil), smallMapFile(t)...)
		if cut > 0 && int(cut) < len(data) {
			data = data[:cut]
		}
		if len(data) > 0 {
			data[int(off1)%len(data)] ^= x1
			data[int(off2)%len(data)] ^= x2
		}
		path := filepath.Join(t.TempDir(), "damaged.h5")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		done := make(chan struct{})
		go func() {
			defer close(done)
			if _, err := Inspect(path); err != nil && !errors.Is(err, ErrBadFile) {
				t.Errorf("Inspect: %v is not ErrBadFile", err)
			}
			if _, _, err := ReadMap(path); err != nil && !errors.Is(err, ErrMapInput) {
				t.Errorf("ReadMap: %v is not ErrMapInput", err)
			}
			if _, err := MergeMaps([]string{path}); err != nil && !errors.Is(err, ErrMapInput) {
				t.Errorf("MergeMaps: %v is not ErrMapInput", err)
			}
		}()
		select {
		case <-done:
		case <-time.After(30 * time.Second):
			t.Fatalf("hang: cut %d, flips %d^%#x %d^%#x", cut, off1, x1, off2, x2)
		}
	})
}
