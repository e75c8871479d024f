"""Robustness: many consecutive executes must not grow the kernel's memory.

Drains iopub after each cell as a front end does. Runs a warm-up, reads the kernel process's resident memory (VmRSS from
/proc/PID/status, Linux), runs 10,000 more cells that define, redefine and
show values, and fails if resident memory grew by 10 % or more.

    python tests/jupyter/soak.py [--cells 10000] [--warmup 1000]
"""

import argparse
import sys

from jupyter_client.manager import start_new_kernel

CELLS = [
    "x = 2 m * 3",
    "x as cm",
    "amb = air(T: 24 degC, rh: 55 %)",
    "amb.wetbulb",
    "xs = linspace(40 degC, 80 degC, 5)",
    "not_defined_here + 1",
]


def rss_kib(pid):
    with open(f"/proc/{pid}/status") as f:
        for line in f:
            if line.startswith("VmRSS:"):
                return int(line.split()[1])
    raise RuntimeError("no VmRSS")


def drain_iopub(kc, msg_id):
    """Read iopub up to the cell's idle status, as a notebook front end does."""
    while True:
        msg = kc.get_iopub_msg(timeout=60)
        if (
            msg["parent_header"].get("msg_id") == msg_id
            and msg["msg_type"] == "status"
            and msg["content"]["execution_state"] == "idle"
        ):
            return


def run_cells(kc, count, offset):
    for i in range(count):
        code = CELLS[(offset + i) % len(CELLS)]
        reply = kc.execute(code, reply=True, timeout=60)
        drain_iopub(kc, reply["parent_header"]["msg_id"])
        expected = "error" if code.startswith("not_defined") else "ok"
        if reply["content"]["status"] != expected:
            raise AssertionError(f"cell {offset + i} `{code}`: {reply['content']}")


def main():
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--cells", type=int, default=10_000)
    parser.add_argument("--warmup", type=int, default=1_000)
    args = parser.parse_args()
    km, kc = start_new_kernel(kernel_name="siccant")
    try:
        pid = km.provisioner.process.pid
        run_cells(kc, args.warmup, 0)
        before = rss_kib(pid)
        run_cells(kc, args.cells, args.warmup)
        after = rss_kib(pid)
    finally:
        kc.stop_channels()
        km.shutdown_kernel(now=True)
    growth = (after - before) / before
    print(f"soak: {args.cells} cells after {args.warmup} warm-up; RSS {before} KiB -> {after} KiB ({growth:+.1%})")
    ok = growth < 0.10
    print(f"soak: {1 if ok else 0} passed, {0 if ok else 1} failed")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
