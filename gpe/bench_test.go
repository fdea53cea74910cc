package gpe

import (
	"fmt"
	"testing"

	"socmap/gpe/fft"
)

var benchSizes = [][]int{{256}, {1024}, {256, 256}}

func sizeName(p []int) string {
	if len(p) == 1 {
		return fmt.Sprintf("%d", p[0])
	}
	return fmt.Sprintf("%dx%d", p[0], p[1])
}

// BenchmarkSplitStep: one Strang split step (4 FFTs, kinetic pass, local
// 2×2 exponential pass, renormalisation) in the default FFT mode.
func BenchmarkSplitStep(b *testing.B) {
	for _, pts := range benchSizes {
		for _, mode := range []FFTMode{FFTAuto, FFTSerial, FFTThreads} {
			if mode != FFTAuto && len(pts) == 1 {
				continue
			}
			b.Run(fmt.Sprintf("%s/%v", sizeName(pts), modeName(mode)), func(b *testing.B) {
				p := stripeProblem(pts)
				e := newTestEngine(b, p, Guess{Kind: GuessStripe, K: 0.94}, perf{fftMode: mode})
				defer e.close()
				_ = e.normalize()
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					e.splitSteps(0.01, 50)
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(50*b.N), "ns/step")
			})
		}
	}
}

// BenchmarkFourFFTs: the four transforms of one split step alone (forward
// and backward of both components), in the engine's FFT mode.
func BenchmarkFourFFTs(b *testing.B) {
	for _, pts := range benchSizes {
		for _, mode := range []FFTMode{FFTAuto, FFTSerial, FFTThreads} {
			if mode != FFTAuto && len(pts) == 1 {
				continue
			}
			b.Run(fmt.Sprintf("%s/%v", sizeName(pts), modeName(mode)), func(b *testing.B) {
				p := stripeProblem(pts)
				e := newTestEngine(b, p, Guess{Kind: GuessStripe, K: 0.94}, perf{fftMode: mode})
				defer e.close()
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					e.fftPair(opFwdPsi)
					e.fftPair(opBwdPsi)
				}
			})
		}
	}
}

// BenchmarkFinisherIteration: conjugate-gradient iterations from the
// stripe guess (restarted from it every 8 iterations so that every iteration
// does real work; ns/iter counts the iterations actually taken).
func BenchmarkFinisherIteration(b *testing.B) {
	for _, pts := range benchSizes {
		b.Run(sizeName(pts), func(b *testing.B) {
			p := stripeProblem(pts)
			e := newTestEngine(b, p, Guess{Kind: GuessStripe, K: 0.94}, perf{})
			defer e.close()
			u0 := append([]complex128(nil), e.psi[0]...)
			d0 := append([]complex128(nil), e.psi[1]...)
			set := (&Settings{MaxIter: 8, Tol: 1e-300, EnergyTol: 1e-300}).withDefaults()
			nop := func(Energies) {}
			its := 0
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				b.StopTimer()
				copy(e.psi[0], u0)
				copy(e.psi[1], d0)
				_ = e.normalize()
				b.StartTimer()
				n, _ := e.cg(set, nop)
				its += n
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(its), "ns/iter")
		})
	}
}

// BenchmarkOneFFT: one forward transform, FFTW and the pure-Go backend.
func BenchmarkOneFFT(b *testing.B) {
	for _, pts := range benchSizes {
		for _, c := range []struct {
			be fft.Backend
			pl fft.Planner
			nm string
		}{{fft.FFTW, fft.PlanEstimate, "fftw-estimate"}, {fft.FFTW, fft.PlanMeasure, "fftw-measure"}, {fft.Gonum, 0, "gonum"}} {
			be := c.be
			if be == fft.FFTW && !fft.FFTWAvailable {
				continue
			}
			b.Run(fmt.Sprintf("%s/%s", sizeName(pts), c.nm), func(b *testing.B) {
				tr, err := fft.New(pts, be, fft.Options{Planner: c.pl})
				if err != nil {
					b.Fatal(err)
				}
				defer tr.Close()
				buf := fft.Aligned(tr.Len())
				for i := range buf {
					buf[i] = complex(float64(i%7), 1)
				}
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					tr.Forward(buf)
				}
			})
		}
	}
}

func modeName(m FFTMode) string {
	switch m {
	case FFTAuto:
		return "auto"
	case FFTSerial:
		return "serial"
	case FFTPairs:
		return "pairs"
	case FFTThreads:
		return "fftw-threads"
	}
	return "?"
}
