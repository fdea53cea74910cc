package gpe

import (
	"math"
	"testing"
)

// TestAutoPointsRule: AutoPoints is the smallest power of two between the
// floor and the ceiling of its dimension with k_max = πn/L ≥ 4 k_R; at the
// ceiling the grid may be coarser, and ResolutionWarning says so.
func TestAutoPointsRule(t *testing.T) {
	for dim := 1; dim <= 3; dim++ {
		lo, hi := AutoPointsMin[dim], AutoPointsMax[dim]
		for _, L := range []float64{0.5, 8 * math.Pi, 100, 300, 502.7, 900, 5000} {
			n := AutoPoints(dim, L)
			if n < lo || n > hi || n&(n-1) != 0 {
				t.Errorf("dim %d, L %g: %d points outside [%d, %d] or not a power of two", dim, L, n, lo, hi)
				continue
			}
			kmax := math.Pi * float64(n) / L
			if n < hi && kmax < 4 {
				t.Errorf("dim %d, L %g: k_max = %g below 4 k_R under the ceiling", dim, L, kmax)
			}
			if n > lo && math.Pi*float64(n/2)/L >= 4 {
				t.Errorf("dim %d, L %g: %d points, half of them would do", dim, L, n)
			}
			g := MustGrid(ones(dim, n), fill(dim, L))
			if (kmax < 4) != (g.ResolutionWarning() != "") {
				t.Errorf("dim %d, L %g: k_max %g but warning %q", dim, L, kmax, g.ResolutionWarning())
			}
		}
	}
	if AutoPoints(0, 10) != 0 || AutoPoints(4, 10) != 0 {
		t.Error("dimension outside 1…3 accepted")
	}
	// The values the `ground` command has always used: 1D 256 … 1024, 2D
	// 64 … 256, 3D 32 … 128.
	for _, c := range []struct {
		dim  int
		L    float64
		want int
	}{{1, 8 * math.Pi, 256}, {1, 502.7, 1024}, {1, 5000, 1024}, {2, 30, 64}, {2, 100, 128}, {2, 300, 256}, {3, 20, 32}, {3, 90, 128}, {3, 500, 128}} {
		if n := AutoPoints(c.dim, c.L); n != c.want {
			t.Errorf("AutoPoints(%d, %g) = %d, want %d", c.dim, c.L, n, c.want)
		}
	}
}

// TestBoxMomentumAndLength: the first candidate of at least MinBoxMomentum
// sizes the box, else 1 k_R; the box is four wavelengths and admits ±k.
func TestBoxMomentumAndLength(t *testing.T) {
	for _, c := range []struct {
		in   []float64
		want float64
	}{{nil, 1}, {[]float64{0}, 1}, {[]float64{0.049}, 1}, {[]float64{-0.8}, 0.8}, {[]float64{0.01, 0.9}, 0.9}, {[]float64{0.3, 0.9}, 0.3}, {[]float64{0.01, 0.02}, 1}} {
		if k := BoxMomentum(c.in...); k != c.want {
			t.Errorf("BoxMomentum(%v) = %g, want %g", c.in, k, c.want)
		}
	}
	for _, k := range []float64{0.05, 0.37, 1, 0.9731} {
		L := AutoLength(k)
		if math.Abs(L*k/(2*math.Pi)-4) > 1e-12 {
			t.Errorf("k %g: L = %g is %g wavelengths", k, L, L*k/(2*math.Pi))
		}
		g := MustGrid([]int{AutoPoints(1, L)}, []float64{L})
		if d := math.Abs(g.SnapK(k) - k); d > 1e-12 {
			t.Errorf("k %g: box does not admit it (snapped %g)", k, g.SnapK(k))
		}
		if AutoTransverse(L) != L/2 {
			t.Error("transverse length")
		}
	}
}

func ones(n, v int) []int {
	o := make([]int, n)
	for i := range o {
		o[i] = v
	}
	return o
}

func fill(n int, v float64) []float64 {
	o := make([]float64, n)
	for i := range o {
		o[i] = v
	}
	return o
}
