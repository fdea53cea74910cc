package gpe

import (
	"math"
	"math/cmplx"

	"socmap/gpe/fft"
)

// Grid-independent shape observables: the momentum of a peak and the
// density contrast, defined on the continuous state that the grid samples
// (its trigonometric interpolant) rather than on the grid points, so that a
// state translated by a fraction of a grid step gives the same numbers (to
// rounding).
//
// Momentum peaks. In a periodic box (no potential) every state is a sum of
// grid momenta 2πm/L: the peak momentum is the grid momentum of its bin,
// exactly. A localised state (harmonic trap, hard box) has a continuous
// momentum distribution; its peak is the maximum of
//
//	n(k) = Σ_c Σ_⊥ |Σ_x ψ_c(x, r⊥) e^{−ikx}|²,
//
// the discrete-time Fourier transform of the samples along x (the limit of
// infinite zero padding), found by a safeguarded Newton search within one
// bin of the grid maximum. It does not depend on the origin of x.
//
// Contrast. With the density along x n(x) = ∫(|ψ↑|² + |ψ↓|²) dy dz:
//
//   - periodic box: (n_max − n_min)/(n_max + n_min) of the continuous n(x):
//     ψ is zero-padded to twice the points along x (so that |ψ|² is sampled
//     without aliasing), and the extrema of the trigonometric series of n are
//     refined by Newton steps from the best samples;
//   - hard box: the same, over the central half |x| < W_x/4;
//   - harmonic trap: the envelope is removed by demodulation at 2k₁ against
//     the local mean density: with a Gaussian window w(x) of rms width
//     σ_w = 2π/k₁ (two stripe periods) centred on the cloud's centre of mass
//     x_c, C = |2 ∫ w n e^{−2ik₁x} dx| / ∫ w n dx. For n = n̄(x)(1 + C
//     cos(2k₁x + φ)) with an envelope n̄ smooth on the scale of the period
//     this is C at the centre of the cloud, the same number as (n_max −
//     n_min)/(n_max + n_min) of the cosine; the envelope's own share at 2k₁
//     is suppressed by exp(−(2k₁σ_w)²/2) = exp(−8π²) ≈ 7e-35. Compare with
//     the uniform value at the peak density. 0 when k₁ is below the
//     classifier's single-minimum threshold (no stripe wavenumber).

// ContrastWindowPeriods is σ_w of the trapped contrast in stripe periods π/k₁
// (two periods: σ_w = 2π/k₁).
const ContrastWindowPeriods = 2

// ContrastDefinition names the definition of Observables.Contrast for a
// potential, for tables and files.
func ContrastDefinition(k PotentialKind) string {
	switch k {
	case Harmonic:
		return "2|∫w n e^{−2ik₁x}dx| / ∫w n dx: 2k₁ amplitude over the local mean density, Gaussian window σ = 2π/k₁ at the cloud centre (envelope removed)"
	case HardBox:
		return "(n_max − n_min)/(n_max + n_min) of the continuous density along x over the central half of the box"
	}
	return "(n_max − n_min)/(n_max + n_min) of the continuous density along x"
}

// dtftMarginal holds ψ in blocks along x for the evaluation of n(k).
type dtftMarginal struct {
	st *State
	t  int // transverse block size
	f0 []complex128
	f1 []complex128
	f2 []complex128
}

func newDTFT(st *State) *dtftMarginal {
	t := st.Grid.Size / st.Grid.N[0]
	return &dtftMarginal{st: st, t: t, f0: make([]complex128, t), f1: make([]complex128, t), f2: make([]complex128, t)}
}

// eval returns n(k) and its first two derivatives.
func (d *dtftMarginal) eval(k float64) (n, n1, n2 float64) {
	g := d.st.Grid
	for c := 0; c < 2; c++ {
		for r := range d.f0 {
			d.f0[r], d.f1[r], d.f2[r] = 0, 0, 0
		}
		psi := d.st.Psi[c]
		for i, x := range g.X[0] {
			s, co := math.Sincos(-k * x)
			e := complex(co, s)
			e1 := complex(0, -x) * e
			e2 := complex(-x*x, 0) * e
			blk := psi[i*d.t : (i+1)*d.t]
			for r, v := range blk {
				d.f0[r] += v * e
				d.f1[r] += v * e1
				d.f2[r] += v * e2
			}
		}
		for r := range d.f0 {
			f, f1, f2 := d.f0[r], d.f1[r], d.f2[r]
			n += abs2(f)
			n1 += 2 * real(cmplx.Conj(f)*f1)
			n2 += 2 * (abs2(f1) + real(cmplx.Conj(f)*f2))
		}
	}
	return
}

// refinePeak returns the maximum of n(k) within [k0 − dk, k0 + dk]
// (safeguarded Newton on n'(k) = 0, bisection when Newton leaves the bracket
// or the curvature is not negative).
func (d *dtftMarginal) refinePeak(k0, dk float64) float64 {
	lo, hi := k0-dk, k0+dk
	_, dlo, _ := d.eval(lo)
	_, dhi, _ := d.eval(hi)
	if !(dlo > 0 && dhi < 0) {
		return k0 // no interior maximum bracketed: keep the bin
	}
	k := k0
	for it := 0; it < 60; it++ {
		_, n1, n2 := d.eval(k)
		if n1 > 0 {
			lo = k
		} else {
			hi = k
		}
		next := k - n1/n2
		if !(n2 < 0) || !(next > lo && next < hi) {
			next = (lo + hi) / 2
		}
		if math.Abs(next-k) <= 1e-13*math.Max(1, math.Abs(k)) || hi-lo <= 1e-13*math.Max(1, math.Abs(k)) {
			return next
		}
		k = next
	}
	return k
}

// fineDensityX returns the total density along x (integrated over the
// transverse axes, atoms per 1/k_R) sampled without aliasing on 2·N[0]
// points x_j = −L/2 + j·Dx/2: ψ is interpolated along x by zero padding its
// transform, so the samples are those of the continuous |ψ|².
func fineDensityX(st *State) ([]float64, error) {
	return fineDensityXOf(st.Grid, st.Psi[:])
}

// fineDensityXOf is fineDensityX of the components psi (each on g; two for
// a pseudo-spin state, three for a spin-1 state).
func fineDensityXOf(g *Grid, psi [][]complex128) ([]float64, error) {
	nx := g.N[0]
	t := g.Size / nx
	m := 2 * nx
	tr1, err := fft.New([]int{nx}, fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	defer tr1.Close()
	tr2, err := fft.New([]int{m}, fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	defer tr2.Close()
	a := fft.Aligned(nx)
	b := fft.Aligned(m)
	n := make([]float64, m)
	tv := g.DV / g.Dx[0]
	for c := range psi {
		for r := 0; r < t; r++ {
			for i := 0; i < nx; i++ {
				a[i] = psi[c][i*t+r]
			}
			tr1.Forward(a)
			for i := range b {
				b[i] = 0
			}
			// FFT order: 0…nx/2−1 positive, nx/2…nx−1 negative momenta
			// (the Nyquist bin counted negative, as in Grid.K).
			h := nx / 2
			for i := 0; i < nx; i++ {
				j := i
				if i >= nx-h {
					j = i + nx
				}
				b[j] = a[i] / complex(float64(nx), 0)
			}
			tr2.Backward(b)
			for j, v := range b {
				n[j] += abs2(v) * tv
			}
		}
	}
	return n, nil
}

// trigSeries is the trigonometric interpolant of real samples y_j at
// x_j = x0 + j·h on a periodic interval of length L = len(y)·h.
type trigSeries struct {
	x0, L float64
	c     []complex128 // coefficients in FFT order, divided by len(y)
	k     []float64
}

func newTrigSeries(y []float64, x0, L float64) (*trigSeries, error) {
	m := len(y)
	tr, err := fft.New([]int{m}, fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	defer tr.Close()
	b := fft.Aligned(m)
	for i, v := range y {
		b[i] = complex(v, 0)
	}
	tr.Forward(b)
	s := &trigSeries{x0: x0, L: L, c: make([]complex128, m), k: make([]float64, m)}
	for i := range b {
		q := i
		if 2*i >= m {
			q = i - m
		}
		s.k[i] = 2 * math.Pi * float64(q) / L
		s.c[i] = b[i] / complex(float64(m), 0)
		if 2*i == m { // Nyquist term: its real part, as cos
			s.c[i] = complex(real(s.c[i]), 0)
		}
	}
	return s, nil
}

// eval returns the series and its first two derivatives at x.
func (s *trigSeries) eval(x float64) (f, f1, f2 float64) {
	u := x - s.x0
	for i, c := range s.c {
		k := s.k[i]
		if 2*i == len(s.c) {
			co := math.Cos(k * u)
			f += real(c) * co
			f1 -= real(c) * k * math.Sin(k*u)
			f2 -= real(c) * k * k * co
			continue
		}
		sn, co := math.Sincos(k * u)
		re := real(c)*co - imag(c)*sn
		im := real(c)*sn + imag(c)*co
		f += re
		f1 -= k * im
		f2 -= k * k * re
	}
	return
}

// extremum refines a maximum (sign +1) or minimum (sign −1) of the series
// from x within [lo, hi] by safeguarded Newton steps.
func (s *trigSeries) extremum(x, lo, hi, sign float64) float64 {
	best, _, _ := s.eval(x)
	best *= sign
	for it := 0; it < 40; it++ {
		f, f1, f2 := s.eval(x)
		if sign*f > best {
			best = sign * f
		}
		if !(sign*f2 < 0) {
			break
		}
		nx := math.Min(math.Max(x-f1/f2, lo), hi)
		if math.Abs(nx-x) < 1e-12*s.L {
			x = nx
			break
		}
		x = nx
	}
	f, _, _ := s.eval(x)
	return math.Max(best, sign*f) * sign
}

// contrastMaxMin returns (n_max − n_min)/(n_max + n_min) of the continuous
// density whose alias-free samples nf (on x_j = x0 + j·h) are given, over
// lo ≤ x < hi.
func contrastMaxMin(nf []float64, x0, h, lo, hi float64) (float64, error) {
	s, err := newTrigSeries(nf, x0, float64(len(nf))*h)
	if err != nil {
		return 0, err
	}
	iMax, iMin := -1, -1
	for j, v := range nf {
		x := x0 + float64(j)*h
		if x < lo || x >= hi {
			continue
		}
		if iMax < 0 || v > nf[iMax] {
			iMax = j
		}
		if iMin < 0 || v < nf[iMin] {
			iMin = j
		}
	}
	if iMax < 0 {
		return 0, nil
	}
	clamp := func(j int) (float64, float64) {
		x := x0 + float64(j)*h
		return math.Max(lo, x-h), math.Min(hi, x+h)
	}
	a, b := clamp(iMax)
	nmax := s.extremum(x0+float64(iMax)*h, a, b, 1)
	a, b = clamp(iMin)
	nmin := s.extremum(x0+float64(iMin)*h, a, b, -1)
	if !(nmax+nmin > 0) {
		return 0, nil
	}
	return (nmax - nmin) / (nmax + nmin), nil
}

// contrastDemod returns the trapped contrast (see the top of this file) of
// the density samples n (on x_j = x0 + j·h) at wavenumber k1 (k_R), and the
// window's rms width.
func contrastDemod(n []float64, x0, h, k1 float64) (float64, float64) {
	var n0, mx float64
	for j, v := range n {
		x := x0 + float64(j)*h
		n0 += v
		mx += x * v
	}
	if !(n0 > 0) || !(k1 > 0) {
		return 0, 0
	}
	mx /= n0
	sw := ContrastWindowPeriods * math.Pi / k1
	var mean float64
	var amp complex128
	for j, v := range n {
		x := x0 + float64(j)*h
		u := (x - mx) / sw
		w := math.Exp(-u * u / 2)
		sn, co := math.Sincos(-2 * k1 * (x - mx))
		mean += w * v
		amp += complex(w*v*co, w*v*sn)
	}
	if !(mean > 0) {
		return 0, sw
	}
	return 2 * cmplx.Abs(amp) / mean, sw
}
