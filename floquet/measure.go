package floquet

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"socmap/dispersion"
)

// Method selects the solver of Verify.
type Method int

const (
	// Auto: DeltaPulses for delta pulses, RealTimeSplitStep otherwise.
	Auto Method = iota
	// DeltaPulses: the exact pulse-by-pulse solution (finite pulses are
	// replaced by delta pulses of the same area at the same phase).
	DeltaPulses
	// RealTimeSplitStep: the real-time split-step simulation.
	RealTimeSplitStep
)

func (m Method) String() string {
	return [...]string{"auto", "delta-exact", "real-time split-step"}[m]
}

// Settings of a verification run. The zero value gives the documented defaults.
type Settings struct {
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
	// Method: default Auto.
	Method Method
	// Refine divides the real-time step while the RF is on by this factor
	// (convergence checks). Default 1.
	Refine int
	// MaxWindows refuses interrogations longer than this (default 4000).
	MaxWindows int
}

func (s *Settings) defaults(d *Drive) error {
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
	if s.Method == Auto {
		s.Method = RealTimeSplitStep
		if d.Shake.Pulse == dispersion.PulseDelta {
			s.Method = DeltaPulses
		}
	}
	return nil
}

// Spectrum is the flipped fraction against RF detuning for one mean velocity.
type Spectrum struct {
	Velocity      float64   // mean velocity of the atoms, m/s
	DetuningHz    []float64 // RF detuning f_RF − |f0|, Hz (coarse and fine scans, sorted)
	Flipped       []float64 // flipped fraction after the interrogation
	Fit           dispersion.LineFit   // fit of the fine scan
	ModelCentreHz float64   // the effective model's resonance (Drive.ModelResonanceHz)
}

// Status of a Result.
type Status int

const (
	OK        Status = iota
	FitFailed        // a line fit failed; the affected numbers are NaN
)

func (s Status) String() string { return [...]string{"ok", "fit-failed"}[s] }

// Result of Verify: the effective model's prediction beside each measured value.
type Result struct {
	Status   Status
	Method   Method
	Model    dispersion.ShakeResult
	Spectra  []Spectrum
	Windows  int     // interrogation, shaking periods
	TimeS    float64 // interrogation time, s
	SigmaV   float64 // rms velocity spread of the atoms, m/s
	Grid     Grid    // real-time grid (zero for DeltaPulses)
	Dt       float64 // split step while the RF is on, s
	Steps    int     // split steps per shaking period
	Runs     int     // simulations made
	NormDev  float64 // largest |norm − 1| over all real-time runs
	Warnings []string

	// Doppler slope of the resonance: d(sgn(f0)(f_RF − |f0|))/dv, Hz per mm/s.
	SlopeModel, SlopeMeasured, SlopeErr float64
	KtModel, KtMeasured, KtErr          float64 // k_t = 2π × slope, 1/m
	// Resonance at v = 0, RF detuning f_RF − |f0| in Hz.
	InterceptModelHz, InterceptMeasuredHz float64
	// Mean canonical momentum transfer per flipped atom at resonance (1/m),
	// from the velocity class nearest v = 0; model: k_t.
	TransferMeasured float64
	// Effective Rabi frequency Ω/2π from the flip dynamics at resonance (Hz),
	// fitted with the sample's known Doppler spread (FitRabiTrace); model:
	// the cycle-averaged Rabi frequency.
	RabiModelHz, RabiMeasuredHz float64
	RabiTrace                   []float64 // flipped fraction after each period at resonance
}

// Deviation returns measured/model − 1.
func Deviation(measured, model float64) float64 { return measured/model - 1 }

// Verify measures, as an experiment would, the flip spectra of the shaking
// setting p without the cycle average, and compares the resonance positions,
// Doppler slope, momentum transfer and effective Rabi frequency with the
// effective model of p.Evaluate.
func Verify(p dispersion.Shake, s Settings) (*Result, error) {
	d, err := NewDrive(p)
	if err != nil {
		return nil, err
	}
	if d.Result.KtMean == 0 {
		return nil, errors.New("the setting has no recoil (k_t = 0): there is no Doppler slope to measure")
	}
	if err := s.defaults(d); err != nil {
		return nil, err
	}
	r := &Result{Method: s.Method, Model: d.Result, Windows: s.Windows, TimeS: float64(s.Windows) * d.Period,
		RabiModelHz: p.RabiHz, KtModel: d.Result.KtMean, SlopeModel: d.Result.DopplerHzPerMmS}
	r.Warnings = append(r.Warnings, dispersion.WarningTexts(d.Result.Warnings)...)
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

	var sim func(job *job)
	var closeAll func()
	var mu sync.Mutex
	switch s.Method {
	case DeltaPulses:
		ds := NewDeltaSolver(d)
		sim = func(j *job) {
			q0 := d.Mass * j.v / dispersion.Hbar
			j.flip = ds.FlipPacket(q0, sigK, d.Detuning(j.detHz), j.windows, j.trace)
			if j.trace == nil {
				return
			}
			j.transfer = ds.kt // by construction
		}
		closeAll = func() {}
	default:
		g := GridFor(d, s.Velocities, tint*2, sigX)
		rt, err := newRealTime(d, g, s.Refine)
		if err != nil {
			return nil, err
		}
		r.Grid, r.Dt, r.Steps = g, rt.Dt, rt.StepsPerWindow()
		pool := make(chan *Worker, s.Workers)
		var all []*Worker
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
		sim = func(j *job) {
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
	runAll := func(jobs []*job) {
		ch := make(chan *job)
		var wg sync.WaitGroup
		for i := 0; i < s.Workers; i++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for j := range ch {
					sim(j)
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
	coarse := make([][]*job, nv)
	var jobs []*job
	for i, v := range s.Velocities {
		c := d.ModelResonanceHz(v)
		r.Spectra[i] = Spectrum{Velocity: v, ModelCentreHz: c}
		lo, hi := d.resonanceRange(v)
		lo, hi = math.Min(lo, c)-3/tint, math.Max(hi, c)+3/tint
		nc := max(s.CoarsePoints, min(241, int(math.Ceil((hi-lo)/(0.5/tint)))+1))
		for k := 0; k < nc; k++ {
			j := &job{v: v, detHz: lo + (hi-lo)*float64(k)/float64(nc-1), windows: s.Windows}
			coarse[i] = append(coarse[i], j)
			jobs = append(jobs, j)
		}
	}
	runAll(jobs)
	fine := make([][]*job, nv)
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
			j := &job{v: v, detHz: fc + 0.6/tint*(2*float64(k)/float64(s.FinePoints-1)-1), windows: s.Windows}
			fine[i] = append(fine[i], j)
			jobs = append(jobs, j)
		}
	}
	runAll(jobs)
	var vs, cs, es []float64
	for i := range s.Velocities {
		sp := &r.Spectra[i]
		all := append(append([]*job(nil), coarse[i]...), fine[i]...)
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
			r.Status = FitFailed
			r.Warnings = append(r.Warnings, fmt.Sprintf("line fit at v = %.3g mm/s failed: %v", sp.Velocity*1e3, err))
			sp.Fit = dispersion.LineFit{CentreHz: math.NaN(), CentreErrHz: math.NaN()}
			continue
		}
		sp.Fit = lf
		vs = append(vs, sp.Velocity*1e3)
		cs = append(cs, d.SignF0*lf.CentreHz)
		es = append(es, lf.CentreErrHz)
	}
	r.InterceptModelHz = d.ModelResonanceHz(0)
	if lin, err := dispersion.FitLinear(vs, cs, nil); err == nil {
		r.SlopeMeasured, r.SlopeErr = lin.Slope, lin.SlopeErr
		r.InterceptMeasuredHz = d.SignF0 * lin.Intercept
		r.KtMeasured = 2 * math.Pi * lin.Slope * 1e3
		r.KtErr = 2 * math.Pi * lin.SlopeErr * 1e3
		if math.IsNaN(r.SlopeErr) {
			r.SlopeErr, r.KtErr = 0, 0 // two velocities: exact line, no residual
		}
	} else {
		r.Status = FitFailed
		r.SlopeMeasured, r.KtMeasured, r.SlopeErr, r.KtErr, r.InterceptMeasuredHz = math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()
		r.Warnings = append(r.Warnings, "Doppler slope: "+err.Error())
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
		j := &job{v: s.Velocities[i0], detHz: c, windows: 2 * s.Windows, trace: make([]float64, 2*s.Windows)}
		// the transfer is read at the first π time: run it separately
		jt := &job{v: s.Velocities[i0], detHz: c, windows: s.Windows, trace: make([]float64, s.Windows)}
		runAll([]*job{j, jt})
		r.RabiTrace = j.trace
		r.RabiMeasuredHz, _ = dispersion.FitRabiTrace(j.trace, d.Period, p.RabiHz, dopplerRMS)
		r.TransferMeasured = jt.transfer
	}
	// Verify's own findings, in words.
	if dv := Deviation(r.KtMeasured, r.KtModel); math.Abs(dv) > 0.01 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("measured k_t deviates from the effective model by %+.1f%%: the interrogation resolves the momentum spread of a pulse and the line sits near the stationary point of κ(t) (delta-pulse k_t %.4g 1/m), not at the envelope mean", 100*dv, d.Result.KtDelta))
	}
	if dv := Deviation(r.RabiMeasuredHz, r.RabiModelHz); math.Abs(dv) > 0.05 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("effective Rabi frequency %.3g Hz deviates from the cycle average by %+.0f%%", r.RabiMeasuredHz, 100*dv))
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, sp := range r.Spectra {
		lo, hi = math.Min(lo, sp.ModelCentreHz), math.Max(hi, sp.ModelCentreHz)
	}
	if hi-lo > p.ShakeHz/2 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("the pulse train's spectrum repeats every f_shake = %.4g Hz, but the resonances of these velocities span %.4g Hz: lines of different velocity classes and sidebands overlap, a thermal sample's spectrum cannot tell them apart (ħω not ≫ E_R)", p.ShakeHz, hi-lo))
	}
	return r, nil
}

type job struct {
	v, detHz float64
	windows  int
	trace    []float64
	flip     float64
	transfer float64
}

// SweepPoint is one setting of a deviation sweep.
type SweepPoint struct {
	X      float64 // the swept value (SI)
	Result *Result
	Err    error // the setting was refused (e.g. pulse longer than the period)
}

// Sweep runs Verify for each value of a setting: set writes the value into
// a copy of p. Errors of single settings are kept in the points.
func Sweep(p dispersion.Shake, s Settings, xs []float64, set func(p *dispersion.Shake, x float64)) []SweepPoint {
	out := make([]SweepPoint, len(xs))
	for i, x := range xs {
		q := p
		set(&q, x)
		ss := s
		ss.Velocities = append([]float64(nil), s.Velocities...)
		if s.Velocities == nil {
			ss.Velocities = nil
		}
		r, err := Verify(q, ss)
		out[i] = SweepPoint{X: x, Result: r, Err: err}
	}
	return out
}

// resonanceRange returns the lowest and highest RF detuning (Hz) at which an
// atom of mean velocity v is resonant with a flip that transfers some κ of
// the RF-on part of the cycle: sgn(f0)(κv/2π + ħκ²/4πm − micromotion shift).
func (d *Drive) resonanceRange(v float64) (lo, hi float64) {
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
