#!/usr/bin/env python3
"""Golden poles and mode shapes of the damped bounce-pitch model.

Run offline with Debian's python3-scipy (apt-get install python3-scipy):
    /usr/bin/python3 gen_eig.py > eig_golden.json
It builds the first-order state matrix [[0, I], [-M^-1 K, -M^-1 C]] of each
case below (conventions of package compare: w(s) = z - s*theta, front axle at
+a, rear at -b) and solves it with scipy.linalg.eig. The Go test compares
compare.Vehicle.DampedModes with these values. The cases are invented.
"""
import json
import numpy as np
import scipy
import scipy.linalg

CASES = [
    # name, m, J, a, b, kf, kr, cf, cr
    ("domain-round-trip", 1500.0, 2160.0, 1.2, 1.5, 40000.0, 42000.0, 3464.0, 3175.0),
    ("compact", 1180.0, 1420.0, 1.02, 1.48, 33000.0, 36500.0, 2500.0, 2300.0),
    ("sport", 1420.0, 1900.0, 1.30, 1.28, 62000.0, 71000.0, 5200.0, 5600.0),
    ("light-damping", 1650.0, 2600.0, 1.45, 1.35, 41000.0, 39000.0, 700.0, 650.0),
    ("van", 2100.0, 3900.0, 1.55, 1.70, 52000.0, 61000.0, 4800.0, 6100.0),
]


def axle(a, b, f, r):
    c = -a * f + b * r
    return np.array([[f + r, c], [c, a * a * f + b * b * r]])


out = {"generator": "scipy.linalg.eig %s, numpy %s" % (scipy.__version__, np.__version__), "cases": []}
for name, m, J, a, b, kf, kr, cf, cr in CASES:
    K = axle(a, b, kf, kr)
    C = axle(a, b, cf, cr)
    Minv = np.diag([1.0 / m, 1.0 / J])
    A = np.zeros((4, 4))
    A[0, 2] = A[1, 3] = 1.0
    A[2:, :2] = -Minv @ K
    A[2:, 2:] = -Minv @ C
    w, V = scipy.linalg.eig(A)
    modes = []
    for i in np.argsort(np.abs(w)):
        if w[i].imag <= 0:
            continue
        r = V[1, i] / V[0, i]  # theta / z
        modes.append({"pole_re": w[i].real, "pole_im": w[i].imag,
                      "theta_per_z_re": r.real, "theta_per_z_im": r.imag})
    out["cases"].append({"name": name, "m": m, "J": J, "a": a, "b": b, "kf": kf, "kr": kr,
                         "cf": cf, "cr": cr, "modes": modes})
print(json.dumps(out, indent=1))
