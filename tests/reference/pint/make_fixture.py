#!/usr/bin/env python3
"""Write units.csv: SI factors of siccant unit expressions, computed by pint.

Each row pairs a unit expression as written in siccant with the same unit
spelled in pint's vocabulary, and records pint's value of one unit in coherent
SI (`factor_si`), the SI value at zero of the scale for affine temperatures
(`offset_si`, kelvin), and the dimension as exponents of
(length, mass, time, current, temperature, amount, luminous intensity).

Run from the repository root:

    /work/venv-units/bin/python tests/reference/pint/make_fixture.py

The Rust test tests/units_pint.rs reads the CSV; cargo tests never run Python.
"""

import csv
import pathlib

import pint

# (siccant expression, pint expression). Inside compound units siccant reads
# degC/degF as differences, which pint spells delta_degC/delta_degF.
# siccant's BTU/Btu is the International Table Btu (pint: Btu_it); siccant's
# cal/kcal are International Table calories (pint: cal_it), cal_th/kcal_th are
# thermochemical (pint: cal). Dry-air and dry-solid masses (kg_da, lb_ds, ...)
# are masses to pint.
ROWS = [
    # length
    ("m", "meter"), ("mm", "millimeter"), ("cm", "centimeter"), ("km", "kilometer"),
    ("um", "micrometer"), ("µm", "micrometer"), ("ft", "foot"), ("in", "inch"),
    ("yd", "yard"), ("mi", "mile"),
    # mass
    ("kg", "kilogram"), ("g", "gram"), ("mg", "milligram"), ("t", "metric_ton"),
    ("lb", "pound"), ("oz", "ounce"), ("gr", "grain"),
    ("kg_da", "kilogram"), ("lb_da", "pound"), ("kg_ds", "kilogram"), ("lb_ds", "pound"),
    # time
    ("s", "second"), ("ms", "millisecond"), ("min", "minute"), ("h", "hour"), ("d", "day"),
    # amount, current, angle
    ("mol", "mole"), ("kmol", "kilomole"), ("A", "ampere"), ("mA", "milliampere"),
    ("rad", "radian"), ("mrad", "milliradian"),
    # force
    ("N", "newton"), ("kN", "kilonewton"), ("lbf", "pound_force"),
    # pressure
    ("Pa", "pascal"), ("hPa", "hectopascal"), ("kPa", "kilopascal"), ("MPa", "megapascal"),
    ("bar", "bar"), ("mbar", "millibar"), ("atm", "atmosphere"), ("psi", "psi"),
    ("inHg", "inch_Hg"), ("mmHg", "millimeter_Hg"), ("inH2O", "inch_H2O"),
    ("mmH2O", "millimeter_H2O"),
    # energy
    ("J", "joule"), ("kJ", "kilojoule"), ("MJ", "megajoule"), ("Wh", "watt_hour"),
    ("kWh", "kilowatt_hour"), ("MWh", "megawatt_hour"), ("BTU", "Btu_it"), ("Btu", "Btu_it"),
    ("cal", "cal_it"), ("kcal", "kcal_it"), ("cal_th", "calorie"),
    ("kcal_th", "kilocalorie"),
    # power
    ("W", "watt"), ("kW", "kilowatt"), ("MW", "megawatt"), ("hp", "horsepower"),
    # volume
    ("L", "liter"), ("mL", "milliliter"), ("gal", "gallon"), ("m^3", "meter**3"),
    ("ft^3", "foot**3"), ("in^3", "inch**3"),
    # temperature
    ("K", "kelvin"), ("mK", "millikelvin"), ("degC", "degC"), ("degF", "degF"),
    ("degR", "degR"), ("delta_degC", "delta_degC"), ("delta_degF", "delta_degF"),
    # dimensionless
    ("%", "percent"), ("%rh", "percent"), ("%db", "percent"), ("aw", "dimensionless"),
    ("db", "dimensionless"),
    # compound units of the trade
    ("m^2", "meter**2"), ("ft^2", "foot**2"), ("m/s", "meter/second"),
    ("ft/min", "foot/minute"), ("m^3/h", "meter**3/hour"), ("ft^3/min", "foot**3/minute"),
    ("L/min", "liter/minute"), ("gal/min", "gallon/minute"), ("kg/h", "kilogram/hour"),
    ("lb/h", "pound/hour"), ("t/h", "metric_ton/hour"), ("kg/m^3", "kilogram/meter**3"),
    ("lb/ft^3", "pound/foot**3"), ("kg/m^2", "kilogram/meter**2"),
    ("lb/ft^2", "pound/foot**2"), ("kg/(m^2*h)", "kilogram/(meter**2*hour)"),
    ("g/(m^2*h)", "gram/(meter**2*hour)"), ("lb/(ft^2*h)", "pound/(foot**2*hour)"),
    ("kJ/kg", "kilojoule/kilogram"), ("BTU/lb", "Btu_it/pound"),
    ("kJ/(kg*K)", "kilojoule/(kilogram*kelvin)"),
    ("BTU/(lb*degF)", "Btu_it/(pound*delta_degF)"),
    ("kcal/(kg*degC)", "kcal_it/(kilogram*delta_degC)"),
    ("W/m^2", "watt/meter**2"), ("BTU/(h*ft^2)", "Btu_it/(hour*foot**2)"),
    ("W/(m^2*K)", "watt/(meter**2*kelvin)"),
    ("BTU/(h*ft^2*degF)", "Btu_it/(hour*foot**2*delta_degF)"),
    ("kcal/(h*m^2*degC)", "kcal_it/(hour*meter**2*delta_degC)"),
    ("W/(m*K)", "watt/(meter*kelvin)"), ("BTU/(h*ft*degF)", "Btu_it/(hour*foot*delta_degF)"),
    ("BTU*in/(h*ft^2*degF)", "Btu_it*inch/(hour*foot**2*delta_degF)"),
    ("kW*h", "kilowatt*hour"), ("BTU/h", "Btu_it/hour"), ("kcal/h", "kcal_it/hour"),
    ("MJ/h", "megajoule/hour"), ("Pa*s", "pascal*second"), ("lb/(ft*h)", "pound/(foot*hour)"),
    ("m^2/s", "meter**2/second"), ("ft^2/h", "foot**2/hour"), ("mm^2/s", "millimeter**2/second"),
    ("J/mol", "joule/mole"), ("kJ/kmol", "kilojoule/kilomole"), ("kg/kmol", "kilogram/kilomole"),
    ("1/h", "1/hour"), ("s^-1", "1/second"), ("1/min", "1/minute"),
    ("g/kg_da", "gram/kilogram"), ("gr/lb_da", "grain/pound"), ("lb/lb_da", "pound/pound"),
    ("kJ/kg_da", "kilojoule/kilogram"), ("BTU/lb_da", "Btu_it/pound"),
    ("m^3/kg_da", "meter**3/kilogram"), ("ft^3/lb_da", "foot**3/pound"),
    ("kg/kg_ds", "kilogram/kilogram"), ("g/kg_ds", "gram/kilogram"),
    ("kPa/K", "kilopascal/kelvin"), ("psi/degF", "psi/delta_degF"),
    ("N/m^2", "newton/meter**2"), ("lbf/in^2", "pound_force/inch**2"),
    ("%/h", "percent/hour"), ("kg/(kg*h)", "kilogram/(kilogram*hour)"),
]

DIMS = ["[length]", "[mass]", "[time]", "[current]", "[temperature]", "[substance]", "[luminosity]"]


def describe(ureg, pint_expr):
    """SI factor, SI offset and dimension exponents of a pint unit expression."""
    unit = ureg.Unit(pint_expr)
    q0 = ureg.Quantity(0.0, unit).to_base_units()
    q1 = ureg.Quantity(1.0, unit).to_base_units()
    offset = q0.magnitude
    factor = q1.magnitude - offset
    dims = unit.dimensionality
    exps = [int(dims.get(d, 0)) for d in DIMS]
    return factor, offset, exps


def main():
    ureg = pint.UnitRegistry()
    out = pathlib.Path(__file__).with_name("units.csv")
    with out.open("w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["siccant", "pint", "factor_si", "offset_si", "dim"])
        for siccant, pint_expr in ROWS:
            factor, offset, exps = describe(ureg, pint_expr)
            w.writerow([siccant, pint_expr, repr(factor), repr(offset), " ".join(map(str, exps))])
    print(f"wrote {out} ({len(ROWS)} rows) with pint {pint.__version__}")


if __name__ == "__main__":
    main()
