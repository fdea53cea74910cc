package phases

import (
	"encoding/json"
	"math"
	"os"
	"sort"
	"testing"
)

// Plane-wave, single-minimum and stripe spectra against a dense numpy
// diagonalisation of the full BdG matrix of the same state in a periodic box
// (testdata/ref_bdg.py, whose output testdata/ref_bdg.json `make test`
// recomputes and compares): every mode between 1e-5 and 2 E_R agrees to
// 1e-6 E_R, and the states agree (k₁ or K, energy per particle).
func TestBdGAgainstNumpyBox(t *testing.T) {
	b, err := os.ReadFile("../testdata/ref_bdg.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Cases []struct {
			Name, Kind                  string
			N, Periods                  int
			Omega, Delta, Guu, Gdd, Gud float64
			K, K1, L, Energy            float64
			Modes                       []float64
		} `json:"cases"`
	}
	if err := json.Unmarshal(b, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Cases) < 4 {
		t.Fatalf("%d reference cases", len(doc.Cases))
	}
	for _, c := range doc.Cases {
		u := Uniform{Omega: c.Omega, Delta: c.Delta, Guu: c.Guu, Gdd: c.Gdd, Gud: c.Gud}
		vr, err := Variational(u, nil)
		if err != nil {
			t.Fatal(err)
		}
		st := (&ExcitationSettings{}).withDefaults(u)
		var sp spectrum
		var qs []float64
		switch c.Kind {
		case "stripe":
			ss, err := newStripeSpectrum(u, vr, &st)
			if err != nil {
				t.Fatalf("%s: %v", c.Name, err)
			}
			ss = ss.converge(&st)
			if math.Abs(ss.K-c.K) > 1e-8 || math.Abs(ss.st.Energy-c.Energy) > 1e-10 {
				t.Errorf("%s: K = %.12g, ε = %.12g; numpy box K = %.12g, ε = %.12g", c.Name, ss.K, ss.st.Energy, c.K, c.Energy)
			}
			sp = ss
			for n := -c.Periods/2 + 1; n <= c.Periods/2; n++ {
				qs = append(qs, float64(n)*ss.K/float64(c.Periods))
			}
		default:
			us, err := newUniformSpectrum(u, vr.PlaneWaveState, &st)
			if err != nil {
				t.Fatal(err)
			}
			if us.st.Phase.String() != c.Kind || math.Abs(us.st.K0-c.K1) > 1e-9 || math.Abs(us.st.Energy-c.Energy) > 1e-10 {
				t.Errorf("%s: %v k1 = %.12g ε = %.12g; numpy %s k1 = %.12g ε = %.12g", c.Name, us.st.Phase, us.st.K0, us.st.Energy, c.Kind, c.K1, c.Energy)
			}
			sp = us
			for n := -c.N / 2; n < c.N/2; n++ {
				qs = append(qs, 2*math.Pi*float64(n)/c.L)
			}
		}
		var got []float64
		for _, q := range qs {
			var ms []Mode
			var err error
			if ss, ok := sp.(*stripeSpectrum); ok {
				ms, _, err = ss.all(q, QAlongX, false)
			} else {
				ms, _, err = sp.modes(q, QAlongX, false)
			}
			if err != nil {
				t.Fatal(err)
			}
			for _, m := range ms {
				if m.Omega > 1e-5 && m.Omega < 2 {
					got = append(got, m.Omega)
				}
			}
		}
		sort.Float64s(got)
		if len(got) != len(c.Modes) {
			t.Fatalf("%s: %d modes below 2 E_R, numpy box %d\n go %v\n np %v", c.Name, len(got), len(c.Modes), got, c.Modes)
		}
		worst := 0.0
		for i := range got {
			worst = math.Max(worst, math.Abs(got[i]-c.Modes[i]))
		}
		if worst > 1e-6 {
			t.Errorf("%s: largest mode difference %.3g E_R (want ≤ 1e-6)\n go %v\n np %v", c.Name, worst, got, c.Modes)
		}
		t.Logf("%s: %d modes, largest difference %.2g E_R", c.Name, len(got), worst)
	}
}
