#!/usr/bin/env python3
"""Make the wet-surface reference table for siccant's transfer engine.

An independent implementation of the constant-rate wet-surface balance

    h (T - Ts) + eps sigma (Tw^4 - Ts^4) + U (T - Ts) = k_Y (w_s(Ts) - w) lambda(Ts)
    k_Y = h / c_s (Pr/Sc)^(2/3),  Pr and Sc at the film temperature (T + Ts)/2

with every air and water property taken from CoolProp (HAPropsSI for humid
air, PropsSI for the latent heat of water) instead of siccant's air engine,
solved with scipy's brentq. The water-vapour diffusivity, which CoolProp
does not provide, is the Fuller-Schettler-Giddings estimate (Fuller, Schettler
and Giddings, Ind. Eng. Chem. 58 (1966) 18), the method siccant also uses.

Writes wet_surface.csv next to this script. Run with a Python that has
`coolprop` and `scipy` (made with CoolProp 8.0.0):

    python3 -m venv /tmp/venv && /tmp/venv/bin/pip install coolprop scipy
    /tmp/venv/bin/python tests/reference/coolprop_transfer/make_fixture.py
"""
import csv
import os

import CoolProp
from CoolProp.CoolProp import HAPropsSI, PropsSI
from scipy.optimize import brentq

SIGMA = 5.670374419e-8
P = 101325.0

# (case, T degC, w kg/kg, h W/(m^2 K), emissivity, wall degC, U W/(m^2 K)); invented states.
CASES = [
    ("mild", 30.0, 0.010, 20.0, 0.0, None, 0.0),
    ("warm", 45.0, 0.012, 25.0, 0.0, None, 0.0),
    ("tray", 65.6, 0.010, 62.4, 0.0, None, 0.0),
    ("dry_hot", 90.0, 0.005, 30.0, 0.0, None, 0.0),
    ("humid_hot", 80.0, 0.080, 30.0, 0.0, None, 0.0),
    ("very_hot", 140.0, 0.020, 40.0, 0.0, None, 0.0),
    ("radiant", 65.0, 0.010, 30.0, 0.92, 95.0, 0.0),
    ("bottom", 65.0, 0.010, 30.0, 0.0, None, 14.0),
    ("both", 80.0, 0.020, 25.0, 0.90, 150.0, 12.0),
]


def fuller_diffusivity(t_k, p_pa):
    """Fuller-Schettler-Giddings D for water vapour in air, m^2/s."""
    m_ab = 2.0 / (1.0 / 28.9647 + 1.0 / 18.01528)
    volumes = 19.7 ** (1.0 / 3.0) + 13.1 ** (1.0 / 3.0)
    d_cm2_s = 0.00143 * t_k ** 1.75 / ((p_pa / 1e5) * m_ab ** 0.5 * volumes ** 2)
    return d_cm2_s * 1e-4


def film_groups(t_film, w):
    mu = HAPropsSI("mu", "T", t_film, "P", P, "W", w)
    k = HAPropsSI("k", "T", t_film, "P", P, "W", w)
    cp = HAPropsSI("cp_ha", "T", t_film, "P", P, "W", w)
    rho = (1.0 + w) / HAPropsSI("Vda", "T", t_film, "P", P, "W", w)
    return cp * mu / k, mu / (rho * fuller_diffusivity(t_film, P))


def latent(ts):
    return PropsSI("H", "T", ts, "Q", 1, "Water") - PropsSI("H", "T", ts, "Q", 0, "Water")


def solve(t, w, h, eps, tw, u):
    cs = HAPropsSI("cp", "T", t, "P", P, "W", w)  # per kg dry air
    w_sat = lambda ts: HAPropsSI("W", "T", ts, "P", P, "R", 1.0)
    ts = t
    for _ in range(50):
        pr, sc = film_groups(0.5 * (t + ts), w)
        ky = h / cs * (pr / sc) ** (2.0 / 3.0)

        def residual(x):
            rad = eps * SIGMA * (tw ** 4 - x ** 4) if tw else 0.0
            return h * (t - x) + rad + u * (t - x) - ky * (w_sat(x) - w) * latent(x)

        lo = HAPropsSI("Tdp", "T", t, "P", P, "W", w)
        hi = min(max(t, tw or t), 358.0)  # CoolProp humid air caps the water mole fraction
        new = brentq(residual, lo, hi, xtol=1e-10)
        if abs(new - ts) < 1e-6:
            ts = new
            break
        ts = new
    rate = ky * (w_sat(ts) - w)
    return ts, rate, pr, sc


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    path = os.path.join(here, "wet_surface.csv")
    with open(path, "w", newline="") as f:
        out = csv.writer(f)
        out.writerow(["case", "T_C", "w", "p_Pa", "h_W_m2K", "emissivity", "wall_C", "U_W_m2K",
                      "Pr_film", "Sc_film", "Ts_C", "Rc_kg_m2_s", "wetbulb_C"])
        for case, t_c, w, h, eps, tw_c, u in CASES:
            t = t_c + 273.15
            tw = tw_c + 273.15 if tw_c is not None else None
            ts, rate, pr, sc = solve(t, w, h, eps, tw, u)
            wb = HAPropsSI("B", "T", t, "P", P, "W", w)
            out.writerow([case, t_c, w, P, h, eps, "" if tw_c is None else tw_c, u,
                          f"{pr:.6f}", f"{sc:.6f}", f"{ts - 273.15:.5f}", f"{rate:.8e}", f"{wb - 273.15:.5f}"])
    print(f"wrote {path} with CoolProp {CoolProp.__version__}")


if __name__ == "__main__":
    main()
