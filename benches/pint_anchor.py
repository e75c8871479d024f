#!/usr/bin/env python3
"""Time pint on the same unit-checked multiply-and-convert that
benches/core_eval.rs times in siccant (`q * t as kWh` with q = 3 kW, t = 2 h),
then run the siccant benchmark (first its thread-CPU-time report, `--cpu`,
then criterion), so all figures come from the same run on the same machine.

Usage: python3 benches/pint_anchor.py [--pint-only]
Needs: pip install pint (any recent version; the version is printed).
"""

import subprocess
import sys
import timeit


def time_pint(repeat=7, number=20000):
    import pint

    ureg = pint.UnitRegistry()
    q = 3 * ureg.kW
    t = 2 * ureg.hour

    def multiply_and_convert():
        return (q * t).to(ureg.kWh)

    assert abs(multiply_and_convert().magnitude - 6.0) < 1e-12
    best = min(timeit.repeat(multiply_and_convert, repeat=repeat, number=number)) / number
    return pint.__version__, best


def main():
    version, seconds = time_pint()
    print(f"pint {version}: (3 kW * 2 h).to(kWh) best of 7 x 20000: {seconds * 1e6:.2f} us per operation")
    sys.stdout.flush()
    if "--pint-only" in sys.argv:
        return 0
    # Thread CPU time first (the figure to compare on a shared machine), then criterion (wall time).
    cmd = ["cargo", "bench", "--bench", "core_eval", "--", "--cpu"]
    print("running:", " ".join(cmd))
    sys.stdout.flush()
    out = subprocess.run(cmd, check=True, capture_output=True, text=True).stdout
    r = {k: float(v) for k, v in (l.split("=", 1) for l in out.splitlines() if "=" in l)}
    ns = r["multiply_and_convert_cpu_ns"]
    print(f"siccant: q * t as kWh: {ns:.1f} ns CPU per operation (target < 100 ns); "
          f"pint / siccant = {seconds * 1e9 / ns:.0f}x")
    print(f"siccant: 2,000-line worksheet, parse + check + evaluate: "
          f"{r['worksheet_2000_lines_cpu_ms']:.2f} ms CPU (target < 50 ms)")
    sys.stdout.flush()
    cmd = ["cargo", "bench", "--bench", "core_eval", "--", "--noplot"]
    print("running:", " ".join(cmd))
    sys.stdout.flush()
    return subprocess.call(cmd)


if __name__ == "__main__":
    sys.exit(main())
