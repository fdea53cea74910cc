// Package fft provides n-dimensional complex-to-complex discrete Fourier
// transforms on complex128 buffers for the gpe solver, with two backends:
// FFTW3 through cgo (the default) and a pure-Go backend built on
// gonum.org/v1/gonum/dsp/fourier (always compiled; the default under the
// build tag purego or in a build without cgo, which also leave FFTW out).
//
// Conventions (the usual DFT, common practice, no source):
//
//	Forward:  X[k] = Σ_j x[j] exp(−2πi j·k/n)
//	Backward: x[j] = Σ_k X[k] exp(+2πi j·k/n)
//
// Both are unnormalised: Backward(Forward(x)) = n·x with n the total number
// of points. Arrays are row-major (C order): the last axis varies fastest.
package fft

import (
	"fmt"
	"unsafe"
)

// Transform is an n-dimensional in-place complex FFT of a fixed shape.
// Plans are made once, when the Transform is created, and reused on every
// call. Forward and Backward allocate nothing. A Transform may be used by
// one goroutine at a time (different Transforms may run concurrently).
type Transform interface {
	Forward(buf []complex128)  // in place, sign −1, unnormalised
	Backward(buf []complex128) // in place, sign +1, unnormalised
	Len() int                  // total number of points
	Shape() []int
	Backend() Backend
	Close() // ends the caller's use; FFTW plans stay cached per shape for reuse
}

// Backend selects an FFT implementation.
type Backend int

const (
	// Default is FFTW unless the package was built with the tag purego or
	// without cgo (CGO_ENABLED=0).
	Default Backend = iota
	// FFTW is FFTW3 through cgo (Debian libfftw3-dev), planned with
	// FFTW_ESTIMATE unless Options.Planner asks for FFTW_MEASURE. Not
	// available under the build tag purego or without cgo.
	FFTW
	// Gonum is the pure-Go backend: one-dimensional transforms of
	// gonum.org/v1/gonum/dsp/fourier applied along each axis in turn.
	Gonum
)

func (b Backend) String() string {
	switch b {
	case Default:
		return "default(" + DefaultBackend.String() + ")"
	case FFTW:
		return "fftw"
	case Gonum:
		return "gonum"
	}
	return fmt.Sprintf("backend(%d)", int(b))
}

// Options of a Transform.
type Options struct {
	// Threads is the number of threads FFTW may use for one transform
	// (fftw_plan_with_nthreads). 0 or 1: one thread. The gonum backend
	// ignores it.
	Threads int
	// Planner: how FFTW chooses its algorithm. Default PlanEstimate, which
	// is reproducible; the gonum backend ignores it.
	Planner Planner
}

// Planner selects FFTW's planning rigour.
type Planner int

const (
	// PlanEstimate (default): FFTW_ESTIMATE, a plan chosen by FFTW's
	// heuristics from the shape and alignment alone, so the same shape gets
	// the same algorithm, hence the same rounding, in every run: the same
	// command gives the same file.
	PlanEstimate Planner = iota
	// PlanMeasure: FFTW_MEASURE, a plan chosen by timing candidates. It can
	// differ between runs (it depends on the machine's load), and so can the
	// last digits of every result; use it only where reproducibility to the
	// last bit does not matter. BenchmarkOneFFT measures both.
	PlanMeasure
)

// New makes a Transform of the given shape (1 to 3 axes, each ≥ 1).
func New(shape []int, b Backend, opt Options) (Transform, error) {
	if len(shape) < 1 || len(shape) > 3 {
		return nil, fmt.Errorf("fft: %d axes, want 1 to 3", len(shape))
	}
	for _, n := range shape {
		if n < 1 {
			return nil, fmt.Errorf("fft: shape %v has an axis < 1", shape)
		}
	}
	if b == Default {
		b = DefaultBackend
	}
	switch b {
	case FFTW:
		return newFFTW(shape, opt)
	case Gonum:
		return newGonum(shape), nil
	}
	return nil, fmt.Errorf("fft: unknown backend %v", b)
}

// Alignment in bytes of the buffers returned by Aligned.
const Alignment = 64

// Aligned returns a zeroed slice of n complex128 whose first element is
// aligned to Alignment bytes. FFTW runs its SIMD codelets only on buffers
// with the alignment of the buffer it planned on; every buffer handed to a
// Transform should come from here (misaligned buffers still work, through a
// slower plan made on first use).
func Aligned(n int) []complex128 {
	const per = Alignment / 16
	raw := make([]complex128, n+per)
	off := 0
	for uintptr(unsafe.Pointer(&raw[off]))%Alignment != 0 {
		off++
	}
	return raw[off : off+n : off+n]
}

func prod(shape []int) int {
	p := 1
	for _, n := range shape {
		p *= n
	}
	return p
}
