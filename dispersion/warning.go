package dispersion

// Warning is a finding about the validity of a result: a stable Code that
// programs test (never the wording), and a Text for people. Codes are
// lower-case words joined by hyphens; a code, once released, keeps its
// meaning. New codes are added, old ones never renumbered or reused.
type Warning struct {
	Code string // one of the Warn… constants of the package that made it
	Text string // one line, with the numbers that triggered it
}

// String returns the text.
func (w Warning) String() string { return w.Text }

// Codes of the warnings of Shake.Evaluate and Raman.Evaluate. Each names the
// threshold behind it where there is one.
const (
	// WarnContinuousDrive: a continuous RF drive (no pulses) has zero mean
	// momentum transfer: no spin–orbit coupling.
	WarnContinuousDrive = "continuous-drive"
	// WarnNoRecoil: the pulse phase gives k_t = 0 (e.g. θ = 90° of a sine).
	WarnNoRecoil = "no-recoil"
	// WarnEqualMoments: the two sublevels have equal magnetic moments at the
	// bias field: no differential force.
	WarnEqualMoments = "equal-moments"
	// WarnSmallRecoil: |k_t| below 5 % of its largest value over the phases.
	WarnSmallRecoil = "small-recoil"
	// WarnShakeVsRecoil: ħω < ScaleSeparation · E_R.
	WarnShakeVsRecoil = "shake-vs-recoil"
	// WarnShakeVsRabi: f_shake < ScaleSeparation · Ω/2π.
	WarnShakeVsRabi = "shake-vs-rabi"
	// WarnPulseArea: pulse area per cycle above PulseAreaLimit.
	WarnPulseArea = "pulse-area"
	// WarnMicromotion: position micromotion above MicromotionFraction of the
	// stripe period.
	WarnMicromotion = "micromotion"
	// WarnLongPulses: rms momentum spread over a pulse above SpreadFraction of
	// the mean transfer.
	WarnLongPulses = "long-pulses"
	// WarnPulseDephasing: k_spread·(ħ|k_t|/m)·t_π above DephasingLimit.
	WarnPulseDephasing = "pulse-dephasing"
	// WarnDeltaM: the sublevels differ by |Δm| ≠ 1 in one manifold. No
	// longer emitted: Shake.Evaluate refuses such pairs (RFPairAllowed); the
	// code keeps its meaning.
	WarnDeltaM = "delta-m"
	// WarnMicrowave: the sublevels lie in different hyperfine manifolds.
	WarnMicrowave = "microwave"
	// WarnDeltaBandwidth: delta pulses have unbounded bandwidth while another
	// RF transition is near.
	WarnDeltaBandwidth = "delta-bandwidth"
	// WarnNeighbour: the nearest other RF transition is closer than
	// NeighbourSeparation × the larger of peak Rabi frequency and bandwidth;
	// for the Raman scheme, the nearest other two-photon transition is closer
	// to resonance than NeighbourSeparation × its Raman Rabi frequency
	// (atoms leak to a third sublevel).
	WarnNeighbour = "neighbour-transition"
	// WarnNearResonant: Raman beams closer to a D line than
	// NearResonanceLinewidths natural linewidths or NearResonanceHFS times
	// the hyperfine structure the far-detuned model leaves unresolved.
	WarnNearResonant = "near-resonant"
)

// WarningTexts returns the texts of ws, in order (nil for none).
func WarningTexts(ws []Warning) []string {
	var out []string
	for _, w := range ws {
		out = append(out, w.Text)
	}
	return out
}

// WarningCodes returns the codes of ws, in order (nil for none).
func WarningCodes(ws []Warning) []string {
	var out []string
	for _, w := range ws {
		out = append(out, w.Code)
	}
	return out
}

// HasWarning reports whether ws holds a warning with this code.
func HasWarning(ws []Warning, code string) bool {
	for _, w := range ws {
		if w.Code == code {
			return true
		}
	}
	return false
}
