"""Every workbook runs top to bottom in a fresh kernel (nbclient), without errors.

The executed copies are kept in memory only; the committed notebooks carry no outputs.
"""
from __future__ import annotations

from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

WORKBOOKS = Path(__file__).resolve().parent.parent / "workbooks"
NOTEBOOKS = sorted(WORKBOOKS.glob("*.ipynb"))


def test_there_are_workbooks():
    names = [p.name for p in NOTEBOOKS]
    assert names[:3] == ["01_fit_one_curve.ipynb", "02_grain_and_alloy_design.ipynb",
                         "03_sample_series_and_zt.ipynb"]


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_committed_without_outputs(path):
    nb = nbformat.read(path, as_version=4)
    for cell in nb.cells:
        if cell.cell_type == "code":
            assert cell.outputs == [] and cell.execution_count is None, f"{path.name}: clear the outputs"


@pytest.mark.parametrize("path", NOTEBOOKS, ids=[p.stem for p in NOTEBOOKS])
def test_workbook_runs(path):
    nb = nbformat.read(path, as_version=4)
    client = NotebookClient(nb, timeout=120, startup_timeout=60, kernel_name="python3",
                            resources={"metadata": {"path": str(path.parent)}})
    client.execute()  # raises CellExecutionError with the failing cell's traceback
    outputs = [o for c in nb.cells if c.cell_type == "code" for o in c.outputs]
    assert not [o for o in outputs if o.output_type == "error"]
    # the workbench cells display live widgets
    assert any("application/vnd.jupyter.widget-view+json" in o.get("data", {}) for o in outputs)
    # no problem reached the workbench's message area in plain words
    stderr = "".join(o.get("text", "") for o in outputs if o.output_type == "stream" and o.name == "stderr")
    assert "Problem:" not in stderr and "Unexpected problem" not in stderr
