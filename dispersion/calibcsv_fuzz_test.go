package dispersion

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// FuzzCalibrationCSV: no text may panic or hang the calibration CSV
// reader; what it accepts has as many phases as slopes, all finite, and
// what it refuses is ErrBadData (or ErrBadInput from the slope fit), one
// line. Seeds are in testdata/fuzz/FuzzCalibrationCSV and below.
func FuzzCalibrationCSV(f *testing.F) {
	for _, s := range []string{
		"phase_deg,slope_hz_per_mm_s\n0,-313.6\n90,-66.1\n180,313.3\n",
		"\uFEFFphase_deg,slope_hz_per_mm_s\n0,1\n",
		"# comment\nphase_deg,detuning_hz,velocity_mm_s\n0,100,0\n0,-276,1\n90,100,0\n90,110,1\n",
		"phase_deg,slope_hz_per_mm_s,x\n0,1,2\n",
		"phase_deg,slope_hz_per_mm_s\n0,\"1\n",
		"slope_hz_per_mm_s,phase_deg\n1,0\n2,90\n",
		"phase_deg,slope_hz_per_mm_s\n0,1e999\n",
		"",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		th, sl, err := ReadCalibrationCSV(strings.NewReader(text))
		if err != nil {
			if !errors.Is(err, ErrBadData) && !errors.Is(err, ErrBadInput) {
				t.Fatalf("error %v is neither ErrBadData nor ErrBadInput", err)
			}
			if strings.Contains(err.Error(), "\n") {
				t.Fatalf("two-line error %q", err)
			}
			return
		}
		if len(th) != len(sl) || len(th) == 0 {
			t.Fatalf("%d phases, %d slopes", len(th), len(sl))
		}
		for i := range th {
			if math.IsNaN(th[i]) || math.IsInf(th[i], 0) || math.IsNaN(sl[i]) || math.IsInf(sl[i], 0) {
				t.Fatalf("value %d: %v, %v", i, th[i], sl[i])
			}
		}
	})
}
