"""A report as a LaTeX document, and as a PDF compiled from it by pdflatex.

Only packages of a basic TeX installation are used (amsmath, geometry,
graphicx). Every user string goes through :func:`deltakit._text.escape_latex`;
pdflatex runs without shell escape and with file access limited to its
build folder, so even a label that got through could neither run a command
nor read a file.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import tempfile
from pathlib import Path

from .._text import escape_latex
from ..symbolic.report import latex_preamble, latex_section
from ._content import Bullets, DerivationBlock, Document, FigureBlock, Heading, Paragraph, Table

__all__ = ["PDF_MARK", "compile_pdf", "render"]

#: Written near the start of every PDF report (how deltakit knows its own PDFs).
PDF_MARK = b"deltakit report"
_SECTIONS = {1: "section*", 2: "section*", 3: "subsection*"}
_TIMEOUT = 180  # s


def _table(table: Table) -> str:
    spec = "l" * table.text_columns + "r" * (len(table.headers) - table.text_columns)
    rows = [r"\begin{table}[htbp]", r"\centering", rf"\dkcaption{{{escape_latex(table.caption)}}}"]
    rows += [
        r"\resizebox{\ifdim\width>\linewidth\linewidth\else\width\fi}{!}{%",
        rf"\begin{{tabular}}{{{spec}}}",
    ]
    rows += [r"\hline", " & ".join(escape_latex(h) for h in table.headers) + r" \\", r"\hline"]
    rows += [" & ".join(escape_latex(c) for c in cells) + r" \\" for cells in table.rows]
    if table.total is not None:
        rows += [r"\hline", " & ".join(escape_latex(c) for c in table.total) + r" \\"]
    rows += [r"\hline", r"\end{tabular}}", r"\end{table}"]
    return "\n".join(rows)


def render(doc: Document, figure_names: list[str] | None = None) -> str:
    """The report as a LaTeX document; figures are ``figure-N.png`` beside it."""
    out = [
        latex_preamble("graphicx"),
        r"\pdfobjcompresslevel=0",
        r"\immediate\pdfobj{(" + PDF_MARK.decode() + r": made by deltakit)}",
        r"\pdfinfo{/Creator (deltakit report)}",
        r"\newcommand{\dkcaption}[1]{\par\noindent\textbf{#1}\par\smallskip}",
        rf"\title{{{escape_latex(doc.title)}}}",
        r"\date{}",
        r"\begin{document}",
        r"\maketitle",
    ]
    figures = iter(figure_names or [])
    for block in doc.blocks:
        if isinstance(block, Heading):
            out.append(rf"\{_SECTIONS.get(block.level, 'subsection*')}{{{escape_latex(block.text)}}}")
        elif isinstance(block, Paragraph):
            text = escape_latex(block.text)
            if block.style == "caution":
                text = r"\fbox{\parbox{0.96\linewidth}{\textbf{Caution.} " + text + "}}"
            elif block.style == "verdict":
                text = rf"\textbf{{{text}}}"
            elif block.style == "note":
                text = rf"{{\small {text}}}"
            out.append(r"\noindent " + text + "\n")
        elif isinstance(block, Bullets):
            out.append(r"\begin{itemize}")
            out += [rf"  \item {escape_latex(item)}" for item in block.items]
            out.append(r"\end{itemize}")
        elif isinstance(block, Table):
            out.append(_table(block))
        elif isinstance(block, FigureBlock):
            name = next(figures)
            out += [
                r"\begin{figure}[htbp]",
                r"\centering",
                rf"\includegraphics[width=0.92\linewidth]{{{name}}}",
                rf"\par\small {escape_latex(block.caption)}",
                r"\end{figure}",
            ]
        elif isinstance(block, DerivationBlock):
            out.append(latex_section(block.derivation, "subsection*"))
    out.append(r"\end{document}")
    return "\n".join(out) + "\n"


def compile_pdf(doc: Document) -> bytes:
    """Typeset the report with pdflatex in a folder of its own; the PDF's bytes."""
    engine = shutil.which("pdflatex")
    if engine is None:
        raise RuntimeError(
            "pdflatex was not found: install a LaTeX engine (Debian: texlive-latex-base), "
            "or write the report as HTML or Markdown"
        )
    with tempfile.TemporaryDirectory(prefix="deltakit-report-") as folder:
        build = Path(folder)
        names = []
        for number, figure in enumerate(doc.figures, start=1):
            name = f"figure-{number}.png"
            (build / name).write_bytes(figure.png)
            names.append(name)
        (build / "report.tex").write_text(render(doc, names), encoding="utf-8")
        env = dict(os.environ, openin_any="p", openout_any="p", shell_escape="f", TEXMFOUTPUT=str(build))
        run = subprocess.run(
            [engine, "-no-shell-escape", "-interaction=nonstopmode", "-halt-on-error", "report.tex"],
            cwd=build,
            capture_output=True,
            text=True,
            timeout=_TIMEOUT,
            env=env,
            stdin=subprocess.DEVNULL,
        )
        pdf = build / "report.pdf"
        if run.returncode != 0 or not pdf.exists():
            tail = "\n".join(run.stdout.splitlines()[-25:])
            raise RuntimeError(f"pdflatex could not typeset the report:\n{tail}")
        return pdf.read_bytes()
