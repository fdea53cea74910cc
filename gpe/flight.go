package gpe

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"socmap/gpe/fft"
)

// Finite time of flight: the exact free propagation of a released cloud.
//
// After the release the trap, the coupling and (here) the interactions are
// off; component σ then moves freely with its mechanical momentum
// q = k_x − σκ (the gauge of RTHamiltonian). Writing ψ_σ = e^{iσκx}φ_σ, φ_σ
// obeys the free Schrödinger equation, whose propagator over a time t in
// the units ħ = 1, m = 1/2 is (any quantum mechanics text)
//
//	K(x − x′, t) = (4πit)^{−1/2} exp(i(x − x′)²/4t),
//
// one factor per axis. Only the density along x is imaged (the column
// density, integrated over the other axes); because the free propagation
// along the other axes is unitary, ∫dy dz |ψ(x, y, z, t)|² is that of the
// state propagated along x alone, row by row. So every x row of φ_σ is
// propagated with the one-dimensional K, by one of two exact methods:
//
//   - Scaled Fresnel transform. Expanding (x − x′)² = x² − 2xx′ + x′²,
//
//     φ(X, t) = (4πit)^{−1/2} e^{iX²/4t} ∫dx′ e^{−iXx′/2t} [e^{ix′²/4t} φ(x′)],
//
//     the Fourier transform of the chirped state g(x′) = e^{ix′²/4t}φ(x′)
//     at the wavenumber X/2t. The DFT of the N samples of g at spacing Δx
//     gives it at the N wavenumbers k_m = 2πm/(NΔx), i.e. at the positions
//     X_m = 2t·k_m (spacing 4πt/(NΔx), the output grid grows with t), and
//     |φ(X_m, t)|² = (Δx²/4πt)|DFT_m g|². This is exact when g is band
//     limited below the grid's π/Δx: its local wavenumber is
//     q + x′/2t, so with the cloud within |x′| ≤ R and its momenta within
//     |q| ≤ q_max the condition is q_max + R/2t < π/Δx — the same
//     condition puts the expanded cloud, |X| ≤ R + 2q_max t, inside the
//     output period 4πt/Δx. It fails at short times.
//   - Grown box. The kinetic propagator e^{−iq²t}, exact in k, applied in a
//     periodic box grown (zero padding at the same Δx) to hold the expanded
//     cloud, |X| ≤ R + 2q_max t; no wrap-around then. Needs the cloud to
//     vanish at the edges of its own box (a trap), and grows with t.
//
// FlightAuto takes the Fresnel transform when its condition holds and the
// grown box otherwise; at the crossover t = R/2(π/Δx − q_max) the grown
// box is 2R + 4q_max t ≲ 4R wide for q_max ≤ π/2Δx, so neither method ever
// needs a large grid. R and q_max are the largest |x| and |q| where the
// density and the momentum weight exceed FlightTol of their peaks. A
// uniform gas in a periodic box (no edge) is propagated in its own box
// (FlightPeriodic): the density of an infinitely extended gas.

// FlightMethod chooses how FreeFlight propagates.
type FlightMethod int

const (
	FlightAuto     FlightMethod = iota // Fresnel when its condition holds, else the grown box
	FlightFresnel                      // scaled Fresnel transform (one DFT per row)
	FlightBox                          // kinetic propagator in a grown box
	FlightPeriodic                     // kinetic propagator in the state's own periodic box
)

func (m FlightMethod) String() string {
	switch m {
	case FlightAuto:
		return "auto"
	case FlightFresnel:
		return "scaled Fresnel transform"
	case FlightBox:
		return "kinetic propagator in a grown box"
	case FlightPeriodic:
		return "kinetic propagator in the periodic box"
	}
	return fmt.Sprintf("FlightMethod(%d)", int(m))
}

// FlightTol is the fraction of its peak below which the density (along x)
// and the momentum weight count as empty when FreeFlight takes the cloud's
// extent R and its largest momentum q_max (a choice of this project: the
// weight beyond is ≲ 1e-9 of the atoms for Gaussian tails).
const FlightTol = 1e-10

// FlightMaxPoints caps the points of a grown box (all rows together).
const FlightMaxPoints = 1 << 24

// Flight is a cloud after a finite time of flight.
type Flight struct {
	Method FlightMethod // the method used
	T      float64      // time of flight, ħ/E_ref
	// X: positions along x, ascending, 1/k_ref. Density[σ][i] is the
	// x-marginal of component σ at X[i] (atoms per 1/k_ref: Σ n ΔX is the
	// component's norm), the image after a Stern–Gerlach separation.
	X       []float64
	Density [2][]float64
	// R, QMax: the cloud's extent |x| and largest |q| at the release
	// (1/k_ref, k_ref; FlightTol).
	R, QMax float64
}

// FreeFlight propagates st (the components in the gauge of an
// RTHamiltonian with recoil kappa) freely for the time t ≥ 0 (ħ/E_ref) and
// returns the densities along x. Errors: a negative or infinite t, a
// forced Fresnel transform whose condition fails, a grown box beyond
// FlightMaxPoints.
func FreeFlight(st *State, kappa, t float64, method FlightMethod) (*Flight, error) {
	if st == nil || st.Grid == nil {
		return nil, errors.New("gpe: free flight: no state")
	}
	if !(t >= 0) || math.IsInf(t, 0) {
		return nil, fmt.Errorf("gpe: free flight: time %g, need ≥ 0 and finite", t)
	}
	g := st.Grid
	nx, inner := g.N[0], g.Size/g.N[0]
	dx := g.Dx[0]
	tv := g.DV / dx // transverse cell volume
	f := &Flight{T: t}
	// Extent and momenta.
	nxd := st.DensityX()
	peak := 0.0
	for _, v := range nxd {
		peak = math.Max(peak, v)
	}
	for i, v := range nxd {
		if v > FlightTol*peak {
			f.R = math.Max(f.R, math.Abs(g.X[0][i]))
		}
	}
	tr, err := fft.New([]int{nx}, fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	defer tr.Close()
	row := fft.Aligned(nx)
	var wq [2][]float64
	wmax := 0.0
	for c := 0; c < 2; c++ {
		wq[c] = make([]float64, nx)
		for r := 0; r < inner; r++ {
			for i := range row {
				row[i] = st.Psi[c][i*inner+r]
			}
			tr.Forward(row)
			for i, v := range row {
				wq[c][i] += abs2(v)
			}
		}
		for _, v := range wq[c] {
			wmax = math.Max(wmax, v)
		}
	}
	for c := 0; c < 2; c++ {
		sgn := 1 - 2*float64(c)
		for i, v := range wq[c] {
			if v > FlightTol*wmax {
				f.QMax = math.Max(f.QMax, math.Abs(g.K[0][i]-sgn*kappa))
			}
		}
	}
	kNyq := math.Pi / dx
	fresnelOK := t > 0 && f.QMax+f.R/(2*t) < kNyq
	switch method {
	case FlightAuto:
		method = FlightBox
		if fresnelOK {
			method = FlightFresnel
		}
	case FlightFresnel:
		if !fresnelOK {
			return nil, fmt.Errorf("gpe: free flight: the scaled Fresnel transform needs q_max + R/2t < π/Δx (%.4g + %.4g/2t ≥ %.4g at t = %.4g)", f.QMax, f.R, kNyq, t)
		}
	case FlightBox, FlightPeriodic:
	default:
		return nil, fmt.Errorf("gpe: free flight: unknown method %d", int(method))
	}
	if t == 0 {
		method = FlightPeriodic
	}
	f.Method = method
	switch method {
	case FlightFresnel:
		// Output X_m = 2t k_m, ascending (k in FFT order).
		f.X = make([]float64, nx)
		order := ascending(g.K[0])
		for m, j := range order {
			f.X[m] = 2 * t * g.K[0][j]
		}
		scale := dx * dx / (4 * math.Pi * t) * tv
		for c := 0; c < 2; c++ {
			sgn := 1 - 2*float64(c)
			d := make([]float64, nx)
			for r := 0; r < inner; r++ {
				for i := range row {
					x := g.X[0][i]
					// g(x) = e^{ix²/4t} e^{−iσκx} ψ(x)
					row[i] = st.Psi[c][i*inner+r] * cmplx.Rect(1, x*x/(4*t)-sgn*kappa*x)
				}
				tr.Forward(row)
				for m, j := range order {
					d[m] += abs2(row[j]) * scale
				}
			}
			f.Density[c] = d
		}
	case FlightPeriodic:
		f.X = append([]float64(nil), g.X[0]...)
		inv := 1 / float64(nx)
		for c := 0; c < 2; c++ {
			sgn := 1 - 2*float64(c)
			d := make([]float64, nx)
			for r := 0; r < inner; r++ {
				for i := range row {
					row[i] = st.Psi[c][i*inner+r]
				}
				tr.Forward(row)
				for i := range row {
					q := g.K[0][i] - sgn*kappa
					row[i] *= cmplx.Rect(inv, -q*q*t)
				}
				tr.Backward(row)
				for i, v := range row {
					d[i] += abs2(v) * tv
				}
			}
			f.Density[c] = d
		}
	case FlightBox:
		need := 2*(f.R+2*f.QMax*t) + 8*dx
		np := FFTSize(max(nx, int(math.Ceil(need/dx))), FlightMaxPoints/inner)
		if np == 0 || np*inner > FlightMaxPoints {
			return nil, fmt.Errorf("gpe: free flight: a grown box of %.4g (1/k_ref) needs more than %d points; use the Fresnel transform (longer time of flight)", need, FlightMaxPoints)
		}
		off := (np - nx) / 2
		f.X = make([]float64, np)
		for j := range f.X {
			f.X[j] = g.X[0][0] + float64(j-off)*dx
		}
		big, err := fft.New([]int{np}, fft.Default, fft.Options{})
		if err != nil {
			return nil, err
		}
		defer big.Close()
		buf := fft.Aligned(np)
		kb := make([]complex128, np)
		lb := float64(np) * dx
		for j := range kb {
			m := j
			if 2*j >= np {
				m = j - np
			}
			q := 2 * math.Pi * float64(m) / lb
			kb[j] = cmplx.Rect(1/float64(np), -q*q*t)
		}
		for c := 0; c < 2; c++ {
			sgn := 1 - 2*float64(c)
			d := make([]float64, np)
			for r := 0; r < inner; r++ {
				for i := range buf {
					buf[i] = 0
				}
				for i := 0; i < nx; i++ {
					x := g.X[0][i]
					buf[off+i] = st.Psi[c][i*inner+r] * cmplx.Rect(1, -sgn*kappa*x)
				}
				big.Forward(buf)
				for i := range buf {
					buf[i] *= kb[i]
				}
				big.Backward(buf)
				for i, v := range buf {
					d[i] += abs2(v) * tv
				}
			}
			f.Density[c] = d
		}
	}
	return f, nil
}

// ascending returns the indices of k in ascending order of k (FFT order:
// the negative half first).
func ascending(k []float64) []int {
	n := len(k)
	o := make([]int, 0, n)
	for j := (n + 1) / 2; j < n; j++ {
		o = append(o, j)
	}
	for j := 0; j < (n+1)/2; j++ {
		o = append(o, j)
	}
	return o
}

// Moments returns the atoms, mean and rms width of Density[c] (c = 2: both
// components) in 1/k_ref.
func (f *Flight) Moments(c int) (n, mean, rms float64) {
	var s0, s1, s2 float64
	for i, x := range f.X {
		v := 0.0
		if c == 0 || c == 2 {
			v += f.Density[0][i]
		}
		if c == 1 || c == 2 {
			v += f.Density[1][i]
		}
		s0 += v
		s1 += v * x
		s2 += v * x * x
	}
	if s0 == 0 {
		return 0, math.NaN(), math.NaN()
	}
	dX := 0.0
	if len(f.X) > 1 {
		dX = f.X[1] - f.X[0]
	}
	mean = s1 / s0
	return s0 * dX, mean, math.Sqrt(math.Max(0, s2/s0-mean*mean))
}
