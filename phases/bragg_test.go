package phases

import (
	"math"
	"testing"
)

// The pulse line shape: unit area (∫ sin²(aΔ)/Δ² dΔ = πa) and the FWHM
// 5.566/τ of sinc² (common practice, no source), numerically.
func TestBraggKernel(t *testing.T) {
	tau := 7.0
	var area float64
	h := 1e-3
	for x := -2000.0; x <= 2000; x += h {
		area += BraggKernel(x, tau) * h
	}
	// The tails beyond |Δ| = X hold 2·∫ 1/(πτΔ²) ≈ 2/(πτX) on average.
	if math.Abs(area-(1-2/(math.Pi*tau*2000))) > 1e-4 {
		t.Errorf("area %.6g", area)
	}
	half := BraggFWHM(tau) / 2
	if r := BraggKernel(half, tau) / BraggKernel(0, tau); math.Abs(r-0.5) > 1e-9 {
		t.Errorf("K(FWHM/2)/K(0) = %.10g", r)
	}
}

// The Bragg spectrum of the single-minimum phase: the broadened S(q, ω)
// peaks at the lower mode, its area is the static S(q) (up to the sinc²
// tails outside the window), the f-sum holds for the lines, and the net
// signal equals S(q, ω) far from ω = 0 (the −q term only leaks near 0).
func TestBraggResponse(t *testing.T) {
	u := Symmetric(5, 1, 0.1)
	bp := &BraggProblem{Q: 1, Duration: 40, Points: 4001, OmegaMax: 12}
	r := mustExcite(t, ExcitationProblem{Uniform: u, Q: []float64{1}, Bragg: bp}, nil)
	b := r.Bragg
	if math.Abs(b.FSum-1) > 1e-10 || math.Abs(b.StaticS-r.StaticS[0]) > 1e-14 {
		t.Errorf("Bragg f-sum %g, S %g vs %g", b.FSum, b.StaticS, r.StaticS[0])
	}
	imax := 0
	var area float64
	dw := b.Omega[1] - b.Omega[0]
	for i, v := range b.Density {
		if v > b.Density[imax] {
			imax = i
		}
		area += v * dw
	}
	if math.Abs(b.Omega[imax]-b.Lines[0].Omega) > dw {
		t.Errorf("peak at %g, lower mode at %g", b.Omega[imax], b.Lines[0].Omega)
	}
	if math.Abs(area-b.StaticS) > 0.01*b.StaticS {
		t.Errorf("area %g, S(q) %g", area, b.StaticS)
	}
	if d := b.Signal[imax] - b.Density[imax]; math.Abs(d) > 1e-3*b.Density[imax] {
		t.Errorf("signal %g vs S %g at the peak", b.Signal[imax], b.Density[imax])
	}
}
