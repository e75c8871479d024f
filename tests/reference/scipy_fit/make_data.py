"""Make the INVENTED data sets used by the fit checks, the example and the benchmark.

Every number written here is invented: points drawn from a chosen model with
made-up parameters plus seeded random scatter. They describe no real product.
Run from the repository root:  python tests/reference/scipy_fit/make_data.py
"""
import numpy as np

HERE = "tests/reference/scipy_fit/data"


def gab(aw, xm, c, k):
    return xm * c * k * aw / ((1 - k * aw) * (1 - k * aw + c * k * aw))


def write(path, header, rows, note):
    with open(path, "w") as f:
        f.write(f"# INVENTED data: {note}\n")
        f.write(header + "\n")
        for r in rows:
            f.write(",".join(r) + "\n")


def isotherm_40c():
    """About 12 (aw, X) points at 40 degC for invented vegetable chips."""
    rng = np.random.default_rng(20261202)
    aw = np.array([0.11, 0.22, 0.32, 0.43, 0.52, 0.60, 0.67, 0.75, 0.80, 0.84, 0.87, 0.90])
    x = gab(aw, 0.072, 9.5, 0.86) * (1 + 0.03 * rng.standard_normal(aw.size))
    rows = [(f"{a:.2f}", f"{v:.4f}", "40") for a, v in zip(aw, x)]
    note = "sorption isotherm of invented vegetable chips at 40 degC (model plus seeded scatter)"
    for path in ("examples/data/invented_veg_chips_isotherm_40C.csv", f"{HERE}/veg_chips_40C.csv"):
        write(path, "aw [-],X [kg/kg db],T [degC]", rows, note)


def isotherm_25c():
    """15 (aw, X) points at 25 degC for an invented starchy powder (benchmark set)."""
    rng = np.random.default_rng(7)
    aw = np.linspace(0.08, 0.88, 15)
    x = gab(aw, 0.095, 18.0, 0.78) * (1 + 0.02 * rng.standard_normal(aw.size))
    rows = [(f"{a:.3f}", f"{v:.5f}", "25") for a, v in zip(aw, x)]
    write(f"{HERE}/starch_powder_25C.csv", "aw [-],X [kg/kg db],T [degC]", rows,
          "sorption isotherm of an invented starchy powder at 25 degC (model plus seeded scatter)")


def gab_three_temperatures():
    """24 (aw, T, X) points at 25, 40 and 55 degC for an invented cereal flake,
    from GAB with Arrhenius-type C and K about 40 degC."""
    rng = np.random.default_rng(3)
    r = 8.314462618
    rows = []
    for t_c in (25.0, 40.0, 55.0):
        t_k = t_c + 273.15
        c = 9.0 * np.exp(9000.0 / r * (1 / t_k - 1 / 313.15))
        k = 0.85 * np.exp(1200.0 / r * (1 / t_k - 1 / 313.15))
        aw = np.linspace(0.1, 0.85, 8)
        x = gab(aw, 0.07, c, k) * (1 + 0.02 * rng.standard_normal(aw.size))
        rows += [(f"{a:.3f}", f"{t_c:.0f}", f"{v:.5f}") for a, v in zip(aw, x)]
    write(f"{HERE}/cereal_flakes_3T.csv", "aw [-],T [degC],X [kg/kg db]", rows,
          "sorption isotherms of invented cereal flakes at 25, 40 and 55 degC (model plus seeded scatter)")


def page_300():
    """300 (t, MR) points of an invented thin-layer drying run, Page model MR = exp(-k t^n)."""
    rng = np.random.default_rng(11)
    t = np.linspace(2.0, 600.0, 300)  # minutes
    mr = np.exp(-0.0061 * t ** 1.18) + 0.004 * rng.standard_normal(t.size)
    rows = [(f"{a:.3f}", f"{v:.6f}") for a, v in zip(t, mr)]
    write(f"{HERE}/page_run_300.csv", "t [min],MR [-]", rows,
          "invented thin-layer drying run, Page model plus seeded scatter")


if __name__ == "__main__":
    isotherm_40c()
    isotherm_25c()
    gab_three_temperatures()
    page_300()
