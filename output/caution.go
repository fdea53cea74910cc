package output

import "socmap/dispersion"

// Safety cautions shown with the outputs that concern gradient coils, RF
// power or lasers (common practice, no source). They defer to local rules
// and the lab's safety officer.
const (
	CautionCoils = "Gradient coils: tens to hundreds of amperes switched at kHz rates store energy and " +
		"produce voltage transients; use rated drivers, interlocks and coil cooling. RF amplifiers: never run " +
		"them unloaded, and keep antennas clear of people. Follow your local rules and your lab's safety officer."
	CautionLasers = "Raman beams are class 3B/4 lasers: wear the specified eyewear, enclose the beam paths and " +
		"follow your local laser rules and your lab's laser safety officer."
)

// WarningsJSON returns the texts and the codes of ws for a JSON document, as
// two lists of the same order (empty, not null, when there are none).
func WarningsJSON(ws []dispersion.Warning) (texts, codes []string) {
	texts, codes = []string{}, []string{}
	for _, w := range ws {
		texts, codes = append(texts, w.Text), append(codes, w.Code)
	}
	return texts, codes
}

// writeWarnings stores the texts and codes of ws as the attributes
// "warnings" and "warning_codes" of the object at path (lines joined by
// newlines, in the same order).
func (w *Writer) writeWarnings(path string, ws []dispersion.Warning) {
	w.Attr(path, "warnings", joinLines(dispersion.WarningTexts(ws)))
	w.Attr(path, "warning_codes", joinLines(dispersion.WarningCodes(ws)))
}
