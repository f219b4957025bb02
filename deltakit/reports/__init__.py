"""The report in one call: a budget, its dispersion, the derivations and figures, as HTML, PDF or Markdown.

:func:`report` gathers what the analyst has (a :class:`~deltakit.Budget`, the
dataset of :func:`~deltakit.disperse`, catalog derivations, matplotlib
figures) into one document that carries the caution and the sources of the
constants used, and writes it as

* **HTML**: one self-contained file (figures and formulas embedded; no
  script, no network at view time);
* **PDF**: typeset by pdflatex from the LaTeX below (pdflatex must be
  installed);
* **LaTeX** source, or **Markdown** (math in ``$$`` blocks, figures inline).

Files are written by deltakit's one atomic writer: the new file replaces a
same-named one only once it is complete, with normal permissions, a symbolic
link is kept, and a file that is not a deltakit report of that format is
refused (:class:`~deltakit.DomainError`) and left untouched unless
``overwrite=True``. Every user string (names, labels, notes, captions) is
escaped for the format it goes to.

Results are for preliminary analysis, not for flight operations.
"""

from __future__ import annotations

import os
from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import Any

from .._files import write_atomic

__all__ = ["FORMATS", "report"]

#: Output formats and the file suffixes that select them.
FORMATS = {"html": (".html", ".htm"), "pdf": (".pdf",), "latex": (".tex",), "markdown": (".md", ".markdown")}
_ALIASES = {"md": "markdown", "tex": "latex", "htm": "html"}


def _is_html(head: bytes) -> bool:
    from ._html import GENERATOR

    return GENERATOR.encode() in head


def _is_pdf(head: bytes) -> bool:
    from ._latex import PDF_MARK

    return head.startswith(b"%PDF") and PDF_MARK in head


def _is_latex(head: bytes) -> bool:
    from ..symbolic.report import LATEX_MARK

    return head.startswith(LATEX_MARK.encode())


def _is_markdown(head: bytes) -> bool:
    from ._markdown import MARK

    return head.startswith(MARK.encode())


_SAME = {"html": _is_html, "pdf": _is_pdf, "latex": _is_latex, "markdown": _is_markdown}


def _format(fmt: str | None, path: Path | None) -> str:
    if fmt is None:
        if path is None:
            return "markdown"
        suffix = path.suffix.lower()
        for name, suffixes in FORMATS.items():
            if suffix in suffixes:
                return name
        raise ValueError(
            f"`fmt` not given and the suffix of {path} ({suffix!r}) names no format: use one of "
            f"{', '.join(s for v in FORMATS.values() for s in v)}, or give `fmt`"
        )
    if not isinstance(fmt, str):
        raise ValueError(f"`fmt` must be one of {', '.join(FORMATS)}, not {fmt!r}")
    fmt = _ALIASES.get(fmt.lower(), fmt.lower())
    if fmt not in FORMATS:
        raise ValueError(f"`fmt` must be one of {', '.join(FORMATS)}, not {fmt!r}")
    return fmt


def report(
    budget: Any = None,
    *,
    dispersion: Any = None,
    derivations: Iterable[Any] = (),
    figures: Mapping[str, Any] | Iterable[Any] | None = None,
    title: str | None = None,
    notes: str | None = None,
    constants: Iterable[Any] = (),
    fmt: str | tuple[str, ...] | None = None,
    path: str | os.PathLike[str] | None = None,
    overwrite: bool = False,
) -> Any:
    """Write the whole report in one call.

    Parameters
    ----------
    budget : Budget, optional
        Its lines, systems, start mass, verdict and mass waterfall.
    dispersion : xarray.Dataset, optional
        The result of :func:`deltakit.disperse`: the spreads, the probability
        of closing, the percentiles, the sensitivity ranking and two figures.
    derivations : iterable of str or Derivation, optional
        Catalog names (:func:`deltakit.symbolic.catalog`) or derivations.
    figures : mapping of caption to Figure, or iterable of Figures, optional
        matplotlib figures (or PNG bytes) to embed; ``(caption, figure)``
        pairs are taken too.
    title : str, optional
        Default: the budget's name.
    notes : str, optional
        A paragraph of the analyst's own, shown after the caution.
    constants : iterable of CentralBody, optional
        The bodies whose constants the numbers used: cited with their values
        and sources (standard gravity is always cited).
    fmt : {"html", "pdf", "latex", "markdown"} or a tuple of them, optional
        Default: from the suffix of ``path`` (Markdown without a path). With a
        tuple, ``path`` is the file name without suffix and one file per
        format is written.
    path : path-like, optional
        Where to write (atomically). Without it the report is only returned.
    overwrite : bool
        Replace a file at ``path`` even when it is not a deltakit report.

    Returns
    -------
    str, bytes or dict
        The report's text (bytes for a PDF); with a tuple of formats, a dict
        of format to the path written.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> import deltakit as dk
    >>> b = dk.Budget(1200.0, 3100.0, name="Demo tug", dry_mass=700.0).add("departure", 900.0, margin=0.05)
    >>> folder = pathlib.Path(tempfile.mkdtemp())
    >>> html = dk.report(b, derivations=["rocket_equation"], path=folder / "tug.html")
    >>> "not for flight operations" in html and (folder / "tug.html").exists()
    True
    """
    from ._content import build

    target = None if path is None else Path(path)
    if isinstance(fmt, (tuple, list)):
        if target is None:
            raise ValueError("`path` (a file name without suffix) is needed to write several formats")
        formats = [_format(f, None) for f in fmt]
        written = {}
        doc = build(budget, dispersion, derivations, figures, title, notes, constants)
        for name in formats:
            where = target.with_name(target.name + FORMATS[name][0])
            _write(doc, _render(doc, name, where), name, where, overwrite)
            written[name] = where
        return written
    name = _format(fmt, target)
    doc = build(budget, dispersion, derivations, figures, title, notes, constants)
    content = _render(doc, name, target)
    if target is not None:
        _write(doc, content, name, target, overwrite)
    return content


def _figure_names(doc: Any, path: Path | None) -> list[str]:
    stem = "figure" if path is None else f"{path.stem}-figure"
    return [f"{stem}-{number}.png" for number in range(1, len(doc.figures) + 1)]


def _render(doc: Any, name: str, path: Path | None = None) -> str | bytes:
    if name == "html":
        from ._html import render

        return render(doc)
    if name == "markdown":
        from ._markdown import render

        return render(doc)
    from ._latex import compile_pdf, render

    return render(doc, _figure_names(doc, path)) if name == "latex" else compile_pdf(doc)


def _write(doc: Any, content: str | bytes, name: str, path: Path, overwrite: bool) -> None:
    if name == "latex":  # the LaTeX source needs its figures beside it
        for figure, file in zip(doc.figures, _figure_names(doc, path)):
            write_atomic(
                path.with_name(file),
                figure.png,
                kind="report figure (PNG)",
                same_kind=lambda head: head.startswith(b"\x89PNG"),
                overwrite=overwrite,
            )
    write_atomic(path, content, kind=f"deltakit report ({name})", same_kind=_SAME[name], overwrite=overwrite)
