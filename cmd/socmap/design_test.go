package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"socmap/output/h5"
)

// writePlan writes text to dir/name and returns the path.
func writePlan(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// TestDesignCommand: the built-in design plan runs; every candidate's
// settings alone, written as a plan, replay with `scheme shake` (no validity
// warning) and `compare` (stripe at the planned coupling); --out writes the
// HDF5 file with every evaluation and the PNG.
func TestDesignCommand(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, "design.toml", designPlan)
	h5p, png := filepath.Join(dir, "d.h5"), filepath.Join(dir, "d.png")
	code, stdout, stderr := runArgs(t, "design", "--plan", plan, "--json", "--no-check", "--evaluations", "300", "--quiet", "--out", h5p, "--out", png)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Candidates []struct {
			Settings  map[string]string `json:"settings"`
			Objective float64           `json:"objective"`
			Margins   []struct {
				Key    string  `json:"key"`
				Margin float64 `json:"margin"`
				OK     bool    `json:"ok"`
			} `json:"margins"`
			Binding []string `json:"binding"`
		} `json:"candidates"`
		Evaluations int `json:"evaluations"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Evaluations != 300 || len(doc.Candidates) == 0 {
		t.Fatalf("evaluations %d, %d candidates", doc.Evaluations, len(doc.Candidates))
	}
	for i, c := range doc.Candidates {
		if !(c.Objective > 0) || len(c.Margins) == 0 || c.Binding == nil {
			t.Errorf("candidate %d: objective %g, %d margins, binding %v", i, c.Objective, len(c.Margins), c.Binding)
		}
		for _, m := range c.Margins {
			if !m.OK || m.Margin < 0 {
				t.Errorf("candidate %d: %s margin %g", i, m.Key, m.Margin)
			}
		}
		keys := make([]string, 0, len(c.Settings))
		for k := range c.Settings {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		var b strings.Builder
		for _, k := range keys {
			fmt.Fprintf(&b, "%s = %q\n", k, c.Settings[k])
		}
		cp := writePlan(t, dir, fmt.Sprintf("cand%d.toml", i), b.String())
		code, out, se := runArgs(t, "scheme", "shake", "--plan", cp, "--json")
		if code != 0 {
			t.Fatalf("candidate %d: scheme shake exit %d: %s", i, code, se)
		}
		var sh struct {
			Warnings []any `json:"warnings"`
		}
		if err := json.Unmarshal([]byte(out), &sh); err != nil {
			t.Fatal(err)
		}
		if len(sh.Warnings) > 0 {
			t.Errorf("candidate %d: scheme shake warns %v", i, sh.Warnings)
		}
		code, out, se = runArgs(t, "compare", "--plan", cp, "--json")
		if code != 0 {
			t.Fatalf("candidate %d: compare exit %d: %s", i, code, se)
		}
		var cmp struct {
			Shake struct {
				Phase string `json:"phase_planned"`
			} `json:"shake"`
		}
		if err := json.Unmarshal([]byte(out), &cmp); err != nil {
			t.Fatal(err)
		}
		if cmp.Shake.Phase != "stripe" {
			t.Errorf("candidate %d: compare gives %q at the planned coupling", i, cmp.Shake.Phase)
		}
	}
	f, err := h5.Open(h5p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	v, shape, err := f.ReadFloat64s("/design/values")
	if err != nil || len(shape) != 2 || shape[0] != 300 || shape[1] != 4 || len(v) != 1200 {
		t.Errorf("/design/values: shape %v, %v", shape, err)
	}
	if st, err := os.Stat(png); err != nil || st.Size() < 10000 {
		t.Errorf("PNG: %v", err)
	}
}

// TestDesignPlanTable: a plan with a [design] table serves the other
// commands; an unknown key inside it is refused by every command.
func TestDesignPlanTable(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, "design.toml", designPlan)
	if code, _, se := runArgs(t, "scheme", "shake", "--plan", plan); code != 0 {
		t.Errorf("scheme shake with a [design] table: exit %d: %s", code, se)
	}
	bad := writePlan(t, dir, "bad.toml", designPlan+"gradiant = \"1:2 G/cm\"\n")
	for _, cmd := range [][]string{{"scheme", "shake"}, {"compare"}, {"design"}} {
		code, _, se := runArgs(t, append(cmd, "--plan", bad)...)
		if code != 2 || !strings.Contains(se, "gradiant") || strings.Count(strings.TrimSpace(se), "\n") > 0 {
			t.Errorf("%v: exit %d, stderr %q; want 2 and one line naming the key", cmd, code, se)
		}
	}
	flat := writePlan(t, dir, "flat.toml", "design = \"x\"\n")
	if code, _, _ := runArgs(t, "scheme", "shake", "--plan", flat); code != 2 {
		t.Errorf("design as a plain key: exit %d, want 2", code)
	}
}

func TestDesignBadInputExit2(t *testing.T) {
	dir := t.TempDir()
	for name, c := range map[string]struct{ from, to, want string }{
		"LO > HI":           {`gradient = "20:150 G/cm"`, `gradient = "150:20 G/cm"`, "LO > HI"},
		"empty range":       {`gradient = "20:150 G/cm"`, `gradient = ":150 G/cm"`, "empty range"},
		"LO = HI":           {`gradient = "20:150 G/cm"`, `gradient = "20:20 G/cm"`, "gradient"},
		"no unit":           {`gradient = "20:150 G/cm"`, `gradient = "20:150"`, "missing unit"},
		"unknown objective": {`objective = "field*window^0.5"`, `objective = "robustness"`, "robustness"},
		"raman key":         {`gradient = "20:150 G/cm"`, `wavelength = "780:800 nm"`, "wavelength"},
		"bad constraint":    {`min-contrast = 0.005`, `min-contrast = "-1"`, "min-contrast"},
	} {
		text := strings.Replace(designPlan, c.from, c.to, 1)
		if text == designPlan {
			t.Fatalf("%s: %q not in the plan", name, c.from)
		}
		p := writePlan(t, dir, "p.toml", text)
		code, _, se := runArgs(t, "design", "--plan", p, "--no-check", "--evaluations", "20", "--quiet")
		if code != 2 || !strings.Contains(se, c.want) || strings.Count(strings.TrimSpace(se), "\n") > 0 {
			t.Errorf("%s: exit %d, stderr %q; want 2 and one line with %q", name, code, se, c.want)
		}
	}
	if code, _, se := runArgs(t, "design", "--plan", writePlan(t, dir, "nodesign.toml", demoPlan)); code != 2 || !strings.Contains(se, "[design]") {
		t.Errorf("plan without [design]: exit %d, %q", code, se)
	}
}

// TestDesignInfeasibleExit1: a constraint no setting in range can meet
// prints the report and exits 1 with one line naming the constraint and its
// shortfall at the closest candidate.
func TestDesignInfeasibleExit1(t *testing.T) {
	dir := t.TempDir()
	p := writePlan(t, dir, "p.toml", strings.Replace(designPlan, `min-period = "2 um"`, `min-period = "50 um"`, 1))
	code, out, se := runArgs(t, "design", "--plan", p, "--no-check", "--evaluations", "200", "--quiet")
	if code != 1 {
		t.Fatalf("exit %d, want 1 (stderr %q)", code, se)
	}
	if !strings.Contains(se, "min-period off by") || strings.Count(strings.TrimSpace(se), "\n") > 0 {
		t.Errorf("stderr %q: want one line naming min-period and its shortfall", se)
	}
	if !strings.Contains(out, "No feasible setting") || !strings.Contains(out, "Cautions") {
		t.Errorf("report missing:\n%s", out)
	}
}
