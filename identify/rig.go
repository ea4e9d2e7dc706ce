package identify

import (
	"errors"

	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// FitRig fits the body modes to the FRFs of a rig test: the FRFs of an
// FRFStage go to modal.Fit with the sensors' positions (setup order, the
// stage's output order) and the stage's band unless opt gives one. It
// returns the FRF set the fit saw, too.
func FitRig(frf *FRFResult, sensors []ingest.Sensor, opt modal.Options) (*modal.FRFSet, *modal.Result, error) {
	if frf.FRF == nil {
		return nil, nil, errors.New("identify: no FRFs: a rig test needs [[input]] channels")
	}
	pos := make([]float64, len(sensors))
	for i, s := range sensors {
		pos[i] = s.XM
	}
	set, err := modal.FromSpectral(frf.FRF, frf.Spectra, pos)
	if err != nil {
		return nil, nil, err
	}
	if opt.BandLowHz == 0 && opt.BandHighHz == 0 {
		opt.BandLowHz, opt.BandHighHz = frf.BandLowHz, frf.BandHighHz
	}
	fit, err := modal.Fit(set, opt)
	return set, fit, err
}
