"""One unity-feedback loop L = C*P (with the plant's delay) for the reference table.

Holds the expression texts, their coefficient forms (descending powers) and direct
evaluators, plus the s -> 0 and s -> inf limits read off the coefficients.
"""
from __future__ import annotations

import numpy as np

from ref_expr import check_consistent, compile_expr, expr_coefficients


def trailing_zeros(p: np.ndarray) -> int:
    """Number of roots at s = 0 (trailing zero coefficients, descending order)."""
    k = 0
    while k < len(p) - 1 and p[len(p) - 1 - k] == 0:
        k += 1
    return k


class Loop:
    def __init__(self, plant_text: str, comp_text: str):
        self.plant_text, self.comp_text = plant_text, comp_text
        P, C = expr_coefficients(plant_text), expr_coefficients(comp_text)
        check_consistent(plant_text, P)
        check_consistent(comp_text, C)
        self.P, self.C = P, C
        self.num = np.polymul(C.num, P.num)  # loop numerator N
        self.den = np.polymul(C.den, P.den)  # loop denominator D
        self.delay = P.delay + C.delay
        # closed-loop characteristic polynomial (delay-free part): D + N
        self.char = np.polyadd(self.den, self.num)
        self._p, self._c = compile_expr(plant_text), compile_expr(comp_text)
        self.relative_degree = (len(self.den) - 1) - (len(self.num) - 1)
        assert self.relative_degree >= 0, "improper loop"
        if self.delay:
            assert self.relative_degree >= 1, "a delay loop must be strictly proper (else neutral)"

    # ---- evaluation ---------------------------------------------------------
    def L(self, w):
        """Open-loop frequency response at w (rad/s), from the texts as written."""
        s = 1j * np.asarray(w, dtype=float)
        return self._c(s) * self._p(s) * np.ones_like(s)

    def C_of(self, w):
        s = 1j * np.asarray(w, dtype=float)
        return self._c(s) * np.ones_like(s)

    # ---- limits from the coefficients ----------------------------------------
    def system_type(self) -> int:
        return trailing_zeros(self.den) - trailing_zeros(self.num)

    def low_constant(self) -> float:
        """lim s->0 of s^type * L(s): ratio of the lowest nonzero coefficients."""
        n = self.num[len(self.num) - 1 - trailing_zeros(self.num)]
        d = self.den[len(self.den) - 1 - trailing_zeros(self.den)]
        return n / d

    def L_at_zero(self):
        """L(0) as a real number, or +-inf for type >= 1."""
        t, k = self.system_type(), self.low_constant()
        assert t >= 0, "zeros at the origin are not used in the table"
        return k if t == 0 else np.copysign(np.inf, k)

    def L_at_inf(self) -> float:
        """L(inf): lead-coefficient ratio for a biproper delay-free loop, else 0."""
        if self.relative_degree == 0:
            return self.num[0] / self.den[0]
        return 0.0

    def T_at_zero(self) -> float:
        L0 = self.L_at_zero()
        return 1.0 if np.isinf(L0) else L0 / (1 + L0)

    def scale_rad_s(self):
        """(low, high) magnitudes of all finite nonzero poles/zeros and 1/delay."""
        mags = [abs(r) for p in (self.num, self.den) if len(p) > 1 for r in np.roots(p) if abs(r) > 0]
        if self.delay:
            mags.append(1 / self.delay)
        return min(mags), max(mags)


def error_constants(loop: Loop):
    """(type, Kp, Kv, Ka) from the trailing coefficients: finite, 0 or signed inf."""
    t, k = loop.system_type(), loop.low_constant()
    inf = np.copysign(np.inf, k)
    kp = k if t == 0 else inf
    kv = 0.0 if t == 0 else (k if t == 1 else inf)
    ka = 0.0 if t <= 1 else (k if t == 2 else inf)
    return t, kp, kv, ka
