"""Several derivations in one report, as Markdown or a LaTeX document.

For a report that also carries a budget, its dispersion and figures (and
HTML or PDF), see :func:`deltakit.report`; this one keeps to the formulas.
Files are written through deltakit's one atomic writer: an existing file is
replaced only by a derivations report of the same format (recognised by its
first lines), never a file of someone else's, unless ``overwrite=True``.
"""

from __future__ import annotations

import os
from collections.abc import Iterable

from .._files import write_atomic
from .._text import CAUTION, escape_latex, escape_markdown
from ._registry import derive
from .derivation import Derivation, escape_text, text_tex, unit_tex

__all__ = ["LATEX_MARK", "latex_preamble", "latex_section", "report"]

DISCLAIMER = CAUTION
#: First line of every LaTeX report deltakit writes (how it knows its own files).
LATEX_MARK = "% deltakit report"

_PREAMBLE = r"""\documentclass[11pt]{article}
\usepackage{amsmath,amssymb}
\usepackage[margin=2.2cm]{geometry}
\allowdisplaybreaks
"""


def latex_preamble(*packages: str) -> str:
    """The report's preamble (our mark first), with extra packages."""
    extra = "".join(f"\\usepackage{{{p}}}\n" for p in packages)
    return f"{LATEX_MARK}\n{_PREAMBLE}{extra}"


def latex_section(d: Derivation, heading: str = "section*") -> str:
    """One derivation as a LaTeX section: assumptions, symbols, steps and literature."""
    out = [rf"\{heading}{{{escape_text(d.title)}}}"]
    out.append(r"\paragraph{Assumptions.}")
    out.append(r"\begin{itemize}")
    out.extend(rf"  \item {text_tex(text)}" for text in d.assumptions)
    out.append(r"\end{itemize}")
    # the run-in heading gets a line of its own: beside a table it would sit at the table's middle
    out.append(r"\paragraph{Symbols.}\mbox{}\par")
    out.append(r"\noindent\begin{tabular}[t]{lp{0.62\textwidth}l}")
    for info in d.symbols.values():
        out.append(rf"  ${info.latex}$ & {text_tex(info.meaning)} & ${unit_tex(info.unit)}$ \\")
    out.append(r"\end{tabular}")
    out.append(r"\paragraph{Derivation.}")
    out.append(d.latex(steps=True))
    if d.references:
        out.append(r"\noindent Literature: " + escape_text("; ".join(d.references)) + ".")
    return "\n".join(out)


def report(
    names: Iterable[str],
    fmt: str = "markdown",
    *,
    title: str = "Manoeuvre derivations",
    path: str | os.PathLike[str] | None = None,
    overwrite: bool = False,
) -> str:
    """Collect catalog derivations into one report.

    Parameters
    ----------
    names : iterable of str
        Catalog names (see :func:`deltakit.symbolic.catalog`), in report order.
    fmt : {"markdown", "latex"}
        Markdown with ``$$`` math blocks, or a complete LaTeX document
        (article class, amsmath) that compiles with pdflatex.
    title : str
        Report heading (escaped: it shows as typed).
    path : path-like, optional
        If given, the report is also written there, atomically, with normal
        permissions. An existing file that is not a derivations report of
        this format is refused (:class:`~deltakit.DomainError`) and left as it
        was, unless ``overwrite=True``.
    overwrite : bool
        Replace whatever file is at ``path``.

    Returns
    -------
    str
        The report text.

    Examples
    --------
    >>> from deltakit.symbolic import report
    >>> text = report(["hohmann", "rocket_equation", "oberth"])
    >>> text.count("\\n## ")
    3
    """
    if isinstance(names, str):
        names = [names]
    names = list(names)
    if not names:
        raise ValueError("`names` must be a non-empty list of catalog names")
    derivations = [derive(name) for name in names]
    if fmt == "markdown":
        parts = [f"# {escape_markdown(title)}", "", f"*{DISCLAIMER}*", ""]
        parts.extend(d.markdown(level=2) for d in derivations)
        text = "\n".join(parts)
        same = _is_markdown_report
    elif fmt == "latex":
        text = _latex_document(title, derivations)
        same = _is_latex_report
    else:
        raise ValueError(f"`fmt` must be 'markdown' or 'latex', not {fmt!r}")
    if path is not None:
        write_atomic(path, text, kind=f"derivations report ({fmt})", same_kind=same, overwrite=overwrite)
    return text


def _is_markdown_report(head: bytes) -> bool:
    lines = head.decode("utf-8", "replace").splitlines()
    return len(lines) >= 3 and lines[0].startswith("# ") and lines[2] == f"*{DISCLAIMER}*"


def _is_latex_report(head: bytes) -> bool:
    return head.startswith(LATEX_MARK.encode())


def _latex_document(title: str, derivations: list) -> str:
    out = [
        latex_preamble(),
        rf"\title{{{escape_latex(title)}}}",
        r"\date{}",
        r"\begin{document}",
        r"\maketitle",
    ]
    out.append(rf"\noindent\emph{{{escape_text(DISCLAIMER)}}}")
    out.extend(latex_section(d) for d in derivations)
    out.append(r"\end{document}")
    return "\n".join(out) + "\n"
