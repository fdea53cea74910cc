package phases

import (
	"fmt"
	"math"
)

// BraggProblem is a Bragg measurement at one momentum transfer along x.
type BraggProblem struct {
	// Q: momentum transfer ħq of the Bragg beams along x (k_R); for a stripe
	// a total momentum (any zone).
	Q float64
	// Duration τ of a rectangular Bragg pulse (ħ/E_R), > 0. It sets the
	// frequency resolution (see BraggKernel).
	Duration float64
	// Points: frequencies of the broadened spectrum. Default 400.
	Points int
	// OmegaMax (E_R): upper end of the frequency axis; 0 chooses the
	// highest line carrying ≥ 0.1 % of the f-sum plus 4 FWHM.
	OmegaMax float64
}

// BraggResult is the Bragg response at one momentum.
type BraggResult struct {
	Q, Duration float64
	FWHM        float64 // full width at half maximum of the resolution (E_R)
	// Lines: the modes at +Q (frequency, density and spin weight), and the
	// density weights of the modes at −Q (for the net signal).
	Lines       []Mode
	MinusWeight []float64
	MinusOmega  []float64
	// StaticS: S(Q) = Σ Density; FSum: Σ ω·Density (= Q² by the f-sum rule,
	// over the reported modes).
	StaticS, FSum float64
	// Omega: frequency axis (E_R), from 0 to OmegaMax.
	Omega []float64
	// Density, Spin: S(Q, ω) and the spin structure factor broadened by the
	// pulse, Σ_j Z_j K_τ(ω − ω_j) (1/E_R per particle).
	Density, Spin []float64
	// Signal: the net momentum-transfer rate per particle (in units of ħQ
	// times the squared Bragg coupling), broadened by the pulse,
	// Σ_j [Z_j(Q) K_τ(ω − ω_j) − Z_j(−Q) K_τ(ω + ω_j)] (1/E_R): at T = 0 the
	// beams both create excitations at +Q (absorbing ħω) and at −Q (emitting
	// ħω), and only the difference moves the cloud.
	Signal []float64
}

// BraggKernel is the line shape of a rectangular pulse of duration τ in
// first-order perturbation theory (the Fermi golden rule at finite time),
// normalised to unit area:
//
//	K_τ(Δ) = 2 sin²(Δτ/2) / (π τ Δ²),   K_τ(0) = τ/(2π),
//
// (∫ sin²(aΔ)/Δ² dΔ = πa). Its full width at half maximum is
// 4·1.3915573783/τ = 5.5662295/τ (sinc²(x) = ½ at x = 1.3915573783, scipy brentq).
func BraggKernel(delta, tau float64) float64 {
	x := 0.5 * delta * tau
	if math.Abs(x) < 1e-6 {
		return tau / (2 * math.Pi) * (1 - x*x/3)
	}
	s := math.Sin(x)
	return 2 * s * s / (math.Pi * tau * delta * delta)
}

// BraggFWHM is the FWHM (E_R) of BraggKernel for a pulse of duration τ (ħ/E_R).
func BraggFWHM(tau float64) float64 { return 4 * 1.3915573782515103 / tau }

func bragg(sp spectrum, p BraggProblem) (BraggResult, error) {
	r := BraggResult{Q: p.Q, Duration: p.Duration}
	if !(p.Duration > 0) || math.IsInf(p.Duration, 0) {
		return r, fmt.Errorf("phases: Bragg pulse duration %g: must be positive and finite", p.Duration)
	}
	if math.IsNaN(p.Q) || math.IsInf(p.Q, 0) {
		return r, fmt.Errorf("phases: Bragg momentum %g: not finite", p.Q)
	}
	if p.Points <= 0 {
		p.Points = 400
	}
	r.FWHM = BraggFWHM(p.Duration)
	plus, _, err := sp.modes(p.Q, QAlongX, true)
	if err != nil {
		return r, err
	}
	minus, _, err := sp.modes(-p.Q, QAlongX, true)
	if err != nil {
		return r, err
	}
	r.Lines = plus
	for _, m := range minus {
		r.MinusOmega = append(r.MinusOmega, m.Omega)
		r.MinusWeight = append(r.MinusWeight, m.Density)
	}
	r.StaticS, r.FSum = sumMoments(plus)
	wmax := p.OmegaMax
	if wmax <= 0 {
		for _, m := range plus {
			if !math.IsNaN(m.Density) && m.Omega*m.Density >= 1e-3*p.Q*p.Q {
				wmax = math.Max(wmax, m.Omega)
			}
		}
		wmax += 4 * r.FWHM
	}
	r.Omega = make([]float64, p.Points)
	r.Density = make([]float64, p.Points)
	r.Spin = make([]float64, p.Points)
	r.Signal = make([]float64, p.Points)
	for i := range r.Omega {
		w := wmax * float64(i) / float64(p.Points-1)
		r.Omega[i] = w
		for _, m := range plus {
			if math.IsNaN(m.Density) || m.Growth > 0 {
				continue
			}
			k := BraggKernel(w-m.Omega, p.Duration)
			r.Density[i] += m.Density * k
			r.Spin[i] += m.Spin * k
			r.Signal[i] += m.Density * k
		}
		for _, m := range minus {
			if math.IsNaN(m.Density) || m.Growth > 0 {
				continue
			}
			r.Signal[i] -= m.Density * BraggKernel(w+m.Omega, p.Duration)
		}
	}
	return r, nil
}
