package phases

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Spin-1 states of two or more plane waves (stripe, stripe-3,
// antiferromagnetic, broken-axisymmetry) in a plane-wave basis of their
// reciprocal lattice, and their Bloch–Bogoliubov spectrum. Derivation (this
// project), following the two-level stripe (stripebdg.go).
//
// The state is ψ₀ = √n e^{ik₀x} Σ_m a_m e^{imKx}, m = −M … M−1, with real
// three-component amplitudes a_m (order m_F = +1, 0, −1). Real amplitudes
// are a closed ansatz: h(k) is real, the Fourier components of n and F_x,
// F_z are then real and even, those of F_y imaginary and odd, and
// F_y = iS (S real antisymmetric) makes every product below real. With
//
//	C(p) = Σ_b a_{b+p} a_bᵀ,   D(s) = Σ_{i+j=s} a_i a_jᵀ   (3×3),
//	n(p) = tr C(p),  f_x(p) = tr F_xC(p),  t(p) = tr SC(p),  f_z(p) = tr F_zC(p),
//
// the energy per particle is
//
//	ε = Σ_m a_mᵀh(k₀ + mK)a_m + (G0/2) Σ_p n(p)² + (G2/2) Σ_p [f_x(p)² + t(p)² + f_z(p)²],
//
// (f_y(p)f_y(−p) = t(p)², t odd), the stationary state solves
// h(k₀ + mK)a_m + Σ_l V(m − l)a_l = (μ + λF_z)a_m with the local potential
//
//	V(p) = G0 n(p) + G2 [f_x(p)F_x − t(p)S + f_z(p)F_z],
//
// Σ|a|² = 1, ⟨F_z⟩ = M when the magnetisation is fixed, and no current or
// stress (∂ε/∂k₀ = Σ_m a_mᵀ∂_kh a_m = 0, ∂ε/∂K = Σ_m m a_mᵀ∂_kh a_m = 0);
// these are solved by Newton's method (spin1NewtonFD) from the
// variational state. The fluctuation at Bloch momentum q,
// δψ = e^{ik₀x}[Σ_m u_m e^{i(q+mK)x − iωt} + Σ_j v_j* e^{−i(q−jK)x + iωt}],
// gives σ₃MΨ = ωΨ with M real symmetric,
//
//	A_{ml} = [h(k₀ + q + mK) − μ − λF_z]δ_{ml} + V(m − l) + X(m − l),   B: h(k₀ − q + mK),
//	X(p) = G0 C(p) + G2 [F_xC(p)F_x + SC(p)Sᵀ + F_zC(p)F_z],
//	Y_{mj} = G0 D(m + j) + G2 [F_xD(m + j)F_x − SD(m + j)Sᵀ + F_zD(m + j)F_z],
//
// (one harmonic: the uniform matrices of spin1bdg.go). A mode at total
// momentum q + nK has the amplitudes δO = Σ_m (Oa_{m−n})·u_m + Σ_j (Oa_{n+j})·v_j
// for O = 1, F_z, F_x and δF_y = i[Σ_j (Sa_{n+j})·v_j − Σ_m (Sa_{m−n})·u_m].
// The basis is raised (M + 1) until the lowest Bands bands at q = K/8, K/4,
// K/2 and the energy change by less than HarmonicTol, as for the two-level
// stripe.

type spin1StripeSpectrum struct {
	u       Spin1Uniform
	fix     bool
	mag     float64
	scale   float64
	M, nh   int
	a       []float64 // index 3·i + σ, harmonic m = i − M
	k0, K   float64
	mu, lam float64
	bands   int
	energy  float64
	resid   float64
	change  float64
	kx, ky  [][3][3]float64 // V + X at p + nh − 1; Y at i + l
	solve   *bdgSolver
	m       []float64
}

func (ss *spin1StripeSpectrum) mom(i int) float64 { return ss.k0 + float64(i-ss.M)*ss.K }

// pairs returns C(p) (index p + nh − 1) and D (index i + j) of amplitudes a.
func spin1Pairs(a []float64, nh int) (c, d [][3][3]float64) {
	c = make([][3][3]float64, 2*nh-1)
	d = make([][3][3]float64, 2*nh-1)
	for i := 0; i < nh; i++ {
		for j := 0; j < nh; j++ {
			ci, dj := &c[i-j+nh-1], &d[i+j]
			for s := 0; s < 3; s++ {
				for t := 0; t < 3; t++ {
					x := a[3*i+s] * a[3*j+t]
					ci[s][t] += x
					dj[s][t] += x
				}
			}
		}
	}
	return
}

func trMul(f *[3][3]float64, c *[3][3]float64) float64 {
	var s float64
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			s += f[i][j] * c[j][i]
		}
	}
	return s
}

// sandwich returns F C Gᵀ.
func sandwich(f *[3][3]float64, c *[3][3]float64, g *[3][3]float64) (o [3][3]float64) {
	var t [3][3]float64
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			for k := 0; k < 3; k++ {
				t[i][j] += f[i][k] * c[k][j]
			}
		}
	}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			for k := 0; k < 3; k++ {
				o[i][j] += t[i][k] * g[j][k]
			}
		}
	}
	return
}

var spin1FzM = [3][3]float64{{1, 0, 0}, {0, 0, 0}, {0, 0, -1}}

// local returns V(p) and the energy densities n(p)², f² of C(p).
func (u *Spin1Uniform) local(c *[3][3]float64) (v [3][3]float64, e float64) {
	n := c[0][0] + c[1][1] + c[2][2]
	fx, t, fz := trMul(&spin1Fx, c), trMul(&spin1S, c), trMul(&spin1FzM, c)
	for i := 0; i < 3; i++ {
		v[i][i] += u.G0 * n
		for j := 0; j < 3; j++ {
			v[i][j] += u.G2 * (fx*spin1Fx[i][j] - t*spin1S[i][j] + fz*spin1FzM[i][j])
		}
	}
	e = u.G0/2*n*n + u.G2/2*(fx*fx+t*t+fz*fz)
	return
}

// residual evaluates the stationarity equations at x = (a, μ, k₀, K[, λ])
// into r and returns the energy per particle.
func (ss *spin1StripeSpectrum) residual(x, r []float64) float64 {
	nh := ss.nh
	a := x[:3*nh]
	mu, k0, K := x[3*nh], x[3*nh+1], x[3*nh+2]
	lam := 0.0
	if ss.fix {
		lam = x[3*nh+3]
	}
	c, _ := spin1Pairs(a, nh)
	vs := make([][3][3]float64, len(c))
	e := 0.0
	for p := range c {
		var ep float64
		vs[p], ep = ss.u.local(&c[p])
		e += ep
	}
	var norm, j0, j1, fz float64
	for i := 0; i < nh; i++ {
		m := float64(i - ss.M)
		k := k0 + m*K
		h := ss.u.Model.Hamiltonian(k)
		ai := a[3*i : 3*i+3]
		for s := 0; s < 3; s++ {
			var v float64
			for t := 0; t < 3; t++ {
				v += h[s][t] * ai[t]
			}
			e += ai[s] * v
			for l := 0; l < nh; l++ {
				vp := &vs[i-l+nh-1]
				for t := 0; t < 3; t++ {
					v += vp[s][t] * a[3*l+t]
				}
			}
			r[3*i+s] = v - (mu+lam*spin1Fz[s])*ai[s]
			w := ai[s] * ai[s]
			norm += w
			d := 2 * (k - ss.u.Model.K[s]) * w
			j0 += d
			j1 += m * d
			fz += spin1Fz[s] * w
		}
	}
	r[3*nh], r[3*nh+1], r[3*nh+2] = norm-1, j0, j1
	if ss.fix {
		r[3*nh+3] = fz - ss.mag
	}
	return e
}

// spin1NewtonFD solves f(x) = 0 (len(f) = len(x)) by Newton's method with a
// central-difference Jacobian (step 1e-6 max(1, |x_j|)) and steps by the SVD
// pseudo-inverse (relative cutoff 1e-12, so that flat directions of a
// symmetric state do not stop it); it returns the largest |f| at the end.
func spin1NewtonFD(x []float64, f func(x, r []float64), maxIt int) float64 {
	n := len(x)
	r, rp, rm := make([]float64, n), make([]float64, n), make([]float64, n)
	jac := mat.NewDense(n, n, nil)
	maxAbs := func(v []float64) float64 {
		m := 0.0
		for _, a := range v {
			m = math.Max(m, math.Abs(a))
		}
		return m
	}
	var svd mat.SVD
	for it := 0; it < maxIt; it++ {
		f(x, r)
		if maxAbs(r) < 1e-15 {
			break
		}
		for j := 0; j < n; j++ {
			h := 1e-6 * math.Max(1, math.Abs(x[j]))
			x0 := x[j]
			x[j] = x0 + h
			f(x, rp)
			x[j] = x0 - h
			f(x, rm)
			x[j] = x0
			for i := 0; i < n; i++ {
				jac.Set(i, j, (rp[i]-rm[i])/(2*h))
			}
		}
		if !svd.Factorize(jac, mat.SVDThin) {
			break
		}
		vals := svd.Values(nil)
		rank := 0
		for _, v := range vals {
			if v > 1e-12*vals[0] {
				rank++
			}
		}
		var dx mat.Dense
		svd.SolveTo(&dx, mat.NewDense(n, 1, append([]float64(nil), r...)), rank)
		step := 0.0
		for j := 0; j < n; j++ {
			x[j] -= dx.At(j, 0)
			step = math.Max(step, math.Abs(dx.At(j, 0)))
		}
		if step < 1e-15 {
			break
		}
	}
	f(x, r)
	return maxAbs(r)
}

// solveState runs Newton from the current (a, μ, k₀, K, λ) and stores the
// solution; error when the residual stays above 1e-9 × the energy scale.
func (ss *spin1StripeSpectrum) solveState() error {
	nh := ss.nh
	x := append(append([]float64(nil), ss.a...), ss.mu, ss.k0, ss.K)
	if ss.fix {
		x = append(x, ss.lam)
	}
	res := spin1NewtonFD(x, func(x, r []float64) { ss.residual(x, r) }, 60)
	if res > 1e-9*ss.scale {
		return fmt.Errorf("phases: the spin-1 stripe with %d plane waves did not converge (Newton residual %.3g)", nh, res)
	}
	copy(ss.a, x[:3*nh])
	ss.mu, ss.k0, ss.K = x[3*nh], x[3*nh+1], x[3*nh+2]
	if ss.fix {
		ss.lam = x[3*nh+3]
	}
	if ss.K < 0 { // the same lattice read the other way round
		ss.k0 -= ss.K
		ss.K = -ss.K
		for i, j := 0, nh-1; i < j; i, j = i+1, j-1 {
			for s := 0; s < 3; s++ {
				ss.a[3*i+s], ss.a[3*j+s] = ss.a[3*j+s], ss.a[3*i+s]
			}
		}
	}
	r := make([]float64, len(x))
	x = append(append([]float64(nil), ss.a...), ss.mu, ss.k0, ss.K)
	if ss.fix {
		x = append(x, ss.lam)
	}
	ss.energy = ss.residual(x, r)
	ss.resid = res
	ss.kernels()
	return nil
}

// kernels fills V + X and Y of the BdG matrix.
func (ss *spin1StripeSpectrum) kernels() {
	c, d := spin1Pairs(ss.a, ss.nh)
	ss.kx = make([][3][3]float64, len(c))
	ss.ky = make([][3][3]float64, len(d))
	u := &ss.u
	for p := range c {
		v, _ := u.local(&c[p])
		fx, sy, fz := sandwich(&spin1Fx, &c[p], &spin1Fx), sandwich(&spin1S, &c[p], &spin1S), sandwich(&spin1FzM, &c[p], &spin1FzM)
		dx, dy, dz := sandwich(&spin1Fx, &d[p], &spin1Fx), sandwich(&spin1S, &d[p], &spin1S), sandwich(&spin1FzM, &d[p], &spin1FzM)
		for i := 0; i < 3; i++ {
			for j := 0; j < 3; j++ {
				ss.kx[p][i][j] = v[i][j] + u.G0*c[p][i][j] + u.G2*(fx[i][j]+sy[i][j]+fz[i][j])
				ss.ky[p][i][j] = u.G0*d[p][i][j] + u.G2*(dx[i][j]-dy[i][j]+dz[i][j])
			}
		}
	}
	n := 3 * ss.nh
	ss.m = make([]float64, 4*n*n)
}

// newSpin1StripeSpectrum builds the stripe from the waves of a variational
// state (momenta k_1 < k_2 < …, equally spaced for three waves; real
// amplitudes up to a global phase) with 2M = 8 plane waves (or
// Settings.Harmonics) and converges the basis.
func newSpin1StripeSpectrum(p Spin1ExcitationProblem, s Spin1State, st *ExcitationSettings) (*spin1StripeSpectrum, error) {
	ws := append([]Spin1Wave(nil), s.Waves...)
	for i := 1; i < len(ws); i++ { // sort by momentum
		for j := i; j > 0 && ws[j].K < ws[j-1].K; j-- {
			ws[j], ws[j-1] = ws[j-1], ws[j]
		}
	}
	K := ws[1].K - ws[0].K
	if !(K > 1e-6) {
		return nil, fmt.Errorf("%w: the waves of the state coincide", ErrSpin1MultiWave)
	}
	idx := make([]int, len(ws))
	for i, w := range ws {
		f := (w.K - ws[0].K) / K
		if math.Abs(f-math.Round(f)) > 1e-6 {
			return nil, fmt.Errorf("%w: its momenta are not on one lattice", ErrSpin1MultiWave)
		}
		idx[i] = int(math.Round(f))
	}
	// a common phase that makes every amplitude real
	ph := complex(1, 0)
	for _, w := range ws {
		if a := math.Hypot(real(w.Amp), imag(w.Amp)); a > 1e-9 {
			ph = complex(real(w.Amp)/a, -imag(w.Amp)/a)
			break
		}
	}
	amps := make([]float64, len(ws))
	for i, w := range ws {
		z := w.Amp * ph
		if math.Abs(imag(z)) > 1e-6*math.Max(1e-12, math.Abs(real(z))) && math.Abs(imag(z)) > 1e-9 {
			return nil, fmt.Errorf("%w: its amplitudes are not real up to a common phase", ErrSpin1MultiWave)
		}
		amps[i] = real(z)
	}
	M := 4
	if st.Harmonics > 0 {
		M = st.Harmonics / 2
	}
	for idx[len(idx)-1] > M-1 {
		M++
	}
	ss := &spin1StripeSpectrum{u: p.Uniform, fix: p.FixMagnetization, mag: p.Magnetization, scale: spin1Scale(p.Uniform),
		M: M, nh: 2 * M, bands: st.Bands, k0: ws[0].K, K: K}
	ss.a = make([]float64, 3*ss.nh)
	var nrm float64
	for i, w := range ws {
		for s := 0; s < 3; s++ {
			ss.a[3*(M+idx[i])+s] = amps[i] * w.Spinor[s]
			nrm += amps[i] * amps[i] * w.Spinor[s] * w.Spinor[s]
		}
	}
	for i := range ss.a {
		ss.a[i] /= math.Sqrt(nrm)
	}
	// μ by projection of the mean-field action on the state (λ from 0)
	x := append(append([]float64(nil), ss.a...), 0, ss.k0, ss.K)
	if ss.fix {
		x = append(x, 0)
	}
	r := make([]float64, len(x))
	ss.residual(x, r)
	for i := 0; i < 3*ss.nh; i++ {
		ss.mu += ss.a[i] * r[i]
	}
	if err := ss.solveState(); err != nil {
		return nil, err
	}
	ss.solve = newBDGSolver(3*ss.nh, st.ImagTol, math.Sqrt(st.ImagTol))
	if st.Harmonics > 0 {
		return ss, nil
	}
	return ss.converge(st), nil
}

// converge raises M until the probe bands and the energy change by less
// than HarmonicTol (or MaxHarmonics); the last change is kept.
func (ss *spin1StripeSpectrum) converge(st *ExcitationSettings) *spin1StripeSpectrum {
	prev, prevBands := ss, ss.probe()
	change := math.Inf(1)
	for M := ss.M + 1; M <= st.MaxHarmonics; M++ {
		n := &spin1StripeSpectrum{u: ss.u, fix: ss.fix, mag: ss.mag, scale: ss.scale, M: M, nh: 2 * M, bands: ss.bands,
			k0: prev.k0, K: prev.K, mu: prev.mu, lam: prev.lam}
		n.a = make([]float64, 3*n.nh)
		copy(n.a[3*(M-prev.M):], prev.a)
		if err := n.solveState(); err != nil {
			break
		}
		n.solve = newBDGSolver(3*n.nh, st.ImagTol, math.Sqrt(st.ImagTol))
		bands := n.probe()
		change = math.Abs(n.energy - prev.energy)
		for i := range bands {
			change = math.Max(change, math.Abs(bands[i]-prevBands[i]))
		}
		prev, prevBands = n, bands
		if change < st.HarmonicTol {
			break
		}
	}
	prev.change = change
	return prev
}

func (ss *spin1StripeSpectrum) probe() []float64 {
	return latticeProbe(ss.modes, ss.K, ss.bands)
}

func (ss *spin1StripeSpectrum) gapless() int { return 2 }

func (ss *spin1StripeSpectrum) reduce(q float64) (qb float64, n int) {
	n = int(math.Floor(q/ss.K + 0.5))
	return q - float64(n)*ss.K, n
}

func (ss *spin1StripeSpectrum) all(q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	qb, zone, qp2 := 0.0, 0, 0.0
	if axis == QAlongX {
		qb, zone = ss.reduce(q)
	} else {
		qp2 = q * q
	}
	nh := ss.nh
	n := 3 * nh
	d := 2 * n
	m := ss.m
	for i := range m {
		m[i] = 0
	}
	for i := 0; i < nh; i++ {
		ha := ss.u.Model.Hamiltonian(ss.mom(i) + qb)
		hb := ss.u.Model.Hamiltonian(ss.mom(i) - qb)
		for s := 0; s < 3; s++ {
			for t := 0; t < 3; t++ {
				m[(3*i+s)*d+3*i+t] += ha[s][t]
				m[(n+3*i+s)*d+n+3*i+t] += hb[s][t]
			}
			sh := qp2 - ss.mu - ss.lam*spin1Fz[s]
			m[(3*i+s)*d+3*i+s] += sh
			m[(n+3*i+s)*d+n+3*i+s] += sh
		}
		for l := 0; l < nh; l++ {
			kx, ky := &ss.kx[i-l+nh-1], &ss.ky[i+l]
			for s := 0; s < 3; s++ {
				for t := 0; t < 3; t++ {
					r, c := 3*i+s, 3*l+t
					m[r*d+c] += kx[s][t]
					m[(n+r)*d+n+c] += kx[s][t]
					m[r*d+n+c] = ky[s][t]
					m[(n+r)*d+c] = ky[s][t]
				}
			}
		}
	}
	bm := ss.solve.solve(m)
	if len(bm) != n {
		return nil, false, fmt.Errorf("phases: spin-1 stripe BdG at q = %g gave %d modes (want %d)", q, len(bm), n)
	}
	out := make([]Mode, n)
	for k, md := range bm {
		o := Mode{Omega: md.omega, Growth: md.growth, U: md.psi[:n:n], V: md.psi[n:]}
		if weights {
			if qb == 0 && md.omega <= ss.solve.zeroTol {
				o.Density, o.Spin, o.Transverse = math.NaN(), math.NaN(), math.NaN()
			} else {
				var dn, dz, dx, dy complex128
				for i := 0; i < nh; i++ {
					if j := i - zone; j >= 0 && j < nh {
						for s := 0; s < 3; s++ {
							uu := md.psi[3*i+s]
							dn += complex(ss.a[3*j+s], 0) * uu
							dz += complex(spin1Fz[s]*ss.a[3*j+s], 0) * uu
						}
						var av [3]float64
						copy(av[:], ss.a[3*j:3*j+3])
						fa, sa := mulVec3(&spin1Fx, av), mulVec3(&spin1S, av)
						for s := 0; s < 3; s++ {
							dx += complex(fa[s], 0) * md.psi[3*i+s]
							dy -= complex(sa[s], 0) * md.psi[3*i+s]
						}
					}
					if j := zone + i; j >= 0 && j < nh {
						for s := 0; s < 3; s++ {
							vv := md.psi[n+3*i+s]
							dn += complex(ss.a[3*j+s], 0) * vv
							dz += complex(spin1Fz[s]*ss.a[3*j+s], 0) * vv
						}
						var av [3]float64
						copy(av[:], ss.a[3*j:3*j+3])
						fa, sa := mulVec3(&spin1Fx, av), mulVec3(&spin1S, av)
						for s := 0; s < 3; s++ {
							dx += complex(fa[s], 0) * md.psi[n+3*i+s]
							dy += complex(sa[s], 0) * md.psi[n+3*i+s]
						}
					}
				}
				o.Density, o.Spin, o.Transverse = abs2c(dn), abs2c(dz), abs2c(dx)+abs2c(dy)
			}
		}
		out[k] = o
	}
	return out, ss.solve.landau, nil
}

func (ss *spin1StripeSpectrum) modes(q float64, axis QAxis, weights bool) ([]Mode, bool, error) {
	return latticeModes(ss.all, ss.bands, q, axis, weights)
}

func (ss *spin1StripeSpectrum) moments(q float64, axis QAxis) (float64, float64) {
	return latticeMoments(ss.all, q, axis)
}

func (ss *spin1StripeSpectrum) sound(h float64) (cpx, cmx, cy []float64) {
	return latticeSound(ss.all, h)
}

func (ss *spin1StripeSpectrum) effectiveMass() float64 { return math.NaN() }
