package main

import (
	"math"

	"github.com/spf13/pflag"

	"socmap/dispersion"
	"socmap/phases"
)

// interFlags give the interactions of a uniform system: in E_R (--G1/--G2 or
// --ng-uu/--ng-dd/--ng-ud), or from the atom's scattering lengths (built-in
// F = 1 values or --a-uu/--a-dd/--a-ud) and a density.
type interFlags struct {
	g1, g2, nguu, ngdd, ngud *quantity
	density                  *quantity
	aUU, aDD, aUD            *quantity
}

func (f *interFlags) add(fs *pflag.FlagSet) {
	f.g1 = qflag(fs, "G1", KindNumber, "", "G1 = n(g + g↑↓)/4 in E_R (with --G2: equal intra-species couplings)")
	f.g2 = qflag(fs, "G2", KindNumber, "", "G2 = n(g − g↑↓)/4 in E_R")
	f.nguu = qflag(fs, "ng-uu", KindNumber, "", "n·g↑↑ in E_R")
	f.ngdd = qflag(fs, "ng-dd", KindNumber, "", "n·g↓↓ in E_R")
	f.ngud = qflag(fs, "ng-ud", KindNumber, "", "n·g↑↓ in E_R")
	f.density = qflag(fs, "density", KindDensity, "", `density, e.g. "1e14 cm^-3" (interactions from the atom's scattering lengths)`)
	f.aUU = qflag(fs, "a-uu", KindNumber, "", "scattering length a↑↑ in Bohr radii (with --a-dd, --a-ud: overrides the built-in F = 1 values)")
	f.aDD = qflag(fs, "a-dd", KindNumber, "", "scattering length a↓↓ in Bohr radii")
	f.aUD = qflag(fs, "a-ud", KindNumber, "", "scattering length a↑↓ in Bohr radii")
}

// couplings returns the 3D couplings of the atom's pseudo-spin pair: from
// explicit scattering lengths if given, else the built-in F = 1 values.
func (f *interFlags) couplings(a *atomFlags) (dispersion.Couplings, error) {
	sp, err := a.species()
	if err != nil {
		return dispersion.Couplings{}, err
	}
	n := 0
	for _, q := range []*quantity{f.aUU, f.aDD, f.aUD} {
		if q.text != "" {
			n++
		}
	}
	if n == 3 {
		return dispersion.ExplicitCouplings(sp.Mass, f.aUU.v, f.aDD.v, f.aUD.v), nil
	}
	if n > 0 {
		return dispersion.Couplings{}, usagef("--a-uu, --a-dd, --a-ud go together (all three, in Bohr radii)")
	}
	up, down, err := a.levels(sp)
	if err != nil {
		return dispersion.Couplings{}, err
	}
	c, err := sp.PairCouplings(up, down)
	if err != nil {
		return c, usagef("--atom %s --up %s --down %s: %v (give --a-uu, --a-dd, --a-ud)", a.atom, a.up, a.down, err)
	}
	return c, nil
}

// apply sets the interactions of lab. Exactly one way must be given.
func (f *interFlags) apply(lab *phases.Lab, a *atomFlags) error {
	hasG := f.g1.text != "" || f.g2.text != ""
	hasNG := f.nguu.text != "" || f.ngdd.text != "" || f.ngud.text != ""
	hasSI := f.density.text != ""
	count := 0
	for _, b := range []bool{hasG, hasNG, hasSI} {
		if b {
			count++
		}
	}
	if count == 0 {
		return usagef("interactions missing: give --G1 and --G2, or --ng-uu/--ng-dd/--ng-ud, or --density with an atom")
	}
	if count > 1 {
		return usagef("give the interactions one way only: --G1/--G2, --ng-*, or --density")
	}
	switch {
	case hasG:
		if f.g1.text == "" || f.g2.text == "" {
			return usagef("--G1 and --G2 go together")
		}
		u := phases.Symmetric(0, f.g1.v, f.g2.v)
		lab.Guu, lab.Gdd, lab.Gud = u.Guu, u.Gdd, u.Gud
	case hasNG:
		if f.nguu.text == "" || f.ngdd.text == "" || f.ngud.text == "" {
			return usagef("--ng-uu, --ng-dd and --ng-ud go together")
		}
		lab.Guu, lab.Gdd, lab.Gud = f.nguu.v, f.ngdd.v, f.ngud.v
	case hasSI:
		if !(f.density.v > 0) {
			return usagef("--density %q: must be positive", f.density.text)
		}
		if lab.Scheme.Atom() == nil {
			return usagef("--density needs a scheme (--scheme shake|raman) to set E_R; with a direct model give --G1/--G2 or --ng-*")
		}
		c, err := f.couplings(a)
		if err != nil {
			return err
		}
		lab.HaveSI, lab.Couplings, lab.Density = true, c, f.density.v
	}
	for _, v := range []float64{lab.Guu, lab.Gdd, lab.Gud} {
		if math.IsNaN(v) {
			return usagef("interactions are not finite")
		}
	}
	return nil
}
