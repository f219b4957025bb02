"""Several derivations in one report, as Markdown or a LaTeX document."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Iterable
from pathlib import Path

from .._text import CAUTION
from ._registry import derive
from .derivation import escape_text, text_tex, unit_tex

__all__ = ["report"]

DISCLAIMER = CAUTION

_PREAMBLE = r"""\documentclass[11pt]{article}
\usepackage{amsmath,amssymb}
\usepackage[margin=2.2cm]{geometry}
\allowdisplaybreaks
"""


def report(
    names: Iterable[str],
    fmt: str = "markdown",
    *,
    title: str = "Manoeuvre derivations",
    path: str | os.PathLike[str] | None = None,
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
        Report heading.
    path : path-like, optional
        If given, the report is also written there (atomically: a temporary
        file in the same folder, then renamed over the target).

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
        parts = [f"# {title}", "", f"*{DISCLAIMER}*", ""]
        parts.extend(d.markdown(level=2) for d in derivations)
        text = "\n".join(parts)
    elif fmt == "latex":
        text = _latex_document(title, derivations)
    else:
        raise ValueError(f"`fmt` must be 'markdown' or 'latex', not {fmt!r}")
    if path is not None:
        _write_atomically(Path(path), text)
    return text


def _latex_document(title: str, derivations: list) -> str:
    out = [_PREAMBLE, rf"\title{{{escape_text(title)}}}", r"\date{}", r"\begin{document}", r"\maketitle"]
    out.append(rf"\noindent\emph{{{escape_text(DISCLAIMER)}}}")
    for d in derivations:
        out.append(rf"\section*{{{escape_text(d.title)}}}")
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
    out.append(r"\end{document}")
    return "\n".join(out) + "\n"


def _write_atomically(path: Path, text: str) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", dir=path.parent)
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as stream:
            stream.write(text)
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, path)
    except BaseException:
        os.unlink(temporary)
        raise
