package gpe

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
)

// In-situ imaging of a stripe: the density along x (integrated over the
// transverse axes: the column density of a camera looking along y or z,
// integrated over the other image axis) blurred by the imaging point-spread
// function, binned into camera pixels and read with photon shot noise; the
// stripe contrast before and after, the signal-to-noise ratio of the 2k₁
// Fourier peak and a verdict. Lengths are in any one unit (the caller's;
// socmap passes metres).

// Imaging describes the camera.
type Imaging struct {
	// ResolutionFWHM: full width at half maximum of the Gaussian
	// point-spread function in the object plane (σ = FWHM/(2√(2 ln 2)) ≈
	// FWHM/2.355). 0: a perfect lens.
	ResolutionFWHM float64
	// Pixel: camera pixel size (in the image plane); Magnification M maps
	// it to Pixel/M in the object plane. Pixel 0: no binning.
	Pixel, Magnification float64
	// Photons: detected photons per pixel of the probe (absorption
	// imaging, shot-noise limited). 0: no noise.
	Photons float64
	// CrossSection: resonant absorption cross-section σ₀ (area unit²; 3λ²/2π
	// for a cycling transition, common practice, no source), and PixelArea
	// the object-plane area of one pixel, for the optical depth
	// OD = σ₀ n_col; with Height the extent of the column along the image's
	// second axis (the integrated density along x is spread over it).
	CrossSection, Height float64
	// Seed of the noise realisation (the SNR is computed from the expected
	// noise, not from the realisation).
	Seed uint64
}

// ImageResult is the outcome of imaging one profile.
type ImageResult struct {
	X       []float64 // pixel centres (object plane)
	Ideal   []float64 // the blurred, binned profile (atoms per pixel)
	Noisy   []float64 // one noisy realisation
	Sigma   []float64 // expected noise per pixel (atoms)
	PSFSig  float64   // σ of the PSF
	PixelOb float64   // pixel size in the object plane
	// ContrastInSitu and ContrastImaged: the stripe contrast C of
	// n ∝ 1 + C cos(2k₁x + φ), estimated as 2|Σ w n e^{−i2k₁x}|/Σ w n with a
	// Hann window w over the central region, before and after imaging.
	ContrastInSitu, ContrastImaged float64
	// Transfer is the analytic contrast transfer exp(−(2k₁)²σ²/2)·sinc(k₁p)
	// of the Gaussian PSF and the pixel box of width p (object plane).
	Transfer float64
	// SNR2K1: |signal| of the 2k₁ Fourier amplitude of the imaged profile
	// over its expected noise standard deviation.
	SNR2K1 float64
}

// StripeContrast estimates the contrast C of a stripe of wavenumber 2k1 in
// a profile n(x) on equally spaced points: 2|Σ w n e^{−i2k₁x}|/Σ w n with a
// Hann window w over |x − x̄| < half (x̄ the density-weighted centre; half
// 0: the region where n > n_max/2, i.e. the central part of the cloud).
// For a uniform n₀(1 + C cos 2k₁x) over many periods it returns C (the
// window's leakage at 2k₁ is below 1e-3 for more than 4 periods).
func StripeContrast(x, n []float64, k1, half float64) float64 {
	if k1 == 0 || len(x) < 4 {
		return 0
	}
	var s0, s1, nmax float64
	for i := range n {
		s0 += n[i]
		s1 += n[i] * x[i]
		nmax = math.Max(nmax, n[i])
	}
	if !(s0 > 0) {
		return 0
	}
	xc := s1 / s0
	if half == 0 {
		lo, hi := math.Inf(1), math.Inf(-1)
		for i := range n {
			if n[i] > nmax/2 {
				lo, hi = math.Min(lo, x[i]), math.Max(hi, x[i])
			}
		}
		half = math.Max(hi-xc, xc-lo)
	}
	var num complex128
	var den float64
	for i := range n {
		u := (x[i] - xc) / half
		if math.Abs(u) >= 1 {
			continue
		}
		w := 0.5 * (1 + math.Cos(math.Pi*u))
		num += complex(w*n[i], 0) * cmplx.Rect(1, -2*k1*x[i])
		den += w * n[i]
	}
	if den == 0 {
		return 0
	}
	return 2 * cmplx.Abs(num) / den
}

// ErrImaging marks bad imaging settings.
var ErrImaging = errors.New("bad imaging settings")

// Image images the profile n(x) (atoms per unit length on equally spaced
// x) of a stripe of wavenumber 2k1 with the camera im.
func Image(x, n []float64, k1 float64, im Imaging) (*ImageResult, error) {
	if im.ResolutionFWHM < 0 || im.Pixel < 0 || im.Photons < 0 || im.Magnification < 0 {
		return nil, ErrImaging
	}
	if len(x) < 2 {
		return nil, ErrImaging
	}
	dx := x[1] - x[0]
	res := &ImageResult{PSFSig: im.ResolutionFWHM / (2 * math.Sqrt(2*math.Ln2))}
	half := 0.0
	res.ContrastInSitu = StripeContrast(x, n, k1, half)
	// Blur: Gaussian convolution on the (non-periodic) profile.
	blur := n
	if s := res.PSFSig; s > 0 {
		blur = make([]float64, len(n))
		r := int(math.Ceil(6 * s / dx))
		ker := make([]float64, 2*r+1)
		ks := 0.0
		for i := range ker {
			u := float64(i-r) * dx / s
			ker[i] = math.Exp(-u * u / 2)
			ks += ker[i]
		}
		for i := range n {
			acc := 0.0
			for j := -r; j <= r; j++ {
				if i+j >= 0 && i+j < len(n) {
					acc += ker[j+r] * n[i+j]
				}
			}
			blur[i] = acc / ks
		}
	}
	// Bin into pixels of the object-plane size p (atoms per pixel).
	p := 0.0
	if im.Pixel > 0 {
		m := im.Magnification
		if m == 0 {
			m = 1
		}
		p = im.Pixel / m
	}
	res.PixelOb = p
	if p > dx {
		x0 := x[0] - dx/2
		np := int(math.Floor(float64(len(x)) * dx / p))
		res.X, res.Ideal = make([]float64, np), make([]float64, np)
		for i := range res.X {
			res.X[i] = x0 + (float64(i)+0.5)*p
		}
		for i, v := range blur {
			// split each grid cell over the pixels it overlaps
			a, b := x[i]-dx/2-x0, x[i]+dx/2-x0
			for pi := int(math.Floor(a / p)); pi <= int(math.Floor(b/p)) && pi < np; pi++ {
				if pi < 0 {
					continue
				}
				lo, hi := math.Max(a, float64(pi)*p), math.Min(b, float64(pi+1)*p)
				if hi > lo {
					res.Ideal[pi] += v * (hi - lo)
				}
			}
		}
	} else {
		res.X = append([]float64(nil), x...)
		res.Ideal = make([]float64, len(blur))
		for i, v := range blur {
			res.Ideal[i] = v * dx
		}
		p = dx
	}
	res.Transfer = math.Exp(-2 * k1 * k1 * res.PSFSig * res.PSFSig)
	if res.PixelOb > 0 && k1 > 0 {
		res.Transfer *= math.Sin(k1*res.PixelOb) / (k1 * res.PixelOb)
	}
	res.ContrastImaged = StripeContrast(res.X, res.Ideal, k1, half)
	// Shot noise of absorption imaging: OD = σ₀N/A per pixel of area
	// A = p·Height; with N_ph photons per pixel the transmitted count is
	// N_ph e^{−OD}, and δOD² = (1 + e^{OD})/N_ph (shot noise of the probe
	// and the reference image), δN = (A/σ₀) δOD (common practice, no source).
	res.Sigma = make([]float64, len(res.Ideal))
	res.Noisy = append([]float64(nil), res.Ideal...)
	if im.Photons > 0 && im.CrossSection > 0 && im.Height > 0 {
		area := p * im.Height
		rng := rand.New(rand.NewPCG(im.Seed, 0x5eed))
		for i, v := range res.Ideal {
			od := im.CrossSection * v / area
			dod := math.Sqrt((1 + math.Exp(od)) / im.Photons)
			res.Sigma[i] = area / im.CrossSection * dod
			res.Noisy[i] += res.Sigma[i] * rng.NormFloat64()
		}
	}
	// SNR of the 2k₁ amplitude: signal |Σ w N e^{−i2k₁x}| against the noise
	// std √(Σ w² σ² / 2)·√2 of the same complex sum (independent pixels).
	res.SNR2K1 = snr2k1(res.X, res.Ideal, res.Sigma, k1)
	return res, nil
}

func snr2k1(x, n, sig []float64, k1 float64) float64 {
	var s0, s1, nmax float64
	for i := range n {
		s0 += n[i]
		s1 += n[i] * x[i]
		nmax = math.Max(nmax, n[i])
	}
	if !(s0 > 0) || k1 == 0 {
		return 0
	}
	xc := s1 / s0
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range n {
		if n[i] > nmax/2 {
			lo, hi = math.Min(lo, x[i]), math.Max(hi, x[i])
		}
	}
	half := math.Max(hi-xc, xc-lo)
	var num complex128
	var noise float64
	for i := range n {
		u := (x[i] - xc) / half
		if math.Abs(u) >= 1 {
			continue
		}
		w := 0.5 * (1 + math.Cos(math.Pi*u))
		num += complex(w*n[i], 0) * cmplx.Rect(1, -2*k1*x[i])
		noise += w * w * sig[i] * sig[i]
	}
	if noise == 0 {
		return math.Inf(1)
	}
	// The complex sum's noise has variance Σw²σ² split over its two parts;
	// |signal| against the rms of its projection on the signal direction.
	return cmplx.Abs(num) / math.Sqrt(noise/2)
}
