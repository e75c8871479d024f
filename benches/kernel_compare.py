"""Side-by-side: siccant-kernel vs ipykernel, driven by jupyter_client in one run.

Measures, for each kernel:
  start       time from KernelManager.start_kernel() to the first kernel_info_reply
              on shell (the client sends kernel_info_request until one is answered),
              median of runs;
  round trip  time from sending a trivial execute_request to its idle status on
              iopub (the reply on shell received too), median of many cells.

Targets: siccant start <= 1/20 of ipykernel's, round trip <= 1/10.

    python benches/kernel_compare.py [--starts 5] [--cells 200]

Needs both kernelspecs visible to jupyter_client and a release build, e.g.

    cargo build --release -p siccant-kernel
    target/release/siccant-kernel install --prefix VENV     # VENV has ipykernel
    JUPYTER_PATH=VENV/share/jupyter VENV/bin/python benches/kernel_compare.py
"""

import argparse
import queue
import statistics
import time

from jupyter_client.manager import KernelManager

KERNELS = {"siccant": "1 + 1", "python3": "1 + 1"}


def time_start(name):
    """Seconds from start_kernel() to the first kernel_info_reply.

    Not jupyter_client's wait_for_ready(): that ends with a fixed 0.2 s iopub
    flush, the same for every kernel, which would swamp the difference.
    """
    km = KernelManager(kernel_name=name)
    t0 = time.perf_counter()
    km.start_kernel()
    kc = km.client()
    kc.start_channels()
    sent = set()
    while True:
        sent.add(kc.kernel_info())
        try:
            reply = kc.get_shell_msg(timeout=1)
        except queue.Empty:
            continue
        if reply["parent_header"].get("msg_id") in sent:
            break
    elapsed = time.perf_counter() - t0
    kc.wait_for_ready(timeout=120)  # iopub connected before any cell is timed
    return elapsed, km, kc


def round_trip(kc, code):
    t0 = time.perf_counter()
    msg_id = kc.execute(code)
    while True:
        reply = kc.get_shell_msg(timeout=60)
        if reply["parent_header"].get("msg_id") == msg_id:
            break
    assert reply["content"]["status"] == "ok", reply["content"]
    while True:
        msg = kc.get_iopub_msg(timeout=60)
        if (
            msg["parent_header"].get("msg_id") == msg_id
            and msg["msg_type"] == "status"
            and msg["content"]["execution_state"] == "idle"
        ):
            break
    return time.perf_counter() - t0


def measure(name, code, starts, cells):
    start_times = []
    for _ in range(starts):
        elapsed, km, kc = time_start(name)
        start_times.append(elapsed)
        kc.stop_channels()
        km.shutdown_kernel(now=True)
    _, km, kc = time_start(name)
    for _ in range(10):  # warm-up
        round_trip(kc, code)
    trips = [round_trip(kc, code) for _ in range(cells)]
    kc.stop_channels()
    km.shutdown_kernel(now=True)
    return statistics.median(start_times), statistics.median(trips)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--starts", type=int, default=5)
    parser.add_argument("--cells", type=int, default=200)
    args = parser.parse_args()
    results = {name: measure(name, code, args.starts, args.cells) for name, code in KERNELS.items()}
    print(f"{'kernel':<10} {'start (ms)':>12} {'round trip (ms)':>16}")
    for name, (start, trip) in results.items():
        print(f"{name:<10} {start * 1e3:>12.1f} {trip * 1e3:>16.3f}")
    (s_start, s_trip), (p_start, p_trip) = results["siccant"], results["python3"]
    print(f"start ratio siccant/ipykernel      = 1/{p_start / s_start:.1f}  (target 1/20 or better)")
    print(f"round-trip ratio siccant/ipykernel = 1/{p_trip / s_trip:.1f}  (target 1/10 or better)")


if __name__ == "__main__":
    main()
