package gpe

import (
	"math"
	"testing"
)

// TestExpNeg against math.Exp (the Go standard library).
func TestExpNeg(t *testing.T) {
	worst := 0.0
	for i := 0; i <= 200000; i++ {
		x := -745 + 1454*float64(i)/200000
		want := math.Exp(x)
		got := expNeg(x)
		if want == 0 || want < 1e-300 {
			if got > 1e-300 {
				t.Fatalf("expNeg(%g) = %g, want ~0", x, got)
			}
			continue
		}
		worst = math.Max(worst, math.Abs(got/want-1))
	}
	if worst > 2e-15 {
		t.Errorf("expNeg relative error %.1e", worst)
	}
	for _, y := range []float64{0, 1e-8, 0.1, 0.3, 0.4999, 0.5, 0.5001, 1, 3, 20} {
		c, sc := coshSinhc(y * y)
		wc, ws := math.Cosh(y), 1.0
		if y > 0 {
			ws = math.Sinh(y) / y
		}
		if math.Abs(c/wc-1) > 4e-15 || math.Abs(sc/ws-1) > 4e-15 {
			t.Errorf("coshSinhc(%g) = %v, %v; want %v, %v", y, c, sc, wc, ws)
		}
	}
}

// TestLocalSplitMatchesExpm: the closed-form local exponential equals the
// 2×2 matrix exponential computed by scaling and squaring of its Taylor
// series (common practice, no source), across the fast and general branches.
func TestLocalSplitMatchesExpm(t *testing.T) {
	g := MustGrid([]int{4}, []float64{1})
	for _, tau := range []float64{1e-4, 0.01, 0.05, 0.3, 2} {
		for _, par := range [][4]float64{{1, 0.3, 0.7, 0.2}, {4, -1, 0, 0}, {0, 0, 5, 0}, {0.2, 2, 1, 0.9}} {
			m := Model{Omega: par[0], Delta: par[1], Guu: par[2], Gdd: par[2] * 1.3, Gud: par[3], Norm: 1,
				Potential: Potential{Kind: Harmonic, AngularFreq: [3]float64{3}}}
			e, err := newEngine(g, m, perf{})
			if err != nil {
				t.Fatal(err)
			}
			in := [2][]complex128{{complex(0.3, 0.1), complex(0.5, -0.2), 1, complex(0, 0.4)}, {complex(0.1, 0.2), 0.7, complex(0.2, 0.2), complex(-0.6, 0.1)}}
			copy(e.psi[0], in[0])
			copy(e.psi[1], in[1])
			e.tau, e.scale = tau, 1
			e.localSplit(0, 4, &e.acc[0])
			for i := 0; i < 4; i++ {
				pu, pd := in[0][i], in[1][i]
				nu, nd := abs2(pu), abs2(pd)
				v := e.V[i]
				M := [2][2]complex128{
					{complex(v+m.Guu*nu+m.Gud*nd+m.Delta/2, 0), complex(m.Omega/2, 0)},
					{complex(m.Omega/2, 0), complex(v+m.Gdd*nd+m.Gud*nu-m.Delta/2, 0)}}
				E := expm2(M, -tau)
				wu := E[0][0]*pu + E[0][1]*pd
				wd := E[1][0]*pu + E[1][1]*pd
				scale := math.Sqrt(abs2(wu) + abs2(wd))
				if d := math.Sqrt(abs2(wu-e.psi[0][i])+abs2(wd-e.psi[1][i])) / scale; d > 1e-13 {
					t.Errorf("τ=%g %v point %d: closed form differs from expm by %.1e", tau, par, i, d)
				}
			}
			e.close()
		}
	}
}

// expm2 returns exp(c·M) by scaling and squaring with a 30-term Taylor series.
func expm2(M [2][2]complex128, c float64) [2][2]complex128 {
	s := 0
	nrm := 0.0
	for i := range M {
		for j := range M {
			nrm += abs2(M[i][j])
		}
	}
	for math.Sqrt(nrm)*math.Abs(c)/math.Pow(2, float64(s)) > 0.1 {
		s++
	}
	f := complex(c/math.Pow(2, float64(s)), 0)
	A := [2][2]complex128{{M[0][0] * f, M[0][1] * f}, {M[1][0] * f, M[1][1] * f}}
	R := [2][2]complex128{{1, 0}, {0, 1}}
	T := R
	for k := 1; k < 30; k++ {
		var N [2][2]complex128
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				N[i][j] = (T[i][0]*A[0][j] + T[i][1]*A[1][j]) / complex(float64(k), 0)
			}
		}
		T = N
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				R[i][j] += T[i][j]
			}
		}
	}
	for ; s > 0; s-- {
		var N [2][2]complex128
		for i := 0; i < 2; i++ {
			for j := 0; j < 2; j++ {
				N[i][j] = R[i][0]*R[0][j] + R[i][1]*R[1][j]
			}
		}
		R = N
	}
	return R
}
