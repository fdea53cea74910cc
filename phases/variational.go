package phases

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"socmap/phases/label"
)

// Status reports whether a variational minimisation converged.
type Status int

const (
	// Converged: every local search that produced a branch minimum ended
	// with a gradient norm below Settings.GradTol (or below
	// Settings.AcceptTol after the line search could make no more progress).
	Converged Status = iota + 1
	// NotConverged: the best local search of at least one branch did not
	// reach the tolerance; the phase is then label.NotConverged.
	NotConverged
)

func (s Status) String() string {
	switch s {
	case Converged:
		return "converged"
	case NotConverged:
		return "not-converged"
	}
	return fmt.Sprintf("status(%d)", int(s))
}

// Settings of the variational minimisation. The zero value (or a nil
// *Settings) gives the documented defaults.
type Settings struct {
	// Thresholds of the classifier (package label). Zero value:
	// label.DefaultThresholds. Thresholds.StripeMinority is also the floor of
	// the minority weight that defines the stripe branch.
	Thresholds label.Thresholds
	// GradTol: a local search has converged when the gradient norm of the
	// reduced energy (E_R per rad) falls below GradTol × max(1, |Ω|, |δ|,
	// |n g_ij|) (the problem's energy scale). Default 1e-9.
	GradTol float64
	// AcceptTol: a local search whose line search can make no more progress
	// (rounding), or that spends MaxIter, still counts as converged if its
	// gradient norm is below AcceptTol (scaled like GradTol). Default 1e-6.
	AcceptTol float64
	// MaxIter: major iterations per local search. Default 300.
	MaxIter int
	// Starts: number of starting points of the stripe branch (at most
	// len(stripeStarts)+1 = 7; the last start is built from the plane-wave
	// optimum). Default 7.
	Starts int
	// TieTol: branch energies closer than this (E_R) are equal and the
	// plane-wave branch wins. Default 1e-10.
	TieTol float64
}

func (s *Settings) withDefaults() Settings {
	var o Settings
	if s != nil {
		o = *s
	}
	if o.Thresholds == (label.Thresholds{}) {
		o.Thresholds = label.DefaultThresholds
	}
	if o.GradTol <= 0 {
		o.GradTol = 1e-9
	}
	if o.AcceptTol <= 0 {
		o.AcceptTol = 1e-6
	}
	if o.MaxIter <= 0 {
		o.MaxIter = 300
	}
	if o.Starts <= 0 || o.Starts > len(stripeStarts)+1 {
		o.Starts = len(stripeStarts) + 1
	}
	if o.TieTol <= 0 {
		o.TieTol = 1e-10
	}
	return o
}

// Result of Variational.
type Result struct {
	Phase  label.Phase // classified with label.Classify (see Variational)
	Status Status

	Energy float64 // energy per particle of the winning state (E_R)
	State  TwoWave // the winning state

	// K1 (k_R): for a stripe |k₊ + k₋|/2, so that the period is π/K1; for a
	// plane-wave or single-minimum state the signed momentum of the
	// majority wave.
	K1       float64
	Period   float64 // stripe period π/k₁ (1/k_R); NaN unless Phase == Stripe
	Contrast float64 // (n_max − n_min)/(n_max + n_min) of the total density
	SigmaZ   float64 // spatial average of ⟨σ_z⟩
	// Gap (E_R) between the minimum of the losing branch and the winner, ≥ 0.
	// Where the plane wave wins and no stripe with minority weight
	// ≥ Thresholds.StripeMinority is even metastable, the stripe-branch
	// minimum lies on that floor, so the gap is the cost of the cheapest
	// state the classifier would call a stripe.
	Gap float64

	// Branch minima. The plane-wave branch holds states whose minority
	// weight is below Thresholds.StripeMinority (a single plane wave, which
	// includes the single-minimum state, or a plane wave with a small
	// admixture); the stripe branch holds two-wave states with minority
	// weight ≥ Thresholds.StripeMinority.
	EnergyPlaneWave, EnergyStripe float64
	PlaneWaveState, StripeState   TwoWave
	// EnergySingleWave: minimum over a single plane wave (E_R); equal to
	// EnergyPlaneWave unless a plane wave with a small admixture is lower.
	EnergySingleWave float64

	Evaluations int // energy evaluations spent
}

// ErrBadInput is returned for non-finite parameters.
var ErrBadInput = errors.New("phases: non-finite parameter")

// stripeStarts are the starting points (c₀ = ⟨σ_z⟩ = k of the wave at +k,
// weight W) of the stripe-branch local searches; the wave at −k starts with
// ⟨σ_z⟩ = −c₀.
var stripeStarts = [...]struct{ c0, w float64 }{
	{0.9, 0.5}, {0.55, 0.5}, {0.2, 0.5}, {0.55, 0.25}, {0.55, 0.75}, {0.97, 0.5},
}

// Variational minimises the energy of the two-plane-wave ansatz (see
// TwoWave, Uniform.Energy) for the uniform problem u.
//
// The momenta are eliminated exactly: the interaction does not depend on
// them (for k₊ + k₋ ≠ 0) and e₀(p, θ) is minimal at p = cos 2θ, so k₊ = cos 2θ₊
// and k₋ = −cos 2θ₋. What remains is minimised branch by branch, because the
// stripe ↔ plane-wave transition is first order:
//
//   - plane-wave branch: one wave, a one-dimensional problem in θ, solved by
//     a scan of 64 angles followed by a safeguarded Newton refinement of
//     every local minimum;
//   - stripe branch: (θ₊, θ₋, W) with W restricted to
//     [f, 1 − f], f = Thresholds.StripeMinority, through W = f + (1−2f) sin²β,
//     minimised by BFGS with a backtracking line search from several starts. If its minimum lies on the floor W = f (or 1 − f) the
//     search is continued without the floor; a lower state found there has a
//     minority weight below f and belongs to the plane-wave branch.
//
// The lower branch wins (ties within TieTol go to the plane-wave branch). The
// winning state is labelled with label.Classify from its momentum
// distribution (mean |k| and the weights at k > 0 and k < 0), so the label
// is consistent with the classifier of numerical states: single-minimum when
// the mean |k| is below Thresholds.SingleMinimumK, stripe when the minority
// weight is at least Thresholds.StripeMinority, plane-wave otherwise — with
// one exception that uses the optimum's own energy landscape instead of the
// |k| threshold: a single plane wave that is one of two minima of the
// single-wave energy (Uniform.SingleWaveBistable) is plane-wave however
// small its k. So at δ + Δg = 0 the plane-wave ↔ single-minimum boundary of
// a variational map is the exact Ω = 4(1 − G2) (PlaneWaveSingleMinimumOmega),
// not where k falls below the threshold (SingleMinimumLabelOmega, 3.582 for
// G2 = 0.1). Where δ + Δg ≠ 0 the single minimum moves continuously off k = 0
// and the threshold separates the two names. A minimisation that did not
// converge gives Status NotConverged and phase label.NotConverged.
func Variational(u Uniform, s *Settings) (Result, error) {
	for _, v := range [...]float64{u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Result{Phase: label.NotConverged, Status: NotConverged}, fmt.Errorf("%w: %+v", ErrBadInput, u)
		}
	}
	st := s.withDefaults()
	// Gradients scale with the energy scale of the problem: with n·g of
	// hundreds of E_R an absolute tolerance meets rounding first, so the
	// tolerances are relative to max(1, |Ω|, |δ|, |n g_ij|).
	scale := 1.0
	for _, v := range [...]float64{u.Omega, u.Delta, u.Guu, u.Gdd, u.Gud} {
		scale = math.Max(scale, math.Abs(v))
	}
	st.GradTol *= scale
	st.AcceptTol *= scale
	ws := workPool.Get().(*workspace)
	defer workPool.Put(ws)
	return ws.solve(u, &st), nil
}

var workPool = sync.Pool{New: func() any { return newWorkspace() }}

// workspace holds the reusable state of the local searches, so that the
// per-point work does not allocate beyond what gonum's BFGS does.
type workspace struct {
	u     Uniform
	evals int

	best [3]float64
	grad [3]float64
	x0   [3]float64
}

func newWorkspace() *workspace {
	return &workspace{}
}

func (ws *workspace) solve(u Uniform, st *Settings) Result {
	ws.u = u
	ws.evals = 0
	res := Result{Status: Converged}

	// Plane-wave branch.
	thP, eP, okP := ws.planeWave()
	cP := math.Cos(2 * thP)
	pw := TwoWave{KPlus: cP, KMinus: -cP, ThetaPlus: thP, ThetaMinus: thP, W: 1}
	res.EnergySingleWave = eP

	// Stripe branch.
	floor := st.Thresholds.StripeMinority
	var (
		bestE  = math.Inf(1)
		bestX  [3]float64
		bestOK bool
	)
	sgn := -1.0
	if u.Omega < 0 {
		sgn = 1
	}
	for i := 0; i < st.Starts; i++ {
		var c0, w0 float64
		var th1, th2 float64
		if i < len(stripeStarts) {
			c0, w0 = stripeStarts[i].c0, stripeStarts[i].w
			th1 = 0.5 * math.Atan2(sgn*math.Sqrt(1-c0*c0), c0)
			th2 = 0.5 * math.Atan2(sgn*math.Sqrt(1-c0*c0), -c0)
		} else {
			// From the plane-wave optimum and its mirror image.
			w0 = 0.5
			c0 = math.Max(math.Abs(cP), 0.05)
			s0 := math.Sin(2 * thP)
			th1 = 0.5 * math.Atan2(s0, c0)
			th2 = 0.5 * math.Atan2(s0, -c0)
		}
		ws.x0 = [3]float64{th1, th2, betaOf(w0, floor)}
		e, ok := ws.localSearch(floor, st)
		if e < bestE {
			bestE, bestX, bestOK = e, ws.best, ok
		}
	}
	stripe := stripeState(bestX, floor)
	eS := bestE

	// Searches of the whole ansatz (no floor) from the stripe minimum and
	// from the plane wave with a 5 % admixture of its mirror image: a state
	// found there joins the branch its minority weight belongs to.
	sP := math.Sin(2 * thP)
	for j := 0; j < 2; j++ {
		if j == 0 {
			ws.x0 = [3]float64{bestX[0], bestX[1], betaOf(stripe.W, 0)}
		} else {
			ws.x0 = [3]float64{thP, 0.5 * math.Atan2(sP, -cP), betaOf(0.95, 0)}
		}
		e, ok := ws.localSearch(0, st)
		cand := stripeState(ws.best, 0)
		if math.Min(cand.W, 1-cand.W) < floor {
			if e < eP-st.TieTol {
				pw, eP, okP = cand, e, ok
			}
		} else if e < eS-st.TieTol {
			stripe, eS, bestOK = cand, e, ok
		}
	}

	res.EnergyPlaneWave, res.PlaneWaveState = eP, pw
	res.EnergyStripe, res.StripeState = eS, stripe
	res.Evaluations = ws.evals
	if eS < eP-st.TieTol {
		res.Energy, res.State, res.Gap = eS, stripe, eP-eS
	} else {
		res.Energy, res.State, res.Gap = eP, pw, math.Max(eS-eP, 0)
	}
	if !okP || !bestOK {
		res.Status = NotConverged
	}
	res.SigmaZ = res.State.SigmaZ()
	res.Contrast = res.State.Contrast()
	plus, minus, mk := res.State.Fractions()
	res.Phase = label.Classify(label.Features{MeanAbsK: mk, FracPlus: plus, FracMinus: minus,
		Converged: res.Status == Converged}, st.Thresholds)
	if res.Phase == label.SingleMinimum && res.State.W == 1 && u.SingleWaveBistable() {
		// The optimum is one of two single-wave minima: a plane wave,
		// however small its k (the classifier's |k| threshold is for
		// numerical states only).
		res.Phase = label.PlaneWave
	}
	res.Period = math.NaN()
	if res.Phase == label.Stripe {
		res.K1 = math.Abs(res.State.K1())
		res.Period = res.State.Period()
	} else if res.State.W >= 0.5 {
		res.K1 = res.State.KPlus
	} else {
		res.K1 = -res.State.KMinus
	}
	return res
}

// betaOf inverts W = f + (1−2f) sin²β.
func betaOf(w, f float64) float64 {
	t := (w - f) / (1 - 2*f)
	t = math.Min(math.Max(t, 0), 1)
	return math.Asin(math.Sqrt(t))
}

// stripeState builds the ansatz state from the reduced coordinates
// (θ₊, θ₋, β) with the momenta at their optimum k₊ = cos 2θ₊, k₋ = −cos 2θ₋.
func stripeState(x [3]float64, f float64) TwoWave {
	sb := math.Sin(x[2])
	return TwoWave{
		KPlus: math.Cos(2 * x[0]), KMinus: -math.Cos(2 * x[1]),
		ThetaPlus: x[0], ThetaMinus: x[1], W: f + (1-2*f)*sb*sb,
	}
}

// stripeEnergy is the reduced two-wave energy (momenta eliminated) at
// x = (θ₊, θ₋, β) with W = f + (1−2f) sin²β, and its gradient in g:
//
//	ε = W e₁ + (1−W) e₂ + Guu/2 (Au² + 2P a₁²a₂²) + Gdd/2 (Ad² + 2P b₁²b₂²)
//	    + Gud (Au Ad + 2P a₁a₂b₁b₂),
//
// e_i = 1 − c_i² + (Ω/2)s_i + (δ/2)c_i, a_i = cos θ_i, b_i = sin θ_i,
// c_i = cos 2θ_i, s_i = sin 2θ_i, P = W(1−W). It allocates nothing.
func (u *Uniform) stripeEnergy(x, g []float64, f float64) float64 {
	a1, b1 := math.Cos(x[0]), math.Sin(x[0])
	a2, b2 := math.Cos(x[1]), math.Sin(x[1])
	sb, cb := math.Sin(x[2]), math.Cos(x[2])
	w := f + (1-2*f)*sb*sb
	dw := (1 - 2*f) * 2 * sb * cb
	v := 1 - w
	c1, s1 := a1*a1-b1*b1, 2*a1*b1
	c2, s2 := a2*a2-b2*b2, 2*a2*b2
	e1 := 1 - c1*c1 + 0.5*u.Omega*s1 + 0.5*u.Delta*c1
	e2 := 1 - c2*c2 + 0.5*u.Omega*s2 + 0.5*u.Delta*c2
	P := w * v
	au := w*a1*a1 + v*a2*a2
	ad := w*b1*b1 + v*b2*b2
	aa, bb, ab := a1*a1*a2*a2, b1*b1*b2*b2, a1*a2*b1*b2
	E := w*e1 + v*e2 + 0.5*u.Guu*(au*au+2*P*aa) + 0.5*u.Gdd*(ad*ad+2*P*bb) + u.Gud*(au*ad+2*P*ab)
	if g != nil {
		g[0] = w*(4*c1*s1+u.Omega*c1-u.Delta*s1) +
			u.Guu*(-au*w*s1-P*a2*a2*s1) + u.Gdd*(ad*w*s1+P*b2*b2*s1) +
			u.Gud*(w*s1*(au-ad)+2*P*a2*b2*c1)
		g[1] = v*(4*c2*s2+u.Omega*c2-u.Delta*s2) +
			u.Guu*(-au*v*s2-P*a1*a1*s2) + u.Gdd*(ad*v*s2+P*b1*b1*s2) +
			u.Gud*(v*s2*(au-ad)+2*P*a1*b1*c2)
		dA, dB := a1*a1-a2*a2, b1*b1-b2*b2
		dEw := e1 - e2 + u.Guu*(au*dA+(1-2*w)*aa) + u.Gdd*(ad*dB+(1-2*w)*bb) +
			u.Gud*(dA*ad+au*dB+2*(1-2*w)*ab)
		g[2] = dEw * dw
	}
	return E
}

// localSearch minimises the stripe energy from ws.x0 with floor f by BFGS
// (inverse-Hessian update, J. Nocedal, S. J. Wright, Numerical Optimization,
// 2nd ed., Springer (2006), eqs. 6.17 and 6.20) with a backtracking
// Armijo line search. It allocates nothing. The best point is left in
// ws.best; it reports whether the gradient norm reached GradTol (or
// AcceptTol when the line search can make no more progress at rounding
// level).
//
// (gonum's optimize package was the first choice; it cannot be built in this
// module without adding golang.org/x/tools to go.sum, which optimize needs
// through stat/distmv, so the three-parameter BFGS is written out here.)
func (ws *workspace) localSearch(f float64, st *Settings) (float64, bool) {
	u := &ws.u
	x, g := ws.best[:], ws.grad[:]
	copy(x, ws.x0[:])
	fx := u.stripeEnergy(x, g, f)
	ws.evals++
	var H [9]float64
	resetH := func(scale float64) {
		H = [9]float64{scale, 0, 0, 0, scale, 0, 0, 0, scale}
	}
	resetH(1)
	first := true
	var d, xn, gn, xt, gt, s, y [3]float64
	for iter := 0; iter < st.MaxIter; iter++ {
		gn2 := norm3(g)
		if gn2 < st.GradTol {
			return fx, true
		}
		for i := 0; i < 3; i++ {
			d[i] = -(H[3*i]*g[0] + H[3*i+1]*g[1] + H[3*i+2]*g[2])
		}
		slope := d[0]*g[0] + d[1]*g[1] + d[2]*g[2]
		if !(slope < 0) {
			resetH(1)
			d = [3]float64{-g[0], -g[1], -g[2]}
			slope = -gn2 * gn2
		}
		// Keep a step within 0.5 rad in the angles.
		alpha := 1.0
		if dn := norm3(d[:]); dn > 0.5 {
			alpha = 0.5 / dn
		}
		var fn float64
		accepted := false
		for ls := 0; ls < 60; ls++ {
			for i := range xn {
				xn[i] = x[i] + alpha*d[i]
			}
			fn = u.stripeEnergy(xn[:], gn[:], f)
			ws.evals++
			if fn <= fx+1e-4*alpha*slope {
				accepted = true
				break
			}
			// At rounding level the Armijo test is noise: accept a step
			// that does not raise the energy beyond rounding and lowers the
			// gradient.
			if math.Abs(fn-fx) <= 4e-16*(1+math.Abs(fx)) && norm3(gn[:]) < gn2 {
				accepted = true
				break
			}
			alpha *= 0.5
		}
		if !accepted {
			return fx, gn2 < st.AcceptTol
		}
		// Expansion (the curvature condition of the weak Wolfe conditions,
		// Nocedal & Wright, eq. 3.6b, c₂ = 0.9): while the energy still falls
		// steeply along d at the accepted point, the step is doubled, up to
		// the 0.5 rad cap. Without it a backtracking search accepts every
		// unit step in a region of negative curvature (sᵀy ≤ 0, no update),
		// and the search crawls: from a plane wave with a small admixture
		// towards a lower stripe at small G2 it spent MaxIter at |g| = 1e-3
		// (Ω = 0.191, δ = −7.4e-4, G1 = 0.046, G2 = 4.6e-4 E_R).
		for ex := 0; ex < 40 && alpha < 1e6; ex++ {
			if gn[0]*d[0]+gn[1]*d[1]+gn[2]*d[2] >= 0.9*slope || 2*alpha*norm3(d[:]) > 0.5 {
				break
			}
			for i := range xt {
				xt[i] = x[i] + 2*alpha*d[i]
			}
			ft := u.stripeEnergy(xt[:], gt[:], f)
			ws.evals++
			if !(ft <= fx+1e-4*2*alpha*slope) || !(ft < fn) {
				break
			}
			alpha *= 2
			xn, gn, fn = xt, gt, ft
		}
		for i := 0; i < 3; i++ {
			s[i] = xn[i] - x[i]
			y[i] = gn[i] - g[i]
		}
		copy(x, xn[:])
		copy(g, gn[:])
		fx = fn
		sy := s[0]*y[0] + s[1]*y[1] + s[2]*y[2]
		if sy <= 1e-300 {
			continue
		}
		if first {
			resetH(sy / (y[0]*y[0] + y[1]*y[1] + y[2]*y[2]))
			first = false
		}
		// H ← (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ, ρ = 1/sᵀy.
		rho := 1 / sy
		var Hy [3]float64
		for i := 0; i < 3; i++ {
			Hy[i] = H[3*i]*y[0] + H[3*i+1]*y[1] + H[3*i+2]*y[2]
		}
		yHy := y[0]*Hy[0] + y[1]*Hy[1] + y[2]*Hy[2]
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				H[3*i+j] += -rho*(s[i]*Hy[j]+Hy[i]*s[j]) + (rho*rho*yHy+rho)*s[i]*s[j]
			}
		}
	}
	// MaxIter spent: the same acceptance as a stalled line search (slow
	// convergence along a flat direction, e.g. Ω = 4.1125, G1 = 1,
	// G2 = 0.4587 ended with |g| = 1.4e-8 after 300 iterations).
	return fx, norm3(g) < st.AcceptTol
}

func norm3(g []float64) float64 { return math.Sqrt(g[0]*g[0] + g[1]*g[1] + g[2]*g[2]) }

// pwEnergy is the energy of one plane wave with spinor angle θ and its
// momentum at the optimum k = cos 2θ, with its first two derivatives in θ:
//
//	ε(θ) = 1 − c² + (Ω/2)s + (δ/2)c + ḡ1 + Δg c + ḡ2 c²,  c = cos 2θ, s = sin 2θ,
//
// (uniform densities n↑/n = (1+c)/2, n↓/n = (1−c)/2, see Uniform.Couplings).
func (u *Uniform) pwEnergy(th float64) (e, d1, d2 float64) {
	g1, g2, dg := u.Couplings()
	c, s := math.Cos(2*th), math.Sin(2*th)
	ip := dg + 2*g2*c // dε_int/dc
	e = 1 - c*c + 0.5*u.Omega*s + 0.5*u.Delta*c + g1 + dg*c + g2*c*c
	d1 = 4*c*s + u.Omega*c - u.Delta*s - 2*s*ip
	d2 = 8*(c*c-s*s) - 2*u.Omega*s - 2*u.Delta*c - 4*c*ip + 8*g2*s*s
	return
}

// SingleWaveBistable reports whether the single-plane-wave energy of u
// (pwEnergy) has two local minima in the momentum c = k/k_R of the wave.
// On the lower spinor branch (sin 2θ = −sgn Ω √(1 − c²))
//
//	ε(c) = 1 − c² − (|Ω|/2)√(1 − c²) + b c + ḡ2 c² + ḡ1,  b = δ/2 + Δg,
//	ε'(c) = f(c) + b,  f(c) = c [(|Ω|/2)/√(1 − c²) − 2a],  a = 1 − ḡ2.
//
// f is odd; for r = |Ω|/(4a) < 1 it has a local maximum at
// c_m = −√(1 − r^{2/3}) of height 2a (1 − r^{2/3})^{3/2}, so ε' has three
// zeros (two minima and the maximum between them) iff
//
//	r < 1 and |b| < 2a (1 − r^{2/3})^{3/2},
//
// the astroid (|b|/2a)^{2/3} + r^{2/3} < 1 (derived here; at ḡ2 = Δg = 0 it
// is the familiar two-minima region of the Raman-dressed lower band,
// (|δ|/4)^{2/3} + (Ω/4)^{2/3} < 1, common practice, no source). At b = 0 the
// boundary is Ω = 4(1 − G2). With a ≤ 0 the energy has one minimum.
func (u Uniform) SingleWaveBistable() bool {
	_, g2, dg := u.Couplings()
	a := 1 - g2
	if !(a > 0) {
		return false
	}
	r := math.Abs(u.Omega) / (4 * a)
	if r >= 1 {
		return false
	}
	b := u.Delta/2 + dg
	return math.Abs(b) < 2*a*math.Pow(1-math.Cbrt(r*r), 1.5)
}

const pwScan = 64

// planeWave minimises pwEnergy over θ ∈ [0, π): a scan of pwScan angles, then
// a safeguarded Newton iteration on ε'(θ) in the bracket around every local
// minimum of the scan. It reports whether the best minimum has |ε'| at
// rounding level.
func (ws *workspace) planeWave() (theta, energy float64, ok bool) {
	u := &ws.u
	var f [pwScan]float64
	h := math.Pi / pwScan
	for i := range f {
		f[i], _, _ = u.pwEnergy(float64(i) * h)
	}
	ws.evals += pwScan
	energy = math.Inf(1)
	for i := range f {
		l, r := f[(i+pwScan-1)%pwScan], f[(i+1)%pwScan]
		if f[i] > l || f[i] > r {
			continue
		}
		th, e, conv := ws.refine(float64(i-1)*h, float64(i+1)*h)
		if e < energy {
			theta, energy, ok = th, e, conv
		}
	}
	theta = math.Mod(theta+math.Pi, math.Pi)
	return theta, energy, ok
}

// refine finds a minimum of ε(θ) in [lo, hi] given ε'(lo) ≤ 0 ≤ ε'(hi), by
// Newton steps on ε' kept inside the bracket, with bisection when a step
// leaves it. A stationary point with ε” < 0 (a maximum, e.g. c = 0 just
// below the single-minimum boundary) is never accepted: the bracket is split
// there and both halves are searched.
func (ws *workspace) refine(lo, hi float64) (float64, float64, bool) {
	return ws.refineDepth(lo, hi, 0)
}

func (ws *workspace) refineDepth(lo, hi float64, depth int) (float64, float64, bool) {
	u := &ws.u
	elo, dlo, _ := u.pwEnergy(lo)
	ehi, dhi, _ := u.pwEnergy(hi)
	ws.evals += 2
	if dlo > 0 || dhi < 0 {
		// No sign change: the minimum is at a bracket end within rounding;
		// take the better end and check its slope.
		if elo < ehi {
			return lo, elo, math.Abs(dlo) < 1e-9
		}
		return hi, ehi, math.Abs(dhi) < 1e-9
	}
	x := 0.5 * (lo + hi)
	for it := 0; it < 200; it++ {
		e, d1, d2 := u.pwEnergy(x)
		ws.evals++
		if math.Abs(d1) < 1e-13 || hi-lo < 1e-15 {
			if d2 >= 0 || depth > 4 {
				return x, e, d2 >= 0 || math.Abs(d2) < 1e-9
			}
			h := math.Max(1e-9, 1e-6*(hi-lo))
			x1, e1, ok1 := ws.refineDepth(lo, x-h, depth+1)
			x2, e2, ok2 := ws.refineDepth(x+h, hi, depth+1)
			if e1 <= e2 {
				return x1, e1, ok1
			}
			return x2, e2, ok2
		}
		if d1 < 0 {
			lo = x
		} else {
			hi = x
		}
		nx := x - d1/d2
		if d2 <= 0 || nx <= lo || nx >= hi {
			nx = 0.5 * (lo + hi)
		}
		if nx == x {
			return x, e, math.Abs(d1) < 1e-9 && d2 >= 0
		}
		x = nx
	}
	e, d1, d2 := u.pwEnergy(x)
	return x, e, math.Abs(d1) < 1e-9 && d2 >= 0
}
