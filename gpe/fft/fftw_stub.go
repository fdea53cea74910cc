//go:build purego

package fft

import "errors"

// DefaultBackend is the backend chosen by Default: gonum under the tag purego.
const DefaultBackend = Gonum

// FFTWAvailable reports whether the FFTW backend is compiled in.
const FFTWAvailable = false

func newFFTW(shape []int, opt Options) (Transform, error) {
	return nil, errors.New("fft: FFTW backend not compiled in (build tag purego)")
}

// LoadWisdom does nothing under the tag purego.
func LoadWisdom(path string) error { return nil }

// SaveWisdom does nothing under the tag purego.
func SaveWisdom(path string) error { return nil }
