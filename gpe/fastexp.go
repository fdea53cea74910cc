package gpe

import "math"

// expNeg returns e^x for x ≤ 709 with a relative error below 2e-15, and 0
// for x < −708 (underflow; the hard-wall factors). For |x| ≤ 1/8 the Taylor
// series to x¹⁰ (truncation < 2e-18); otherwise range reduction
// x = n ln2 + r, |r| ≤ ln2/2, the Taylor series of e^r to r¹³ (truncation
// (ln2/2)¹⁴/14! < 4e-18) and 2ⁿ built from the exponent bits (common
// practice, no source). Faster than math.Exp here (no Floor call).
func expNeg(x float64) float64 {
	if x <= 0.125 && x >= -0.125 {
		// Estrin's scheme: short dependency chains, so that consecutive
		// grid points overlap in the pipeline.
		x2 := x * x
		x4 := x2 * x2
		x8 := x4 * x4
		p01 := 1 + x
		p23 := 0.5 + x*(1.0/6)
		p45 := 1.0/24 + x*(1.0/120)
		p67 := 1.0/720 + x*(1.0/5040)
		p89 := 1.0/40320 + x*(1.0/362880)
		return (p01 + x2*p23) + x4*(p45+x2*p67) + x8*(p89+x2*(1.0/3628800))
	}
	return expRed(x)
}

func expRed(x float64) float64 {
	if x < -708 {
		return 0
	}
	if x > 709 || x != x {
		return math.Exp(x)
	}
	const (
		log2e = 1.4426950408889634
		ln2hi = 6.93147180369123816490e-01
		ln2lo = 1.90821492927058770002e-10
	)
	t := x * log2e
	var ni int64
	if t >= 0 {
		ni = int64(t + 0.5)
	} else {
		ni = int64(t - 0.5)
	}
	n := float64(ni)
	r := x - n*ln2hi - n*ln2lo
	p := 1.0 / 6227020800
	p = p*r + 1.0/479001600
	p = p*r + 1.0/39916800
	p = p*r + 1.0/3628800
	p = p*r + 1.0/362880
	p = p*r + 1.0/40320
	p = p*r + 1.0/5040
	p = p*r + 1.0/720
	p = p*r + 1.0/120
	p = p*r + 1.0/24
	p = p*r + 1.0/6
	p = p*r + 0.5
	p = p*r + 1
	p = p*r + 1
	if ni < -1022 {
		// subnormal result: scale in two steps
		return p * math.Float64frombits(uint64(ni+1022+1023)<<52) * 0x1p-1022
	}
	return p * math.Float64frombits(uint64(ni+1023)<<52)
}

// coshSinhc returns cosh(y) and sinh(y)/y for y² = y2 ≥ 0: Taylor series
// for y ≤ 0.5 (truncation below 1e-18), else from exponentials.
func coshSinhc(y2 float64) (c, sc float64) {
	if y2 <= 0.25 {
		// Estrin's scheme in y² (see expNeg).
		z2 := y2 * y2
		z4 := z2 * z2
		c = (1 + y2*0.5) + z2*(1.0/24+y2*(1.0/720)) +
			z4*((1.0/40320+y2*(1.0/3628800))+z2*(1.0/479001600+y2*(1.0/87178291200)))
		sc = (1 + y2*(1.0/6)) + z2*(1.0/120+y2*(1.0/5040)) +
			z4*((1.0/362880+y2*(1.0/39916800))+z2*(1.0/6227020800+y2*(1.0/1307674368000)))
		return
	}
	y := math.Sqrt(y2)
	ep := expNeg(y)
	em := 1 / ep
	return (ep + em) / 2, (ep - em) / (2 * y)
}
