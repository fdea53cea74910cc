package gpe

import (
	"math"
	"math/cmplx"
	"testing"

	"socmap/gpe/fft"
)

// Zero-padding in k interpolates a band-limited state exactly (the
// trigonometric interpolant, common practice, no source): a sum of a few
// Fourier modes given on a coarse grid is reproduced on the fine grid at
// every point, and truncation back onto the coarse grid returns it.
func TestResampleBandLimited(t *testing.T) {
	for _, sh := range [][2][]int{{{16}, {64}}, {{16, 8}, {32, 16}}, {{8, 16, 8}, {16, 32, 16}}} {
		L := []float64{7, 5, 3}[:len(sh[0])]
		c, f := MustGrid(sh[0], L), MustGrid(sh[1], L)
		val := func(g *Grid, idx, comp int) complex128 {
			i, j, l := g.Coords(idx)
			x := [3]float64{g.X[0][i], g.X[1][j], g.X[2][l]}
			v := complex(0.3, 0.1*float64(comp))
			for a := 0; a < g.Dim; a++ {
				k := 2 * math.Pi / g.L[a]
				v += complex(1+float64(a), 0)*cmplx.Exp(complex(0, k*x[a])) + complex(0, 0.5)*cmplx.Exp(complex(0, -3*k*x[a]))
			}
			return v
		}
		st := NewState(c)
		for comp := 0; comp < 2; comp++ {
			for i := range st.Psi[comp] {
				st.Psi[comp][i] = val(c, i, comp)
			}
		}
		for _, b := range []fft.Backend{fft.FFTW, fft.Gonum} {
			if b == fft.FFTW && !fft.FFTWAvailable {
				continue
			}
			fine, err := resample(st, f, b)
			if err != nil {
				t.Fatal(err)
			}
			back, err := resample(fine, c, b)
			if err != nil {
				t.Fatal(err)
			}
			for comp := 0; comp < 2; comp++ {
				for i, v := range fine.Psi[comp] {
					if d := cmplx.Abs(v - val(f, i, comp)); d > 1e-12 {
						t.Fatalf("%v → %v (%v): fine point %d: %v, want %v", sh[0], sh[1], b, i, v, val(f, i, comp))
					}
				}
				for i, v := range back.Psi[comp] {
					if d := cmplx.Abs(v - st.Psi[comp][i]); d > 1e-12 {
						t.Fatalf("%v (%v): back on the coarse grid, point %d: %v, want %v", sh[0], b, i, v, st.Psi[comp][i])
					}
				}
			}
		}
	}
}

// The coarse grid halves the axes that stay well resolved (k_max ≥
// CoarseKMax), and only when there are none those that keep CoarseKMin.
func TestCoarseGrid(t *testing.T) {
	g := MustGrid([]int{64, 64, 64}, []float64{45, 22.5, 15})
	want := [][3]int{{64, 32, 32}, {64, 32, 16}, {32, 16, 16}}
	for i, w := range want {
		g = coarseGrid(g)
		if g == nil || g.N != w {
			t.Fatalf("level %d: %v, want %v", i+1, g, w)
		}
	}
	if c := coarseGrid(g); c != nil {
		t.Errorf("level 4: %v, want none", c.N)
	}
	if c := coarseGrid(MustGrid([]int{256}, []float64{169.4})); c == nil || c.N[0] != 128 {
		t.Errorf("1D 256 points over 169.4: %v, want 128 (k_max 2.37 ≥ %g)", c, CoarseKMin)
	}
}
