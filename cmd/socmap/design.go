package main

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"github.com/BurntSushi/toml"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"socmap/output"
	"socmap/phases"
)

// The [design] table of a plan: the problem of `socmap design` (the fixed
// settings are the plan's ordinary keys). Every key:
//
//	scheme     = "shake" | "raman"               which scheme's settings are searched (default shake)
//	objective  = "field"                          window | field | contrast | period, or a product "window*field^0.5"
//	gradient   = "20:150 G/cm"                    a free setting: LO:HI with a unit (on either end or both)
//	waveform   = "sine,square"                    a categorical free setting: the choices
//	detuning   = "balanced"                       the RF (raman-detuning: two-photon) detuning puts δ at δ_b
//	min-scale-separation = 10                     hard constraints (designConstraintKeys); "off" switches
//	…                                             the defaulted ones off
var designRangeKinds = map[string]Kind{
	"gradient": KindGradient, "shake": KindFrequency, "phase": KindAngle, "pulse-width": KindTime,
	"rabi": KindFrequency, "bias": KindField, "detuning": KindFrequency,
	"wavelength": KindLength, "angle": KindAngle, "raman-rabi": KindFrequency, "raman-detuning": KindFrequency,
}

// designConstraintKeys: the hard constraints, their kind and whether "off"
// is allowed (the defaulted thresholds of the cycle average).
var designConstraintKeys = map[string]struct {
	kind Kind
	off  bool
	set  func(l *phases.DesignLimits, v float64)
}{
	"min-scale-separation":     {KindNumber, true, func(l *phases.DesignLimits, v float64) { l.MinScaleSeparation = v }},
	"max-pulse-area":           {KindAngle, true, func(l *phases.DesignLimits, v float64) { l.MaxPulseArea = v }},
	"max-micromotion":          {KindNumber, true, func(l *phases.DesignLimits, v float64) { l.MaxMicromotion = v }},
	"max-spread":               {KindNumber, true, func(l *phases.DesignLimits, v float64) { l.MaxSpread = v }},
	"max-dephasing":            {KindNumber, true, func(l *phases.DesignLimits, v float64) { l.MaxDephasing = v }},
	"min-neighbour-separation": {KindNumber, true, func(l *phases.DesignLimits, v float64) { l.MinNeighbourSeparation = v }},
	"max-scattering":           {KindNumber, false, func(l *phases.DesignLimits, v float64) { l.MaxScattering = v }},
	"min-period":               {KindLength, false, func(l *phases.DesignLimits, v float64) { l.MinPeriod = v }},
	"min-contrast":             {KindNumber, false, func(l *phases.DesignLimits, v float64) { l.MinContrast = v }},
}

func designKeyNames() []string {
	k := []string{"scheme", "objective", "waveform"}
	for n := range designRangeKinds {
		k = append(k, n)
	}
	for n := range designConstraintKeys {
		k = append(k, n)
	}
	sort.Strings(k)
	return k
}

// checkDesignKeys validates the key names of a [design] table (every command
// does, so that a typo is caught whichever command reads the plan).
func checkDesignKeys(t map[string]any) error {
	for k, v := range t {
		if _, nested := v.(map[string]any); nested {
			return fmt.Errorf("%q: tables inside [design] are not allowed", k)
		}
		_, rk := designRangeKinds[k]
		_, ck := designConstraintKeys[k]
		if !rk && !ck && k != "scheme" && k != "objective" && k != "waveform" {
			return fmt.Errorf("unknown key %q; allowed: %s", k, strings.Join(designKeyNames(), ", "))
		}
	}
	return nil
}

func init() { planTables["design"] = checkDesignKeys }

// planValue turns a decoded TOML value into the text a flag would take.
func planValue(v any) string {
	if a, ok := v.([]any); ok {
		parts := make([]string, len(a))
		for i, e := range a {
			parts[i] = fmt.Sprint(e)
		}
		return strings.Join(parts, ",")
	}
	return fmt.Sprint(v)
}

// parseRange reads "LO:HI UNIT", "LO UNIT:HI UNIT" or "LO:HI" (numbers).
// The unit of HI (else of LO) names the unit the values are written in.
func parseRange(key, text string, k Kind) (phases.FreeSetting, error) {
	f := phases.FreeSetting{Name: key}
	bad := func(why string) error {
		return usagef("[design] %s = %q: %s (give LO:HI with a unit, e.g. %s)", key, text, why, rangeExample(k))
	}
	lo, hi, ok := strings.Cut(text, ":")
	if !ok || strings.Contains(hi, ":") {
		return f, bad("not a range")
	}
	lo, hi = strings.TrimSpace(lo), strings.TrimSpace(hi)
	if lo == "" || hi == "" {
		return f, bad("empty range")
	}
	unit := func(s string) string {
		i := strings.IndexFunc(s, func(r rune) bool {
			return !(r >= '0' && r <= '9' || r == '.' || r == '+' || r == '-' || r == 'e' || r == 'E')
		})
		if i < 0 {
			return ""
		}
		return strings.TrimSpace(s[i:])
	}
	ul, uh := unit(lo), unit(hi)
	u := uh
	if u == "" {
		u = ul
	}
	if k != KindNumber {
		if u == "" {
			return f, bad("missing unit")
		}
		if ul == "" {
			lo += " " + u
		}
		if uh == "" {
			hi += " " + u
		}
	}
	var err error
	if f.Lo, err = parseQuantity(lo, k); err != nil {
		return f, bad("LO: " + err.Error())
	}
	if f.Hi, err = parseQuantity(hi, k); err != nil {
		return f, bad("HI: " + err.Error())
	}
	f.Unit, f.Factor = u, 1
	if k != KindNumber {
		if f.Factor, err = parseQuantity("1 "+u, k); err != nil {
			return f, bad(err.Error())
		}
	}
	if f.Lo > f.Hi {
		return f, usagef("[design] %s = %q: LO > HI", key, text)
	}
	if f.Lo == f.Hi {
		return f, usagef("[design] %s = %q: empty range (LO = HI); give a fixed value with --%s instead", key, text, key)
	}
	return f, nil
}

func rangeExample(k Kind) string {
	return map[Kind]string{KindGradient: `"20:150 G/cm"`, KindFrequency: `"2:6 kHz"`, KindAngle: `"0:60 deg"`,
		KindTime: `"5:40 us"`, KindField: `"20:120 G"`, KindLength: `"770:800 nm"`}[k]
}

// designFlags are the run settings of `socmap design` (the problem is the
// plan's [design] table and fixed settings).
type designFlags struct {
	sf                         shakeFlags
	rf                         ramanFlags
	inf                        interFlags
	tf                         trapFlags
	outs                       []string
	seed                       uint64
	evaluations, restarts, top int
	workers                    int
	noCheck                    bool
	verifyTol                  *quantity
}

// designRunFlags are run-only: not settings of a candidate.
var designRunFlags = map[string]bool{"plan": true, "json": true, "quiet": true, "force": true, "help": true, "out": true,
	"seed": true, "evaluations": true, "restarts": true, "top": true, "workers": true, "no-check": true, "verify-tolerance": true}

func newDesignCmd() *cobra.Command {
	var f designFlags
	c := &cobra.Command{
		Use:   "design",
		Short: "inverse design: the lab settings that give the most robust stripe within hardware limits",
		Long: `Searches the free settings of the plan's [design] table (ranges such as
gradient = "20:150 G/cm") for the largest objective (window: distance of the
planned Rabi frequency from the stripe-window edge in Hz; field: the bias-field
stability the detuning window needs, in µG; contrast; period; or a weighted
product) under hard constraints (validity of the cycle average, micromotion,
pulse dephasing, leakage to the third level, photon scattering, stripe period,
contrast). Every candidate runs the whole chain scheme → effective model →
variational phase → stripe windows. CMA-ES with restarts, each polished by
Nelder–Mead (gonum optimize), all cores; the same seed gives the same result.
The best distinct candidates are checked in turn with the time-dependent
verification and a 1D GPE ground state until one passes.`,
		Example: `  socmap design --plan socmap-demo/design.toml --out design.png --out design.h5`,
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, args []string) error { return runDesign(cmd, &f) },
	}
	fs := c.Flags()
	f.sf.add(fs)
	f.rf.add(fs, false, "raman-")
	f.inf.add(fs)
	f.tf.add(fs)
	fs.StringSliceVar(&f.outs, "out", nil, "write FILE.h5 (every evaluated candidate), FILE.png (trade-off plot), FILE.json (repeatable)")
	fs.Uint64Var(&f.seed, "seed", 1, "seed of the search (same seed, same result)")
	fs.IntVar(&f.evaluations, "evaluations", 4000, "budget of chain evaluations")
	fs.IntVar(&f.restarts, "restarts", 4, "CMA-ES searches per combination of choices")
	fs.IntVar(&f.top, "top", 5, "number of distinct candidates reported")
	fs.IntVar(&f.workers, "workers", 0, "parallel searches (0: all cores)")
	fs.BoolVar(&f.noCheck, "no-check", false, "do not check the candidates with verify and a GPE ground state")
	f.verifyTol = qflag(fs, "verify-tolerance", KindNumber, "0.1", "largest relative deviation of the verified k_t and Rabi frequency")
	return c
}

func runDesign(cmd *cobra.Command, f *designFlags) error {
	if err := checkOuts(f.outs, ".h5", ".png", ".json"); err != nil {
		return err
	}
	for _, c := range []struct {
		n    string
		v, m int
	}{{"evaluations", f.evaluations, 1}, {"restarts", f.restarts, 1}, {"top", f.top, 1}, {"workers", f.workers, 0}} {
		if c.v < c.m {
			return usagef("--%s %d: must be ≥ %d", c.n, c.v, c.m)
		}
	}
	if !(f.verifyTol.v > 0) {
		return usagef("--verify-tolerance %q: must be positive", f.verifyTol.text)
	}
	p, err := designProblem(cmd, f)
	if err != nil {
		return err
	}
	set := &phases.DesignSettings{Seed: f.seed, Evaluations: f.evaluations, Restarts: f.restarts, Top: f.top,
		Workers: f.workers, SkipCheck: f.noCheck, VerifyTolerance: f.verifyTol.v, Progress: designProgress()}
	res, err := phases.Design(p, set)
	if errors.Is(err, phases.ErrInput) {
		return usagef("%v", err)
	}
	if err != nil {
		return err
	}
	cautions := []string{cautionCoils}
	if p.Scheme == "raman" {
		cautions = []string{cautionLasers}
	}
	rep := &output.DesignReport{DesignResult: res, Cautions: cautions}
	doc := rep.JSON()
	for _, o := range f.outs {
		var err error
		switch strings.ToLower(filepath.Ext(o)) {
		case ".png":
			err = output.WriteFileAtomic(o, g.force, rep.WritePNG)
		default:
			err = writeResult(cmd, o, "design", doc, rep.WriteH5)
		}
		if err != nil {
			return err
		}
	}
	if g.json {
		err = writeJSON(cmd.OutOrStdout(), doc)
	} else {
		err = rep.Table().Write(cmd.OutOrStdout())
	}
	if err != nil {
		return err
	}
	if res.Status == phases.DesignInfeasible {
		var parts []string
		for _, m := range res.Unmet {
			if m.Key == "stripe" {
				parts = append(parts, "no "+m.Name)
			} else {
				parts = append(parts, fmt.Sprintf("%s off by %s%% (%s %s, limit %s)", m.Key, output.Num(-100*m.Margin, 3), m.Name, output.Num(m.Value, 4), output.Num(m.Limit, 3)))
			}
		}
		if len(parts) == 0 {
			parts = append(parts, "every setting was refused by the chain")
		}
		return fmt.Errorf("design: no setting meets the hard constraints; at the closest candidate: %s", strings.Join(parts, "; "))
	}
	return nil
}

// designProgress draws the search's progress on stderr (a terminal, not --quiet).
func designProgress() func(done, total int) {
	if g.quiet || !isTerminal(os.Stderr) {
		return nil
	}
	start := time.Now()
	return func(done, total int) {
		el := time.Since(start).Seconds()
		rate := float64(done) / math.Max(el, 1e-9)
		fmt.Fprintf(os.Stderr, "\rdesign: %d/%d evaluations, %.0f/s   ", done, total, rate)
		if done >= total {
			fmt.Fprintln(os.Stderr)
		}
	}
}

// designTable decodes the plan's [design] table (nil without one).
func designTable() (map[string]any, error) {
	if g.planText == "" {
		return nil, nil
	}
	var data map[string]any
	if _, err := toml.Decode(strings.TrimPrefix(g.planText, "\ufeff"), &data); err != nil {
		return nil, usagef("--plan %s: not valid TOML: %v", g.plan, strings.ReplaceAll(err.Error(), "\n", " "))
	}
	t, _ := data["design"].(map[string]any)
	return t, nil
}

// designProblem builds the library problem from the plan's [design] table
// and the flags (fixed settings).
func designProblem(cmd *cobra.Command, f *designFlags) (phases.DesignProblem, error) {
	var p phases.DesignProblem
	t, err := designTable()
	if err != nil {
		return p, err
	}
	if t == nil {
		return p, usagef("design needs --plan with a [design] table (free ranges, constraints, objective; socmap demo writes an example to socmap-demo/design.toml)")
	}
	text := map[string]string{}
	for k, v := range t {
		text[k] = planValue(v)
	}
	p.Scheme = "shake"
	if s, ok := text["scheme"]; ok {
		p.Scheme = strings.TrimSpace(s)
		if p.Scheme != "shake" && p.Scheme != "raman" {
			return p, usagef("[design] scheme = %q: allowed: shake, raman", s)
		}
	}
	o, ok := text["objective"]
	if !ok {
		return p, usagef("[design] objective is required: window, field, contrast, period or a product such as \"window*field^0.5\"")
	}
	if p.Objective, err = phases.ParseObjective(o); err != nil {
		return p, usagef("[design] %v", err)
	}
	allowed := map[string][]string{
		"shake": {"gradient", "shake", "phase", "pulse-width", "rabi", "bias", "detuning", "waveform"},
		"raman": {"wavelength", "angle", "raman-rabi", "raman-detuning", "bias"},
	}[p.Scheme]
	free := map[string]bool{}
	keys := make([]string, 0, len(text))
	for k := range text {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		v := text[k]
		if _, isRange := designRangeKinds[k]; !isRange && k != "waveform" {
			continue
		}
		ok := false
		for _, a := range allowed {
			ok = ok || a == k
		}
		if !ok {
			return p, usagef("[design] %s: not a setting of the %s scheme; free settings of %s: %s", k, p.Scheme, p.Scheme, strings.Join(allowed, ", "))
		}
		switch {
		case k == "waveform":
			var ch []string
			for _, c := range strings.Split(v, ",") {
				if c = strings.TrimSpace(c); c != "" {
					ch = append(ch, c)
				}
			}
			if len(ch) == 0 {
				return p, usagef("[design] waveform = %q: give the choices, e.g. \"sine,square\"", v)
			}
			p.Free = append(p.Free, phases.FreeSetting{Name: k, Choices: ch})
		case (k == "detuning" || k == "raman-detuning") && strings.TrimSpace(v) == "balanced":
			p.BalanceDetuning = true
			free[k] = true
			continue
		default:
			fr, err := parseRange(k, v, designRangeKinds[k])
			if err != nil {
				return p, err
			}
			p.Free = append(p.Free, fr)
			// A placeholder for a required flag; the search replaces it.
			if fl := cmd.Flags().Lookup(k); fl != nil && fl.Value.String() == "" {
				if err := fl.Value.Set(fr.Text(fr.Lo)); err != nil {
					return p, usagef("[design] %s = %q: %v", k, v, err)
				}
			}
		}
		free[k] = true
	}
	for _, k := range keys {
		c, ok := designConstraintKeys[k]
		if !ok {
			continue
		}
		v := strings.TrimSpace(text[k])
		if v == "off" {
			if !c.off {
				return p, usagef("[design] %s = \"off\": this constraint is off unless given; remove the key", k)
			}
			c.set(&p.Limits, -1)
			continue
		}
		x, err := parseQuantity(v, c.kind)
		if err != nil {
			return p, usagef("[design] %s = %q: %v", k, v, err)
		}
		if !(x > 0) {
			return p, usagef("[design] %s = %q: must be positive (\"off\" switches a threshold off)", k, v)
		}
		c.set(&p.Limits, x)
	}

	// Fixed settings and the schemes.
	sf := &f.sf
	if p.Scheme == "shake" {
		if p.Shake, err = sf.build(); err != nil {
			return p, err
		}
	} else {
		sp, err := sf.species()
		if err != nil {
			return p, err
		}
		up, down, err := sf.levels(sp)
		if err != nil {
			return p, err
		}
		if err := require(sf.bias, "bias", "60 G"); err != nil {
			return p, usagef("%v (the bias field turns the detuning window into a field stability)", err)
		}
		p.Shake.Species, p.Shake.Up, p.Shake.Down, p.Shake.Bias = sp, up, down, sf.bias.v
		if p.Raman, err = f.rf.build(&sf.atomFlags, sf.bias, true); err != nil {
			return p, err
		}
	}
	if p.Couplings, err = f.inf.couplings(&sf.atomFlags); err != nil {
		return p, err
	}
	if p.Density, p.Trap, err = densityOrTrap(&f.inf, &f.tf); err != nil {
		return p, err
	}
	p.Fixed = map[string]string{}
	cmd.Flags().VisitAll(func(fl *pflag.Flag) {
		if designRunFlags[fl.Name] || free[fl.Name] || fl.Value.String() == "" {
			return
		}
		p.Fixed[fl.Name] = fl.Value.String()
	})
	return p, nil
}
