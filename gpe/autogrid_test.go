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

// TestFFTSize: even sizes with prime factors 2, 3, 5 only, the smallest at
// or above the request.
func TestFFTSize(t *testing.T) {
	for _, c := range []struct{ min, max, want int }{
		{1, 100, 2}, {7, 100, 8}, {9, 100, 10}, {11, 100, 12}, {13, 100, 16}, {1025, 8192, 1080},
		{1081, 8192, 1152}, {641, 8192, 648}, {1000, 1000, 1000}, {1001, 1020, 0}, {8193, 8192, 0},
	} {
		if n := FFTSize(c.min, c.max); n != c.want {
			t.Errorf("FFTSize(%d, %d) = %d, want %d", c.min, c.max, n, c.want)
		}
	}
}

// TestResolveBox: resolved boxes keep the old rule (four wavelengths,
// power-of-two points); longer ones get FFT-friendly points up to the limit,
// then fewer wavelengths; given points or lengths are kept; a box that
// cannot resolve says so. Every automatic box admits ±k exactly.
func TestResolveBox(t *testing.T) {
	admits := func(b BoxAxis, k float64) bool {
		m := b.Length * k / (2 * math.Pi)
		return math.Abs(m-math.Round(m)) < 1e-9
	}
	for _, k := range []float64{1, 0.9731, 0.3, 0.1, 0.053, 0.05} {
		b := ResolveBox(1, k, 0, 0)
		L := AutoLength(k)
		if n := AutoPoints(1, L); math.Pi*float64(n)/L >= 4 && (b.Points != n || b.Length != L || b.Wavelengths != 4) {
			t.Errorf("k %g: %+v, the old rule gives %d points, L %g", k, b, n, L)
		}
		if !b.Resolved || b.KMax() < 4*(1-1e-12) || !admits(b, k) || b.Wavelengths != 4 {
			t.Errorf("1D k %g: %+v", k, b)
		}
	}
	// 2D: k = 0.05 needs L = 502.7 and 640 points (above the ceiling 256).
	if b := ResolveBox(2, 0.05, 0, 0); !b.Resolved || b.Points != 640 || b.Wavelengths != 4 {
		t.Errorf("2D k 0.05: %+v", b)
	}
	// 3D: the limit 256 gives L ≤ 201; k = 0.05 gets one wavelength (125.7).
	if b := ResolveBox(3, 0.05, 0, 0); !b.Resolved || b.Wavelengths != 1 || b.Points > AutoPointsLimit[3] || !admits(b, 0.05) {
		t.Errorf("3D k 0.05: %+v", b)
	}
	// Given points: the box is capped instead (the map point of Ω = 2.873,
	// G1 = 1, G2 = 0.2808 with 256 points had k_max = 1.7 k_R).
	b := ResolveBox(1, 0.053, 256, 0)
	if b.Points != 256 || !b.Resolved || b.Wavelengths != 1 || !admits(b, 0.053) {
		t.Errorf("256 points, k 0.053: %+v", b)
	}
	if b := ResolveBox(1, 0.05, 32, 0); b.Resolved || b.Points != 32 || b.KMax() >= 4 {
		t.Errorf("32 points, k 0.05: %+v", b)
	}
	// Given length: points raised up to the limit, else unresolved.
	if b := ResolveBox(1, 1, 0, 3000); !b.Resolved || b.Length != 3000 || b.Points != FFTSize(3820, 8192) {
		t.Errorf("L 3000: %+v", b)
	}
	if b := ResolveBox(1, 1, 0, 7000); b.Resolved || b.Points != AutoPointsLimit[1] {
		t.Errorf("L 7000: %+v", b)
	}
	if b := ResolveBox(1, 1, 256, 300); b.Resolved || b.Points != 256 || b.Length != 300 {
		t.Errorf("256 points, L 300: %+v", b)
	}
}
