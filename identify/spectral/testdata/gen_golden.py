#!/usr/bin/python3
"""Golden Welch spectra for package spectral, from Debian's python3-scipy.

Run from this directory with /usr/bin/python3 (python3-scipy 1.10.1,
python3-numpy 1.24.2 were used):  /usr/bin/python3 gen_golden.py
It writes golden_welch.json. The Go test reads the file and never runs Python.

Signals: three channels from numpy.random.default_rng(SEED): white noise,
a filtered copy with a slow trend and a sinusoid, so that cross spectra and
coherence are non-trivial.
Windows: every window of package spectral, by scipy's name:
  hann, hamming, flattop, boxcar (= rectangular): scipy get_window, periodic.
Detrend: always 'constant' (the segment mean), as package spectral does.
"""
import json
import numpy as np
from scipy import signal

SEED = 20240611
FS = 64.0
NSAMP = 700

rng = np.random.default_rng(SEED)
t = np.arange(NSAMP) / FS
x0 = rng.standard_normal(NSAMP)
b, a = signal.butter(2, 0.2)
x1 = signal.lfilter(b, a, x0) + 0.3 * rng.standard_normal(NSAMP) + 0.05 * t
x2 = 0.5 * np.sin(2 * np.pi * 5.0 * t) + 0.7 * np.roll(x0, 3) + 0.2 * rng.standard_normal(NSAMP) - 0.02 * t**2
X = [x0, x1, x2]


# (window, nperseg, noverlap): odd and even lengths, with and without overlap
CASES = [
    ("hann", 128, 64),
    ("hann", 127, 50),
    ("hann", 64, 0),
    ("hamming", 100, 50),
    ("hamming", 77, 20),
    ("flattop", 128, 96),
    ("flattop", 65, 32),
    ("boxcar", 96, 48),
    ("boxcar", 81, 0),
]

PAIRS = [(0, 1), (0, 2), (1, 2)]

out = {"seed": SEED, "fs_hz": FS,
       "signals": [list(map(float, x)) for x in X], "cases": []}
for name, nper, nover in CASES:
    w = signal.get_window(name, nper)
    kw = dict(fs=FS, window=w, nperseg=nper, noverlap=nover, detrend="constant",
              return_onesided=True, scaling="density")
    case = {"window": name, "nperseg": nper, "noverlap": nover}
    f, _ = signal.welch(X[0], **kw)
    case["freqs_hz"] = list(map(float, f))
    case["psd"] = [list(map(float, signal.welch(x, **kw)[1])) for x in X]
    case["csd"] = []
    for i, j in PAIRS:
        _, p = signal.csd(X[i], X[j], **kw)
        case["csd"].append({"i": i, "j": j, "re": list(map(float, p.real)), "im": list(map(float, p.imag))})
    ckw = {k: v for k, v in kw.items() if k not in ("return_onesided", "scaling")}
    _, c = signal.coherence(X[0], X[1], **ckw)
    case["coherence01"] = list(map(float, c))
    out["cases"].append(case)

with open("golden_welch.json", "w") as fh:
    json.dump(out, fh)
