//go:build !cgo || purego

package fft

import "errors"

// DefaultBackend is the backend chosen by Default: gonum under the tag purego or without cgo.
const DefaultBackend = Gonum

// FFTWAvailable reports whether the FFTW backend is compiled in.
const FFTWAvailable = false

func newFFTW(shape []int, opt Options) (Transform, error) {
	return nil, errors.New("fft: FFTW backend not compiled in (build tag purego or CGO_ENABLED=0)")
}

// LoadWisdom does nothing under the tag purego or without cgo.
func LoadWisdom(path string) error { return nil }

// SaveWisdom does nothing under the tag purego or without cgo.
func SaveWisdom(path string) error { return nil }
