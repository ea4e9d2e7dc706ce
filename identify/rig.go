package identify

import (
	"errors"
	"fmt"

	"github.com/ridemodes/ridemodes/identify/modal"
	"github.com/ridemodes/ridemodes/ingest"
)

// FitRig fits the body modes to the FRFs of a rig test: the FRFs of an
// FRFStage (the local polynomial ones when the stage made them, else
// Welch's) go to modal.Fit with the sensors' positions (setup order, the
// stage's output order) and the stage's band unless opt gives one. It
// returns the FRF set the fit saw, too. When the stage chose the local
// polynomial FRFs itself (EstimatorAuto) and the fit to them fails, Welch's
// are fitted instead, and frf says so (Local nil, a reason added):
// noise-free FRFs (a simulated log without noise) can leave the fit's order
// sweep singular, where Welch's leakage does not.
func FitRig(frf *FRFResult, sensors []ingest.Sensor, opt modal.Options) (*modal.FRFSet, *modal.Result, error) {
	set, fit, err := fitRigOnce(frf, sensors, opt)
	if err != nil && frf.Local != nil && frf.localChosen {
		frf.Reasons = append(frf.Reasons, fmt.Sprintf("the fit to the local polynomial FRFs failed (%v): Welch's FRFs taken instead", err))
		frf.Local = nil
		return fitRigOnce(frf, sensors, opt)
	}
	return set, fit, err
}

func fitRigOnce(frf *FRFResult, sensors []ingest.Sensor, opt modal.Options) (*modal.FRFSet, *modal.Result, error) {
	if frf.FRF == nil {
		return nil, nil, errors.New("no FRFs: a rig test needs [[input]] channels")
	}
	var set *modal.FRFSet
	if l := frf.Local; l != nil {
		// No kernel: the local polynomial estimate has no window's smoothing.
		set = &modal.FRFSet{FreqHz: l.FreqHz, H: l.H, SigmaAbs: l.SigmaAbs, Coherence: l.Coherence,
			OutputPosM: ingest.SensorPositionsM(sensors), OutputNames: frf.FRF.Outputs, InputNames: frf.FRF.Inputs,
			ErrorCorrelation: l.ErrorCorrelation, OutputCorrelation: l.OutputCorrelation}
	} else {
		var err error
		if set, err = modal.FromSpectral(frf.FRF, frf.Spectra, ingest.SensorPositionsM(sensors)); err != nil {
			return nil, nil, err
		}
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
