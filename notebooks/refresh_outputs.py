"""Clear or refresh the outputs of the example notebooks.

    python notebooks/refresh_outputs.py --clear   [NOTEBOOK...]   # strip outputs (what we commit)
    python notebooks/refresh_outputs.py --execute [NOTEBOOK...]   # run on the siccant kernel, keep outputs

Without notebook paths, every notebooks/*.ipynb is processed. --execute needs
the kernelspec installed (`siccant-kernel install --user`, or --prefix VENV).
"""

import argparse
import pathlib

import nbformat
from nbclient import NotebookClient


def clear(nb):
    for cell in nb.cells:
        if cell.cell_type == "code":
            cell.outputs = []
            cell.execution_count = None
        cell.metadata.pop("execution", None)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    mode = parser.add_mutually_exclusive_group(required=True)
    mode.add_argument("--clear", action="store_true")
    mode.add_argument("--execute", action="store_true")
    parser.add_argument("notebooks", nargs="*", type=pathlib.Path)
    args = parser.parse_args()
    paths = args.notebooks or sorted(pathlib.Path(__file__).parent.glob("*.ipynb"))
    for path in paths:
        nb = nbformat.read(path, as_version=4)
        clear(nb)
        if args.execute:
            NotebookClient(nb, kernel_name="siccant", timeout=600).execute()
        nbformat.write(nb, path)
        print(("refreshed " if args.execute else "cleared ") + str(path))


if __name__ == "__main__":
    main()
