package main

import "socmap/dispersion"

// Kind is the physical dimension of a flag's value (dispersion.Kind; the
// short names below keep the flag definitions readable).
type Kind = dispersion.Kind

const (
	KindNumber    = dispersion.KindNumber    // dimensionless
	KindField     = dispersion.KindField     // T
	KindGradient  = dispersion.KindGradient  // T/m
	KindFrequency = dispersion.KindFrequency // Hz
	KindAngle     = dispersion.KindAngle     // rad
	KindLength    = dispersion.KindLength    // m
	KindTime      = dispersion.KindTime      // s
	KindDensity   = dispersion.KindDensity   // m^-3
)

// parseQuantity reads "40 G/cm", "3kHz", "1e14 cm^-3" or, for KindNumber, a
// plain number, and returns the value in SI (dispersion.ParseQuantity).
func parseQuantity(s string, k Kind) (float64, error) { return dispersion.ParseQuantity(s, k) }

// quantity is a pflag.Value holding an SI value parsed from text with units.
type quantity struct {
	kind Kind
	v    float64
	text string
}

func (q *quantity) String() string { return q.text }
func (q *quantity) Type() string {
	if q.kind == KindNumber {
		return "number"
	}
	return "quantity"
}
func (q *quantity) Set(s string) error {
	v, err := parseQuantity(s, q.kind)
	if err != nil {
		return err
	}
	q.v, q.text = v, s
	return nil
}
