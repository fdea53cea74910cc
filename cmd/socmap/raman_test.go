package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Bad pairs and fields of the Raman and RF schemes: one line naming the
// flag, exit status 2, no output file.
func TestRamanPairBadInput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.h5")
	ram := []string{"scheme", "raman", "--atom", "Rb87", "--wavelength", "790 nm", "--rabi", "5 kHz"}
	shake := []string{"scheme", "shake", "--atom", "Rb87", "--bias", "5 G", "--gradient", "10 G/cm", "--shake", "5 kHz"}
	with := func(base []string, extra ...string) []string { return append(append([]string{}, base...), extra...) }
	for _, c := range []struct {
		name  string
		args  []string
		wants []string
	}{
		{"raman Δm = 2", with(ram, "--up", "1,1", "--down", "1,-1", "--bias", "5 G"), []string{"--up", "--down", "|Δm| = 1"}},
		{"raman same sublevel", with(ram, "--up", "2,0", "--down", "2,0", "--bias", "5 G"), []string{"--up", "--down"}},
		{"raman cross Δm = 2", with(ram, "--up", "1,-1", "--down", "2,1", "--bias", "5 G"), []string{"--up", "--down", "|Δm| = 2"}},
		{"raman pair without bias", with(ram, "--up", "1,0", "--down", "1,-1"), []string{"--bias"}},
		{"raman one state", with(ram, "--up", "1,0", "--bias", "5 G"), []string{"--down"}},
		{"raman bias without pair", with(ram, "--bias", "5 G"), []string{"--bias", "--up"}},
		{"raman zero bias", with(ram, "--up", "1,0", "--down", "1,-1", "--bias", "0 G"), []string{"--bias"}},
		{"rf Δm = 2", with(shake, "--up", "1,1", "--down", "1,-1"), []string{"--up", "--down", "|Δm| = 1"}},
		{"rf Δm = 3", with(shake, "--up", "2,-2", "--down", "2,1"), []string{"--up", "--down", "|Δm| = 3"}},
		{"rf cross Δm = 2", with(shake, "--up", "1,-1", "--down", "2,1"), []string{"--up", "--down"}},
	} {
		code, _, stderr := runArgs(t, with(c.args, "--out", out)...)
		lines := strings.Split(strings.TrimSpace(stderr), "\n")
		if code != 2 || len(lines) != 1 {
			t.Errorf("%s: exit %d, stderr %q (want 2, one line)", c.name, code, stderr)
		}
		for _, w := range c.wants {
			if !strings.Contains(stderr, w) {
				t.Errorf("%s: %q does not name %s", c.name, stderr, w)
			}
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: output written", c.name)
		}
	}
}

// scheme raman with a pair: JSON and HDF5 carry the two-photon frequency
// (the Breit–Rabi splitting, as scheme shake's RF frequency for the same
// pair and field), the isolation (2|q| in F = 1, as scheme shake's
// neighbour detuning) and the two-line scattering; compare's Raman side
// carries the same numbers at its mid-window coupling.
func TestRamanSchemeJSONAndH5(t *testing.T) {
	dir := t.TempDir()
	h5 := filepath.Join(dir, "raman.h5")
	pair := []string{"--atom", "Rb87", "--up", "1,0", "--down", "1,-1", "--bias", "60 G"}
	code, out, stderr := runArgs(t, append([]string{"scheme", "raman", "--wavelength", "790 nm", "--rabi", "15 kHz", "--detuning", "100 Hz", "--json", "--out", h5}, pair...)...)
	if code != 0 {
		t.Fatal(stderr)
	}
	var r map[string]any
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	code, out, stderr = runArgs(t, append([]string{"scheme", "shake", "--gradient", "10 G/cm", "--shake", "5 kHz", "--json"}, pair...)...)
	if code != 0 {
		t.Fatal(stderr)
	}
	var s map[string]any
	json.Unmarshal([]byte(out), &s)
	num := func(d map[string]any, k string) float64 {
		v, ok := d[k].(float64)
		if !ok {
			t.Fatalf("JSON lacks number %s: %v", k, d[k])
		}
		return v
	}
	f0 := num(s, "rf_hz")
	if num(r, "two_photon_hz") != f0 || math.Abs(num(r, "beam_difference_hz")-(f0+100)) > 1e-6 {
		t.Errorf("two-photon %v, beams %v; RF frequency %v", r["two_photon_hz"], r["beam_difference_hz"], f0)
	}
	if math.Abs(num(r, "neighbour_detuning_hz")-2*num(s, "quadratic_zeeman_hz")) > 1e-6 || r["neighbour_transition"] != "|1,0> → |1,+1>" {
		t.Errorf("neighbour %v at %v Hz, q = %v", r["neighbour_transition"], r["neighbour_detuning_hz"], s["quadratic_zeeman_hz"])
	}
	for _, k := range []string{"detuning_d1_hz", "detuning_d2_hz", "spin_matrix_element", "beam_intensity_W_per_m2", "scattering_per_rabi", "scattering_per_rabi_far_detuned", "isolation", "leakage"} {
		num(r, k)
	}
	if st, err := os.Stat(h5); err != nil || st.Size() == 0 {
		t.Fatalf("no HDF5 file: %v", err)
	}
	code, out, stderr = runArgs(t, "inspect", h5)
	if code != 0 {
		t.Fatal(stderr)
	}
	for _, k := range []string{"two_photon_frequency", "neighbour_detuning", "scattering_per_rabi", "detuning_D1", "beam_intensity"} {
		if !strings.Contains(out, k) {
			t.Errorf("inspect of raman.h5 lacks %s", k)
		}
	}
	code, out, stderr = runArgs(t, append([]string{"compare", "--gradient", "100 G/cm", "--shake", "3 kHz", "--rabi", "20 Hz",
		"--wavelength", "790 nm", "--raman-rabi", "15 kHz", "--density", "1e14 cm^-3", "--json"}, pair...)...)
	if code != 0 {
		t.Fatal(stderr)
	}
	var cdoc map[string]map[string]any
	json.Unmarshal([]byte(out), &cdoc)
	rs := cdoc["raman"]
	if num(rs, "two_photon_hz") != f0 {
		t.Errorf("compare two-photon %v, want %v", rs["two_photon_hz"], f0)
	}
	third, _ := rs["third_level"].(map[string]any)
	if third == nil || math.Abs(num(third, "detuning_hz")-2*num(s, "quadratic_zeeman_hz")) > 1e-6 || third["isolated"] != true {
		t.Errorf("compare third level %v", rs["third_level"])
	}
	if sc, _ := rs["scattering"].(map[string]any); sc == nil || !(num(sc, "rate_per_s") > 0) {
		t.Errorf("compare scattering %v", rs["scattering"])
	}
}
