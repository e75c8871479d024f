#!/usr/bin/env python3
"""Writes invented_apple_slices_lab_run.csv (also copied to examples/data).

INVENTED data, not a measurement: a constant rate Rc = 1.5 kg/(m^2 h) down to
Xc = 0.55 db, then a rate falling linearly to zero at Xe = 0.06 db; the rate
ramps up over the first 15 min (warm-up); 0.120 kg dry solid on 0.0225 m^2;
X0 = 1.45 db; readings every 15 min with fixed scatter of a few tenths of a gram.
"""
LS, AREA, RC, XC, XE, X0 = 0.120, 0.0225, 1.5 / 3600, 0.55, 0.06, 1.45
NOISE = [0.21, -0.14, 0.05, -0.26, 0.17, 0.02, -0.09, 0.24, -0.18, 0.11, -0.03, 0.15, -0.22, 0.08, -0.12,
         0.19, -0.05, 0.13, -0.2, 0.06, -0.16, 0.1, 0.0, -0.08, 0.18, -0.11, 0.04, -0.19, 0.12, -0.02]


def rate(x, t):
    r = RC if x >= XC else RC * (x - XE) / (XC - XE)
    return r * min(1.0, 0.35 + 0.65 * t / 900.0)


def main():
    load = LS / AREA
    x, t, rows = X0, 0.0, []
    for i in range(30):
        while t < i * 900.0:
            x -= rate(x, t) / load * 1.0
            t += 1.0
        rows.append((i * 15, round(LS * 1000 * (1 + x) + NOISE[i], 1)))
    with open("invented_apple_slices_lab_run.csv", "w") as f:
        f.write("# Invented data for the examples: a lab drying run of apple slices on a\n")
        f.write("# 15 cm x 15 cm tray (0.0225 m^2 exposed), 120 g dry solid, air 60 degC,\n")
        f.write("# 10 % rh, 2 m/s along the tray. Not a measurement.\n")
        f.write("t [min], m [g]\n")
        for a, b in rows:
            f.write(f"{a}, {b}\n")


if __name__ == "__main__":
    main()
