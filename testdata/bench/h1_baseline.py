#!/usr/bin/python3
"""The named baseline of the whole-run benchmark: two-input H1 FRFs of a rig
log with pandas and scipy, the way an engineer would script them.

Run with Debian's /usr/bin/python3 after
  apt-get install -y python3-pandas python3-scipy
(python3-pandas 1.5.3, python3-scipy 1.10.1, python3-numpy 1.24.2 were used):
  /usr/bin/python3 h1_baseline.py LOG.csv SETUP.toml SEGMENT_SAMPLES

What it does, and nothing else (whole_run.sh times it):
  1. pandas.read_csv of the whole log ('#' lines are notes; the first column
     is the time in s, every other column in m/s^2, as `ridemodes simulate`
     writes them with its default units).
  2. scipy.signal.welch and scipy.signal.csd at the log's own rate, periodic
     Hann window, segment mean removed, 50 % overlap (scipy's defaults), with
     SEGMENT_SAMPLES per segment: the same segment duration, hence the same
     frequency resolution, as ridemodes chose for the log (its segment
     length times its decimation factor; whole_run.sh reads both from the
     result JSON).
  3. For every [[sensor]] of the setup the two-input H1 from the front and
     rear [[input]] pans, H1 = Gxx^-1 Gxy per frequency (Bendat & Piersol,
     Random Data, 4th ed., 2010, ch. 7), and its multiple coherence
     Gxy^H Gxx^-1 Gxy / Gyy, over the setup's band (default 0.5-4 Hz).
It prints one line per sensor (peak |H1| and its frequency, mean multiple
coherence in the band) so that the work cannot be skipped.

This is a timing reference, not a test: it does no decimation, unit
conversion or data checks, and no modal fit.
"""
import sys
import tomllib

import numpy as np
import pandas as pd
from scipy import signal


def main(log_path, setup_path, nperseg):
    with open(setup_path, "rb") as f:
        setup = tomllib.load(f)
    band = setup.get("analysis", {})
    lo, hi = band.get("band_low_hz", 0.5), band.get("band_high_hz", 4.0)

    df = pd.read_csv(log_path, comment="#")
    names = {c.split("[")[0].strip(): c for c in df.columns}
    t = df[df.columns[0]].to_numpy()
    fs = (len(t) - 1) / (t[-1] - t[0])

    pans = {}
    for inp in setup["input"]:
        pans.setdefault(inp["axle"], []).append(df[names[inp["channel"]]].to_numpy())
    x = [np.mean(pans[axle], axis=0) for axle in ("front", "rear")]

    kw = dict(fs=fs, window="hann", nperseg=nperseg)
    f, g00 = signal.welch(x[0], **kw)
    _, g11 = signal.welch(x[1], **kw)
    _, g01 = signal.csd(x[0], x[1], **kw)
    gxx = np.empty((len(f), 2, 2), complex)
    gxx[:, 0, 0], gxx[:, 1, 1] = g00, g11
    gxx[:, 0, 1], gxx[:, 1, 0] = g01, np.conj(g01)
    inband = (f >= lo) & (f <= hi)

    for s in setup["sensor"]:
        y = df[names[s["channel"]]].to_numpy()
        _, gyy = signal.welch(y, **kw)
        gxy = np.stack([signal.csd(xi, y, **kw)[1] for xi in x], axis=1)
        # With Gxy[i] = E[conj(X_i) Y] (scipy's csd) and Y = sum_j H_j X_j:
        # Gxy = Gxx H, so H1 = Gxx^-1 Gxy per frequency.
        h = np.linalg.solve(gxx, gxy[..., None])[..., 0]
        coh = np.real(np.einsum("fi,fi->f", np.conj(gxy), h)) / gyy
        mag = np.abs(h).sum(axis=1)
        k = np.argmax(np.where(inband, mag, -np.inf))
        print(f"{s['channel']}: peak of |H1| summed over the pans {mag[k]:.4g} at {f[k]:.4g} Hz, "
              f"mean multiple coherence {coh[inband].mean():.4f} in {lo}-{hi} Hz")


if __name__ == "__main__":
    if len(sys.argv) != 4:
        sys.exit(__doc__)
    main(sys.argv[1], sys.argv[2], int(sys.argv[3]))
