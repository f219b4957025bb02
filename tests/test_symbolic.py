"""The symbolic layer's contract: catalog, Derivation, exports, caching, lazy import."""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import textwrap
from pathlib import Path

import numpy as np
import pytest
import sympy as sp

import deltakit as dk

symbolic = pytest.importorskip("deltakit.symbolic")

REQUIRED = {
    "vis_viva", "orbital_period", "oberth", "inplane_burn", "ejection_energy", "burn_energy",
    "rocket_equation",
    "propulsive_efficiency", "apsis_change", "hohmann", "bielliptic", "plane_change",
    "combined_plane_change", "escape_burn", "capture_burn", "powered_flyby",
}  # fmt: skip

ROOT = Path(__file__).resolve().parent.parent


def _run_python(code: str) -> str:
    done = subprocess.run(
        [sys.executable, "-c", textwrap.dedent(code)],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 0, done.stderr
    return done.stdout


# -- catalog and lookup ----------------------------------------------------------


def test_catalog_has_every_required_entry():
    names = symbolic.catalog()
    assert isinstance(names, tuple)
    assert REQUIRED <= set(names)
    assert len(set(names)) == len(names)


def test_unknown_name_lists_the_catalog():
    with pytest.raises(KeyError) as caught:
        symbolic.derive("hohman")
    message = str(caught.value)
    assert "'hohman'" in message
    for name in symbolic.catalog():
        assert name in message


def test_name_must_be_a_string():
    with pytest.raises(TypeError, match="name"):
        symbolic.derive(3)


def test_twin_function_name_is_an_alias():
    assert symbolic.derive("energy_gain") is symbolic.derive("oberth")
    assert symbolic.derive("rocket_dv") is symbolic.derive("rocket_equation")


# -- caching and lazy import -------------------------------------------------------


def test_second_derive_returns_the_same_object_fast():
    # Measured in a fresh interpreter so the cache starts empty; compared as a ratio.
    out = _run_python(
        """
        import json, time
        from deltakit.symbolic import derive
        t0 = time.perf_counter(); first = derive("bielliptic"); t1 = time.perf_counter()
        second = derive("bielliptic"); t2 = time.perf_counter()
        print(json.dumps({"same": first is second, "first": t1 - t0, "second": t2 - t1}))
        """
    )
    timing = json.loads(out)
    assert timing["same"]
    assert timing["second"] < timing["first"] / 100


def test_import_deltakit_does_not_import_sympy():
    out = _run_python(
        """
        import sys
        import deltakit as dk
        from deltakit.constants import EARTH
        dk.hohmann(7e6, 4.2e7, EARTH.mu)
        before = "sympy" in sys.modules
        import deltakit.symbolic
        print(before, "sympy" in sys.modules)
        """
    )
    assert out.split() == ["False", "True"]


def test_symbolic_is_reachable_from_the_package():
    assert dk.symbolic.derive is symbolic.derive


# -- the Derivation record -----------------------------------------------------------


@pytest.mark.parametrize("name", sorted(REQUIRED))
def test_derivation_is_complete(name):
    d = symbolic.derive(name)
    assert d.name == name
    assert d.title and d.title[0].isupper()
    assert len(d.assumptions) >= 1 and all(isinstance(a, str) and a for a in d.assumptions)
    assert len(d.steps) >= 2
    for sentence, relation in d.steps:
        assert isinstance(sentence, str) and sentence.endswith((".", ":"))
        assert isinstance(relation, sp.Basic)
    # every symbol that appears anywhere has a meaning and an SI unit
    appearing = set(d.result.free_symbols).union(*(rel.free_symbols for _, rel in d.steps))
    appearing = {s for s in appearing if isinstance(s, sp.Symbol)}
    assert appearing <= set(d.symbols), appearing - set(d.symbols)
    for info in d.symbols.values():
        assert info.meaning and info.unit and info.latex
    assert d.result.free_symbols <= set(d.parameters)
    assert d.twin.startswith("deltakit.")
    assert isinstance(d.result, sp.Expr)


@pytest.mark.parametrize("name", sorted(REQUIRED))
def test_orbital_symbols_are_declared_positive(name):
    d = symbolic.derive(name)
    for symbol in d.parameters:
        if str(symbol) in {"r", "r1", "r2", "rb", "rp", "ra", "mu", "ve", "m0", "mf", "m_vehicle"}:
            assert symbol.is_positive, symbol


def test_derivation_is_immutable():
    d = symbolic.derive("hohmann")
    with pytest.raises(AttributeError):
        d.title = "changed"


def test_repr_names_result_and_twin():
    text = repr(symbolic.derive("rocket_equation"))
    assert "rocket_equation" in text and "deltakit.rocket_dv" in text and "log" in text


# -- exports ---------------------------------------------------------------------


def test_latex_is_an_align_block_with_every_step():
    d = symbolic.derive("hohmann")
    block = d.latex()
    lines = block.splitlines()
    assert lines[0] == r"\begin{align*}" and lines[-1] == r"\end{align*}"
    assert block.count(r"\intertext{") == len(d.steps) + 1
    assert block.count("&=") >= len(d.steps)
    assert r"{\Delta v} &=" in lines[-2]
    short = d.latex(steps=False)
    assert r"\intertext" not in short and len(short.splitlines()) == 3


def test_sentences_are_escaped_for_latex():
    from deltakit.symbolic.derivation import text_in_math, text_tex

    assert text_tex("50% of r_p & $r_p$") == r"50\% of r\_p \& $r_p$"
    assert text_in_math("at $r_1$.") == r"\text{at }r_1\text{.}"


def test_markdown_of_one_derivation():
    d = symbolic.derive("ejection_energy")
    text = d.markdown()
    assert text.startswith("### Energy accounting of one discrete ejection\n")
    assert "**Assumptions**" in text and d.assumptions[0] in text
    assert text.count("$$\n") == 2 * (len(d.steps) + 1)
    assert "| $m_{v}$ |" in text
    assert "`deltakit.ejection_energy:total`" in text


def test_repr_latex_shows_title_assumptions_steps_result():
    d = symbolic.derive("hohmann")
    text = d._repr_latex_()
    assert text.startswith("$$") and text.rstrip().endswith("$$")
    assert d.title in text and "Assumptions" in text and r"\boxed{" in text
    assert text.count(r"\text{") >= len(d.steps) + len(d.assumptions)
    # balanced braces, so MathJax and LaTeX can parse it
    assert text.count("{") == text.count("}")


def test_markdown_report_of_three_derivations(tmp_path, artifacts):
    names = ["hohmann", "rocket_equation", "oberth"]
    path = tmp_path / "report.md"
    text = symbolic.report(names, fmt="markdown", path=path)
    assert path.read_text(encoding="utf-8") == text
    headings = [line for line in text.splitlines() if line.startswith("## ")]
    assert headings == [f"## {symbolic.derive(n).title}" for n in names]
    assert text.startswith("# ")
    assert "not for flight operations" in text
    blocks = text.count("\n$$\n")
    assert blocks % 2 == 0 and blocks >= 2 * sum(len(symbolic.derive(n).steps) + 1 for n in names)
    for n in names:
        for assumption in symbolic.derive(n).assumptions:
            assert assumption in text
    (artifacts / "symbolic-report.md").write_text(text, encoding="utf-8")


def test_report_rewrites_a_file_atomically(tmp_path):
    path = tmp_path / "report.md"
    umask = os.umask(0o022)
    try:
        symbolic.report(["hohmann"], path=path)
        symbolic.report(["plane_change"], path=path)  # its own report: replaced
    finally:
        os.umask(umask)
    assert "## Pure plane change" in path.read_text(encoding="utf-8")
    assert [p.name for p in tmp_path.iterdir()] == ["report.md"]  # no temporary file left
    assert path.stat().st_mode & 0o777 == 0o644  # normal permissions, not owner-only


def test_report_refuses_a_foreign_file(tmp_path):
    path = tmp_path / "notes.md"
    path.write_text("old notes", encoding="utf-8")
    with pytest.raises(dk.DomainError, match="refusing to overwrite"):
        symbolic.report(["plane_change"], path=path)
    assert path.read_text(encoding="utf-8") == "old notes"
    symbolic.report(["plane_change"], path=path, overwrite=True)
    assert path.read_text(encoding="utf-8").startswith("# ")


@pytest.mark.parametrize(
    "args,error,match",
    [
        ((["hohmann"],), None, None),
        (([],), ValueError, "names"),
        ((["hohmann"], "html"), ValueError, "fmt"),
        ((["no_such_entry"],), KeyError, "catalog"),
    ],
)
def test_report_arguments(args, error, match):
    if error is None:
        assert symbolic.report(*args).count("\n## ") == 1
    else:
        with pytest.raises(error, match=match):
            symbolic.report(*args)


# -- function() --------------------------------------------------------------------


def test_function_takes_keywords_named_after_symbols():
    f = symbolic.derive("escape_burn").function()
    value = f(rp=6678e3, vinf=3000.0, mu=dk.constants.EARTH.mu)
    assert isinstance(value, np.floating)
    assert value == pytest.approx(float(dk.escape_burn(6678e3, 3000.0, dk.constants.EARTH.mu)), rel=1e-12)


def test_function_reports_argument_mistakes():
    f = symbolic.derive("hohmann").function()
    with pytest.raises(TypeError, match="missing mu"):
        f(r1=7e6, r2=4e7)
    with pytest.raises(TypeError, match="unexpected keyword 'radius'"):
        f(radius=7e6, r2=4e7, mu=1.0)
    with pytest.raises(TypeError, match="two values for 'r1'"):
        f(7e6, r1=7e6, r2=4e7, mu=1.0)
    with pytest.raises(dk.DomainError, match="`r2`"):
        f(r1=7e6, r2="far", mu=1.0)
    with pytest.raises(KeyError, match="no output 'burn3'.*'burn1', 'burn2'"):
        symbolic.derive("hohmann").function("burn3")


def test_function_is_cached_per_output():
    d = symbolic.derive("hohmann")
    assert d.function() is d.function()
    assert d.function("burn1") is not d.function()


# -- LaTeX compiles ------------------------------------------------------------------

_DOCUMENT = r"""\documentclass[11pt]{article}
\usepackage{amsmath,amssymb}
\usepackage[margin=2cm]{geometry}
\begin{document}
\section*{Hohmann transfer, pasted from deltakit}
%s
\end{document}
"""


def _latex_or_skip() -> str:
    engine = shutil.which("pdflatex")
    if engine is None:
        if os.environ.get("DELTAKIT_REQUIRE_LATEX"):
            pytest.fail("DELTAKIT_REQUIRE_LATEX is set but pdflatex is not installed")
        pytest.skip(
            "pdflatex is not installed (Debian: texlive-latex-base); set "
            "DELTAKIT_REQUIRE_LATEX to make this fail"
        )
    return engine


def _compile(engine: str, tex: Path) -> Path:
    done = subprocess.run(
        [engine, "-interaction=nonstopmode", "-halt-on-error", tex.name],
        cwd=tex.parent,
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 0, done.stdout[-3000:]
    pdf = tex.with_suffix(".pdf")
    assert pdf.stat().st_size > 1000
    log = tex.with_suffix(".log").read_text(errors="replace")
    assert "Overfull \\hbox" not in log, "a line runs into the margin"
    return pdf


def _to_png(pdf: Path, png: Path, fallback_tex: str) -> Path:
    """First page as PNG: pdftoppm, else mutool, else matplotlib mathtext of one line."""
    if shutil.which("pdftoppm"):
        subprocess.run(["pdftoppm", "-png", "-r", "110", "-singlefile", pdf, png.with_suffix("")], check=True)
    elif shutil.which("mutool"):
        subprocess.run(
            ["mutool", "draw", "-q", "-r", "110", "-o", png, pdf, "1"], check=True, capture_output=True
        )
    else:
        import matplotlib

        matplotlib.use("Agg")
        from matplotlib import pyplot as plt

        fig = plt.figure(figsize=(10, 1.2))
        fig.text(0.02, 0.4, f"${fallback_tex}$", fontsize=12)
        fig.savefig(png, dpi=110)
        plt.close(fig)
    assert png.stat().st_size > 1000
    return png


def test_pasted_hohmann_block_compiles(tmp_path, artifacts):
    engine = _latex_or_skip()
    d = symbolic.derive("hohmann")
    tex = tmp_path / "hohmann.tex"
    tex.write_text(_DOCUMENT % d.latex(), encoding="utf-8")
    pdf = _compile(engine, tex)
    shutil.copy(pdf, artifacts / "symbolic-hohmann.pdf")
    _to_png(pdf, artifacts / "symbolic-hohmann.png", d.result_tex())


def test_latex_report_of_the_whole_catalog_compiles(tmp_path, artifacts):
    engine = _latex_or_skip()
    tex = tmp_path / "catalog.tex"
    symbolic.report(symbolic.catalog(), fmt="latex", path=tex)
    pdf = _compile(engine, tex)
    shutil.copy(pdf, artifacts / "symbolic-catalog.pdf")
    _to_png(pdf, artifacts / "symbolic-catalog.png", symbolic.derive("vis_viva").result_tex())


def test_result_lines_render_with_mathtext(artifacts):
    # One-line results also typeset with matplotlib's mathtext (no LaTeX needed).
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    names = ["vis_viva", "oberth", "rocket_equation", "propulsive_efficiency", "plane_change", "burn_energy"]
    fig = plt.figure(figsize=(9, 0.8 * len(names)))
    for row, name in enumerate(names):
        fig.text(0.02, 1 - (row + 0.7) / len(names), f"${symbolic.derive(name).result_tex()}$", fontsize=13)
    path = artifacts / "symbolic-mathtext.png"
    fig.savefig(path, dpi=100)
    plt.close(fig)
    assert path.stat().st_size > 1000
