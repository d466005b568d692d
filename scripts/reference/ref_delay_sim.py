"""Step response of a loop with a pure delay, two independent ways.

Compensator (Ac, Bc, Cc, Dc) and strictly proper plant (Ap, Bp, Cp) from
scipy.signal.tf2ss. With r = 1 from t = 0+:
    e = 1 - y,  u = Cc xc + Dc e,  plant input v(t) = u(t - T) (0 for t < T),  y = Cp xp.

1. Method of steps: on each interval [kT, (k+1)T] the delayed input is known from
   the previous interval's dense solution, so the loop is an ordinary ODE solved by
   scipy.integrate.solve_ivp (DOP853, rtol 1e-12).
2. Delay line: a fixed step h = T/M; over each step the delayed input is linear
   between stored samples, integrated exactly (first-order hold via one matrix
   exponential, Van Loan). Second order in h; used to cross-check (1).
"""
from __future__ import annotations

import numpy as np
from scipy import signal
from scipy.integrate import solve_ivp
from scipy.linalg import expm

from ref_loop import Loop


def realise(loop: Loop):
    Ac, Bc, Cc, Dc = signal.tf2ss(loop.C.num, loop.C.den)
    Ap, Bp, Cp, Dp = signal.tf2ss(loop.P.num, loop.P.den)
    assert np.allclose(Dp, 0), "delay loops need a strictly proper plant"
    return Ac, Bc.ravel(), Cc.ravel(), float(Dc[0, 0]) if Dc.size else 0.0, Ap, Bp.ravel(), Cp.ravel()


class MethodOfSteps:
    """Continuous y(t), u(t) of the delayed loop on [0, t_end]."""

    def __init__(self, loop: Loop, t_end: float):
        Ac, Bc, Cc, Dc, Ap, Bp, Cp = realise(loop)
        self.nc, self.T = len(Bc), loop.delay
        self.Cc, self.Dc, self.Cp = Cc, Dc, Cp
        nc, T = self.nc, self.T
        self.segments = []
        z = np.zeros(nc + len(Bp))
        k = 0
        while k * T < t_end:
            prev = self.segments[-1] if self.segments else None

            def rhs(t, x, prev=prev):
                xc, xp = x[:nc], x[nc:]
                v = 0.0 if prev is None else self._u_of_state(prev.sol(t - T))
                return np.concatenate([Ac @ xc + Bc * (1 - Cp @ xp), Ap @ xp + Bp * v])

            sol = solve_ivp(rhs, (k * T, (k + 1) * T), z, method="DOP853", rtol=1e-12,
                            atol=1e-15, dense_output=True)
            assert sol.success, sol.message
            self.segments.append(sol)
            z = sol.y[:, -1]
            k += 1

    def _u_of_state(self, x):
        xc, xp = x[:self.nc], x[self.nc:]
        return self.Cc @ xc + self.Dc * (1 - self.Cp @ xp)

    def states(self, t: np.ndarray) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        k = np.minimum((t / self.T).astype(int), len(self.segments) - 1)
        out = np.empty((self.nc + len(self.Cp), len(t)))
        for seg in np.unique(k):
            sel = k == seg
            out[:, sel] = self.segments[seg].sol(t[sel])
        return out

    def y(self, t):
        return self.Cp @ self.states(t)[self.nc:]

    def u(self, t):
        x = self.states(t)
        return self.Cc @ x[:self.nc] + self.Dc * (1 - self.Cp @ x[self.nc:])


def delay_line(loop: Loop, t_end: float, per_delay: int = 400):
    """(t, y, u) on the grid h = T/per_delay by exact first-order-hold steps."""
    Ac, Bc, Cc, Dc, Ap, Bp, Cp = realise(loop)
    nc, npl = len(Bc), len(Bp)
    n = nc + npl
    # augmented state [xc, xp, r, v, dv/dt]: r = 1 drives the compensator, v is ramped
    A = np.zeros((n + 3, n + 3))
    A[:nc, :nc], A[:nc, nc:n], A[:nc, n] = Ac, -np.outer(Bc, Cp), Bc
    A[nc:n, nc:n], A[nc:n, n + 1] = Ap, Bp
    A[n + 1, n + 2] = 1.0
    h = loop.delay / per_delay
    E = expm(A * h)[:n]
    steps = int(np.ceil(t_end / h))
    x = np.zeros(n)
    u_right = np.empty(steps + 1)  # u just after each grid time
    y = np.empty(steps + 1)
    for k in range(steps + 1):
        y[k] = Cp @ x[nc:]
        u_right[k] = Cc @ x[:nc] + Dc * (1 - y[k])
        if k == steps:
            break
        j = k - per_delay
        v0 = u_right[j] if j >= 0 else 0.0
        # left limit of v at the end of the step: u is continuous after t = 0
        v1 = u_right[j + 1] if j + 1 > 0 else 0.0
        x = E @ np.concatenate([x, [1.0, v0, (v1 - v0) / h]])
    return np.arange(steps + 1) * h, y, u_right


def delay_step(loop: Loop, poles: np.ndarray, metrics_from_response) -> dict:
    """Step metrics of a stable delay loop, method of steps checked against the delay line."""
    sigma = abs(poles[0].real)
    t_end = loop.delay + 30 / sigma
    sim = MethodOfSteps(loop, t_end)
    # samples: 0.05 rad of the fastest open-loop pole/zero per step, at least 400 per delay
    per = min(20_000, max(400, int(loop.delay * loop.scale_rad_s()[1] / 0.05)))
    k = int(np.ceil(t_end / loop.delay))
    t = np.unique(np.concatenate([np.linspace(i * loop.delay, (i + 1) * loop.delay, per + 1)
                                  for i in range(k)]))
    t = t[t <= t_end]
    yf = loop.T_at_zero()
    m = metrics_from_response(t, sim.y, sim.u, yf)
    tl, yl, ul = delay_line(loop, t_end)
    ml = metrics_from_response(tl, lambda x: np.interp(x, tl, yl), lambda x: np.interp(x, tl, ul), yf)
    for key in ("rise_time_s", "settling_time_s", "peak_time_s"):
        if m[key] is not None:
            assert abs(ml[key] - m[key]) <= 1e-3 * m[key], (key, m[key], ml[key])
    for key in ("overshoot_pct", "undershoot_pct"):
        assert abs(ml[key] - m[key]) <= 0.02, (key, m[key], ml[key])
    assert abs(ml["peak_effort"] - m["peak_effort"]) <= 1e-4 * m["peak_effort"]
    return m
