package gpe

import (
	"context"
	"math"
	"math/big"
	"math/cmplx"
	"testing"

	"socmap/gpe/fft"
)

// normError returns |1 + f|² − 1 = 2 Re f + |f|² evaluated exactly (300-bit
// floats) for the float64 value f.
func normError(f complex128) float64 {
	nf := func(v float64) *big.Float { return new(big.Float).SetPrec(300).SetFloat64(v) }
	re, im := nf(real(f)), nf(real(f))
	im.SetFloat64(imag(f))
	a := new(big.Float).SetPrec(300).Mul(re, re)
	a.Add(a, new(big.Float).SetPrec(300).Mul(im, im))
	a.Add(a, new(big.Float).SetPrec(300).Add(re, re))
	v, _ := a.Float64()
	return v
}

// cisMinus1 against math.Sin (Go's math library, the reference here):
// e^{−ix} − 1 within 4e-16 over |x| ≤ 3 (the polynomial range |x| ≤ 2·cisMaxHalf and
// the fallback beyond it). Unitarity, evaluated exactly: |1 + (F − 1)|² − 1
// at most 3e-16 at any point of the polynomial range |x| ≤ 2·cisMaxHalf
// and, what decides the drift of the norm over many steps, a mean there
// below 2e-18 (logged beside that of the two-sine form it replaced; the
// factor is unitary by construction, so only its last roundings count).
func TestCisMinus1(t *testing.T) {
	worst, worstN, mean, old := 0.0, 0.0, 0.0, 0.0
	n := 0
	for i := -20000; i <= 20000; i++ {
		x := 3 * float64(i) / 20000 * (1 + 1e-3*math.Sin(float64(i)))
		f := cisMinus1(x)
		want := complex(-2*math.Pow(math.Sin(x/2), 2), -math.Sin(x))
		worst = math.Max(worst, cmplx.Abs(f-want))
		e := normError(f)
		if math.Abs(x) <= 2*cisMaxHalf {
			worstN = math.Max(worstN, math.Abs(e))
		}
		if math.Abs(x) <= 2*cisMaxHalf {
			mean += e
			old += normError(phaseMinus1(x))
			n++
		}
	}
	mean /= float64(n)
	old /= float64(n)
	if worst > 4e-16 {
		t.Errorf("cisMinus1: largest error %.2e, want ≤ 4e-16", worst)
	}
	if worstN > 3e-16 {
		t.Errorf("cisMinus1: |F|² − 1 up to %.2e, want ≤ 3e-16", worstN)
	}
	if math.Abs(mean) > 2e-18 {
		t.Errorf("cisMinus1: mean |F|² − 1 = %.2e, want |·| ≤ 2e-18", mean)
	}
	t.Logf("largest error %.2e; |F|² − 1: largest %.2e, mean %.2e (two-sine form: %.2e)", worst, worstN, mean, old)
	if cisMinus1(0) != 0 {
		t.Errorf("cisMinus1(0) = %v, want 0", cisMinus1(0))
	}
}

var sinkC complex128

// BenchmarkCisMinus1 and BenchmarkPhaseMinus1: the polynomial factor of the
// local pass against the two-sine form it replaced.
func BenchmarkCisMinus1(b *testing.B) {
	x := 0.0
	for i := 0; i < b.N; i++ {
		sinkC += cisMinus1(x)
		x += 1e-5
		if x > 0.5 {
			x = -0.5
		}
	}
}

func BenchmarkPhaseMinus1(b *testing.B) {
	x := 0.0
	for i := 0; i < b.N; i++ {
		sinkC += phaseMinus1(x)
		x += 1e-5
		if x > 0.5 {
			x = -0.5
		}
	}
}

// The passes of a step are pointwise or per component, so two goroutines
// give the same state as one, bit for bit (ramped κ: the KineticX path;
// then held: the KineticMinus1 path), and Evolve allocates nothing per
// step on either.
func TestRTWorkersSameResult(t *testing.T) {
	g := MustGrid([]int{128, 64}, []float64{60, 40})
	st, h := trappedMix(t, g)
	sched := func(tt float64) RTHamiltonian {
		x := h
		x.Omega = h.Omega * (1 + 0.5*math.Sin(tt))
		x.Kappa = 1 + 0.2*math.Sin(0.7*tt)
		return x
	}
	var out [2]*State
	for i, th := range []int{1, 2} {
		r, err := NewRealTime(st, RTSettings{EMax: RTMaxEnergy(g, h, 0.1), Threads: th})
		if err != nil {
			t.Fatal(err)
		}
		if r.Workers() != th {
			t.Fatalf("Threads %d: %d workers", th, r.Workers())
		}
		if _, err := r.Evolve(context.Background(), 40*r.Dt, sched); err != nil {
			t.Fatal(err)
		}
		if _, err := r.Evolve(context.Background(), 40*r.Dt, constH(h)); err != nil {
			t.Fatal(err)
		}
		held, ramped := constH(h), RTSchedule(sched)
		for _, c := range []struct {
			name string
			s    RTSchedule
		}{{"held", held}, {"ramped", ramped}} {
			if a := testing.AllocsPerRun(3, func() { r.Evolve(context.Background(), 5*r.Dt, c.s) }); a != 0 {
				t.Errorf("Threads %d, %s: %v allocations per Evolve of 5 steps, want 0", th, c.name, a)
			}
		}
		out[i] = r.State()
		r.Close()
	}
	for c := 0; c < 2; c++ {
		for j := range out[0].Psi[c] {
			if out[0].Psi[c][j] != out[1].Psi[c][j] {
				t.Fatalf("component %d, point %d: %v (1 worker) ≠ %v (2 workers)", c, j, out[0].Psi[c][j], out[1].Psi[c][j])
			}
		}
	}
}

// The local pass with its written-out polynomial and rotations equals,
// point by point, rotPure · (ψ + (F − 1)ψ with F − 1 from cisMinus1) ·
// rotPure, and within 1e-15 the plain complex form (two-sine phase, full
// complex SU(2) products), on phases inside and beyond the polynomial's
// range.
func TestLocalMatchesCisMinus1(t *testing.T) {
	g := MustGrid([]int{512}, []float64{40})
	st, err := NewStepper(g.Shape(), fft.Default, fft.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	v := make([]float64, g.Size)
	for i := range v {
		v[i] = 0.05 * g.X[0][i] * g.X[0][i]
		st.Psi[0][i] = cmplx.Rect(0.3+0.2*math.Cos(g.X[0][i]), 0.7*g.X[0][i])
		st.Psi[1][i] = cmplx.Rect(0.2+0.1*math.Sin(g.X[0][i]), -0.4*g.X[0][i])
	}
	up0 := append([]complex128(nil), st.Psi[0]...)
	dn0 := append([]complex128(nil), st.Psi[1]...)
	d := DiagonalPhase{Tau: 0.05, V: v, Guu: 3, Gdd: 2.5, Gud: 2}
	b, a := CouplingSU2(1.2, 0.3, 0.01), CouplingSU2(1.2, 0.3, 0.02)
	st.Local(b, &d, a)
	inRange, out := 0, 0
	bm, am := b.am1(), a.am1()
	for j := range up0 {
		u, w := rotPure(up0[j], dn0[j], real(bm), imag(bm), imag(b.B))
		// plain complex form
		pu, pw := up0[j]+(bm*up0[j]-cmplx.Conj(b.B)*dn0[j]), dn0[j]+(b.B*up0[j]+cmplx.Conj(bm)*dn0[j])
		nu, nd := abs2(u), abs2(w)
		xu, xd := d.Tau*(v[j]+d.Guu*nu+d.Gud*nd), d.Tau*(v[j]+d.Gdd*nd+d.Gud*nu)
		if math.Abs(xu) <= 2*cisMaxHalf && math.Abs(xd) <= 2*cisMaxHalf {
			inRange++
		} else {
			out++
		}
		u, w = u+u*cisMinus1(xu), w+w*cisMinus1(xd)
		u, w = rotPure(u, w, real(am), imag(am), imag(a.B))
		if st.Psi[0][j] != u || st.Psi[1][j] != w {
			t.Fatalf("point %d: (%v, %v), want (%v, %v)", j, st.Psi[0][j], st.Psi[1][j], u, w)
		}
		nu, nd = abs2(pu), abs2(pw)
		xu, xd = d.Tau*(v[j]+d.Guu*nu+d.Gud*nd), d.Tau*(v[j]+d.Gdd*nd+d.Gud*nu)
		pu, pw = pu+pu*phaseMinus1(xu), pw+pw*phaseMinus1(xd)
		pu, pw = pu+(am*pu-cmplx.Conj(a.B)*pw), pw+(a.B*pu+cmplx.Conj(am)*pw)
		if cmplx.Abs(u-pu) > 1e-15 || cmplx.Abs(w-pw) > 1e-15 {
			t.Errorf("point %d: differs from the plain complex form by %.2e, %.2e", j, cmplx.Abs(u-pu), cmplx.Abs(w-pw))
		}
	}
	if inRange == 0 || out == 0 {
		t.Fatalf("test phases: %d points in the polynomial range, %d beyond; want both", inRange, out)
	}
}
