package phases

import (
	"fmt"
	"math"

	"socmap/dispersion"
)

// The density of a trapped cloud, one rule for `ground`, `compare` and (later)
// GPE maps of trapped clouds.
//
// A grid of dimension d < 3 freezes out the other axes with the reduced
// couplings g_1D = g/(2π a⊥²) (a⊥ = √(ħ/mω⊥), ω⊥ = √(ω_y ω_z)) or
// g_2D = g/(√(2π) a_z). They hold while the transverse motion stays in its
// ground state, μ ≲ ħω⊥ (common practice, no source; this project flags
// μ > ReducedValidityLimit·ħω⊥, with μ the Thomas–Fermi chemical potential
// of the reduced model). Beyond it the cloud is Thomas–Fermi transversally
// as well, and the 3D Thomas–Fermi estimate is the right one.
//
// Thomas–Fermi chemical potentials (measured from the trap bottom), derived
// by integrating n = (μ − V)/g_d over the cloud with V = Σ ½mω_a²x_a²:
//
//	1D: N = (4/3)(μ/g₁) R_x, R_x = √(2μ/mω_x²)   → μ = (3N g₁ ω_x √m / (4√2))^{2/3}
//	2D: N = π μ²/(m ω_x ω_y g₂)                   → μ = (N g₂ m ω_x ω_y/π)^{1/2}
//	3D: μ = (ħω̄/2)(15 N a/a_ho)^{2/5}             (dispersion.NewThomasFermi)
//
// (the 1D and 2D forms are gpe.ThomasFermiMuG's in SI, cross-checked in the
// tests). In every model the peak interaction energy is n₀g = μ with the
// effective 3D density n₀ = μ/g (for the reduced models n₀ = n_d,peak/(2π
// a⊥²) or n_2D,peak/(√(2π) a_z)), so the uniform-gas theory at the peak uses
// n₀ g_ij whichever model is chosen.
//
// CloudMatched, the default when the reduced couplings are invalid, scales the
// reduced couplings by one factor s so that the reduced model's μ equals the
// 3D Thomas–Fermi μ (1D: μ ∝ g₁^{2/3}, s = (μ₃/μ_d)^{3/2}; 2D: μ ∝ g₂^{1/2},
// s = (μ₃/μ_d)²): the lower-dimensional GPE then has the 3D cloud's peak
// interaction energies n₀g_ij and its Thomas–Fermi length along x (R_x =
// √(2μ/mω_x²) with the same μ), the profile along x being an inverted
// parabola rather than the 3D cloud's integrated (μ − V)² shape.

// ReducedValidityLimit: the reduced 1D/2D couplings are flagged invalid when
// the reduced model's Thomas–Fermi μ exceeds this multiple of ħω⊥ (1).
const ReducedValidityLimit = 1.0

// CloudModel says which couplings a trapped cloud is computed with.
type CloudModel int

const (
	// CloudAuto (the zero value, only as a request): reduced couplings where
	// they are valid, CloudMatched where they are not; 3D: Cloud3D.
	CloudAuto CloudModel = iota
	// Cloud3D: 3D couplings, 3D Thomas–Fermi estimate.
	Cloud3D
	// CloudReduced: the reduced 1D/2D couplings as they are, even when
	// invalid (a warning says so).
	CloudReduced
	// CloudMatched: reduced couplings scaled so that μ equals the 3D
	// Thomas–Fermi μ (see above).
	CloudMatched
)

func (c CloudModel) String() string {
	switch c {
	case CloudAuto:
		return "auto"
	case Cloud3D:
		return "3D Thomas–Fermi"
	case CloudReduced:
		return "reduced couplings"
	case CloudMatched:
		return "reduced couplings matched to the 3D Thomas–Fermi μ"
	}
	return fmt.Sprintf("cloud(%d)", int(c))
}

// Cloud is N atoms in a harmonic trap as seen by a model of dimension Dims.
type Cloud struct {
	Mass      float64              // atom mass, kg (> 0)
	Couplings dispersion.Couplings // 3D couplings g_ij, J m³; their PairCoupling() is the coupling of the total density
	Atoms     float64              // N ≥ 1
	FreqHz    [3]float64           // trap frequencies f_x, f_y, f_z in Hz (> 0)
	// Dims: dimension of the model, 1, 2 or 3 (3: the uniform-gas
	// comparison of `compare`).
	Dims int
	// Model: CloudAuto (default), or CloudReduced to keep the reduced
	// couplings even where invalid. Cloud3D and CloudMatched are results,
	// not requests; with Dims = 3 any request gives Cloud3D.
	Model CloudModel
}

// CloudResult is the density of a Cloud.
type CloudResult struct {
	Dims  int
	Model CloudModel // the model chosen (never CloudAuto)
	// Mu: Thomas–Fermi μ of the chosen model, J (from the trap bottom).
	Mu float64
	// PeakDensity: the effective 3D peak density n₀ = Mu/g (m⁻³), so that
	// n₀g_ij are the peak interaction energies of the chosen model.
	PeakDensity float64
	// Mu3D: the 3D Thomas–Fermi μ, J; ThomasFermi its full estimate.
	Mu3D        float64
	ThomasFermi dispersion.ThomasFermi
	// MuReduced: Thomas–Fermi μ of the unscaled reduced model, J (0 in 3D).
	MuReduced float64
	// HbarOmegaPerp: ħω⊥ (1D: ω⊥ = √(ω_yω_z); 2D: ω_z), J (0 in 3D).
	// In 3D: ħω of the stiffest axis, for the 3D check.
	HbarOmegaPerp float64
	// Ratio: MuReduced/HbarOmegaPerp (1D/2D), Mu3D/HbarOmegaPerp (3D).
	Ratio float64
	// Valid: 1D/2D: Ratio ≤ ReducedValidityLimit; 3D: Ratio ≥ 1 (the
	// cloud is Thomas–Fermi along every axis).
	Valid bool
	// Scale: factor on the reduced couplings (1 unless CloudMatched).
	Scale float64
	// Warning: one line when !Valid, else "".
	Warning string
}

// TrapCloud evaluates c. Errors match ErrInput.
func TrapCloud(c Cloud) (CloudResult, error) {
	r := CloudResult{Dims: c.Dims, Scale: 1}
	if c.Dims < 1 || c.Dims > 3 {
		return r, badInputf("dimension %d: allowed 1, 2, 3", c.Dims)
	}
	if !(c.Atoms >= 1) || math.IsInf(c.Atoms, 0) {
		return r, badInputf("atom number %g: must be ≥ 1", c.Atoms)
	}
	g := c.Couplings.PairCoupling()
	tf, err := dispersion.NewThomasFermi(c.Mass, g, c.Atoms, c.FreqHz)
	if err != nil {
		return r, badInput(err)
	}
	r.ThomasFermi, r.Mu3D = tf, tf.Mu
	var w [3]float64
	for a := range w {
		w[a] = 2 * math.Pi * c.FreqHz[a]
	}
	hb, m := dispersion.Hbar, c.Mass
	if c.Dims == 3 {
		r.Model, r.Mu = Cloud3D, tf.Mu
		r.HbarOmegaPerp = hb * math.Max(w[0], math.Max(w[1], w[2]))
		r.Ratio = tf.Mu / r.HbarOmegaPerp
		r.Valid = r.Ratio >= 1
		if !r.Valid {
			r.Warning = fmt.Sprintf("warning: 3D Thomas–Fermi estimate doubtful: μ/h = %.4g Hz is below ħω/h = %.4g Hz of the stiffest trap axis (the cloud is not Thomas–Fermi along it)",
				tf.Mu/dispersion.Planck, r.HbarOmegaPerp/dispersion.Planck)
		}
		r.PeakDensity = r.Mu / g
		return r, nil
	}
	var gd float64
	if c.Dims == 1 {
		wp := math.Sqrt(w[1] * w[2])
		a2 := hb / (m * wp)
		gd = g / (2 * math.Pi * a2)
		r.HbarOmegaPerp = hb * wp
		r.MuReduced = math.Pow(3*c.Atoms*gd*w[0]*math.Sqrt(m)/(4*math.Sqrt2), 2.0/3)
	} else {
		az := math.Sqrt(hb / (m * w[2]))
		gd = g / (math.Sqrt(2*math.Pi) * az)
		r.HbarOmegaPerp = hb * w[2]
		r.MuReduced = math.Sqrt(c.Atoms * gd * m * w[0] * w[1] / math.Pi)
	}
	r.Ratio = r.MuReduced / r.HbarOmegaPerp
	r.Valid = r.Ratio <= ReducedValidityLimit
	r.Model, r.Mu = CloudReduced, r.MuReduced
	hz := func(e float64) float64 { return e / dispersion.Planck }
	if !r.Valid {
		if c.Model == CloudReduced {
			r.Warning = fmt.Sprintf("warning: reduced %dD couplings used outside their validity: μ/h = %.4g Hz against ħω⊥/h = %.4g Hz (the 3D Thomas–Fermi μ/h is %.4g Hz)",
				c.Dims, hz(r.MuReduced), hz(r.HbarOmegaPerp), hz(tf.Mu))
		} else {
			r.Model, r.Mu = CloudMatched, tf.Mu
			if c.Dims == 1 {
				r.Scale = math.Pow(tf.Mu/r.MuReduced, 1.5)
			} else {
				r.Scale = math.Pow(tf.Mu/r.MuReduced, 2)
			}
			r.Warning = fmt.Sprintf("warning: reduced %dD couplings invalid (μ/h = %.4g Hz against ħω⊥/h = %.4g Hz: the cloud is Thomas–Fermi transversally); couplings scaled by %.4g so that μ is the 3D Thomas–Fermi μ/h = %.4g Hz (peak density %.4g cm⁻³, as in compare)",
				c.Dims, hz(r.MuReduced), hz(r.HbarOmegaPerp), r.Scale, hz(tf.Mu), tf.Peak*1e-6)
		}
	}
	r.PeakDensity = r.Mu / g
	return r, nil
}
