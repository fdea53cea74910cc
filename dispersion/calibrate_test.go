package dispersion

import (
	"encoding/json"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"strings"
	"testing"
)

// demoShake is the built-in example plan (cmd/socmap/plans/demo.toml):
// 87Rb |1,0>↔|1,-1>, 60 G, 100 G/cm at 3 kHz, 30 µs rectangular pulses at
// θ = 0, Ω/2π = 20 Hz.
func demoShake(t testing.TB) Shake {
	sp, err := LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	return Shake{Species: sp, Up: Sublevel{F: 1, M: 0}, Down: Sublevel{F: 1, M: -1},
		Bias: 60e-4, Gradient: 1, ShakeHz: 3000, Waveform: Sine{}, Pulse: PulseRect,
		PulseWidth: 30e-6, RabiHz: 20, DetuningHz: 145.4}
}

// The fit of the synthetic example agrees with numpy.linalg.lstsq and
// scipy.optimize.curve_fit (testdata/ref_calibrate.py → ref_calibrate.json),
// and the nominal slope used to invent the data is the model's.
func TestCalibrateAgainstNumpy(t *testing.T) {
	var ref struct {
		SlopeNominal float64 `json:"slope_nominal_hz_per_mm_s"`
		SlopeMax     float64 `json:"slope_max"`
		SlopeMaxErr  float64 `json:"slope_max_err"`
		LagDeg       float64 `json:"lag_deg"`
		LagErrDeg    float64 `json:"lag_err_deg"`
		RatioTrue    float64 `json:"ratio_true"`
	}
	b, err := os.ReadFile("../testdata/ref_calibrate.json")
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open("../testdata/calibrate_example.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	th, sl, err := ReadCalibrationCSV(f)
	if err != nil {
		t.Fatal(err)
	}
	p := demoShake(t)
	kt := make([]float64, len(sl))
	for i, s := range sl {
		kt[i] = SlopeToKt(s, 1) // f0 > 0 for |1,0>→|1,-1> of 87Rb
	}
	c, err := Calibrate(p, th, kt)
	if err != nil {
		t.Fatal(err)
	}
	k := 2 * math.Pi * 1e3
	if math.Abs(c.KNominal/k/ref.SlopeNominal-1) > 1e-5 {
		t.Errorf("nominal slope %.8g, the script used %.8g", c.KNominal/k, ref.SlopeNominal)
	}
	for _, x := range []struct {
		name      string
		got, want float64
	}{{"k_max", c.KMax / k, ref.SlopeMax}, {"k_max_err", c.KMaxErr / k, ref.SlopeMaxErr},
		{"lag", c.Lag * 180 / math.Pi, ref.LagDeg}, {"lag_err", c.LagErr * 180 / math.Pi, ref.LagErrDeg}} {
		if math.Abs(x.got/x.want-1) > 1e-9 {
			t.Errorf("%s: %.12g, numpy %.12g", x.name, x.got, x.want)
		}
	}
	if math.Abs(c.GradientRatio-ref.RatioTrue) > 3*c.GradientRatioErr {
		t.Errorf("gradient ratio %.4g ± %.2g, truth %.4g", c.GradientRatio, c.GradientRatioErr, ref.RatioTrue)
	}
}

// Synthetic data of our own (math/rand/v2 PCG, seed 7): over 400 invented
// data sets the truth lies within one standard error in 68 ± 5 % of the
// cases for k_max and θ_lag (normal coverage, common practice, no source),
// so the error bars are right, not just the values.
func TestCalibrateCoverage(t *testing.T) {
	p := demoShake(t)
	rng := rand.New(rand.NewPCG(7, 2026))
	c0, err := Calibrate(p, []float64{0, 1, 2}, []float64{1, 2, 3})
	if err != nil {
		t.Fatal(err)
	}
	kTrue := 0.9 * c0.KNominal
	lagTrue := -25 * math.Pi / 180
	noise := 0.02 * math.Abs(kTrue)
	const sets = 400
	var inK, inL int
	for s := 0; s < sets; s++ {
		var th, kt []float64
		for i := 0; i < 8; i++ {
			x := float64(i) * 2 * math.Pi / 8
			th = append(th, x)
			kt = append(kt, kTrue*math.Cos(x-lagTrue)+noise*rng.NormFloat64())
		}
		c, err := Calibrate(p, th, kt)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(c.KMax-kTrue) < c.KMaxErr {
			inK++
		}
		if math.Abs(c.Lag-lagTrue) < c.LagErr {
			inL++
		}
	}
	// Residual-variance errors with 6 degrees of freedom cover a bit less
	// than 68 % (Student t, 6 dof: 64.4 %).
	for name, n := range map[string]int{"k_max": inK, "lag": inL} {
		if f := float64(n) / sets; f < 0.57 || f > 0.72 {
			t.Errorf("%s: truth within 1σ in %.1f%% of the sets", name, 100*f)
		}
	}
}

func TestCalibrateBadData(t *testing.T) {
	p := demoShake(t)
	for name, c := range map[string]struct{ th, kt []float64 }{
		"too few":     {[]float64{0, 1}, []float64{1, 2}},
		"phases same": {[]float64{0.5, 0.5, 0.5, 0.5}, []float64{1, 2, 3, 4}},
		"180 apart":   {[]float64{0, math.Pi, 0, math.Pi}, []float64{1, -1, 1.1, -0.9}},
		"NaN":         {[]float64{0, 1, 2}, []float64{1, math.NaN(), 3}},
	} {
		if _, err := Calibrate(p, c.th, c.kt); !errors.Is(err, ErrBadData) {
			t.Errorf("%s: err = %v, want ErrBadData", name, err)
		}
	}
	for name, csv := range map[string]string{
		"header":      "phase,slope\n0,1\n",
		"non-numeric": "phase_deg,slope_hz_per_mm_s\n0,1\n30,abc\n60,2\n",
		"NaN":         "phase_deg,slope_hz_per_mm_s\n0,1\n30,NaN\n60,2\n",
		"empty":       "",
		"one speed":   "phase_deg,detuning_hz,velocity_mm_s\n0,1,1\n0,2,1\n90,3,0\n90,4,1\n",
	} {
		if _, _, err := ReadCalibrationCSV(strings.NewReader(csv)); !errors.Is(err, ErrBadData) {
			t.Errorf("%s: err = %v, want ErrBadData", name, err)
		}
	}
}

// The three-column form: one slope per phase from (detuning, velocity).
func TestCalibratePointsForm(t *testing.T) {
	csv := "# invented\nphase_deg,detuning_hz,velocity_mm_s\n0,100,0\n0,-276,1\n90,100,0\n90,110,1\n90,90,-1\n"
	th, sl, err := ReadCalibrationCSV(strings.NewReader(csv))
	if err != nil {
		t.Fatal(err)
	}
	if len(th) != 2 || math.Abs(sl[0]+376) > 1e-9 || math.Abs(sl[1]-10) > 1e-9 || math.Abs(th[1]-math.Pi/2) > 1e-15 {
		t.Errorf("phases %v slopes %v", th, sl)
	}
}

// CalibrateCSV is ReadCalibrationCSV + SlopeToKt with sgn(f0) + Calibrate in
// one call: the same fit, and it keeps the data.
func TestCalibrateCSVOneCall(t *testing.T) {
	p := demoShake(t)
	f, err := os.Open("../testdata/calibrate_example.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	c, err := CalibrateCSV(p, f)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.Seek(0, 0); err != nil {
		t.Fatal(err)
	}
	th, sl, err := ReadCalibrationCSV(f)
	if err != nil {
		t.Fatal(err)
	}
	if p.Species.TransitionHz(p.Up, p.Down, p.Bias) <= 0 {
		t.Fatal("the demo transition has f0 > 0")
	}
	kt := make([]float64, len(sl))
	for i, s := range sl {
		kt[i] = SlopeToKt(s, 1)
	}
	want, err := Calibrate(p, th, kt)
	if err != nil {
		t.Fatal(err)
	}
	if c.KMax != want.KMax || c.Lag != want.Lag || c.KMaxErr != want.KMaxErr || len(c.Slope) != len(sl) || len(c.Theta) != len(th) || c.Kt[3] != kt[3] {
		t.Errorf("one call: k_max %g lag %g (%d slopes), separate calls %g %g", c.KMax, c.Lag, len(c.Slope), want.KMax, want.Lag)
	}
	if _, err := CalibrateCSV(p, strings.NewReader("phase_deg,slope_hz_per_mm_s\n0,1\n")); !errors.Is(err, ErrBadData) {
		t.Errorf("one row: err = %v, want ErrBadData", err)
	}
}
