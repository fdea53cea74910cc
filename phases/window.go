package phases

import (
	"fmt"
	"math"

	"socmap/phases/label"
)

// Window is an interval of the coupling Ω (E_R) over which one phase wins.
type Window struct {
	Lo, Hi float64 // Ω/E_R; Lo = 0 when the phase reaches down to Ω → 0
	Found  bool
}

// Width returns Hi − Lo (0 if not found).
func (w Window) Width() float64 {
	if !w.Found {
		return 0
	}
	return w.Hi - w.Lo
}

// StripeWindow finds the interval of Ω in [0, omegaMax] where the variational
// ground state of u (with u.Omega replaced) is a stripe. It scans n points
// (n ≥ 16; 0 means 400), takes the first contiguous stripe interval and
// refines both edges by bisection to tol (E_R; 0 means 1e-6). Hi is +Inf if
// the state is still a stripe at omegaMax. A point that does not converge is
// an error. (Ω = 0 itself is degenerate and is not sampled; a window that
// reaches down to the first sample has Lo = 0.)
func StripeWindow(u Uniform, omegaMax float64, n int, tol float64, s *Settings) (Window, error) {
	if !(omegaMax > 0) {
		return Window{}, fmt.Errorf("omegaMax must be positive")
	}
	w, err := scanWindow(u, func(v *Uniform, x float64) { v.Omega = x }, omegaMax*1e-3/400, omegaMax, n, tol, s)
	if err == nil && w.Found && w.Lo <= omegaMax*1e-3/400 {
		w.Lo = 0
	}
	return w, err
}

// DetuningWindow finds the interval of δ (E_R) around center, within
// center ± halfSpan, where the ground state of u is a stripe. If the stripe
// reaches the start of the span, Lo is the span's start; if it extends past
// its end, Hi is +Inf. Scan and tolerance as in StripeWindow.
func DetuningWindow(u Uniform, center, halfSpan float64, n int, tol float64, s *Settings) (Window, error) {
	return scanWindow(u, func(v *Uniform, x float64) { v.Delta = x }, center-halfSpan, center+halfSpan, n, tol, s)
}

// scanWindow scans x over [lo, hi] on n+1 points and returns the first
// contiguous interval where the phase is a stripe, edges refined by bisection.
func scanWindow(u Uniform, set func(*Uniform, float64), lo, hi float64, n int, tol float64, s *Settings) (Window, error) {
	if n <= 0 {
		n = 400
	}
	if n < 16 {
		n = 16
	}
	if tol <= 0 {
		tol = 1e-6
	}
	isStripe := func(x float64) (bool, error) {
		v := u
		set(&v, x)
		r, err := Variational(v, s)
		if err != nil {
			return false, err
		}
		if r.Status != Converged {
			return false, fmt.Errorf("variational minimisation did not converge at %+v", v)
		}
		return r.Phase == label.Stripe, nil
	}
	return scanStripe(isStripe, lo, hi, n, tol)
}

// scanStripe scans x over [lo, hi] on n+1 points and returns the first
// contiguous interval where isStripe holds, edges refined by bisection to
// tol (Lo = lo when the first point is a stripe, Hi = +Inf when the last
// is). It serves the two-level and the spin-1 windows.
func scanStripe(isStripe func(float64) (bool, error), lo, hi float64, n int, tol float64) (Window, error) {
	at := func(i int) float64 { return lo + (hi-lo)*float64(i)/float64(n) }
	var w Window
	prev := false
	for i := 0; i <= n; i++ {
		st, err := isStripe(at(i))
		if err != nil {
			return w, err
		}
		if st && !w.Found {
			w.Found = true
			w.Lo = at(i)
			if i > 0 {
				if w.Lo, err = bisectEdge(isStripe, at(i-1), at(i), tol); err != nil {
					return w, err
				}
			}
		}
		if !st && prev {
			w.Hi, err = bisectEdge(isStripe, at(i-1), at(i), tol)
			return w, err
		}
		prev = st
	}
	if w.Found {
		w.Hi = math.Inf(1)
	}
	return w, nil
}

// bisectEdge finds where f changes between a and b (f(a) ≠ f(b)).
func bisectEdge(f func(float64) (bool, error), a, b, tol float64) (float64, error) {
	fa, err := f(a)
	if err != nil {
		return 0, err
	}
	for b-a > tol {
		m := (a + b) / 2
		fm, err := f(m)
		if err != nil {
			return 0, err
		}
		if fm == fa {
			a = m
		} else {
			b = m
		}
	}
	return (a + b) / 2, nil
}
