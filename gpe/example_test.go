package gpe_test

import (
	"fmt"
	"math"

	"socmap/gpe"
	"socmap/phases/label"
)

// A uniform 1D box in the stripe regime: several starts, the lowest kept.
func Example() {
	om, G1, G2 := 1.0, 0.3, 0.05
	k1 := math.Sqrt(1 - math.Pow(om/(4+2*G1), 2)) // variational stripe momentum
	g, err := gpe.NewGrid([]int{256}, []float64{gpe.CommensurateLength(k1, 25)})
	if err != nil {
		panic(err)
	}
	p := gpe.Problem{Grid: g, Model: gpe.UniformBoxG1G2(g, om, 0, G1, G2)}
	mr, err := gpe.MultiStart(p, nil, nil, label.Thresholds{})
	if err != nil {
		panic(err)
	}
	o := mr.Observed
	fmt.Printf("%v, %v, E/N = %.6f E_R, k1 = %.3f k_R\n", o.Phase, mr.Best.Status, o.Energies.Total, o.K1)
	// Output: stripe, converged, E/N = 0.244663 E_R, k1 = 0.976 k_R
}
