"""Jupyter conformance tests for the siccant kernel (jupyter_kernel_test).

Run by tests/jupyter/run.sh against the kernelspec installed into a venv.
Every sample is a siccant worksheet snippet; numbers are invented.
"""

import unittest

import jupyter_kernel_test as jkt


class SiccantKernelTests(jkt.KernelTests):
    kernel_name = "siccant"
    language_name = "siccant"
    file_extension = ".sicc"

    @classmethod
    def setUpClass(cls):
        super().setUpClass()
        # Names used by the completion and inspection samples.
        reply = cls.kc.execute_interactive("dryer_load = 14 kg/m^2", timeout=60)
        assert reply["content"]["status"] == "ok", reply["content"]

    # execute_result: a plain number and a quantity with a display unit.
    code_execute_result = [
        {"code": "6 * 7", "result": "42"},
        {"code": "(80 degC - 35 degC) as K", "result": "45 K"},
        {"code": "2.5 m * 1.2 m", "mime": "text/html"},
        {"code": "air(T: 24 degC, rh: 55 %).T", "mime": "application/json"},
        {"code": "plot(curve([1, 2, 3] * 1 m, [2, 4, 6] * 1 s))", "mime": "image/svg+xml"},
        {"code": "plot(curve([1, 2, 3] * 1 m, [2, 4, 6] * 1 s))", "mime": "image/png"},
    ]
    code_history_pattern = "6 *"  # matches only the first sample
    supported_history_operations = ("tail", "range", "search")

    # Every binding but the last is shown as display_data.
    code_display_data = [
        {"code": "amb = air(T: 24 degC, rh: 55 %)\nTw = amb.wetbulb", "mime": "text/html"},
        {"code": "q1 = 2 kW\nq2 = 3 kW", "mime": "text/plain"},
        {"code": "p = plot(curve([1, 2] * 1 m, [3, 4] * 1 m))\nn = 1", "mime": "image/svg+xml"},
    ]

    code_generate_error = "belt_length = belt_sped * 3"

    # A validity-range warning goes to stderr.
    code_stderr = "h_tray_parallel(G: 30000 kg/(m^2*h))"

    completion_samples = [
        {"text": "dryer_lo", "matches": {"dryer_load"}},
        {"text": "air_visc", "matches": {"air_viscosity"}},
        {"text": "chec", "matches": {"check"}},
    ]

    complete_code_samples = ["a = 1", "f(x) = x + 1", "amb = air(T: 20 degC, rh: 40 %)"]
    incomplete_code_samples = ["amb = air(T: 20 degC,", "xs = [1, 2,", "r = {a: 1"]
    invalid_code_samples = ["a = 1)", "xs = [1, 2)"]

    code_inspect_sample = "air"


class SiccantIopubWelcomeTests(jkt.IopubWelcomeTests):
    kernel_name = "siccant"
    support_iopub_welcome = True


if __name__ == "__main__":
    unittest.main()
