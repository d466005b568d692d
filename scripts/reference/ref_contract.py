"""Every key of the one-loop calculator contract (DESIGN.md) for one loop."""
from __future__ import annotations

import numpy as np

import ref_freq as fq
from ref_delay_sim import delay_step
from ref_loop import Loop, error_constants
from ref_stability import closed_loop
from ref_step import delay_free_step, metrics_from_response


def smallest_magnitude(values):
    return min(values, key=abs) if values else None


def contract(loop: Loop) -> dict:
    stable, poles, poles_exact = closed_loop(loop)
    typ, kp, kv, ka = error_constants(loop)
    wc = fq.gain_crossovers(loop)
    pms = fq.phase_margins(loop, wc)
    i_pm = int(np.argmin(np.abs(pms))) if pms else None
    gms = fq.gain_margin_list(loop)
    gm_vals = [g for _, g in gms]
    i_gm = int(np.argmin(np.abs(gm_vals))) if gms else None
    upper = [g for g in gm_vals if g > 0]
    lower = [g for g in gm_vals if g < 0]
    if not stable:
        delay_margin = None
    elif not wc:
        delay_margin = np.inf
    else:
        # PM taken in (0, 360] deg, in rad, over the crossover frequency
        delay_margin = min(np.radians(pm if pm > 0 else pm + 360.0) / w for pm, w in zip(pms, wc))
    Ms, wMs, Mt = fq.sensitivity_peaks(loop)
    if not stable:
        step = None
    elif loop.delay:
        step = delay_step(loop, poles, metrics_from_response)
    else:
        step = delay_free_step(loop, poles)
    return {
        "stable": bool(stable),
        "closed_loop_poles": [{"re": float(p.real), "im": float(p.imag)} for p in poles],
        "closed_loop_poles_exact": poles_exact,
        "closed_loop_dc_gain": loop.T_at_zero(),
        "system_type": typ,
        "kp": kp, "kv": kv, "ka": ka,
        "gain_crossovers_rad_s": wc,
        "phase_margins_deg": pms,
        "phase_margin_deg": pms[i_pm] if pms else None,
        "phase_margin_at_rad_s": wc[i_pm] if pms else None,
        "phase_crossovers_rad_s": [w for w, _ in gms],
        "gain_margins_db": gm_vals,
        "gain_margin_db": gm_vals[i_gm] if gms else None,
        "gain_margin_at_rad_s": gms[i_gm][0] if gms else None,
        "gain_margin_upper_db": min(upper) if upper else None,
        "gain_margin_lower_db": max(lower) if lower else None,
        "delay_margin_s": delay_margin,
        "peak_sensitivity": Ms,
        "peak_sensitivity_at_rad_s": wMs,
        "peak_complementary": Mt,
        "bandwidth_rad_s": fq.bandwidth(loop),
        "step": step,
    }


def to_json_value(v):
    """DESIGN.md JSON rules: +-inf as strings, numpy scalars as plain numbers."""
    if isinstance(v, dict):
        return {k: to_json_value(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [to_json_value(x) for x in v]
    if isinstance(v, (bool, np.bool_)):
        return bool(v)
    if isinstance(v, (int, np.integer)):
        return int(v)
    if isinstance(v, (float, np.floating)):
        if np.isinf(v):
            return "inf" if v > 0 else "-inf"
        assert np.isfinite(v), "NaN in the reference"
        return float(v)
    return v
