package h5

import (
	"encoding/binary"
	"strings"
	"testing"
)

// collection builds a global heap collection of size bytes holding the
// given strings as objects 1, 2, … and the rest as free space (the layout
// of the HDF5 file format specification's global heap; 8-byte lengths).
func collection(size int, objs ...string) []byte {
	b := make([]byte, size)
	copy(b, "GCOL")
	b[4] = 1
	binary.LittleEndian.PutUint64(b[8:], uint64(size))
	p := 16
	for i, s := range objs {
		binary.LittleEndian.PutUint16(b[p:], uint16(i+1))
		binary.LittleEndian.PutUint16(b[p+2:], 1)
		binary.LittleEndian.PutUint64(b[p+8:], uint64(len(s)))
		copy(b[p+16:], s)
		p += 16 + (len(s)+7)/8*8
	}
	binary.LittleEndian.PutUint64(b[p+8:], uint64(size-p)) // index 0: free space
	return b
}

func TestCheckCollection(t *testing.T) {
	good := collection(4096, "socmap", "fuzz", "socmap map (fuzz)")
	if err := checkCollection(good, 0); err != nil {
		t.Fatalf("intact collection refused: %v", err)
	}
	// Shrunk to 72 bytes, the size is an object boundary: it tiles, but is
	// below the format's minimum (the FuzzDamagedMapFile crasher's damage).
	small := append([]byte(nil), good...)
	binary.LittleEndian.PutUint64(small[8:], 16+24+24)
	if err := checkCollection(small, 0); err == nil || !strings.Contains(err.Error(), "minimum") {
		t.Errorf("shrunk collection: %v, want a below-minimum error", err)
	}
	dup := append([]byte(nil), good...)
	binary.LittleEndian.PutUint16(dup[16+24:], 1) // object 2 renamed 1
	if err := checkCollection(dup, 0); err == nil {
		t.Error("duplicate object index accepted")
	}
	over := append([]byte(nil), good...)
	binary.LittleEndian.PutUint64(over[16+8:], 5000) // object 1 overruns
	if err := checkCollection(over, 0); err == nil {
		t.Error("overrunning object accepted")
	}
	free := append([]byte(nil), good...)
	binary.LittleEndian.PutUint64(free[16+24+24+40+8:], 8) // free space too short
	if err := checkCollection(free, 0); err == nil {
		t.Error("short free space accepted")
	}
}
