"""Execute notebooks headless on the siccant kernel; any failing cell fails the run.

Usage: python run_notebooks.py NOTEBOOK.ipynb...
Outputs are not written back (notebooks/refresh_outputs.py does that).
Prints one line per notebook and a closing 'N passed, N failed' line.
"""

import sys

import nbformat
from nbclient import NotebookClient
from nbclient.exceptions import CellExecutionError


def run(path):
    nb = nbformat.read(path, as_version=4)
    client = NotebookClient(nb, kernel_name="siccant", timeout=600, allow_errors=False)
    client.execute()
    cells = sum(1 for c in nb.cells if c.cell_type == "code")
    return cells


def main(paths):
    passed = failed = 0
    for path in paths:
        try:
            cells = run(path)
        except CellExecutionError as e:
            failed += 1
            print(f"FAILED {path}\n{e}", flush=True)
        else:
            passed += 1
            print(f"ok {path} ({cells} code cells)", flush=True)
    print(f"notebooks: {passed} passed, {failed} failed")
    return 1 if failed or not paths else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
