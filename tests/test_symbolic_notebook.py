"""A derivation shows itself typeset in a notebook.

First headless: a kernel (nbclient) runs ``derive("hohmann")`` and the cell's
output carries ``text/latex`` (from ``Derivation._repr_latex_``). Then in a real
browser: JupyterLab opens that executed notebook, its MathJax typesets the
stored outputs of every catalog entry, and the test checks that each was
typeset with no MathJax error and no unknown macro, saving a screenshot of the
Hohmann derivation to the artefact folder (see /work/shared/BROWSER-TESTS.md).
Without /usr/bin/chromium or Playwright the browser part skips, unless
``DELTAKIT_REQUIRE_BROWSER=1``.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from _jupyterlab import chromium, jupyterlab, require_browser

nbformat = pytest.importorskip("nbformat")
nbclient = pytest.importorskip("nbclient")

CELL = 'from deltakit.symbolic import derive\nderive("hohmann")'


@pytest.fixture(scope="module")
def executed(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("symbolic-notebook")
    from deltakit.symbolic import catalog

    # the Hohmann cell first (screenshot), then every other entry (MathJax must typeset each)
    others = [nbformat.v4.new_code_cell(f"derive({name!r})") for name in catalog() if name != "hohmann"]
    nb = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(CELL), *others])
    nb.metadata["kernelspec"] = {
        "name": "python3",
        "display_name": "Python 3 (ipykernel)",
        "language": "python",
    }
    env_cwd = Path(__file__).resolve().parent.parent
    nbclient.NotebookClient(
        nb, timeout=120, kernel_name="python3", resources={"metadata": {"path": str(env_cwd)}}
    ).execute()
    path = folder / "derivation.ipynb"
    nbformat.write(nb, path)
    return path


def test_cell_output_is_typeset_latex(executed: Path) -> None:
    nb = nbformat.read(executed, as_version=4)
    (output,) = nb.cells[0].outputs
    assert output.output_type == "execute_result"
    latex = output.data["text/latex"]
    assert "Hohmann transfer between circular orbits" in latex
    assert r"\boxed{" in latex and "Assumptions" in latex
    assert "deltakit.hohmann:total" in output.data["text/plain"]
    for cell in nb.cells[1:]:
        (output,) = cell.outputs
        assert r"\boxed{" in output.data["text/latex"], cell.source


@pytest.mark.browser
@pytest.mark.slow
def test_jupyterlab_typesets_the_derivation(executed: Path, tmp_path: Path, artifacts: Path) -> None:
    require_browser()
    cells = len(nbformat.read(executed, as_version=4).cells)
    with jupyterlab(executed.parent, tmp_path) as lab, chromium(tmp_path / "profile", 1100, 1400) as page:
        page.goto(f"{lab['base']}/lab/tree/{executed.name}?token={lab['token']}")
        outputs = page.locator(".jp-OutputArea-output.jp-RenderedLatex")
        rendered = outputs.first
        rendered.wait_for(state="visible")
        rendered.locator("mjx-container").first.wait_for(state="attached")
        page.wait_for_timeout(1500)  # MathJax finishes the remaining blocks
        formulas = rendered.locator("mjx-container").count()
        text = rendered.inner_text()
        rendered.screenshot(path=str(artifacts / "symbolic-notebook-hohmann.png"))
        typeset = []
        for index in range(cells):  # scroll each output into view so it is typeset
            output = outputs.nth(index)
            output.scroll_into_view_if_needed()
            output.locator("mjx-container").first.wait_for(state="attached")
            typeset.append(output.locator("mjx-container").count())
        page.wait_for_timeout(1000)
        # a TeX syntax error gives <mjx-merror>; an unknown macro is shown as its name in red
        errors = page.locator(".jp-RenderedLatex mjx-merror").count()
        errors += page.locator('.jp-RenderedLatex mtext[mathcolor="red"]').count()
        raw = [outputs.nth(i).inner_text() for i in range(cells) if "\\boxed" in outputs.nth(i).inner_text()]
    assert formulas >= 2, "MathJax typeset nothing"
    assert errors == 0, "MathJax reported an error in a derivation's LaTeX"
    assert min(typeset) >= 2, f"some derivations were not typeset: {typeset}"
    assert not raw, "raw TeX is visible in some outputs"
    assert r"\boxed" not in text and r"\begin{aligned}" not in text, "raw TeX is visible: not typeset"
