package phases

import (
	"errors"
	"math"
	"reflect"
	"strconv"
	"strings"
	"syscall"
	"testing"

	"socmap/dispersion"
	"socmap/phases/label"
)

// demoDesign is an invented 87Rb design problem of our own: the demo plan's
// atoms and shaking at 3 kHz, rectangular 10 µs pulses at a 120 G bias (so
// that the third level is far enough for short pulses), the gradient
// amplitude and the Rabi frequency free, δ at the balancing detuning.
func demoDesign(t testing.TB, obj string) DesignProblem {
	t.Helper()
	sp, err := dispersion.LookupSpecies("Rb87")
	if err != nil {
		t.Fatal(err)
	}
	up, down := dispersion.Sublevel{F: 1, M: 0}, dispersion.Sublevel{F: 1, M: -1}
	c, err := sp.PairCouplings(up, down)
	if err != nil {
		t.Fatal(err)
	}
	o, err := ParseObjective(obj)
	if err != nil {
		t.Fatal(err)
	}
	return DesignProblem{
		Scheme: "shake",
		Shake: dispersion.Shake{Species: sp, Up: up, Down: down, Bias: 120e-4, Gradient: 1, ShakeHz: 3000,
			Pulse: dispersion.PulseRect, PulseWidth: 10e-6, RabiHz: 20},
		Couplings:       c,
		Density:         1e20,
		BalanceDetuning: true,
		Free: []FreeSetting{
			{Name: "gradient", Lo: 0.6, Hi: 1.4, Unit: "G/cm", Factor: 1e-2},
			{Name: "rabi", Lo: 4, Hi: 40, Unit: "Hz", Factor: 1},
		},
		Objective: o,
	}
}

// TestDesignRoundTrip: settings chosen first, their figures of merit from the
// forward chain; a design problem whose objective (window) and constraint
// (min-period) make them the optimum; brute force on a fine grid finds it
// there, and Design finds the grid's optimum within one grid step.
func TestDesignRoundTrip(t *testing.T) {
	if testing.Short() {
		t.Skip("thousands of chain evaluations; run without -short")
	}
	p := demoDesign(t, "window")
	e, err := NewDesignEvaluator(p, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	// The chosen setting: 1 T/m, the Rabi frequency in the middle of the
	// window (window = distance from the nearer edge is largest there).
	g0 := 1.0
	probe := e.Evaluate([]float64{g0, 10})
	if !probe.Merits.Stripe {
		t.Fatalf("probe is not a stripe: %+v", probe.Merits)
	}
	r0 := (probe.Merits.OmegaLoHz + probe.Merits.OmegaHiHz) / 2
	at := e.Evaluate([]float64{g0, r0})
	// A larger gradient widens the window in Hz but shortens the period: the
	// imaging resolution at the chosen setting's period makes g0 the edge.
	p.Limits.MinPeriod = at.Merits.PeriodM
	p.Free[1].Lo, p.Free[1].Hi = 0.5*r0, 1.5*r0
	if e, err = NewDesignEvaluator(p, 0, nil); err != nil {
		t.Fatal(err)
	}
	const n = 31
	best, bi, bj := -1.0, -1, -1
	for i := range n {
		for j := range n {
			u := []float64{float64(i) / (n - 1), float64(j) / (n - 1)}
			d := e.Evaluate(e.values(u, nil))
			if d.Feasible && d.Objective > best {
				best, bi, bj = d.Objective, i, j
			}
		}
	}
	stepG := (p.Free[0].Hi - p.Free[0].Lo) / (n - 1)
	stepR := (p.Free[1].Hi - p.Free[1].Lo) / (n - 1)
	gb := p.Free[0].Lo + float64(bi)*stepG
	rb := p.Free[1].Lo + float64(bj)*stepR
	if math.Abs(gb-g0) > stepG || math.Abs(rb-r0) > stepR {
		t.Fatalf("brute force optimum (%g T/m, %g Hz) is not the chosen setting (%g T/m, %g Hz)", gb, rb, g0, r0)
	}
	res, err := Design(p, &DesignSettings{Evaluations: 1600, SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != DesignFeasible {
		t.Fatalf("status %v", res.Status)
	}
	c := res.Candidates[0]
	gd, rd := c.Values[0], c.Values[1]
	t.Logf("chosen (%.4g T/m, %.4g Hz) window %.4g Hz; grid (%.4g, %.4g) %.4g Hz; design (%.5g, %.5g) %.5g Hz, binding %v",
		g0, r0, at.Merits.WindowHz, gb, rb, best, gd, rd, c.Objective, c.Binding)
	if math.Abs(gd-gb) > stepG || math.Abs(rd-rb) > stepR {
		t.Errorf("design optimum (%g T/m, %g Hz) differs from the grid optimum (%g, %g) by more than a grid step (%g, %g)", gd, rd, gb, rb, stepG, stepR)
	}
	if c.Objective < best*(1-1e-3) {
		t.Errorf("design objective %g below the grid's %g", c.Objective, best)
	}
	found := false
	for _, b := range c.Binding {
		found = found || strings.HasPrefix(b, "min-period")
	}
	if !found {
		t.Errorf("min-period should bind, binding = %v", c.Binding)
	}
}

// TestDesignMonotone: widening a range or loosening a constraint never gives
// a worse best objective.
func TestDesignMonotone(t *testing.T) {
	if testing.Short() {
		t.Skip("thousands of chain evaluations; run without -short")
	}
	set := &DesignSettings{Evaluations: 800, SkipCheck: true}
	base := demoDesign(t, "window")
	base.Limits.MinPeriod = 2.6e-6
	run := func(p DesignProblem) float64 {
		t.Helper()
		r, err := Design(p, set)
		if err != nil {
			t.Fatal(err)
		}
		if r.Status != DesignFeasible {
			return 0
		}
		return r.Candidates[0].Objective
	}
	b := run(base)
	wide := base
	wide.Free = append([]FreeSetting(nil), base.Free...)
	wide.Free[0].Hi = 1.8
	wide.Free[1].Lo = 2
	loose := base
	loose.Limits.MinPeriod = 2.2e-6
	tight := base
	tight.Limits.MinPeriod = 3.0e-6
	w, l, ti := run(wide), run(loose), run(tight)
	t.Logf("best objective: base %.6g, wider ranges %.6g, looser min-period %.6g, tighter %.6g Hz", b, w, l, ti)
	if b <= 0 {
		t.Fatal("base problem infeasible")
	}
	const tol = 1e-3 // the search's precision
	if w < b*(1-tol) {
		t.Errorf("wider ranges gave a worse optimum: %g < %g", w, b)
	}
	if l < b*(1-tol) {
		t.Errorf("a looser constraint gave a worse optimum: %g < %g", l, b)
	}
	if ti > b*(1+tol) {
		t.Errorf("a tighter constraint gave a better optimum: %g > %g", ti, b)
	}
}

// TestDesignCandidatesMeetConstraints: every reported candidate, rebuilt
// from the text of its settings, meets every hard constraint; the shaking
// scheme at those settings gives no validity warning (default thresholds)
// and the comparison predicts a stripe at the planned coupling.
func TestDesignCandidatesMeetConstraints(t *testing.T) {
	if testing.Short() {
		t.Skip("thousands of chain evaluations; run without -short")
	}
	p := demoDesign(t, "field*window^0.5")
	p.Free = append(p.Free, FreeSetting{Name: "pulse-width", Lo: 5e-6, Hi: 60e-6, Unit: "us", Factor: 1e-6},
		FreeSetting{Name: "bias", Lo: 30e-4, Hi: 120e-4, Unit: "G", Factor: 1e-4})
	p.Limits.MinPeriod = 2e-6
	p.Limits.MinContrast = 0.005
	res, err := Design(p, &DesignSettings{Evaluations: 800, SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Candidates) == 0 {
		t.Fatal("no candidate")
	}
	e, err := NewDesignEvaluator(p, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	ram := dispersion.Raman{Species: p.Shake.Species, Wavelength: 790e-9, Angle: math.Pi, RabiHz: 15e3}
	for i, c := range res.Candidates {
		// Values back from the text, as a plan replays them.
		v := make([]float64, len(p.Free))
		for j, f := range p.Free {
			num, _, _ := strings.Cut(c.Settings[f.Name], " ")
			x, err := strconv.ParseFloat(num, 64)
			if err != nil {
				t.Fatal(err)
			}
			v[j] = x * f.factor()
			if v[j] != c.Values[j] {
				t.Errorf("candidate %d: %s text %q gives %g, evaluated %g", i, f.Name, c.Settings[f.Name], v[j], c.Values[j])
			}
		}
		d := e.Evaluate(v)
		for _, m := range d.Margins {
			if !m.OK() {
				t.Errorf("candidate %d misses %s (%s): %g vs %g", i, m.Key, m.Name, m.Value, m.Limit)
			}
		}
		if !d.Feasible {
			t.Errorf("candidate %d not feasible when re-evaluated", i)
		}
		sh, _ := e.Schemes(&c.DesignEval)
		num, _, _ := strings.Cut(c.Settings["detuning"], " ")
		if det, _ := strconv.ParseFloat(num, 64); det != sh.DetuningHz {
			t.Errorf("candidate %d: detuning text %q, scheme %g", i, c.Settings["detuning"], sh.DetuningHz)
		}
		sr, err := sh.Evaluate()
		if err != nil {
			t.Fatal(err)
		}
		if len(sr.Warnings) > 0 {
			t.Errorf("candidate %d: scheme warnings %v", i, sr.Warnings)
		}
		cr, err := Compare(Comparison{Shake: sh, Raman: ram, Couplings: p.Couplings, Density: p.Density}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if cr.Shake.Verdict.Code != StripePlanned {
			t.Errorf("candidate %d: compare verdict %v, planned phase %v", i, cr.Shake.Verdict.Code, cr.Shake.Verdict.PlannedPhase)
		}
		if m := cr.ShakeLimits.Micromotion; m != nil && m.Fraction > p.Limits.withDefaults().MaxMicromotion {
			t.Errorf("candidate %d: compare's micromotion fraction %g", i, m.Fraction)
		}
	}
}

// TestDesignGradientTrade: a fact of the trade (common practice, no source):
// at a fixed shaking frequency a larger gradient amplitude raises k_t and
// E_R, which widens the stripe window in Hz but shrinks the stripe period.
// The design result shows it (Trade) and the forward chain agrees.
func TestDesignGradientTrade(t *testing.T) {
	res, err := Design(demoDesign(t, "window"), &DesignSettings{Evaluations: 200, Restarts: 2, SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	tr := res.Trade
	if len(tr) != 3 {
		t.Fatalf("trade-off has %d points, want 3", len(tr))
	}
	for i := 1; i < len(tr); i++ {
		a, b := tr[i-1], tr[i]
		if !(b.GradientTm > a.GradientTm) || !(math.Abs(b.KtPerM) > math.Abs(a.KtPerM)) || !(b.ERHz > a.ERHz) {
			t.Errorf("k_t, E_R do not rise with the gradient: %+v → %+v", a, b)
		}
		if !(b.WindowWidthHz > a.WindowWidthHz) {
			t.Errorf("window in Hz does not widen: %g → %g Hz", a.WindowWidthHz, b.WindowWidthHz)
		}
		if !(b.PeriodM < a.PeriodM) {
			t.Errorf("stripe period does not shrink: %g → %g m", a.PeriodM, b.PeriodM)
		}
		// k_t ∝ b′ at fixed ω exactly (ħk_t = ΔF S(θ)/ω), E_R ∝ k_t².
		ratio := b.GradientTm / a.GradientTm
		if d := math.Abs(b.KtPerM/a.KtPerM - ratio); d > 1e-9 {
			t.Errorf("k_t ratio %g, gradient ratio %g", b.KtPerM/a.KtPerM, ratio)
		}
		if d := math.Abs(b.ERHz/a.ERHz - ratio*ratio); d > 1e-9 {
			t.Errorf("E_R ratio %g, want %g", b.ERHz/a.ERHz, ratio*ratio)
		}
	}
	t.Logf("trade: %+v", tr)
}

// TestDesignDeterministic: the same seed gives the same evaluations and
// candidates with one worker and with four; another seed differs.
func TestDesignDeterministic(t *testing.T) {
	p := demoDesign(t, "field")
	run := func(seed uint64, workers int) *DesignResult {
		r, err := Design(p, &DesignSettings{Seed: seed, Evaluations: 240, Restarts: 4, Workers: workers, SkipCheck: true})
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	a, b, c := run(3, 1), run(3, 4), run(4, 2)
	if len(a.Evaluations) != len(b.Evaluations) {
		t.Fatalf("%d vs %d evaluations", len(a.Evaluations), len(b.Evaluations))
	}
	for i := range a.Evaluations {
		if !reflect.DeepEqual(a.Evaluations[i].Values, b.Evaluations[i].Values) || a.Evaluations[i].Objective != b.Evaluations[i].Objective {
			t.Fatalf("evaluation %d differs between 1 and 4 workers", i)
		}
	}
	if len(a.Candidates) == 0 || !reflect.DeepEqual(a.Candidates[0].Settings, b.Candidates[0].Settings) {
		t.Fatal("best candidate differs between 1 and 4 workers")
	}
	same := len(a.Evaluations) == len(c.Evaluations)
	for i := 0; same && i < len(a.Evaluations); i++ {
		same = reflect.DeepEqual(a.Evaluations[i].Values, c.Evaluations[i].Values)
	}
	if same {
		t.Error("seeds 3 and 4 gave the same evaluations")
	}
}

// TestDesignInfeasible: a constraint no setting can meet gives
// DesignInfeasible naming it, with the shortfall at the closest candidate.
func TestDesignInfeasible(t *testing.T) {
	p := demoDesign(t, "window")
	p.Limits.MinPeriod = 50e-6 // far beyond π/k_R at any gradient in range
	r, err := Design(p, &DesignSettings{Evaluations: 200, Restarts: 2, SkipCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != DesignInfeasible || r.Closest == nil {
		t.Fatalf("status %v, closest %v", r.Status, r.Closest)
	}
	var got *Margin
	for i := range r.Unmet {
		if r.Unmet[i].Key == "min-period" {
			got = &r.Unmet[i]
		}
	}
	if got == nil {
		t.Fatalf("min-period not among the unmet constraints %+v", r.Unmet)
	}
	// The closest point has the longest period: the smallest gradient.
	if got.Margin >= 0 || got.Value*1e-6 > 6e-6 {
		t.Errorf("unmet min-period %+v", *got)
	}
	if math.Abs(r.Closest.Values[0]-p.Free[0].Lo) > 0.02*(p.Free[0].Hi-p.Free[0].Lo) {
		t.Errorf("closest candidate at %g T/m, want the lowest gradient %g", r.Closest.Values[0], p.Free[0].Lo)
	}
}

func TestDesignBadInput(t *testing.T) {
	for name, mod := range map[string]func(p *DesignProblem){
		"LO > HI":      func(p *DesignProblem) { p.Free[0].Lo, p.Free[0].Hi = 1.4, 0.6 },
		"empty range":  func(p *DesignProblem) { p.Free[0].Hi = p.Free[0].Lo },
		"no free":      func(p *DesignProblem) { p.Free = nil },
		"wrong scheme": func(p *DesignProblem) { p.Free[0].Name = "wavelength" },
		"no objective": func(p *DesignProblem) { p.Objective = Objective{} },
		"no density":   func(p *DesignProblem) { p.Density = 0 },
		"twice":        func(p *DesignProblem) { p.Free[1] = p.Free[0] },
		"negative":     func(p *DesignProblem) { p.Limits.MinContrast = -1 },
	} {
		p := demoDesign(t, "window")
		mod(&p)
		if _, err := Design(p, &DesignSettings{Evaluations: 10, SkipCheck: true}); !errors.Is(err, ErrInput) {
			t.Errorf("%s: error %v, want ErrInput", name, err)
		}
	}
	for _, s := range []string{"", "robustness", "window*", "window^-1", "window*window"} {
		if _, err := ParseObjective(s); !errors.Is(err, ErrInput) {
			t.Errorf("objective %q: error %v, want ErrInput", s, err)
		}
	}
	o, err := ParseObjective("field*window^0.5")
	if err != nil || o.String() != "field*window^0.5" || len(o.Terms) != 2 {
		t.Errorf("objective round trip: %v %v", o, err)
	}
	m := Merits{Stripe: true, FieldUG: 4, WindowHz: 9}
	if v := o.Value(&m); math.Abs(v-12) > 1e-12 {
		t.Errorf("objective value %g, want 4·√9 = 12", v)
	}
	m.Stripe, m.Phase = false, label.PlaneWave
	if o.Value(&m) != 0 {
		t.Error("objective of a non-stripe must be 0")
	}
}

// TestDesignWindowMatchesStripeWindow: the window merit's Ω edges agree with
// StripeWindow's scan at the same planned δ (outside check of the edge
// search: a different algorithm).
func TestDesignWindowMatchesStripeWindow(t *testing.T) {
	e, err := NewDesignEvaluator(demoDesign(t, "window"), 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	d := e.Evaluate([]float64{1.1, 12})
	if !d.Merits.Stripe {
		t.Fatal("not a stripe")
	}
	m := d.Merits
	n := e.p.Density
	sh, _ := e.Schemes(&d)
	r, err := sh.Evaluate()
	if err != nil {
		t.Fatal(err)
	}
	u := Uniform{Delta: m.DeltaER, Guu: n * e.p.Couplings.Guu / r.Model.ER, Gdd: n * e.p.Couplings.Gdd / r.Model.ER, Gud: n * e.p.Couplings.Gud / r.Model.ER}
	w, err := StripeWindow(u, 2*(2+m.G1)+1, 800, 1e-8, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(w.Lo*m.ERHz-m.OmegaLoHz) > 1e-3*m.OmegaHiHz || math.Abs(w.Hi*m.ERHz-m.OmegaHiHz) > 1e-3*m.OmegaHiHz {
		t.Errorf("window %g … %g Hz, StripeWindow %g … %g Hz", m.OmegaLoHz, m.OmegaHiHz, w.Lo*m.ERHz, w.Hi*m.ERHz)
	}
	dw, err := DetuningWindow(Uniform{Omega: m.OmegaER, Delta: m.DeltaER, Guu: u.Guu, Gdd: u.Gdd, Gud: u.Gud}, m.DeltaER, 0.2, 800, 1e-9, nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(dw.Lo*m.ERHz-m.DeltaLoHz) > 1e-3 || math.Abs(dw.Hi*m.ERHz-m.DeltaHiHz) > 1e-3 {
		t.Errorf("δ window %g … %g Hz, DetuningWindow %g … %g Hz", m.DeltaLoHz, m.DeltaHiHz, dw.Lo*m.ERHz, dw.Hi*m.ERHz)
	}
	// field = h·Δδ/|μ↑ − μ↓| in µG.
	dist := math.Min(m.DeltaER*m.ERHz-dw.Lo*m.ERHz, dw.Hi*m.ERHz-m.DeltaER*m.ERHz)
	if want := dist * dispersion.Planck / m.MomentDiff * 1e10; math.Abs(m.FieldUG-want) > 1e-3*want {
		t.Errorf("field %g µG, want %g", m.FieldUG, want)
	}
}

// BenchmarkDesign10k: 10⁴ chain evaluations (scheme → model → variational
// phase → windows in Ω and δ) on all cores.
func BenchmarkDesign10k(b *testing.B) {
	p := demoDesign(b, "field*window^0.5")
	for b.Loop() {
		cpu0 := cpuSeconds()
		r, err := Design(p, &DesignSettings{Evaluations: 10000, SkipCheck: true})
		if err != nil {
			b.Fatal(err)
		}
		n := float64(len(r.Evaluations))
		if n < 8000 || n > 10000 {
			b.Errorf("%g evaluations for a budget of 10000", n)
		}
		// Per 10⁴ evaluations (the polish may stop before its share is
		// spent). CPU time of the process: on a shared machine the wall
		// time says little; CPU/2 is the wall time on two free cores.
		b.ReportMetric(n, "evaluations")
		b.ReportMetric(r.Elapsed.Seconds()*1e4/n, "wall-s/1e4")
		b.ReportMetric((cpuSeconds()-cpu0)*1e4/n, "cpu-s/1e4")
	}
}

// cpuSeconds is the user + system CPU time of the process.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)*1e-6
}
