"""Fit the committed INVENTED data sets with scipy.optimize.curve_fit and write
the results to fixture.json, for the Rust test tests/fit_scipy.rs.

Run from the repository root with a Python that has numpy and scipy:
    python tests/reference/scipy_fit/make_fixture.py
The model forms below are written out independently of the Rust code, from the
published equations (see docs/methods/sorption.md). Isothermal forms hold the
temperature coefficient at zero, as siccant does for data at one temperature.
"""
import csv
import json

import numpy as np
import scipy
from scipy.optimize import curve_fit
from scipy.stats import t as student_t

HERE = "tests/reference/scipy_fit"


def read(path):
    with open(path) as f:
        rows = [r for r in csv.reader(line for line in f if not line.startswith("#"))]
    return np.array([[float(c) for c in r] for r in rows[1:]])


def gab(aw, xm, c, k):
    return xm * c * k * aw / ((1 - k * aw) * (1 - k * aw + c * k * aw))


def oswin(aw, a, b):
    return a * (aw / (1 - aw)) ** b


def halsey(aw, a, c):
    # modified Halsey at one temperature: aw = exp(-exp(A) / X^C)
    return (np.exp(a) / -np.log(aw)) ** (1 / c)


def henderson_at(t_c):
    # modified Henderson with B = 0 at t_c degC: 1 - aw = exp(-A t_c X^C)
    def f(aw, a, c):
        return (-np.log(1 - aw) / (a * t_c)) ** (1 / c)
    return f


def smith(aw, a, b):
    return a - b * np.log(1 - aw)


def peleg(aw, a, b, c, d):
    return a * aw ** c + b * aw ** d


def gab_arrhenius(t_ref_k):
    """GAB with C(T) = C exp(dHc/R (1/T - 1/T_ref)), likewise K; x = (aw, T in K)."""
    r = 8.314462618

    def f(x, xm, c, k, dhc, dhk):
        aw, t_k = x
        ct = c * np.exp(dhc / r * (1 / t_k - 1 / t_ref_k))
        kt = k * np.exp(dhk / r * (1 / t_k - 1 / t_ref_k))
        return gab(aw, xm, ct, kt)
    return f


def page(t, k, n):
    return np.exp(-k * t ** n)


def fit(name, f, x, y, p0):
    popt, pcov = curve_fit(f, x, y, p0=p0, method="lm", maxfev=20000)
    resid = y - f(x, *popt)
    sse = float(resid @ resid)
    sst = float(((y - y.mean()) ** 2).sum())
    return {
        "model": name,
        "start": list(p0),
        "params": [float(v) for v in popt],
        "std_errors": [float(v) for v in np.sqrt(np.diag(pcov))],
        "sse": sse,
        "r_squared": 1 - sse / sst,
    }


def isotherm_cases(path, t_c, starts):
    d = read(f"{HERE}/data/{path}")
    aw, x = d[:, 0], d[:, 1]
    models = {
        "GAB": gab,
        "Oswin": oswin,
        "modified Halsey": halsey,
        "modified Henderson": henderson_at(t_c),
        "Smith": smith,
        "Peleg": peleg,
    }
    fits = [fit(name, models[name], aw, x, p0) for name, p0 in starts.items()]
    return {"file": path, "t_celsius": t_c, "x_column": "aw", "y_column": "X", "fits": fits}


def main():
    common = {
        "GAB": [0.07, 10.0, 0.85],
        "Oswin": [0.1, 0.5],
        "modified Halsey": [-4.0, 1.5],
        "modified Henderson": [0.01, 1.5],
        "Smith": [0.03, 0.05],
        "Peleg": [0.1, 0.3, 0.6, 5.0],
    }
    page_data = read(f"{HERE}/data/page_run_300.csv")
    flakes = read(f"{HERE}/data/cereal_flakes_3T.csv")
    t_k = flakes[:, 1] + 273.15
    t_ref = float(t_k.mean())
    cases = [
        isotherm_cases("veg_chips_40C.csv", 40.0, common),
        isotherm_cases("starch_powder_25C.csv", 25.0, common),
        {
            "file": "cereal_flakes_3T.csv",
            "t_ref_kelvin": t_ref,
            "x_column": "aw,T",
            "y_column": "X",
            "fits": [fit("GAB", gab_arrhenius(t_ref), (flakes[:, 0], t_k), flakes[:, 2], [0.07, 10.0, 0.85, 5000.0, 1000.0])],
        },
        {
            "file": "page_run_300.csv",
            "x_column": "t",
            "y_column": "MR",
            "x_unit": "min",
            "fits": [fit("Page", page, page_data[:, 0], page_data[:, 1], [0.01, 1.0])],
        },
    ]
    out = {
        "source": "scipy.optimize.curve_fit (method='lm', MINPACK lmdif), absolute_sigma=False",
        "scipy_version": scipy.__version__,
        "numpy_version": np.__version__,
        "cases": cases,
        "t_quantiles": [
            {"probability": p, "dof": d, "t": float(student_t.ppf(p, d))}
            for p in (0.975, 0.995, 0.9)
            for d in (1, 2, 3, 5, 9, 10, 12, 30, 100, 1000)
        ],
    }
    with open(f"{HERE}/fixture.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
