package dispersion

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Calibration is the fit of measured recoils to
//
//	k_t(θ) = k_max cos(θ − θ_lag)
//
// by linear least squares in cos θ and sin θ: k_t = a cos θ + b sin θ with
// a = k_max cos θ_lag, b = k_max sin θ_lag, covariance s²(XᵀX)⁻¹ with s² the
// residual variance (n − 2 degrees of freedom), errors of k_max and θ_lag by
// linear propagation (common practice, no source).
//
// Sign convention: the nominal sine law is ħk_t = −(ΔF/ω) cos θ, i.e.
// k_t = k_nom cos θ with k_nom = −ΔF/(ħω). k_max carries the sign of k_nom,
// so that a perfect apparatus gives k_max = k_nom and θ_lag = 0. A gradient
// that reaches the atoms as b_eff sin(ωt − θ_lag) (delayed by θ_lag/ω, e.g.
// by eddy currents) gives exactly k_t = k_nom (b_eff/b′) cos(θ − θ_lag):
// θ_lag > 0 means the gradient at the atoms lags the drive.
type Calibration struct {
	// The data fitted: pulse phases θ (rad) and recoils k_t (1/m); Slope
	// holds the Doppler slopes (Hz per mm/s of the RF resonance against
	// velocity) they came from when the fit started from slopes
	// (CalibrateSlopes, CalibrateCSV), else nil.
	Theta, Kt, Slope []float64

	N                 int     // number of phases fitted
	A, B              float64 // k_t = A cos θ + B sin θ, 1/m
	CovAA, CovAB      float64 // covariance of (A, B), 1/m²
	CovBB             float64
	KMax, KMaxErr     float64 // 1/m (sign of the nominal amplitude)
	Lag, LagErr       float64 // θ_lag, rad, in (−π, π]
	ResidualRMS       float64 // rms residual, 1/m
	KNominal          float64 // k_nom = −ΔF/(ħω) of the nominal setting, 1/m
	GradientEff       float64 // b_eff = |k_max| ħω/|Δμ|, T/m
	GradientRatio     float64 // b_eff/b′_nominal = k_max/k_nom
	GradientRatioErr  float64
	PhaseLargest      float64 // pulse phase of largest recoil k_max (θ_lag mod 2π), rad
	PhaseZero         float64 // pulse phase of zero recoil (θ_lag + π/2 mod π), rad; also + π
	PhaseLargestErr   float64 // = LagErr
	DopplerFromKtHzMM float64 // factor: slope (Hz per mm/s) = k_t × this (1e-3/2π)
}

// ErrBadData marks calibration data that cannot be fitted.
var ErrBadData = errors.New("bad calibration data")

func badData(format string, a ...any) error {
	return fmt.Errorf("%w: %s", ErrBadData, fmt.Sprintf(format, a...))
}

// SlopeToKt converts a Doppler slope of the resonance, measured as RF
// frequency f_RF against velocity in Hz per mm/s, into k_t (1/m) for a
// transition with sign sgnF0 = sgn(f0): k_t = 2π sgn(f0) × slope × 10³
// (the resonance moves by k_t v/2π in sgn(f0)(f_RF − |f0|), see
// gpe.ShakeDrive.ModelResonanceHz).
func SlopeToKt(slopeHzPerMmS, sgnF0 float64) float64 {
	return 2 * math.Pi * sgnF0 * slopeHzPerMmS * 1e3
}

// Calibrate fits k_t(θ) to phases theta (rad) and recoils kt (1/m) and
// compares with the nominal setting p (its Phase, Pulse and Rabi settings
// are ignored; the waveform must be the sine).
func Calibrate(p Shake, theta, kt []float64) (Calibration, error) {
	var c Calibration
	if p.Waveform != nil && p.Waveform.Name() != "sine" {
		return c, badData("the calibration law k_max cos(θ − θ_lag) holds for the sine waveform, not %s", p.Waveform.Name())
	}
	n := len(theta)
	if n != len(kt) {
		return c, badData("%d phases but %d recoils", n, len(kt))
	}
	if n < 3 {
		return c, badData("%d points: need at least 3 (2 parameters and one degree of freedom for the errors)", n)
	}
	for i := range theta {
		if math.IsNaN(theta[i]) || math.IsInf(theta[i], 0) || math.IsNaN(kt[i]) || math.IsInf(kt[i], 0) {
			return c, badData("point %d is not a finite number", i+1)
		}
	}
	var scc, scs, sss, scy, ssy float64
	for i, th := range theta {
		co, si := math.Cos(th), math.Sin(th)
		scc += co * co
		scs += co * si
		sss += si * si
		scy += co * kt[i]
		ssy += si * kt[i]
	}
	det := scc*sss - scs*scs
	if det <= 1e-10*float64(n)*float64(n) {
		return c, badData("the phases do not determine the fit: they must take at least two values that are not equal or 180° apart")
	}
	c.N = n
	c.Theta, c.Kt = append([]float64(nil), theta...), append([]float64(nil), kt...)
	c.A = (sss*scy - scs*ssy) / det
	c.B = (scc*ssy - scs*scy) / det
	rss := 0.0
	for i, th := range theta {
		e := kt[i] - c.A*math.Cos(th) - c.B*math.Sin(th)
		rss += e * e
	}
	s2 := rss / float64(n-2)
	c.ResidualRMS = math.Sqrt(rss / float64(n))
	c.CovAA, c.CovAB, c.CovBB = s2*sss/det, -s2*scs/det, s2*scc/det

	r, err := p.Evaluate()
	if err != nil {
		return c, err
	}
	omega := 2 * math.Pi * p.ShakeHz
	c.KNominal = -r.DeltaForce / (Hbar * omega)
	sg := 1.0
	if c.KNominal < 0 {
		sg = -1
	}
	k := math.Hypot(c.A, c.B)
	c.KMax = sg * k
	c.Lag = math.Atan2(sg*c.B, sg*c.A)
	if k > 0 {
		ga, gb := c.A/k, c.B/k
		c.KMaxErr = math.Sqrt(math.Max(0, ga*ga*c.CovAA+2*ga*gb*c.CovAB+gb*gb*c.CovBB))
		ha, hb := -c.B/(k*k), c.A/(k*k)
		c.LagErr = math.Sqrt(math.Max(0, ha*ha*c.CovAA+2*ha*hb*c.CovAB+hb*hb*c.CovBB))
	}
	dmu := math.Abs(r.MomentUp - r.MomentDown)
	if dmu > 0 {
		c.GradientEff = k * Hbar * omega / dmu
	}
	if c.KNominal != 0 {
		c.GradientRatio = c.KMax / c.KNominal
		c.GradientRatioErr = c.KMaxErr / math.Abs(c.KNominal)
	}
	c.PhaseLargest = math.Mod(c.Lag+2*math.Pi, 2*math.Pi)
	c.PhaseLargestErr = c.LagErr
	c.PhaseZero = math.Mod(c.Lag+math.Pi/2+2*math.Pi, math.Pi)
	c.DopplerFromKtHzMM = 1e-3 / (2 * math.Pi)
	return c, nil
}

// CalibrateSlopes converts measured Doppler slopes (Hz per mm/s of the RF
// resonance frequency against velocity) into recoils with the sign sgn(f0)
// of p's transition (SlopeToKt) and fits them (Calibrate).
func CalibrateSlopes(p Shake, theta, slopes []float64) (Calibration, error) {
	sgn := math.Copysign(1, p.Species.TransitionHz(p.Up, p.Down, p.Bias))
	kt := make([]float64, len(slopes))
	for i, s := range slopes {
		kt[i] = SlopeToKt(s, sgn)
	}
	c, err := Calibrate(p, theta, kt)
	if err == nil {
		c.Slope = append([]float64(nil), slopes...)
	}
	return c, err
}

// CalibrateCSV reads measurements in the form of ReadCalibrationCSV and fits
// them (CalibrateSlopes). Errors about the data match ErrBadData.
func CalibrateCSV(p Shake, r io.Reader) (Calibration, error) {
	theta, slopes, err := ReadCalibrationCSV(r)
	if err != nil {
		return Calibration{}, err
	}
	return CalibrateSlopes(p, theta, slopes)
}

// Curve returns the fitted k_t at phase θ (rad).
func (c Calibration) Curve(theta float64) float64 { return c.KMax * math.Cos(theta-c.Lag) }

// SlopesFromPoints turns raw resonance positions into one Doppler slope per
// phase: for each distinct phase, the straight-line fit of detuning (Hz)
// against velocity (mm/s) (FitLinear). Every phase needs at least two
// distinct velocities. The phases come back in order of first appearance.
func SlopesFromPoints(phase, detHz, velMMS []float64) (phases, slopes, errs []float64, err error) {
	idx := map[float64]int{}
	var xs, ys [][]float64
	for i, ph := range phase {
		k, ok := idx[ph]
		if !ok {
			k = len(phases)
			idx[ph] = k
			phases = append(phases, ph)
			xs, ys = append(xs, nil), append(ys, nil)
		}
		xs[k] = append(xs[k], velMMS[i])
		ys[k] = append(ys[k], detHz[i])
	}
	for k := range phases {
		lf, e := FitLinear(xs[k], ys[k], nil)
		if e != nil {
			return nil, nil, nil, badData("phase %g deg: need at least two different velocities for a slope", phases[k]*180/math.Pi)
		}
		slopes = append(slopes, lf.Slope)
		errs = append(errs, lf.SlopeErr)
	}
	return phases, slopes, errs, nil
}

// ReadCalibrationCSV reads measurements with a header row, in either form
//
//	phase_deg, slope_hz_per_mm_s               (one Doppler slope per phase)
//	phase_deg, detuning_hz, velocity_mm_s      (resonance positions; one slope per phase is fitted)
//
// (columns in any order, lines starting with # are comments; a UTF-8
// byte-order mark, as spreadsheets write it, is dropped). It returns the
// phases (rad) and slopes (Hz per mm/s of the RF resonance frequency
// against velocity). A column of neither form, a row with more or fewer
// cells than the header, non-numeric cells, NaN and infinities are
// refused with the line and column named.
func ReadCalibrationCSV(r io.Reader) (theta, slopes []float64, err error) {
	br := bufio.NewReader(r)
	if b, e := br.Peek(3); e == nil && string(b) == "\uFEFF" {
		br.Discard(3)
	}
	cr := csv.NewReader(br)
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	cr.FieldsPerRecord = -1
	recs, err := cr.ReadAll()
	if err != nil {
		return nil, nil, badData("%v", err)
	}
	if len(recs) == 0 {
		return nil, nil, badData("empty file: need a header row and data")
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[strings.ToLower(strings.TrimSpace(h))] = i
	}
	need := func(names ...string) bool {
		for _, n := range names {
			if _, ok := col[n]; !ok {
				return false
			}
		}
		return true
	}
	var names []string
	switch {
	case need("phase_deg", "slope_hz_per_mm_s"):
		names = []string{"phase_deg", "slope_hz_per_mm_s"}
	case need("phase_deg", "detuning_hz", "velocity_mm_s"):
		names = []string{"phase_deg", "detuning_hz", "velocity_mm_s"}
	default:
		return nil, nil, badData("header %q: need columns phase_deg,slope_hz_per_mm_s or phase_deg,detuning_hz,velocity_mm_s", strings.Join(recs[0], ","))
	}
	if len(recs[0]) != len(names) || len(col) != len(names) {
		return nil, nil, badData("header %q: extra or repeated column; want exactly %s (any order)", strings.Join(recs[0], ","), strings.Join(names, ","))
	}
	cols := make([][]float64, len(names))
	for li, rec := range recs[1:] {
		if len(rec) > len(names) {
			return nil, nil, badData("data row %d: %d cells, the header has %d columns", li+1, len(rec), len(names))
		}
		for k, n := range names {
			ci := col[n]
			if ci >= len(rec) {
				return nil, nil, badData("data row %d: missing column %s", li+1, n)
			}
			v, e := strconv.ParseFloat(strings.TrimSpace(rec[ci]), 64)
			if e != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, nil, badData("data row %d, column %s: %q is not a finite number", li+1, n, rec[ci])
			}
			cols[k] = append(cols[k], v)
		}
	}
	if len(cols[0]) == 0 {
		return nil, nil, badData("no data rows after the header")
	}
	for i := range cols[0] {
		cols[0][i] *= math.Pi / 180
	}
	if len(names) == 2 {
		return cols[0], cols[1], nil
	}
	ph, sl, _, err := SlopesFromPoints(cols[0], cols[1], cols[2])
	return ph, sl, err
}
