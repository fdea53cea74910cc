package fft

import "gonum.org/v1/gonum/dsp/fourier"

// gonumFFT applies 1-D gonum transforms along each axis (multi-dimensional
// by rows): lines are gathered into a contiguous buffer, transformed, and
// scattered back.
type gonumFFT struct {
	shape []int
	n     int
	ffts  []*fourier.CmplxFFT // one per axis
	line  []complex128
}

func newGonum(shape []int) *gonumFFT {
	g := &gonumFFT{shape: append([]int(nil), shape...), n: prod(shape)}
	maxn := 0
	for _, n := range shape {
		g.ffts = append(g.ffts, fourier.NewCmplxFFT(n))
		if n > maxn {
			maxn = n
		}
	}
	g.line = make([]complex128, maxn)
	return g
}

func (g *gonumFFT) Len() int                { return g.n }
func (g *gonumFFT) Shape() []int            { return append([]int(nil), g.shape...) }
func (g *gonumFFT) Backend() Backend        { return Gonum }
func (g *gonumFFT) Close()                  {}
func (g *gonumFFT) Forward(b []complex128)  { g.run(b, false) }
func (g *gonumFFT) Backward(b []complex128) { g.run(b, true) }

func (g *gonumFFT) run(b []complex128, inverse bool) {
	if len(b) != g.n {
		panic("fft: buffer length does not match the transform")
	}
	for ax, n := range g.shape {
		if n == 1 {
			continue
		}
		stride := 1
		for _, m := range g.shape[ax+1:] {
			stride *= m
		}
		outer := g.n / (n * stride)
		f := g.ffts[ax]
		line := g.line[:n]
		for o := 0; o < outer; o++ {
			base0 := o * n * stride
			for s := 0; s < stride; s++ {
				base := base0 + s
				if stride == 1 {
					seg := b[base : base+n]
					if inverse {
						f.Sequence(seg, seg)
					} else {
						f.Coefficients(seg, seg)
					}
					continue
				}
				for j := 0; j < n; j++ {
					line[j] = b[base+j*stride]
				}
				if inverse {
					f.Sequence(line, line)
				} else {
					f.Coefficients(line, line)
				}
				for j := 0; j < n; j++ {
					b[base+j*stride] = line[j]
				}
			}
		}
	}
}
