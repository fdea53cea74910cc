//go:build cgo && !purego

package fft

import "testing"

// TestBackendsAgree: FFTW and gonum agree to 1e-12 relative to the largest
// coefficient on sizes the solver uses, on aligned buffers.
func TestBackendsAgree(t *testing.T) {
	for _, sh := range [][]int{{256}, {1024}, {64, 48}, {256, 256}, {16, 12, 20}, {3, 5, 7}} {
		a, err := New(sh, FFTW, Options{Threads: 2})
		if err != nil {
			t.Fatal(err)
		}
		b, _ := New(sh, Gonum, Options{})
		x := randBuf(prod(sh), 7)
		for _, inv := range []bool{false, true} {
			y1 := clone(x)
			y3 := clone(x)
			if inv {
				a.Backward(y1)
				b.Backward(y3)
			} else {
				a.Forward(y1)
				b.Forward(y3)
			}
			scale := 0.0
			for _, v := range y3 {
				if m := abs(v); m > scale {
					scale = m
				}
			}
			if d := maxDiff(y1, y3) / scale; d > 1e-12 {
				t.Errorf("%v inverse=%v: FFTW vs gonum rel diff %g", sh, inv, d)
			}
		}
		a.Close()
	}
}

func TestFFTWMisaligned(t *testing.T) {
	sh := []int{32, 8}
	a, _ := New(sh, FFTW, Options{})
	defer a.Close()
	x := randBuf(prod(sh), 9)
	raw := make([]complex128, len(x)+4)
	var mis []complex128
	for off := 0; off < 4; off++ {
		if uintptr(ptr(raw[off:]))%Alignment != 0 {
			mis = raw[off : off+len(x)]
			break
		}
	}
	copy(mis, x)
	y := clone(x)
	a.Forward(mis)
	a.Forward(y)
	if d := maxDiff(mis, y); d > 1e-12 {
		t.Errorf("misaligned differs by %g", d)
	}
}

func TestWisdomRoundTrip(t *testing.T) {
	a, _ := New([]int{24, 10}, FFTW, Options{})
	a.Close()
	p := t.TempDir() + "/wisdom"
	if err := SaveWisdom(p); err != nil {
		t.Fatal(err)
	}
	if err := LoadWisdom(p); err != nil {
		t.Fatal(err)
	}
	if err := LoadWisdom(p + ".missing"); err == nil {
		t.Error("missing wisdom file accepted")
	}
}
