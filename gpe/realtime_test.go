package gpe

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/gpe/fft"
)

// A kinetic factor exp(−iε(k)) acting on one Fourier mode e^{ik·x} multiplies
// it by exactly that phase (the plane wave is an eigenstate of every operator
// diagonal in k; textbook), on both FFT backends, in 2D.
func TestStepperKineticPlaneWave(t *testing.T) {
	shape := []int{8, 4}
	for _, be := range []fft.Backend{fft.FFTW, fft.Gonum} {
		s, err := NewStepper(shape, be, fft.Options{})
		if err != nil {
			if be == fft.FFTW {
				t.Skipf("no FFTW in this build: %v", err)
			}
			t.Fatal(err)
		}
		n := s.Len()
		m0, m1 := 3, -1 // mode numbers along the two axes
		for i := 0; i < shape[0]; i++ {
			for j := 0; j < shape[1]; j++ {
				ph := 2 * math.Pi * (float64(m0*i)/float64(shape[0]) + float64(m1*j)/float64(shape[1]))
				s.Psi[0][i*shape[1]+j] = cmplx.Rect(1, ph)
				s.Psi[1][i*shape[1]+j] = cmplx.Rect(0.5, -ph)
			}
		}
		// ε depends on the FFT index; the mode sits at (m0, m1 mod N1) for ↑
		// and (−m0 mod N0, −m1) for ↓.
		eps := func(c, idx int) float64 { return 0.37*float64(idx) + 1.1*float64(c) }
		var f KineticFactors
		for c := range f {
			f[c] = make([]complex128, n)
			for idx := range f[c] {
				f[c][idx] = cmplx.Rect(1/float64(n), -eps(c, idx))
			}
		}
		iu := m0*shape[1] + (m1+shape[1])%shape[1]
		id := ((-m0+shape[0])%shape[0])*shape[1] + (-m1+shape[1])%shape[1]
		want0, want1 := s.Psi[0][5]*cmplx.Rect(1, -eps(0, iu)), s.Psi[1][5]*cmplx.Rect(1, -eps(1, id))*complex(0, 1)
		s.Kinetic(&f, [2]complex128{1, complex(0, 1)})
		if d := cmplx.Abs(s.Psi[0][5] - want0); d > 1e-13 {
			t.Errorf("%v: ↑ after the kinetic step %v, want %v", be, s.Psi[0][5], want0)
		}
		if d := cmplx.Abs(s.Psi[1][5] - want1); d > 1e-13 {
			t.Errorf("%v: ↓ after the kinetic step %v, want %v", be, s.Psi[1][5], want1)
		}
		s.Close()
	}
}

// Repeated rotations by the angle a about an axis in the x–y plane drive a
// Rabi oscillation: P↓ = sin²(n a/2) after n of them (two-level physics,
// textbook), whatever the axis angle φ; every factor is unitary.
func TestStepperRotateRabi(t *testing.T) {
	s, err := NewStepper([]int{16}, fft.Default, fft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	r := NewLocalRotation(s.Len())
	a := 0.173
	for j := range r.Alpha {
		sn, cs := math.Sincos(a / 2)
		r.SetXY(j, cs, sn, cmplx.Rect(1, 0.4*float64(j)))
	}
	for j := range s.Psi[0] {
		s.Psi[0][j], s.Psi[1][j] = 1, 0
	}
	for n := 1; n <= 40; n++ {
		s.Rotate(&r)
		want := math.Pow(math.Sin(float64(n)*a/2), 2) * float64(s.Len())
		if d := math.Abs(s.SumSquares(1) - want); d > 1e-12 {
			t.Fatalf("after %d rotations: Σ|ψ↓|² = %.15g, Rabi %.15g", n, s.SumSquares(1), want)
		}
		if d := math.Abs(s.SumSquares(0) + s.SumSquares(1) - float64(s.Len())); d > 1e-12 {
			t.Fatalf("after %d rotations: norm off by %g", n, d)
		}
	}
}

// The step loop allocates nothing (style rule of the project).
func TestStepperAllocatesNothing(t *testing.T) {
	s, err := NewStepper([]int{64}, fft.Default, fft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	var f KineticFactors
	for c := range f {
		f[c] = make([]complex128, s.Len())
		for j := range f[c] {
			f[c][j] = complex(1/float64(s.Len()), 0)
		}
	}
	r := NewLocalRotation(s.Len())
	s.Psi[0][3] = 1
	if n := minAllocs(func() { // engine_test.go: robust to the runtime's own allocations
		s.Rotate(&r)
		s.Kinetic(&f, [2]complex128{1, 1})
		_ = s.Spectrum(1)
		_ = s.SumSquares(0)
	}); n != 0 {
		t.Errorf("a step allocates %v times", n)
	}
}
