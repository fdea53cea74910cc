package dispersion

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

type refFile struct {
	Constants map[string]float64 `json:"constants"`
	BreitRabi []struct {
		Atom string  `json:"atom"`
		B    float64 `json:"B_T"`
		FF   int     `json:"F"`
		MM   int     `json:"m"`
		E    float64 `json:"E_J"`
	} `json:"breit_rabi"`
	Bands []struct {
		Omega, Delta, K float64
		E, Sz           []float64
	} `json:"bands"`
}

// loadRef reads testdata/ref_physics.json, written by testdata/ref_physics.py
// with numpy/scipy (outside reference).
func loadRef(t *testing.T) refFile {
	t.Helper()
	b, err := os.ReadFile("../testdata/ref_physics.json")
	if err != nil {
		t.Fatalf("reference file missing (run /usr/bin/python3 testdata/ref_physics.py): %v", err)
	}
	var r refFile
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func relErr(a, b float64) float64 { return math.Abs(a-b) / math.Max(math.Abs(b), 1e-300) }

// Constants against scipy.constants (CODATA 2018).
func TestConstantsAgainstScipy(t *testing.T) {
	r := loadRef(t)
	for name, got := range map[string]float64{"h": Planck, "hbar": Hbar, "c": SpeedOfLight, "mu_B": BohrMagneton, "u": AtomicMass, "a_B": BohrRadius, "k_B": Boltzmann} {
		if e := relErr(got, r.Constants[name]); e > 1e-12 {
			t.Errorf("%s = %g, scipy.constants %g", name, got, r.Constants[name])
		}
	}
}

// Breit–Rabi against direct diagonalisation of A I·J + μ_B(g_J J_z + g_I I_z)B
// with numpy.linalg.eigvalsh (testdata/ref_physics.py).
func TestBreitRabiAgainstDiagonalisation(t *testing.T) {
	r := loadRef(t)
	if len(r.BreitRabi) < 100 {
		t.Fatalf("only %d reference levels", len(r.BreitRabi))
	}
	for _, l := range r.BreitRabi {
		sp, err := LookupSpecies(l.Atom)
		if err != nil {
			t.Fatal(err)
		}
		got := sp.Energy(Sublevel{l.FF, l.MM}, l.B)
		scale := sp.HFSHz * Planck
		if math.Abs(got-l.E) > 1e-9*scale {
			t.Errorf("%s F=%d m=%d B=%g T: Breit–Rabi %g J, diagonalisation %g J (diff %.3g ΔE)", l.Atom, l.FF, l.MM, l.B, got, l.E, (got-l.E)/scale)
		}
	}
}

// The analytic moment equals −∂E/∂B by central differences (self-consistency,
// exact calculus), including the stretched states past x = 1.
func TestMomentIsMinusSlope(t *testing.T) {
	for _, name := range SpeciesNames() {
		sp, _ := LookupSpecies(name)
		for _, B := range []float64{1e-5, 1e-3, 0.05, 0.3} {
			for F := 1; F <= 2; F++ {
				for m := -F; m <= F; m++ {
					l := Sublevel{F, m}
					h := B * 1e-5
					num := -(sp.Energy(l, B+h) - sp.Energy(l, B-h)) / (2 * h)
					if got := sp.Moment(l, B); math.Abs(got-num) > 1e-6*BohrMagneton {
						t.Errorf("%s %v B=%g: moment %g, numeric %g", name, l, B, got, num)
					}
				}
			}
		}
	}
}

// Fact from D. A. Steck's Rb87 D line data (from memory): the F = 1 sublevels
// of 87Rb split by ≈ 0.70 MHz/G at low field (g_F = −1/2).
func TestRb87LowFieldSplitting(t *testing.T) {
	sp, _ := LookupSpecies("Rb87")
	B := 0.01 * Gauss
	f := math.Abs(sp.TransitionHz(Sublevel{1, 0}, Sublevel{1, -1}, B)) / 0.01
	if math.Abs(f-0.70e6) > 0.005e6 {
		t.Errorf("Rb87 F=1 splitting %.4f MHz/G, want ≈ 0.70", f/1e6)
	}
}

// Quadratic Zeeman shift of m = 0 against m = ±1 in F = 1: ≈ 72 Hz/G² for
// 87Rb and ≈ 277 Hz/G² for 23Na (Steck's compilations, from memory), and the
// low-field expansion q = (g_J − g_I)²μ_B²B²/(16 ΔE) derived in atoms.go.
func TestQuadraticZeeman(t *testing.T) {
	for _, c := range []struct {
		atom string
		want float64
		tol  float64
	}{{"Rb87", 72, 1}, {"Na23", 277, 2}} {
		sp, _ := LookupSpecies(c.atom)
		B := 0.1 * Gauss
		q := sp.QuadraticZeemanHz(1, B) / (0.1 * 0.1)
		if math.Abs(q-c.want) > c.tol {
			t.Errorf("%s q = %.2f Hz/G², want ≈ %g", c.atom, q, c.want)
		}
		x := (sp.GJ - sp.GI) * BohrMagnetonHzPerG
		exp := x * x / (16 * sp.HFSHz)
		if relErr(q, exp) > 1e-4 {
			t.Errorf("%s q = %.4f Hz/G², low-field expansion %.4f", c.atom, q, exp)
		}
	}
}

// Paschen–Back limit (fact of the trade, common practice, no source): at high
// field the moments approach ∓g_J μ_B/2 (electron spin decoupled).
func TestHighFieldMoments(t *testing.T) {
	sp, _ := LookupSpecies("Li7")
	B := 2.0 // T, x ≈ 3.5
	for m := -1; m <= 1; m++ {
		mu := sp.Moment(Sublevel{1, m}, B)
		if math.Abs(mu-sp.GJ*BohrMagneton/2) > 0.1*BohrMagneton {
			t.Errorf("Li7 F=1 m=%d at 2 T: μ = %.3f μ_B, want ≈ +g_J/2", m, mu/BohrMagneton)
		}
	}
}

func TestValidateAndParse(t *testing.T) {
	sp, _ := LookupSpecies("87Rb")
	if sp.Name != "Rb87" {
		t.Fatal("87Rb alias")
	}
	if _, err := LookupSpecies("Cs133"); err == nil {
		t.Error("Cs133 accepted")
	}
	for _, s := range []string{"1,2", "3,0", "0,0"} {
		l, err := ParseSublevel(s)
		if err != nil {
			t.Fatal(err)
		}
		if sp.Validate(l) == nil {
			t.Errorf("%s accepted for Rb87", s)
		}
	}
	for _, s := range []string{"1", "a,b", "1,x"} {
		if _, err := ParseSublevel(s); err == nil {
			t.Errorf("%q parsed", s)
		}
	}
	l, err := ParseSublevel("2,+2")
	if err != nil || l != (Sublevel{2, 2}) || sp.Validate(l) != nil {
		t.Errorf("2,+2: %v %v", l, err)
	}
}

// Couplings of an F = 1 pair: c0 ± c2 combinations (Ho 1998; Ohmi & Machida
// 1998) restated by hand: for 87Rb {0,−1}: a↑↑ = (a0+2a2)/3, a↓↓ = a2, a↑↓ = a2.
func TestPairCouplings(t *testing.T) {
	sp, _ := LookupSpecies("Rb87")
	c, err := sp.PairCouplings(Sublevel{1, 0}, Sublevel{1, -1})
	if err != nil {
		t.Fatal(err)
	}
	if relErr(c.Auu, (101.8+2*100.4)/3*BohrRadius) > 1e-12 || relErr(c.Add, 100.4*BohrRadius) > 1e-12 || relErr(c.Aud, 100.4*BohrRadius) > 1e-12 {
		t.Errorf("Rb87 {0,-1} lengths %g %g %g a_B", c.Auu/BohrRadius, c.Add/BohrRadius, c.Aud/BohrRadius)
	}
	c, _ = sp.PairCouplings(Sublevel{1, 1}, Sublevel{1, -1})
	if relErr(c.Aud, (2*101.8+100.4)/3*BohrRadius) > 1e-12 {
		t.Errorf("Rb87 {+1,-1} a_ud %g a_B, want (2a0+a2)/3", c.Aud/BohrRadius)
	}
	// g = 4πħ²a/m, 87Rb with a = 100 a_B: g/h ≈ 7.8e-12 Hz cm³ → 7.8e-18 Hz m³
	// (fact of the trade, from memory: g n/h ≈ 780 Hz at n = 1e14 cm⁻³).
	g := CouplingFromLength(sp.Mass, 100*BohrRadius) / Planck * 1e20
	if math.Abs(g-780) > 15 {
		t.Errorf("87Rb gn/h at 1e14 cm^-3 = %.1f Hz, want ≈ 780", g)
	}
	if _, err := sp.PairCouplings(Sublevel{2, 0}, Sublevel{2, 1}); err == nil {
		t.Error("F=2 pair accepted")
	}
	k, _ := LookupSpecies("K39")
	if _, err := k.PairCouplings(Sublevel{1, 0}, Sublevel{1, 1}); err == nil {
		t.Error("K39 without tabulated lengths accepted")
	}
}
