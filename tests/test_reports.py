"""deltakit.report: one call, HTML shown in a real browser with no network, a PDF that compiles and says
the totals, Markdown that renders as text, files written whole and never over a stranger.

The vehicle is invented (the "Fescue" tug of tests/test_dispersions.py).
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess

import pytest
from _jupyterlab import chromium, require_browser

import deltakit as dk
from deltakit import Budget, Normal
from deltakit.constants import MARS

pytest.importorskip("xarray")
REQUIRE_LATEX = os.environ.get("DELTAKIT_REQUIRE_LATEX") == "1"
DERIVATIONS = ["rocket_equation", "hohmann", "burn_energy"]


def fescue() -> Budget:
    b = Budget(name="Fescue relay tug", dry_mass=900.0)
    b.system("main", dk.exhaust_velocity(321.0), 1650.0).system("rcs", dk.exhaust_velocity(224.0), 60.0)
    for i, dv in enumerate([620.0, 410.0, 95.0]):
        b.add(f"main burn {i + 1}", dv, margin=0.03)
    b.add("attitude upkeep", 20.0, system="rcs", margin=0.5)
    b.jettison("release sensor pod", 45.0)
    b.add_mass("dock with depot", 120.0)
    return b


@pytest.fixture(scope="module")
def inputs():
    b = fescue()
    ds = dk.disperse(b, samples=20_000, seed=3, isp={"main": Normal(1.5)}, dv={"main burn 1": Normal(10.0)})
    return b, ds


def _latex_or_skip() -> None:
    if shutil.which("pdflatex") is None or shutil.which("pdftotext") is None:
        if REQUIRE_LATEX:
            pytest.fail("DELTAKIT_REQUIRE_LATEX=1 but pdflatex or pdftotext is missing")
        pytest.skip("pdflatex or pdftotext not installed")


def test_markdown_report_has_everything(inputs, artifacts):
    b, ds = inputs
    text = dk.report(b, dispersion=ds, derivations=DERIVATIONS, constants=[MARS])
    assert text.splitlines()[0] == "<!-- deltakit report -->"
    assert "not for flight operations" in text
    assert f"{float(b.propellant):.2f}" in text and f"{float(b.final_mass):.2f}" in text
    assert f"{100 * float(ds.probability_closes):.2f} %" in text
    assert "Sources of the constants used" in text and "CGPM" in text and MARS.source.split(";")[0] in text
    assert text.count("data:image/png;base64,") == 3  # waterfall, propellant left, sensitivity
    assert text.count("\n$$\n") >= 2 * sum(len(dk.symbolic.derive(n).steps) for n in DERIVATIONS)
    (artifacts / "report.md").write_text(text, encoding="utf-8")


@pytest.mark.browser
def test_html_report_in_chromium_shows_tables_formulas_figures_offline(inputs, tmp_path, artifacts):
    require_browser()
    b, ds = inputs
    path = tmp_path / "fescue.html"
    dk.report(b, dispersion=ds, derivations=DERIVATIONS, constants=[MARS], path=path)
    steps = sum(len(dk.symbolic.derive(n).steps) + 1 for n in DERIVATIONS)
    with chromium(tmp_path / "profile", 1100, 1400) as page:
        requests, problems = [], []
        page.on("request", lambda r: requests.append(r.url))
        page.on("console", lambda m: problems.append(m.text) if m.type in ("error", "warning") else None)
        page.on("pageerror", lambda e: problems.append(str(e)))
        page.goto(path.as_uri())
        page.wait_for_load_state("load")
        tables = page.locator("table").count()
        first_rows = page.locator("table").first.locator("tbody tr").count()
        formulas = page.locator("img.formula").count()
        broken = page.evaluate(
            "Array.from(document.images).filter(i => !i.complete || i.naturalWidth === 0).length"
        )
        figures = page.locator("figure img").count()
        figure_width = page.evaluate(
            "Math.min(...Array.from(document.querySelectorAll('figure img')).map(i => i.naturalWidth))"
        )
        text = page.inner_text("body")
        scripts = page.locator("script").count()
        page.screenshot(path=str(artifacts / "report-html-top.png"))
        page.locator("h2", has_text="Derivations").scroll_into_view_if_needed()
        page.screenshot(path=str(artifacts / "report-html-derivations.png"))
    assert problems == []
    outside = [u for u in requests if not u.startswith("data:") and u != path.as_uri()]
    assert outside == [], f"the report asked for {outside}"
    assert tables >= 7 and first_rows == len(b) + 1 and figures == 3 and figure_width > 300  # lines + total
    assert formulas >= steps and broken == 0 and scripts == 0
    assert f"{float(b.propellant):.2f}" in text and "not for flight operations" in text


def test_pdf_report_compiles_and_says_the_totals(inputs, tmp_path, artifacts):
    _latex_or_skip()
    b, ds = inputs
    path = tmp_path / "fescue.pdf"
    data = dk.report(b, dispersion=ds, derivations=DERIVATIONS, constants=[MARS], path=path)
    assert data.startswith(b"%PDF") and path.read_bytes() == data
    text = subprocess.run(["pdftotext", "-layout", str(path), "-"], capture_output=True, text=True).stdout
    for total in (f"{float(b.propellant):.2f}", f"{float(b.final_mass):.2f}", f"{float(b.total_dv):.1f}"):
        assert total in text, total
    assert "not for flight operations" in re.sub(r"\s+", " ", text)
    assert "Sources of the constants used" in text and "Hohmann transfer" in text
    shutil.copy(path, artifacts / "report.pdf")


def test_latex_source_brings_its_figures(inputs, tmp_path):
    _latex_or_skip()
    b, ds = inputs
    path = tmp_path / "fescue.tex"
    dk.report(b, dispersion=ds, path=path)
    assert sorted(p.name for p in tmp_path.iterdir()) == [f"fescue-figure-{n}.png" for n in (1, 2, 3)] + [
        "fescue.tex"
    ]
    run = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", path.name],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=180,
    )
    assert run.returncode == 0, run.stdout[-2000:]


def test_several_formats_in_one_call(inputs, tmp_path):
    b, _ = inputs
    written = dk.report(b, fmt=("html", "markdown"), path=tmp_path / "tug")
    assert written == {"html": tmp_path / "tug.html", "markdown": tmp_path / "tug.md"}
    assert all(p.exists() for p in written.values())


# ---------------------------------------------------------------------- files
@pytest.mark.parametrize("suffix", [".html", ".md", ".tex"])
def test_a_report_replaces_its_own_file_and_refuses_a_stranger(inputs, tmp_path, suffix):
    b, _ = inputs
    path = tmp_path / f"report{suffix}"
    umask = os.umask(0o022)
    try:
        dk.report(b, path=path)
        dk.report(b, notes="second edition", path=path)
    finally:
        os.umask(umask)
    assert "second edition" in path.read_text(encoding="utf-8")
    assert path.stat().st_mode & 0o777 == 0o644  # normal permissions (the old writer made 0o600)
    stranger = tmp_path / f"thesis{suffix}"
    stranger.write_text("three years of work", encoding="utf-8")
    with pytest.raises(dk.DomainError, match="refusing to overwrite .*overwrite=True"):
        dk.report(b, path=stranger)
    assert stranger.read_text(encoding="utf-8") == "three years of work"
    dk.report(b, path=stranger, overwrite=True)
    assert "Fescue" in stranger.read_text(encoding="utf-8")
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".deltakit-tmp")]


def test_a_pdf_report_replaces_only_a_pdf_report(inputs, tmp_path):
    _latex_or_skip()
    b, _ = inputs
    path = tmp_path / "report.pdf"
    dk.report(b, path=path)
    dk.report(b, notes="second", path=path)
    other = tmp_path / "other.pdf"
    other.write_bytes(b"%PDF-1.4 someone else's paper")
    with pytest.raises(dk.DomainError, match="refusing to overwrite"):
        dk.report(b, path=other)
    assert other.read_bytes() == b"%PDF-1.4 someone else's paper"


def test_a_failed_pdf_leaves_the_old_file_whole(inputs, tmp_path, monkeypatch):
    _latex_or_skip()
    b, _ = inputs
    path = tmp_path / "report.pdf"
    dk.report(b, path=path)
    before = path.read_bytes()
    monkeypatch.setattr(shutil, "which", lambda name: None)
    with pytest.raises(RuntimeError, match="pdflatex was not found"):
        dk.report(b, notes="never written", path=path)
    assert path.read_bytes() == before and [p.name for p in tmp_path.iterdir()] == ["report.pdf"]


def test_a_report_through_a_symlink_keeps_the_link(inputs, tmp_path):
    b, _ = inputs
    real = tmp_path / "archive" / "report.html"
    real.parent.mkdir()
    dk.report(b, path=real)
    link = tmp_path / "latest.html"
    link.symlink_to(real)
    dk.report(b, notes="via the link", path=link)
    assert link.is_symlink() and "via the link" in real.read_text(encoding="utf-8")


@pytest.mark.parametrize(
    "kwargs, error, match",
    [
        ({}, ValueError, "needs a `budget`"),
        ({"fmt": "docx"}, ValueError, "`fmt`"),
        ({"path": "report.odt"}, ValueError, "`fmt`"),
        ({"derivations": [3]}, TypeError, "`derivations`"),
        ({"figures": {"x": "not a figure"}}, TypeError, "`figures`"),
        ({"constants": ["Mars"]}, TypeError, "`constants`"),
    ],
)
def test_bad_arguments_name_the_parameter(kwargs, error, match, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    budget = None if not kwargs else fescue()
    with pytest.raises(error, match=match):
        dk.report(budget, **kwargs)
    assert list(tmp_path.iterdir()) == []


# ---------------------------------------------------------------------- hostile strings
def hostile() -> Budget:
    b = Budget(name="\\input{secret} <script>alert('name')</script>", dry_mass=700.0)
    b.system("main", 3150.0, 900.0)
    b.add("\\end{document} <img src=x onerror=alert(1)>", 500.0)
    b.add("\\write18{touch pwned} [x](javascript:alert(1)) | ** _", 300.0)
    b.add("$\\frac{ not mathtext", 10.0)  # the figures must draw it as plain text
    return b


HOSTILE_NOTES = "</p><script>alert('notes')</script> \\input{secret} $\\frac{"


@pytest.mark.browser
def test_hostile_strings_in_html_stay_text(tmp_path):
    require_browser()
    path = tmp_path / "hostile.html"
    figure_caption = "<script>alert('caption')</script>"
    from matplotlib.figure import Figure

    fig = Figure(figsize=(3, 2))
    fig.add_subplot().plot([0, 1], [0, 1])
    dk.report(hostile(), notes=HOSTILE_NOTES, figures={figure_caption: fig}, path=path)
    with chromium(tmp_path / "profile", 1000, 1000) as page:
        dialogs = []
        page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
        page.goto(path.as_uri())
        page.wait_for_load_state("load")
        scripts = page.locator("script").count()
        images = page.locator("img[onerror]").count()
        links = page.locator("a").count()
        text = page.inner_text("body")
    assert scripts == 0 and images == 0 and links == 0 and dialogs == []
    assert "<script>alert('notes')</script>" in text and "<img src=x onerror=alert(1)>" in text


def test_hostile_strings_in_markdown_render_as_text():
    markdown_it = pytest.importorskip("markdown_it")
    text = dk.report(hostile(), notes=HOSTILE_NOTES)
    html = markdown_it.MarkdownIt("commonmark").enable("table").render(text)
    for tag in ("<script", "<img src=x", 'href="javascript'):
        assert tag not in html, tag


def test_hostile_strings_in_the_pdf_run_nothing(tmp_path):
    _latex_or_skip()
    (tmp_path / "secret.tex").write_text("SECRETMARKER")
    path = tmp_path / "hostile.pdf"
    cwd = os.getcwd()
    os.chdir(tmp_path)  # a live \input would find secret.tex here
    try:
        dk.report(hostile(), notes=HOSTILE_NOTES, path=path)
    finally:
        os.chdir(cwd)
    text = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, text=True).stdout
    assert "SECRETMARKER" not in text and not (tmp_path / "pwned").exists()
    assert "input{secret}" in text and "Sources of the constants used" in text  # shown as typed, to the end
