package dispersion

import (
	"fmt"
	"strings"
)

// ParseBounds reads the two ends of a range, LO and HI of "LO:HI:N"
// (map axes, verify sweeps), as quantities of kind k. One rule for every
// range: a LO without a unit borrows HI's ("0.5:4 kHz" is 0.5 kHz to
// 4 kHz); HI always needs its unit (plain numbers for KindNumber).
func ParseBounds(loText, hiText string, k Kind) (lo, hi float64, err error) {
	loText, hiText = strings.TrimSpace(loText), strings.TrimSpace(hiText)
	hi, err = ParseQuantity(hiText, k)
	if err != nil {
		return 0, 0, fmt.Errorf("HI: %v", err)
	}
	lo, err = ParseQuantity(loText, k)
	if err != nil && k != KindNumber {
		// borrow HI's unit
		unit := strings.TrimLeft(hiText, "0123456789.+-eE ")
		lo, err = ParseQuantity(loText+" "+unit, k)
	}
	if err != nil {
		return 0, 0, fmt.Errorf("LO: %v", err)
	}
	return lo, hi, nil
}
