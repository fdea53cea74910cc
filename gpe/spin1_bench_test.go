package gpe

import (
	"testing"

	"socmap/dispersion"
)

// BenchmarkSpin1SplitStep: one three-component Strang step (two local 3×3
// exponentials per point, six FFTs) on a 256-point 1D and a 64×64 2D box.
func BenchmarkSpin1SplitStep(b *testing.B) {
	d := dispersion.RamanSpin1(1.5, 0.2, 0.5)
	for _, g := range []*Grid{MustGrid([]int{256}, []float64{16}), MustGrid([]int{64, 64}, []float64{16, 8})} {
		p := Spin1Problem{Grid: g, Model: Spin1UniformBox(g, d, 1, -0.3)}
		st, _ := Spin1Guess{Random: true, Seed: 1}.Build(p, d)
		e, err := newSpin1Engine(g, p.Model, 0)
		if err != nil {
			b.Fatal(err)
		}
		for c := 0; c < 3; c++ {
			copy(e.psi[c], st.Psi[c])
		}
		b.Run(fmtShape(g), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				e.splitSteps(0.005, 1)
			}
		})
		e.close()
	}
}

func fmtShape(g *Grid) string {
	s := ""
	for i, n := range g.Shape() {
		if i > 0 {
			s += "x"
		}
		s += itoa(n)
	}
	return s
}

func itoa(n int) string {
	if n == 0 {
		return "0"
	}
	var b []byte
	for n > 0 {
		b = append([]byte{byte('0' + n%10)}, b...)
		n /= 10
	}
	return string(b)
}
