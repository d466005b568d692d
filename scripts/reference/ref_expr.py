"""Loop expressions for the reference table: coefficients and direct evaluation.

The reference cases are written as text in loopledger's expression syntax
(rational in s, `^`, one optional `exp(-T*s)` factor). This module reads that text
two independent ways, using Python's own expression evaluator on a translated copy:

* `expr_coefficients` evaluates it with `s` bound to a tiny rational-arithmetic
  class, giving numerator/denominator coefficients (descending powers, numpy
  convention) and the delay. Nothing is cancelled, like the product under test.
* `expr_values` evaluates it with `s` bound to a complex numpy array, following the
  factored form exactly as written (more accurate than expanded coefficients).

`check_consistent` asserts both readings agree, so the committed coefficient lists
are known to describe the committed text.
"""
from __future__ import annotations

import re

import numpy as np


class Rat:
    """num(s)/den(s) * exp(-delay*s), coefficients in descending powers."""

    def __init__(self, num, den=(1.0,), delay=0.0):
        self.num = np.atleast_1d(np.asarray(num, dtype=float))
        self.den = np.atleast_1d(np.asarray(den, dtype=float))
        self.delay = float(delay)

    @staticmethod
    def lift(x):
        return x if isinstance(x, Rat) else Rat([float(x)])

    def __add__(self, o):
        o = Rat.lift(o)
        if self.delay or o.delay:
            raise ValueError("a delay may only appear as a factor")
        return Rat(np.polyadd(np.polymul(self.num, o.den), np.polymul(o.num, self.den)),
                   np.polymul(self.den, o.den))

    __radd__ = __add__

    def __neg__(self):
        return Rat(-self.num, self.den, self.delay)

    def __sub__(self, o):
        return self + (-Rat.lift(o))

    def __rsub__(self, o):
        return Rat.lift(o) + (-self)

    def __mul__(self, o):
        o = Rat.lift(o)
        return Rat(np.polymul(self.num, o.num), np.polymul(self.den, o.den), self.delay + o.delay)

    __rmul__ = __mul__

    def __truediv__(self, o):
        o = Rat.lift(o)
        if o.delay:
            raise ValueError("a delay may not be divided by")
        return Rat(np.polymul(self.num, o.den), np.polymul(self.den, o.num), self.delay)

    def __rtruediv__(self, o):
        return Rat.lift(o) / self

    def __pow__(self, k):
        if int(k) != k or k < 0:
            raise ValueError("only non-negative integer powers")
        r = Rat([1.0])
        for _ in range(int(k)):
            r = r * self
        return r


def _rat_exp(arg: Rat) -> Rat:
    # exp(-T*s): the argument must be the monomial -T*s
    num = np.trim_zeros(arg.num, "f")
    if len(arg.den) != 1 or len(num) != 2 or num[1] != 0 or num[0] >= 0:
        raise ValueError("exp() must hold -T*s with T > 0")
    return Rat([1.0], [1.0], -num[0] / arg.den[0])


def _python_text(text: str) -> str:
    if not re.fullmatch(r"[0-9eE.+\-*/^()s exp]+", text):
        raise ValueError(f"unexpected character in {text!r}")
    return text.replace("^", "**")


def expr_coefficients(text: str) -> Rat:
    """Numerator/denominator coefficients (descending) and delay of an expression."""
    r = eval(_python_text(text), {"__builtins__": {}}, {"s": Rat([1.0, 0.0]), "exp": _rat_exp})
    r = Rat.lift(r)
    lead = r.den[0]
    return Rat(np.trim_zeros(r.num / lead, "f") if np.any(r.num) else [0.0], r.den / lead, r.delay)


def compile_expr(text: str):
    """A vectorised evaluator s -> value of the expression as written (factored form)."""
    code = compile(_python_text(text), "<expr>", "eval")

    def value(s):
        return eval(code, {"__builtins__": {}}, {"s": s, "exp": np.exp})

    return value


def rat_values(r: Rat, s):
    """Value of coefficient form at complex points s."""
    return np.polyval(r.num, s) / np.polyval(r.den, s) * np.exp(-r.delay * s)


def check_consistent(text: str, r: Rat, rel=1e-8):
    """Assert that the coefficient form and the text agree at points spread over the band."""
    roots = np.concatenate([np.roots(r.num) if len(r.num) > 1 else [], np.roots(r.den)])
    mags = np.abs(roots[np.abs(roots) > 0]) if len(roots) else np.array([1.0])
    lo, hi = (mags.min(), mags.max()) if len(mags) else (1.0, 1.0)
    w = np.geomspace(lo / 30, hi * 30, 41) * np.exp(0.3j)
    direct = compile_expr(text)(w)
    direct = direct * np.ones_like(w)
    coeff = rat_values(r, w)
    err = np.abs(direct - coeff) / np.abs(direct)
    assert err.max() < rel, f"{text}: coefficient form disagrees ({err.max():.2e})"
