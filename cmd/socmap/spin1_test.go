package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"socmap/output"
	"socmap/phases/label"
)

// --levels 3 on bands and ground: the JSON keys of the issue, HDF5 with the
// three components, and bad input as one line with exit status 2 and no file.
func TestLevels3Commands(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runArgs(t, "ground", "--levels", "3", "--omega-er", "0", "--epsilon-er", "1", "--nc0-er", "10", "--nc2-er", "-1", "--json",
		"--out", filepath.Join(dir, "g.h5"))
	if code != 0 {
		t.Fatalf("ground --levels 3: exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"populations", "fz", "f_perp", "phase", "energy_per_particle_over_ER", "residual_over_ER"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("ground --levels 3 JSON lacks %q", k)
		}
	}
	// broken-axisymmetry: ρ0 = 1/2 + q/(4|c2|n) = 0.75 (Stamper-Kurn & Ueda 2013)
	pops := doc["populations"].(map[string]any)
	if math.Abs(pops["m0"].(float64)-0.75) > 1e-6 || doc["phase"] != "broken-axisymmetry" {
		t.Errorf("populations %v phase %v", pops, doc["phase"])
	}
	// its local spin order: F_z = 0 and |F_⊥|² = 4ρ0(1 − ρ0) everywhere, so
	// L = P = 1 − (q/2|c2|n)² = 0.75 (derived from the single-mode spinor).
	if l, p := doc["local_spin_order"].(float64), doc["local_transverse_order"].(float64); math.Abs(l-0.75) > 1e-6 || math.Abs(p-0.75) > 1e-6 {
		t.Errorf("local spin order L %v, P %v, want 0.75", l, p)
	}
	if _, err := os.Stat(filepath.Join(dir, "g.h5")); err != nil {
		t.Error(err)
	}
	code, out, errs = runArgs(t, "bands", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.2", "--json", "--out", filepath.Join(dir, "b.csv"))
	if code != 0 || !strings.Contains(out, `"minima"`) {
		t.Fatalf("bands --levels 3: exit %d: %s %s", code, out, errs)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"bands", "--levels", "4", "--omega-er", "1"}, "--levels"},
		{[]string{"bands", "--levels", "3", "--omega-er", "1"}, "quadratic Zeeman"},
		{[]string{"bands", "--omega-er", "1", "--epsilon-er", "1"}, "--epsilon-er"},
		{[]string{"bands", "--levels", "3", "--scheme", "shake", "--atom", "Rb87", "--up", "2,1", "--down", "2,2", "--bias", "5 G", "--shake", "5 kHz", "--gradient", "40 G/cm"}, "F = 1"},
		{[]string{"bands", "--levels", "3", "--scheme", "shake", "--atom", "Rb87", "--up", "1,1", "--down", "1,-1", "--bias", "5 G", "--shake", "5 kHz", "--gradient", "40 G/cm"}, "adjacent"},
		{[]string{"ground", "--levels", "3", "--scheme", "raman", "--atom", "K39", "--wavelength", "770 nm", "--raman-rabi", "5 kHz", "--epsilon-er", "0.5", "--density", "1e14 cm^-3", "--out", filepath.Join(dir, "k.h5")}, "a0"},
		{[]string{"ground", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5"}, "--nc0-er"},
	} {
		code, _, errs := runArgs(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, message %q (want exit 2, one line with %q)", c.args, code, errs, c.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "k.h5")); err == nil {
		t.Error("refused run left a file")
	}
}

// ground --levels 3 with --magnetization (box) and in a trap: ⟨F_z⟩ = M,
// the trap keys, the HDF5 file; bad input exits 2 with one line.
func TestLevels3TrapAndMagnetization(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runArgs(t, "ground", "--levels", "3", "--omega-er", "0", "--epsilon-er", "0.4", "--nc0-er", "10", "--nc2-er", "-1",
		"--magnetization", "0.3", "--json")
	if code != 0 {
		t.Fatalf("ground --magnetization: exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	// ρ0 from testdata/ref_spin1_magnetization.json (scipy single-mode minimum)
	pops := doc["populations"].(map[string]any)
	if math.Abs(doc["fz"].(float64)-0.3) > 1e-8 || math.Abs(pops["m0"].(float64)-0.5323645990317483) > 1e-6 || doc["magnetization_fixed"] != true {
		t.Errorf("fixed M: fz %v, populations %v", doc["fz"], pops)
	}
	raman := []string{"--scheme", "raman", "--atom", "Rb87", "--wavelength", "790 nm", "--raman-rabi", "2 kHz", "--epsilon-er", "0.5"}
	args := append([]string{"ground", "--levels", "3", "--atoms", "3000", "--trap", "40,400,400", "--points", "256", "--magnetization", "-0.2", "--json",
		"--out", filepath.Join(dir, "trap.h5"), "--out", filepath.Join(dir, "trap.png")}, raman...)
	code, out, errs = runArgs(t, args...)
	if code != 0 {
		t.Fatalf("ground --levels 3 in a trap: exit %d: %s", code, errs)
	}
	doc = nil
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"populations", "fz", "f_perp", "phase", "energy_per_particle_over_ER", "residual_over_ER", "atoms", "trap_hz", "peak_density_per_m_d", "box_length_m", "lambda_over_ER"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("trapped JSON lacks %q", k)
		}
	}
	if doc["geometry"] != "harmonic trap" || math.Abs(doc["fz"].(float64)+0.2) > 1e-8 || doc["status"] != "converged" {
		t.Errorf("trap: geometry %v, fz %v, status %v", doc["geometry"], doc["fz"], doc["status"])
	}
	for _, f := range []string{"trap.h5", "trap.png"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}
	code, _, errs = runArgs(t, "bands", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.2", "--out", filepath.Join(dir, "b3.png"), "--out", filepath.Join(dir, "b3.svg"))
	if code != 0 {
		t.Fatalf("bands --levels 3 --out b3.png: exit %d %s", code, errs)
	}
	for _, f := range []string{"b3.png", "b3.svg"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() < 1000 {
			t.Errorf("%s: %v", f, err)
		}
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"ground", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5", "--nc0-er", "1", "--nc2-er", "0", "--magnetization", "1"}, "--magnetization"},
		{[]string{"ground", "--omega-er", "1", "--G1", "1", "--magnetization", "0.1"}, "--magnetization"},
		{append([]string{"ground", "--levels", "3", "--atoms", "1000"}, raman...), "--trap"},
		{append([]string{"ground", "--levels", "3", "--atoms", "1000", "--trap", "50", "--nc0-er", "1", "--nc2-er", "0"}, raman...), "--nc0-er"},
		{[]string{"ground", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5", "--atoms", "1000", "--trap", "50"}, "--trap"},
		{[]string{"ground", "--levels", "3", "--scheme", "raman", "--atom", "K39", "--wavelength", "770 nm", "--raman-rabi", "5 kHz", "--epsilon-er", "0.5",
			"--atoms", "1000", "--trap", "50", "--out", filepath.Join(dir, "k.h5")}, "a0"},
	} {
		code, _, errs := runArgs(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, message %q (want exit 2, one line with %q)", c.args, code, errs, c.want)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "k.h5")); err == nil {
		t.Error("refused run left a file")
	}
}

// compare: an F = 1 pair with --levels 2 carries the three-level check;
// --levels 3 at a low bias field finds the Raman window moved (ε = q(3 G)
// ≈ 0.18 E_R of the Raman recoil) and says so; bad input exits 2.
func TestCompareLevels(t *testing.T) {
	base := []string{"compare", "--plan", "plans/demo.toml", "--density", "1e14 cm^-3", "--json"}
	code, out, errs := runArgs(t, base...)
	if code != 0 {
		t.Fatalf("compare: exit %d %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	tl, ok := doc["three_level"].(map[string]any)
	if !ok || tl["levels"].(float64) != 2 || tl["raman"].(map[string]any)["matters"] != false {
		t.Fatalf("--levels 2 three-level check: %v", doc["three_level"])
	}
	code, out, errs = runArgs(t, append(base, "--levels", "3", "--bias", "3 G")...)
	if code != 0 {
		t.Fatalf("compare --levels 3: exit %d %s", code, errs)
	}
	doc = nil
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	tl = doc["three_level"].(map[string]any)
	ram := tl["raman"].(map[string]any)
	w3, w2 := ram["stripe_window_rabi_hz"].([]any), ram["two_level_window_rabi_hz"].([]any)
	t.Logf("Raman window three levels %v Hz, two levels %v Hz; advice: %v", w3, w2, tl["advice"])
	if ram["matters"] != true || !(w3[1].(float64) < 0.95*w2[1].(float64)) || !strings.Contains(tl["advice"].(string), "Raman") {
		t.Errorf("low field: %v", ram)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--levels", "3", "--up", "2,1", "--down", "2,2", "--a-uu", "100", "--a-dd", "100", "--a-ud", "98"}, "F = 1"},
		{[]string{"--levels", "3", "--atom", "K39", "--wavelength", "770 nm", "--a-uu", "100", "--a-dd", "100", "--a-ud", "98"}, "--a0"},
		{[]string{"--epsilon-er", "1"}, "--epsilon-er"},
	} {
		code, _, errs := runArgs(t, append(append([]string{}, base...), c.args...)...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, message %q (want exit 2, one line with %q)", c.args, code, errs, c.want)
		}
	}
}

// scheme shake: an F = 1 pair carries the single-particle three-level
// check; at 2 G (q/h ≈ 0.29 kHz, a few E_R) it advises
// --levels 3, at the demo's 60 G it does not. At δ = 0 the two-level
// double-minimum edge is Ω = 4 E_R (common practice, no source: the lower
// band E = k² + 1 − √(4k² + Ω²/4) has two minima for Ω < 4).
func TestSchemeShakeLevels(t *testing.T) {
	get := func(args ...string) map[string]any {
		t.Helper()
		code, out, errs := runArgs(t, append([]string{"scheme", "shake", "--plan", "plans/demo.toml", "--json"}, args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d %s", args, code, errs)
		}
		var doc map[string]any
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		tl, ok := doc["three_level"].(map[string]any)
		if !ok {
			t.Fatalf("%v: no three_level", args)
		}
		return tl
	}
	if tl := get(); tl["matters"] != false {
		t.Errorf("60 G: %v", tl)
	}
	tl := get("--bias", "2 G")
	if tl["matters"] != true || !strings.Contains(tl["advice"].(string), "--levels 3") {
		t.Errorf("2 G: %v", tl)
	}
	doc := map[string]any{}
	code, out, _ := runArgs(t, "scheme", "shake", "--plan", "plans/demo.toml", "--json", "--detuning", "147.24817402188015 Hz")
	if code != 0 || json.Unmarshal([]byte(out), &doc) != nil {
		t.Fatal("δ = 0 run")
	}
	// the RF detuning that makes δ = 0 (rf_detuning_for_zero_delta_hz of the demo)
	edge := doc["three_level"].(map[string]any)["double_minimum_edge_rabi_hz"].([]any)[0].(float64)
	erHz := doc["E_R_hz"].(float64)
	d := doc["delta_over_ER"].(float64)
	t.Logf("two-level edge %.6g Hz = %.7f E_R (δ/E_R = %.2e)", edge, edge/erHz, d)
	if math.Abs(d) > 1e-9 || math.Abs(edge/erHz-4) > 1e-6 {
		t.Errorf("edge %g E_R at δ = %g, want 4", edge/erHz, d)
	}
	code, _, errs := runArgs(t, "scheme", "shake", "--plan", "plans/demo.toml", "--levels", "3", "--up", "2,1", "--down", "2,2")
	if code != 2 || !strings.Contains(errs, "F = 1") {
		t.Errorf("F = 2 pair with --levels 3: exit %d %q", code, errs)
	}
}

// excitations --levels 3 refuses the two-level couplings (spin-1 runs:
// TestExcitationsSpin1).
func TestExcitationsLevels3Refused(t *testing.T) {
	code, _, errs := runArgs(t, "excitations", "--levels", "3", "--omega-er", "1", "--epsilon-er", "1", "--G1", "1", "--G2", "0.1")
	if code != 2 || !strings.HasPrefix(strings.TrimSpace(errs), "socmap: --G1 \"1\": a two-level coupling") {
		t.Errorf("exit %d, %q", code, errs)
	}
}

// map --levels 3: the spin-1 variational theory per point (every point
// computed, the method named), a resume with another magnetisation is
// refused, bad input exits 2; with --levels 2 an F = 1 shaking pair gets
// the three-level check at the planned point.
func TestMapLevels3(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "m.h5")
	args := []string{"map", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5", "--nc0-er", "1", "--nc2-er", "-0.2",
		"--x", "omega=0.2:4:4", "--y", "delta=-1:1:3", "--out", out, "--json"}
	code, stdout, errs := runArgs(t, args...)
	if code != 0 {
		t.Fatalf("map --levels 3: exit %d %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["points_computed"].(float64) != 12 {
		t.Errorf("points computed %v", doc["points_computed"])
	}
	if !strings.Contains(stdout, "spin1-variational") {
		t.Errorf("method not named in the JSON")
	}
	// resume with a different magnetisation is refused (identity by value)
	code, _, errs = runArgs(t, append(args[:len(args):len(args)], "--magnetization", "0.2")...)
	if code != 2 {
		t.Errorf("existing map with other settings: exit %d %s", code, errs)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"map", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5", "--nc0-er", "1", "--nc2-er", "-0.2", "--x", "G1=0:1:3"}, "G1"},
		{[]string{"map", "--levels", "3", "--dims", "2", "--omega-er", "1", "--epsilon-er", "0.5", "--nc0-er", "1", "--nc2-er", "-0.2", "--x", "omega=0:1:3"}, "--dims"},
		{[]string{"map", "--levels", "3", "--excitations", "--omega-er", "1", "--epsilon-er", "0.5", "--nc0-er", "1", "--nc2-er", "-0.2", "--x", "omega=0:1:3"}, "--excitations"},
		{[]string{"map", "--levels", "3", "--omega-er", "1", "--nc0-er", "1", "--nc2-er", "-0.2", "--x", "omega=0:1:3"}, "quadratic Zeeman"},
		{[]string{"map", "--levels", "3", "--omega-er", "1", "--epsilon-er", "0.5", "--x", "omega=0:1:3"}, "--nc0-er"},
	} {
		code, _, errs := runArgs(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, message %q (want exit 2, one line with %q)", c.args, code, errs, c.want)
		}
	}
	// --levels 2 with an F = 1 shaking pair: the check at the planned point
	code, stdout, errs = runArgs(t, "map", "--plan", "plans/demo.toml", "--density", "1e14 cm^-3", "--x", "rabi=0:40 Hz:3", "--json")
	if code != 0 || !strings.Contains(stdout, `"three_level_check"`) {
		t.Errorf("map --levels 2 on an F = 1 pair: exit %d, no three_level_check (%s)", code, errs)
	}
}

// map --levels 3 --method gpe: three-component GPE ground states per point
// (phases.MethodSpin1GPE) through the map writer (HDF5 read back with the
// spin-1 observables, PNG), an existing map not overwritten by a run with
// other --points (the identity by value is TestSpin1GPEMapIdentityEstimate's),
// the flags that do not apply refused in one line, exit 2.
func TestMapLevels3GPE(t *testing.T) {
	dir := t.TempDir()
	out, png := filepath.Join(dir, "m.h5"), filepath.Join(dir, "m.png")
	base := []string{"map", "--levels", "3", "--method", "gpe", "--omega-er", "1", "--epsilon-er", "0.5", "--nc0-er", "1", "--nc2-er", "-0.1"}
	args := append(base[:len(base):len(base)], "--x", "omega=0.5:2.5:3", "--points", "64", "--out", out, "--out", png, "--json", "--quiet")
	code, stdout, errs := runArgs(t, args...)
	if code != 0 {
		t.Fatalf("map --levels 3 --method gpe: exit %d %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc["points_computed"].(float64) != 3 || doc["method"] != "spin1-gpe" {
		t.Errorf("points computed %v, method %v", doc["points_computed"], doc["method"])
	}
	d, _, err := output.ReadMap(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"energy", "fz", "f_perp", "pop_p1", "pop_0", "pop_m1", "contrast", "k1", "period", "residual", "energy_variational", "phase_variational", "box_length", "grid_points", "spread"} {
		if d.Observable(n) == nil {
			t.Errorf("map file lacks %s", n)
		}
	}
	if ph := d.Phase; ph[0] != label.PlaneWave || ph[2] != label.SingleMinimum {
		t.Errorf("phases %v: want plane-wave at Ω = 0.5, single-minimum at 2.5", ph)
	}
	if st, err := os.Stat(png); err != nil || st.Size() == 0 {
		t.Errorf("no PNG: %v", err)
	}
	code, _, errs = runArgs(t, append(base[:len(base):len(base)], "--x", "omega=0.5:2.5:3", "--points", "128", "--out", out, "--quiet")...)
	if code != 2 {
		t.Errorf("existing map with other --points: exit %d %s", code, errs)
	}
	for _, c := range []struct {
		extra []string
		want  string
	}{
		{[]string{"--stripe-box", "fixed"}, "--stripe-box"},
		{[]string{"--trap", "40,400,400"}, "--trap"},
		{[]string{"--gpe-edge"}, "--gpe-edge"},
		{[]string{"--hold-delta", "balance"}, "--hold-delta"},
		{[]string{"--points", "8"}, "--points"},
		{[]string{"--dims", "3"}, "--dims"},
		{[]string{"--starts", "-1"}, "--starts"},
		{[]string{"--tol", "0"}, "--tol"},
	} {
		a := append(append(base[:len(base):len(base)], "--x", "omega=0:1:3"), c.extra...)
		code, _, errs := runArgs(t, a...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, message %q (want exit 2, one line with %q)", c.extra, code, errs, c.want)
		}
	}
}
