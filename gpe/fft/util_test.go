package fft

import (
	"math/cmplx"
	"unsafe"
)

func abs(v complex128) float64          { return cmplx.Abs(v) }
func ptr(b []complex128) unsafe.Pointer { return unsafe.Pointer(&b[0]) }

func clone(x []complex128) []complex128 {
	y := Aligned(len(x))
	copy(y, x)
	return y
}
