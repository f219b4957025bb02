"""Every notebook in notebooks/ runs top to bottom without an error.

Each ``notebooks/*.ipynb`` is executed by nbclient in a fresh kernel of this
interpreter (the .venv's python), with widget state stored, and fails on any
error output, on any traceback or warning written to stderr, and on a cell that
runs longer than the per-cell timeout. The executed copies (with outputs and
widget state) are saved in the artefact folder for a person to read; the
report written by notebook 06 lands there too.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import nbformat
import pytest
from nbclient import NotebookClient

NOTEBOOKS = Path(__file__).resolve().parent.parent / "notebooks"
PATHS = sorted(p for p in NOTEBOOKS.glob("*.ipynb") if not p.name.startswith("."))
CELL_TIMEOUT = 300  # s; the slowest cell (a finite-burn loss table) takes seconds on 2 cores
WIDGET_STATE = "application/vnd.jupyter.widget-state+json"


def _kernel_name() -> str:
    """The kernel of this interpreter: ipykernel's native spec, found in sys.prefix."""
    from jupyter_client.kernelspec import KernelSpecManager

    specs = KernelSpecManager().find_kernel_specs()
    if "python3" not in specs:  # a bare environment without the spec file: install it into sys.prefix
        from ipykernel.kernelspec import install

        install(prefix=sys.prefix)
    return "python3"


def _execute(nb: nbformat.NotebookNode, cwd: Path) -> nbformat.NotebookNode:
    client = NotebookClient(
        nb,
        timeout=CELL_TIMEOUT,
        kernel_name=_kernel_name(),
        store_widget_state=True,
        allow_errors=False,
        resources={"metadata": {"path": str(cwd)}},
    )
    client.execute()
    return nb


def _problems(nb: nbformat.NotebookNode) -> list[str]:
    """Error outputs and stderr text, with the cell they came from."""
    found = []
    for index, cell in enumerate(nb.cells):
        if cell.cell_type != "code":
            continue
        for output in cell.get("outputs", []):
            if output.output_type == "error":
                found.append(f"cell {index}: {output.ename}: {output.evalue}")
            elif output.output_type == "stream" and output.name == "stderr" and output.text.strip():
                found.append(f"cell {index} wrote to stderr: {output.text.strip()[:2000]}")
    return found


def test_there_are_notebooks() -> None:
    names = [p.name for p in PATHS]
    for prefix in ("01_", "02_", "03_", "04_", "05_", "06_"):
        assert any(n.startswith(prefix) for n in names), f"no notebook {prefix}* in {names}"


def test_kernel_is_this_interpreter(tmp_path: Path) -> None:
    """The notebooks run on the same python (and so the same deltakit) as the tests."""
    nb = nbformat.v4.new_notebook(
        cells=[nbformat.v4.new_code_cell("import sys, deltakit; print(sys.executable)")]
    )
    _execute(nb, tmp_path)
    printed = nb.cells[0].outputs[0].text.strip()
    assert Path(printed).resolve() == Path(sys.executable).resolve()


@pytest.mark.slow
@pytest.mark.parametrize("path", PATHS, ids=[p.stem for p in PATHS])
def test_notebook_runs_clean(
    path: Path, tmp_path: Path, artifacts: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    nb = nbformat.read(path, as_version=4)
    assert not any(c.get("outputs") for c in nb.cells if c.cell_type == "code"), (
        f"{path.name} is committed with outputs; run notebooks/_build.py or clear them"
    )
    reports = artifacts / "notebook-reports" / path.stem
    reports.mkdir(parents=True, exist_ok=True)
    monkeypatch.setenv("DELTAKIT_REPORT_DIR", str(reports))  # the kernel inherits it
    monkeypatch.setenv("MPLBACKEND", "module://matplotlib_inline.backend_inline")
    try:
        _execute(nb, tmp_path)
    finally:
        executed = artifacts / "notebooks"
        executed.mkdir(exist_ok=True)
        nbformat.write(nb, executed / path.name)
    problems = _problems(nb)
    assert not problems, f"{path.name}:\n" + "\n".join(problems)
    # Panels shown in the notebook must have left their widget state behind.
    uses_panels = any("deltakit.widgets" in c.source for c in nb.cells if c.cell_type == "code")
    if uses_panels:
        state = nb.metadata.get("widgets", {}).get(WIDGET_STATE, {}).get("state", {})
        assert state, f"{path.name} shows panels but stored no widget state"
        json.dumps(state)  # the stored state is plain JSON
        views = [
            o
            for c in nb.cells
            if c.cell_type == "code"
            for o in c.outputs
            if "application/vnd.jupyter.widget-view+json" in o.get("data", {})
        ]
        assert views, f"{path.name} shows panels but no cell output is a widget view"
        for view in views:
            model = view["data"]["application/vnd.jupyter.widget-view+json"]["model_id"]
            assert model in state, f"{path.name}: displayed widget {model} has no stored state"
