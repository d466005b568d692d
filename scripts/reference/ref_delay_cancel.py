"""Closed-loop poles of a delayed loop whose PI zero sits on the plant pole, for test/analysis/delay-poles.test.ts.

Made with numpy 2.4.6 and scipy 1.17.1:  python3 scripts/reference/ref_delay_cancel.py

L(s) = 12.5 (s + 750)/s * 500/(s + 750) * exp(-T s), T = 5e-5 s, so
D + N exp(-sT) = (s + 750) (s + K exp(-sT)) with K = 6250.
- s = -750 is an exact closed-loop pole (the cancelled plant pole stays in the closed loop).
- s + K exp(-sT) = 0  <=>  (sT) exp(sT) = -K T, so sT = W_k(-K T) (Lambert W); for
  0 < K T < 1/e the branches k = 0 and k = -1 give two real roots.
"""
import json

import numpy as np
from scipy.special import lambertw

K, T = 6250.0, 5e-5
real = sorted(float(np.real(lambertw(-K * T, k))) / T for k in (0, -1))
# Residual of the defining equation at each root, as a check of the values themselves.
res = [abs(s + K * np.exp(-s * T)) / K for s in real]
print(json.dumps({"K": K, "T": T, "realRoots": real, "relResidual": res}))
