package floquet

import (
	"fmt"
	"math"
	"math/cmplx"

	"socmap/dispersion"
	"socmap/gpe/fft"
)

// Grid is the periodic 1-D grid of the real-time simulation.
type Grid struct {
	N      int     // points (a power of 2)
	L      float64 // box length, m
	Dx     float64 // spacing L/N, m
	X0     float64 // position of the first point, m (the packet starts at x = 0)
	SigmaX float64 // rms width of the initial packet density |ψ|², m
	QMax   float64 // largest canonical wavenumber needed (≤ π/Dx), 1/m
}

// Q returns the canonical wavenumber of FFT index j.
func (g Grid) Q(j int) float64 {
	if j >= g.N/2 {
		j -= g.N
	}
	return 2 * math.Pi * float64(j) / g.L
}

// X returns the position of point j.
func (g Grid) X(j int) float64 { return g.X0 + float64(j)*g.Dx }

// GridFor chooses the grid from the physics: the packet (rms density width
// sigmaX, momentum rms 1/(2 sigmaX)) must stay inside the box for the whole
// run, for every mean velocity in vs and for the ↓ part moving at v + ħκ/m
// for every κ the RF-on part of the cycle can transfer (8 rms widths of the
// spread packet plus twice the position micromotion as margin on each side);
// and the canonical wavenumber grid ±π/dx must hold every q0, q0 + κ plus 8
// momentum widths. N is the next power of two (≥ 64).
func GridFor(d *Drive, vs []float64, duration, sigmaX float64) Grid {
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
	return Grid{N: n, L: L, Dx: L / float64(n), X0: lo - margin, SigmaX: sigmaX, QMax: qneed}
}

// kappaRange returns the smallest and largest κ(t) while the RF is on.
func (d *Drive) kappaRange() (lo, hi float64) {
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

// rtStep is one step of a shaking window: coupling half-rotation (if
// coupled), kinetic propagation over dt (if dt > 0), coupling half-rotation.
// A delta kick is a step with dt = 0 and the full rotation in one go.
//
// The coupling of a step is the first Magnus term of the RF part, exact for
// any variation of κ within the step: at each x the generator
// (1/2)[[0, c*(x)], [c(x), 0]] with c(x) = ∫Ω(t) exp(iκ(t)x) dt over the step
// (composite Simpson, sub-steps fine enough that κ changes by < 0.5/L per
// sub-step), i.e. a rotation by |c(x)| about an axis at angle arg c(x).
// Neglected: the second Magnus term, O((Ω dt)²) relative.
type rtStep struct {
	dt      float64
	kin     [2][]complex128 // exp(−i[ħq²dt/2m + q∫A_σ/m + ∫A_σ²/2mħ]) / N (FFT normalisation folded in)
	coupled bool
	kick    bool         // single full rotation (delta pulse)
	c       []float64    // cos of the rotation half-angle per application, per x
	a, b    []complex128 // −i sin(…) e^{−iφ(x)} and −i sin(…) e^{iφ(x)}, φ = arg c(x)
}

// RealTime is the split-step integrator of one shaking setting on one grid:
// the per-window step tables are computed once and shared (read-only) by its
// Workers.
type RealTime struct {
	Drive      *Drive
	Grid       Grid
	PulseSteps int     // steps while the RF is on, per window
	Dt         float64 // their length, s (0 for delta pulses)
	steps      []rtStep
}

// NewRealTime builds the step tables. Window: one shaking period centred on
// a pulse, [t_c − T/2, t_c + T/2]. While the RF is on the step is
//
//	dt ≤ min(T/128, τ/16, 0.05/Ω_peak)
//
// (resolve the impulse, the pulse envelope and the Rabi rotation; τ the pulse
// width); the RF-off rest of the window is one exact kinetic step.
func NewRealTime(d *Drive, g Grid) (*RealTime, error) { return newRealTime(d, g, 1) }

// newRealTime divides the RF-on steps by refine (≥ 1) more, for convergence tests.
func newRealTime(d *Drive, g Grid, refine int) (*RealTime, error) {
	if g.N < 2 || g.N&(g.N-1) != 0 {
		return nil, fmt.Errorf("grid size %d is not a power of two", g.N)
	}
	rt := &RealTime{Drive: d, Grid: g}
	T := d.Period
	h := d.pulseHalf()
	start := d.Tc - T/2
	add := func(t1, t2 float64, coupled bool, nsimp int) {
		st := rtStep{dt: t2 - t1, coupled: coupled}
		rt.fillKinetic(&st, t1, t2, nsimp)
		if coupled {
			rt.fillCoupling(&st, t1, t2)
		}
		rt.steps = append(rt.steps, st)
	}
	switch {
	case d.Shake.Pulse == dispersion.PulseDelta:
		add(start, d.Tc, false, 1024)
		kick := rtStep{coupled: true, kick: true}
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

func (rt *RealTime) fillKinetic(st *rtStep, t1, t2 float64, nsimp int) {
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
func (rt *RealTime) fillCoupling(st *rtStep, t1, t2 float64) {
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
	st.alloc(g.N)
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
		st.set(j, a/4, e)
	}
}

func (st *rtStep) alloc(n int) {
	st.c, st.a, st.b = make([]float64, n), make([]complex128, n), make([]complex128, n)
}

// set stores the rotation exp(−i half (cos φ σx + sin φ σy)) at point j, e = e^{iφ}.
func (st *rtStep) set(j int, half float64, e complex128) {
	sn, cs := math.Sincos(half)
	st.c[j] = cs
	st.a[j] = complex(0, -sn) * cmplx.Conj(e)
	st.b[j] = complex(0, -sn) * e
}

// fillKick is the delta pulse: rotation by the full area at κ.
func (rt *RealTime) fillKick(st *rtStep, area, kappa float64) {
	g := rt.Grid
	st.alloc(g.N)
	for j := range st.c {
		st.set(j, area/2, cmplx.Rect(1, kappa*g.X(j)))
	}
}

// StepsPerWindow is the number of split steps in one shaking period.
func (rt *RealTime) StepsPerWindow() int { return len(rt.steps) }

// Worker holds the state and FFT plan of one simulation; one goroutine at a time.
type Worker struct {
	rt     *RealTime
	tr     fft.Transform
	Up, Dn []complex128 // φ↑, φ↓ on the grid (position space between calls)
	z      [][2]complex128
	tmp    []complex128
}

// NewWorker makes a worker with its own FFT plan (gpe/fft, default backend).
func (rt *RealTime) NewWorker() (*Worker, error) {
	tr, err := fft.New([]int{rt.Grid.N}, fft.Default, fft.Options{})
	if err != nil {
		return nil, err
	}
	n := rt.Grid.N
	return &Worker{rt: rt, tr: tr, Up: fft.Aligned(n), Dn: fft.Aligned(n), tmp: fft.Aligned(n),
		z: make([][2]complex128, len(rt.steps))}, nil
}

// Close releases the FFT plan.
func (w *Worker) Close() { w.tr.Close() }

// Init sets a Gaussian packet in ↑ centred at x = 0 with rms density width
// Grid.SigmaX and canonical wavenumber q0 (mean velocity ħq0/m), normalised
// on the grid: φ↑ = (2πσ²)^(−1/4) exp(−x²/4σ² + iq0x); φ↓ = 0.
func (w *Worker) Init(q0 float64) {
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
// see Drive.Detuning); trace (may be nil, else length ≥ n) receives the ↓
// population after each window. It allocates nothing.
func (w *Worker) Run(delta float64, n int, trace []float64) {
	for i, st := range w.rt.steps {
		w.z[i][0] = cmplx.Rect(1, -delta*st.dt/2)
		w.z[i][1] = cmplx.Rect(1, delta*st.dt/2)
	}
	for k := 0; k < n; k++ {
		for i := range w.rt.steps {
			st := &w.rt.steps[i]
			if st.kick {
				w.couple(st)
				continue
			}
			if st.coupled {
				w.couple(st)
			}
			w.kinetic(st, w.z[i])
			if st.coupled {
				w.couple(st)
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
func (w *Worker) FreeRun(t float64) {
	st := rtStep{dt: t}
	d := w.rt.Drive
	t0 := d.Tc - d.Period/2
	n := int(math.Max(64, math.Ceil(t/d.Period*256)))
	w.rt.fillKinetic(&st, t0, t0+t, n)
	w.kinetic(&st, [2]complex128{1, 1})
}

func (w *Worker) couple(st *rtStep) {
	up, dn := w.Up, w.Dn
	cs, a, b := st.c[:len(up)], st.a[:len(up)], st.b[:len(up)]
	dn = dn[:len(up)]
	for j := range up {
		u, d := up[j], dn[j]
		c := complex(cs[j], 0)
		up[j] = c*u + a[j]*d
		dn[j] = c*d + b[j]*u
	}
}

func (w *Worker) kinetic(st *rtStep, z [2]complex128) {
	for s, buf := range [2][]complex128{w.Up, w.Dn} {
		w.tr.Forward(buf)
		k := st.kin[s]
		zs := z[s]
		for j := range buf {
			buf[j] *= k[j] * zs
		}
		w.tr.Backward(buf)
	}
}

// Population returns ∫|φ_σ|² dx (σ = 0 ↑, 1 ↓).
func (w *Worker) Population(sigma int) float64 {
	b := w.Up
	if sigma == 1 {
		b = w.Dn
	}
	s := 0.0
	for _, v := range b {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return s * w.rt.Grid.Dx
}

// Norm is the total population ∫(|φ↑|² + |φ↓|²) dx (1 at the start).
func (w *Worker) Norm() float64 { return w.Population(0) + w.Population(1) }

// MeanQ returns the mean canonical wavenumber ⟨q⟩ of component σ, 1/m.
func (w *Worker) MeanQ(sigma int) float64 {
	b := w.Up
	if sigma == 1 {
		b = w.Dn
	}
	copy(w.tmp, b)
	w.tr.Forward(w.tmp)
	var s0, s1 float64
	for j, v := range w.tmp {
		p := real(v)*real(v) + imag(v)*imag(v)
		s0 += p
		s1 += p * w.rt.Grid.Q(j)
	}
	return s1 / s0
}

// Moments returns ⟨x⟩ and the rms width of |φ_σ|², m.
func (w *Worker) Moments(sigma int) (mean, rms float64) {
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
