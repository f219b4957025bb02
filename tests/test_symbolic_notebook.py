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

import json
import os
import secrets
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

nbformat = pytest.importorskip("nbformat")
nbclient = pytest.importorskip("nbclient")

CHROMIUM = Path("/usr/bin/chromium")
CELL = 'from deltakit.symbolic import derive\nderive("hohmann")'


@pytest.fixture(scope="module")
def executed(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("symbolic-notebook")
    from deltakit.symbolic import catalog

    # the Hohmann cell first (screenshot), then every other entry (MathJax must typeset each)
    others = [nbformat.v4.new_code_cell(f"derive({name!r})") for name in catalog() if name != "hohmann"]
    nb = nbformat.v4.new_notebook(cells=[nbformat.v4.new_code_cell(CELL), *others])
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3 (ipykernel)", "language": "python"}
    env_cwd = Path(__file__).resolve().parent.parent
    nbclient.NotebookClient(nb, timeout=120, kernel_name="python3", resources={"metadata": {"path": str(env_cwd)}}).execute()
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


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@pytest.mark.browser
@pytest.mark.slow
def test_jupyterlab_typesets_the_derivation(executed: Path, tmp_path: Path, artifacts: Path) -> None:
    missing = None if CHROMIUM.exists() else f"{CHROMIUM} not found"
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        missing = "playwright is not installed"
    if missing:
        if os.environ.get("DELTAKIT_REQUIRE_BROWSER") == "1":
            pytest.fail(f"DELTAKIT_REQUIRE_BROWSER=1 but {missing}")
        pytest.skip(missing)

    cells = len(nbformat.read(executed, as_version=4).cells)
    env = dict(os.environ)
    for var in ("JUPYTER_CONFIG_DIR", "JUPYTER_DATA_DIR", "IPYTHONDIR", "MPLCONFIGDIR", "JUPYTER_RUNTIME_DIR"):
        (tmp_path / var).mkdir()
        env[var] = str(tmp_path / var)
    settings = tmp_path / "JUPYTER_CONFIG_DIR" / "lab" / "user-settings" / "@jupyterlab" / "apputils-extension"
    settings.mkdir(parents=True)
    (settings / "notification.jupyterlab-settings").write_text(json.dumps({"fetchNews": "false", "checkForUpdates": False}))
    port, token = _free_port(), secrets.token_hex(16)
    base = f"http://127.0.0.1:{port}"
    log = open(tmp_path / "lab.log", "wb")  # noqa: SIM115 (closed below)
    server = subprocess.Popen(
        [sys.executable, "-m", "jupyterlab", "--no-browser", "--allow-root", "--ServerApp.ip=127.0.0.1",
         f"--ServerApp.port={port}", "--ServerApp.port_retries=0", f"--IdentityProvider.token={token}",
         f"--ServerApp.root_dir={executed.parent}", "--LabApp.news_url=None",
         "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate"],
        env=env, stdout=log, stderr=subprocess.STDOUT, cwd=executed.parent,
    )  # fmt: skip
    try:
        deadline = time.monotonic() + 60
        while True:
            try:
                with urllib.request.urlopen(f"{base}/api/status?token={token}", timeout=2):
                    break
            except OSError:
                assert server.poll() is None and time.monotonic() < deadline, (tmp_path / "lab.log").read_text()[-2000:]
                time.sleep(0.3)
        with sync_playwright() as pw:
            context = pw.chromium.launch_persistent_context(
                user_data_dir=str(tmp_path / "profile"), executable_path=str(CHROMIUM), headless=True,
                args=["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                      "--disable-background-networking", "--disable-component-update", "--disable-sync"],
                viewport={"width": 1100, "height": 1400},
            )  # fmt: skip
            try:
                page = context.new_page()
                page.set_default_timeout(60_000)
                page.goto(f"{base}/lab/tree/{executed.name}?token={token}")
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
            finally:
                context.close()
    finally:
        server.terminate()
        try:
            server.wait(timeout=15)
        except subprocess.TimeoutExpired:
            server.kill()
            server.wait()
        log.close()
    assert formulas >= 2, "MathJax typeset nothing"
    assert errors == 0, "MathJax reported an error in a derivation's LaTeX"
    assert min(typeset) >= 2, f"some derivations were not typeset: {typeset}"
    assert not raw, "raw TeX is visible in some outputs"
    assert r"\boxed" not in text and r"\begin{aligned}" not in text, "raw TeX is visible: not typeset"
