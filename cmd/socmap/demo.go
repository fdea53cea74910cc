package main

import (
	_ "embed"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/spf13/cobra"

	"socmap/output"
)

//go:embed plans/demo.toml
var demoPlan string

// demoSequence is the built-in example sequence (plans/sequence.toml).
//
//go:embed plans/sequence.toml
var demoSequence string

//go:embed plans/design.toml
var designPlan string

// calibrateExample is synthetic Doppler-slope data of our own for the demo's
// calibrate step (same content as testdata/calibrate_example.csv).
//
//go:embed plans/calibrate_example.csv
var calibrateExample string

// demoStep is one command of the demo and the file its printed output goes to.
type demoStep struct {
	args   []string
	report string // file name for the printed table
	what   string
}

func newDemoCmd() *cobra.Command {
	var dir string
	c := &cobra.Command{
		Use:   "demo",
		Short: "run the built-in example plan end to end into ./socmap-demo/",
		Long: `Runs socmap on a built-in example plan (an invented 87Rb shaking-scheme
setting of our own, printed into the output folder as plan.toml) and writes
every result, plot and a short report listing each file to --dir. An existing,
non-empty --dir is refused unless --force is given.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if dir == "" {
				return usagef("--dir \"\": give a folder for the demo's files")
			}
			if entries, err := os.ReadDir(dir); err == nil && len(entries) > 0 && !g.force {
				return usagef("--dir %q: exists and is not empty (an earlier demo, perhaps with an edited plan.toml); use --force to overwrite it or choose another --dir", dir)
			} else if err != nil && !os.IsNotExist(err) {
				return usagef("--dir %q: %v", dir, err)
			}
			if err := os.MkdirAll(dir, 0o755); err != nil {
				return fmt.Errorf("--dir %q: %v", dir, err)
			}
			planPath := filepath.Join(dir, "plan.toml")
			if err := output.WriteFileAtomic(planPath, true, func(w io.Writer) error {
				_, err := io.WriteString(w, demoPlan)
				return err
			}); err != nil {
				return err
			}
			p := func(name string) string { return filepath.Join(dir, name) }
			if err := output.WriteFileAtomic(p("calibrate-example.csv"), true, func(w io.Writer) error {
				_, err := io.WriteString(w, calibrateExample)
				return err
			}); err != nil {
				return err
			}
			if err := output.WriteFileAtomic(p("design.toml"), true, func(w io.Writer) error {
				_, err := io.WriteString(w, designPlan)
				return err
			}); err != nil {
				return err
			}
			steps := []demoStep{
				{[]string{"scheme", "shake", "--out", p("shake.h5")}, "shake.txt", "effective parameters of the shaking scheme"},
				{[]string{"scheme", "raman", "--out", p("raman.h5")}, "raman.txt", "the Raman scheme used for comparison"},
				{[]string{"bands", "--out", p("bands.png"), "--out", p("bands.csv"), "--out", p("bands.h5")}, "bands.txt", "single-particle bands of the shaking scheme's effective model"},
				{[]string{"compare"}, "compare.txt", "shaking vs Raman: stripe windows, periods, limits, verdict"},
				{[]string{"map", "--x", "rabi=0:40 Hz:81", "--y", "phase=0:80 deg:41", "--out", p("map-rabi-phase.h5"), "--out", p("map-rabi-phase.png")}, "map-rabi-phase.txt", "variational phase map over RF Rabi frequency and pulse phase"},
				{[]string{"map", "--method", "gpe", "--x", "rabi=0.5:40 Hz:40", "--y", "phase=0:60 deg:13", "--out", p("map-gpe.h5"), "--out", p("map-gpe.png")}, "map-gpe.txt", "the same window from 1D GPE ground states, disagreements with the variational theory marked"},
				{[]string{"ground", "--dims", "1", "--atoms", "2e4", "--trap", "20,200,200", "--out", p("ground-trap.h5"), "--out", p("ground-trap.png")}, "ground-trap.txt", "GPE ground state of 2e4 atoms in an elongated trap"},
				{[]string{"verify", "--out", p("verify.h5"), "--out", p("verify.png")}, "verify.txt", "shaken dynamics without the cycle average: measured k_t, Doppler slope, Rabi frequency"},
				{[]string{"calibrate", "--data", p("calibrate-example.csv"), "--out", p("calibrate.png")}, "calibrate.txt", "recoil and phase lag fitted from (synthetic) Doppler slopes"},
				{[]string{"sequence", "--out", p("sequence.h5"), "--out", p("sequence.png"), "--out", p("sequence.gif"), "--plan", p("sequence.toml")}, "sequence.txt", "the coupling ramped on in real time, hold, release: can the stripes be seen?"},
				{[]string{"design", "--evaluations", "1500", "--out", p("design.h5"), "--out", p("design.png"), "--plan", p("design.toml")}, "design.txt", "inverse design: the most robust stripe within the example's hardware ranges"},
			}
			if err := output.WriteFileAtomic(p("sequence.toml"), true, func(w io.Writer) error {
				_, err := io.WriteString(w, demoSequence)
				return err
			}); err != nil {
				return err
			}
			var report strings.Builder
			fmt.Fprintf(&report, "socmap %s demo — built-in example plan (invented setting, see plan.toml)\n\n", version)
			for _, s := range steps {
				full := append(append([]string{}, s.args...), "--force")
				if !slices.Contains(s.args, "--plan") {
					full = append(full, "--plan", planPath)
				}
				if !g.quiet {
					fmt.Fprintf(os.Stderr, "demo: socmap %s\n", strings.Join(full, " "))
				}
				out, err := runSelf(full)
				if err != nil {
					return fmt.Errorf("demo step %q: %w", s.args[0], err)
				}
				if err := output.WriteFileAtomic(p(s.report), true, func(w io.Writer) error {
					_, err := io.WriteString(w, out)
					return err
				}); err != nil {
					return err
				}
				fmt.Fprintf(&report, "== socmap %s\n%s\n", strings.Join(full, " "), out)
			}
			fmt.Fprintf(&report, "Files in %s:\n", dir)
			files := []struct{ name, what string }{
				{"plan.toml", "the example plan (all settings)"},
				{"shake.h5, shake.txt", "shaking scheme: recoil, E_R, Ω/E_R, δ/E_R, micromotion, validity warnings"},
				{"raman.h5, raman.txt", "Raman scheme at 790 nm for comparison"},
				{"bands.png", "E±(k) coloured by spin polarisation, minima marked; ⟨σz⟩(k)"},
				{"bands.csv, bands.h5, bands.txt", "the band curves and minima"},
				{"compare.txt", "shaking vs Raman at 1e14 cm^-3: stripe window, period, contrast, limits, verdict"},
				{"map-rabi-phase.png, .h5, .txt", "mean-field phase over Rabi frequency × pulse phase (variational)"},
				{"map-gpe.png, .h5, .txt", "GPE phase map over Rabi frequency × pulse phase, GPE ≠ variational points marked"},
				{"ground-trap.png, .h5, .txt", "trapped GPE ground state: densities along x, momentum distribution, variational check"},
				{"verify.png, .h5, .txt", "spin-flip spectra per velocity and resonance centre vs velocity against the model"},
				{"calibrate-example.csv", "synthetic Doppler-slope data of our own (gradient 85 % of nominal, 12° lag, 4 Hz/(mm/s) noise)"},
				{"calibrate.png, .txt", "fit of k_t(θ) = k_max cos(θ − θ_lag) to those data"},
				{"sequence.toml", "the example sequence (ramp, hold, time of flight)"},
				{"sequence.png, .gif, .h5, .txt", "real-time sequence: overlap, Ω, energy against time, final image and verdict; density animation; snapshots"},
				{"design.toml", "example design plan: the [design] table with free ranges, constraints, objective"},
				{"design.png, .h5, .txt", "inverse design: best distinct candidates, margins, binding constraint, check; every evaluation; trade-off plot"},
			}
			for _, f := range files {
				fmt.Fprintf(&report, "  %-32s %s\n", f.name, f.what)
			}
			text := report.String()
			if err := output.WriteFileAtomic(p("report.txt"), true, func(w io.Writer) error {
				_, err := io.WriteString(w, text)
				return err
			}); err != nil {
				return err
			}
			fmt.Fprint(cmd.OutOrStdout(), text)
			return nil
		},
	}
	c.Flags().StringVar(&dir, "dir", "socmap-demo", "output folder")
	return c
}

// runSelf runs a socmap command line in-process and returns what it printed.
func runSelf(args []string) (string, error) {
	saved := g
	defer func() { g = saved }()
	var buf strings.Builder
	root := newRoot()
	root.SetArgs(args)
	root.SetOut(&buf)
	err := root.Execute()
	return buf.String(), err
}
