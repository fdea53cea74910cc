package gpe

import (
	"math"
	"testing"
)

// A synthetic stripe n ∝ 1 + C cos 2k₁x of known contrast through a Gaussian
// PSF keeps its period and loses contrast by exp(−(2k₁)²σ²/2), σ = FWHM/2.355
// (the Fourier transform of a Gaussian; textbook optics); pixels of width p
// multiply by sinc(k₁p) (the box's transform at 2k₁). Checked on a broad flat
// cloud (the estimator's window spans many periods).
func TestImagingContrastTransfer(t *testing.T) {
	n := 8192
	L := 400.0 // µm, say
	x := make([]float64, n)
	d := make([]float64, n)
	k1 := 2 * math.Pi / 2.0 / 2 // period π/k₁ = 2
	C := 0.07
	for i := range x {
		x[i] = -L/2 + L*float64(i)/float64(n)
		env := 0.0
		if u := x[i] / 150; math.Abs(u) < 1 {
			env = 1
		}
		d[i] = 1000 * env * (1 + C*math.Cos(2*k1*x[i]))
	}
	if c := StripeContrast(x, d, k1, 100); math.Abs(c-C) > 1e-4 {
		t.Fatalf("in-situ contrast %.6f, want %.3f", c, C)
	}
	for _, fwhm := range []float64{0.3, 0.6, 1.0} {
		r, err := Image(x, d, k1, Imaging{ResolutionFWHM: fwhm})
		if err != nil {
			t.Fatal(err)
		}
		s := fwhm / 2.355
		want := C * math.Exp(-math.Pow(2*k1*s, 2)/2)
		got := StripeContrast(r.X, r.Ideal, k1, 100)
		if math.Abs(got/want-1) > 2e-3 {
			t.Errorf("FWHM %g: imaged contrast %.6f, want %.6f", fwhm, got, want)
		}
		if math.Abs(r.Transfer*C/want-1) > 1e-3 {
			t.Errorf("FWHM %g: analytic transfer %.6f, want %.6f", fwhm, r.Transfer, want/C)
		}
	}
	// Pixels (object plane 0.4) on top of the PSF.
	r, _ := Image(x, d, k1, Imaging{ResolutionFWHM: 0.3, Pixel: 2.0, Magnification: 5})
	want := C * math.Exp(-math.Pow(2*k1*0.3/2.355, 2)/2) * math.Sin(k1*0.4) / (k1 * 0.4)
	if got := StripeContrast(r.X, r.Ideal, k1, 100); math.Abs(got/want-1) > 5e-3 {
		t.Errorf("with pixels: contrast %.6f, want %.6f", got, want)
	}
	// Bad settings are refused.
	if _, err := Image(x, d, k1, Imaging{ResolutionFWHM: -1}); err == nil {
		t.Error("negative resolution accepted")
	}
}

// The SNR of the 2k₁ peak grows as √(photons) at low optical depth (shot
// noise ∝ 1/√N_ph; common practice, no source).
func TestImagingSNRScaling(t *testing.T) {
	n := 2048
	x := make([]float64, n)
	d := make([]float64, n)
	k1 := 1.0
	for i := range x {
		x[i] = -100 + 200*float64(i)/float64(n)
		d[i] = math.Exp(-x[i]*x[i]/(2*40*40)) * (1 + 0.1*math.Cos(2*k1*x[i]))
	}
	im := Imaging{Photons: 100, CrossSection: 1e-3, Height: 10}
	a, _ := Image(x, d, k1, im)
	im.Photons = 400
	b, _ := Image(x, d, k1, im)
	if r := b.SNR2K1 / a.SNR2K1; math.Abs(r-2) > 1e-3 {
		t.Errorf("SNR ratio for 4× photons %.4f, want 2", r)
	}
}
