package gpe

import (
	"math"
	"runtime"

	"socmap/gpe/fft"
)

// Pass codes dispatched by the worker pool.
const (
	opLocalSplit = iota // ψ ← exp(−τ L[s²n]) s ψ, sums: norm
	opScale             // ψ ← s ψ
	opKinSplit          // ψ̂ ← exp(−τK)/n ψ̂ (ψ holds its transform)
	opLocalH            // [ψ ← t(cψ + sσ p)] w ← L[ψ]ψ, hat ← ψ, sums: energies
	opKin1              // [ψ̂ ← t(cψ̂ + s q_s p̂)] sums: Σ K|ψ̂|²
	opK2                // r̂ = Kψ̂ + ŵ − μψ̂ (into w), sums for the projection
	opK34               // ĝ = P(r̂ − βψ̂), p̂ = −ĝ + b(p̂ − cψ̂), sums for the line
	opMoments           // x-space moments of ψ and q = σ·px along the line
	opCopyHat           // hat ← psi
	opFwdPsi            // FFT forward of psi[w] (pair)
	opBwdPsi            // FFT backward of psi[w] (pair)
	opFwdHat            // FFT forward of hat[w] (pair)
	opFwdW              // FFT forward of w[w] (pair)
	opBwdP              // FFT backward of px[w] (pair)
)

// Accumulator slots (per worker, padded against false sharing).
const accN = 48

const (
	sNorm = iota
	sPot
	sRabi
	sDet
	sInt
	sIntUU
	sIntDD
	sIntUD
	sNormUp
	sNormDn
	sLocalEnd
)

// Settings of the engine that concern performance only.
type perf struct {
	threads  int         // worker goroutines for pointwise passes and FFT pairs
	backend  fft.Backend // FFT backend
	fftMode  FFTMode
	parallel int // grids with fewer points run on one goroutine
}

// FFTMode selects how the two components are transformed on several cores.
type FFTMode int

const (
	// FFTAuto: FFTPairs on grids of at least ParallelMin points, else serial.
	FFTAuto FFTMode = iota
	// FFTSerial: one single-threaded transform after the other.
	FFTSerial
	// FFTPairs: the two components transformed at once on two goroutines,
	// each transform single-threaded.
	FFTPairs
	// FFTThreads: one transform after the other, each using FFTW threads.
	FFTThreads
)

// engine holds the buffers, tables and plans of one solve. Nothing is
// allocated after newEngine.
type engine struct {
	g    *Grid
	m    Model
	n    int
	dV   float64
	tr   [2]fft.Transform
	pool *pool
	nw   int
	pair bool

	V   []float64 // nil without potential
	kin [2][]float64
	ek  [2][]float64 // exp(−τK)/n for the split step
	ekT float64      // τ of ek

	psi, hat, w, px, pk, gk [2][]complex128

	phase []float64 // 3·N_x scratch of phaseStep (harmonic trap only)

	acc   [][accN]float64
	sum   [accN]float64
	k2sum [9]float64 // the sums of the last opK2

	// pass parameters
	tau, scale       float64
	upd              bool    // opLocalH/opKin1 first apply the update
	copyHat          bool    // opLocalH copies ψ to hat
	cgSums           bool    // opK2 also accumulates the finisher's sums
	kinSum           float64 // Σ K|ψ̂|² from the last opKin1
	uc, us, ut, usig float64 // update: ψ ← ut(uc ψ + us·usig·px), ψ̂ ← ut(uc ψ̂ + us·uqs·p̂)
	uqs              float64
	mu, beta, alpha  float64
	bpr, cproj       float64
	sig              float64 // q = sig·px in the moments pass
}

func newEngine(g *Grid, m Model, pf perf) (*engine, error) {
	e := &engine{g: g, m: m, n: g.Size, dV: g.DV}
	th := pf.threads
	if th <= 0 {
		th = runtime.GOMAXPROCS(0)
	}
	if pf.parallel <= 0 {
		pf.parallel = ParallelMin
	}
	if e.n < pf.parallel {
		th = 1
	}
	if th > 8 {
		th = 8
	}
	mode := pf.fftMode
	if mode == FFTAuto {
		mode = FFTSerial
		if th > 1 {
			mode = FFTPairs
		}
	}
	fthreads := 1
	switch mode {
	case FFTPairs:
		if th < 2 {
			th = 2
		}
		e.pair = true
	case FFTThreads:
		fthreads = th
	}
	e.nw = th
	for c := 0; c < 2; c++ {
		t, err := fft.New(g.Shape(), pf.backend, fft.Options{Threads: fthreads})
		if err != nil {
			e.close()
			return nil, err
		}
		e.tr[c] = t
	}
	for c := 0; c < 2; c++ {
		e.psi[c] = fft.Aligned(e.n)
		e.hat[c] = fft.Aligned(e.n)
		e.w[c] = fft.Aligned(e.n)
		e.px[c] = fft.Aligned(e.n)
		e.pk[c] = fft.Aligned(e.n)
		e.gk[c] = fft.Aligned(e.n)
		e.kin[c] = make([]float64, e.n)
		e.ek[c] = make([]float64, e.n)
	}
	e.ekT = math.NaN()
	e.alpha = 1
	sz := [2]float64{+1, -1} // σ_z of ↑, ↓
	if m.Potential.Kind != NoPotential {
		e.V = make([]float64, e.n)
	}
	if m.Potential.Kind == Harmonic {
		e.phase = make([]float64, 3*g.N[0])
	}
	for idx := 0; idx < e.n; idx++ {
		i, j, l := g.Coords(idx)
		kx, ky, kz := g.K[0][i], g.K[1][j], g.K[2][l]
		for c := 0; c < 2; c++ {
			d := kx - sz[c]
			e.kin[c][idx] = d*d + ky*ky + kz*kz
		}
		if e.V != nil {
			e.V[idx] = m.Potential.At(g.X[0][i], g.X[1][j], g.X[2][l])
		}
	}
	e.acc = make([][accN]float64, e.nw)
	e.pool = newPool(e.nw, e.run)
	return e, nil
}

// ParallelMin is the grid size from which pointwise passes and the two
// components' FFTs are spread over goroutines (a choice: the hand-off costs
// a few microseconds, comparable to a pass over a few thousand points).
const ParallelMin = 8192

func (e *engine) close() {
	if e.pool != nil {
		e.pool.close()
		e.pool = nil
	}
	for c := range e.tr {
		if e.tr[c] != nil {
			e.tr[c].Close()
			e.tr[c] = nil
		}
	}
}

// reduce runs op over the grid and sums the per-worker accumulators into
// e.sum[0:k].
func (e *engine) reduce(op, k int) {
	for w := range e.acc {
		for i := 0; i < k; i++ {
			e.acc[w][i] = 0
		}
	}
	e.pool.do(op, e.n)
	for i := 0; i < k; i++ {
		s := 0.0
		for w := range e.acc {
			s += e.acc[w][i]
		}
		e.sum[i] = s
	}
}

// fftPair transforms both components with op (one of opFwd*/opBwd*).
func (e *engine) fftPair(op int) {
	if e.pair {
		e.pool.pair(op)
		return
	}
	e.run(job{op: op, w: 0})
	e.run(job{op: op, w: 1})
}

func (e *engine) run(j job) {
	switch j.op {
	case opFwdPsi:
		e.tr[j.w].Forward(e.psi[j.w])
	case opBwdPsi:
		e.tr[j.w].Backward(e.psi[j.w])
	case opFwdHat:
		e.tr[j.w].Forward(e.hat[j.w])
	case opFwdW:
		e.tr[j.w].Forward(e.w[j.w])
	case opBwdP:
		e.tr[j.w].Backward(e.px[j.w])
	case opLocalSplit:
		e.localSplit(j.lo, j.hi, &e.acc[j.w])
	case opScale:
		s := complex(e.scale, 0)
		u, d := e.psi[0][j.lo:j.hi], e.psi[1][j.lo:j.hi]
		for i := range u {
			u[i] *= s
			d[i] *= s
		}
	case opKinSplit:
		e.kinSplit(j.lo, j.hi, &e.acc[j.w])
	case opLocalH:
		e.localH(j.lo, j.hi, &e.acc[j.w])
	case opKin1:
		e.kin1(j.lo, j.hi, &e.acc[j.w])
	case opK2:
		e.k2(j.lo, j.hi, &e.acc[j.w])
	case opK34:
		e.k34(j.lo, j.hi, &e.acc[j.w])
	case opMoments:
		e.moments(j.lo, j.hi, &e.acc[j.w])
	case opCopyHat:
		copy(e.hat[0][j.lo:j.hi], e.psi[0][j.lo:j.hi])
		copy(e.hat[1][j.lo:j.hi], e.psi[1][j.lo:j.hi])
	}
}

func abs2(z complex128) float64 { return real(z)*real(z) + imag(z)*imag(z) }

// localSplit applies the closed-form exponential of the local 2×2 operator
//
//	M = [[d↑ + δ/2, Ω/2], [Ω/2, d↓ − δ/2]],  d↑ = V + g↑↑n↑ + g↑↓n↓, d↓ = V + g↓↓n↓ + g↑↓n↑,
//
// written M = a·1 + b_z σ_z + b_x σ_x, b = √(b_z² + b_x²):
//
//	exp(−τM) = e^{−τa} [cosh(τb) − sinh(τb)/b (b_z σ_z + b_x σ_x)]
//
// (Pauli-matrix identity, common practice, no source), with the densities
// taken after the pending scale s. Accumulates Σ|ψ|² of the result.
func (e *engine) localSplit(lo, hi int, acc *[accN]float64) {
	m := &e.m
	tau, s := e.tau, e.scale
	guu, gdd, gud := m.Guu*s*s, m.Gdd*s*s, m.Gud*s*s
	bx := m.Omega / 2
	hd := m.Delta / 2
	tbx2 := tau * tau * bx * bx
	u, d := e.psi[0][lo:hi], e.psi[1][lo:hi]
	d = d[:len(u)]
	var V []float64
	if e.V != nil {
		V = e.V[lo:hi]
		V = V[:len(u)]
	}
	norm := 0.0
	for i := range u {
		ur, ui := real(u[i]), imag(u[i])
		dr, di := real(d[i]), imag(d[i])
		nu := ur*ur + ui*ui // densities before the pending scale s
		nd := dr*dr + di*di
		v := 0.0
		if V != nil {
			v = V[i]
		}
		du := v + guu*nu + gud*nd + hd
		dd := v + gdd*nd + gud*nu - hd
		a := (du + dd) * 0.5
		bz := (du - dd) * 0.5
		y2 := tau*tau*bz*bz + tbx2
		x := -tau * a
		var ch, shc, ea float64
		if y2 <= 0.0025 && x <= 0.0625 && x >= -0.0625 {
			// the usual case of small steps: short inline Estrin forms of
			// coshSinhc (to y⁸, truncation < 3e-20) and expNeg (to x⁸,
			// truncation < 1e-16)
			z2 := y2 * y2
			ch = (1 + y2*0.5) + z2*((1.0/24+y2*(1.0/720))+z2*(1.0/40320))
			shc = (1 + y2*(1.0/6)) + z2*((1.0/120+y2*(1.0/5040))+z2*(1.0/362880))
			x2 := x * x
			x4 := x2 * x2
			ea = ((1 + x) + x2*(0.5+x*(1.0/6))) + x4*((1.0/24+x*(1.0/120))+x2*(1.0/720+x*(1.0/5040))) +
				x4*x4*(1.0/40320)
		} else {
			ch, shc = coshSinhc(y2)
			ea = expNeg(x)
		}
		es := ea * s // the pending renormalisation
		c0 := es * ch
		c1 := es * tau * shc // s e^{−τa} sinh(τb)/b
		cu := c0 - c1*bz
		cd := c0 + c1*bz
		cx := -c1 * bx
		our, oui := cu*ur+cx*dr, cu*ui+cx*di
		odr, odi := cx*ur+cd*dr, cx*ui+cd*di
		u[i] = complex(our, oui)
		d[i] = complex(odr, odi)
		norm += our*our + oui*oui + odr*odr + odi*odi
	}
	acc[sNorm] += norm
}

// kinSplit multiplies ψ̂ by exp(−τK)/n and accumulates Σ|ψ̂|² of the result
// (the x-space norm after the backward transform is n times it).
func (e *engine) kinSplit(lo, hi int, acc *[accN]float64) {
	u, d := e.psi[0][lo:hi], e.psi[1][lo:hi]
	ku, kd := e.ek[0][lo:hi], e.ek[1][lo:hi]
	s := 0.0
	for i := range u {
		a := u[i] * complex(ku[i], 0)
		b := d[i] * complex(kd[i], 0)
		u[i], d[i] = a, b
		s += abs2(a) + abs2(b)
	}
	acc[0] += s
}

// localH computes w = L[ψ]ψ, the local part of the GP operator
// (V + interactions, Rabi, detuning) applied to ψ, copies ψ to hat for the
// following transform, and accumulates the local energy sums. With e.upd it
// first replaces ψ by ut·(uc ψ + us·usig·px).
func (e *engine) localH(lo, hi int, acc *[accN]float64) {
	m := &e.m
	hx := complex(m.Omega/2, 0)
	hd := m.Delta / 2
	u, d := e.psi[0][lo:hi], e.psi[1][lo:hi]
	wu, wd := e.w[0][lo:hi], e.w[1][lo:hi]
	var hu, hdn []complex128
	if e.copyHat {
		hu, hdn = e.hat[0][lo:hi], e.hat[1][lo:hi]
	}
	var qu, qd []complex128
	var a0, a1 complex128
	if e.upd {
		qu, qd = e.px[0][lo:hi], e.px[1][lo:hi]
		a0 = complex(e.ut*e.uc, 0)
		a1 = complex(e.ut*e.us*e.usig, 0)
	}
	var V []float64
	if e.V != nil {
		V = e.V[lo:hi]
	}
	var sNu, sNd, sPotv, sRab, sUU, sDD, sUD float64
	for i := range u {
		pu, pd := u[i], d[i]
		if qu != nil {
			pu = a0*pu + a1*qu[i]
			pd = a0*pd + a1*qd[i]
			u[i], d[i] = pu, pd
		}
		if hu != nil {
			hu[i], hdn[i] = pu, pd
		}
		nu, nd := abs2(pu), abs2(pd)
		v := 0.0
		if V != nil {
			v = V[i]
			sPotv += v * (nu + nd)
		}
		du := v + m.Guu*nu + m.Gud*nd + hd
		dd := v + m.Gdd*nd + m.Gud*nu - hd
		wu[i] = complex(du, 0)*pu + hx*pd
		wd[i] = hx*pu + complex(dd, 0)*pd
		sNu += nu
		sNd += nd
		sRab += real(pu)*real(pd) + imag(pu)*imag(pd)
		sUU += nu * nu
		sDD += nd * nd
		sUD += nu * nd
	}
	acc[sNormUp] += sNu
	acc[sNormDn] += sNd
	acc[sPot] += sPotv
	acc[sRabi] += sRab
	acc[sIntUU] += sUU
	acc[sIntDD] += sDD
	acc[sIntUD] += sUD
}

// kin1: optional k-space update ψ̂ ← ut(uc ψ̂ + us·uqs·p̂); accumulates
// Σ K|ψ̂|² (slot 0) and Σ|ψ̂|² (slot 1).
func (e *engine) kin1(lo, hi int, acc *[accN]float64) {
	var sk, sn float64
	a0 := complex(e.ut*e.uc, 0)
	a1 := complex(e.ut*e.us*e.uqs, 0)
	for c := 0; c < 2; c++ {
		h := e.hat[c][lo:hi]
		k := e.kin[c][lo:hi]
		if e.upd {
			p := e.pk[c][lo:hi]
			for i := range h {
				h[i] = a0*h[i] + a1*p[i]
			}
		}
		for i := range h {
			a := abs2(h[i])
			sk += k[i] * a
			sn += a
		}
	}
	acc[0] += sk
	acc[1] += sn
}

// k2: r̂ = Kψ̂ + ŵ − μψ̂ into w; sums: 0 Σ|r̂|², 1 Re Σ ψ̂* P r̂, 2 Σ P|ψ̂|²,
// 3 Re Σ ψ̂* r̂ (should vanish); with e.cgSums also 4 Σ P|r̂|²,
// 5 Re⟨r̂,ĝ_old⟩, 6 Re⟨ψ̂,p̂_old⟩, 7 Re⟨r̂,p̂_old⟩, 8 Σ|ψ̂|² (everything the
// finisher needs before its fused direction pass).
func (e *engine) k2(lo, hi int, acc *[accN]float64) {
	var s0, s1, s2, s3, s4, s5, s6, s7, s8 float64
	mu, al := e.mu, e.alpha
	for c := 0; c < 2; c++ {
		h, w, k := e.hat[c][lo:hi], e.w[c][lo:hi], e.kin[c][lo:hi]
		w = w[:len(h)]
		k = k[:len(h)]
		if !e.cgSums {
			for i := range h {
				r := complex(k[i]-mu, 0)*h[i] + w[i]
				w[i] = r
				p := 1 / (al + k[i])
				s0 += abs2(r)
				pr := real(h[i])*real(r) + imag(h[i])*imag(r)
				s1 += p * pr
				s2 += p * abs2(h[i])
				s3 += pr
			}
			continue
		}
		g, q := e.gk[c][lo:hi], e.pk[c][lo:hi]
		g = g[:len(h)]
		q = q[:len(h)]
		for i := range h {
			r := complex(k[i]-mu, 0)*h[i] + w[i]
			w[i] = r
			p := 1 / (al + k[i])
			rr := abs2(r)
			s0 += rr
			pr := real(h[i])*real(r) + imag(h[i])*imag(r)
			s1 += p * pr
			hh := abs2(h[i])
			s2 += p * hh
			s3 += pr
			s4 += p * rr
			s5 += real(r)*real(g[i]) + imag(r)*imag(g[i])
			s6 += real(h[i])*real(q[i]) + imag(h[i])*imag(q[i])
			s7 += real(r)*real(q[i]) + imag(r)*imag(q[i])
			s8 += hh
		}
	}
	acc[0] += s0
	acc[1] += s1
	acc[2] += s2
	acc[3] += s3
	acc[4] += s4
	acc[5] += s5
	acc[6] += s6
	acc[7] += s7
	acc[8] += s8
}

// k34: the fused direction pass: ĝ = P(r̂ − βψ̂) into gk, then
// p̂ = −ĝ + bpr(p̂_old − cproj ψ̂) into pk and px; sums: 0 Σ|p̂|²,
// 1 Re Σ ψ̂* K p̂, 2 Σ K|p̂|², 3 Re⟨r̂,p̂⟩, 4 Re⟨ψ̂,p̂⟩.
func (e *engine) k34(lo, hi int, acc *[accN]float64) {
	var s0, s1, s2, s3, s4 float64
	be, al := complex(e.beta, 0), e.alpha
	b, cp := complex(e.bpr, 0), complex(e.cproj, 0)
	for c := 0; c < 2; c++ {
		h, r, k := e.hat[c][lo:hi], e.w[c][lo:hi], e.kin[c][lo:hi]
		g, p, x := e.gk[c][lo:hi], e.pk[c][lo:hi], e.px[c][lo:hi]
		r, k, g, p, x = r[:len(h)], k[:len(h)], g[:len(h)], p[:len(h)], x[:len(h)]
		for i := range h {
			ng := (r[i] - be*h[i]) * complex(1/(al+k[i]), 0)
			g[i] = ng
			np := -ng + b*(p[i]-cp*h[i])
			p[i] = np
			x[i] = np
			s0 += abs2(np)
			hp := real(h[i])*real(np) + imag(h[i])*imag(np)
			s1 += k[i] * hp
			s2 += k[i] * abs2(np)
			s3 += real(r[i])*real(np) + imag(r[i])*imag(np)
			s4 += hp
		}
	}
	acc[0] += s0
	acc[1] += s1
	acc[2] += s2
	acc[3] += s3
	acc[4] += s4
}

// Moment slots.
const (
	mVa = iota // Σ V a, V b, V d (a = |ψ|², b = 2Re ψ*q, d = |q|², summed over components)
	mVb
	mVd
	mRa // Σ Re ψ↑*ψ↓, Re(ψ↑*q↓ + q↑*ψ↓), Re q↑*q↓
	mRb
	mRd
	mZa // Σ (a↑ − a↓), …
	mZb
	mZd
	mNa // Σ (a↑ + a↓), …
	mNb
	mNd
	mUU  // 6: aa ab ad bb bd dd (↑↑)
	mDD  = mUU + 6
	mUD  = mDD + 6 // 9: x↑ y↓ for x, y in a, b, d
	mEnd = mUD + 9
)

func (e *engine) moments(lo, hi int, acc *[accN]float64) {
	sg := complex(e.sig, 0)
	u, d := e.psi[0][lo:hi], e.psi[1][lo:hi]
	qu0, qd0 := e.px[0][lo:hi], e.px[1][lo:hi]
	var V []float64
	if e.V != nil {
		V = e.V[lo:hi]
	}
	var s [mEnd]float64
	for i := range u {
		pu, pd := u[i], d[i]
		qu, qd := sg*qu0[i], sg*qd0[i]
		au, ad := abs2(pu), abs2(pd)
		bu := 2 * (real(pu)*real(qu) + imag(pu)*imag(qu))
		bd := 2 * (real(pd)*real(qd) + imag(pd)*imag(qd))
		du, dd := abs2(qu), abs2(qd)
		if V != nil {
			v := V[i]
			s[mVa] += v * (au + ad)
			s[mVb] += v * (bu + bd)
			s[mVd] += v * (du + dd)
		}
		s[mRa] += real(pu)*real(pd) + imag(pu)*imag(pd)
		s[mRb] += real(pu)*real(qd) + imag(pu)*imag(qd) + real(qu)*real(pd) + imag(qu)*imag(pd)
		s[mRd] += real(qu)*real(qd) + imag(qu)*imag(qd)
		s[mZa] += au - ad
		s[mZb] += bu - bd
		s[mZd] += du - dd
		s[mNa] += au + ad
		s[mNb] += bu + bd
		s[mNd] += du + dd
		s[mUU+0] += au * au
		s[mUU+1] += au * bu
		s[mUU+2] += au * du
		s[mUU+3] += bu * bu
		s[mUU+4] += bu * du
		s[mUU+5] += du * du
		s[mDD+0] += ad * ad
		s[mDD+1] += ad * bd
		s[mDD+2] += ad * dd
		s[mDD+3] += bd * bd
		s[mDD+4] += bd * dd
		s[mDD+5] += dd * dd
		s[mUD+0] += au * ad
		s[mUD+1] += au * bd
		s[mUD+2] += au * dd
		s[mUD+3] += bu * ad
		s[mUD+4] += bu * bd
		s[mUD+5] += bu * dd
		s[mUD+6] += du * ad
		s[mUD+7] += du * bd
		s[mUD+8] += du * dd
	}
	for k := range s {
		acc[k] += s[k]
	}
}
