"""Closed-loop poles and stability, decided two independent ways.

* Delay-free: numpy.roots of D + N (companion-matrix eigenvalues), each root
  polished by Newton steps on the exact polynomial when that lowers the residual.
* Any loop: the argument principle on F(s) = D(s) + N(s) exp(-sT). G = F/(s+1)^n
  (n = deg D) is analytic in the closed right half-plane and tends to the lead
  coefficient of D on the large arc, so the number of right-half-plane zeros of F
  is -(change of arg G(jw) over w in [0, inf))/pi. The change is tracked on a grid
  refined until consecutive angle steps are below 0.2 rad.
* Delay loops: exact characteristic roots near the origin by Newton on F, started
  from the roots of a [12/12] Pade approximant; the Pade roots only seed, the
  argument principle decides, and the two must agree.
"""
from __future__ import annotations

from math import factorial

import numpy as np

from ref_loop import Loop

PADE_ORDER = 12


def polish(p: np.ndarray, roots: np.ndarray) -> np.ndarray:
    dp = np.polyder(p)
    out = []
    for r in roots:
        for _ in range(5):
            step = np.polyval(p, r) / np.polyval(dp, r)
            cand = r - step
            if abs(np.polyval(p, cand)) < abs(np.polyval(p, r)):
                r = cand
            else:
                break
        out.append(r)
    return np.array(out)


def delay_free_poles(loop: Loop) -> np.ndarray:
    r = np.roots(loop.char)
    r = polish(loop.char, r)
    # conjugate symmetry exactly: real roots get imag 0
    return np.array([complex(x.real, 0.0) if abs(x.imag) <= 1e-12 * abs(x) else x for x in r])


def _G(loop: Loop, w: np.ndarray):
    """(F/(s+1)^n on s = jw, |F| / (|D| + |N|) as a distance-from-zero check)."""
    s = 1j * w
    n = len(loop.den) - 1
    D, N = np.polyval(loop.den, s), np.polyval(loop.num, s) * np.exp(-loop.delay * s)
    return (D + N) / (s + 1) ** n, np.abs(D + N) / (np.abs(D) + np.abs(N))


def rhp_zero_count(loop: Loop) -> int:
    """Right-half-plane zeros of D + N exp(-sT) by the argument principle."""
    lo, hi = loop.scale_rad_s()
    w = np.concatenate([[0.0], np.geomspace(lo * 1e-6, hi * 1e6, 400_000)])
    if loop.delay:
        w = np.union1d(w, np.arange(0, hi * 10, 0.05 / loop.delay))
    for _ in range(40):
        g, rel = _G(loop, w)
        assert rel.min() > 1e-9, "characteristic zero on the imaginary axis (marginal loop)"
        d = np.angle(g[1:] / g[:-1])
        bad = np.nonzero(np.abs(d) > 0.2)[0]
        if len(bad) == 0:
            break
        w = np.union1d(w, (w[bad] + w[bad + 1]) / 2)
    else:
        raise AssertionError("argument principle grid did not converge")
    total = d.sum() + np.angle(loop.den[0] / g[-1])  # tail to w = inf (small)
    z = -total / np.pi
    assert abs(z - round(z)) < 1e-6, z
    return int(round(z))


def pade(delay: float, m: int):
    """Numerator, denominator (descending) of the [m/m] Pade approximant of exp(-s*delay)."""
    c = [factorial(2 * m - k) * factorial(m) / (factorial(2 * m) * factorial(k) * factorial(m - k))
         for k in range(m + 1)]
    num = np.array([c[k] * (-delay) ** k for k in range(m, -1, -1)])
    den = np.array([c[k] * delay ** k for k in range(m, -1, -1)])
    return num, den


def delay_poles(loop: Loop) -> np.ndarray:
    """Exact roots of D + N exp(-sT) reached by Newton from the Pade seeds, rightmost first."""
    pn, pd = pade(loop.delay, PADE_ORDER)
    seeds = np.roots(np.polyadd(np.polymul(loop.den, pd), np.polymul(loop.num, pn)))
    T, N, D = loop.delay, loop.num, loop.den
    dN, dD = np.polyder(N), np.polyder(D)
    found = []
    for s in seeds:
        for _ in range(60):
            e = np.exp(-T * s)
            F = np.polyval(D, s) + np.polyval(N, s) * e
            dF = np.polyval(dD, s) + (np.polyval(dN, s) - T * np.polyval(N, s)) * e
            step = F / dF
            s = s - step
            if abs(step) < 1e-15 * max(abs(s), 1e-300):
                break
        # residual relative to the size of the terms (|coefficient| |s|^k), so that a common
        # root of D and N (a cancelled plant pole, still a closed-loop pole) is accepted
        with np.errstate(all="ignore"):
            scale = (np.polyval(np.abs(D), abs(s)) + np.polyval(np.abs(N), abs(s)) * abs(np.exp(-T * s)))
            resid = abs(np.polyval(D, s) + np.polyval(N, s) * np.exp(-T * s)) / scale
        if np.isfinite(resid) and resid < 1e-12 and s.imag >= -1e-9 * abs(s) and all(abs(s - f) > 1e-8 * abs(s) for f in found):
            found.append(complex(s.real, 0.0) if abs(s.imag) <= 1e-10 * abs(s) else s)
    roots = []
    for s in found:
        roots.append(s)
        if s.imag != 0:
            roots.append(s.conjugate())
    return np.array(sorted(roots, key=lambda z: (-z.real, -z.imag)))


def closed_loop(loop: Loop):
    """(stable, poles, poles_exact): stability by the argument principle, checked against poles."""
    z = rhp_zero_count(loop)
    if loop.delay:
        poles = delay_poles(loop)
        assert (poles[0].real < 0) == (z == 0), f"Pade-seeded roots {poles[0]} vs Nyquist count {z}"
        return z == 0, poles, False
    poles = delay_free_poles(loop)
    assert int(np.sum(poles.real >= 0)) == z, f"roots {poles} vs argument principle {z}"
    return z == 0, poles, True
