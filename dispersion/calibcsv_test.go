package dispersion

import (
	"errors"
	"strings"
	"testing"
)

// TestCalibrationCSVBOMAndExtraColumns: a byte-order mark (as spreadsheets
// write UTF-8 CSV) is accepted; an extra column, in the header or in a
// row, is refused instead of being ignored.
func TestCalibrationCSVBOMAndExtraColumns(t *testing.T) {
	good := "phase_deg,slope_hz_per_mm_s\n0,1\n90,2\n"
	th, sl, err := ReadCalibrationCSV(strings.NewReader("\uFEFF" + good))
	if err != nil || len(th) != 2 || sl[1] != 2 {
		t.Fatalf("with a BOM: %v %v %v", th, sl, err)
	}
	for name, csv := range map[string]string{
		"extra header column": "phase_deg,slope_hz_per_mm_s,comment\n0,1,a\n90,2,b\n",
		"extra cell":          "phase_deg,slope_hz_per_mm_s\n0,1\n90,2,3\n",
		"both forms":          "phase_deg,slope_hz_per_mm_s,detuning_hz,velocity_mm_s\n0,1,2,3\n",
		"repeated column":     "phase_deg,slope_hz_per_mm_s,phase_deg\n0,1,0\n",
	} {
		_, _, err := ReadCalibrationCSV(strings.NewReader(csv))
		if !errors.Is(err, ErrBadData) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: err = %v, want one line wrapping ErrBadData", name, err)
		}
	}
}
