package dispersion

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// The fits of spin-flip spectroscopy: the line centre of a spectrum
// (FitLine), the Doppler slope through the centres and the slope per pulse
// phase of a calibration (FitLinear), and the effective Rabi frequency of the
// flip dynamics (FitRabiTrace). gpe.Verify and Calibrate use them.

// LineFit is the fit of the main lobe of one flip spectrum to a gaussian
//
//	P(f) = a exp(−(f − f_c)²/2w²).
//
// Only the centre f_c is used as a measurement. The main lobe of the
// Doppler-broadened Rabi line (I. I. Rabi, Phys. Rev. 51, 652 (1937)) is
// symmetric about its centre, and a symmetric model fitted to points placed
// symmetrically about the maximum leaves the centre unbiased whatever the
// exact line shape; the gaussian is chosen because its three parameters are
// well conditioned (the Rabi formula with free Ω and amplitude is not).
// Residual bias: the fine scan is centred on a parabola through the coarse
// maximum, not exactly on the line, so the sampling is slightly asymmetric;
// for the exact delta-pulse lines this shifts centres by a few mHz (relative
// slope error ≲ 1e-5, see cmd/socmap/verify_test.go).
type LineFit struct {
	CentreHz, CentreErrHz float64 // f_c and its standard error (from the fit residual)
	WidthHz, Amplitude    float64 // w and a
	RMS                   float64 // rms residual of the fit
}

func gaussLine(f float64, x []float64) float64 {
	u := (f - x[0]) / x[1]
	return x[2] * math.Exp(-u*u/2)
}

// FitLine fits the gaussian line to (f, p) starting from centre c0 and width
// w0 (Hz): Levenberg–Marquardt (K. Levenberg, Q. Appl. Math. 2, 164 (1944);
// D. W. Marquardt, J. SIAM 11, 431 (1963)) with a numerical Jacobian, then
// the covariance s²(JᵀJ)⁻¹ for the centre's standard error.
func FitLine(f, p []float64, c0, w0 float64) (LineFit, error) {
	var lf LineFit
	if len(f) < 4 {
		return lf, errors.New("fewer than 4 spectrum points")
	}
	amax := 0.0
	for _, v := range p {
		amax = math.Max(amax, v)
	}
	if amax < 1e-6 {
		return lf, errors.New("no flips in the spectrum")
	}
	steps := []float64{1e-5 * w0, 1e-5 * w0, 1e-7}
	par, err := levMar(f, p, []float64{c0, w0, amax}, steps, gaussLine)
	if err != nil {
		return lf, err
	}
	lf.CentreHz, lf.WidthHz, lf.Amplitude = par[0], math.Abs(par[1]), par[2]
	n := len(f)
	J, rss := jacobian(f, p, par, steps, gaussLine)
	lf.RMS = math.Sqrt(rss / float64(n))
	var jtj, cov mat.Dense
	jtj.Mul(J.T(), J)
	if err := cov.Inverse(&jtj); err != nil {
		lf.CentreErrHz = math.NaN()
		return lf, nil
	}
	s2 := rss / float64(max(n-3, 1))
	lf.CentreErrHz = math.Sqrt(math.Max(0, s2*cov.At(0, 0)))
	return lf, nil
}

// LinearFit is the straight line y = a + b x fitted by (weighted) least
// squares, with the standard errors of a and b.
type LinearFit struct {
	Intercept, Slope       float64
	InterceptErr, SlopeErr float64
	Cov                    float64 // covariance of intercept and slope
	// Weighted: the fit used the data errors (weights 1/σ²) and the
	// parameter errors are those errors propagated; otherwise all points
	// weigh alike and the errors come from the residual variance.
	Weighted bool
	// Chi2 is Σ((y − a − b x)/σ)² when weighted, the residual sum of squares
	// otherwise; DoF = n − 2 its degrees of freedom.
	Chi2 float64
	DoF  int
}

// FitLinear fits y = a + b x by least squares.
//
// With sy nil every point weighs alike and the errors come from the residual
// variance s² = RSS/(n − 2): NaN for two points (an exact line has no
// residual to estimate them from).
//
// With sy given (standard errors of y, each finite and > 0, else an error)
// the fit is the standard weighted linear regression with weights
// w = 1/σ²: with S = Σw, Sx = Σwx, Sy = Σwy, Sxx = Σwx², Sxy = Σwxy and
// Δ = S·Sxx − Sx²,
//
//	b = (S·Sxy − Sx·Sy)/Δ,   a = (Sxx·Sy − Sx·Sxy)/Δ,
//	σ_b² = S/Δ,   σ_a² = Sxx/Δ,   cov(a, b) = −Sx/Δ,
//
// the data errors propagated linearly (P. R. Bevington and D. K. Robinson,
// Data Reduction and Error Analysis for the Physical Sciences, McGraw-Hill,
// ch. 6; the same as numpy.polyfit(x, y, 1, w=1/σ, cov="unscaled"), checked
// in testdata/ref_calibrate.py). These errors are finite for two points and
// are not rescaled by the scatter of the points: Chi2/DoF says how well the
// line and the errors agree.
func FitLinear(x, y, sy []float64) (LinearFit, error) {
	r := LinearFit{Weighted: sy != nil}
	n := len(x)
	if len(y) != n || (sy != nil && len(sy) != n) {
		return r, errors.New("x, y and their errors differ in length")
	}
	if n < 2 {
		return r, errors.New("fewer than 2 points")
	}
	for i := range sy {
		if !(sy[i] > 0) || math.IsInf(sy[i], 0) {
			return r, fmt.Errorf("point %d: standard error %g is not finite and positive", i+1, sy[i])
		}
	}
	weight := func(i int) float64 {
		if sy == nil {
			return 1
		}
		return 1 / (sy[i] * sy[i])
	}
	var sw, sx, sy1, sxx, sxy float64
	for i := range x {
		w := weight(i)
		sw += w
		sx += w * x[i]
		sy1 += w * y[i]
		sxx += w * x[i] * x[i]
		sxy += w * x[i] * y[i]
	}
	den := sw*sxx - sx*sx
	if !(den > 1e-12*sw*sxx) {
		return r, errors.New("all x values equal")
	}
	r.Slope = (sw*sxy - sx*sy1) / den
	r.Intercept = (sxx*sy1 - sx*sxy) / den
	varB, varA, cov := sw/den, sxx/den, -sx/den
	r.DoF = n - 2
	for i := range x {
		e := y[i] - r.Intercept - r.Slope*x[i]
		r.Chi2 += weight(i) * e * e
	}
	if sy == nil {
		s2 := math.NaN()
		if n > 2 {
			s2 = r.Chi2 / float64(n-2)
		}
		varB *= s2
		varA *= s2
		cov *= s2
	}
	r.SlopeErr, r.InterceptErr, r.Cov = math.Sqrt(varB), math.Sqrt(varA), cov
	return r, nil
}

// FitRabiTrace fits the flip dynamics at resonance, sampled at t_n = (n+1) dt,
// to Rabi's formula averaged over a gaussian spread of detunings of rms
// sigmaD (rad/s; the Doppler spread of the sample, known from its velocity
// spread):
//
//	P(t) = a ⟨Ω²/(Ω² + Δ²) sin²(√(Ω² + Δ²) t/2)⟩_Δ
//
// (I. I. Rabi, Phys. Rev. 51, 652 (1937)), and returns Ω/2π (Hz) and a: a
// scan of Ω over [0.05, 4] × r0 (Hz) with a from linear least squares, then
// golden-section refinement.
func FitRabiTrace(trace []float64, dt, r0, sigmaD float64) (rabiHz, amp float64) {
	const nodes = 21
	var du, wu [nodes]float64
	sw := 0.0
	for i := range du {
		u := -4 + 8*float64(i)/(nodes-1)
		du[i], wu[i] = u*sigmaD, math.Exp(-u*u/2)
		sw += wu[i]
	}
	shape := func(om, t float64) float64 {
		if sigmaD == 0 {
			s := math.Sin(om * t / 2)
			return s * s
		}
		v := 0.0
		for i, de := range du {
			g2 := om*om + de*de
			s := math.Sin(math.Sqrt(g2) * t / 2)
			v += wu[i] * om * om / g2 * s * s
		}
		return v / sw
	}
	cost := func(r float64) (float64, float64) {
		om := 2 * math.Pi * r
		var sgg, sgp float64
		for i, p := range trace {
			g := shape(om, float64(i+1)*dt)
			sgg += g * g
			sgp += g * p
		}
		if sgg == 0 {
			return math.Inf(1), 0
		}
		a := sgp / sgg
		c := 0.0
		for i, p := range trace {
			e := a*shape(om, float64(i+1)*dt) - p
			c += e * e
		}
		return c, a
	}
	best, bc := r0, math.Inf(1)
	const n = 400
	lo, hi := 0.05*r0, 4*r0
	h := (hi - lo) / n
	for i := 0; i <= n; i++ {
		r := lo + float64(i)*h
		if c, _ := cost(r); c < bc {
			best, bc = r, c
		}
	}
	a, b := best-h, best+h
	gr := (math.Sqrt(5) - 1) / 2
	for k := 0; k < 80; k++ {
		c1, c2 := b-gr*(b-a), a+gr*(b-a)
		f1, _ := cost(c1)
		f2, _ := cost(c2)
		if f1 < f2 {
			b = c2
		} else {
			a = c1
		}
	}
	rabiHz = (a + b) / 2
	_, amp = cost(rabiHz)
	return rabiHz, amp
}

// jacobian returns the central-difference Jacobian of model at par over the
// points f and the residual sum of squares against p.
func jacobian(f, p, par, steps []float64, model func(float64, []float64) float64) (*mat.Dense, float64) {
	n, k := len(f), len(par)
	J := mat.NewDense(n, k, nil)
	pp := make([]float64, k)
	rss := 0.0
	for i := range f {
		r := model(f[i], par) - p[i]
		rss += r * r
		for c := 0; c < k; c++ {
			copy(pp, par)
			pp[c] += steps[c]
			up := model(f[i], pp)
			pp[c] -= 2 * steps[c]
			J.Set(i, c, (up-model(f[i], pp))/(2*steps[c]))
		}
	}
	return J, rss
}

// levMar minimises Σ(model(f_i) − p_i)² from par0 (Levenberg–Marquardt with
// diagonal scaling); it fails if it does not converge in 500 iterations.
func levMar(f, p, par0, steps []float64, model func(float64, []float64) float64) ([]float64, error) {
	par := append([]float64(nil), par0...)
	k := len(par)
	lam := 1e-3
	J, rss := jacobian(f, p, par, steps, model)
	trial := make([]float64, k)
	for it := 0; it < 500; it++ {
		var jtj mat.Dense
		jtj.Mul(J.T(), J)
		g := mat.NewVecDense(k, nil)
		for i := range f {
			r := model(f[i], par) - p[i]
			for c := 0; c < k; c++ {
				g.SetVec(c, g.AtVec(c)+J.At(i, c)*r)
			}
		}
		improved := false
		for tries := 0; tries < 30; tries++ {
			A := mat.DenseCopyOf(&jtj)
			for c := 0; c < k; c++ {
				A.Set(c, c, jtj.At(c, c)*(1+lam)+1e-30)
			}
			var dx mat.VecDense
			if err := dx.SolveVec(A, g); err != nil {
				lam *= 10
				continue
			}
			for c := range par {
				trial[c] = par[c] - dx.AtVec(c)
			}
			s := 0.0
			for i := range f {
				r := model(f[i], trial) - p[i]
				s += r * r
			}
			if s < rss {
				conv := rss-s <= 1e-10*rss+1e-30
				copy(par, trial)
				rss = s
				lam = math.Max(lam/10, 1e-12)
				improved = true
				if conv {
					return par, nil
				}
				break
			}
			lam *= 10
		}
		if !improved {
			return par, nil // no descent direction left: at the minimum to rounding
		}
		J, rss = jacobian(f, p, par, steps, model)
	}
	return par, errors.New("line fit did not converge in 500 iterations")
}
