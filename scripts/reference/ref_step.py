"""Unit-step metrics of the unity-feedback loop (output y and effort u).

Delay-free loops: the exact response from the partial-fraction expansion over the
closed-loop poles, y(t) = T(0) + sum r_i exp(p_i t), evaluated anywhere, cross-checked
against scipy.signal.lsim (zero-order-hold exact for a step). Delay loops: method of
steps with scipy.integrate.solve_ivp (DOP853, rtol 1e-12) over intervals of one
delay, cross-checked by a delay-line simulation with an exact first-order-hold
discretisation (see ref_delay_sim.py). Metric times are refined with brentq or
bounded Brent on the continuous response, not read off the grid.
"""
from __future__ import annotations

import numpy as np
from scipy import signal
from scipy.optimize import brentq, minimize_scalar

from ref_loop import Loop

BAND = 0.02


def time_grid(poles: np.ndarray, t_end: float, extra: float = 0.0) -> np.ndarray:
    """Samples dense enough for every mode while it still matters (0.05 rad per step)."""
    parts = [np.linspace(0, t_end, 200_001)]
    for p in poles:
        life = min(t_end, 40 / abs(p.real) + extra)
        n = int(min(4e6, life * abs(p) / 0.05)) + 2
        parts.append(np.linspace(0, life, n))
    return np.unique(np.concatenate(parts))


def _refine_extreme(f, t: np.ndarray, i: int, sign: float):
    """Extreme of sign*f near sample i; returns (value, time)."""
    if i == 0:
        return float(f(np.array([t[0]]))[0]), float(t[0])
    a, b = t[i - 1], t[min(i + 1, len(t) - 1)]
    r = minimize_scalar(lambda x: -sign * f(np.array([x]))[0], bounds=(a, b), method="bounded",
                        options={"xatol": 1e-14 * b})
    best = max([(sign * f(np.array([x]))[0], x) for x in (r.x, t[i])])
    return float(sign * best[0]), float(best[1])


def _crossing(f, t, i, level):
    g = lambda x: f(np.array([x]))[0] - level
    return brentq(g, t[i - 1], t[i], xtol=1e-300, rtol=1e-14, maxiter=500)


def metrics_from_response(t: np.ndarray, y_fn, u_fn, yf: float) -> dict:
    """Contract step metrics from sampled-and-continuous responses; t[0] = 0 means 0+."""
    y = y_fn(t)
    out = {"final_value": yf}
    # round-off in the modal sum is ~1e-15: smaller excursions are not overshoot/undershoot
    noise = 1e-9 * abs(yf)
    i = int(np.argmax(y))
    if y[i] > yf + noise:
        ymax, tpk = _refine_extreme(y_fn, t, i, 1.0)
        out["overshoot_pct"], out["peak_time_s"] = 100 * (ymax - yf) / yf, tpk
    else:
        out["overshoot_pct"], out["peak_time_s"] = 0.0, None
    j = int(np.argmin(y))
    out["undershoot_pct"] = 100 * -_refine_extreme(y_fn, t, j, -1.0)[0] / yf if y[j] < -noise else 0.0
    times = {}
    for frac in (0.1, 0.9):
        level = frac * yf
        if y[0] >= level:
            times[frac] = 0.0
        else:
            k = int(np.argmax(y >= level))
            assert y[k] >= level, "never reaches the level"
            times[frac] = _crossing(y_fn, t, k, level)
    out["rise_time_s"] = times[0.9] - times[0.1]
    outside = np.abs(y - yf) > BAND * abs(yf)
    last = int(np.nonzero(outside)[0][-1])
    assert last < 0.7 * len(t) and t[last] < 0.7 * t[-1], "horizon too short for settling"
    g = lambda x: np.abs(y_fn(np.array([x]))[0] - yf) - BAND * abs(yf)
    out["settling_time_s"] = brentq(g, t[last], t[last + 1], xtol=1e-300, rtol=1e-14)
    u = np.abs(u_fn(t))
    k = int(np.argmax(u))
    out["peak_effort"] = abs(_refine_extreme(lambda x: np.abs(u_fn(x)), t, k, 1.0)[0])
    return out


def _modal(t, p, r, const, chunk=100_000):
    t = np.asarray(t, dtype=float)
    out = np.empty(len(t))
    for a in range(0, len(t), chunk):
        tt = t[a:a + chunk]
        out[a:a + chunk] = const + np.real(np.exp(np.outer(tt, p)) @ r)
    return out


def delay_free_step(loop: Loop, poles: np.ndarray) -> dict:
    """Exact step metrics of a stable delay-free loop."""
    Q = loop.char
    dQ = np.polyder(Q)
    gaps = [abs(a - b) for i, a in enumerate(poles) for b in poles[i + 1:]]
    assert min(gaps, default=np.inf) > 1e-7 * np.abs(poles).max(), \
        "repeated closed-loop pole: residue formula not valid"
    yf = loop.T_at_zero()
    y_res = np.polyval(loop.num, poles) / (poles * np.polyval(dQ, poles))
    unum = np.polymul(loop.C.num, loop.P.den)
    u0 = np.polyval(unum, 0) / np.polyval(Q, 0)
    u_res = np.polyval(unum, poles) / (poles * np.polyval(dQ, poles))
    y_fn = lambda t: _modal(t, poles, y_res, yf)
    u_fn = lambda t: _modal(t, poles, u_res, u0)
    t_end = 40 / np.abs(poles.real).min()
    t = time_grid(poles, t_end)
    m = metrics_from_response(t, y_fn, u_fn, yf)
    _check_against_lsim(loop, y_fn, u_fn, t_end)
    return m


def _check_against_lsim(loop: Loop, y_fn, u_fn, t_end):
    tt = np.linspace(0, t_end / 4, 20001)  # ZOH is exact for a step: any spacing works
    unum = np.polymul(loop.C.num, loop.P.den)
    for num, fn in ((loop.num, y_fn), (unum, u_fn)):
        _, ys, _ = signal.lsim(signal.TransferFunction(num, loop.char), np.ones_like(tt), tt)
        ref = fn(tt)
        # lsim starts at x(0) = 0 and returns D*u(0) at t = 0, i.e. the 0+ value
        err = np.abs(ys - ref).max() / np.abs(ref).max()
        assert err < 1e-6, f"modal response vs lsim differ by {err:.1e}"
