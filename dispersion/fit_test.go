package dispersion

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// The weighted line fit against numpy.polyfit(x, y, 1, w=1/σ, cov="unscaled")
// on invented data sets (testdata/ref_calibrate.py → ref_calibrate.json):
// slope, intercept, their propagated errors, covariance and χ².
func TestFitLinearWeightedAgainstNumpy(t *testing.T) {
	b, err := os.ReadFile("../testdata/ref_calibrate.json")
	if err != nil {
		t.Fatal(err)
	}
	var raw struct {
		Lines []map[string]any `json:"weighted_lines"`
	}
	if err := json.Unmarshal(b, &raw); err != nil {
		t.Fatal(err)
	}
	if len(raw.Lines) < 3 {
		t.Fatalf("reference holds %d weighted lines, want ≥ 3", len(raw.Lines))
	}
	floats := func(v any) []float64 {
		var out []float64
		for _, x := range v.([]any) {
			out = append(out, x.(float64))
		}
		return out
	}
	for _, c := range raw.Lines {
		x, y, sg := floats(c["x"]), floats(c["y"]), floats(c["sigma"])
		lf, err := FitLinear(x, y, sg)
		if err != nil {
			t.Fatalf("%s: %v", c["name"], err)
		}
		if !lf.Weighted || lf.DoF != len(x)-2 {
			t.Errorf("%s: weighted %v, dof %d", c["name"], lf.Weighted, lf.DoF)
		}
		for _, q := range []struct {
			name      string
			got, want float64
			abs       float64 // absolute floor for values near 0
		}{{"slope", lf.Slope, c["slope"].(float64), 0}, {"intercept", lf.Intercept, c["intercept"].(float64), 0},
			{"slope_err", lf.SlopeErr, c["slope_err"].(float64), 0}, {"intercept_err", lf.InterceptErr, c["intercept_err"].(float64), 0},
			{"cov", lf.Cov, c["cov"].(float64), 1e-12}, {"chi2", lf.Chi2, c["chi2"].(float64), 1e-12}} {
			if d := math.Abs(q.got - q.want); d > 1e-9*math.Abs(q.want)+q.abs {
				t.Errorf("%s: %s = %.12g, numpy %.12g", c["name"], q.name, q.got, q.want)
			}
		}
	}
}

// Two points: the line passes through both, and the propagated errors are
// the closed form σ_b² = (σ1² + σ2²)/(x2 − x1)², σ_a² = (x2²σ1² + x1²σ2²)/(x2 − x1)²
// (derived from b = (y2 − y1)/(x2 − x1), a = (x2 y1 − x1 y2)/(x2 − x1)):
// finite, where the unweighted fit has no residual to estimate an error from.
func TestFitLinearTwoPoints(t *testing.T) {
	x, y, sg := []float64{-1.3, 2.1}, []float64{5, -7}, []float64{0.2, 0.5}
	lf, err := FitLinear(x, y, sg)
	if err != nil {
		t.Fatal(err)
	}
	dx := x[1] - x[0]
	wantB, wantA := (y[1]-y[0])/dx, (x[1]*y[0]-x[0]*y[1])/dx
	wantSB := math.Hypot(sg[0], sg[1]) / math.Abs(dx)
	wantSA := math.Hypot(x[1]*sg[0], x[0]*sg[1]) / math.Abs(dx)
	for _, q := range [][2]float64{{lf.Slope, wantB}, {lf.Intercept, wantA}, {lf.SlopeErr, wantSB}, {lf.InterceptErr, wantSA}} {
		if math.Abs(q[0]/q[1]-1) > 1e-12 {
			t.Errorf("two points: got %.15g, closed form %.15g", q[0], q[1])
		}
	}
	if lf.Chi2 > 1e-20 {
		t.Errorf("two points: χ² = %g, want 0", lf.Chi2)
	}
	u, err := FitLinear(x, y, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(u.Slope/wantB-1) > 1e-12 || !math.IsNaN(u.SlopeErr) || u.Weighted {
		t.Errorf("unweighted two points: slope %g ± %g (want %g ± NaN)", u.Slope, u.SlopeErr, wantB)
	}
	// Equal errors: same line as the unweighted fit.
	x3, y3 := []float64{0, 1, 2, 4}, []float64{1.1, 2.9, 5.2, 8.8}
	w3, _ := FitLinear(x3, y3, []float64{0.3, 0.3, 0.3, 0.3})
	u3, _ := FitLinear(x3, y3, nil)
	if math.Abs(w3.Slope-u3.Slope) > 1e-12 || math.Abs(w3.Intercept-u3.Intercept) > 1e-12 {
		t.Errorf("equal weights: %g + %g x, unweighted %g + %g x", w3.Intercept, w3.Slope, u3.Intercept, u3.Slope)
	}
	for name, s := range map[string][]float64{"zero": {0.1, 0}, "NaN": {math.NaN(), 1}, "inf": {1, math.Inf(1)}, "short": {1}} {
		if _, err := FitLinear(x, y, s); err == nil {
			t.Errorf("errors %s %v accepted", name, s)
		}
	}
}
