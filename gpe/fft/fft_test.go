package fft

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// naiveDFT is the textbook definition of the n-dimensional DFT (common
// practice, no source), O(n²), used as the reference for both backends.
func naiveDFT(x []complex128, shape []int, sign float64) []complex128 {
	n := len(x)
	out := make([]complex128, n)
	idx := func(i int) []int {
		r := make([]int, len(shape))
		for a := len(shape) - 1; a >= 0; a-- {
			r[a] = i % shape[a]
			i /= shape[a]
		}
		return r
	}
	for k := 0; k < n; k++ {
		kk := idx(k)
		var s complex128
		for j := 0; j < n; j++ {
			jj := idx(j)
			ph := 0.0
			for a := range shape {
				ph += float64(jj[a]*kk[a]) / float64(shape[a])
			}
			s += x[j] * cmplx.Exp(complex(0, sign*2*math.Pi*ph))
		}
		out[k] = s
	}
	return out
}

func randBuf(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 1))
	b := Aligned(n)
	for i := range b {
		b[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return b
}

func maxDiff(a, b []complex128) float64 {
	m := 0.0
	for i := range a {
		m = math.Max(m, cmplx.Abs(a[i]-b[i]))
	}
	return m
}

var shapes = [][]int{{1}, {7}, {16}, {12}, {8, 6}, {5, 1}, {4, 3, 5}, {1, 8, 1}}

func backends() []Backend {
	if FFTWAvailable {
		return []Backend{Gonum, FFTW}
	}
	return []Backend{Gonum}
}

func TestAgainstNaiveDFT(t *testing.T) {
	for _, be := range backends() {
		for _, sh := range shapes {
			tr, err := New(sh, be, Options{})
			if err != nil {
				t.Fatal(err)
			}
			x := randBuf(prod(sh), 3)
			ref := naiveDFT(x, sh, -1)
			y := clone(x)
			tr.Forward(y)
			if d := maxDiff(y, ref); d > 1e-11 {
				t.Errorf("%v %v forward: max diff %g", be, sh, d)
			}
			refb := naiveDFT(x, sh, +1)
			y = clone(x)
			tr.Backward(y)
			if d := maxDiff(y, refb); d > 1e-11 {
				t.Errorf("%v %v backward: max diff %g", be, sh, d)
			}
			tr.Close()
		}
	}
}

func TestAligned(t *testing.T) {
	for n := 1; n < 20; n++ {
		b := Aligned(n)
		if len(b) != n || cap(b) != n {
			t.Fatal("bad length")
		}
	}
}
