package dispersion

import (
	"math"
	"testing"
)

// The Thomas–Fermi μ of Pethick & Smith must hold N atoms: integrate the
// profile n(r) = (μ − V(r))/g numerically (independent of the closed form).
func TestThomasFermiNormalisation(t *testing.T) {
	sp, _ := LookupSpecies("Rb87")
	g := CouplingFromLength(sp.Mass, 100*BohrRadius)
	trap := [3]float64{50, 80, 120}
	N := 2e5
	tf, err := NewThomasFermi(sp.Mass, g, N, trap)
	if err != nil {
		t.Fatal(err)
	}
	// In scaled coordinates r_i = R_i u_i the profile is n0(1 − |u|²) inside
	// the unit ball: N = n0 R_x R_y R_z ∫(1 − u²) d³u, integrated on a grid.
	const m = 120
	sum := 0.0
	h := 2.0 / m
	for i := 0; i < m; i++ {
		for j := 0; j < m; j++ {
			for k := 0; k < m; k++ {
				x, y, z := -1+(float64(i)+0.5)*h, -1+(float64(j)+0.5)*h, -1+(float64(k)+0.5)*h
				if r2 := x*x + y*y + z*z; r2 < 1 {
					sum += 1 - r2
				}
			}
		}
	}
	n := tf.Peak * tf.Radii[0] * tf.Radii[1] * tf.Radii[2] * sum * h * h * h
	if math.Abs(n/N-1) > 2e-3 {
		t.Errorf("integrated N = %g, want %g", n, N)
	}
	// 87Rb, 2e5 atoms, ω̄ ≈ 2π·79 Hz: peak density of order 1e14 cm⁻³ (fact of the trade, common practice, no source).
	if tf.Peak < 3e19 || tf.Peak > 3e20 {
		t.Errorf("peak density %g m^-3", tf.Peak)
	}
	if _, err := NewThomasFermi(sp.Mass, g, N, [3]float64{0, 1, 1}); err == nil {
		t.Error("zero trap frequency accepted")
	}
}
