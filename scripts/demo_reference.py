"""Checks the demo machine (fixtures/demo/machine.json) and writes reference results.

1. Every plant expression is compared with the physics it claims to come from: the
   model parameters are turned into a frequency response here, independently of the
   text, and the two must agree within 0.5 % (the rounding of the numbers in the text).
2. The history is replayed to each loop's latest state, and every loop is analysed
   for every plant variant with numpy/scipy (numpy 2.4.6, scipy 1.17.1):
   - margins, crossovers, peak sensitivity and bandwidth from the exact frequency
     response on a dense grid (delays exact, inner loops closed exactly: T = L/(1+L));
   - stability and the step response from a state-space model in which each delay is
     an [8/8] Pade approximant (delays here are small: w*T < 3 up to 2 kHz);
   - requirements judged as the product defines them (DESIGN.md): pm on the smallest
     |PM| of all crossovers, gm on |GM| of the reported margin, fc on the highest
     crossover, kv from the low-frequency limit of s L(s), sep = inner bw / outer bw.
   Variants of an outer loop are the union of its own and its inner loop's names; a
   loop lacking a name uses its default variant ("nominal", else the first by name).
3. The results go to fixtures/demo/reference.json for test/cli/demo.test.ts.

Run: python3 scripts/demo_reference.py
"""
from __future__ import annotations

import json
import math
import os
import sys

import numpy as np
import scipy

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "reference"))
from demo_loops import Loop, analyse, hz  # noqa: E402
from ref_expr import compile_expr  # noqa: E402

HERE = os.path.dirname(os.path.abspath(__file__))
FIXTURE = os.path.join(HERE, "..", "fixtures", "demo", "machine.json")
OUT = os.path.join(HERE, "..", "fixtures", "demo", "reference.json")
TWO_PI = 2 * math.pi


# ---------- 1. physics -> frequency response ----------

def physics_response(m: dict, s: np.ndarray) -> np.ndarray:
    k = m["kind"]
    if k == "winding":
        g = 1 / (m["inductance_h"] * s + m["resistance_ohm"])
    elif k == "integrator":
        g = m["scale"] / s
    elif k == "rigid":
        g = m["torque_constant_nm_per_a"] / (m["inertia_kg_m2"] * s + m["viscous_nm_s_per_rad"])
    elif k == "screw_rigid":
        j = m["motor_inertia_kg_m2"] + m["load_mass_kg"] * (m["screw_lead_m"] / TWO_PI) ** 2
        g = m["torque_constant_nm_per_a"] / (j * s + m["viscous_nm_s_per_rad"])
    elif k in ("belt_two_mass", "shaft_two_mass"):
        jm = m["motor_inertia_kg_m2"]
        if k == "belt_two_mass":
            r = m["pulley_radius_m"]
            jl, kt = m["load_mass_kg"] * r * r, m["belt_stiffness_n_per_m"] * r * r
        else:
            jl, kt = m["load_inertia_kg_m2"], m["shaft_stiffness_nm_per_rad"]
        # Two inertias joined by a spring kt and a damper c (c chosen from the
        # anti-resonance damping: c = 2 zeta_a sqrt(kt jl)); motor speed per torque:
        # (jl s^2 + c s + kt) / (s (jm jl s^2 + c (jm + jl) s + kt (jm + jl))).
        c = 2 * m["antiresonance_damping"] * math.sqrt(kt * jl)
        g = m["torque_constant_nm_per_a"] * (jl * s**2 + c * s + kt) / (s * (jm * jl * s**2 + c * (jm + jl) * s + kt * (jm + jl)))
    else:
        raise ValueError(k)
    bw = m.get("amplifier_bw_hz")
    if bw:
        g = g / (s / (TWO_PI * bw) + 1)
    return g * np.exp(-m["delay_s"] * s)


def check_plants(plants: dict) -> None:
    s = 1j * np.geomspace(1, 1e5, 2000)
    for name, p in plants.items():
        text = compile_expr(p["text"])(s)
        phys = physics_response(p["model"], s)
        err = float(np.max(np.abs(text - phys) / np.abs(phys)))
        # The text rounds the numbers; near a lightly damped pole pair the response is sensitive, and
        # 5 significant figures on those keep it within 0.5 %.
        assert err < 5e-3, f"{name}: expression and physics disagree by {err:.2%}"
        print(f"plant {name}: text matches physics within {err:.2%}")


def requirement_value(req: dict, m: dict, inner_bw):
    k = req["metric"]
    if k == "pm":
        return min((abs(x) for x in m["phase_margins_deg"]), default=math.inf)
    if k == "gm":
        return math.inf if m["gain_margin_db"] is None else abs(m["gain_margin_db"])
    if k == "fc":
        return max(m["gain_crossovers_rad_s"]) if m["gain_crossovers_rad_s"] else None
    if k == "bw":
        return m["bandwidth_rad_s"]
    if k == "ms":
        return m["peak_sensitivity"]
    if k == "kv":
        return m["kv"]
    if k == "os":
        return None if m["step"] is None else m["step"]["overshoot_pct"]
    if k == "ts":
        return None if m["step"] is None else m["step"]["settling_time_s"]
    if k == "sep":
        return None if inner_bw is None or m["bandwidth_rad_s"] is None else inner_bw / m["bandwidth_rad_s"]
    raise ValueError(k)


def parse_req(text: str, unit: str) -> dict:
    """The few requirement forms the demo uses, in base units."""
    for op in (">=", "<="):
        if op in text:
            key, val = text.split(op)
            break
    val = val.strip()
    if key == "eramp":
        return {"metric": "kv", "op": ">=", "value": 1 / float(val), "text": text}
    if key in ("fc", "bw"):
        return {"metric": key, "op": op, "value": hz(val, unit), "text": text}
    if key == "ts":
        return {"metric": key, "op": op, "value": float(val.removesuffix("ms")) / 1e3 if val.endswith("ms") else float(val.removesuffix("s")), "text": text}
    return {"metric": key, "op": op, "value": float(val.lower().removesuffix("db").removesuffix("%")), "text": text}


# ---------- 2. replay and analyse ----------

def replay(machine: dict) -> dict:
    loops: dict[str, dict] = {}
    for step in sorted(machine["history"], key=lambda h: h["at"]):
        ref, do = step["loop"], step["do"]
        if do == "loop":
            loops[ref] = {"inner": step.get("inner"), "revs": []}
            state = {"plants": {step.get("variant", "nominal"): machine["plants"][step["plant"]]["text"]}, "reqs": [], "blocks": []}
        else:
            state = json.loads(json.dumps(loops[ref]["revs"][-1]))
            if do == "plant":
                state["plants"][step.get("variant", "nominal")] = machine["plants"][step["plant"]]["text"]
            elif do == "spec":
                for t in step["reqs"]:
                    r = parse_req(t, machine["unit"])
                    state["reqs"] = [x for x in state["reqs"] if (x["metric"], x["op"]) != (r["metric"], r["op"])] + [r]
            elif do == "comp":
                state["blocks"] = step["blocks"]
            elif do == "revert":
                state = json.loads(json.dumps(loops[ref]["revs"][step["to"] - 1]))
        loops[ref]["revs"].append(state)
    return loops


def variant_order(names):
    names = sorted(set(names))
    if "nominal" in names:
        names.remove("nominal")
        names.insert(0, "nominal")
    return names


def variants_of(loops, ref):
    own = list(loops[ref]["revs"][-1]["plants"])
    inner = loops[ref]["inner"]
    return variant_order(own + (variants_of(loops, inner) if inner else []))


def build(loops, ref, variant, unit) -> Loop:
    head = loops[ref]["revs"][-1]
    names = variant_order(head["plants"])
    text = head["plants"][variant if variant in head["plants"] else names[0]]
    inner = loops[ref]["inner"]
    inner_loop = None
    if inner:
        iv = variant if variant in variants_of(loops, inner) else variants_of(loops, inner)[0]
        inner_loop = build(loops, inner, iv, unit)
    return Loop(ref, text, head["blocks"], unit, inner_loop)


def main() -> None:
    machine = json.load(open(FIXTURE))
    check_plants(machine["plants"])
    unit = machine["unit"]
    loops = replay(machine)
    out = {"generator": f"scripts/demo_reference.py (numpy {np.__version__}, scipy {scipy.__version__})", "loops": {}}
    for ref in sorted(loops):
        head = loops[ref]["revs"][-1]
        per_variant = {}
        worst = "pass"
        for v in variants_of(loops, ref):
            lp = build(loops, ref, v, unit)
            m = analyse(lp)
            inner_bw = analyse(lp.inner)["bandwidth_rad_s"] if lp.inner is not None else None
            fails = []
            for r in head["reqs"]:
                val = requirement_value(r, m, inner_bw)
                ok = val is not None and m["stable"] and (val >= r["value"] if r["op"] == ">=" else val <= r["value"])
                if not ok:
                    fails.append({"requirement": r["text"], "value": val, "limit": r["value"]})
            m["failures"] = fails
            m["status"] = "unstable" if not m["stable"] else ("fail" if fails else "pass")
            per_variant[v] = m
            order = ["pass", "fail", "unstable"]
            worst = max(worst, m["status"], key=order.index)
        out["loops"][ref] = {"revision": len(loops[ref]["revs"]), "status": worst, "variants": per_variant}
        print(f"{ref:10s} rev {len(loops[ref]['revs'])}  {worst:8s} " + "; ".join(
            f"{v}: PM {min((abs(x) for x in m['phase_margins_deg']), default=math.inf):.1f} "
            f"GM {m['gain_margin_db'] if m['gain_margin_db'] is None else round(m['gain_margin_db'], 1)} "
            f"fc {max(m['gain_crossovers_rad_s'], default=0) / TWO_PI:.1f}Hz "
            f"bw {(m['bandwidth_rad_s'] or 0) / TWO_PI:.1f}Hz ms {m['peak_sensitivity']:.2f} "
            f"os {m['step']['overshoot_pct'] if m['step'] else None} "
            f"fails {[f['requirement'] for f in m['failures']]}" for v, m in per_variant.items()))
    with open(OUT, "w") as f:
        json.dump(out, f, indent=1, sort_keys=True, allow_nan=True)
        f.write("\n")


if __name__ == "__main__":
    main()
