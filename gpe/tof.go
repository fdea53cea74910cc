package gpe

import (
	"math"
	"math/cmplx"
	"sort"

	"socmap/gpe/fft"
)

// Release and detection helpers on a State of the real-time evolution.

// TOFMomentum returns the momentum distribution along x of each spin
// component after the coupling is switched off and a Stern–Gerlach gradient
// separates the components: atoms of component σ fly with their mechanical
// momentum q = k_x − σκ (σ = +1 for ↑, −1 for ↓; the gauge of
// RTHamiltonian), so a long time of flight t maps q to the position
// x = ħq t/m (= 2qt in units ħ = 1, m = 1/2). Q is ascending; W[σ][i] is the
// fraction of all atoms of component σ at Q[σ][i] (summed over k_⊥).
func TOFMomentum(st *State, kappa float64) (Q, W [2][]float64, err error) {
	g := st.Grid
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		return Q, W, err
	}
	defer tr.Close()
	buf := fft.Aligned(g.Size)
	inner := g.Size / g.N[0]
	tot := 0.0
	var marg [2][]float64
	for c := 0; c < 2; c++ {
		copy(buf, st.Psi[c])
		tr.Forward(buf)
		marg[c] = make([]float64, g.N[0])
		for idx, v := range buf {
			marg[c][idx/inner] += abs2(v)
			tot += abs2(v)
		}
	}
	order := make([]int, g.N[0])
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(a, b int) bool { return g.K[0][order[a]] < g.K[0][order[b]] })
	for c := 0; c < 2; c++ {
		sgn := 1.0 - 2*float64(c)
		Q[c], W[c] = make([]float64, g.N[0]), make([]float64, g.N[0])
		for i, j := range order {
			Q[c][i] = g.K[0][j] - sgn*kappa
			W[c][i] = marg[c][j] / tot
		}
	}
	return Q, W, nil
}

// DominantK returns |k_x| of the largest peak of the canonical momentum
// distribution (both components, summed over k_⊥), in k_ref: the stripe's
// density modulation is at 2k₁ with k₁ this value.
func DominantK(st *State) float64 {
	g := st.Grid
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		return 0
	}
	defer tr.Close()
	buf := fft.Aligned(g.Size)
	inner := g.Size / g.N[0]
	marg := make([]float64, g.N[0])
	for c := 0; c < 2; c++ {
		copy(buf, st.Psi[c])
		tr.Forward(buf)
		for idx, v := range buf {
			marg[idx/inner] += abs2(v)
		}
	}
	best, k := -1.0, 0.0
	for i, w := range marg {
		if w > best {
			best, k = w, math.Abs(g.K[0][i])
		}
	}
	return k
}

// BraggFraction returns |ñ(2k₁)|²/ñ(0)² of a density profile n(x) (equally
// spaced x), ñ(q) = Σ n e^{−iqx}: the fraction of the light coherently
// scattered by the cloud that a density grating of wavenumber 2k₁ diffracts
// into the Bragg order, relative to the forward peak ((C/2)² for
// n ∝ 1 + C cos 2k₁x; the structure-factor picture of light scattering,
// common practice, no source). Envelope also returns the same for the
// profile low-passed below k₁ (the stripe removed): the reference of a
// plane-wave cloud with the same envelope.
func BraggFraction(x, n []float64, k1 float64) (stripe, envelope float64) {
	if k1 == 0 {
		return 0, 0
	}
	ft := func(d []float64, q float64) complex128 {
		var s complex128
		for i := range d {
			s += complex(d[i], 0) * cmplx.Rect(1, -q*x[i])
		}
		return s
	}
	n0 := real(ft(n, 0))
	if n0 == 0 {
		return 0, 0
	}
	stripe = math.Pow(cmplx.Abs(ft(n, 2*k1))/n0, 2)
	// Low-pass: Gaussian smoothing with σ = 1.5/k₁ (transfer at 2k₁
	// e^{−4.5}² ≈ 1e-4 of the modulation power… reduced further by the
	// squared ratio).
	dx := x[1] - x[0]
	s := 1.5 / k1
	r := int(math.Ceil(5 * s / dx))
	env := make([]float64, len(n))
	for i := range n {
		var a, w float64
		for j := -r; j <= r; j++ {
			if i+j < 0 || i+j >= len(n) {
				continue
			}
			u := float64(j) * dx / s
			k := math.Exp(-u * u / 2)
			a += k * n[i+j]
			w += k
		}
		env[i] = a / w
	}
	envelope = math.Pow(cmplx.Abs(ft(env, 2*k1))/real(ft(env, 0)), 2)
	return stripe, envelope
}

// MaxOverlap returns max |⟨T b, a⟩|²/(⟨a,a⟩⟨b,b⟩) over the translations T
// of b along x by |s| ≤ maxShift (grid multiples; periodic) and over b and
// its mirror image σ_x·P (x → −x with the spin components swapped, the
// symmetry k → −k of h at δ = 0 and equal couplings): the overlap of a with
// the degenerate family of b (a stripe's position and the ±k₁ choice of a
// plane wave are not fixed by the energy). a, b on the same grid.
func MaxOverlap(a, b *State, maxShift float64) (float64, error) {
	g := a.Grid
	tr, err := fft.New(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		return 0, err
	}
	defer tr.Close()
	na, nb := 0.0, 0.0
	for c := 0; c < 2; c++ {
		for i := range a.Psi[c] {
			na += abs2(a.Psi[c][i])
			nb += abs2(b.Psi[c][i])
		}
	}
	if na == 0 || nb == 0 {
		return 0, nil
	}
	inner := g.Size / g.N[0]
	fa := [2][]complex128{fft.Aligned(g.Size), fft.Aligned(g.Size)}
	for c := 0; c < 2; c++ {
		copy(fa[c], a.Psi[c])
		tr.Forward(fa[c])
	}
	fb := fft.Aligned(g.Size)
	acc := fft.Aligned(g.Size)
	best := 0.0
	for mirror := 0; mirror < 2; mirror++ {
		for i := range acc {
			acc[i] = 0
		}
		for c := 0; c < 2; c++ {
			src := b.Psi[c]
			if mirror == 1 {
				src = b.Psi[1-c]
			}
			for idx := range fb {
				if mirror == 1 {
					i := idx / inner
					fb[idx] = src[((g.N[0]-i)%g.N[0])*inner+idx%inner]
				} else {
					fb[idx] = src[idx]
				}
			}
			tr.Forward(fb)
			for i := range acc {
				acc[i] += cmplx.Conj(fb[i]) * fa[c][i]
			}
		}
		tr.Backward(acc) // acc[m·inner] = N Σ_j b*(j − m) a(j): shift by m·dx
		n := float64(g.Size)
		for i := 0; i < g.N[0]; i++ {
			m := i
			if 2*i > g.N[0] {
				m = i - g.N[0]
			}
			if math.Abs(float64(m)*g.Dx[0]) > maxShift {
				continue
			}
			v := abs2(acc[i*inner]) / (n * n) / (na * nb)
			best = math.Max(best, v)
		}
	}
	return best, nil
}
