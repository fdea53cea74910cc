package dispersion

import (
	"fmt"
	"math"
	"reflect"
	"strings"
	"sync"
)

// Waveform is a zero-mean, 2π-periodic shaking waveform s(φ), |s| ≤ 1, φ = ωt.
type Waveform interface {
	Name() string
	Value(phi float64) float64
}

// Sine is s(φ) = sin φ.
type Sine struct{}

func (Sine) Name() string              { return "sine" }
func (Sine) Value(phi float64) float64 { return math.Sin(phi) }

// Square is s(φ) = sign(sin φ): +1 on (0, π), −1 on (π, 2π).
type Square struct{}

func (Square) Name() string { return "square" }
func (Square) Value(phi float64) float64 {
	p := math.Mod(phi, 2*math.Pi)
	if p < 0 {
		p += 2 * math.Pi
	}
	switch {
	case p == 0 || p == math.Pi:
		return 0
	case p < math.Pi:
		return 1
	}
	return -1
}

// ParseWaveform returns a built-in waveform by name ("sine", "square").
func ParseWaveform(name string) (Waveform, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "sine", "sin":
		return Sine{}, nil
	case "square":
		return Square{}, nil
	}
	return nil, fmt.Errorf("unknown waveform %q; allowed: sine, square", name)
}

// cycleSamples is the number of phase samples of the numerical cycle integrals.
// With the trapezoid rule and linear interpolation the relative error for a
// smooth waveform is ~ (2π/N)²/8 ≈ 2e-8.
const cycleSamples = 1 << 14

// Cycle holds the numerical cycle integrals of a waveform on a uniform phase grid:
//
//	S(φ) = ∫₀^φ s dφ' − ⟨…⟩   (impulse shape, zero cycle mean)
//	X(φ) = ∫₀^φ S dφ' − ⟨…⟩   (position shape, zero cycle mean)
//
// so that for a force F s(ωt) the impulse is A(t) = (F/ω) S(ωt) and the
// position micromotion is x(t) = (F/mω²) X(ωt). For the sine, S = −cos φ and
// X = −sin φ.
type Cycle struct {
	Waveform Waveform
	s, S, X  []float64 // length cycleSamples+1; s at cell midpoints, S and X at grid points (periodic)
	S2Mean   float64   // ⟨S²⟩
	XAmp     float64   // (max X − min X)/2
	SMax     float64   // max |S|
}

// NewCycle computes the cycle integrals of w; it fails if w is not zero-mean.
func NewCycle(w Waveform) (*Cycle, error) {
	n := cycleSamples
	h := 2 * math.Pi / float64(n)
	c := &Cycle{Waveform: w, s: make([]float64, n+1), S: make([]float64, n+1), X: make([]float64, n+1)}
	// s is sampled at the cell midpoints (i+1/2)h and S integrated by the
	// midpoint rule, exact for piecewise-constant waveforms such as the square
	// wave whose jumps fall on grid points.
	mean := 0.0
	for i := 0; i < n; i++ {
		c.s[i] = w.Value((float64(i) + 0.5) * h)
		mean += c.s[i] / float64(n)
	}
	c.s[n] = c.s[0]
	if math.Abs(mean) > 1e-9 {
		return nil, fmt.Errorf("waveform %s has cycle mean %.3g, not zero", w.Name(), mean)
	}
	for i := 1; i <= n; i++ {
		c.S[i] = c.S[i-1] + h*c.s[i-1]
	}
	m := trapMean(c.S, h)
	for i := range c.S {
		c.S[i] -= m
	}
	cumTrap(c.S, c.X, h)
	m = trapMean(c.X, h)
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range c.X {
		c.X[i] -= m
		lo, hi = math.Min(lo, c.X[i]), math.Max(hi, c.X[i])
	}
	c.XAmp = (hi - lo) / 2
	sq := make([]float64, n+1)
	for i, v := range c.S {
		sq[i] = v * v
		c.SMax = math.Max(c.SMax, math.Abs(v))
	}
	c.S2Mean = trapMean(sq, h)
	return c, nil
}

// cycles caches the cycle integrals of comparable waveform values (the
// built-in Sine and Square, and any user waveform whose type is comparable):
// a Cycle depends only on its waveform, and recomputing its 3 × 2¹⁴ samples
// was a third of the time of one Shake.Evaluate (design searches call it
// thousands of times). Cached cycles are shared: they are never modified
// after NewCycle returns.
var cycles sync.Map // Waveform → *Cycle

// cycleOf returns the cycle integrals of w, from the cache when w's type is
// comparable and not a pointer (a pointer's target may change between
// calls); other waveforms are integrated on every call.
func cycleOf(w Waveform) (*Cycle, error) {
	if t := reflect.TypeOf(w); !t.Comparable() || t.Kind() == reflect.Pointer {
		return NewCycle(w)
	}
	if c, ok := cycles.Load(w); ok {
		return c.(*Cycle), nil
	}
	c, err := NewCycle(w)
	if err != nil {
		return nil, err
	}
	got, _ := cycles.LoadOrStore(w, c)
	return got.(*Cycle), nil
}

func cumTrap(f, out []float64, h float64) {
	out[0] = 0
	for i := 1; i < len(f); i++ {
		out[i] = out[i-1] + h*(f[i-1]+f[i])/2
	}
}

func trapMean(f []float64, h float64) float64 {
	n := len(f) - 1
	sum := (f[0] + f[n]) / 2
	for i := 1; i < n; i++ {
		sum += f[i]
	}
	return sum * h / (2 * math.Pi)
}

// Impulse returns S(φ) by linear interpolation on the periodic grid.
func (c *Cycle) Impulse(phi float64) float64 { return interpPeriodic(c.S, phi) }

func interpPeriodic(t []float64, phi float64) float64 {
	n := len(t) - 1
	u := math.Mod(phi, 2*math.Pi)
	if u < 0 {
		u += 2 * math.Pi
	}
	x := u / (2 * math.Pi) * float64(n)
	i := int(x)
	if i >= n {
		i = n - 1
	}
	f := x - float64(i)
	return t[i]*(1-f) + t[i+1]*f
}
