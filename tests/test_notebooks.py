"""The example notebooks run top to bottom without error, from the notebooks folder.

They are executed with nbclient in a fresh python3 kernel (ipykernel), the way a user opens and
runs them; any cell error fails the test. The committed notebooks carry no outputs.
"""

from __future__ import annotations

import os

import pytest
from conftest import REPO_ROOT

nbformat = pytest.importorskip("nbformat", reason="nbformat is needed to read the notebooks")
nbclient = pytest.importorskip("nbclient", reason="nbclient is needed to run the notebooks")

NOTEBOOKS = REPO_ROOT / "notebooks"
NAMES = ["single_well.ipynb", "field_screening.ipynb"]


@pytest.mark.parametrize("name", NAMES)
def test_notebook_is_committed_without_outputs(name):
    nb = nbformat.read(NOTEBOOKS / name, as_version=4)
    code = [c for c in nb.cells if c.cell_type == "code"]
    assert code, f"{name} has no code cells"
    for cell in code:
        assert cell.get("outputs", []) == [], f"{name}: clear the outputs before committing"
        assert cell.get("execution_count") is None, f"{name}: clear execution counts"


@pytest.mark.parametrize("name", NAMES)
def test_notebook_runs_top_to_bottom(name, tmp_path, monkeypatch):
    try:
        from jupyter_client.kernelspec import KernelSpecManager, NoSuchKernel

        KernelSpecManager().get_kernel_spec("python3")
    except (ImportError, NoSuchKernel):
        pytest.skip("no python3 Jupyter kernel (install ipykernel)")
    nb = nbformat.read(NOTEBOOKS / name, as_version=4)
    # reports written by the notebooks go to the test's temporary folder
    monkeypatch.setenv("TMPDIR", str(tmp_path))
    monkeypatch.setenv("MPLBACKEND", "Agg")
    client = nbclient.NotebookClient(nb, timeout=300, kernel_name="python3",
                                     resources={"metadata": {"path": str(NOTEBOOKS)}},
                                     allow_errors=False)
    client.execute()  # raises CellExecutionError on any cell error
    outputs = [o for c in nb.cells if c.cell_type == "code" for o in c.get("outputs", [])]
    errors = [o for o in outputs if o.get("output_type") == "error"]
    assert not errors, errors
    images = [o for o in outputs if "image/png" in o.get("data", {})]
    assert len(images) >= 2, f"{name}: expected its figures to be displayed, got {len(images)}"
    text = "".join(o.get("text", "") for o in outputs)
    assert "qualified geoscientist" in text  # the caution is printed
    assert os.listdir(tmp_path), "the notebook's report was not written"


@pytest.mark.parametrize("name", NAMES)
@pytest.mark.parametrize("where", [".", "notebooks"])
def test_notebooks_find_the_demo_field_from_the_root_or_their_folder(name, where, monkeypatch):
    nb = nbformat.read(NOTEBOOKS / name, as_version=4)
    cell = next(c.source for c in nb.cells if "def find_demo_field" in c.source)
    monkeypatch.chdir(REPO_ROOT / where)
    scope: dict = {}
    exec(compile(cell, f"{name}:find_demo_field", "exec"), scope)  # noqa: S102 - our own cell
    assert scope["FIELD"] == REPO_ROOT / "synthetic_wells"
