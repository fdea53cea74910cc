package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"socmap/output/h5"
)

func runArgs(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	code = run(args, &o, &e)
	return code, o.String(), e.String()
}

var naArgs = []string{"--atom", "Na23", "--up", "1,0", "--down", "1,1", "--bias", "11.4 G", "--gradient", "100 G/cm", "--shake", "5 kHz"}

func TestBadInputExit2(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "r.h5")
	cases := []struct {
		name string
		args []string
		want string // must appear in the one-line message
	}{
		{"unknown atom", []string{"scheme", "shake", "--atom", "Cs133"}, "--atom"},
		{"sublevel outside", replace(naArgs, "--down", "1,2"), "--down"},
		{"wrong F", replace(naArgs, "--up", "3,0"), "--up"},
		{"negative frequency", replace(naArgs, "--shake", "-5 kHz"), "--shake"},
		{"NaN", replace(naArgs, "--bias", "NaN G"), "--bias"},
		{"missing unit", replace(naArgs, "--gradient", "100"), "--gradient"},
		{"wrong unit", replace(naArgs, "--gradient", "100 G"), "--gradient"},
		{"missing flag", []string{"scheme", "shake", "--atom", "Na23", "--up", "1,0", "--down", "1,1"}, "--bias"},
		{"bad waveform", append(append([]string{}, naArgs...), "--waveform", "triangle"), "--waveform"},
		{"rect without width", append(append([]string{}, naArgs...), "--pulse", "rect"), "--pulse-width"},
		{"raman angle", []string{"scheme", "raman", "--atom", "Rb87", "--wavelength", "790 nm", "--angle", "200 deg"}, "--angle"},
		{"bands nothing", []string{"bands"}, "--scheme"},
		{"bands negative omega", []string{"bands", "--omega-er", "-1"}, "--omega-er"},
		{"bad out type", []string{"bands", "--omega-er", "1", "--out", filepath.Join(dir, "x.txt")}, "--out"},
	}
	for _, c := range cases {
		args := c.args
		if args[0] == "--atom" {
			args = append([]string{"scheme", "shake"}, args...)
		}
		args = append(args, "--out", out)
		code, _, stderr := runArgs(t, args...)
		if code != 2 {
			t.Errorf("%s: exit %d, want 2 (stderr %q)", c.name, code, stderr)
		}
		lines := strings.Split(strings.TrimSpace(stderr), "\n")
		if len(lines) != 1 || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: stderr %q, want one line naming %s", c.name, stderr, c.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: output file written despite the error", c.name)
		}
		left, _ := filepath.Glob(filepath.Join(dir, ".*tmp"))
		if len(left) > 0 {
			t.Errorf("%s: temporary files left: %v", c.name, left)
		}
	}
}

func replace(args []string, flag, val string) []string {
	out := append([]string{"scheme", "shake"}, args...)
	for i := range out {
		if out[i] == flag {
			out[i+1] = val
		}
	}
	return out
}

func TestShakeJSONAndH5(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "shake.h5")
	code, stdout, stderr := runArgs(t, append(append([]string{"scheme", "shake", "--json", "--out", out}, naArgs...), "--rabi", "300 Hz")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"k_t_per_m", "k_R_per_m", "E_R_hz", "omega_hz", "omega_over_ER", "delta_over_ER", "rf_hz", "enhancement", "doppler_hz_per_mm_s", "k_spread_rms_per_m", "warnings"} {
		if _, ok := doc[k]; !ok {
			t.Errorf("JSON lacks %s", k)
		}
	}
	f, err := h5.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	kt, _, err := f.ReadFloat64s("/results/k_t")
	if err != nil || len(kt) != 1 || math.Abs(kt[0]-doc["k_t_per_m"].(float64)) > 1e-9*math.Abs(kt[0]) {
		t.Errorf("HDF5 k_t %v (%v), JSON %v", kt, err, doc["k_t_per_m"])
	}
	u, err := f.AttrString("/results/k_t", "units")
	if err != nil || u != "1/m" {
		t.Errorf("units %q %v", u, err)
	}
	plan, err := f.AttrString("/", "plan_toml")
	if err != nil || !strings.Contains(plan, `gradient = "100 G/cm"`) {
		t.Errorf("plan_toml %q %v", plan, err)
	}
	// Existing file without --force: refused, exit 2.
	code, _, stderr = runArgs(t, append([]string{"scheme", "shake", "--out", out}, naArgs...)...)
	if code != 2 || !strings.Contains(stderr, "exists") {
		t.Errorf("overwrite: exit %d, %q", code, stderr)
	}
}

func TestPlanAndOverride(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "p.toml")
	os.WriteFile(plan, []byte(`[atom]
atom = "Na23"
up = "1,0"
down = "1,1"
[shake]
bias = "11.4 G"
gradient = "100 G/cm"
shake = "5 kHz"
`), 0o644)
	_, a, _ := runArgs(t, "scheme", "shake", "--plan", plan, "--json")
	_, b, _ := runArgs(t, "scheme", "shake", "--plan", plan, "--json", "--shake", "10 kHz")
	var da, db map[string]any
	if err := json.Unmarshal([]byte(a), &da); err != nil {
		t.Fatal(err, a)
	}
	json.Unmarshal([]byte(b), &db)
	ra := da["k_t_per_m"].(float64) / db["k_t_per_m"].(float64)
	if math.Abs(ra-2) > 1e-9 {
		t.Errorf("flag override: k_t ratio %g, want 2 (k_t ∝ 1/ω)", ra)
	}
	os.WriteFile(plan, []byte("gradiant = \"1 T/m\"\n"), 0o644)
	code, _, stderr := runArgs(t, "scheme", "shake", "--plan", plan)
	if code != 2 || !strings.Contains(stderr, "gradiant") {
		t.Errorf("unknown key: exit %d %q", code, stderr)
	}
	os.WriteFile(plan, []byte("gradient = \"1 T\"\n"), 0o644)
	code, _, stderr = runArgs(t, "scheme", "shake", "--plan", plan)
	if code != 2 || !strings.Contains(stderr, "gradient") {
		t.Errorf("bad value in plan: exit %d %q", code, stderr)
	}
}

func TestBandsAndRamanJSON(t *testing.T) {
	code, out, stderr := runArgs(t, "bands", "--omega-er", "2", "--json")
	if code != 0 {
		t.Fatal(stderr)
	}
	var doc struct {
		Minima []struct {
			K  float64 `json:"k_over_kR"`
			E  float64 `json:"E_over_ER"`
			Sz float64 `json:"sz"`
		} `json:"minima"`
		Barrier *float64 `json:"barrier_over_ER"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Minima) != 2 || math.Abs(doc.Minima[1].K-math.Sqrt(0.75)) > 1e-9 || doc.Barrier == nil {
		t.Errorf("bands JSON %s", out)
	}
	code, out, stderr = runArgs(t, "scheme", "raman", "--atom", "Rb87", "--wavelength", "790 nm", "--rabi", "10 kHz", "--json")
	if code != 0 {
		t.Fatal(stderr)
	}
	var r map[string]any
	json.Unmarshal([]byte(out), &r)
	for _, k := range []string{"k_R_per_m", "E_R_hz", "omega_over_ER", "delta_over_ER"} {
		if _, ok := r[k]; !ok {
			t.Errorf("raman JSON lacks %s", k)
		}
	}
	if math.Abs(r["k_R_per_m"].(float64)-2*math.Pi/790e-9) > 1 {
		t.Errorf("k_R %v", r["k_R_per_m"])
	}
}

func TestDemoRuns(t *testing.T) {
	dir := t.TempDir()
	code, out, stderr := runArgs(t, "demo", "--dir", dir, "--quiet")
	if code != 0 {
		t.Fatalf("demo exit %d: %s", code, stderr)
	}
	for _, f := range []string{"plan.toml", "shake.h5", "raman.h5", "bands.png", "bands.csv", "bands.h5", "report.txt"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("demo did not write %s", f)
		}
	}
	if !strings.Contains(out, "Files in") {
		t.Errorf("no report on stdout")
	}
}

// The map's stripe edge along Ω in the symmetric case equals the closed form
// of the variational theory (phases.UpperStripeOmega; derived in
// phases/symmetric.go, agreeing with Li, Pitaevskii & Stringari, PRL 108,
// 225301 (2012)) to within one grid step.
func TestMapCommandSymmetric(t *testing.T) {
	dir := t.TempDir()
	code, out, stderr := runArgs(t, "map", "--omega-er", "0", "--G1", "1", "--G2", "0.1", "--x", "omega=0.01:4:400", "--json",
		"--out", filepath.Join(dir, "m.h5"), "--out", filepath.Join(dir, "m.png"))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		X struct {
			Name   string
			Unit   string
			Values []float64
		}
		Phase  []string
		Energy []*float64 `json:"energy_over_ER"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.X.Name != "omega" || doc.X.Unit != "E_R" || len(doc.Phase) != 400 || len(doc.Energy) != 400 {
		t.Fatalf("map JSON: %s", out[:200])
	}
	edge := math.NaN()
	for i := 1; i < len(doc.Phase); i++ {
		if doc.Phase[i-1] == "stripe" && doc.Phase[i] != "stripe" {
			edge = doc.X.Values[i]
			break
		}
	}
	want := 4 * math.Sqrt(0.1*0.9*3/1.2) // Ω_c = 4√(G2(1−G2)(2+G1)/(G1+2G2))
	if math.Abs(edge-want) > 0.011 {
		t.Errorf("stripe edge at Ω = %g, closed form %g", edge, want)
	}
	f, err := h5.Open(filepath.Join(dir, "m.h5"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	ph, shape, err := f.ReadInt8s("/map/phase")
	if err != nil || len(shape) != 1 || shape[0] != 400 || ph[0] != 3 {
		t.Errorf("map phase dataset %v %v %v", shape, err, ph[:3])
	}
	codes, err := f.AttrString("/map/phase", "codes")
	if err != nil || !strings.Contains(codes, "3=stripe") {
		t.Errorf("codes attribute %q %v", codes, err)
	}
	code, _, stderr = runArgs(t, "map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "wavelength=700:800 nm:3")
	if code != 2 || !strings.Contains(stderr, "raman") {
		t.Errorf("lab axis without its scheme: exit %d %q", code, stderr)
	}
	code, _, stderr = runArgs(t, "map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:4")
	if code != 2 || !strings.Contains(stderr, "--x") {
		t.Errorf("bad axis: exit %d %q", code, stderr)
	}
}

func TestCompareCommand(t *testing.T) {
	code, out, stderr := runArgs(t, "compare", "--plan", "plans/demo.toml", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc map[string]map[string]any
	json.Unmarshal([]byte(out), &doc)
	for _, s := range []string{"shake", "raman"} {
		d := doc[s]
		if d == nil || d["stripe_window_found"] != true {
			t.Fatalf("%s: %v", s, d)
		}
		w := d["stripe_window_omega_over_ER"].([]any)
		if w[0].(float64) != 0 || !(w[1].(float64) > 0) {
			t.Errorf("%s window %v", s, w)
		}
	}
	// The demo plan is tuned to the balancing detuning: the shaking scheme's
	// planned coupling gives a stripe.
	if doc["shake"]["phase_planned"] != "stripe" {
		t.Errorf("demo plan: shaking scheme phase %v", doc["shake"]["phase_planned"])
	}
	// Lowering the recoil (larger E_R ratio n g/E_R) widens the window in Ω/E_R
	// only through G1, G2: check the window scales as the closed form predicts
	// in direction — a smaller E_R means larger G2/E_R, hence a wider window.
	sw := doc["shake"]["stripe_window_omega_over_ER"].([]any)[1].(float64)
	rw := doc["raman"]["stripe_window_omega_over_ER"].([]any)[1].(float64)
	if !(sw > rw) {
		t.Errorf("shake window %g not wider than Raman %g (E_R is smaller for shake)", sw, rw)
	}
}

func TestInspect(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "b.h5")
	if code, _, e := runArgs(t, "bands", "--omega-er", "2", "--out", out); code != 0 {
		t.Fatal(e)
	}
	code, text, stderr := runArgs(t, "inspect", out)
	if code != 0 || !strings.Contains(text, "E_lower") || !strings.Contains(text, "[E_R]") {
		t.Errorf("inspect: exit %d %q %q", code, text, stderr)
	}
	code, js, _ := runArgs(t, "inspect", "--json", out)
	var v map[string]any
	if code != 0 || json.Unmarshal([]byte(js), &v) != nil {
		t.Errorf("inspect --json: exit %d %q", code, js)
	}
	bad := filepath.Join(dir, "bad.h5")
	os.WriteFile(bad, []byte("not hdf5 at all"), 0o644)
	b, _ := os.ReadFile(out)
	trunc := filepath.Join(dir, "trunc.h5")
	os.WriteFile(trunc, b[:len(b)/2], 0o644)
	for _, f := range []string{bad, trunc, filepath.Join(dir, "missing.h5")} {
		code, _, stderr := runArgs(t, "inspect", f)
		if code != 2 || strings.Count(strings.TrimSpace(stderr), "\n") != 0 || !strings.Contains(stderr, filepath.Base(f)) {
			t.Errorf("inspect %s: exit %d, stderr %q", f, code, stderr)
		}
	}
	// Unwritable directory for --out: one line, exit 2, nothing written.
	code, _, stderr = runArgs(t, "bands", "--omega-er", "2", "--out", "/nonexistent-dir/b.h5")
	if code != 2 || !strings.Contains(stderr, "--out") {
		t.Errorf("unwritable: exit %d %q", code, stderr)
	}
}

// map --png-observable writes one figure per observable beside each figure
// --out (also as SVG); bad names and a missing figure --out are refused.
func TestMapObservableFigures(t *testing.T) {
	dir := t.TempDir()
	base := []string{"map", "--omega-er", "1", "--G1", "1", "--G2", "0.1", "--x", "omega=0:5:11", "--y", "G2=-0.2:0.6:5"}
	code, _, stderr := runArgs(t, append(base, "--out", filepath.Join(dir, "m.png"), "--out", filepath.Join(dir, "m.svg"), "--png-observable", "contrast,period")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, f := range []string{"m.png", "m.svg", "m-contrast.png", "m-period.png", "m-contrast.svg", "m-period.svg"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", f, err)
		}
	}
	for _, c := range []struct{ args []string }{
		{[]string{"--out", filepath.Join(dir, "n.png"), "--png-observable", "temperature"}},
		{[]string{"--out", filepath.Join(dir, "n.h5"), "--png-observable", "contrast"}},
		{[]string{"--out", filepath.Join(dir, "n.pdf"), "--out", filepath.Join(dir, "n.gif")}},
	} {
		code, _, stderr := runArgs(t, append(append([]string{}, base...), c.args...)...)
		if code != 2 || len(strings.Split(strings.TrimSpace(stderr), "\n")) != 1 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line", c.args, code, stderr)
		}
	}
	if m, _ := filepath.Glob(filepath.Join(dir, "n*")); len(m) != 0 {
		t.Errorf("refused runs left files: %v", m)
	}
}
