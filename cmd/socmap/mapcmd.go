package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"socmap/output"
	"socmap/phases"
	"socmap/phases/label"
)

// axisKind is the quantity kind of each map axis (values stored in SI or E_R).
var axisKind = map[string]Kind{
	"omega": KindNumber, "delta": KindNumber, "G1": KindNumber, "G2": KindNumber, "ratio": KindNumber,
	"density": KindDensity, "gradient": KindGradient, "shake": KindFrequency, "phase": KindAngle,
	"bias": KindField, "rabi": KindFrequency, "wavelength": KindLength, "angle": KindAngle,
}

// parseAxis reads NAME=LO:HI:N; LO and HI take units (LO may borrow HI's).
func parseAxis(flag, s string) (phases.Axis, error) {
	var a phases.Axis
	name, rng, ok := strings.Cut(s, "=")
	bad := func(why string) (phases.Axis, error) {
		return a, usagef("--%s %q: %s (form NAME=LO:HI:N, e.g. omega=0:4:81 or \"phase=0:180 deg:37\"; NAME one of %s)",
			flag, s, why, strings.Join(phases.LabAxisNames(), ", "))
	}
	if !ok {
		return bad("missing '='")
	}
	name = strings.TrimSpace(name)
	k, known := axisKind[name]
	if !known {
		return bad("unknown axis name " + strconv.Quote(name))
	}
	parts := strings.Split(rng, ":")
	if len(parts) != 3 {
		return bad("need LO:HI:N")
	}
	n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
	if err != nil || n < 1 || n > 100000 {
		return bad("N must be an integer from 1 to 100000")
	}
	hiText := strings.TrimSpace(parts[1])
	loText := strings.TrimSpace(parts[0])
	hi, err := parseQuantity(hiText, k)
	if err != nil {
		return bad("HI: " + err.Error())
	}
	lo, err := parseQuantity(loText, k)
	if err != nil && k != KindNumber {
		// borrow HI's unit
		unit := strings.TrimLeft(hiText, "0123456789.+-eE ")
		lo, err = parseQuantity(loText+" "+unit, k)
	}
	if err != nil {
		return bad("LO: " + err.Error())
	}
	a.Name, a.Unit = name, phases.LabAxes[name]
	a.Values = make([]float64, n)
	for i := range a.Values {
		if n == 1 {
			a.Values[i] = lo
		} else {
			a.Values[i] = lo + (hi-lo)*float64(i)/float64(n-1)
		}
	}
	return a, nil
}

func newMapCmd() *cobra.Command {
	var mf modelFlags
	var inf interFlags
	var xs, ys, method string
	var outs []string
	var workers int
	c := &cobra.Command{
		Use:   "map",
		Short: "phase diagram over one or two parameters (variational mean-field theory)",
		Long: `Fills a one- or two-axis map with the mean-field phase (single-minimum,
plane-wave, stripe), energy, stripe k1, contrast, ⟨σz⟩ and the energy gap to
the competing phase. Axes: omega, delta (E_R), G1, G2 (E_R), density, ratio
(g↑↓/g), and the schemes' lab settings gradient, shake, phase, bias, rabi
(shake) or rabi, wavelength, angle (raman), which go through the whole
scheme → effective-model chain at every point.`,
		Example: `  socmap map --omega-er 1 --G1 1 --x omega=0:5:101 --y G2=-0.2:0.6:81 --out map.png --out map.h5
  socmap map --plan socmap-demo/plan.toml --density "1e14 cm^-3" --x "phase=0:180 deg:61" --y "gradient=20:150 G/cm:41" --out pg.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if method != "variational" {
				return usagef("--method %q: allowed: variational", method)
			}
			lab, err := mf.lab()
			if err != nil {
				return err
			}
			if err := inf.apply(&lab, &mf.shake.atomFlags); err != nil {
				return err
			}
			if xs == "" {
				return usagef("--x is required (NAME=LO:HI:N)")
			}
			sw := phases.Sweep{Observables: phases.VariationalObservables}
			if sw.X, err = parseAxis("x", xs); err != nil {
				return err
			}
			if ys != "" {
				if sw.Y, err = parseAxis("y", ys); err != nil {
					return err
				}
				if sw.Y.Name == sw.X.Name {
					return usagef("--y %q: same axis as --x", ys)
				}
			}
			if err := checkOuts(outs, ".h5", ".png", ".json"); err != nil {
				return err
			}
			if workers < 0 {
				return usagef("--workers %d: must be ≥ 0 (0 = all cores)", workers)
			}
			// Validate the chain at the corners before the run.
			problem := func(ix, iy int) (phases.Uniform, error) {
				l, err := lab.Set(sw.X.Name, sw.X.Values[ix])
				if err == nil && sw.Y.Len() > 0 {
					l, err = l.Set(sw.Y.Name, sw.Y.Values[iy])
				}
				if err != nil {
					return phases.Uniform{}, err
				}
				u, _, err := l.Resolve()
				return u, err
			}
			nx, ny := sw.Shape()
			for _, p := range [][2]int{{0, 0}, {nx - 1, ny - 1}} {
				if _, err := problem(p[0], p[1]); err != nil {
					return usagef("map settings: %v", err)
				}
			}
			data := output.NewMapData(output.MapSpec{Sweep: sw, Method: "variational", Attrs: map[string]any{
				"threshold_single_minimum_k": label.DefaultThresholds.SingleMinimumK,
				"threshold_stripe_minority":  label.DefaultThresholds.StripeMinority,
				"scheme":                     lab.Scheme,
			}})
			rs := &phases.RunSettings{Workers: workers, Progress: progressBar(cmd, "map")}
			res, err := phases.Run(context.Background(), sw, phases.VariationalPoints(problem, nil), data, rs)
			if err != nil {
				return fmt.Errorf("map: %w", err)
			}
			title := fmt.Sprintf("Mean-field phase diagram (variational), %s", mapSubtitle(lab))
			mp := output.MapPlot{Data: data, Title: title, Boundaries: symmetricBoundaries(lab, sw)}
			for _, o := range outs {
				var err error
				switch strings.ToLower(filepath.Ext(o)) {
				case ".png":
					err = output.WriteFileAtomic(o, g.force, mp.WritePNG)
				case ".h5":
					err = output.WriteMap(o, g.force, runInfo(cmd, "map"), data)
				case ".json":
					err = output.WriteFileAtomic(o, g.force, func(w io.Writer) error { return writeJSON(w, mapJSON(data)) })
				}
				if err != nil {
					return err
				}
			}
			if g.json {
				return writeJSON(cmd.OutOrStdout(), mapJSON(data))
			}
			return mapTable(data, res, lab).Write(cmd.OutOrStdout())
		},
	}
	fs := c.Flags()
	mf.add(fs)
	inf.add(fs)
	fs.StringVar(&xs, "x", "", "x axis NAME=LO:HI:N")
	fs.StringVar(&ys, "y", "", "y axis NAME=LO:HI:N (optional)")
	fs.StringVar(&method, "method", "variational", "method: variational")
	fs.IntVar(&workers, "workers", 0, "parallel workers (0 = all cores)")
	fs.StringSliceVar(&outs, "out", nil, "write FILE.h5 (map), FILE.png (phase diagram), FILE.json (repeatable)")
	return c
}

func mapSubtitle(l phases.Lab) string {
	switch l.Scheme {
	case "shake":
		return "shaking scheme, " + l.Shake.Species.Name
	case "raman":
		return "Raman scheme, " + l.Raman.Species.Name
	}
	return "direct model"
}

// symmetricBoundaries returns the closed-form boundaries of the symmetric
// case (g↑↑ = g↓↓, δ = 0) when one axis is omega and the other G2 (or there
// is no other axis), in displayed units; nil when they do not apply.
func symmetricBoundaries(l phases.Lab, sw phases.Sweep) []output.Boundary {
	u, _, err := l.Resolve()
	if err != nil || u.Delta != 0 || math.Abs(u.Guu-u.Gdd) > 1e-12*math.Abs(u.Guu) || l.DeltaSet && l.Delta != 0 {
		return nil
	}
	g1, _, _ := u.Couplings()
	var other phases.Axis
	var omegaIsX bool
	switch {
	case sw.X.Name == "omega" && sw.Y.Name == "G2":
		other, omegaIsX = sw.Y, true
	case sw.Y.Name == "omega" && sw.X.Name == "G2":
		other = sw.X
	default:
		return nil
	}
	if l.G1Set {
		g1 = l.G1
	}
	lo, hi := other.Values[0], other.Values[len(other.Values)-1]
	var up, pw output.Boundary
	up.Name = "stripe edge (closed form)"
	pw.Name = "plane-wave | single-minimum: Ω = 4(1 − G2)"
	g2t := phases.TricriticalG2(g1)
	for i := 0; i <= 400; i++ {
		g2 := lo + (hi-lo)*float64(i)/400
		o := phases.UpperStripeOmega(g1, g2)
		if g2 > 0 {
			add(&up, omegaIsX, o, g2)
		}
		if g2 <= g2t {
			add(&pw, omegaIsX, phases.PlaneWaveSingleMinimumOmega(g2), g2)
		}
	}
	return []output.Boundary{up, pw}
}

func add(b *output.Boundary, omegaIsX bool, omega, g2 float64) {
	if omegaIsX {
		b.X, b.Y = append(b.X, omega), append(b.Y, g2)
	} else {
		b.X, b.Y = append(b.X, g2), append(b.Y, omega)
	}
}

func mapJSON(d *output.MapData) map[string]any {
	sw := d.Spec.Sweep
	axis := func(a phases.Axis) map[string]any {
		return map[string]any{"name": a.Name, "unit": a.Unit, "values": a.Values}
	}
	names := make([][]string, d.NY)
	energy := make([][]any, d.NY)
	e := d.Observable("energy")
	for iy := range names {
		names[iy] = make([]string, d.NX)
		energy[iy] = make([]any, d.NX)
		for ix := range names[iy] {
			names[iy][ix] = d.Phase[iy*d.NX+ix].String()
			energy[iy][ix] = output.JSONNum(e[iy*d.NX+ix])
		}
	}
	doc := map[string]any{"x": axis(sw.X), "method": d.Spec.Method, "phase_codes": label.Legend()}
	if sw.Y.Len() > 0 {
		doc["y"] = axis(sw.Y)
		doc["phase"], doc["energy_over_ER"] = names, energy
	} else {
		doc["phase"], doc["energy_over_ER"] = names[0], energy[0]
	}
	return doc
}

func mapTable(d *output.MapData, res phases.RunResult, l phases.Lab) *output.Table {
	t := &output.Table{Title: fmt.Sprintf("Phase map (%s), %s: %d × %d points in %s", d.Spec.Method, mapSubtitle(l), d.NX, d.NY, res.Elapsed.Round(time.Millisecond))}
	counts := map[label.Phase]int{}
	for _, p := range d.Phase {
		counts[p]++
	}
	t.Section("Points per phase")
	for _, p := range label.All[1:] {
		t.Row(p.String(), strconv.Itoa(counts[p]), "")
	}
	if d.NY == 1 {
		t.Section("Along " + d.Spec.Sweep.X.Name)
		xl, xsc := output.AxisDisplay(d.Spec.Sweep.X.Name, d.Spec.Sweep.X.Unit)
		start := 0
		for i := 1; i <= d.NX; i++ {
			if i == d.NX || d.Phase[i] != d.Phase[start] {
				t.Row(fmt.Sprintf("%s … %s", output.Num(d.Spec.Sweep.X.Values[start]*xsc, 4), output.Num(d.Spec.Sweep.X.Values[i-1]*xsc, 4)), d.Phase[start].String(), "")
				start = i
			}
		}
		t.Text("(" + xl + ")")
	}
	t.Text(fmt.Sprintf("classifier thresholds: single-minimum below |k| = %g k_R, stripe from minority weight %g",
		label.DefaultThresholds.SingleMinimumK, label.DefaultThresholds.StripeMinority))
	return t
}

// progressBar returns a progress callback that draws on stderr when it is a
// terminal and --quiet is not set.
func progressBar(cmd *cobra.Command, what string) func(done, total int, elapsed time.Duration) {
	if g.quiet {
		return nil
	}
	st, err := os.Stderr.Stat()
	if err != nil || st.Mode()&os.ModeCharDevice == 0 {
		return nil
	}
	last := time.Time{}
	return func(done, total int, elapsed time.Duration) {
		if time.Since(last) < 200*time.Millisecond && done < total {
			return
		}
		last = time.Now()
		rate := float64(done) / math.Max(elapsed.Seconds(), 1e-9)
		left := time.Duration(float64(total-done) / math.Max(rate, 1e-9) * 1e9).Round(time.Second)
		fmt.Fprintf(os.Stderr, "\r%s: %d/%d points, %.0f/s, %s left   ", what, done, total, rate, left)
		if done == total {
			fmt.Fprintln(os.Stderr)
		}
	}
}
