package phases

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"socmap/phases/label"
)

// The stripe in a plane-wave basis of its reciprocal lattice.
//
// The state is ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}, m = −M … M−1 (2M plane
// waves, real amplitudes), so that the two waves of the variational stripe
// are m = 0 (momentum k₊ = k₀) and m = −1 (momentum −k₋ = k₀ − K), K = k₊ + k₋.
// Its energy per particle (Galerkin: the interaction of the truncated state
// evaluated exactly) is
//
//	ε = Σ_m a_mᵀ h(k₀ + mK) a_m + ½ Σ_p [G↑↑ n↑(p)² + G↓↓ n↓(p)² + 2G↑↓ n↑(p)n↓(p)],
//	n_σ(p) = Σ_b a_{σ,b+p} a_{σ,b}  (the Fourier components of n_σ/n).
//
// A stationary stripe satisfies (H[a] − μ)a = 0 with Σ|a|² = 1,
// (H[a]a)_{σm} = h(k₀+mK)a_m + Σ_τ G_στ Σ_p n_τ(p) a_{σ,m−p}, and is
// stationary in k₀ and K (no current, no stress; Hellmann–Feynman):
//
//	∂ε/∂k₀ = Σ_{mσ} 2(k₀ + mK − s_σ) a_{σm}² = 0,
//	∂ε/∂K  = Σ_{mσ} 2m(k₀ + mK − s_σ) a_{σm}² = 0,   s_↑ = +1, s_↓ = −1.
//
// These 2·2M + 3 equations in (a, μ, k₀, K) are solved by Newton's method
// from the variational stripe (Jacobian in closed form: the real Hessian
// H − μ + X + Ỹ, Ỹ_{σm,τm'} = G_στ D_στ(m+m'), bordered by the constraints).

type stripeSpectrum struct {
	u     Uniform
	M     int // harmonics m = −M … M−1
	nh    int // 2M
	a     []float64
	k0, K float64
	mu    float64
	bands int
	st    CondensateState
	x, y  []float64 // X and Y (2nh × 2nh, row-major; index 2·i + σ)
	solve *bdgSolver
	m     []float64
}

// stripeStartsFor returns the starting states of the stripe solve: the
// variational stripe (when it is not on the minority floor), the plane-wave
// optimum with its mirror image at equal weight, and the symmetric closed
// form with G1 → ḡ1 (SymmetricStripe).
func stripeStartsFor(u Uniform, vr Result, floor float64) []TwoWave {
	var out []TwoWave
	if w := vr.StripeState; math.Min(w.W, 1-w.W) > floor*(1+1e-6) && math.Abs(w.KPlus+w.KMinus) > 1e-3 {
		out = append(out, w)
	}
	pw := vr.PlaneWaveState
	th := pw.ThetaPlus
	if pw.W < 0.5 {
		th = pw.ThetaMinus
	}
	c, sn := math.Cos(2*th), math.Sin(2*th)
	c = math.Max(math.Abs(c), 0.05)
	t1, t2 := 0.5*math.Atan2(sn, c), 0.5*math.Atan2(sn, -c)
	out = append(out, TwoWave{KPlus: c, KMinus: c, ThetaPlus: t1, ThetaMinus: t2, W: 0.5})
	g1, _, _ := u.Couplings()
	if k1, s := SymmetricStripe(u.Omega, g1); k1 > 0.05 {
		sg := -1.0
		t1, t2 := 0.5*math.Atan2(sg*s, k1), 0.5*math.Atan2(sg*s, -k1)
		out = append(out, TwoWave{KPlus: k1, KMinus: k1, ThetaPlus: t1, ThetaMinus: t2, W: 0.5})
	}
	return out
}

// newStripeSpectrum solves the stripe from every start of stripeStartsFor
// with 2M = 8 harmonics (or Settings.Harmonics) and keeps the lowest-energy
// solution that the classifier calls a stripe (ErrNotStripe when there is
// none); see converge for the basis used for the spectrum.
func newStripeSpectrum(u Uniform, vr Result, st *ExcitationSettings) (*stripeSpectrum, error) {
	var best *stripeSpectrum
	M0 := 4
	if st.Harmonics > 0 {
		M0 = (st.Harmonics + 1) / 2
	}
	var lastErr error
	for _, w := range stripeStartsFor(u, vr, st.thresholds().StripeMinority) {
		ss := &stripeSpectrum{u: u, M: M0, nh: 2 * M0, bands: st.Bands}
		ss.fromTwoWave(w)
		if err := ss.newton(); err != nil {
			lastErr = err
			continue
		}
		ss.finishState(st)
		if ss.st.Phase != label.Stripe {
			continue
		}
		if best == nil || ss.st.Energy < best.st.Energy-1e-12*u.scale() {
			best = ss
		}
	}
	if best == nil {
		if lastErr != nil {
			return nil, fmt.Errorf("%w (%v)", ErrNotStripe, lastErr)
		}
		return nil, ErrNotStripe
	}
	return best, nil
}

// converge raises the number of harmonics from ss until the probe bands and
// the energy change by less than HarmonicTol (or MaxHarmonics is reached);
// with Settings.Harmonics set it returns ss.
func (ss *stripeSpectrum) converge(st *ExcitationSettings) *stripeSpectrum {
	if st.Harmonics > 0 {
		ss.st.HarmonicChange = 0
		return ss
	}
	u := ss.u
	prev, prevBands := ss, ss.probe()
	change := math.Inf(1)
	for M := ss.M + 1; M <= st.MaxHarmonics; M++ {
		ss := &stripeSpectrum{u: u, M: M, nh: 2 * M, bands: st.Bands}
		ss.fromPrevious(prev)
		if err := ss.newton(); err != nil {
			break
		}
		ss.finishState(st)
		if ss.st.Phase != label.Stripe {
			break
		}
		bands := ss.probe()
		change = math.Abs(ss.st.Energy - prev.st.Energy)
		for i := range bands {
			change = math.Max(change, math.Abs(bands[i]-prevBands[i]))
		}
		prev, prevBands = ss, bands
		if change < st.HarmonicTol {
			break
		}
	}
	prev.st.HarmonicChange = change
	return prev
}

func (ss *stripeSpectrum) fromTwoWave(w TwoWave) {
	ss.a = make([]float64, 2*ss.nh)
	ss.k0, ss.K = w.KPlus, w.KPlus+w.KMinus
	i0, i1 := ss.M, ss.M-1
	cp, cm := math.Sqrt(w.W), math.Sqrt(1-w.W)
	ss.a[2*i0], ss.a[2*i0+1] = cp*math.Cos(w.ThetaPlus), cp*math.Sin(w.ThetaPlus)
	ss.a[2*i1], ss.a[2*i1+1] = cm*math.Cos(w.ThetaMinus), cm*math.Sin(w.ThetaMinus)
	ss.mu = 0
	ss.mu = ss.chemical()
}

func (ss *stripeSpectrum) fromPrevious(p *stripeSpectrum) {
	ss.a = make([]float64, 2*ss.nh)
	off := ss.M - p.M
	for i := 0; i < p.nh; i++ {
		ss.a[2*(i+off)] = p.a[2*i]
		ss.a[2*(i+off)+1] = p.a[2*i+1]
	}
	ss.k0, ss.K, ss.mu = p.k0, p.K, p.mu
}

func (ss *stripeSpectrum) mom(i int) float64 { return ss.k0 + float64(i-ss.M)*ss.K }

// density returns n_σ(p) for p = −(nh−1) … nh−1 at index p + nh − 1.
func (ss *stripeSpectrum) density() (nu, nd []float64) {
	L := 2*ss.nh - 1
	nu, nd = make([]float64, L), make([]float64, L)
	for p := -(ss.nh - 1); p < ss.nh; p++ {
		var su, sd float64
		for b := 0; b < ss.nh; b++ {
			if c := b + p; c >= 0 && c < ss.nh {
				su += ss.a[2*c] * ss.a[2*b]
				sd += ss.a[2*c+1] * ss.a[2*b+1]
			}
		}
		nu[p+ss.nh-1], nd[p+ss.nh-1] = su, sd
	}
	return
}

func (ss *stripeSpectrum) g(s, t int) float64 {
	switch {
	case s == 0 && t == 0:
		return ss.u.Guu
	case s == 1 && t == 1:
		return ss.u.Gdd
	}
	return ss.u.Gud
}

// apply returns H[a]a and the energy per particle.
func (ss *stripeSpectrum) apply() ([]float64, float64) {
	nu, nd := ss.density()
	ha := make([]float64, 2*ss.nh)
	var e float64
	for i := 0; i < ss.nh; i++ {
		h := ss.u.hk(ss.mom(i), 0)
		au, ad := ss.a[2*i], ss.a[2*i+1]
		ha[2*i] = h[0][0]*au + h[0][1]*ad
		ha[2*i+1] = h[1][0]*au + h[1][1]*ad
		e += au*ha[2*i] + ad*ha[2*i+1]
		for p := -(ss.nh - 1); p < ss.nh; p++ {
			j := i - p
			if j < 0 || j >= ss.nh {
				continue
			}
			vu, vd := nu[p+ss.nh-1], nd[p+ss.nh-1]
			ha[2*i] += (ss.u.Guu*vu + ss.u.Gud*vd) * ss.a[2*j]
			ha[2*i+1] += (ss.u.Gud*vu + ss.u.Gdd*vd) * ss.a[2*j+1]
		}
	}
	for k := range nu {
		e += 0.5 * (ss.u.Guu*nu[k]*nu[k] + ss.u.Gdd*nd[k]*nd[k] + 2*ss.u.Gud*nu[k]*nd[k])
	}
	return ha, e
}

func (ss *stripeSpectrum) chemical() float64 {
	ha, _ := ss.apply()
	var mu, nn float64
	for i := range ha {
		mu += ss.a[i] * ha[i]
		nn += ss.a[i] * ss.a[i]
	}
	return mu / nn
}

// residuals returns F = ((H − μ)a, ½(Σa² − 1), ½∂ε/∂k₀, ½∂ε/∂K).
func (ss *stripeSpectrum) residuals() []float64 {
	ha, _ := ss.apply()
	n := 2 * ss.nh
	f := make([]float64, n+3)
	var nn, j0, j1 float64
	for i := 0; i < ss.nh; i++ {
		for s := 0; s < 2; s++ {
			k := 2*i + s
			f[k] = ha[k] - ss.mu*ss.a[k]
			nn += ss.a[k] * ss.a[k]
			v := (ss.mom(i) - spinSign(s)) * ss.a[k] * ss.a[k]
			j0 += v
			j1 += float64(i-ss.M) * v
		}
	}
	f[n], f[n+1], f[n+2] = 0.5*(nn-1), j0, j1
	return f
}

func spinSign(s int) float64 {
	if s == 0 {
		return 1
	}
	return -1
}

// coupling fills X and Y (package derivation) of the current state.
func (ss *stripeSpectrum) coupling() {
	n := 2 * ss.nh
	ss.x, ss.y = make([]float64, n*n), make([]float64, n*n)
	c := func(s, t, p int) float64 { // C_st(p)
		var v float64
		for b := 0; b < ss.nh; b++ {
			if q := b + p; q >= 0 && q < ss.nh {
				v += ss.a[2*q+s] * ss.a[2*b+t]
			}
		}
		return v
	}
	d := func(s, t, sum int) float64 { // D_st(sum) over index sums
		var v float64
		for ia := 0; ia < ss.nh; ia++ {
			if ib := sum - ia; ib >= 0 && ib < ss.nh {
				v += ss.a[2*ia+s] * ss.a[2*ib+t]
			}
		}
		return v
	}
	for i := 0; i < ss.nh; i++ {
		for j := 0; j < ss.nh; j++ {
			for s := 0; s < 2; s++ {
				for t := 0; t < 2; t++ {
					r, col := 2*i+s, 2*j+t
					x := ss.g(s, t) * c(s, t, i-j)
					if s == t {
						x += ss.g(s, 0)*c(0, 0, i-j) + ss.g(s, 1)*c(1, 1, i-j)
					}
					ss.x[r*n+col] = x
					ss.y[r*n+col] = ss.g(s, t) * d(s, t, i+j)
				}
			}
		}
	}
}

// newton solves the stationarity equations (see the comment at the top of
// the file) to max |F| ≤ 1e-13 × scale, with step halving on ‖F‖.
func (ss *stripeSpectrum) newton() error {
	n := 2 * ss.nh
	dim := n + 3
	J := mat.NewDense(dim, dim, nil)
	rhs := mat.NewVecDense(dim, nil)
	var dx mat.VecDense
	norm := func(f []float64) float64 {
		var s float64
		for _, v := range f {
			s = math.Max(s, math.Abs(v))
		}
		return s
	}
	tol := 1e-13 * ss.u.scale()
	f := ss.residuals()
	for it := 0; it < 100; it++ {
		fn := norm(f)
		if fn <= tol {
			return nil
		}
		ss.coupling()
		J.Zero()
		for i := 0; i < ss.nh; i++ {
			h := ss.u.hk(ss.mom(i), 0)
			for s := 0; s < 2; s++ {
				r := 2*i + s
				for t := 0; t < 2; t++ {
					J.Set(r, 2*i+t, J.At(r, 2*i+t)+h[s][t])
				}
				J.Set(r, r, J.At(r, r)-ss.mu)
				for c := 0; c < n; c++ {
					J.Set(r, c, J.At(r, c)+ss.x[r*n+c]+ss.y[r*n+c])
				}
				ar := ss.a[r]
				m := float64(i - ss.M)
				dp := 2 * (ss.mom(i) - spinSign(s)) * ar
				J.Set(r, n, -ar)
				J.Set(r, n+1, dp)
				J.Set(r, n+2, m*dp)
				J.Set(n, r, ar)
				J.Set(n+1, r, dp)
				J.Set(n+2, r, m*dp)
				a2 := ar * ar
				J.Set(n+1, n+1, J.At(n+1, n+1)+a2)
				J.Set(n+1, n+2, J.At(n+1, n+2)+m*a2)
				J.Set(n+2, n+1, J.At(n+2, n+1)+m*a2)
				J.Set(n+2, n+2, J.At(n+2, n+2)+m*m*a2)
			}
		}
		for i, v := range f {
			rhs.SetVec(i, -v)
		}
		if err := dx.SolveVec(J, rhs); err != nil {
			var cond mat.Condition
			if !asCondition(err, &cond) {
				return fmt.Errorf("phases: stripe Newton step: %w", err)
			}
		}
		a0, mu0, k00, K0 := append([]float64(nil), ss.a...), ss.mu, ss.k0, ss.K
		step := 1.0
		for ls := 0; ; ls++ {
			for i := 0; i < n; i++ {
				ss.a[i] = a0[i] + step*dx.AtVec(i)
			}
			ss.mu, ss.k0, ss.K = mu0+step*dx.AtVec(n), k00+step*dx.AtVec(n+1), K0+step*dx.AtVec(n+2)
			fnew := ss.residuals()
			if nf := norm(fnew); nf < fn || ls >= 30 {
				f = fnew
				if ls >= 30 && nf >= fn {
					return fmt.Errorf("phases: stripe Newton stalled at |F| = %.3g", fn)
				}
				break
			}
			step *= 0.5
		}
	}
	if norm(f) <= 1e3*tol {
		return nil
	}
	return fmt.Errorf("phases: stripe Newton did not converge (|F| = %.3g)", norm(f))
}

func asCondition(err error, c *mat.Condition) bool {
	if e, ok := err.(mat.Condition); ok {
		*c = e
		return true
	}
	return false
}

// finishState fills st from the solved state and prepares the BdG problem.
func (ss *stripeSpectrum) finishState(set *ExcitationSettings) {
	if ss.K < 0 {
		// The same lattice read the other way round: index i → nh−1−i,
		// K → −K, k₀ → k₀ − K (the momenta are unchanged).
		ss.k0 -= ss.K
		ss.K = -ss.K
		for i, j := 0, ss.nh-1; i < j; i, j = i+1, j-1 {
			ss.a[2*i], ss.a[2*j] = ss.a[2*j], ss.a[2*i]
			ss.a[2*i+1], ss.a[2*j+1] = ss.a[2*j+1], ss.a[2*i+1]
		}
	}
	_, e := ss.apply()
	f := ss.residuals()
	res := 0.0
	for _, v := range f {
		res = math.Max(res, math.Abs(v))
	}
	var plus, minus, mk float64
	amp := make([][2]float64, ss.nh)
	ms := make([]int, ss.nh)
	for i := 0; i < ss.nh; i++ {
		w := ss.a[2*i]*ss.a[2*i] + ss.a[2*i+1]*ss.a[2*i+1]
		p := ss.mom(i)
		switch {
		case p > 0:
			plus += w
		case p < 0:
			minus += w
		default:
			plus += w / 2
			minus += w / 2
		}
		mk += w * math.Abs(p)
		amp[i] = [2]float64{ss.a[2*i], ss.a[2*i+1]}
		ms[i] = i - ss.M
	}
	ph := label.Classify(label.Features{MeanAbsK: mk, FracPlus: plus, FracMinus: minus, Converged: true}, set.thresholds())
	ss.st = CondensateState{Phase: ph, K0: ss.k0, K: ss.K, M: ms, Amp: amp, Mu: ss.mu, Energy: e, Residual: res, Harmonics: ss.nh}
	ss.coupling()
	n := 2 * ss.nh
	ss.solve = newBDGSolver(n, set.ImagTol, math.Sqrt(set.ImagTol))
	ss.m = make([]float64, 4*n*n)
}

// probe returns the lowest bands at q = K/8, K/4, K/2 (the convergence
// test of the basis).
func (ss *stripeSpectrum) probe() []float64 {
	return latticeProbe(ss.modes, ss.K, ss.bands)
}

func (ss *stripeSpectrum) state() CondensateState { return ss.st }
func (ss *stripeSpectrum) gapless() int           { return 2 }

// reduce splits a momentum along x into the Bloch momentum q_B ∈ [−K/2, K/2)
// and the zone index n, q = q_B + nK.
func (ss *stripeSpectrum) reduce(q float64) (qb float64, n int) {
	n = int(math.Floor(q/ss.K + 0.5))
	return q - float64(n)*ss.K, n
}

// all returns every mode at total momentum q (Bloch momentum and zone).
func (ss *stripeSpectrum) all(q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	qb, zone := 0.0, 0
	qp2 := 0.0
	if axis == QAlongX {
		qb, zone = ss.reduce(q)
	} else {
		qp2 = q * q
	}
	n := 2 * ss.nh
	d := 2 * n
	m := ss.m
	for i := range m {
		m[i] = 0
	}
	for i := 0; i < ss.nh; i++ {
		ha := ss.u.hk(ss.mom(i)+qb, qp2)
		hb := ss.u.hk(ss.mom(i)-qb, qp2)
		for s := 0; s < 2; s++ {
			for t := 0; t < 2; t++ {
				m[(2*i+s)*d+2*i+t] += ha[s][t]
				m[(n+2*i+s)*d+n+2*i+t] += hb[s][t]
			}
			m[(2*i+s)*d+2*i+s] -= ss.mu
			m[(n+2*i+s)*d+n+2*i+s] -= ss.mu
		}
	}
	for r := 0; r < n; r++ {
		for c := 0; c < n; c++ {
			m[r*d+c] += ss.x[r*n+c]
			m[(n+r)*d+n+c] += ss.x[r*n+c]
			m[r*d+n+c] = ss.y[r*n+c]
			m[(n+r)*d+c] = ss.y[c*n+r]
		}
	}
	bm := ss.solve.solve(m)
	if len(bm) != n {
		return nil, false, fmt.Errorf("phases: stripe BdG at q = %g gave %d modes (want %d)", q, len(bm), n)
	}
	out := make([]Mode, n)
	for k, md := range bm {
		o := Mode{Omega: md.omega, Growth: md.growth, U: md.psi[:n:n], V: md.psi[n:]}
		if weights {
			if qb == 0 && md.omega <= ss.solve.zeroTol {
				o.Density, o.Spin = math.NaN(), math.NaN()
			} else {
				var dn, ds complex128
				for s := 0; s < 2; s++ {
					var part complex128
					for i := 0; i < ss.nh; i++ {
						if j := i - zone; j >= 0 && j < ss.nh {
							part += complex(ss.a[2*j+s], 0) * md.psi[2*i+s]
						}
						if j := zone + i; j >= 0 && j < ss.nh {
							part += complex(ss.a[2*j+s], 0) * md.psi[n+2*i+s]
						}
					}
					dn += part
					ds += complex(spinSign(s), 0) * part
				}
				o.Density, o.Spin = abs2c(dn), abs2c(ds)
			}
		}
		out[k] = o
	}
	return out, ss.solve.landau, nil
}

func (ss *stripeSpectrum) modes(q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	return latticeModes(ss.all, ss.bands, q, axis, weights)
}

func (ss *stripeSpectrum) moments(q float64, axis QAxis) (float64, float64) {
	return latticeMoments(ss.all, q, axis)
}

func (ss *stripeSpectrum) sound(h float64) (cpx, cmx, cy []float64) { return latticeSound(ss.all, h) }

func (ss *stripeSpectrum) effectiveMass() float64 { return math.NaN() }

// latticeAll is the full spectrum of a state in a plane-wave basis of its
// lattice at Bloch momentum q (stripeSpectrum.all, spin1StripeSpectrum.all):
// the modes sorted by energy and whether a negative-energy mode appeared.
type latticeAll func(q float64, axis QAxis, weights bool) ([]Mode, bool, error)

// latticeModes: the lowest bands modes of all at q.
func latticeModes(all latticeAll, bands int, q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	ms, landau, err := all(q, axis, weights)
	if err != nil {
		return nil, false, err
	}
	if len(ms) > bands {
		ms = ms[:bands]
	}
	return ms, landau, nil
}

// latticeMoments: the f-sum moments over every mode of all at q.
func latticeMoments(all latticeAll, q float64, axis QAxis) (float64, float64) {
	ms, _, err := all(q, axis, true)
	if err != nil {
		return math.NaN(), math.NaN()
	}
	return sumMoments(ms)
}

// latticeSound: the slopes of the two gapless branches of all along +x, −x
// and y (step h).
func latticeSound(all latticeAll, h float64) (cpx, cmx, cy []float64) {
	along := func(axis QAxis, sg float64) func(q float64) []Mode {
		return func(q float64) []Mode {
			ms, _, err := all(sg*q, axis, false)
			if err != nil {
				return nil
			}
			return ms
		}
	}
	return soundSlope(along(QAlongX, 1), h, 2), soundSlope(along(QAlongX, -1), h, 2), soundSlope(along(QAlongY, 1), h, 2)
}

// latticeProbe returns the lowest bands of modes at q = K/8, K/4, K/2 (the
// convergence test of a plane-wave basis; NaN where a band is missing).
func latticeProbe(modes latticeAll, K float64, bands int) []float64 {
	var out []float64
	for _, f := range []float64{0.125, 0.25, 0.5} {
		ms, _, err := modes(f*K, QAlongX, false)
		for b := 0; b < bands; b++ {
			if err != nil || b >= len(ms) {
				out = append(out, math.NaN())
				continue
			}
			out = append(out, ms[b].Omega)
		}
	}
	return out
}
