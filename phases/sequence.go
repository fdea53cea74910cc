package phases

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"

	"socmap/dispersion"
	"socmap/gpe"
	"socmap/gpe/fft"
)

// A lab sequence in real time: ramps of lab settings, holds and a release,
// simulated with the real-time spinor GPE (gpe.RealTime) from a chosen
// start, with the in-situ imaging and Bragg detection of the final state
// and the long time-of-flight momentum distribution.
//
// Units. The evolution runs in the units of the settings at t = 0:
// k_ref = k_R(0) (signed), E_ref = E_R(0), time ħ/E_ref. A setting s with
// recoil k_R(s) and recoil energy E_R(s) enters as κ = k_R(s)/k_ref,
// Ω = (ħΩ/E_R(s))·E_R(s)/E_ref and δ likewise (a direct model has no SI:
// κ = 1 and Ω, δ as given, durations in ħ/E_R).

// RampShape is how a ramp goes from its start to its end value.
type RampShape int

const (
	RampLinear RampShape = iota // v = a + (b − a)u, u = t/T
	RampS                       // v = a + (b − a)(1 − cos πu)/2 (s-shaped: zero slope at both ends)
)

func (s RampShape) String() string { return [...]string{"linear", "s"}[s] }

// ParseRampShape reads "linear" or "s".
func ParseRampShape(s string) (RampShape, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "linear":
		return RampLinear, nil
	case "s", "s-shaped", "smooth":
		return RampS, nil
	}
	return 0, badInputf("ramp shape %q: allowed linear, s", s)
}

// Trap ramp settings (Hz), besides the map axes of Axes.
const (
	SettingTrapX = "trap-x"
	SettingTrapY = "trap-y"
	SettingTrapZ = "trap-z"
)

// Ramp changes one setting linearly or s-shaped over its step.
type Ramp struct {
	// Setting: a map axis name (Axes: rabi, detuning…, omega, delta, …) or
	// trap-x, trap-y, trap-z (trap frequency, Hz).
	Setting string
	// From, To in the setting's stored unit (the axis table's Unit; Hz for
	// the trap). A From that differs from the value before the step is a
	// sudden switch at the step's start.
	From, To float64
}

// Step is one step of a sequence.
type Step struct {
	// Name labels the step in tables (default "step N").
	Name string
	// Duration in seconds (DurationER for a direct model). A step without
	// ramps is a hold. Must be ≥ 0.
	Duration, DurationER float64
	Ramps                []Ramp
	Shape                RampShape
	// Release: switch the trap and the coupling off and let the cloud fly
	// for Duration (time of flight). Only as the last step.
	Release bool
	// Interacting: during a release, keep the interactions while the cloud
	// stays well inside the box (rms width below a sixth of the box along
	// x), then fly ballistically; otherwise ballistic from the start.
	Interacting bool
}

// StartKind chooses the initial state.
type StartKind int

const (
	StartGround StartKind = iota // ground state at the settings at t = 0
	StartUp                      // all atoms in ↑: the ground state of the trap/box at Ω = 0 with ↓ emptied
	StartDown                    // all atoms in ↓
	StartGiven                   // SequenceProblem.StartState
)

// ParseStart reads "ground", "up", "down".
func ParseStart(s string) (StartKind, error) {
	switch s {
	case "", "ground":
		return StartGround, nil
	case "up":
		return StartUp, nil
	case "down":
		return StartDown, nil
	}
	return 0, badInputf("start %q: allowed ground, up, down (or a GPE result file)", s)
}

// BraggProbe are the two Bragg probes of the detection: light scattered
// off the density grating (Saturation, Duration) and atoms diffracted by a
// two-photon Bragg pulse at 2k₁ (Rabi, PulseDuration, Frequency, Phases).
type BraggProbe struct {
	// Saturation s of the resonant light probe and its Duration (s):
	// photons scattered per atom n = (Γ/2)·s/(1 + s)·τ (two-level atom,
	// common practice, no source). Default 0.1 and 10 µs.
	Saturation, Duration float64
	// Rabi: two-photon Rabi frequency Ω_B/2π of the atomic Bragg pulse, Hz
	// (the moving lattice ħΩ_B cos(2k₁x − ω_B t + φ), spin independent;
	// ħΩ_B/E_R for a direct model). Default BraggDefaultRabi E_R/ħ (E_R at
	// t = 0); < 0: no atomic Bragg pulse.
	Rabi float64
	// PulseDuration: its length, s (ħ/E_R direct). Default
	// BraggDefaultDuration ħ/E_R.
	PulseDuration float64
	// Frequency: ω_B/2π of the lattice, Hz (E_R/ħ direct). Default (NaN or
	// unset with FrequencySet false): the resonance of the exchange
	// −k₁ → +k₁ between the stripe's two momentum components,
	// ħω_B = E₋(k₁) − E₋(−k₁) of the lower band at the final settings (0 at
	// δ = 0).
	Frequency    float64
	FrequencySet bool
	// Phases: lattice phases φ, evenly over [0, π), over which the
	// diffracted fraction of the final state is averaged (the stripe's
	// position is not fixed from shot to shot; through second order in
	// Ω_Bτ the fraction has period π in φ: the first-order exchange
	// between ±k₁ changes sign, the second order does not depend on φ).
	// Default 4 (the plane-wave cloud takes the same phases: the
	// harmonics an interacting state carries, e.g. at 3k₁, make even its
	// fraction depend on φ).
	Phases int
}

// Defaults of the atomic Bragg pulse in recoil units (a choice of this
// project): Ω_B = 0.01 E_R/ħ (weak: the resonant transfer of a plane wave
// is ~(Ω_Bτ/2)²) for τ = 20 ħ/E_R (spectral width 1/τ = 0.05 E_R/ħ, well
// below the detuning ≈ 8k₁²E_R of the order +3k₁, so that the probe selects
// the ±k₁ exchange).
const (
	BraggDefaultRabi     = 0.01
	BraggDefaultDuration = 20.0
)

// SequenceProblem is a lab sequence: the set-up of a ground-state problem
// (lab, dimension, trap or box, grid) and the steps.
type SequenceProblem struct {
	// Ground gives the lab settings (before the ramps' From values are
	// applied), the dimension, the trap or box and the grid rule: the grid
	// is that of the ground-state problem at t = 0 (box: at the last
	// ramp's end, so that it admits the final momentum).
	Ground GroundProblem
	Steps  []Step
	Start  StartKind
	// StartState for StartGiven, on the grid of Ground's set-up (same
	// points and lengths in SI); normalised to the atom number.
	StartState *gpe.State
	// Imaging: the camera (SI lengths). CrossSection and Height default to
	// 3λ²/2π of the atom's D2 line and the cloud's transverse extent.
	Imaging gpe.Imaging
	Bragg   BraggProbe
}

// SequenceSettings configure Run. Zero fields take the defaults.
type SequenceSettings struct {
	// Dt: time step in s (DtER in ħ/E_R for a direct model). Default
	// gpe.RTStepPhase/E_max over the sequence (reported); a step with
	// Dt·E_max ≥ π is refused.
	Dt, DtER float64
	// Samples: points of the time series over the in-trap part. Default 100.
	Samples int
	// Snapshots: states stored (evenly over the in-trap part, start and
	// end included), at most as many as fit in 512 MiB. Default 21.
	Snapshots int
	// OverlapEvery: the overlap with the instantaneous ground state is
	// computed at every OverlapEvery-th sample and at every step's end
	// (an imaginary-time solve per new setting). Default 5; negative:
	// only at the step ends.
	OverlapEvery int
	// Knots: evaluations of the scheme → model chain per ramp (the
	// effective parameters are interpolated linearly between them), or at
	// every time step when a ramp has fewer. Default 257.
	Knots int
	// Ground: settings of the ground-state solves (start, overlaps).
	Ground GroundSettings
	// Progress, if set, is called with the simulated time done and the
	// total (s, or ħ/E_R), from the running goroutine.
	Progress func(done, total float64)
}

// SequenceStatus of a run.
type SequenceStatus int

const (
	SequenceDone        SequenceStatus = iota // every step simulated
	SequenceInterrupted                       // the context was cancelled: the result holds what was simulated
)

func (s SequenceStatus) String() string { return [...]string{"done", "interrupted"}[s] }

// StepRow is the state at the end of one step.
type StepRow struct {
	Name                       string
	Time                       float64 // s (ħ/E_R for a direct model)
	RabiOverER, DetuningOverER float64 // Ω, δ in E_ref
	KappaRel                   float64 // k_R/k_ref
	Energy                     float64 // E/N in E_ref
	Overlap                    float64 // with the instantaneous ground state (NaN: none, e.g. trap off)
	GroundEnergy               float64 // its energy per particle, E_ref (NaN without)
	Sz, Contrast               float64
}

// Snapshot is a stored state.
type Snapshot struct {
	Time  float64 // s (ħ/E_R direct)
	State *gpe.State
}

// Detection is the readout of the final in-trap state.
type Detection struct {
	K1           float64 // dominant |k_x|, k_ref
	StripePeriod float64 // π/k₁ in m (1/k_ref direct)
	X            []float64
	Profile      []float64 // atoms per m (per 1/k_ref) along x
	Image        *gpe.ImageResult
	Verdict      string
	// Bragg: BraggFraction of the stripe and of the envelope (plane-wave
	// reference); Enhancement N·fraction; PhotonsPerAtom of the probe.
	BraggFraction, BraggPlaneWave, BraggEnhancement, PhotonsPerAtom float64
	// Atomic Bragg diffraction (gpe.BraggTransfer; NaN when not run): the
	// population change |ΔP| of the order opposite the largest momentum
	// peak k_p (canonical k_x within k₁ of k_p − 2k₁·sgn k_p: the stripe's
	// second wave, a plane wave's empty order), as a fraction of the atoms,
	// mean and largest over the lattice phases, and the mean for the
	// plane-wave cloud of the same envelope (the final state's momentum
	// components within k₁ of k_p, renormalised); the fractions of the
	// atoms whose momentum changed at all (gpe.BraggResult.Moved, means);
	// the pulse used (SI: Hz, s; direct: E_R/ħ, ħ/E_R).
	AtomBraggStripe, AtomBraggStripeMax, AtomBraggPlaneWave float64
	AtomBraggMoved, AtomBraggMovedPlaneWave                 float64
	AtomBraggRabi, AtomBraggDuration, AtomBraggFrequency    float64
	// TOF: mechanical momentum distribution per component (1/m or k_ref)
	// after Stern–Gerlach separation, and the TOF duration (0: none).
	TOFQ, TOFW [2][]float64
	TOF        float64
	// TOFX: positions ħq t/m of the momentum classes after the TOF (m):
	// the far field.
	TOFX [2][]float64
	// The finite time of flight (gpe.FreeFlight, exact free propagation of
	// the released state, after the interacting part if any): positions
	// (m) and the density along x per component (atoms per m), its rms
	// width (m) and the method used.
	FlightX       []float64
	FlightDensity [2][]float64
	FlightWidth   [2]float64
	FlightMethod  string
}

// Verdicts of the detection report.
const (
	VerdictVisible      = "visible in situ"
	VerdictNeedsBragg   = "needs Bragg"
	VerdictUnresolvable = "not resolvable"
)

// Thresholds of the verdict (choices of this project, common practice, no
// source): a 2k₁ peak is seen in situ at SNR ≥ SNRVisible; a stripe is
// there to be detected by Bragg scattering if its in-situ contrast is at
// least MinStripeContrast.
const (
	SNRVisible        = 5.0
	MinStripeContrast = 0.005
)

// SequenceResult is a simulated sequence.
type SequenceResult struct {
	Status SequenceStatus
	Units  *gpe.Units // nil for a direct model
	Grid   *gpe.Grid
	// Dt: the time step used (s, or ħ/E_R); EMax the energy scale (E_ref)
	// it was chosen from; Steps the time steps taken.
	Dt, EMax float64
	Steps    int
	// Time series (Samples points, in-trap part).
	Times, Energy, Overlap, Sz, Contrast, Omega, Delta, Kappa []float64
	Rows                                                      []StepRow
	Snapshots                                                 []Snapshot
	Detection                                                 *Detection
	Notes                                                     []string
	// Start: how the initial state was made.
	Start string
}

// lab state during a sequence: the Lab and the trap frequencies.
type seqSettings struct {
	lab  Lab
	trap [3]float64 // Hz
}

func (p *SequenceProblem) apply(s seqSettings, name string, v float64) (seqSettings, error) {
	switch name {
	case SettingTrapX, SettingTrapY, SettingTrapZ:
		if p.Ground.Trap == nil {
			return s, badInputf("ramp of %s needs a trapped cloud (--atoms, --trap)", name)
		}
		if !(v >= 0) {
			return s, badInputf("%s = %g Hz: must be ≥ 0 (0: trap off)", name, v)
		}
		a := int(name[len(name)-1] - 'x')
		if a >= p.Ground.Dims {
			return s, badInputf("%s: the grid has %d dimension(s); transverse frequencies set the reduced coupling and stay fixed", name, p.Ground.Dims)
		}
		s.trap[a] = v
		return s, nil
	}
	if p.Ground.Trap != nil {
		switch name {
		case AxisG1, AxisG2, AxisDensity, AxisRatio:
			return s, badInputf("ramp of %s: a trapped cloud takes its interactions from the scattering lengths", name)
		}
	}
	l, err := s.lab.Set(name, v)
	if err != nil {
		return s, badInput(err)
	}
	s.lab = l
	return s, nil
}

// eval turns settings into the Hamiltonian in reference units.
type seqEval struct {
	p     *SequenceProblem
	ref   dispersion.Model
	model gpe.Model // the model at t = 0 on the grid (interactions of a trap)
	dims  int
	units *gpe.Units
}

func (e *seqEval) hamiltonian(s seqSettings) (gpe.RTHamiltonian, error) {
	var h gpe.RTHamiltonian
	m, err := s.lab.Model()
	if err != nil {
		return h, badInput(fmt.Errorf("a ramp reaches a setting without an effective model: %w", err))
	}
	h.Kappa, h.Omega, h.Delta = 1, m.OmegaOverER, m.DeltaOverER
	if e.ref.ER > 0 {
		h.Kappa = m.KR / e.ref.KR
		f := m.ER / e.ref.ER
		h.Omega *= f
		h.Delta *= f
	}
	if e.p.Ground.Trap != nil {
		h.Guu, h.Gdd, h.Gud = e.model.Guu, e.model.Gdd, e.model.Gud
		for a := 0; a < e.dims; a++ {
			h.TrapAngular[a] = e.units.AngularFromHz(s.trap[a])
		}
	} else {
		u, _, err := s.lab.Resolve()
		if err != nil {
			return h, badInput(err)
		}
		f := 1.0
		if e.ref.ER > 0 {
			f = m.ER / e.ref.ER
		}
		h.Guu, h.Gdd, h.Gud = u.Guu*f, u.Gdd*f, u.Gud*f
	}
	return h, nil
}

func shapeAt(sh RampShape, u float64) float64 {
	if sh == RampS {
		return (1 - math.Cos(math.Pi*u)) / 2
	}
	return u
}

// Run simulates the sequence. ctx (may be nil) interrupts it: the result
// then has Status SequenceInterrupted and holds the series and snapshots
// so far. Errors caused by p's settings match ErrInput.
func (p SequenceProblem) Run(ctx context.Context, s *SequenceSettings) (*SequenceResult, error) {
	var set SequenceSettings
	if s != nil {
		set = *s
	}
	if ctx == nil {
		ctx = context.Background()
	}
	if set.Samples == 0 {
		set.Samples = 100
	}
	if set.Snapshots == 0 {
		set.Snapshots = 21
	}
	if set.OverlapEvery == 0 {
		set.OverlapEvery = 5
	}
	if set.Knots == 0 {
		set.Knots = 257
	}
	if set.Samples < 2 || set.Snapshots < 2 || set.Knots < 2 {
		return nil, badInputf("samples, snapshots and knots must be ≥ 2")
	}
	if len(p.Steps) == 0 {
		return nil, badInputf("a sequence needs at least one step")
	}
	direct := p.Ground.Lab.Scheme != nil && p.Ground.Lab.Scheme.Atom() == nil
	dur := func(st Step) float64 {
		if direct {
			return st.DurationER
		}
		return st.Duration
	}
	for i, st := range p.Steps {
		d := dur(st)
		if !(d >= 0) || math.IsInf(d, 0) {
			return nil, badInputf("step %d: duration %g: must be ≥ 0 and finite", i+1, d)
		}
		if direct && st.Duration != 0 {
			return nil, badInputf("step %d: a direct model has no SI time unit: give durations in ħ/E_R", i+1)
		}
		if st.Release && i != len(p.Steps)-1 {
			return nil, badInputf("step %d: a release (time of flight) must be the last step", i+1)
		}
		if st.Release && len(st.Ramps) > 0 {
			return nil, badInputf("step %d: a release ramps nothing", i+1)
		}
	}
	// Settings at t = 0: the first ramp of each setting gives its start.
	var s0 seqSettings
	s0.lab = p.Ground.Lab
	if p.Ground.Trap != nil {
		s0.trap = p.Ground.Trap.FreqHz
	}
	seen := map[string]bool{}
	var err error
	for _, st := range p.Steps {
		for _, r := range st.Ramps {
			if seen[r.Setting] {
				continue
			}
			seen[r.Setting] = true
			if s0, err = p.apply(s0, r.Setting, r.From); err != nil {
				return nil, err
			}
		}
	}
	// Settings at every step boundary (and a check of every ramp end).
	bounds := []seqSettings{s0}
	cur := s0
	for _, st := range p.Steps {
		for _, r := range st.Ramps {
			if cur, err = p.apply(cur, r.Setting, r.To); err != nil {
				return nil, err
			}
		}
		bounds = append(bounds, cur)
	}
	// The grid: the ground-state set-up at t = 0 (trap) or at the end (box).
	gp := p.Ground
	gp.Lab = s0.lab
	if gp.Trap != nil {
		t := *gp.Trap
		t.FreqHz = s0.trap
		gp.Trap = &t
	}
	var gridSetup *GroundSetup
	if gp.Trap == nil && gp.Lengths == nil && gp.LengthsSI == nil {
		ge := gp
		ge.Lab = bounds[len(bounds)-1].lab
		gs, err := ge.Setup(set.Ground.Variational)
		if err != nil {
			return nil, err
		}
		g := gs.Problem.Grid
		gp.Points = g.Shape()
		if gs.Units != nil {
			for a := 0; a < g.Dim; a++ {
				gp.LengthsSI = append(gp.LengthsSI, gs.Units.LengthSI(g.L[a]))
			}
		} else {
			gp.Lengths = append([]float64(nil), g.L[:g.Dim]...)
		}
	}
	gridSetup, err = gp.Setup(set.Ground.Variational)
	if err != nil {
		return nil, err
	}
	grid := gridSetup.Problem.Grid
	ref, err := s0.lab.Model()
	if err != nil {
		return nil, badInput(err)
	}
	ev := &seqEval{p: &p, ref: ref, model: gridSetup.Problem.Model, dims: grid.Dim, units: gridSetup.Units}
	res := &SequenceResult{Units: gridSetup.Units, Grid: grid, Notes: append([]string{}, gridSetup.Notes...)}
	timeSI := func(t float64) float64 {
		if res.Units != nil {
			return res.Units.TimeSI(t)
		}
		return t
	}
	toInternal := func(t float64) float64 {
		if res.Units != nil {
			return t / res.Units.TimeSI(1)
		}
		return t
	}
	// The start state.
	start, startNote, err := p.startState(gridSetup, &set)
	if err != nil {
		return nil, err
	}
	res.Start = startNote
	// Schedules per step, through the chain at the knots.
	type stepPlan struct {
		dur   float64 // internal
		knots []gpe.RTHamiltonian
		sAt   func(u float64) seqSettings
		rel   bool
	}
	plans := make([]stepPlan, len(p.Steps))
	cur = s0
	hs := []gpe.RTHamiltonian{}
	for i, st := range p.Steps {
		from := cur
		// a ramp's From is a switch at the step start
		for _, r := range st.Ramps {
			if from, err = p.apply(from, r.Setting, r.From); err != nil {
				return nil, err
			}
		}
		st := st
		base := from
		sAt := func(u float64) seqSettings {
			x := base
			f := shapeAt(st.Shape, u)
			for _, r := range st.Ramps {
				x, _ = p.apply(x, r.Setting, r.From+(r.To-r.From)*f)
			}
			return x
		}
		pl := stepPlan{dur: toInternal(dur(st)), sAt: sAt, rel: st.Release}
		nk := 1
		if len(st.Ramps) > 0 {
			nk = set.Knots
		}
		for k := 0; k < nk; k++ {
			u := 0.0
			if nk > 1 {
				u = float64(k) / float64(nk-1)
			}
			h, err := ev.hamiltonian(sAt(u))
			if err != nil {
				return nil, fmt.Errorf("step %d: %w", i+1, err)
			}
			pl.knots = append(pl.knots, h)
			hs = append(hs, h)
		}
		plans[i] = pl
		cur = sAt(1)
	}
	// The time step from the largest energy scale.
	np := 0.0
	for i := range start.Psi[0] {
		np = math.Max(np, abs2c(start.Psi[0][i])+abs2c(start.Psi[1][i]))
	}
	emax := 0.0
	for _, h := range hs {
		emax = math.Max(emax, gpe.RTMaxEnergy(grid, h, np))
	}
	dt := set.DtER
	if !direct && set.Dt != 0 {
		dt = toInternal(set.Dt)
	}
	rt, err := gpe.NewRealTime(start, gpe.RTSettings{Dt: dt, EMax: emax})
	if errors.Is(err, gpe.ErrUnstableStep) {
		return nil, badInput(err)
	}
	if err != nil {
		return nil, err
	}
	defer rt.Close()
	res.Dt, res.EMax = timeSI(rt.Dt), emax
	// In-trap duration and the sample and snapshot times.
	total := 0.0
	for _, pl := range plans {
		if !pl.rel {
			total += pl.dur
		}
	}
	sampleAt := make([]float64, set.Samples)
	for i := range sampleAt {
		sampleAt[i] = total * float64(i) / float64(set.Samples-1)
	}
	nsnap := set.Snapshots
	if per := 2 * 16 * grid.Size; nsnap*per > 512<<20 {
		nsnap = max(2, (512<<20)/per)
		res.Notes = append(res.Notes, fmt.Sprintf("snapshots limited to %d (512 MiB)", nsnap))
	}
	snapAt := make([]float64, nsnap)
	for i := range snapAt {
		snapAt[i] = total * float64(i) / float64(nsnap-1)
	}
	gsCache := map[gpe.RTHamiltonian]*groundRef{}
	groundFor := func(s seqSettings, h gpe.RTHamiltonian) *groundRef {
		if h.TrapAngular == ([3]float64{}) && p.Ground.Trap != nil {
			return nil
		}
		if g, ok := gsCache[h]; ok {
			return g
		}
		g := p.groundAt(gridSetup, s, &set)
		gsCache[h] = g
		return g
	}
	overlap := func(s seqSettings, h gpe.RTHamiltonian) (float64, float64) {
		g := groundFor(s, h)
		if g == nil {
			return math.NaN(), math.NaN()
		}
		k1 := gpe.DominantK(g.state)
		shift := math.Pi / math.Max(k1, 0.05)
		ov, err := gpe.MaxOverlap(rt.State(), g.state, shift)
		if err != nil {
			return math.NaN(), math.NaN()
		}
		return ov, g.energy
	}
	record := func(t float64, h gpe.RTHamiltonian, s seqSettings, withOverlap bool) {
		e := rt.Energies(h)
		m := rt.Moments(h.Kappa)
		st := rt.State()
		k1 := gpe.DominantK(st)
		c := gpe.StripeContrast(grid.X[0], st.DensityX(), k1, 0)
		ov := math.NaN()
		if withOverlap {
			ov, _ = overlap(s, h)
		}
		res.Times = append(res.Times, timeSI(t))
		res.Energy = append(res.Energy, e.Total)
		res.Overlap = append(res.Overlap, ov)
		res.Sz = append(res.Sz, m.Sz)
		res.Contrast = append(res.Contrast, c)
		res.Omega = append(res.Omega, h.Omega)
		res.Delta = append(res.Delta, h.Delta)
		res.Kappa = append(res.Kappa, h.Kappa)
	}
	// Walk the steps, stopping at sample and snapshot times.
	t := 0.0
	si, ni := 0, 0
	var lastH gpe.RTHamiltonian
	var lastS seqSettings
	for i, pl := range plans {
		if pl.rel {
			break
		}
		pl := pl
		sched := func(tt float64) gpe.RTHamiltonian {
			if len(pl.knots) == 1 || pl.dur == 0 {
				return pl.knots[len(pl.knots)-1]
			}
			u := math.Min(math.Max(tt/pl.dur, 0), 1) * float64(len(pl.knots)-1)
			k := min(int(u), len(pl.knots)-2)
			f := u - float64(k)
			a, b := pl.knots[k], pl.knots[k+1]
			lerp := func(x, y float64) float64 { return x + (y-x)*f }
			h := a
			h.Omega, h.Delta, h.Kappa = lerp(a.Omega, b.Omega), lerp(a.Delta, b.Delta), lerp(a.Kappa, b.Kappa)
			h.Guu, h.Gdd, h.Gud = lerp(a.Guu, b.Guu), lerp(a.Gdd, b.Gdd), lerp(a.Gud, b.Gud)
			for ax := range h.TrapAngular {
				h.TrapAngular[ax] = lerp(a.TrapAngular[ax], b.TrapAngular[ax])
			}
			return h
		}
		t0 := t
		end := t0 + pl.dur
		for {
			next := end
			if si < len(sampleAt) && sampleAt[si] < next {
				next = sampleAt[si]
			}
			if ni < len(snapAt) && snapAt[ni] < next {
				next = snapAt[ni]
			}
			if next > t {
				off := t - t0
				_, err := rt.Evolve(ctx, next-t, func(tt float64) gpe.RTHamiltonian { return sched(off + tt) })
				if err != nil {
					res.Status = SequenceInterrupted
					res.Steps = rt.Steps
					res.Notes = append(res.Notes, fmt.Sprintf("interrupted at t = %.4g s", timeSI(t0+rt.T-t0)))
					res.Snapshots = append(res.Snapshots, Snapshot{Time: timeSI(rt.T), State: rt.State()})
					return res, nil
				}
				t = next
				if set.Progress != nil {
					set.Progress(timeSI(t), timeSI(total))
				}
			}
			u := 1.0
			if pl.dur > 0 {
				u = (t - t0) / pl.dur
			}
			h := sched(t - t0)
			if si < len(sampleAt) && sampleAt[si] <= t {
				sv := pl.sAt(u)
				record(t, h, sv, set.OverlapEvery > 0 && si%set.OverlapEvery == 0)
				si++
			}
			if ni < len(snapAt) && snapAt[ni] <= t {
				res.Snapshots = append(res.Snapshots, Snapshot{Time: timeSI(t), State: rt.State()})
				ni++
			}
			if t >= end {
				lastH, lastS = h, pl.sAt(1)
				break
			}
		}
		// The step's row.
		e := rt.Energies(lastH)
		m := rt.Moments(lastH.Kappa)
		ov, ge := overlap(lastS, lastH)
		name := p.Steps[i].Name
		if name == "" {
			name = fmt.Sprintf("step %d", i+1)
		}
		st := rt.State()
		res.Rows = append(res.Rows, StepRow{Name: name, Time: timeSI(t), RabiOverER: lastH.Omega, DetuningOverER: lastH.Delta,
			KappaRel: lastH.Kappa, Energy: e.Total, Overlap: ov, GroundEnergy: ge, Sz: m.Sz,
			Contrast: gpe.StripeContrast(grid.X[0], st.DensityX(), gpe.DominantK(st), 0)})
	}
	res.Steps = rt.Steps
	det, err := p.detect(ctx, rt, lastH, res, plans[len(plans)-1].rel, p.Steps[len(p.Steps)-1])
	if err != nil {
		return nil, err
	}
	res.Detection = det
	return res, nil
}

type groundRef struct {
	state  *gpe.State
	energy float64
}

// groundAt solves the ground state at settings s on the sequence's grid
// (same points and SI lengths; mirrored when k_R changed sign).
func (p *SequenceProblem) groundAt(su *GroundSetup, s seqSettings, set *SequenceSettings) *groundRef {
	g := su.Problem.Grid
	gp := p.Ground
	gp.Lab = s.lab
	gp.Points = g.Shape()
	gp.Lengths, gp.LengthsSI = nil, nil
	if su.Units != nil {
		for a := 0; a < g.Dim; a++ {
			gp.LengthsSI = append(gp.LengthsSI, su.Units.LengthSI(g.L[a]))
		}
	} else {
		gp.Lengths = append([]float64(nil), g.L[:g.Dim]...)
	}
	if gp.Trap != nil {
		t := *gp.Trap
		t.FreqHz = s.trap
		for a := g.Dim; a < 3; a++ {
			t.FreqHz[a] = p.Ground.Trap.FreqHz[a]
		}
		gp.Trap = &t
	}
	gs, err := gp.Setup(set.Ground.Variational)
	if err != nil {
		return nil
	}
	r, err := gs.Solve(&set.Ground)
	if err != nil || r.Multi == nil || r.Multi.Best == nil {
		return nil
	}
	st := gpe.NewState(g)
	src := r.Multi.Best.State
	m, _ := s.lab.Model()
	ref, _ := p.Ground.Lab.Model()
	mirror := m.KR*ref.KR < 0
	inner := g.Size / g.N[0]
	for c := 0; c < 2; c++ {
		for idx := range st.Psi[c] {
			j := idx
			if mirror {
				i := idx / inner
				j = ((g.N[0]-i)%g.N[0])*inner + idx%inner
			}
			st.Psi[c][idx] = src.Psi[c][j]
		}
	}
	e := r.Multi.Best.Energies.Total
	if ref.ER > 0 && m.ER > 0 {
		e *= m.ER / ref.ER
	}
	return &groundRef{state: st, energy: e}
}

// startState makes the initial state on the sequence's grid.
func (p *SequenceProblem) startState(su *GroundSetup, set *SequenceSettings) (*gpe.State, string, error) {
	g := su.Problem.Grid
	switch p.Start {
	case StartGiven:
		if p.StartState == nil || p.StartState.Grid == nil || p.StartState.Grid.Size != g.Size {
			return nil, "", badInputf("the given start state does not match the sequence's grid %v", g.Shape())
		}
		st := gpe.NewState(g)
		copy(st.Psi[0], p.StartState.Psi[0])
		copy(st.Psi[1], p.StartState.Psi[1])
		if err := st.Normalize(su.Problem.Model.Norm); err != nil {
			return nil, "", badInput(err)
		}
		return st, "given state", nil
	case StartUp, StartDown:
		c := 0
		if p.Start == StartDown {
			c = 1
		}
		// The ground state of one component: Ω = 0 and that component alone
		// (the SOC term is then the gauge shift k_x → k_x ∓ κ).
		prob := su.Problem
		prob.Model.Omega, prob.Model.Delta = 0, 0
		if c == 0 {
			prob.Model.Delta = -1
		} else {
			prob.Model.Delta = 1
		}
		guess := gpe.Guess{Kind: gpe.GuessPlaneWave, K: 1 - 2*float64(c)}
		st0, err := guess.Build(prob)
		if err != nil {
			return nil, "", err
		}
		for i := range st0.Psi[1-c] {
			st0.Psi[1-c][i] = 0
		}
		gs := set.Ground.Solver
		r, err := gpe.Solve(prob, st0, &gs)
		if err != nil {
			return nil, "", err
		}
		for i := range r.State.Psi[1-c] {
			r.State.Psi[1-c][i] = 0
		}
		if err := r.State.Normalize(prob.Model.Norm); err != nil {
			return nil, "", err
		}
		return r.State, fmt.Sprintf("all atoms in %s (ground state of that component at Ω = 0, %s)", [2]string{"↑", "↓"}[c], r.Status), nil
	}
	r, err := su.Solve(&set.Ground)
	if err != nil {
		return nil, "", err
	}
	return r.Multi.Best.State.Clone(), fmt.Sprintf("ground state at the settings at t = 0 (%s, %s)", r.Multi.Observed.Phase, r.Multi.Best.Status), nil
}

// detect reads out the final in-trap state: in-situ profile and imaging,
// Bragg fractions, and the momentum distribution after the release.
func (p *SequenceProblem) detect(ctx context.Context, rt *gpe.RealTime, h gpe.RTHamiltonian, res *SequenceResult, release bool, last Step) (*Detection, error) {
	g := rt.Grid
	st := rt.State()
	d := &Detection{K1: gpe.DominantK(st)}
	lx := 1.0 // metres per 1/k_ref
	if res.Units != nil {
		lx = res.Units.LengthSI(1)
	}
	d.X = make([]float64, g.N[0])
	d.Profile = st.DensityX()
	for i := range d.X {
		d.X[i] = g.X[0][i] * lx
		d.Profile[i] /= lx
	}
	k1 := d.K1 / lx
	if d.K1 > 0 {
		d.StripePeriod = math.Pi / k1
	}
	im := p.Imaging
	if res.Units == nil {
		im = gpe.Imaging{}
		res.Notes = append(res.Notes, "direct model (no SI lengths): imaging not modelled, the imaged contrast is the in-situ one")
	}
	if im.CrossSection == 0 && p.Ground.Lab.Scheme != nil {
		if a := p.Ground.Lab.Scheme.Atom(); a != nil {
			for _, l := range a.Lines {
				if l.Name == "D2" {
					im.CrossSection = 3 * l.Wavelength * l.Wavelength / (2 * math.Pi)
				}
			}
		}
	}
	if im.Height == 0 {
		m := rt.Moments(h.Kappa)
		switch {
		case g.Dim >= 2:
			im.Height = math.Sqrt(2*math.Pi) * m.Width[1] * lx
		case p.Ground.Trap != nil && res.Units != nil:
			fp := math.Sqrt(p.Ground.Trap.FreqHz[1] * p.Ground.Trap.FreqHz[2])
			im.Height = math.Sqrt(2*math.Pi) * gpe.OscillatorLength(res.Units.AngularFromHz(fp)) * lx
		case res.Units != nil:
			im.Height = 1e-6
			res.Notes = append(res.Notes, "imaging: column height 1 µm assumed (no transverse extent in a 1D box)")
		}
	}
	img, err := gpe.Image(d.X, d.Profile, k1, im)
	if err != nil {
		return nil, badInputf("imaging: resolution, pixel, magnification and photons must be ≥ 0")
	}
	d.Image = img
	if im.Photons > 0 && im.CrossSection > 0 && im.Height > 0 && img.PixelOb > 0 {
		odMax := 0.0
		for _, v := range img.Ideal {
			odMax = math.Max(odMax, im.CrossSection*v/(img.PixelOb*im.Height))
		}
		if odMax > 4 {
			res.Notes = append(res.Notes, fmt.Sprintf("imaging: peak optical depth %.3g > 4: resonant absorption imaging saturates here (the shot-noise model then gives no signal); image after a partial transfer or with a detuned probe", odMax))
		}
	}
	switch {
	case img.SNR2K1 >= SNRVisible && img.ContrastInSitu >= MinStripeContrast:
		d.Verdict = VerdictVisible
	case img.ContrastInSitu >= MinStripeContrast:
		d.Verdict = VerdictNeedsBragg
	default:
		d.Verdict = VerdictUnresolvable
	}
	d.BraggFraction, d.BraggPlaneWave = gpe.BraggFraction(d.X, d.Profile, k1)
	if err := p.atomBragg(ctx, rt, h, res, d); err != nil {
		return nil, err
	}
	N := 0.0
	for _, v := range d.Profile {
		N += v
	}
	N *= g.Dx[0] * lx
	d.BraggEnhancement = N * d.BraggFraction
	b := p.Bragg
	if b.Saturation == 0 {
		b.Saturation = 0.1
	}
	if b.Duration == 0 {
		b.Duration = 10e-6
	}
	if a := p.Ground.Lab.Scheme; a != nil && a.Atom() != nil {
		for _, l := range a.Atom().Lines {
			if l.Name == "D2" {
				d.PhotonsPerAtom = math.Pi * l.GammaHz * b.Saturation / (1 + b.Saturation) * b.Duration
			}
		}
	}
	// Release: the coupling off, the cloud flies with its mechanical momenta.
	if release {
		tof := last.Duration
		if res.Units == nil {
			tof = last.DurationER
		}
		d.TOF = tof
		flyT := tof // internal units
		if res.Units != nil {
			flyT = tof / res.Units.TimeSI(1)
		}
		if last.Interacting {
			// Interacting expansion in the box while it stays well inside.
			free := h
			free.Omega, free.Delta = 0, 0
			free.TrapAngular = [3]float64{}
			tin := tof
			if res.Units != nil {
				tin = tof / res.Units.TimeSI(1)
			}
			done := 0.0
			chunk := tin / 50
			for done < tin && rt.Moments(h.Kappa).Width[0] < g.L[0]/6 {
				if _, err := rt.Evolve(ctx, chunk, func(float64) gpe.RTHamiltonian { return free }); err != nil {
					return nil, err
				}
				done += chunk
			}
			res.Notes = append(res.Notes, fmt.Sprintf("time of flight: interacting in the box for %.3g of %.3g, then ballistic", done/tin*tof, tof))
			st = rt.State()
			flyT = math.Max(0, tin-done)
		}
		method := gpe.FlightAuto
		if p.Ground.Trap == nil {
			method = gpe.FlightPeriodic
		}
		fl, err := gpe.FreeFlight(st, h.Kappa, flyT, method)
		if err != nil {
			return nil, err
		}
		d.FlightMethod = fl.Method.String()
		d.FlightX = make([]float64, len(fl.X))
		for i, x := range fl.X {
			d.FlightX[i] = x * lx
		}
		for c := 0; c < 2; c++ {
			d.FlightDensity[c] = make([]float64, len(fl.X))
			for i, v := range fl.Density[c] {
				d.FlightDensity[c][i] = v / lx
			}
			_, _, w := fl.Moments(c)
			d.FlightWidth[c] = w * lx
		}
		if method == gpe.FlightPeriodic {
			res.Notes = append(res.Notes, "time of flight from a periodic box: the free expansion of an infinitely extended gas (the density along x in the same box)")
		}
		Q, W, err := gpe.TOFMomentum(st, h.Kappa)
		if err != nil {
			return nil, err
		}
		for c := 0; c < 2; c++ {
			d.TOFQ[c], d.TOFW[c], d.TOFX[c] = make([]float64, len(Q[c])), W[c], make([]float64, len(Q[c]))
			for i, q := range Q[c] {
				d.TOFQ[c][i] = q / lx
				// x = ħq t/m: in units ħ = 1, m = 1/2, x = 2qt (1/k_ref)
				if res.Units != nil {
					d.TOFX[c][i] = dispersion.Hbar * d.TOFQ[c][i] * tof / res.Units.Mass()
				} else {
					d.TOFX[c][i] = 2 * q * tof
				}
			}
		}
	}
	return d, nil
}

// atomBragg simulates the two-photon Bragg pulse at 2k₁ on the final state
// and on the plane-wave cloud of the same envelope (BraggProbe), under the
// final Hamiltonian h (trap, coupling and interactions on: in situ).
func (p *SequenceProblem) atomBragg(ctx context.Context, rt *gpe.RealTime, h gpe.RTHamiltonian, res *SequenceResult, d *Detection) error {
	d.AtomBraggStripe, d.AtomBraggStripeMax, d.AtomBraggPlaneWave = math.NaN(), math.NaN(), math.NaN()
	d.AtomBraggMoved, d.AtomBraggMovedPlaneWave = math.NaN(), math.NaN()
	d.AtomBraggRabi, d.AtomBraggDuration, d.AtomBraggFrequency = math.NaN(), math.NaN(), math.NaN()
	b := p.Bragg
	if b.Rabi < 0 || d.K1 == 0 {
		return nil
	}
	if ctx != nil && ctx.Err() != nil {
		return nil
	}
	// SI ↔ internal: frequencies in E_ref/ħ, times in ħ/E_ref.
	toRate, toTime := 1.0, 1.0 // internal per (Hz·2π | E_R/ħ), per (s | ħ/E_R)
	if res.Units != nil {
		toTime = 1 / res.Units.TimeSI(1)
		toRate = 2 * math.Pi * res.Units.TimeSI(1)
	}
	// Defaults in E_ref: weak (Ω_B ≪ E_R/ħ) and long (1/τ ≪ E_R/ħ), so
	// that the pulse resolves the resonances of the orders (the Bragg
	// regime, not the short-pulse Kapitza–Dirac one, where every cloud
	// diffracts alike).
	if b.Rabi == 0 {
		b.Rabi = BraggDefaultRabi / toRate
	}
	if b.PulseDuration == 0 {
		b.PulseDuration = BraggDefaultDuration / toTime
	}
	if b.Phases == 0 {
		b.Phases = 4
	}
	if b.Phases < 1 || !(b.PulseDuration > 0) || math.IsInf(b.PulseDuration, 0) || math.IsInf(b.Rabi, 0) {
		return badInputf("Bragg pulse: Rabi frequency %g, duration %g, phases %d: need a finite Rabi frequency, a duration > 0 and ≥ 1 phase", b.Rabi, b.PulseDuration, b.Phases)
	}
	k1 := d.K1
	omega := b.Frequency * toRate
	if !b.FrequencySet || math.IsNaN(b.Frequency) {
		// E₋(k) = k² + κ² − √((δ/2 − 2κk)² + Ω²/4): the lower band of
		// (k − κσz)² + (Ω/2)σx + (δ/2)σz (closed-form 2×2 eigenvalue).
		lower := func(k float64) float64 {
			return k*k + h.Kappa*h.Kappa - math.Hypot(h.Delta/2-2*h.Kappa*k, h.Omega/2)
		}
		omega = lower(k1) - lower(-k1)
	}
	st := rt.State()
	pw, kp, err := planeWaveOf(st, k1)
	if err != nil {
		return err
	}
	// The other order: the stripe's second wave at ≈ −k_peak, the plane
	// wave's empty one.
	other := kp - math.Copysign(2*k1, kp)
	pulse := gpe.BraggPulse{Q: 2 * k1, Rabi: b.Rabi * toRate, Frequency: omega, Duration: b.PulseDuration * toTime, Order: other, OrderWidth: k1}
	phis := make([]float64, b.Phases)
	for j := range phis {
		phis[j] = math.Pi * float64(j) / float64(b.Phases)
	}
	set := gpe.RTSettings{EMax: rt.EMax}
	steps := int(math.Ceil(pulse.Duration / (gpe.RTStepPhase / rt.EMax)))
	if rt.Grid.Size*steps*2*(b.Phases+1) > 1e9 {
		res.Notes = append(res.Notes, fmt.Sprintf("atomic Bragg pulse: %d evolutions of ≈ %d steps on %d points (--bragg-rabi off skips it, --bragg-phases 1 shortens it)", 2*(b.Phases+1), steps, rt.Grid.Size))
	}
	interrupted := func(err error) error {
		if ctx != nil && ctx.Err() != nil && errors.Is(err, ctx.Err()) {
			res.Status = SequenceInterrupted
			res.Notes = append(res.Notes, "interrupted during the atomic Bragg pulse: its figures are not given")
			return nil
		}
		return err
	}
	ds, err := gpe.BraggTransfer(ctx, st, h, pulse, phis, set)
	if err != nil {
		return interrupted(err)
	}
	dp, err := gpe.BraggTransfer(ctx, pw, h, pulse, phis, set)
	if err != nil {
		return interrupted(err)
	}
	var mo, mop, mx, mov, movp float64
	for j := range ds {
		mo += math.Abs(ds[j].Order) / float64(len(ds))
		mop += math.Abs(dp[j].Order) / float64(len(dp))
		mov += ds[j].Moved / float64(len(ds))
		movp += dp[j].Moved / float64(len(dp))
		mx = math.Max(mx, math.Abs(ds[j].Order))
	}
	d.AtomBraggStripe, d.AtomBraggStripeMax, d.AtomBraggPlaneWave = mo, mx, mop
	d.AtomBraggMoved, d.AtomBraggMovedPlaneWave = mov, movp
	d.AtomBraggRabi, d.AtomBraggDuration, d.AtomBraggFrequency = b.Rabi, b.PulseDuration, omega/toRate
	return nil
}

// planeWaveOf returns the plane-wave cloud of the same envelope as st: its
// momentum components within k₁ of its largest peak (|k_x − k_peak| < k₁,
// both spin components), renormalised to the same atom number — a
// stripe's one wave without the other and without the harmonics at ±3k₁
// (which beat with it at 2k₁: a density grating of their own); a plane
// wave itself.
func planeWaveOf(st *gpe.State, k1 float64) (*gpe.State, float64, error) {
	g := st.Grid
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		return nil, 0, err
	}
	defer tr.Close()
	out := gpe.NewState(g)
	inner := g.Size / g.N[0]
	best, kp := -1.0, 0.0
	for c := 0; c < 2; c++ {
		copy(out.Psi[c], st.Psi[c])
		tr.Forward(out.Psi[c])
		for i, v := range out.Psi[c] {
			if a := abs2c(v); a > best {
				best, kp = a, g.K[0][i/inner]
			}
		}
	}
	nu, nd := st.Norms()
	norm := nu + nd
	inv := complex(1/float64(g.Size), 0)
	for c := 0; c < 2; c++ {
		for i := range out.Psi[c] {
			if math.Abs(g.K[0][i/inner]-kp) >= k1 {
				out.Psi[c][i] = 0
			}
			out.Psi[c][i] *= inv
		}
		tr.Backward(out.Psi[c])
	}
	if err := out.Normalize(norm); err != nil {
		return nil, 0, err
	}
	return out, kp, nil
}

// ScanPoint is one ramp duration of an adiabaticity scan.
type ScanPoint struct {
	Duration   float64 // s (ħ/E_R direct)
	Overlap    float64 // final overlap with the ground state
	Excitation float64 // E_final − E_ground per particle, E_ref
	Result     *SequenceResult
}

// ScanRampDuration repeats the sequence with the duration of its first
// ramping step set to each value of durations (s; ħ/E_R for a direct
// model), and reports the final overlap with the ground state and the
// excitation energy above it. The detections of the scan leave out the
// atomic Bragg pulse (its figures NaN; it would cost ten evolutions per
// point): run the chosen duration alone for it.
func (p SequenceProblem) ScanRampDuration(ctx context.Context, durations []float64, s *SequenceSettings) ([]ScanPoint, error) {
	first := -1
	for i, st := range p.Steps {
		if len(st.Ramps) > 0 {
			first = i
			break
		}
	}
	if first < 0 {
		return nil, badInputf("the adiabaticity scan needs a step that ramps a setting")
	}
	var out []ScanPoint
	for _, d := range durations {
		q := p
		q.Bragg.Rabi = -1
		q.Steps = append([]Step(nil), p.Steps...)
		if q.Ground.Lab.Scheme != nil && q.Ground.Lab.Scheme.Atom() == nil {
			q.Steps[first].DurationER = d
		} else {
			q.Steps[first].Duration = d
		}
		r, err := q.Run(ctx, s)
		if err != nil {
			return out, err
		}
		pt := ScanPoint{Duration: d, Overlap: math.NaN(), Excitation: math.NaN(), Result: r}
		if n := len(r.Rows); n > 0 {
			row := r.Rows[n-1]
			pt.Overlap, pt.Excitation = row.Overlap, row.Energy-row.GroundEnergy
		}
		out = append(out, pt)
		if r.Status == SequenceInterrupted {
			break
		}
	}
	return out, nil
}
