#!/usr/bin/env bash
# Jupyter checks for siccant-kernel, in a fresh virtual environment:
#   1. the Jupyter conformance suite (jupyter_kernel_test) in tests/jupyter/test_kernel.py,
#   2. every notebook in notebooks/ executed headless with nbclient (a failing cell fails).
# Called by .ci/run. Needs python3 with venv and access to PyPI.
set -euo pipefail
cd "$(dirname "$0")/../.."

venv="${SICCANT_JUPYTER_VENV:-target/jupyter-venv}"
python3 -m venv "$venv"
venv="$(cd "$venv" && pwd)"
"$venv/bin/python" -m pip install --quiet --upgrade pip
"$venv/bin/python" -m pip install --quiet jupyter_kernel_test jupyter_client nbclient nbformat ipykernel pytest

cargo build --quiet -p siccant-kernel
target/debug/siccant-kernel install --prefix "$venv"
export JUPYTER_PATH="$venv/share/jupyter"

"$venv/bin/python" -m pytest -q tests/jupyter/test_kernel.py
"$venv/bin/python" tests/jupyter/run_notebooks.py notebooks/*.ipynb

# Robustness: 10,000 consecutive cells after 1,000 warm-up; resident memory must grow under 10 %.
"$venv/bin/python" tests/jupyter/soak.py --cells 10000 --warmup 1000
