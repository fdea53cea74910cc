package h5

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"os"
)

// GlobalHeapCheckLimit: files up to this size have their global heaps
// checked before libhdf5 opens them (checkGlobalHeaps); larger files are
// opened unchecked (scanning them would cost about a second per GiB).
const GlobalHeapCheckLimit = 1 << 30

// checkGlobalHeaps checks the structure of every global heap collection in
// the file (where HDF5 keeps variable-length strings: every string
// attribute of our files). Their headers carry no checksum, and libhdf5
// 1.10 reads past its buffers, or crashes, on a collection whose object
// sizes are damaged (found by FuzzDamagedMapFile), so a damaged collection
// must be refused before libhdf5 parses it. A collection ("GCOL", version
// 1, its size; then objects: index, reference count, reserved, size, data
// padded to 8 bytes; index 0 is the free space, the last object, exactly
// the rest, or fewer than 16 unused bytes) must be at least 4096 bytes
// (minCollection), fit the file and its
// objects tile the collection, with distinct indices. The
// collections are found by their signature; 8-byte lengths are assumed
// (every file this package writes, and libhdf5's default). A file larger
// than GlobalHeapCheckLimit is not checked.
func checkGlobalHeaps(name string) error {
	f, err := os.Open(name)
	if err != nil {
		return nil // the caller reports it
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil || st.Size() > GlobalHeapCheckLimit {
		return nil
	}
	size := st.Size()
	sig := []byte("GCOL")
	buf := make([]byte, 1<<20)
	for base := int64(0); base < size; base += int64(len(buf) - len(sig) + 1) {
		n, err := f.ReadAt(buf, base)
		if err != nil && err != io.EOF {
			return nil
		}
		for at := 0; ; {
			i := bytes.Index(buf[at:n], sig)
			if i < 0 {
				break
			}
			o := base + int64(at+i)
			at += i + 1
			if err := checkCollectionAt(f, o, size); err != nil {
				return fmt.Errorf("%w: global heap at byte %d: %v", ErrFormat, o, err)
			}
		}
		if n < len(buf) {
			break
		}
	}
	return nil
}

// minCollection is the smallest global heap collection the HDF5 file format
// allows (4096 bytes: the format specification's "default (and minimum)
// collection size", H5HG_MINALLOC in libhdf5). A shrunken size that still
// ends on an object boundary passes the tiling check but hides the objects
// past it, and libhdf5 1.10 dereferences a null pointer when an attribute
// names one of them (found by FuzzDamagedMapFile).
const minCollection = 4096

// checkCollectionAt reads the collection at byte o of f (a file of size
// bytes) and checks it.
func checkCollectionAt(f *os.File, o, size int64) error {
	var hdr [16]byte
	if _, err := f.ReadAt(hdr[:], o); err != nil {
		return fmt.Errorf("truncated")
	}
	n := binary.LittleEndian.Uint64(hdr[8:])
	if n < minCollection || n > uint64(size-o) {
		return fmt.Errorf("collection of %d bytes in a file of %d", n, size)
	}
	data := make([]byte, n)
	if _, err := f.ReadAt(data, o); err != nil {
		return fmt.Errorf("truncated")
	}
	return checkCollection(data, 0)
}

func checkCollection(data []byte, o int) error {
	const hdr = 16 // signature, version, 3 reserved, 8-byte size
	if o+hdr > len(data) {
		return fmt.Errorf("truncated")
	}
	if data[o+4] != 1 {
		return fmt.Errorf("version %d", data[o+4])
	}
	size := binary.LittleEndian.Uint64(data[o+8:])
	if size < minCollection {
		return fmt.Errorf("collection of %d bytes, below the format's minimum of %d", size, minCollection)
	}
	if size > uint64(len(data)-o) {
		return fmt.Errorf("collection of %d bytes in a file of %d", size, len(data))
	}
	end := o + int(size)
	seen := map[uint16]bool{}
	p := o + hdr
	for p+16 <= end {
		idx := binary.LittleEndian.Uint16(data[p:])
		osz := binary.LittleEndian.Uint64(data[p+8:])
		if idx == 0 { // free space: exactly the rest of the collection
			if osz != uint64(end-p) {
				return fmt.Errorf("free space of %d bytes at byte %d, %d left in the collection", osz, p, end-p)
			}
			return nil
		}
		if seen[idx] {
			return fmt.Errorf("object %d twice", idx)
		}
		seen[idx] = true
		need := 16 + (osz+7)/8*8
		if osz > uint64(end) || need > uint64(end-p) {
			return fmt.Errorf("object %d of %d bytes at byte %d overruns the collection", idx, osz, p)
		}
		p += int(need)
	}
	// Fewer than 16 bytes may stay unused at the end (no room for the
	// free-space object's header).
	return nil
}
