"""Write every notebook's ``.ipynb`` from its plain-text source, the ``.py`` beside it.

Each notebook lives as a jupytext "percent" script (``NN_name.py``: cells start
with ``# %%``, Markdown cells with ``# %% [markdown]``), which is what is edited,
linted (ruff) and reviewed. The ``.ipynb`` next to it is generated, without
outputs, so that the notebooks open in any Jupyter; JupyterLab with jupytext
(in the ``notebook`` extra) also opens the ``.py`` directly and keeps the pair
in step.

    .venv/bin/python notebooks/sync.py          # write the .ipynb files
    .venv/bin/python notebooks/sync.py --check  # exit 1 if any .ipynb is stale

``tests/test_notebook_sources.py`` runs the check.
"""

from __future__ import annotations

import sys
from pathlib import Path

import jupytext
import nbformat

HERE = Path(__file__).resolve().parent
FORMATS = "ipynb,py:percent"


def sources() -> list[Path]:
    """The notebook sources: ``NN_name.py`` files of this folder."""
    return sorted(p for p in HERE.glob("[0-9][0-9]_*.py"))


def notebook_from(source: Path) -> nbformat.NotebookNode:
    """The notebook a source describes, with no outputs and stable metadata."""
    nb = jupytext.read(source)
    meta = nb.metadata.setdefault("jupytext", {})
    meta.pop("text_representation", None)
    meta["formats"] = FORMATS
    nb.metadata["kernelspec"] = {
        "display_name": "Python 3 (ipykernel)",
        "language": "python",
        "name": "python3",
    }
    nb.metadata["language_info"] = {"name": "python"}
    for index, cell in enumerate(nb.cells):
        cell.id = f"cell-{index:02d}"  # stable ids: the file changes only when a cell does
        cell.metadata.pop("lines_to_next_cell", None)
        if cell.cell_type == "code":
            cell.outputs = []
            cell.execution_count = None
    return nb


def text_of(source: Path) -> str:
    return nbformat.writes(notebook_from(source)) + "\n"


def main(argv: list[str]) -> int:
    check = "--check" in argv
    stale = []
    for source in sources():
        target = source.with_suffix(".ipynb")
        text = text_of(source)
        if target.exists() and target.read_text(encoding="utf-8") == text:
            continue
        stale.append(target.name)
        if not check:
            target.write_text(text, encoding="utf-8")
    orphans = [p.name for p in HERE.glob("*.ipynb") if not p.with_suffix(".py").exists()]
    if check and (stale or orphans):
        print("stale notebooks (run notebooks/sync.py):", ", ".join(stale) or "none")
        print("notebooks without a .py source:", ", ".join(orphans) or "none")
        return 1
    if not check:
        print(f"wrote {len(stale)} notebook(s)" + (f"; no source for {orphans}" if orphans else ""))
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
