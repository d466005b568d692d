"""Pade approximants of a pure delay exp(-T s) and a closed cascade, for the engine tests.

Made with numpy 2.4.6 and scipy 1.17.1:  python3 scripts/reference/ref_pade.py
Writes fixtures/reference/pade.json.

- scipy.interpolate.pade on the Taylor series of exp(-x) gives the (n, n) approximant in
  x = T s; coefficients are rescaled to powers of s and written in ASCENDING order.
- The cascade case closes an inner loop C*P (with its delay replaced by the (3, 3) Pade
  approximant) and multiplies by an outer plant, with numpy.polynomial arithmetic, then
  lists the roots of the resulting denominator (the outer plant's poles).
"""
from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import scipy
from numpy.polynomial import polynomial as P
from scipy.interpolate import pade


def pade_delay(T: float, n: int) -> tuple[list[float], list[float]]:
    taylor = [(-1) ** k / math.factorial(k) for k in range(2 * n + 1)]
    p, q = pade(taylor, n, n)  # numpy poly1d in x, highest power first
    num = list(p.coeffs[::-1])
    den = list(q.coeffs[::-1])
    scale = den[0]
    num = [c / scale * T**k for k, c in enumerate(num)]
    den = [c / scale * T**k for k, c in enumerate(den)]
    return num, den


def main() -> None:
    cases = []
    for T, n in [(1.0, 1), (1.0, 2), (0.0002, 3), (0.001, 4), (0.5, 5)]:
        num, den = pade_delay(T, n)
        cases.append({"delayS": T, "order": n, "num": num, "den": den})

    # Inner loop: C = 3 (s + 40)/s, P = 200/(s (s/500 + 1)) * exp(-0.0003 s); outer plant 1/s.
    T = 0.0003
    qn, qd = pade_delay(T, 3)
    cn, cd = [120.0, 3.0], [0.0, 1.0]
    pn, pd = [200.0], [0.0, 1.0, 1 / 500]
    ln = P.polymul(P.polymul(cn, pn), qn)
    ld = P.polymul(P.polymul(cd, pd), qd)
    on, od = [1.0], [0.0, 1.0]
    eff_num = P.polymul(ln, on)
    eff_den = P.polymul(P.polyadd(ld, ln), od)
    poles = np.roots(eff_den[::-1])
    cascade = {
        "inner": {"comp": {"num": cn, "den": cd}, "plant": {"num": pn, "den": pd, "delayS": T}},
        "outerPlant": {"num": on, "den": od},
        "num": list(map(float, eff_num)),
        "den": list(map(float, eff_den)),
        "poles": sorted([{"re": float(p.real), "im": float(p.imag)} for p in poles], key=lambda z: (z["re"], z["im"])),
    }
    out = {
        "generator": "scripts/reference/ref_pade.py",
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "pade": cases,
        "cascade": cascade,
    }
    path = Path(__file__).resolve().parents[2] / "fixtures" / "reference" / "pade.json"
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
