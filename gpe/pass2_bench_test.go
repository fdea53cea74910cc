package gpe

import "testing"

func BenchmarkPasses2D(b *testing.B) {
	p := stripeProblem([]int{256, 256})
	e := newTestEngine(b, p, Guess{Kind: GuessStripe, K: 0.94}, perf{threads: 1})
	defer e.close()
	_ = e.normalize()
	e.evaluate()
	e.reduce(opK34, 5)
	e.sig = 1e-5
	e.uc, e.us, e.ut, e.usig, e.uqs = 1, 0, 1, 0, 0
	for _, c := range []struct {
		name string
		op   int
		upd  bool
	}{{"localH", opLocalH, false}, {"localH-upd", opLocalH, true}, {"kin1", opKin1, false}, {"k2", opK2, false}, {"k34", opK34, false}, {"moments", opMoments, false}, {"localSplit", opLocalSplit, false}, {"kinSplit", opKinSplit, false}} {
		b.Run(c.name, func(b *testing.B) {
			e.upd = c.upd
			e.tau, e.scale = 0, 1
			e.mu = 0
			for i := 0; i < b.N; i++ {
				e.reduce(c.op, accN)
			}
			e.upd = false
		})
	}
}
