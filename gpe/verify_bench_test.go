package gpe

import (
	"testing"
)

// BenchmarkRunDemoWindow: one shaking period of the demo setting (30 µs
// rectangular pulses) on the grid Verify chooses for it.
func BenchmarkRunDemoWindow(b *testing.B) {
	p := demoShake(b)
	d, err := NewShakeDrive(p)
	if err != nil {
		b.Fatal(err)
	}
	g := LabGridFor(d, []float64{-1.7e-3, 1.7e-3}, 0.05, 22.6e-6)
	rt, err := NewLabFrame(d, g)
	if err != nil {
		b.Fatal(err)
	}
	w, err := rt.NewWorker()
	if err != nil {
		b.Fatal(err)
	}
	defer w.Close()
	w.Init(0)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		w.Run(1000, 1, nil)
	}
}

// BenchmarkVerifyDelta: a whole delta-pulse verification (exact solver).
func BenchmarkVerifyDelta(b *testing.B) {
	p := demoShake(b)
	p.Pulse = 0
	for i := 0; i < b.N; i++ {
		if _, err := Verify(p, VerifySettings{}); err != nil {
			b.Fatal(err)
		}
	}
}
