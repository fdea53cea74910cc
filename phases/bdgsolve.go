package phases

import (
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// bdgMode is one solution of the Bogoliubov–de Gennes problem at one
// momentum: frequency ω (E_R/ħ), growth rate Im ω ≥ 0 (0 for a real
// frequency) and the amplitudes Ψ = (u, v) in the basis of the caller.
type bdgMode struct {
	omega, growth float64
	psi           []complex128 // length 2n: u then v
	norm          float64      // Ψ†σ₃Ψ after normalisation: 1, or 0 for a complex or zero mode
}

// bdgSolver diagonalises σ₃ M Ψ = ω Ψ for a real symmetric M = [[A, Y],
// [Yᵀ, B]] of size 2n × 2n (σ₃ = diag(1…1, −1…−1)).
//
// When M is positive definite (an energetically stable state at this
// momentum) the problem is reduced to a symmetric one: with M = LLᵀ
// (Cholesky), σ₃M is similar to T = Lᵀσ₃L, all ω are real, the n positive
// eigenvalues of T are the modes and Ψ = σ₃Lz/√ω has Ψ†σ₃Ψ = 1 (the standard
// reduction; common practice, no source). This is accurate also for the
// small frequencies of phonons, because T is symmetric.
//
// Otherwise the non-symmetric problem is solved (gonum mat.Eigen). The modes
// are the real eigenvalues with positive norm Ψ†σ₃Ψ > 0, and one of each
// complex-conjugate pair (Im ω > imagTol: a dynamical instability, growth
// rate Im ω); real eigenvalues within zeroTol of 0 whose norm vanishes
// (|Ψ†σ₃Ψ| ≤ 1e-6 Ψ†Ψ: the Goldstone modes) come in pairs and give one mode
// each pair; a small eigenvalue with a finite norm (a soft mode away from
// q = 0, e.g. at a second band minimum) is an ordinary mode.
type bdgSolver struct {
	n                int
	imagTol, zeroTol float64
	chol             mat.Cholesky
	l, t, tmp        *mat.Dense
	es               mat.EigenSym
	ev               *mat.Dense
	eig              mat.Eigen
	gen              *mat.Dense
	cv               *mat.CDense
	landau           bool // the last solve found a positive-norm mode with ω < −zeroTol
	hermitian        bool // the last solve used the symmetric reduction
	modes            []bdgMode
	sym              *mat.SymDense
	tsym             *mat.SymDense
	eigvalBuf        []float64
}

func newBDGSolver(n int, imagTol, zeroTol float64) *bdgSolver {
	d := 2 * n
	return &bdgSolver{n: n, imagTol: imagTol, zeroTol: zeroTol,
		l: mat.NewDense(d, d, nil), t: mat.NewDense(d, d, nil), tmp: mat.NewDense(d, d, nil),
		ev: mat.NewDense(d, d, nil), gen: mat.NewDense(d, d, nil), cv: mat.NewCDense(d, d, nil),
		sym: mat.NewSymDense(d, nil), tsym: mat.NewSymDense(d, nil), eigvalBuf: make([]float64, d)}
}

// solve diagonalises the problem for M given as a dense row-major d×d slice
// (only its symmetric part is used) and returns the n modes sorted by Re ω.
func (s *bdgSolver) solve(m []float64) []bdgMode {
	d := 2 * s.n
	for i := 0; i < d; i++ {
		for j := i; j < d; j++ {
			s.sym.SetSym(i, j, 0.5*(m[i*d+j]+m[j*d+i]))
		}
	}
	s.modes = s.modes[:0]
	s.landau = false
	s.hermitian = false
	if s.chol.Factorize(s.sym) {
		var tri mat.TriDense
		s.chol.LTo(&tri)
		s.l.Copy(&tri)
		// tmp = σ₃ L
		s.tmp.Copy(s.l)
		for i := s.n; i < d; i++ {
			for j := 0; j < d; j++ {
				s.tmp.Set(i, j, -s.tmp.At(i, j))
			}
		}
		s.t.Mul(s.l.T(), s.tmp)
		for i := 0; i < d; i++ {
			for j := i; j < d; j++ {
				s.tsym.SetSym(i, j, 0.5*(s.t.At(i, j)+s.t.At(j, i)))
			}
		}
		if s.es.Factorize(s.tsym, true) {
			vals := s.es.Values(s.eigvalBuf)
			s.es.VectorsTo(s.ev)
			npos := 0
			for _, v := range vals {
				if v > 0 {
					npos++
				}
			}
			if npos == s.n {
				s.hermitian = true
				for k := d - s.n; k < d; k++ {
					w := vals[k]
					psi := make([]complex128, d)
					f := 1 / math.Sqrt(w)
					for i := 0; i < d; i++ {
						var x float64
						for j := 0; j < d; j++ {
							x += s.tmp.At(i, j) * s.ev.At(j, k)
						}
						psi[i] = complex(x*f, 0)
					}
					s.modes = append(s.modes, bdgMode{omega: w, psi: psi, norm: 1})
				}
				return s.finish()
			}
		}
	}
	// General (non-symmetric) path: σ₃M.
	for i := 0; i < d; i++ {
		sg := 1.0
		if i >= s.n {
			sg = -1
		}
		for j := 0; j < d; j++ {
			s.gen.Set(i, j, sg*s.sym.At(i, j))
		}
	}
	if !s.eig.Factorize(s.gen, mat.EigenRight) {
		return nil
	}
	vals := s.eig.Values(nil)
	s.eig.VectorsTo(s.cv)
	var zero []int
	for k, w := range vals {
		psi := make([]complex128, d)
		var nrm, tot float64
		for i := 0; i < d; i++ {
			psi[i] = s.cv.At(i, k)
			a := real(psi[i])*real(psi[i]) + imag(psi[i])*imag(psi[i])
			tot += a
			if i < s.n {
				nrm += a
			} else {
				nrm -= a
			}
		}
		switch {
		case imag(w) > s.imagTol:
			scale(psi, 1/math.Sqrt(tot))
			s.modes = append(s.modes, bdgMode{omega: real(w), growth: imag(w), psi: psi})
		case imag(w) < -s.imagTol:
		case math.Abs(real(w)) <= s.zeroTol && math.Abs(nrm) <= 1e-6*tot:
			zero = append(zero, k)
		case nrm > 0:
			scale(psi, 1/math.Sqrt(nrm))
			if real(w) < -s.zeroTol {
				s.landau = true
			}
			s.modes = append(s.modes, bdgMode{omega: real(w), psi: psi, norm: 1})
		}
	}
	for i := 0; i+1 < len(zero); i += 2 {
		k := zero[i]
		psi := make([]complex128, d)
		var tot float64
		for j := 0; j < d; j++ {
			psi[j] = s.cv.At(j, k)
			tot += real(psi[j])*real(psi[j]) + imag(psi[j])*imag(psi[j])
		}
		scale(psi, 1/math.Sqrt(tot))
		s.modes = append(s.modes, bdgMode{omega: 0, psi: psi})
	}
	return s.finish()
}

// finish sorts the modes by Re ω and fixes the phase of each: the
// largest-modulus component of Ψ = (u, v) is made real and positive.
func (s *bdgSolver) finish() []bdgMode {
	sort.SliceStable(s.modes, func(i, j int) bool { return s.modes[i].omega < s.modes[j].omega })
	for k := range s.modes {
		psi := s.modes[k].psi
		best, bi := -1.0, 0
		for i, c := range psi {
			if a := cmplx.Abs(c); a > best*(1+1e-9) {
				best, bi = a, i
			}
		}
		if best > 0 {
			ph := cmplx.Conj(psi[bi]) / complex(best, 0)
			for i := range psi {
				psi[i] *= ph
			}
		}
	}
	return s.modes
}

func scale(v []complex128, f float64) {
	for i := range v {
		v[i] *= complex(f, 0)
	}
}
