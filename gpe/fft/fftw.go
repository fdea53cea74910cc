//go:build cgo && !purego

package fft

/*
#cgo pkg-config: fftw3
#cgo LDFLAGS: -lfftw3_threads -lpthread -lm
#include <fftw3.h>
#include <stdlib.h>
*/
import "C"

import (
	"fmt"
	"sync"
	"unsafe"
)

// DefaultBackend is the backend chosen by Default: FFTW in a normal build.
const DefaultBackend = FFTW

// FFTWAvailable reports whether the FFTW backend is compiled in.
const FFTWAvailable = true

// The FFTW planner is not thread-safe: every planner call holds plannerMu.
//
// Plans are cached per (shape, threads) for the life of the process and
// shared: executing one plan on different arrays from several goroutines is
// allowed (fftw_execute_dft is FFTW's thread-safe routine), while planning
// is serialised (with FFTW_MEASURE it costs more than a small solve). A map
// sweep makes thousands of transforms of a few shapes; without the cache the
// planner mutex serialised the workers (measured: 63 % of a 1D map point in
// fftw_plan_dft, no speed-up from a second worker).
var (
	plannerMu   sync.Mutex
	threadsInit bool
	planCache   = map[string]*fftwFFT{}
)

type fftwFFT struct {
	shape      []int
	n          int
	fwd, bwd   C.fftw_plan
	align      C.int // fftw_alignment_of of the planning buffer
	opt        Options
	ufwd, ubwd C.fftw_plan // plans for misaligned buffers, made on demand
	umu        sync.Mutex
}

func newFFTW(shape []int, opt Options) (Transform, error) {
	key := fmt.Sprint(shape, opt.Threads, opt.Planner)
	plannerMu.Lock()
	defer plannerMu.Unlock()
	if f, ok := planCache[key]; ok {
		return f, nil
	}
	f := &fftwFFT{shape: append([]int(nil), shape...), n: prod(shape), opt: opt}
	buf := Aligned(f.n)
	p := (*C.fftw_complex)(unsafe.Pointer(&buf[0]))
	f.align = C.fftw_alignment_of((*C.double)(unsafe.Pointer(p)))
	flags := C.uint(C.FFTW_ESTIMATE)
	if opt.Planner == PlanMeasure {
		flags = C.FFTW_MEASURE
	}
	f.fwd, f.bwd = f.plan(p, flags)
	if f.fwd == nil || f.bwd == nil {
		return nil, fmt.Errorf("fft: FFTW could not plan shape %v", shape)
	}
	planCache[key] = f
	return f, nil
}

// plan makes the forward and backward in-place plans on p; call with
// plannerMu held.
func (f *fftwFFT) plan(p *C.fftw_complex, flags C.uint) (C.fftw_plan, C.fftw_plan) {
	th := f.opt.Threads
	if th < 1 {
		th = 1
	}
	if th > 1 && !threadsInit {
		if C.fftw_init_threads() == 0 {
			th = 1
		} else {
			threadsInit = true
		}
	}
	if threadsInit {
		C.fftw_plan_with_nthreads(C.int(th))
	}
	dims := make([]C.int, len(f.shape))
	for i, n := range f.shape {
		dims[i] = C.int(n)
	}
	rank := C.int(len(dims))
	d := (*C.int)(unsafe.Pointer(&dims[0]))
	fwd := C.fftw_plan_dft(rank, d, p, p, C.FFTW_FORWARD, flags)
	bwd := C.fftw_plan_dft(rank, d, p, p, C.FFTW_BACKWARD, flags)
	return fwd, bwd
}

func (f *fftwFFT) Len() int         { return f.n }
func (f *fftwFFT) Shape() []int     { return append([]int(nil), f.shape...) }
func (f *fftwFFT) Backend() Backend { return FFTW }

func (f *fftwFFT) Forward(b []complex128)  { f.exec(b, true) }
func (f *fftwFFT) Backward(b []complex128) { f.exec(b, false) }

func (f *fftwFFT) exec(b []complex128, forward bool) {
	if len(b) != f.n {
		panic("fft: buffer length does not match the transform")
	}
	p := (*C.fftw_complex)(unsafe.Pointer(&b[0]))
	plan := f.bwd
	if forward {
		plan = f.fwd
	}
	if C.fftw_alignment_of((*C.double)(unsafe.Pointer(p))) != f.align {
		plan = f.unaligned(forward)
	}
	C.fftw_execute_dft(plan, p, p)
}

// unaligned returns plans made with FFTW_UNALIGNED (slower, made once).
func (f *fftwFFT) unaligned(forward bool) C.fftw_plan {
	f.umu.Lock()
	defer f.umu.Unlock()
	if f.ufwd == nil {
		buf := make([]complex128, f.n+1)[1:]
		p := (*C.fftw_complex)(unsafe.Pointer(&buf[0]))
		plannerMu.Lock()
		f.ufwd, f.ubwd = f.plan(p, C.FFTW_ESTIMATE|C.FFTW_UNALIGNED)
		plannerMu.Unlock()
	}
	if forward {
		return f.ufwd
	}
	return f.ubwd
}

// Close does nothing: the plans are cached and shared (see planCache).
func (f *fftwFFT) Close() {}

// LoadWisdom imports FFTW wisdom (earlier planning results) from a file, so
// that FFTW_MEASURE plans of known shapes are made at once. Optional; under
// the tag purego or without cgo it does nothing.
func LoadWisdom(path string) error {
	cs := C.CString(path)
	defer C.free(unsafe.Pointer(cs))
	plannerMu.Lock()
	defer plannerMu.Unlock()
	if C.fftw_import_wisdom_from_filename(cs) == 0 {
		return fmt.Errorf("fft: could not read FFTW wisdom from %s", path)
	}
	return nil
}

// SaveWisdom exports the FFTW wisdom accumulated by this process to a file.
func SaveWisdom(path string) error {
	cs := C.CString(path)
	defer C.free(unsafe.Pointer(cs))
	plannerMu.Lock()
	defer plannerMu.Unlock()
	if C.fftw_export_wisdom_to_filename(cs) == 0 {
		return fmt.Errorf("fft: could not write FFTW wisdom to %s", path)
	}
	return nil
}
