"""Cascaded loops of the demo machine analysed with numpy/scipy (numpy 2.4.6, scipy 1.17.1).

Used by scripts/demo_reference.py. Margins, crossovers, peaks and bandwidth come from
the exact frequency response on a dense grid (delays exact, inner loops closed exactly:
T = L/(1+L)); stability and the step response from a state-space model in which each
delay is an [8/8] Pade approximant (the delays are small: w*T < 3 up to 2 kHz).
"""
from __future__ import annotations

import math
import os
import sys
from math import factorial

import numpy as np
import scipy.linalg
import scipy.signal as sig

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "reference"))
from ref_expr import compile_expr, expr_coefficients  # noqa: E402

TWO_PI = 2 * math.pi
W = np.geomspace(1e-2, 3e5, 600_000)
PADE = 8

# ---------- compensator blocks (the product's block forms, src/model/blocks.ts) ----------

def hz(t: str, unit: str) -> float:
    t = t.strip()
    if t.lower().endswith("rad/s"):
        return float(t[:-5])
    if t.lower().endswith("khz"):
        return float(t[:-3]) * 1e3 * TWO_PI
    if t.lower().endswith("hz"):
        return float(t[:-2]) * TWO_PI
    return float(t) * (TWO_PI if unit == "hz" else 1)


def block_tf(word: str, unit: str):
    """(num, den) descending of one block word."""
    kind, _, arg = word.partition(":")
    if kind == "gain":
        return [float(arg)], [1.0]
    if kind == "int":
        return [1.0], [1.0, 0.0]
    if kind == "pi":
        return [1.0, hz(arg, unit)], [1.0, 0.0]
    if kind in ("lead", "lag"):
        z, p = (hz(x, unit) for x in arg.split("/"))
        return [1 / z, 1.0], [1 / p, 1.0]
    if kind == "notch":
        centre, *rest = arg.split(",")
        kv = dict(x.split("=") for x in rest)
        w, q, d = hz(centre, unit), float(kv["q"]), float(kv["depth"].lower().removesuffix("db"))
        zp = 1 / (2 * q)
        zz = zp * 10 ** (-d / 20)
        return [1.0, 2 * zz * w, w * w], [1.0, 2 * zp * w, w * w]
    if kind == "lp1":
        return [1.0], [1 / hz(arg, unit), 1.0]
    if kind == "lp2":
        corner, *rest = arg.split(",")
        w = hz(corner, unit)
        zeta = float(rest[0].split("=")[1]) if rest else math.sqrt(0.5)
        return [w * w], [1.0, 2 * zeta * w, w * w]
    raise ValueError(word)


def comp_tf(blocks: list[str], unit: str):
    num, den = np.array([1.0]), np.array([1.0])
    for b in blocks:
        n, d = block_tf(b, unit)
        num, den = np.polymul(num, n), np.polymul(den, d)
    return num, den


# ---------- state space with Pade delays ----------

def pade(delay: float, m: int = PADE):
    c = [factorial(2 * m - k) * factorial(m) / (factorial(2 * m) * factorial(k) * factorial(m - k)) for k in range(m + 1)]
    return np.array([c[k] * (-delay) ** k for k in range(m, -1, -1)]), np.array([c[k] * delay ** k for k in range(m, -1, -1)])


def ss_of(num, den):
    num = np.trim_zeros(np.atleast_1d(np.asarray(num, float)), "f")
    den = np.trim_zeros(np.atleast_1d(np.asarray(den, float)), "f")
    if len(den) == 1:
        return np.zeros((0, 0)), np.zeros((0, 1)), np.zeros((1, 0)), np.array([[num[-1] / den[0] if len(num) else 0.0]])
    a, b, c, d = sig.tf2ss(num, den)
    return a, b, c, d


def series(g1, g2):
    """u -> g1 -> g2 -> y"""
    a1, b1, c1, d1 = g1
    a2, b2, c2, d2 = g2
    n1, n2 = a1.shape[0], a2.shape[0]
    a = np.block([[a1, np.zeros((n1, n2))], [b2 @ c1, a2]])
    b = np.vstack([b1, b2 @ d1])
    c = np.hstack([d2 @ c1, c2])
    return a, b, c, d2 @ d1


def feedback(g):
    """Unity negative feedback around g: r -> y. Also returns e = r - y as a second output."""
    a, b, c, d = g
    k = 1.0 / (1.0 + d[0, 0])
    acl = a - b @ (k * c)
    bcl = b * k
    ccl = k * c
    dcl = np.array([[d[0, 0] * k]])
    return acl, bcl, ccl, dcl


def tf_ss(text: str | None = None, num=None, den=None, delay: float = 0.0):
    if text is not None:
        r = expr_coefficients(text)
        num, den, delay = r.num, r.den, r.delay
    g = ss_of(num, den)
    if delay > 0:
        g = series(g, ss_of(*pade(delay)))
    return g


# ---------- one loop ----------

class Loop:
    def __init__(self, ref, plant_text, blocks, unit, inner):
        self.ref, self.plant_text, self.blocks, self.unit, self.inner = ref, plant_text, blocks, unit, inner
        self.pf = compile_expr(plant_text)
        self.cn, self.cd = comp_tf(blocks, unit)

    def c_jw(self, w):
        s = 1j * w
        return np.polyval(self.cn, s) / np.polyval(self.cd, s)

    def l_jw(self, w):
        v = self.pf(1j * w) * self.c_jw(w)
        if self.inner is not None:
            li = self.inner.l_jw(w)
            v = v * li / (1 + li)
        return v

    def open_ss(self):
        p = tf_ss(self.plant_text)
        if self.inner is not None:
            p = series(self.inner.closed_ss(), p)
        return series(tf_ss(num=self.cn, den=self.cd), p)

    def closed_ss(self):
        return feedback(self.open_ss())


def crossings(f, grid):
    v = f(grid)
    idx = np.nonzero(np.sign(v[:-1]) * np.sign(v[1:]) < 0)[0]
    out = []
    for i in idx:
        a, b = grid[i], grid[i + 1]
        for _ in range(60):
            m = math.sqrt(a * b)
            if np.sign(f(np.array([m]))[0]) == np.sign(f(np.array([a]))[0]):
                a = m
            else:
                b = m
        out.append(math.sqrt(a * b))
    return out


def analyse(loop: Loop) -> dict:
    mag = lambda w: np.abs(loop.l_jw(w)) - 1
    gc = crossings(mag, W)
    pms = [float((np.degrees(np.angle(loop.l_jw(np.array([w]))[0])) + 180 + 180) % 360 - 180) for w in gc]
    # Phase crossovers: Im L = 0 with Re L < 0.
    im = lambda w: np.imag(loop.l_jw(w))
    pc = [w for w in crossings(im, W) if np.real(loop.l_jw(np.array([w]))[0]) < 0]
    gms = [float(-20 * np.log10(np.abs(loop.l_jw(np.array([w]))[0]))) for w in pc]
    lv = loop.l_jw(W)
    s_mag = np.abs(1 / (1 + lv))
    t_mag = np.abs(lv / (1 + lv))
    t0 = t_mag[0]
    below = np.nonzero(t_mag < t0 / math.sqrt(2))[0]
    a, b, c, d = loop.closed_ss()
    poles = np.linalg.eigvals(a)
    stable = bool(np.all(poles.real < 0))
    # kv: lim s->0 s L(s); L has one free integrator in every loop here that has a kv limit.
    w0 = 1e-4
    kv = float(np.abs(1j * w0 * loop.l_jw(np.array([w0]))[0]))
    res = {
        "stable": stable,
        "max_pole_re": float(poles.real.max()),
        "gain_crossovers_rad_s": gc,
        "phase_margins_deg": pms,
        "phase_crossovers_rad_s": pc,
        "gain_margins_db": gms,
        "gain_margin_db": min(gms, key=abs) if gms else None,
        "peak_sensitivity": float(s_mag.max()),
        "bandwidth_rad_s": float(W[below[0]]) if len(below) else None,
        "kv": kv,
        "step": None,
    }
    if stable:
        # tf2ss companion forms of stiff cascades are badly scaled: balance before simulating.
        a, (scale, _) = scipy.linalg.matrix_balance(a, permute=False, separate=True)
        b, c = b / scale[:, None], c * scale[None, :]
        t_end = 12 / min(abs(p.real) for p in poles if abs(p) > 0)
        t = np.linspace(0, min(t_end, 5.0), 200_001)
        _, y = sig.step((a, b, c, d), T=t)
        yf = float(np.real(d[0, 0] - c @ np.linalg.solve(a, b))[0, 0])
        over = max(0.0, 100 * (y.max() - yf) / yf)
        outside = np.nonzero(np.abs(y - yf) > 0.02 * abs(yf))[0]
        res["step"] = {"overshoot_pct": float(over), "settling_time_s": float(t[outside[-1] + 1]) if len(outside) else 0.0, "final_value": yf}
    return res
