"""Reference values for the Tustin (bilinear) discretisation of compensator blocks.

Computed with scipy.signal.bilinear (scipy 1.17.1, numpy 2.4.6). Pre-warping at w0 is
the bilinear map with s = K (z-1)/(z+1), K = w0 / tan(w0 h / 2); scipy's bilinear uses
K = 2 fs, so we pass fs = K / 2. Block forms follow src/model/blocks.ts (written out here
again in descending powers, as scipy expects). Run: python3 scripts/reference/discrete_reference.py
"""
import json
import math
import os

import numpy as np
import scipy
import scipy.signal as sig

TWO_PI = 2 * math.pi


def case(name, block, num_desc, den_desc, h, prewarp):
    k = 2 / h if prewarp is None else prewarp / math.tan(prewarp * h / 2)
    b, a = sig.bilinear(num_desc, den_desc, fs=k / 2)
    b = np.atleast_1d(b) / a[0]
    a = np.atleast_1d(a) / a[0]
    b = list(b) + [0.0] * (3 - len(b))
    a = list(a) + [0.0] * (3 - len(a))
    return {
        "name": name,
        "block": block,
        "sample_s": h,
        "prewarp_rad_s": prewarp,
        "expected": {"b0": b[0], "b1": b[1], "b2": b[2], "a1": a[1], "a2": a[2]},
    }


h = 1 / 8000.0  # 8 kHz servo rate
cases = []
# lead (s/z+1)/(s/p+1), pre-warped at sqrt(z p)
z, p = TWO_PI * 40, TWO_PI * 200
cases.append(case("lead 40/200 Hz at 8 kHz", {"kind": "lead", "zeroRadS": z, "poleRadS": p}, [1 / z, 1], [1 / p, 1], h, math.sqrt(z * p)))
z, p = TWO_PI * 5, TWO_PI * 0.5
cases.append(case("lag 5/0.5 Hz at 8 kHz", {"kind": "lag", "zeroRadS": z, "poleRadS": p}, [1 / z, 1], [1 / p, 1], h, math.sqrt(z * p)))
# notch: (s^2 + 2 zz w s + w^2)/(s^2 + 2 zp w s + w^2), zp = 1/(2q), zz = zp 10^(-depth/20)
w, q, depth = TWO_PI * 620, 2.5, 25.0
zp = 1 / (2 * q)
zz = zp * 10 ** (-depth / 20)
cases.append(case("notch 620 Hz q 2.5 depth 25 dB", {"kind": "notch", "centerRadS": w, "depthDb": depth, "q": q}, [1, 2 * zz * w, w * w], [1, 2 * zp * w, w * w], h, w))
w = TWO_PI * 900
cases.append(case("first-order low-pass 900 Hz", {"kind": "lowpass1", "cornerRadS": w}, [1], [1 / w, 1], h, w))
w, zeta = TWO_PI * 1100, 0.6
cases.append(case("second-order low-pass 1.1 kHz", {"kind": "lowpass2", "cornerRadS": w, "zeta": zeta}, [w * w], [1, 2 * zeta * w, w * w], h, w))
w = TWO_PI * 12
cases.append(case("PI zero 12 Hz", {"kind": "pi", "zeroRadS": w}, [1, w], [1, 0], h, None))
cases.append(case("integrator at 2 kHz", {"kind": "integrator"}, [1], [1, 0], 1 / 2000.0, None))
kp, ki, kd, wf = 2.0, 150.0, 0.004, TWO_PI * 700
a = 1 / wf
cases.append(case("PID with filter", {"kind": "pid", "kp": kp, "ki": ki, "kd": kd, "filterRadS": wf}, [kp * a + kd, kp + ki * a, ki], [a, 1, 0], h, None))

out = {
    "generator": "scripts/reference/discrete_reference.py",
    "numpy": np.__version__,
    "scipy": scipy.__version__,
    "cases": cases,
}
path = os.path.join(os.path.dirname(__file__), "..", "..", "fixtures", "reference", "discrete-cases.json")
os.makedirs(os.path.dirname(path), exist_ok=True)
with open(path, "w") as f:
    json.dump(out, f, indent=2, sort_keys=True)
    f.write("\n")
print("wrote", os.path.normpath(path), len(cases), "cases")
