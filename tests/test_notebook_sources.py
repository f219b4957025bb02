"""The notebooks' plain-text sources and their .ipynb files are in step.

Each ``notebooks/NN_name.py`` (jupytext percent format) is the source of the
``.ipynb`` beside it; a change to one without the other fails here.
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

import nbformat
import pytest

pytest.importorskip("jupytext")

NOTEBOOKS = Path(__file__).resolve().parent.parent / "notebooks"
_spec = importlib.util.spec_from_file_location("notebook_sync", NOTEBOOKS / "sync.py")
sync = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(sync)


def test_every_notebook_has_a_source_and_every_source_a_notebook():
    sources = {p.stem for p in sync.sources()}
    notebooks = {p.stem for p in NOTEBOOKS.glob("*.ipynb")}
    assert sources, "no notebook sources found"
    assert sources == notebooks


@pytest.mark.parametrize("source", sync.sources(), ids=lambda p: p.stem)
def test_the_committed_notebook_is_what_its_source_makes(source):
    committed = nbformat.read(source.with_suffix(".ipynb"), as_version=4)
    made = sync.notebook_from(source)
    assert [(c.cell_type, c.source) for c in committed.cells] == [(c.cell_type, c.source) for c in made.cells]
    assert source.with_suffix(".ipynb").read_text(encoding="utf-8") == sync.text_of(source), (
        f"{source.name}: run .venv/bin/python notebooks/sync.py"
    )


@pytest.mark.parametrize("source", sync.sources(), ids=lambda p: p.stem)
def test_committed_notebooks_carry_no_outputs(source):
    committed = nbformat.read(source.with_suffix(".ipynb"), as_version=4)
    assert all(
        not c.get("outputs") and c.get("execution_count") is None
        for c in committed.cells
        if c.cell_type == "code"
    )
