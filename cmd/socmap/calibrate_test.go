package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestCalibrateCommand(t *testing.T) {
	dir := t.TempDir()
	png, h5f := filepath.Join(dir, "c.png"), filepath.Join(dir, "c.h5")
	code, out, errs := runFQ(t, "calibrate", "--plan", fqPlan, "--data", "../../testdata/calibrate_example.csv", "--json", "--out", png, "--out", h5f)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"k_max_per_m", "k_max_err_per_m", "lag_deg", "lag_err_deg", "gradient_eff_over_nominal"} {
		if _, ok := doc[k].(float64); !ok {
			t.Errorf("JSON key %s missing: %v", k, doc[k])
		}
	}
	// The synthetic file was made with ratio 0.85 and lag 12° (testdata/ref_calibrate.py).
	r, re := doc["gradient_eff_over_nominal"].(float64), doc["gradient_eff_over_nominal_err"].(float64)
	l, le := doc["lag_deg"].(float64), doc["lag_err_deg"].(float64)
	if math.Abs(r-0.85) > 3*re || math.Abs(l-12) > 3*le {
		t.Errorf("ratio %g ± %g (truth 0.85), lag %g ± %g deg (truth 12)", r, re, l, le)
	}
	for _, o := range []string{png, h5f} {
		if st, err := os.Stat(o); err != nil || st.Size() == 0 {
			t.Errorf("%s not written: %v", o, err)
		}
	}
}

func TestCalibrateBadData(t *testing.T) {
	dir := t.TempDir()
	for name, c := range map[string]struct{ csv, want string }{
		"too few":     {"phase_deg,slope_hz_per_mm_s\n0,-300\n90,10\n", "at least 3"},
		"same phase":  {"phase_deg,slope_hz_per_mm_s\n10,-300\n10,-290\n10,-310\n", "phases"},
		"non-numeric": {"phase_deg,slope_hz_per_mm_s\n0,-300\n90,ten\n180,300\n", "not a finite number"},
		"NaN":         {"phase_deg,slope_hz_per_mm_s\n0,-300\n90,NaN\n180,300\n", "not a finite number"},
		"header":      {"angle,slope\n0,1\n", "header"},
	} {
		f := filepath.Join(dir, strings.ReplaceAll(name, " ", "_")+".csv")
		if err := os.WriteFile(f, []byte(c.csv), 0o644); err != nil {
			t.Fatal(err)
		}
		out := filepath.Join(dir, name+".h5")
		code, _, errs := runFQ(t, "calibrate", "--plan", fqPlan, "--data", f, "--out", out)
		if code != 2 || !strings.Contains(errs, c.want) || !strings.Contains(errs, "--data") || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%s: exit %d, stderr %q", name, code, errs)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: partial output file written", name)
		}
	}
	code, _, errs := runFQ(t, "calibrate", "--plan", fqPlan)
	if code != 2 || !strings.Contains(errs, "--data") {
		t.Errorf("missing --data: exit %d, %q", code, errs)
	}
}
