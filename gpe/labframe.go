package gpe

import (
	"fmt"
	"math"
	"math/cmplx"

	"socmap/dispersion"
	"socmap/gpe/fft"
)

// LabGrid is the periodic 1-D grid of the lab-frame shaking simulation
// (LabFrame), in SI units. Unlike Grid its box need not be centred on 0.
type LabGrid struct {
	N      int     // points (a power of 2)
	L      float64 // box length, m
	Dx     float64 // spacing L/N, m
	X0     float64 // position of the first point, m (the packet starts at x = 0)
	SigmaX float64 // rms width of the initial packet density |ψ|², m
	QMax   float64 // largest canonical wavenumber needed (≤ π/Dx), 1/m
}

// Q returns the canonical wavenumber of FFT index j.
func (g LabGrid) Q(j int) float64 {
	if j >= g.N/2 {
		j -= g.N
	}
	return 2 * math.Pi * float64(j) / g.L
}

// X returns the position of point j.
func (g LabGrid) X(j int) float64 { return g.X0 + float64(j)*g.Dx }

// LabGridFor chooses the grid from the physics: the packet (rms density width
// sigmaX, momentum rms 1/(2 sigmaX)) must stay inside the box for the whole
// run, for every mean velocity in vs and for the ↓ part moving at v + ħκ/m
// for every κ the RF-on part of the cycle can transfer (8 rms widths of the
// spread packet plus twice the position micromotion as margin on each side);
// and the canonical wavenumber grid ±π/dx must hold every q0, q0 + κ plus 8
// momentum widths. N is the next power of two (≥ 64).
func LabGridFor(d *ShakeDrive, vs []float64, duration, sigmaX float64) LabGrid {
	m, hb := d.Mass, dispersion.Hbar
	kmin, kmax := d.kappaRange()
	sigK := 1 / (2 * sigmaX)
	lo, hi := 0.0, 0.0
	qneed := 0.0
	for _, v := range vs {
		q0 := m * v / hb
		for _, k := range []float64{0, kmin, kmax} {
			u := v + hb*k/m
			if k == 0 {
				u = v
			}
			lo = math.Min(lo, u*duration)
			hi = math.Max(hi, u*duration)
			qneed = math.Max(qneed, math.Abs(q0+k))
		}
	}
	spread := sigmaX * math.Sqrt(1+math.Pow(hb*duration/(2*m*sigmaX*sigmaX), 2))
	micro := 2 * math.Max(d.Result.MicroAmpUp, d.Result.MicroAmpDown)
	margin := 8*spread + micro
	L := hi - lo + 2*margin
	qneed += 8 * sigK
	dx := math.Pi / qneed
	n := 64
	for float64(n)*dx < L {
		n *= 2
	}
	return LabGrid{N: n, L: L, Dx: L / float64(n), X0: lo - margin, SigmaX: sigmaX, QMax: qneed}
}

// kappaRange returns the smallest and largest κ(t) while the RF is on.
func (d *ShakeDrive) kappaRange() (lo, hi float64) {
	h := d.pulseHalf()
	lo, hi = math.Inf(1), math.Inf(-1)
	const n = 256
	for i := 0; i <= n; i++ {
		t := d.Tc - h + 2*h*float64(i)/n
		k := d.Kappa(t)
		lo, hi = math.Min(lo, k), math.Max(hi, k)
	}
	return lo, hi
}

// labStep is one step of a shaking window: coupling half-rotation (if
// coupled), kinetic propagation over dt (if dt > 0), coupling half-rotation.
// A delta kick is a step with dt = 0 and the full rotation in one go.
//
// The coupling of a step is the first Magnus term of the RF part, exact for
// any variation of κ within the step: at each x the generator
// (1/2)[[0, c*(x)], [c(x), 0]] with c(x) = ∫Ω(t) exp(iκ(t)x) dt over the step
// (composite Simpson, sub-steps fine enough that κ changes by < 0.5/L per
// sub-step), i.e. a rotation by |c(x)| about an axis at angle arg c(x).
// Neglected: the second Magnus term, O((Ω dt)²) relative.
type labStep struct {
	dt      float64
	kin     KineticFactors // exp(−i[ħq²dt/2m + q∫A_σ/m + ∫A_σ²/2mħ]) / N (FFT normalisation folded in)
	coupled bool
	kick    bool          // single full rotation (delta pulse)
	rot     LocalRotation // rotation by |c(x)|/2 (half of the step) about the axis at arg c(x)
}

// LabFrame is the split-step integrator of one shaking setting on one grid:
// the per-window step tables (KineticFactors, LocalRotation) are computed
// once and shared (read-only) by its LabWorkers, which replay them on their
// own Stepper.
type LabFrame struct {
	Drive      *ShakeDrive
	Grid       LabGrid
	PulseSteps int     // steps while the RF is on, per window
	Dt         float64 // their length, s (0 for delta pulses)
	steps      []labStep
}

// NewLabFrame builds the step tables. Window: one shaking period centred on
// a pulse, [t_c − T/2, t_c + T/2]. While the RF is on the step is
//
//	dt ≤ min(T/128, τ/16, 0.05/Ω_peak)
//
// (resolve the impulse, the pulse envelope and the Rabi rotation; τ the pulse
// width); the RF-off rest of the window is one exact kinetic step.
func NewLabFrame(d *ShakeDrive, g LabGrid) (*LabFrame, error) { return newLabFrame(d, g, 1) }

// newLabFrame divides the RF-on steps by refine (≥ 1) more, for convergence tests.
func newLabFrame(d *ShakeDrive, g LabGrid, refine int) (*LabFrame, error) {
	if g.N < 2 || g.N&(g.N-1) != 0 {
		return nil, fmt.Errorf("grid size %d is not a power of two", g.N)
	}
	rt := &LabFrame{Drive: d, Grid: g}
	T := d.Period
	h := d.pulseHalf()
	start := d.Tc - T/2
	add := func(t1, t2 float64, coupled bool, nsimp int) {
		st := labStep{dt: t2 - t1, coupled: coupled}
		rt.fillKinetic(&st, t1, t2, nsimp)
		if coupled {
			rt.fillCoupling(&st, t1, t2)
		}
		rt.steps = append(rt.steps, st)
	}
	switch {
	case d.Shake.Pulse == dispersion.PulseDelta:
		add(start, d.Tc, false, 1024)
		kick := labStep{coupled: true, kick: true}
		rt.fillKick(&kick, d.Area, d.Kappa(d.Tc))
		rt.steps = append(rt.steps, kick)
		add(d.Tc, start+T, false, 1024)
	default:
		dtMax := T / 128
		if w := d.Shake.PulseWidth; d.Shake.Pulse != dispersion.PulseContinuous && w/16 < dtMax {
			dtMax = w / 16
		}
		if d.RabiPeak > 0 {
			dtMax = math.Min(dtMax, 0.05/d.RabiPeak)
		}
		n := int(math.Ceil(2*h/dtMax)) * max(refine, 1)
		if n < 2 {
			n = 2
		}
		rt.PulseSteps, rt.Dt = n, 2*h/float64(n)
		if h < T/2 {
			add(start, d.Tc-h, false, 1024)
		}
		for i := 0; i < n; i++ {
			add(d.Tc-h+float64(i)*rt.Dt, d.Tc-h+float64(i+1)*rt.Dt, true, 16)
		}
		if h < T/2 {
			add(d.Tc+h, start+T, false, 1024)
		}
	}
	return rt, nil
}

func (rt *LabFrame) fillKinetic(st *labStep, t1, t2 float64, nsimp int) {
	g, d := rt.Grid, rt.Drive
	m, hb := d.Mass, dispersion.Hbar
	iu, id, iu2, id2 := d.impulseIntegrals(t1, t2, nsimp)
	ia := [2]float64{iu, id}
	ia2 := [2]float64{iu2, id2}
	inv := 1 / float64(g.N)
	for s := 0; s < 2; s++ {
		st.kin[s] = make([]complex128, g.N)
		for j := 0; j < g.N; j++ {
			q := g.Q(j)
			ph := hb*q*q*st.dt/(2*m) + q*ia[s]/m + ia2[s]/(2*m*hb)
			st.kin[s][j] = cmplx.Rect(inv, -ph)
		}
	}
}

// fillCoupling computes c(x) = ∫Ω(t) exp(iκ(t)x) dt over [t1, t2] (times
// in the first window) and the half-step rotation of the Strang splitting.
func (rt *LabFrame) fillCoupling(st *labStep, t1, t2 float64) {
	g, d := rt.Grid, rt.Drive
	// Sub-steps: κ may change by at most 0.5/L per sub-step.
	k1, k2 := d.Kappa(t1), d.Kappa(t2)
	dk := math.Abs(k2 - k1)
	for i := 1; i < 8; i++ {
		dk = math.Max(dk, math.Abs(d.Kappa(t1+(t2-t1)*float64(i)/8)-k1))
	}
	ns := int(math.Ceil(4 * dk * g.L / 0.5))
	ns = max(8, min(ns, 1<<14))
	ns += ns % 2
	h := (t2 - t1) / float64(ns)
	w := make([]float64, ns+1) // Simpson weight × Ω(t) × h/3, from the exact area of each sub-step pair
	kap := make([]float64, ns+1)
	for i := 0; i <= ns; i++ {
		t := t1 + float64(i)*h
		kap[i] = d.Kappa(t)
		cf := 2.0
		if i == 0 || i == ns {
			cf = 1
		} else if i%2 == 1 {
			cf = 4
		}
		w[i] = cf * h / 3 * d.rabiAt(t-d.Tc)
	}
	// Normalise the weights to the exact pulse area of the step, so that the
	// rotation angle at κ = const is exact for every envelope.
	area := d.RabiArea(t1-d.Tc, t2-d.Tc)
	sw := 0.0
	for _, v := range w {
		sw += v
	}
	if sw > 0 {
		for i := range w {
			w[i] *= area / sw
		}
	}
	st.rot = NewLocalRotation(g.N)
	for j := 0; j < g.N; j++ {
		x := g.X(j)
		var cr, ci float64
		for i := range w {
			sn, cs := math.Sincos(kap[i] * x)
			cr += w[i] * cs
			ci += w[i] * sn
		}
		a := math.Hypot(cr, ci)
		e := complex(1, 0)
		if a > 0 {
			e = complex(cr/a, ci/a)
		}
		sn, cs := math.Sincos(a / 4)
		st.rot.SetXY(j, cs, sn, e)
	}
}

// fillKick is the delta pulse: rotation by the full area at κ.
func (rt *LabFrame) fillKick(st *labStep, area, kappa float64) {
	g := rt.Grid
	st.rot = NewLocalRotation(g.N)
	sn, cs := math.Sincos(area / 2)
	for j := range st.rot.Alpha {
		st.rot.SetXY(j, cs, sn, cmplx.Rect(1, kappa*g.X(j)))
	}
}

// StepsPerWindow is the number of split steps in one shaking period.
func (rt *LabFrame) StepsPerWindow() int { return len(rt.steps) }

// LabWorker holds the state and the Stepper (with its own FFT plan) of one
// lab-frame simulation; one goroutine at a time.
type LabWorker struct {
	rt *LabFrame
	st *Stepper
	// Up, Dn are φ↑, φ↓ on the grid (position space between calls): the
	// Stepper's buffers.
	Up, Dn []complex128
	z      [][2]complex128
}

// NewWorker makes a worker with its own Stepper (gpe/fft, default backend).
func (rt *LabFrame) NewWorker() (*LabWorker, error) {
	st, err := NewStepper([]int{rt.Grid.N}, fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	return &LabWorker{rt: rt, st: st, Up: st.Psi[0], Dn: st.Psi[1], z: make([][2]complex128, len(rt.steps))}, nil
}

// Close releases the FFT plan.
func (w *LabWorker) Close() { w.st.Close() }

// Init sets a Gaussian packet in ↑ centred at x = 0 with rms density width
// Grid.SigmaX and canonical wavenumber q0 (mean velocity ħq0/m), normalised
// on the grid: φ↑ = (2πσ²)^(−1/4) exp(−x²/4σ² + iq0x); φ↓ = 0.
func (w *LabWorker) Init(q0 float64) {
	g := w.rt.Grid
	s := g.SigmaX
	norm := 0.0
	for j := range w.Up {
		x := g.X(j)
		w.Up[j] = cmplx.Rect(math.Exp(-x*x/(4*s*s)), q0*x)
		w.Dn[j] = 0
		norm += real(w.Up[j])*real(w.Up[j]) + imag(w.Up[j])*imag(w.Up[j])
	}
	f := complex(1/math.Sqrt(norm*g.Dx), 0)
	for j := range w.Up {
		w.Up[j] *= f
	}
}

// Run propagates the state over n shaking windows at RF detuning Δ (rad/s,
// see ShakeDrive.Detuning); trace (may be nil, else length ≥ n) receives the ↓
// population after each window. It allocates nothing.
func (w *LabWorker) Run(delta float64, n int, trace []float64) {
	for i, st := range w.rt.steps {
		w.z[i][0] = cmplx.Rect(1, -delta*st.dt/2)
		w.z[i][1] = cmplx.Rect(1, delta*st.dt/2)
	}
	for k := 0; k < n; k++ {
		for i := range w.rt.steps {
			st := &w.rt.steps[i]
			if st.kick {
				w.st.Rotate(&st.rot)
				continue
			}
			if st.coupled {
				w.st.Rotate(&st.rot)
			}
			w.st.Kinetic(&st.kin, w.z[i])
			if st.coupled {
				w.st.Rotate(&st.rot)
			}
		}
		if trace != nil {
			trace[k] = w.Population(1)
		}
	}
}

// FreeRun propagates without RF for a time t (s) as one exact kinetic step
// with the impulses of the drive from the start of a window; used to test
// free spreading and the micromotion. It allocates its step table.
func (w *LabWorker) FreeRun(t float64) {
	st := labStep{dt: t}
	d := w.rt.Drive
	t0 := d.Tc - d.Period/2
	n := int(math.Max(64, math.Ceil(t/d.Period*256)))
	w.rt.fillKinetic(&st, t0, t0+t, n)
	w.st.Kinetic(&st.kin, [2]complex128{1, 1})
}

// Population returns ∫|φ_σ|² dx (σ = 0 ↑, 1 ↓).
func (w *LabWorker) Population(sigma int) float64 {
	return w.st.SumSquares(sigma) * w.rt.Grid.Dx
}

// Norm is the total population ∫(|φ↑|² + |φ↓|²) dx (1 at the start).
func (w *LabWorker) Norm() float64 { return w.Population(0) + w.Population(1) }

// MeanQ returns the mean canonical wavenumber ⟨q⟩ of component σ, 1/m.
func (w *LabWorker) MeanQ(sigma int) float64 {
	var s0, s1 float64
	for j, v := range w.st.Spectrum(sigma) {
		p := real(v)*real(v) + imag(v)*imag(v)
		s0 += p
		s1 += p * w.rt.Grid.Q(j)
	}
	return s1 / s0
}

// Moments returns ⟨x⟩ and the rms width of |φ_σ|², m.
func (w *LabWorker) Moments(sigma int) (mean, rms float64) {
	b := w.Up
	if sigma == 1 {
		b = w.Dn
	}
	var s0, s1, s2 float64
	for j, v := range b {
		p := real(v)*real(v) + imag(v)*imag(v)
		x := w.rt.Grid.X(j)
		s0 += p
		s1 += p * x
		s2 += p * x * x
	}
	mean = s1 / s0
	return mean, math.Sqrt(math.Max(0, s2/s0-mean*mean))
}
