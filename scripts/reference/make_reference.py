#!/usr/bin/env python3
"""Writes fixtures/reference/loops.json: an independent reference table of the one-loop
calculator contract (DESIGN.md) for the loops in ref_cases.py.

Written for numpy 2.4.6 and scipy 1.17.1 (the versions used are recorded in the
JSON). Only general-purpose numerics are used: numpy.roots / polyval, scipy.optimize
(brentq, bounded Brent), scipy.signal (tf2ss, lsim, TransferFunction),
scipy.integrate.solve_ivp and scipy.linalg.expm. No control-design library.

Methods (each module says more):
* stability: argument principle on D + N exp(-sT) for every loop; for delay-free
  loops it must agree with numpy.roots of D + N (ref_stability.py);
* closed-loop poles: numpy.roots polished by Newton (delay-free, exact); for delay
  loops, exact characteristic roots by Newton from [12/12] Pade seeds (a subset,
  rightmost first; `closed_loop_poles_exact` is false);
* crossovers: polynomial roots cross-checked by dense scans, polished by brentq at
  rtol 1e-14 on the factored expression (ref_freq.py);
* step: exact modal sum (delay-free) checked against lsim; method of steps checked
  against a first-order-hold delay line (delay loops) (ref_step.py, ref_delay_sim.py).
Closed-form checks (ref_checks.py) run first; the script stops if one fails.

Usage: python3 scripts/reference/make_reference.py   (from the repository root)
"""
from __future__ import annotations

import json
import os
import sys

import numpy as np
import scipy

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

from ref_cases import CASES  # noqa: E402
from ref_checks import run_all  # noqa: E402
from ref_contract import contract, to_json_value  # noqa: E402
from ref_freq import DELAY_GM_LIST_CAP_DB  # noqa: E402
from ref_loop import Loop  # noqa: E402

OUT = os.path.join(os.path.dirname(__file__), "..", "..", "fixtures", "reference", "loops.json")

TOLERANCES = {
    "frequency_and_margin_rel": 1e-4,
    "frequency_abs_floor_rad_s": 1e-9,
    "exact_by_coefficients_rel": 1e-9,
    "margin_abs_floor_deg_db": 1e-4,
    "pole_rel": 1e-6,
    "delay_dominant_pole_rel": 2e-2,
    "step_time_rel": 1e-2,
    "overshoot_undershoot_abs_pct": 0.2,
    "final_value_and_peak_effort_rel": 1e-3,
    "delay_phase_crossovers_compared_up_to_gm_db": 40.0,
    "delay_phase_crossovers_listed_up_to_gm_db": DELAY_GM_LIST_CAP_DB,
}


def coefficient_record(loop: Loop) -> dict:
    """Coefficient lists, descending powers of s (numpy convention), and the delay."""
    return {
        "plant_num_desc": loop.P.num.tolist(), "plant_den_desc": loop.P.den.tolist(),
        "plant_delay_s": loop.P.delay,
        "comp_num_desc": loop.C.num.tolist(), "comp_den_desc": loop.C.den.tolist(),
    }


def main():
    assert np.__version__ == "2.4.6" and scipy.__version__ == "1.17.1", \
        f"written for numpy 2.4.6 / scipy 1.17.1, found {np.__version__} / {scipy.__version__}"
    run_all()
    cases = []
    for name, why, plant, comp in CASES:
        loop = Loop(plant, comp)
        expected = to_json_value(contract(loop))
        cases.append({"name": name, "why": why, "plant": plant, "comp": comp,
                      "coefficients": coefficient_record(loop), "expected": expected})
        print(f"ok  {name}: stable={expected['stable']} PM={expected['phase_margin_deg']}")
    doc = {
        "generator": "scripts/reference/make_reference.py",
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "notes": [
            "Frequencies in rad/s; infinite values are \"inf\"/\"-inf\"; null = does not exist.",
            "closed_loop_poles: all roots of D+N when closed_loop_poles_exact is true; for delay "
            "loops a subset of exact characteristic roots, rightmost first.",
            "Delay loops have infinitely many phase crossovers: listed while GM <= "
            f"{DELAY_GM_LIST_CAP_DB} dB.",
            "A w = 0 phase crossover is listed only where L(0) is finite and negative (type 0); "
            "a w = inf one (\"inf\") where the loop is biproper, delay-free and L(inf) < 0.",
            "coefficients: descending powers of s (numpy order), as read from the texts.",
        ],
        "tolerances": TOLERANCES,
        "cases": cases,
    }
    os.makedirs(os.path.dirname(OUT), exist_ok=True)
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"wrote {len(cases)} cases to {os.path.normpath(OUT)}")


if __name__ == "__main__":
    main()
