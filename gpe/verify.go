package gpe

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"socmap/dispersion"
)

// VerifyMethod selects the solver of Verify.
type VerifyMethod int

const (
	// VerifyAuto: VerifyDeltaPulses for delta pulses, VerifyRealTime otherwise.
	VerifyAuto VerifyMethod = iota
	// VerifyDeltaPulses: the exact pulse-by-pulse solution (DeltaSolver;
	// finite pulses are replaced by delta pulses of the same area at the
	// same phase).
	VerifyDeltaPulses
	// VerifyRealTime: the lab-frame real-time split-step simulation
	// (LabFrame).
	VerifyRealTime
)

func (m VerifyMethod) String() string {
	return [...]string{"auto", "delta-exact", "real-time split-step"}[m]
}

// Codes of the warnings Verify adds to those of the effective model
// (dispersion.Warning; the model's own codes are dispersion's Warn…).
const (
	// WarnLineFit: the line fit of one spectrum failed (status VerifyFitFailed).
	WarnLineFit = "line-fit-failed"
	// WarnDopplerFit: the Doppler slope could not be fitted (status
	// VerifyFitFailed).
	WarnDopplerFit = "doppler-fit-failed"
	// WarnDopplerUnweighted: some resonance centre has no usable standard
	// error, so the Doppler slope is an unweighted fit whose error comes from
	// the scatter of the centres (none for two velocities).
	WarnDopplerUnweighted = "doppler-fit-unweighted"
	// WarnDopplerScatter: the centres scatter about the weighted Doppler
	// line by more than their errors allow (χ²/dof > DopplerChi2Limit): the
	// resonance is not linear in the velocity at that level, and the
	// propagated slope error understates the uncertainty. The text gives
	// the error scaled by √(χ²/dof) beside it.
	WarnDopplerScatter = "doppler-fit-scatter"
	// WarnKtDeviation: measured k_t deviates from the model's by more than 1 %.
	WarnKtDeviation = "k_t-deviation"
	// WarnRabiDeviation: the effective Rabi frequency deviates from the
	// cycle average by more than 5 %.
	WarnRabiDeviation = "rabi-deviation"
	// WarnCombOverlap: the resonances of the velocity classes span more than
	// half the comb spacing f_shake of the pulse train's spectrum.
	WarnCombOverlap = "comb-overlap"
)

// DopplerChi2Limit is the χ² per degree of freedom of the Doppler line fit
// above which Verify warns (WarnDopplerScatter). A choice of this project
// (common practice, no source): for three degrees of freedom (the default
// five velocities) a reduced χ² above 4 happens by chance in 0.7 % of cases
// (scipy.stats.chi2.sf(12, 3) = 0.0074).
const DopplerChi2Limit = 4.0

// VerifySettings of a verification run. The zero value gives the documented
// defaults.
type VerifySettings struct {
	// Velocities are the mean velocities (m/s) of the atoms, one spectrum
	// each. Default: j·ħ|k_t|/2m, j = −2…2 (five classes whose resonances
	// span ±8E_R/h around the v = 0 line).
	Velocities []float64
	// Windows is the interrogation time in shaking periods. Default: the
	// π time 1/(2 Ω/2π) of the model's Rabi frequency, rounded (≥ 4).
	Windows int
	// CoarsePoints and FinePoints: a coarse scan locates the line: it covers
	// the resonances of every momentum transfer κ the RF-on part of the cycle
	// can give (and the model's), ±3/t_int, in steps of at most 0.5/t_int
	// (at most 241 points); a fine scan of ±0.6/t_int (the main
	// lobe) around the coarse maximum is fitted. Defaults 13 and 11.
	CoarsePoints, FinePoints int
	// Resolution is the Doppler rms width of the atoms' velocity spread
	// relative to the Fourier width 1/t_int; it sets the packet width.
	// Default 0.15.
	Resolution float64
	// SigmaX, if > 0, sets the rms size (m) of the atom cloud (a gaussian
	// packet centred on the null of the oscillating gradient, x = 0) instead
	// of Resolution; the velocity spread is then ħ/(2mσ_x).
	SigmaX float64
	// Workers run simulations in parallel. Default runtime.GOMAXPROCS(0).
	Workers int
	// Method: default VerifyAuto.
	Method VerifyMethod
	// Refine divides the real-time step while the RF is on by this factor
	// (convergence checks). Default 1.
	Refine int
	// MaxWindows refuses interrogations longer than this (default 4000).
	MaxWindows int
	// Progress, if set, is called after every simulation with the number
	// done and the total (the coarse scans' and the fine scans' runs),
	// from the simulating goroutines one at a time. Default nil.
	Progress func(done, total int)
}

func (s *VerifySettings) defaults(d *ShakeDrive) error {
	if s.Windows == 0 {
		if !(d.Shake.RabiHz > 0) {
			return errors.New("verify needs a Rabi frequency > 0 (the spectra are flip spectra)")
		}
		s.Windows = max(4, int(math.Round(1/(2*d.Shake.RabiHz)/d.Period)))
	}
	if s.MaxWindows == 0 {
		s.MaxWindows = 4000
	}
	if s.Windows > s.MaxWindows {
		return fmt.Errorf("interrogation of %d shaking periods (π time of Ω/2π = %g Hz) exceeds %d: raise the Rabi frequency", s.Windows, d.Shake.RabiHz, s.MaxWindows)
	}
	if s.CoarsePoints == 0 {
		s.CoarsePoints = 13
	}
	if s.FinePoints == 0 {
		s.FinePoints = 11
	}
	if s.Resolution == 0 {
		s.Resolution = 0.15
	}
	if s.Workers <= 0 {
		s.Workers = runtime.GOMAXPROCS(0)
	}
	if s.Velocities == nil {
		vr := dispersion.Hbar * math.Abs(d.Result.KtMean) / (2 * d.Mass)
		for j := -2; j <= 2; j++ {
			s.Velocities = append(s.Velocities, float64(j)*vr)
		}
	}
	if len(s.Velocities) < 2 {
		return errors.New("need at least two mean velocities for a Doppler slope")
	}
	if s.Method == VerifyAuto {
		s.Method = VerifyRealTime
		if d.Shake.Pulse == dispersion.PulseDelta {
			s.Method = VerifyDeltaPulses
		}
	}
	return nil
}

// Spectrum is the flipped fraction against RF detuning for one mean velocity.
type Spectrum struct {
	Velocity      float64            // mean velocity of the atoms, m/s
	DetuningHz    []float64          // RF detuning f_RF − |f0|, Hz (coarse and fine scans, sorted)
	Flipped       []float64          // flipped fraction after the interrogation
	Fit           dispersion.LineFit // fit of the fine scan
	ModelCentreHz float64            // the effective model's resonance (ShakeDrive.ModelResonanceHz)
}

// VerifyStatus of a VerifyResult.
type VerifyStatus int

const (
	VerifyOK        VerifyStatus = iota
	VerifyFitFailed              // a line fit failed; the affected numbers are NaN
)

func (s VerifyStatus) String() string { return [...]string{"ok", "fit-failed"}[s] }

// VerifyResult of Verify: the effective model's prediction beside each
// measured value.
type VerifyResult struct {
	Status   VerifyStatus
	Method   VerifyMethod
	Model    dispersion.ShakeResult
	SignF0   float64 // sgn(f0) of the transition, f0 = (E↓ − E↑)/h
	Spectra  []Spectrum
	Windows  int     // interrogation, shaking periods
	TimeS    float64 // interrogation time, s
	SigmaV   float64 // rms velocity spread of the atoms, m/s
	Grid     LabGrid // real-time grid (zero for VerifyDeltaPulses)
	Dt       float64 // split step while the RF is on, s
	Steps    int     // split steps per shaking period
	Runs     int     // simulations made
	NormDev  float64 // largest |norm − 1| over all real-time runs
	Warnings []dispersion.Warning

	// Doppler slope of the resonance: d(sgn(f0)(f_RF − |f0|))/dv, Hz per
	// mm/s. The measured slope is the weighted straight-line fit
	// (dispersion.FitLinear) of the fitted centres against velocity with the
	// centres' standard errors as weights; SlopeErr is those errors
	// propagated (finite for two velocities). SlopeChi2 is the fit's χ² per
	// degree of freedom (NaN for two velocities): ≫ 1 means the centres
	// scatter about the line more than their errors say. Values ≪ 1 are
	// common: a centre's error comes from the misfit of the gaussian to the
	// line shape (dispersion.LineFit), which is much the same for every
	// velocity class and moves the centres alike, so it overstates their
	// scatter about the line; the slope error is then conservative.
	SlopeModel, SlopeMeasured, SlopeErr float64
	SlopeChi2                           float64
	KtModel, KtMeasured, KtErr          float64 // k_t = 2π × slope, 1/m
	// Resonance at v = 0, RF detuning f_RF − |f0| in Hz.
	InterceptModelHz, InterceptMeasuredHz float64
	// Mean canonical momentum transfer per flipped atom at resonance (1/m),
	// from the velocity class nearest v = 0; model: k_t.
	TransferMeasured float64
	// Effective Rabi frequency Ω/2π from the flip dynamics at resonance (Hz),
	// fitted with the sample's known Doppler spread
	// (dispersion.FitRabiTrace); model: the cycle-averaged Rabi frequency.
	RabiModelHz, RabiMeasuredHz float64
	RabiTrace                   []float64 // flipped fraction after each period at resonance
}

// Deviation returns measured/model − 1.
func Deviation(measured, model float64) float64 { return measured/model - 1 }

// Verify measures, as an experiment would, the flip spectra of the shaking
// setting p without the cycle average, and compares the resonance positions,
// Doppler slope, momentum transfer and effective Rabi frequency with the
// effective model of p.Evaluate.
func Verify(p dispersion.Shake, s VerifySettings) (*VerifyResult, error) {
	d, err := NewShakeDrive(p)
	if err != nil {
		return nil, err
	}
	if d.Result.KtMean == 0 {
		return nil, errors.New("the setting has no recoil (k_t = 0): there is no Doppler slope to measure")
	}
	if err := s.defaults(d); err != nil {
		return nil, err
	}
	r := &VerifyResult{Method: s.Method, Model: d.Result, SignF0: d.SignF0, Windows: s.Windows, TimeS: float64(s.Windows) * d.Period,
		RabiModelHz: p.RabiHz, KtModel: d.Result.KtMean, SlopeModel: d.Result.DopplerHzPerMmS}
	r.Warnings = append(r.Warnings, d.Result.Warnings...)
	warn := func(code, format string, a ...any) {
		r.Warnings = append(r.Warnings, dispersion.Warning{Code: code, Text: fmt.Sprintf(format, a...)})
	}
	tint := r.TimeS
	// Velocity spread: Doppler rms = Resolution / t_int.
	sigV := s.Resolution / tint * 2 * math.Pi / math.Abs(d.Result.KtMean)
	if s.SigmaX > 0 {
		sigV = dispersion.Hbar / (2 * d.Mass * s.SigmaX)
	}
	r.SigmaV = sigV
	sigK := d.Mass * sigV / dispersion.Hbar
	sigX := 1 / (2 * sigK)
	dopplerRMS := math.Abs(d.Result.KtMean) * sigV // rms Doppler shift k_t σ_v, rad/s

	var sim func(job *verifyJob)
	var closeAll func()
	var mu sync.Mutex
	switch s.Method {
	case VerifyDeltaPulses:
		ds := NewDeltaSolver(d)
		sim = func(j *verifyJob) {
			q0 := d.Mass * j.v / dispersion.Hbar
			j.flip = ds.FlipPacket(q0, sigK, d.Detuning(j.detHz), j.windows, j.trace)
			if j.trace == nil {
				return
			}
			j.transfer = ds.kt // by construction
		}
		closeAll = func() {}
	default:
		g := LabGridFor(d, s.Velocities, tint*2, sigX)
		rt, err := newLabFrame(d, g, s.Refine)
		if err != nil {
			return nil, err
		}
		r.Grid, r.Dt, r.Steps = g, rt.Dt, rt.StepsPerWindow()
		pool := make(chan *LabWorker, s.Workers)
		var all []*LabWorker
		for i := 0; i < s.Workers; i++ {
			w, err := rt.NewWorker()
			if err != nil {
				return nil, err
			}
			pool <- w
			all = append(all, w)
		}
		closeAll = func() {
			for _, w := range all {
				w.Close()
			}
		}
		sim = func(j *verifyJob) {
			w := <-pool
			defer func() { pool <- w }()
			q0 := d.Mass * j.v / dispersion.Hbar
			w.Init(q0)
			w.Run(d.Detuning(j.detHz), j.windows, j.trace)
			j.flip = w.Population(1)
			if j.trace != nil {
				j.transfer = w.MeanQ(1) - q0
			}
			dev := math.Abs(w.Norm() - 1)
			mu.Lock()
			r.NormDev = math.Max(r.NormDev, dev)
			mu.Unlock()
		}
	}
	defer closeAll()
	var progressDone, progressTotal int // guarded by mu
	runAll := func(jobs []*verifyJob) {
		ch := make(chan *verifyJob)
		var wg sync.WaitGroup
		for i := 0; i < s.Workers; i++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for j := range ch {
					sim(j)
					if s.Progress != nil {
						mu.Lock()
						progressDone++
						s.Progress(progressDone, progressTotal)
						mu.Unlock()
					}
				}
			}()
		}
		for _, j := range jobs {
			ch <- j
		}
		close(ch)
		wg.Wait()
		r.Runs += len(jobs)
	}

	nv := len(s.Velocities)
	r.Spectra = make([]Spectrum, nv)
	coarse := make([][]*verifyJob, nv)
	var jobs []*verifyJob
	for i, v := range s.Velocities {
		c := d.ModelResonanceHz(v)
		r.Spectra[i] = Spectrum{Velocity: v, ModelCentreHz: c}
		lo, hi := d.resonanceRange(v)
		lo, hi = math.Min(lo, c)-3/tint, math.Max(hi, c)+3/tint
		nc := max(s.CoarsePoints, min(241, int(math.Ceil((hi-lo)/(0.5/tint)))+1))
		for k := 0; k < nc; k++ {
			j := &verifyJob{v: v, detHz: lo + (hi-lo)*float64(k)/float64(nc-1), windows: s.Windows}
			coarse[i] = append(coarse[i], j)
			jobs = append(jobs, j)
		}
	}
	progressTotal = len(jobs) + nv*s.FinePoints
	runAll(jobs)
	fine := make([][]*verifyJob, nv)
	jobs = jobs[:0]
	for i, v := range s.Velocities {
		ib := 0
		for k, j := range coarse[i] {
			if j.flip > coarse[i][ib].flip {
				ib = k
			}
		}
		// Centre the fine scan on the vertex of the parabola through the
		// coarse maximum and its neighbours.
		fc := coarse[i][ib].detHz
		if ib > 0 && ib < len(coarse[i])-1 {
			y0, y1, y2 := coarse[i][ib-1].flip, coarse[i][ib].flip, coarse[i][ib+1].flip
			if den := y0 - 2*y1 + y2; den < 0 {
				fc += 0.5 * (y0 - y2) / den * (coarse[i][ib+1].detHz - fc)
			}
		}
		for k := 0; k < s.FinePoints; k++ {
			j := &verifyJob{v: v, detHz: fc + 0.6/tint*(2*float64(k)/float64(s.FinePoints-1)-1), windows: s.Windows}
			fine[i] = append(fine[i], j)
			jobs = append(jobs, j)
		}
	}
	runAll(jobs)
	var vs, cs, es []float64
	for i := range s.Velocities {
		sp := &r.Spectra[i]
		all := append(append([]*verifyJob(nil), coarse[i]...), fine[i]...)
		sort.Slice(all, func(a, b int) bool { return all[a].detHz < all[b].detHz })
		for _, j := range all {
			sp.DetuningHz = append(sp.DetuningHz, j.detHz)
			sp.Flipped = append(sp.Flipped, j.flip)
		}
		ff, fp := make([]float64, len(fine[i])), make([]float64, len(fine[i]))
		for k, j := range fine[i] {
			ff[k], fp[k] = j.detHz, j.flip
		}
		c0 := ff[len(ff)/2]
		lf, err := dispersion.FitLine(ff, fp, c0, 0.4/tint)
		if err != nil {
			r.Status = VerifyFitFailed
			warn(WarnLineFit, "line fit at v = %.3g mm/s failed: %v", sp.Velocity*1e3, err)
			sp.Fit = dispersion.LineFit{CentreHz: math.NaN(), CentreErrHz: math.NaN()}
			continue
		}
		sp.Fit = lf
		vs = append(vs, sp.Velocity*1e3)
		cs = append(cs, d.SignF0*lf.CentreHz)
		es = append(es, lf.CentreErrHz)
	}
	r.InterceptModelHz = d.ModelResonanceHz(0)
	// Weighted by the centres' standard errors when every one is usable;
	// otherwise unweighted, and said so.
	sy := es
	for _, e := range es {
		if !(e > 0) || math.IsInf(e, 0) {
			sy = nil
		}
	}
	if sy == nil && len(es) > 0 {
		warn(WarnDopplerUnweighted, "some resonance centre has no standard error: the Doppler slope is an unweighted fit, its error from the scatter of %d centres", len(es))
	}
	if lin, err := dispersion.FitLinear(vs, cs, sy); err == nil {
		r.SlopeMeasured, r.SlopeErr = lin.Slope, lin.SlopeErr
		r.InterceptMeasuredHz = d.SignF0 * lin.Intercept
		r.KtMeasured = 2 * math.Pi * lin.Slope * 1e3
		r.KtErr = 2 * math.Pi * lin.SlopeErr * 1e3
		r.SlopeChi2 = math.NaN()
		if lin.Weighted && lin.DoF > 0 {
			r.SlopeChi2 = lin.Chi2 / float64(lin.DoF)
			if r.SlopeChi2 > DopplerChi2Limit {
				b := math.Sqrt(r.SlopeChi2)
				warn(WarnDopplerScatter, "the resonance centres scatter about the Doppler line by √(χ²/dof) = %.2g × their errors (χ²/dof = %.3g, %d degrees of freedom): the resonance is not linear in the velocity at this level; the propagated slope error ±%.2g Hz per mm/s understates the uncertainty, scaled by √(χ²/dof) it is ±%.2g Hz per mm/s",
					b, r.SlopeChi2, lin.DoF, lin.SlopeErr, b*lin.SlopeErr)
			}
		}
	} else {
		r.Status = VerifyFitFailed
		r.SlopeMeasured, r.KtMeasured, r.SlopeErr, r.KtErr, r.InterceptMeasuredHz, r.SlopeChi2 = math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()
		warn(WarnDopplerFit, "Doppler slope: %v", err)
	}
	// Flip dynamics at resonance for the velocity class nearest v = 0.
	i0 := 0
	for i, v := range s.Velocities {
		if math.Abs(v) < math.Abs(s.Velocities[i0]) {
			i0 = i
		}
	}
	r.TransferMeasured, r.RabiMeasuredHz = math.NaN(), math.NaN()
	if c := r.Spectra[i0].Fit.CentreHz; !math.IsNaN(c) {
		j := &verifyJob{v: s.Velocities[i0], detHz: c, windows: 2 * s.Windows, trace: make([]float64, 2*s.Windows)}
		// the transfer is read at the first π time: run it separately
		jt := &verifyJob{v: s.Velocities[i0], detHz: c, windows: s.Windows, trace: make([]float64, s.Windows)}
		runAll([]*verifyJob{j, jt})
		r.RabiTrace = j.trace
		r.RabiMeasuredHz, _ = dispersion.FitRabiTrace(j.trace, d.Period, p.RabiHz, dopplerRMS)
		r.TransferMeasured = jt.transfer
	}
	// Verify's own findings, in words.
	if dv := Deviation(r.KtMeasured, r.KtModel); math.Abs(dv) > 0.01 {
		warn(WarnKtDeviation, "measured k_t deviates from the effective model by %+.1f%%: the interrogation resolves the momentum spread of a pulse and the line sits near the stationary point of κ(t) (delta-pulse k_t %.4g 1/m), not at the envelope mean", 100*dv, d.Result.KtDelta)
	}
	if dv := Deviation(r.RabiMeasuredHz, r.RabiModelHz); math.Abs(dv) > 0.05 {
		warn(WarnRabiDeviation, "effective Rabi frequency %.3g Hz deviates from the cycle average by %+.0f%%", r.RabiMeasuredHz, 100*dv)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, sp := range r.Spectra {
		lo, hi = math.Min(lo, sp.ModelCentreHz), math.Max(hi, sp.ModelCentreHz)
	}
	if hi-lo > p.ShakeHz/2 {
		warn(WarnCombOverlap, "the pulse train's spectrum repeats every f_shake = %.4g Hz, but the resonances of these velocities span %.4g Hz: lines of different velocity classes and sidebands overlap, a thermal sample's spectrum cannot tell them apart (ħω not ≫ E_R)", p.ShakeHz, hi-lo)
	}
	return r, nil
}

type verifyJob struct {
	v, detHz float64
	windows  int
	trace    []float64
	flip     float64
	transfer float64
}

// VerifyAxis is a setting that VerifySweep varies.
type VerifyAxis int

const (
	VerifyPulseWidth VerifyAxis = iota // pulse width (s): rectangular duration or gaussian FWHM
	VerifyShakeFreq                    // shaking frequency f_shake (Hz)
)

// Name is the axis's name on the command line ("pulse-width", "shake").
func (a VerifyAxis) Name() string { return [...]string{"pulse-width", "shake"}[a] }

// Unit is the SI unit of the axis values.
func (a VerifyAxis) Unit() string { return [...]string{"s", "Hz"}[a] }

// Set writes x into p.
func (a VerifyAxis) Set(p *dispersion.Shake, x float64) {
	switch a {
	case VerifyPulseWidth:
		p.PulseWidth = x
	case VerifyShakeFreq:
		p.ShakeHz = x
	}
}

// ParseVerifyAxis reads an axis name ("pulse-width" or "shake").
func ParseVerifyAxis(name string) (VerifyAxis, error) {
	for _, a := range []VerifyAxis{VerifyPulseWidth, VerifyShakeFreq} {
		if a.Name() == name {
			return a, nil
		}
	}
	return 0, fmt.Errorf("%w: unknown verify sweep setting %q; allowed: pulse-width, shake", dispersion.ErrBadInput, name)
}

// VerifySweepPoint is one setting of a deviation sweep.
type VerifySweepPoint struct {
	X      float64 // the swept value (SI, VerifyAxis.Unit)
	Result *VerifyResult
	Err    error // the setting was refused (e.g. pulse longer than the period)
}

// VerifySweep runs Verify for each value xs of the axis, in order, with the
// other settings of p and s. Errors of single settings are kept in the
// points; the error returned is for a sweep that cannot run at all (a
// pulse-width sweep of delta pulses or of a continuous drive, no values).
// progress (may be nil) is called before each point with its index and the
// number of points.
func VerifySweep(p dispersion.Shake, s VerifySettings, axis VerifyAxis, xs []float64, progress func(i, n int)) ([]VerifySweepPoint, error) {
	if len(xs) == 0 {
		return nil, fmt.Errorf("%w: a verify sweep needs at least one value", dispersion.ErrBadInput)
	}
	if axis == VerifyPulseWidth && (p.Pulse == dispersion.PulseDelta || p.Pulse == dispersion.PulseContinuous) {
		return nil, fmt.Errorf("%w: a pulse-width sweep needs rectangular or gaussian pulses, not %v", dispersion.ErrBadInput, p.Pulse)
	}
	out := make([]VerifySweepPoint, len(xs))
	for i, x := range xs {
		if progress != nil {
			progress(i, len(xs))
		}
		q := p
		axis.Set(&q, x)
		ss := s
		if s.Velocities != nil {
			ss.Velocities = append([]float64(nil), s.Velocities...)
		}
		r, err := Verify(q, ss)
		out[i] = VerifySweepPoint{X: x, Result: r, Err: err}
	}
	return out, nil
}

// resonanceRange returns the lowest and highest RF detuning (Hz) at which an
// atom of mean velocity v is resonant with a flip that transfers some κ of
// the RF-on part of the cycle: sgn(f0)(κv/2π + ħκ²/4πm − micromotion shift).
func (d *ShakeDrive) resonanceRange(v float64) (lo, hi float64) {
	k1, k2 := d.kappaRange()
	f := func(k float64) float64 {
		return d.SignF0 * (k*v/(2*math.Pi) + dispersion.Hbar*k*k/(4*math.Pi*d.Mass) - d.Result.MicroShiftHz)
	}
	lo, hi = math.Min(f(k1), f(k2)), math.Max(f(k1), f(k2))
	if ks := -d.Mass * v / dispersion.Hbar; ks > k1 && ks < k2 {
		lo, hi = math.Min(lo, f(ks)), math.Max(hi, f(ks))
	}
	return lo, hi
}
