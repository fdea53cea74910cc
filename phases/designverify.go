package phases

import (
	"socmap/dispersion"
	"socmap/gpe"
)

// VerifyCoupling checks the shaking setting p without the cycle average:
// the time-dependent verification (spin-flip spectra of several velocity
// classes, gpe.Verify with its default settings) measures k_t from the
// Doppler slope and the effective Rabi frequency from the flip dynamics.
// It returns measured/model − 1 of both. This is the one place design calls
// the time-dependent machinery.
func VerifyCoupling(p dispersion.Shake) (ktDev, rabiDev float64, err error) {
	r, err := gpe.Verify(p, gpe.VerifySettings{})
	if err != nil {
		return 0, 0, err
	}
	if r.Status != gpe.VerifyOK {
		return 0, 0, errFitFailed
	}
	return gpe.Deviation(r.KtMeasured, r.KtModel), gpe.Deviation(r.RabiMeasuredHz, r.RabiModelHz), nil
}

var errFitFailed = errorString("a resonance fit of the verification failed")

type errorString string

func (e errorString) Error() string { return string(e) }
