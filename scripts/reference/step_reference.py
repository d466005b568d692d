"""Reference unit-step metrics for a few unity-feedback loops, written to
fixtures/reference/step-cases.json for test/analysis/step-reference.test.ts.

Computed with numpy 2.4.6 and scipy 1.17.1, by methods independent of the product:

* Delay-free loops: the exact response by partial fractions of the closed loop,
  y(t) = T(0) + sum_i Res[T(s)/s, p_i] e^(p_i t) (simple poles only), and likewise u(t)
  from U(s) = C/(1+L). Cross-checked against scipy.signal.step on the same closed loop.
* Loops with a pure delay: the method of steps. Between multiples of the delay the
  delayed plant input is a known function of the previous interval, so each interval
  is an ordinary ODE, integrated by scipy.integrate.solve_ivp (DOP853, rtol 1e-12) with
  dense output, C and P realised separately by scipy.signal.tf2ss.

Metrics follow DESIGN.md ("Step metrics"): peaks refined by bounded scalar
minimisation on the exact/dense response, level crossings by brentq.
Closed-loop poles: numpy roots of D + N (delay-free); with a delay, the rightmost
roots of D(s) + N(s) e^(-sT) found from a [6/6] Pade estimate and polished by Newton
on the exact characteristic function.

Run: python3 scripts/reference/step_reference.py
"""
from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import scipy
from scipy import integrate, optimize, signal

BAND = 0.02
OUT = Path(__file__).resolve().parents[2] / "fixtures" / "reference" / "step-cases.json"

# Coefficients in DESCENDING powers (numpy convention); the JSON stores ascending ones.
CASES = [
    {"name": "servo type 1 with lead", "pn": [400.0], "pd": [1.0, 20.0, 0.0],
     "cn": [0.5 / 10, 0.5], "cd": [1 / 60, 1.0], "delay": 0.0, "t_end": 2.0},
    {"name": "PI on first-order lag, zero near pole", "pn": [1.0], "pd": [1.0, 1.0],
     "cn": [2.0, 1.8], "cd": [1.0, 0.0], "delay": 0.0, "t_end": 12.0},
    {"name": "PID with derivative filter on integrator and lag", "pn": [1.0], "pd": [1.0, 1.0, 0.0],
     "cn": [3.0, 10.0, 2.0], "cd": [0.01, 1.0, 0.0], "delay": 0.0, "t_end": 30.0},
    {"name": "non-minimum-phase zero under PI", "pn": [-0.5, 1.0], "pd": [1.0, 4.0, 3.0],
     "cn": [1.0, 1.0], "cd": [1.0, 0.0], "delay": 0.0, "t_end": 25.0},
    {"name": "type 0 proportional", "pn": [10.0], "pd": [1.0, 6.0, 5.0],
     "cn": [1.0], "cd": [1.0], "delay": 0.0, "t_end": 6.0},
    {"name": "lightly damped resonance under integral control", "pn": [200.0, 3.0e4], "pd": [1.0, 12.0, 9.0e4],
     "cn": [10.0], "cd": [1.0, 0.0], "delay": 0.0, "t_end": 4.0},
    {"name": "feedthrough in both C and P (algebraic loop)", "pn": [1.0, 2.0], "pd": [1.0, 1.0],
     "cn": [2.0, 2.0], "cd": [1.0, 3.0], "delay": 0.0, "t_end": 6.0},
    {"name": "order 8, poles over four decades", "pn": [5.0e11],
     "pd": list(np.poly([-0.5, -5.0, -50.0, -400.0, -2000.0]).real),
     "cn": list(np.polymul([1.0, 0.6], [1.0, 8.0])), "cd": list(np.polymul([1.0, 0.0], [1.0, 120.0, 1.0e4])),
     "delay": 0.0, "t_end": 15.0},
    {"name": "integrator with delay, proportional", "pn": [1.0], "pd": [1.0, 0.0],
     "cn": [5.0], "cd": [1.0], "delay": 0.1, "t_end": 3.0},
    {"name": "lag with delay under PI", "pn": [1.0], "pd": [1.0, 1.0],
     "cn": [1.5, 2.25], "cd": [1.0, 0.0], "delay": 0.2, "t_end": 15.0},
    {"name": "delay with feedthrough in C and P", "pn": [1.0, 3.0], "pd": [1.0, 1.0],
     "cn": [0.5, 1.0], "cd": [1.0, 4.0], "delay": 0.1, "t_end": 8.0},
    {"name": "order 8 with a delay far shorter than the response", "pn": [5.0e11],
     "pd": list(np.poly([-0.5, -5.0, -50.0, -400.0, -2000.0]).real),
     "cn": list(np.polymul([1.0, 0.6], [1.0, 8.0])), "cd": list(np.polymul([1.0, 0.0], [1.0, 120.0, 1.0e4])),
     "delay": 0.0005, "t_end": 6.0},
    {"name": "slow PI loop with a short delay", "pn": [1.0], "pd": [0.05, 1.0],
     "cn": [0.2, 1.0], "cd": [1.0, 0.0], "delay": 0.002, "t_end": 20.0},
    {"name": "resonant plant with delay under PI", "pn": [100.0], "pd": [1.0, 2.0, 100.0],
     "cn": [0.1, 0.5], "cd": [1.0, 0.0], "delay": 0.05, "t_end": 15.0},
]


def dc_gain(num_l, den_l):
    """T(0) exactly from trailing coefficients of L = num/den (descending)."""
    n = np.trim_zeros(np.asarray(num_l, float), "f")[::-1]
    d = np.trim_zeros(np.asarray(den_l, float), "f")[::-1]
    kn = int(np.argmax(n != 0))
    kd = int(np.argmax(d != 0))
    if kn > kd:
        return 0.0
    if kn < kd:
        return 1.0
    l0 = n[kn] / d[kd]
    return l0 / (1 + l0)


def metrics_from(yfun, ufun, t_end, y_f, jumps):
    """DESIGN.md step metrics from callables y(t), u(t) (right limits at jumps)."""
    t = np.union1d(np.linspace(0.0, t_end, 40001), np.asarray(jumps, float))
    y = np.array([yfun(x) for x in t])
    u = np.array([ufun(x) for x in t])
    z = y / y_f

    def refine_max(f, i):
        lo, hi = t[max(i - 1, 0)], t[min(i + 1, len(t) - 1)]
        r = optimize.minimize_scalar(lambda x: -f(x), bounds=(lo, hi), method="bounded",
                                     options={"xatol": 1e-12 * max(t_end, 1)})
        return (r.x, -r.fun) if -r.fun > f(t[i]) else (t[i], f(t[i]))

    i_max = int(np.argmax(z))
    t_pk, z_pk = refine_max(lambda x: yfun(x) / y_f, i_max)
    overshoot = max(0.0, 100 * (z_pk - 1))
    i_min = int(np.argmin(z))
    _, neg_min = refine_max(lambda x: -yfun(x) / y_f, i_min)
    undershoot = 100 * neg_min if neg_min > 1e-9 else 0.0  # below that it is rounding, not a dip

    def first_up(level):
        if z[0] >= level:
            return 0.0
        idx = np.nonzero((z[:-1] < level) & (z[1:] >= level))[0]
        if len(idx) == 0:
            return None
        i = idx[0]
        return optimize.brentq(lambda x: yfun(x) / y_f - level, t[i], t[i + 1], xtol=1e-14)

    t10, t90 = first_up(0.1), first_up(0.9)
    out = np.nonzero(np.abs(z - 1) > BAND)[0]
    assert len(out) == 0 or out[-1] < len(t) - len(t) // 10, "not settled well before t_end"
    if len(out) == 0:
        settling = 0.0
    else:
        i = out[-1]
        level = 1 + BAND if z[i] > 1 else 1 - BAND
        settling = optimize.brentq(lambda x: yfun(x) / y_f - level, t[i], t[i + 1], xtol=1e-14)
    i_u = int(np.argmax(np.abs(u)))
    _, u_pk = refine_max(lambda x: abs(ufun(x)), i_u)
    return {
        "overshoot_pct": overshoot,
        "undershoot_pct": undershoot,
        "rise_time_s": None if t10 is None or t90 is None else t90 - t10,
        "settling_time_s": settling,
        "peak_time_s": float(t_pk) if overshoot > 0 else None,
        "final_value": y_f,
        "peak_effort": float(max(u_pk, abs(u[0]))),
    }


def residue_response(num, den, poles):
    """Step response of num/den as a function of t by partial fractions (simple poles)."""
    dden = np.polyder(den)
    g0 = np.polyval(num, 0.0) / np.polyval(den, 0.0)
    res = np.array([np.polyval(num, p) / (p * np.polyval(dden, p)) for p in poles])
    return lambda t: float(g0 + np.real(np.sum(res * np.exp(poles * t))))


def delay_free(case):
    pn, pd, cn, cd = (np.asarray(case[k], float) for k in ("pn", "pd", "cn", "cd"))
    nl, dl = np.polymul(cn, pn), np.polymul(cd, pd)
    char = np.polyadd(dl, nl)
    poles = np.roots(char)
    assert np.all(poles.real < 0), case["name"]
    assert len(set(np.round(poles, 6))) == len(poles), "partial fractions need simple poles"
    yfun = residue_response(nl, char, poles)
    ufun = residue_response(np.polymul(cn, pd), char, poles)
    # Independent check of the partial fractions against scipy's state-space step.
    tt = np.linspace(0, case["t_end"], 2001)
    _, ys = signal.step(signal.lti(nl, char), T=tt)
    assert np.max(np.abs(ys - np.array([yfun(x) for x in tt]))) < 1e-7 * max(1.0, np.max(np.abs(ys))), case["name"]
    return yfun, ufun, poles, []


def char_roots_with_delay(nl, dl, delay):
    """Rightmost roots of D + N e^(-sT): [6/6] Pade estimate, then Newton on the exact function."""
    q = 6
    c = [math.factorial(2 * q - k) * math.factorial(q) / (math.factorial(2 * q) * math.factorial(k) * math.factorial(q - k)) for k in range(q + 1)]
    pade_num = np.array([c[k] * (-delay) ** k for k in range(q + 1)])[::-1]
    pade_den = np.array([c[k] * delay ** k for k in range(q + 1)])[::-1]
    est = np.roots(np.polyadd(np.polymul(dl, pade_den), np.polymul(nl, pade_num)))
    f = lambda s: np.polyval(dl, s) + np.polyval(nl, s) * np.exp(-s * delay)
    df = lambda s: np.polyval(np.polyder(dl), s) + (np.polyval(np.polyder(nl), s) - delay * np.polyval(nl, s)) * np.exp(-s * delay)
    roots = []
    for s in est:
        if abs(s) * delay > 4:  # beyond where the Pade estimate is trustworthy
            continue
        for _ in range(50):
            step = f(s) / df(s)
            s = s - step
            if abs(step) < 1e-14 * max(1, abs(s)):
                break
        if abs(f(s)) < 1e-9 * max(1, abs(np.polyval(dl, s))) and not any(abs(s - r) < 1e-8 for r in roots):
            roots.append(s)
    return np.array(roots)


def with_delay(case):
    pn, pd, cn, cd = (np.asarray(case[k], float) for k in ("pn", "pd", "cn", "cd"))
    T = case["delay"]
    ac, bc, cc, dc = signal.tf2ss(cn, cd)
    ap, bp, cp, dp = signal.tf2ss(pn, pd)
    dc, dp = float(np.squeeze(dc)) if np.size(dc) else 0.0, float(np.squeeze(dp)) if np.size(dp) else 0.0
    nc_, np_ = ac.shape[0], ap.shape[0]
    n = nc_ + np_
    a = np.zeros((n, n))
    a[:nc_, :nc_] = ac
    a[:nc_, nc_:] = -bc @ cp
    a[nc_:, nc_:] = ap
    br = np.concatenate([bc[:, 0], np.zeros(np_)])
    bd = np.concatenate([-bc[:, 0] * dp, bp[:, 0]])
    sols = []

    def seg(t):
        """Interval index of t, taking the right limit at multiples of the delay."""
        return min(int(math.floor(t / T + 1e-12)), len(sols) - 1)

    # Evaluations pin the interval j explicitly, so the end of an interval sees the
    # left limit of the delayed input and the start of the next sees its right limit.
    def u_in(t, j):
        if j < 0:
            return 0.0
        x = sols[j].sol(t)
        ud = u_in(t - T, j - 1) if dp != 0 else 0.0
        return float(cc[0] @ x[:nc_] + dc * (1 - (cp[0] @ x[nc_:] + dp * ud)))

    def u_at(t):
        return u_in(t, seg(t))

    def y_at(t):
        j = seg(t)
        x = sols[j].sol(t)
        return float(cp[0] @ x[nc_:] + (dp * u_in(t - T, j - 1) if dp != 0 else 0.0))

    x0 = np.zeros(n)
    segments = int(math.ceil(case["t_end"] / T)) + 1
    for j in range(segments):
        t0, t1 = j * T, (j + 1) * T
        rhs = lambda t, x, j=j: a @ x + br + bd * u_in(t - T, j - 1)
        r = integrate.solve_ivp(rhs, (t0, t1), x0, method="DOP853", rtol=1e-12, atol=1e-14, dense_output=True)
        assert r.success, r.message
        sols.append(r)
        x0 = r.y[:, -1]
    poles = char_roots_with_delay(np.polymul(cn, pn), np.polymul(cd, pd), T)
    assert np.all(poles.real < 0), case["name"]
    jumps = [k * T for k in range(segments) if k * T <= case["t_end"]]
    return y_at, u_at, poles, jumps


def main():
    rows = []
    for case in CASES:
        run = with_delay if case["delay"] > 0 else delay_free
        yfun, ufun, poles, jumps = run(case)
        y_f = dc_gain(np.polymul(case["cn"], case["pn"]), np.polymul(case["cd"], case["pd"]))
        m = metrics_from(yfun, ufun, case["t_end"], y_f, jumps)
        rows.append({
            "name": case["name"],
            "plant": {"num": list(map(float, case["pn"][::-1])), "den": list(map(float, case["pd"][::-1])), "delay_s": case["delay"]},
            "comp": {"num": list(map(float, case["cn"][::-1])), "den": list(map(float, case["cd"][::-1]))},
            "closed_loop_poles": [{"re": float(p.real), "im": float(p.imag)} for p in poles],
            "step": m,
        })
        print(f"{case['name']}: {m}")
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(json.dumps({
        "generator": "scripts/reference/step_reference.py",
        "libraries": {"numpy": np.__version__, "scipy": scipy.__version__},
        "note": "coefficients in ascending powers of s; times in s; delay-free cases by partial fractions, delayed ones by the method of steps",
        "cases": rows,
    }, indent=1) + "\n")


if __name__ == "__main__":
    main()
