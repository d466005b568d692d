"""Closed-form checks of the reference machinery itself, run before the table is written.

Sources (standard results, stated in e.g. Ogata, Modern Control Engineering 5th ed.,
ch. 5 (transient response of first and second order systems) and ch. 7 (Bode
analysis); Franklin, Powell, Emami-Naeini, Feedback Control of Dynamic Systems,
ch. 6 (margins, delay) -- from memory):
* K/(s(s+a)): w_c = sqrt((sqrt(a^4 + 4K^2) - a^2)/2), PM = 90 - atan(w_c/a) deg;
  closed loop s^2 + a s + K: zeta = a/(2 sqrt K), overshoot 100 exp(-pi zeta/sqrt(1-zeta^2)),
  peak time pi/(w_n sqrt(1-zeta^2)).
* K/(s(s+1)(s+2)): phase crossover at sqrt(2), GM = 20 log10(6/K) dB.
* K exp(-sT)/s: w_c = K, PM = 90 - K T (deg), delay margin (pi/2)/K - T, stable iff K T < pi/2.
* First-order closed loop with time constant tau: rise 10-90 % = tau ln 9, 2 % settling
  = tau ln 50, bandwidth = 1/tau.
* K exp(-sT)/(tau s + 1) under unit feedback: for T < t < 2T the output is the open-loop
  step response K (1 - exp(-(t-T)/tau)) (the feedback has not yet arrived).
"""
from __future__ import annotations

import numpy as np

import ref_freq as fq
from ref_contract import contract
from ref_delay_sim import MethodOfSteps, delay_line
from ref_loop import Loop
from ref_stability import rhp_zero_count


def close(a, b, rel, what):
    assert abs(a - b) <= rel * abs(b), f"{what}: {a} vs closed form {b}"


def check_second_order():
    K, a = 1200.0, 35.0
    m = contract(Loop(f"{K}/(s*(s+{a}))", "1"))
    wc = np.sqrt((np.sqrt(a ** 4 + 4 * K ** 2) - a ** 2) / 2)
    close(m["gain_crossovers_rad_s"][0], wc, 1e-12, "crossover")
    close(m["phase_margin_deg"], 90 - np.degrees(np.arctan(wc / a)), 1e-12, "phase margin")
    zeta, wn = a / (2 * np.sqrt(K)), np.sqrt(K)
    close(m["step"]["overshoot_pct"], 100 * np.exp(-np.pi * zeta / np.sqrt(1 - zeta ** 2)), 1e-9, "overshoot")
    close(m["step"]["peak_time_s"], np.pi / (wn * np.sqrt(1 - zeta ** 2)), 1e-9, "peak time")


def check_third_order_gm():
    K = 2.5
    m = contract(Loop(f"{K}/(s*(s+1)*(s+2))", "1"))
    close(m["phase_crossovers_rad_s"][0], np.sqrt(2), 1e-12, "phase crossover")
    close(m["gain_margin_db"], 20 * np.log10(6 / K), 1e-12, "gain margin")


def check_integrator_delay():
    K, T = 4.0, 0.1
    loop = Loop(f"{K}/s*exp(-{T}*s)", "1")
    close(fq.gain_crossovers(loop)[0], K, 1e-12, "delay crossover")
    close(fq.phase_margins(loop, [K])[0], 90 - np.degrees(K * T), 1e-10, "delay PM")
    m = contract(loop)
    close(m["delay_margin_s"], (np.pi / 2) / K - T, 1e-10, "delay margin")
    assert rhp_zero_count(Loop(f"{np.pi / 2 / T * 0.98}/s*exp(-{T}*s)", "1")) == 0
    assert rhp_zero_count(Loop(f"{np.pi / 2 / T * 1.02}/s*exp(-{T}*s)", "1")) == 2


def check_first_order_step():
    K, tau = 4.0, 0.5
    m = contract(Loop(f"{K}/({tau}*s+1)", "1"))
    tau_cl = tau / (1 + K)
    close(m["step"]["rise_time_s"], tau_cl * np.log(9), 1e-9, "rise time")
    close(m["step"]["settling_time_s"], tau_cl * np.log(50), 1e-9, "settling time")
    close(m["bandwidth_rad_s"], 1 / tau_cl, 1e-12, "bandwidth")
    close(m["step"]["peak_effort"], 1.0, 1e-12, "peak effort u(0+)")


def check_dead_time_first_interval():
    K, tau, T = 0.8, 0.4, 0.25
    loop = Loop(f"{K}*exp(-{T}*s)/({tau}*s+1)", "1")
    t = np.linspace(T, 2 * T, 11)
    exact = K * (1 - np.exp(-(t - T) / tau))
    sim = MethodOfSteps(loop, 3 * T)
    assert np.abs(sim.y(t) - exact).max() < 1e-10, "method of steps"
    tl, yl, _ = delay_line(loop, 3 * T)
    assert np.abs(np.interp(t, tl, yl) - exact).max() < 1e-9, "delay line"


def run_all():
    for check in (check_second_order, check_third_order_gm, check_integrator_delay,
                  check_first_order_step, check_dead_time_first_interval):
        check()
        print(f"ok  {check.__name__}")
