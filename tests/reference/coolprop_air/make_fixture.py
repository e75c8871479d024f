#!/usr/bin/env python3
"""Make the humid-air reference tables for siccant from CoolProp's HAPropsSI.

Writes states.csv (psychrometric states) and transport.csv (transport
properties) next to this script. Run with a Python that has `coolprop` and
`numpy` (tested with CoolProp 8.0.0):

    python3 -m venv /tmp/venv && /tmp/venv/bin/pip install coolprop numpy
    /tmp/venv/bin/python tests/reference/coolprop_air/make_fixture.py

Enthalpies are moved to siccant's reference state (dry air and liquid water at
0 degC): h = H_coolprop - H_coolprop(dry air, 0 degC, 101.325 kPa) - w h_liquid(0 degC),
with h_liquid(0 degC) of CoolProp's water (IAPWS-95) taken as the saturated
liquid at the triple point minus cp * 0.01 K.
"""
import csv
import math
import os

import CoolProp
from CoolProp.CoolProp import PropsSI
from CoolProp.HumidAirProp import HAPropsSI

HERE = os.path.dirname(os.path.abspath(__file__))
PRESSURES_KPA = [50.0, 70.0, 101.325, 150.0, 200.0]
TEMPS_C = [-40.0, -39.9, -30.0, -20.0, -10.0, -5.0, -1.0, 0.5, 5.0, 10.0, 15.0, 20.0, 25.0, 30.0,
           40.0, 50.0, 60.0, 70.0, 80.0, 90.0, 100.0, 110.0, 120.0, 150.0, 200.0, 250.0, 300.0,
           349.0, 350.0]
RHS = [0.05, 0.3, 0.6, 0.9, 0.9999]
WS = [0.001, 0.02, 0.1, 0.4, 1.0]


def reference_offsets():
    h_dry0 = HAPropsSI("H", "T", 273.15, "P", 101325.0, "W", 0.0)
    h_liq_tp = PropsSI("H", "T", 273.16, "Q", 0, "Water")
    cp_liq = PropsSI("C", "T", 273.16, "Q", 0, "Water")
    return h_dry0, h_liq_tp - 0.01 * cp_liq


def state_row(t, p, given, value, offsets):
    h_dry0, h_liq0 = offsets
    w = value if given == "W" else HAPropsSI("W", "T", t, "P", p, given, value)
    rh = value if given == "R" else HAPropsSI("R", "T", t, "P", p, "W", w)
    row = {
        "given": given,
        "T_K": t,
        "p_Pa": p,
        "rh": rh,
        "w": w,
        "Twb_K": HAPropsSI("Twb", "T", t, "P", p, "W", w),
        "Tdp_K": HAPropsSI("Tdp", "T", t, "P", p, "W", w),
        "h_J_per_kg_da": HAPropsSI("H", "T", t, "P", p, "W", w) - h_dry0 - w * h_liq0,
        "v_m3_per_kg_da": HAPropsSI("Vda", "T", t, "P", p, "W", w),
    }
    return row


def states():
    offsets = reference_offsets()
    rows, skipped = [], 0
    for p_kpa in PRESSURES_KPA:
        p = p_kpa * 1e3
        for t_c in TEMPS_C:
            t = round(t_c + 273.15, 9)
            cases = [("R", rh) for rh in RHS] + [("W", w) for w in WS]
            for given, value in cases:
                try:
                    row = state_row(t, p, given, value, offsets)
                except ValueError:
                    skipped += 1  # above saturation / above boiling: not a state
                    continue
                if all(math.isfinite(v) for k, v in row.items() if k != "given"):
                    rows.append(row)
                else:
                    skipped += 1
    return rows, skipped


def pure(prop, t, p, fluid):
    try:
        return PropsSI(prop, "T", t, "P", p, fluid)
    except ValueError:
        return float("nan")


M_AIR, M_WATER = 28.966, 18.015268


def wilke(x_w, mu_a, mu_w, prop_a, prop_w):
    """Mole-fraction mixing with Wilke's (1950) interaction factors.

    With prop = viscosity this is Wilke's rule; with prop = conductivity it is the
    Wassiljewa equation with Mason & Saxena's (1958) factors (Poling et al. 2001,
    eq. 10-6.1). Written here independently of siccant's Rust code.
    """
    def phi(mi, mj, m_i, m_j):
        return (1 + math.sqrt(mi / mj) * (m_j / m_i) ** 0.25) ** 2 / math.sqrt(8 * (1 + m_i / m_j))
    x_a = 1 - x_w
    air = x_a * prop_a / (x_a + x_w * phi(mu_a, mu_w, M_AIR, M_WATER))
    vap = x_w * prop_w / (x_w + x_a * phi(mu_w, mu_a, M_WATER, M_AIR)) if x_w > 0 else 0.0
    return air + vap


def transport():
    """Humid-air transport from HAPropsSI, and the pure components from PropsSI.

    mu_air/k_air: dry air (Lemmon-Jacobsen 2004 in CoolProp) at T and the total
    pressure; mu_vap/k_vap: water vapour (IAPWS 2008/2011 in CoolProp) at T and
    100 Pa (near the dilute-gas limit, where siccant's correlations live).
    mu_ha/k_ha: CoolProp's own humid-air mixture values (HAPropsSI 'mu', 'k').
    mu_wilke/k_wilke: the pure CoolProp values mixed by wilke() above.
    """
    rows = []
    for p_kpa in [50.0, 101.325, 200.0]:
        p = p_kpa * 1e3
        for t_c in [-40.0, -20.0, 0.0, 20.0, 40.0, 60.0, 80.0, 100.0, 150.0, 200.0, 250.0, 300.0, 350.0]:
            t = round(t_c + 273.15, 9)
            for w in [0.0, 0.005, 0.02, 0.05, 0.1, 0.3]:
                try:
                    ws = HAPropsSI("W", "T", t, "P", p, "R", 1.0)
                except ValueError:
                    ws = float("inf")
                if w > ws:
                    continue
                try:
                    mu_ha = HAPropsSI("mu", "T", t, "P", p, "W", w)
                    k_ha = HAPropsSI("k", "T", t, "P", p, "W", w)
                    cp_ha = HAPropsSI("cp_ha", "T", t, "P", p, "W", w)
                except ValueError:
                    continue
                mu_a, k_a = pure("V", t, p, "Air"), pure("L", t, p, "Air")
                mu_w, k_w = pure("V", t, 100.0, "Water"), pure("L", t, 100.0, "Water")
                x_w = w / (M_WATER / M_AIR + w)
                rows.append({
                    "T_K": t, "p_Pa": p, "w": w,
                    "mu_ha_Pa_s": mu_ha, "k_ha_W_per_m_K": k_ha, "cp_ha_J_per_kg_K": cp_ha,
                    "mu_air_Pa_s": mu_a, "k_air_W_per_m_K": k_a,
                    "mu_vap_Pa_s": mu_w, "k_vap_W_per_m_K": k_w,
                    "mu_wilke_Pa_s": wilke(x_w, mu_a, mu_w, mu_a, mu_w),
                    "k_wilke_W_per_m_K": wilke(x_w, mu_a, mu_w, k_a, k_w),
                })
    return rows


def write(name, rows):
    path = os.path.join(HERE, name)
    with open(path, "w", newline="") as f:
        f.write(f"# made by make_fixture.py with CoolProp {CoolProp.__version__}\n")
        writer = csv.DictWriter(f, fieldnames=list(rows[0].keys()))
        writer.writeheader()
        for row in rows:
            writer.writerow({k: (v if isinstance(v, str) else repr(float(v))) for k, v in row.items()})
    return path


if __name__ == "__main__":
    rows, skipped = states()
    print(write("states.csv", rows), len(rows), "states,", skipped, "skipped")
    t_rows = transport()
    print(write("transport.csv", t_rows), len(t_rows), "rows")
