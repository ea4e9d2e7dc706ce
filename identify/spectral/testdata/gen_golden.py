#!/usr/bin/python3
"""Golden Welch spectra for package spectral, from Debian's python3-scipy.

Run from this directory with /usr/bin/python3 (python3-scipy 1.10.1,
python3-numpy 1.24.2 were used):  /usr/bin/python3 gen_golden.py
It writes golden_welch.json. The Go test reads the file and never runs Python.

Signals: three channels from numpy.random.default_rng(SEED): white noise,
a filtered copy with a slow trend and a sinusoid, so that cross spectra and
coherence are non-trivial.
Windows: every window scipy has that package spectral maps to:
  hann, hamming, flattop, boxcar (= rectangular): scipy get_window, periodic;
  exponential: scipy.signal.windows.exponential(N, center=0, tau=DECAY_S*FS,
               sym=False), which is our Window{Kind: Exponential, DecayS};
  force: scipy has none, so the array is built here from our definition
         (1 for t < WIDTH_S, half-cosine taper over TAPER_S, then 0) and passed
         to scipy as an explicit window array.
"""
import json
import numpy as np
from scipy import signal

SEED = 20240611
FS = 64.0
NSAMP = 700
DECAY_S = 0.6
WIDTH_S = 0.25
TAPER_S = 0.2

rng = np.random.default_rng(SEED)
t = np.arange(NSAMP) / FS
x0 = rng.standard_normal(NSAMP)
b, a = signal.butter(2, 0.2)
x1 = signal.lfilter(b, a, x0) + 0.3 * rng.standard_normal(NSAMP) + 0.05 * t
x2 = 0.5 * np.sin(2 * np.pi * 5.0 * t) + 0.7 * np.roll(x0, 3) + 0.2 * rng.standard_normal(NSAMP) - 0.02 * t**2
X = [x0, x1, x2]


def force_window(n):
    tt = np.arange(n) / FS
    w = np.zeros(n)
    w[tt < WIDTH_S] = 1.0
    m = (tt >= WIDTH_S) & (tt < WIDTH_S + TAPER_S)
    w[m] = 0.5 * (1 + np.cos(np.pi * (tt[m] - WIDTH_S) / TAPER_S))
    return w


def scipy_window(name, n):
    if name == "exponential":
        return signal.windows.exponential(n, center=0, tau=DECAY_S * FS, sym=False)
    if name == "force":
        return force_window(n)
    return signal.get_window(name, n)


# (window, nperseg, noverlap, detrend) ; detrend False = none
CASES = [
    ("hann", 128, 64, "constant"),
    ("hann", 127, 50, "linear"),
    ("hann", 64, 0, False),
    ("hamming", 100, 50, "constant"),
    ("hamming", 77, 20, "linear"),
    ("flattop", 128, 96, "linear"),
    ("flattop", 65, 32, "constant"),
    ("boxcar", 96, 48, "constant"),
    ("boxcar", 81, 0, "linear"),
    ("exponential", 64, 0, False),
    ("exponential", 63, 16, "constant"),
    ("force", 64, 0, False),
]

PAIRS = [(0, 1), (0, 2), (1, 2)]

out = {"seed": SEED, "fs_hz": FS, "decay_s": DECAY_S, "width_s": WIDTH_S, "taper_s": TAPER_S,
       "signals": [list(map(float, x)) for x in X], "cases": []}
for name, nper, nover, det in CASES:
    w = scipy_window(name, nper)
    kw = dict(fs=FS, window=w, nperseg=nper, noverlap=nover, detrend=det,
              return_onesided=True, scaling="density")
    case = {"window": name, "nperseg": nper, "noverlap": nover,
            "detrend": det if det else "none"}
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
