"""Frequency-domain contract metrics, each found two ways and cross-checked.

Gain crossovers: positive real roots of |N(jw)|^2 - |D(jw)|^2 (numpy.roots in w^2),
polished by scipy.optimize.brentq on log|L(jw)| evaluated from the factored text,
and counted again by a dense sign scan. Phase crossovers: roots of
Im(N(jw) conj D(jw)) for delay-free loops; for delay loops a dense scan of
sin(angle L) refined by brentq. Peaks: dense scan plus bounded Brent refinement.
"""
from __future__ import annotations

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from ref_loop import Loop

XTOL_REL = 1e-14
GRID_PER_DECADE = 4000
DELAY_GM_LIST_CAP_DB = 60.0  # delay loops: phase crossovers listed while GM <= this


def poly_of_jw(p: np.ndarray) -> np.ndarray:
    """Complex coefficients (descending in w) of p(jw)."""
    n = len(p) - 1
    return np.array([c * (1j ** (n - k)) for k, c in enumerate(p)])


def even_poly_roots_w(q: np.ndarray) -> np.ndarray:
    """Positive real w with q(w) = 0, for a real polynomial q even in w (descending)."""
    q = np.trim_zeros(np.real_if_close(q, tol=1e6).real, "f")
    n = len(q) - 1
    assert n % 2 == 0
    x_coeffs = q[::2]  # coefficients of w^n, w^(n-2), ... = polynomial in x = w^2
    assert np.allclose(q[1::2], 0, atol=1e-12 * np.abs(q).max())
    x = np.roots(x_coeffs) if len(x_coeffs) > 1 else np.array([])
    keep = [r.real for r in x if abs(r.imag) <= 1e-7 * abs(r) and r.real > 0]
    return np.sqrt(np.sort(keep))


def refine(f, w0: float, rel=1e-6) -> float:
    """Brent root of f near w0 (log w), widening the bracket until f changes sign."""
    for width in (rel, 1e-4, 1e-3, 1e-2, 5e-2):
        a, b = w0 * (1 - width), w0 * (1 + width)
        if np.sign(f(a)) != np.sign(f(b)):
            return brentq(f, a, b, xtol=1e-300, rtol=XTOL_REL, maxiter=500)
    raise AssertionError(f"no sign change near {w0}")


def grid(lo: float, hi: float, delay: float = 0.0) -> np.ndarray:
    g = np.geomspace(lo, hi, int(np.log10(hi / lo) * GRID_PER_DECADE) + 2)
    if delay:
        # the delay turns the phase by w*delay: keep that step below 0.01 rad
        g = np.union1d(g, np.arange(lo, hi, 0.01 / delay))
    return g


def scan_roots(f, g: np.ndarray) -> list[float]:
    v = f(g)
    idx = np.nonzero(np.sign(v[:-1]) * np.sign(v[1:]) < 0)[0]
    return [brentq(f, g[i], g[i + 1], xtol=1e-300, rtol=XTOL_REL, maxiter=500) for i in idx]


def band(loop: Loop):
    lo, hi = loop.scale_rad_s()
    return lo * 1e-4, hi * 1e4


def gain_crossovers(loop: Loop) -> list[float]:
    logmag = lambda w: np.log(np.abs(loop.L(w)))
    Njw, Djw = poly_of_jw(loop.num), poly_of_jw(loop.den)
    q = np.polysub(np.polymul(Njw, Njw.conj()), np.polymul(Djw, Djw.conj()))
    poly = [refine(logmag, w) for w in even_poly_roots_w(q)]
    lo, hi = band(loop)
    lo = min([lo] + [w / 100 for w in poly])
    hi = max([hi] + [w * 100 for w in poly])
    scan = scan_roots(logmag, grid(lo, hi))
    assert len(scan) == len(poly), f"crossover count: scan {scan} vs poly {poly}"
    assert np.allclose(scan, poly, rtol=1e-10), (scan, poly)
    return scan


def wrap_deg(a):
    """Wrap into (-180, 180]."""
    r = np.mod(a + 180.0, 360.0) - 180.0
    return np.where(r == -180.0, 180.0, r)


def phase_margins(loop: Loop, wc: list[float]) -> list[float]:
    return [float(wrap_deg(180.0 + np.degrees(np.angle(loop.L(w))))) for w in wc]


def delay_gm_cap_rad_s(loop: Loop) -> float:
    """Beyond this frequency |L| < 10^(-cap/20): higher phase crossovers are not listed."""
    lo, hi = band(loop)
    g = np.geomspace(lo, hi * 1e4, 200_000)
    big = np.nonzero(np.abs(loop.L(g)) >= 10 ** (-DELAY_GM_LIST_CAP_DB / 20))[0]
    return g[big[-1] + 1]


def phase_crossovers(loop: Loop) -> list[float]:
    """Finite positive phase crossovers (w = 0 and w = inf are handled by the caller)."""
    sin_angle = lambda w: np.imag(loop.L(w)) / np.abs(loop.L(w))
    negative = lambda w: np.real(loop.L(w)) < 0
    lo, hi = band(loop)
    if loop.delay:
        hi = delay_gm_cap_rad_s(loop)
        found = [w for w in scan_roots(sin_angle, grid(lo, hi, loop.delay)) if negative(w)]
        return [w for w in found if -20 * np.log10(abs(loop.L(w))) <= DELAY_GM_LIST_CAP_DB]
    Njw, Djw = poly_of_jw(loop.num), poly_of_jw(loop.den)
    h = np.imag(np.polymul(Njw, Djw.conj()))  # odd in w: divide by w
    h = np.trim_zeros(h, "f")
    assert abs(h[-1]) <= 1e-12 * np.abs(h).max()
    poly = [refine(sin_angle, w) for w in even_poly_roots_w(h[:-1])]
    poly = [w for w in poly if negative(w)]
    lo = min([lo] + [w / 100 for w in poly])
    hi = max([hi] + [w * 100 for w in poly])
    scan = [w for w in scan_roots(sin_angle, grid(lo, hi)) if negative(w)]
    assert len(scan) == len(poly) and np.allclose(scan, poly, rtol=1e-10), (scan, poly)
    return scan


def gain_margin_list(loop: Loop):
    """[(w or inf, GM dB)] sorted by frequency, including w = 0 and w = inf entries."""
    out = []
    L0 = loop.L_at_zero()
    if np.isfinite(L0) and L0 < 0:
        out.append((0.0, -20 * np.log10(-L0)))
    for w in phase_crossovers(loop):
        out.append((w, float(-20 * np.log10(np.abs(loop.L(w))))))
    Linf = loop.L_at_inf()
    if Linf < 0:
        out.append((np.inf, -20 * np.log10(-Linf)))
    return out


def peak(loop: Loop, fn, limits):
    """max over w in [0, inf] of fn(w) >= 0, with its frequency; limits = (f(0), f(inf))."""
    lo, hi = band(loop)
    g = grid(lo, hi, loop.delay)
    v = fn(g)
    best = (limits[0], 0.0) if limits[0] >= limits[1] else (limits[1], np.inf)
    interior = np.nonzero((v[1:-1] >= v[:-2]) & (v[1:-1] >= v[2:]))[0] + 1
    for i in sorted(interior, key=lambda i: -v[i])[:8]:
        r = minimize_scalar(lambda x: -fn(np.exp(x)), bounds=(np.log(g[i - 1]), np.log(g[i + 1])),
                            method="bounded", options={"xatol": 1e-13})
        if -r.fun > best[0]:
            best = (float(-r.fun), float(np.exp(r.x)))
    return best


def sensitivity_peaks(loop: Loop):
    """(Ms, w_Ms, Mt): peaks of |S| and |T| with the limits at 0 and infinity."""
    L0, Linf = loop.L_at_zero(), loop.L_at_inf()
    S_lim = (0.0 if np.isinf(L0) else abs(1 / (1 + L0)), abs(1 / (1 + Linf)))
    T_lim = (abs(loop.T_at_zero()), abs(Linf / (1 + Linf)))
    Ms, wMs = peak(loop, lambda w: np.abs(1 / (1 + loop.L(w))), S_lim)
    Mt, _ = peak(loop, lambda w: np.abs(loop.L(w) / (1 + loop.L(w))), T_lim)
    return Ms, wMs, Mt


def bandwidth(loop: Loop):
    """Lowest w where |T(jw)| < |T(0)|/sqrt(2); None if it never falls below."""
    level = abs(loop.T_at_zero()) / np.sqrt(2)
    if level == 0:
        return None
    f = lambda w: np.abs(loop.L(w) / (1 + loop.L(w))) - level
    lo, hi = band(loop)
    g = grid(lo, hi, loop.delay)
    v = f(g)
    assert v[0] > 0
    below = np.nonzero(v < 0)[0]
    if len(below) == 0:
        return None
    i = below[0]
    return brentq(f, g[i - 1], g[i], xtol=1e-300, rtol=XTOL_REL, maxiter=500)
