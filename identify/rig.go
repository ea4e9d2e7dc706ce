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
		return nil, nil, errors.New("no FRFs: a rig test needs [[input]] channels")
	}
	set, err := modal.FromSpectral(frf.FRF, frf.Spectra, ingest.SensorPositionsM(sensors))
	if err != nil {
		return nil, nil, err
	}
	if opt.BandLowHz == 0 && opt.BandHighHz == 0 {
		opt.BandLowHz, opt.BandHighHz = frf.BandLowHz, frf.BandHighHz
	}
	fit, err := modal.Fit(set, opt)
	return set, fit, err
}

// RigLogWarnings sorts the reader's data-quality warnings for a rig test.
// The high-pass check of package ingest looks at one channel's spectrum
// below 1 Hz, which a band-limited rig drive empties just as an AC-coupled
// accelerometer does. When every pan shows the roll-off, the drive has no
// content there and the check cannot tell the two apart: its warnings are
// dropped and a note says so. A roll-off on some channels only is kept.
func RigLogWarnings(ws []ingest.Warning, inputs []ingest.Input) (kept []ingest.Warning, note string) {
	hp := map[string]bool{}
	for _, w := range ws {
		if w.Code == ingest.WarnHighPass {
			hp[w.Channel] = true
		}
	}
	for _, in := range inputs {
		if !hp[in.Channel] {
			return ws, ""
		}
	}
	for _, w := range ws {
		if w.Code != ingest.WarnHighPass {
			kept = append(kept, w)
		}
	}
	return kept, "every pan's spectrum falls away below 1 Hz, so the drive has no content there: the log cannot show whether the accelerometers are AC-coupled (high-pass); check their data sheets"
}
