"""Check values for test/analysis/step-modes.test.ts: the simple closed-loop pole of
P = k e^(-sT)/s under unity feedback, Delta(s) = s + k e^(-sT), and its residues.

The real root is s = W(-kT)/T (principal branch of the Lambert W function). At a root
e^(-pT) = -p/k and Delta'(p) = 1 - kT e^(-pT) = 1 + pT, so the residues are
  Y/s = k e^(-sT)/(s Delta):  -1/(1 + pT)
  U/s = s/(s Delta) = 1/Delta:  1/(1 + pT).
numpy 2.4.6, scipy 1.17.1.
"""
from scipy.special import lambertw

k, T = 1.0, 0.2
p = lambertw(-k * T).real / T
print(f"pole {p!r}")
print(f"residue of Y/s {-1 / (1 + p * T)!r}")
print(f"residue of U/s {1 / (1 + p * T)!r}")
