package output

import (
	"fmt"
	"time"

	"socmap/dispersion"
	"socmap/output/h5"
)

// RunInfo identifies the run that made a result file (DESIGN.md §4).
type RunInfo struct {
	Version     string // program version
	CommandLine string // the command line as typed
	Plan        string // the full plan as TOML text (effective settings)
	Kind        string // result kind, e.g. "scheme-shake", "bands", "map"
}

// Writer writes datasets and attributes into an open HDF5 file, keeping the
// first error (later calls do nothing), so that a result is written as a
// flat list of calls and checked once.
type Writer struct {
	F   *h5.File
	Err error
}

// Scalar writes a 0-d float64 dataset with its units and description.
func (w *Writer) Scalar(path string, v float64, units, desc string) {
	if w.Err == nil {
		w.Err = w.F.WriteFloat64s(path, []float64{v}, []int{}, h5.Meta{Units: units, Description: desc})
	}
}

// Array writes a float64 dataset of the given shape (nil: 1-D).
func (w *Writer) Array(path string, v []float64, shape []int, units, desc string) {
	if w.Err == nil {
		w.Err = w.F.WriteFloat64s(path, v, shape, h5.Meta{Units: units, Description: desc})
	}
}

// Attr sets an attribute on an existing object.
func (w *Writer) Attr(path, name string, v any) {
	if w.Err == nil {
		w.Err = w.F.SetAttr(path, name, v)
	}
}

// Root writes the run information as root attributes.
func (w *Writer) Root(info RunInfo) {
	w.Attr("/", "program", "socmap")
	w.Attr("/", "version", info.Version)
	w.Attr("/", "command_line", info.CommandLine)
	w.Attr("/", "created_utc", time.Now().UTC().Format(time.RFC3339))
	w.Attr("/", "plan_toml", info.Plan)
	w.Attr("/", "kind", info.Kind)
	w.Attr("/", "schema", "socmap result file, see README \"Result files\"")
}

// CreateH5 creates path (temporary name until Close), writes the root
// information, calls fill, and commits the file only if everything succeeded.
func CreateH5(path string, force bool, info RunInfo, fill func(w *Writer)) error {
	f, err := h5.Create(path, force)
	if err != nil {
		return err
	}
	w := &Writer{F: f}
	w.Root(info)
	fill(w)
	if w.Err != nil {
		f.Abort()
		return w.Err
	}
	return f.Close()
}

// WriteModel writes an effective model under group g.
func (w *Writer) WriteModel(g string, m dispersion.Model) {
	w.Scalar(g+"/k_R", m.KR, "1/m", "recoil wavenumber k_R = k_t/2 (signed)")
	w.Scalar(g+"/E_R", m.ERHz(), "Hz", "recoil energy E_R/h = ħk_R²/(4πm)")
	w.Scalar(g+"/omega", m.OmegaOverER, "E_R", "coupling ħΩ/E_R")
	w.Scalar(g+"/delta", m.DeltaOverER, "E_R", "detuning ħδ/E_R")
	w.Scalar(g+"/mass", m.Mass, "kg", "atomic mass")
}

// WriteShake writes the inputs and results of the shaking scheme.
func (w *Writer) WriteShake(p dispersion.Shake, r dispersion.ShakeResult) {
	w.WriteModel("/model", r.Model)
	s := "/shake/"
	w.Scalar(s+"bias", p.Bias, "T", "bias field B0")
	w.Scalar(s+"gradient", p.Gradient, "T/m", "gradient amplitude b′")
	w.Scalar(s+"shake_frequency", p.ShakeHz, "Hz", "shaking frequency ω/2π")
	w.Scalar(s+"pulse_phase", p.PulsePhase, "rad", "pulse centre phase θ in the shaking cycle")
	w.Scalar(s+"pulse_width", p.PulseWidth, "s", "pulse width (rect: duration; gauss: FWHM)")
	w.Scalar(s+"rabi", p.RabiHz, "Hz", "cycle-averaged Rabi frequency Ω/2π")
	w.Scalar(s+"rf_detuning", p.DetuningHz, "Hz", "RF detuning f_RF − f_0")
	w.Attr("/shake", "atom", p.Species.Name)
	w.Attr("/shake", "up", fmt.Sprintf("F=%d,m=%d", p.Up.F, p.Up.M))
	w.Attr("/shake", "down", fmt.Sprintf("F=%d,m=%d", p.Down.F, p.Down.M))
	w.Attr("/shake", "waveform", p.Waveform.Name())
	w.Attr("/shake", "pulse", p.Pulse.String())
	o := "/results/"
	w.Scalar(o+"moment_up", r.MomentUp, "J/T", "magnetic moment μ↑ = −∂E↑/∂B at B0 (Breit–Rabi)")
	w.Scalar(o+"moment_down", r.MomentDown, "J/T", "magnetic moment μ↓ = −∂E↓/∂B at B0 (Breit–Rabi)")
	w.Scalar(o+"delta_force", r.DeltaForce, "N", "differential force amplitude (μ↑ − μ↓)b′")
	w.Scalar(o+"rf_frequency", r.RFHz, "Hz", "RF transition frequency |E↓ − E↑|/h at B0")
	w.Scalar(o+"k_t", r.KtMean, "1/m", "momentum transfer of a spin flip, envelope-weighted mean")
	w.Scalar(o+"k_t_spread", r.KtSpread, "1/m", "rms spread of the momentum transfer over the pulse envelope")
	w.Scalar(o+"k_t_max", r.KtMax, "1/m", "largest |k_t| over all pulse phases (delta pulses)")
	w.Scalar(o+"enhancement", r.Enhancement, "dimensionless", "k_t over the RF photon wavenumber")
	w.Scalar(o+"doppler", r.DopplerHzPerMmS*1e3, "Hz/(m/s)", "Doppler shift of the flip resonance per velocity, k_t/2π")
	w.Scalar(o+"pulse_area", r.PulseArea, "rad", "pulse area per shaking cycle")
	w.Scalar(o+"peak_rabi", r.PeakRabiHz, "Hz", "peak Rabi frequency of one pulse (inf for delta pulses)")
	w.Scalar(o+"micromotion_kinetic_up", r.MicroKinUpHz, "Hz", "micromotion kinetic energy ⟨A↑²⟩/2m over h")
	w.Scalar(o+"micromotion_kinetic_down", r.MicroKinDownHz, "Hz", "micromotion kinetic energy ⟨A↓²⟩/2m over h")
	w.Scalar(o+"micromotion_amplitude_up", r.MicroAmpUp, "m", "position micromotion amplitude of ↑")
	w.Scalar(o+"micromotion_amplitude_down", r.MicroAmpDown, "m", "position micromotion amplitude of ↓")
	w.Scalar(o+"delta_total", r.DeltaHz, "Hz", "effective δ/2π including the micromotion shift")
	w.Scalar(o+"quadratic_zeeman", r.QuadZeemanHz, "Hz", "quadratic Zeeman shift q/h of the manifold (NaN if n/a)")
	w.Scalar(o+"neighbour_detuning", r.NeighbourHz, "Hz", "detuning of the nearest other RF transition (NaN if none)")
	w.writeWarnings("/results", r.Warnings)
}

// WriteRaman writes the inputs and results of the Raman scheme.
func (w *Writer) WriteRaman(p dispersion.Raman, r dispersion.RamanResult) {
	w.WriteModel("/model", r.Model)
	s := "/raman/"
	w.Scalar(s+"wavelength", p.Wavelength, "m", "Raman beam wavelength (vacuum)")
	w.Scalar(s+"angle", p.Angle, "rad", "full crossing angle of the beams")
	w.Scalar(s+"rabi", p.RabiHz, "Hz", "two-photon Rabi frequency Ω/2π")
	w.Scalar(s+"detuning", p.DetuningHz, "Hz", "two-photon detuning δ/2π")
	w.Attr("/raman", "atom", p.Species.Name)
	o := "/results/"
	if p.HasPair() {
		w.Scalar(s+"bias", p.Bias, "T", "bias field B0")
		w.Attr("/raman", "up", fmt.Sprintf("F=%d,m=%d", p.Up.F, p.Up.M))
		w.Attr("/raman", "down", fmt.Sprintf("F=%d,m=%d", p.Down.F, p.Down.M))
		w.Scalar(o+"two_photon_frequency", r.TwoPhotonHz, "Hz", "beam frequency difference at two-photon resonance, |E↓ − E↑|/h at B0 (Breit–Rabi)")
		w.Scalar(o+"beam_difference", r.BeamDifferenceHz, "Hz", "beam frequency difference for the planned δ, |f0| + sgn(f0) δ/2π")
		w.Scalar(o+"quadratic_zeeman", r.QuadZeemanHz, "Hz", "quadratic Zeeman shift q/h of the pair's manifold (NaN if n/a)")
		w.Scalar(o+"neighbour_detuning", r.NeighbourHz, "Hz", "distance of the nearest other two-photon transition ("+r.Neighbour+") from resonance (NaN if none)")
		w.Scalar(o+"neighbour_rabi", r.NeighbourRabiHz, "Hz", "Raman Rabi frequency on the nearest other transition (NaN if none)")
		w.Scalar(o+"isolation", r.Isolation, "dimensionless", "neighbour detuning over its Raman Rabi frequency (NaN if none)")
		w.Scalar(o+"leakage", r.Leakage, "dimensionless", "largest population moved to the neighbour, Ω3²/(Ω3² + δ3²) (NaN if none)")
	}
	w.Scalar(o+"line_detuning", r.LineDetuningHz, "Hz", "single-photon detuning from the nearest D line ("+r.NearestLine+")")
	w.Scalar(o+"detuning_D1", r.DetuningD1Hz, "Hz", "single-photon detuning from D1 as seen from ↑ (+ = blue)")
	w.Scalar(o+"detuning_D2", r.DetuningD2Hz, "Hz", "single-photon detuning from D2 as seen from ↑ (+ = blue)")
	w.Scalar(o+"spin_matrix_element", r.MatrixElement, "dimensionless", "|<↓|σ_q|↑>| of the Breit–Rabi states (1 without a pair)")
	w.Scalar(o+"beam_intensity", r.BeamIntensity, "W/m^2", "intensity of each beam for Ω (equal beams, orthogonal linear polarisations)")
	w.Scalar(o+"beam_rabi", r.BeamRabiHz, "Hz", "single-beam Rabi frequency on the D-line doublet")
	w.Scalar(o+"scattering_rate", r.ScatterRate, "1/s", "photon scattering rate of both beams, far-detuned D1 + D2 (weights 1/3, 2/3), both time orderings (no RWA)")
	w.Scalar(o+"scattering_per_rabi", r.ScatterPerRabi, "dimensionless", "Γ_sc/Ω (Ω in rad/s)")
	w.Scalar(o+"scattering_per_rabi_far_detuned", r.FineStructureLimit, "dimensionless", "Γ_sc/Ω for detuning ≫ fine structure at this wavelength, 3Γ̄(ω/ω̄)²/(s Δ′_FS), Δ′_FS = Δ_FS + (x1 − x2)(ω̄² − ω²)/(2ω̄) with x_J' each line's own strength")
	w.Scalar(o+"heating", r.HeatingER, "E_R/s", "heating rate estimate, 2E_rec per scattered photon")
	w.writeWarnings("/results", r.Warnings)
}

// WriteBands writes sampled bands and their minima.
func (w *Writer) WriteBands(b dispersion.Bands, c dispersion.Curve, info dispersion.BandInfo) {
	w.Scalar("/bands/omega", b.Omega, "E_R", "coupling ħΩ/E_R")
	w.Scalar("/bands/delta", b.Delta, "E_R", "detuning ħδ/E_R")
	w.Array("/bands/k", c.K, nil, "k_R", "quasi-momentum k_x")
	w.Array("/bands/E_lower", c.Lower, nil, "E_R", "lower band E−(k)")
	w.Array("/bands/E_upper", c.Upper, nil, "E_R", "upper band E+(k)")
	w.Array("/bands/sz_lower", c.SzLower, nil, "dimensionless", "⟨σ_z⟩ of the lower band")
	w.Array("/bands/sz_upper", c.SzUpper, nil, "dimensionless", "⟨σ_z⟩ of the upper band")
	n := len(info.Minima)
	k, e, sz, ms := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for i, m := range info.Minima {
		k[i], e[i], sz[i], ms[i] = m.K, m.E, m.SigmaZ, m.MassRel
	}
	w.Array("/minima/k", k, nil, "k_R", "positions of the lower-band minima")
	w.Array("/minima/E", e, nil, "E_R", "energies of the lower-band minima")
	w.Array("/minima/sz", sz, nil, "dimensionless", "⟨σ_z⟩ at the minima")
	w.Array("/minima/mass", ms, nil, "dimensionless", "effective mass m*/m at the minima")
	w.Scalar("/minima/barrier", info.Barrier, "E_R", "barrier between two minima above the lower one (0 if one minimum)")
	w.Scalar("/minima/gap", info.Gap, "E_R", "gap E+ − E− at the global minimum")
}

func joinLines(s []string) string {
	out := ""
	for i, l := range s {
		if i > 0 {
			out += "\n"
		}
		out += l
	}
	return out
}
