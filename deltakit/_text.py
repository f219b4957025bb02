"""User text on its way into LaTeX, Markdown, HTML and matplotlib: escaped here, once.

Budget names, line labels and anything else a user (or a shared file) typed
reach reports, tables, readouts and figure labels. Each target language has
one escape function below, and every exporter calls it: a label is always
shown as the text it is and can never become markup, a command or a script.

The caution every report, panel and table carries is defined here too, once.
"""

from __future__ import annotations

import html
import re

__all__ = [
    "CAUTION",
    "escape_html",
    "escape_latex",
    "escape_markdown",
    "escape_mathtext",
    "one_line",
]

#: The caution shown with every result that leaves the numeric layer.
CAUTION = (
    "Results are for preliminary analysis, not for flight operations; defer to the "
    "mission's verified tools, local rules and licensed practice."
)

_LINE_BREAKS = re.compile(r"[\r\n\u2028\u2029\x0b\x0c\x85]+")
_CONTROL = re.compile(r"[\x00-\x08\x0e-\x1f\x7f]")


def one_line(text: object) -> str:
    """``str(text)`` on one line: line breaks become spaces, control characters go."""
    return _CONTROL.sub("", _LINE_BREAKS.sub(" ", str(text)))


_LATEX_SPECIAL = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
    "<": r"\textless{}",
    ">": r"\textgreater{}",
    "|": r"\textbar{}",
    # Symbols analysts type in labels that pdflatex cannot set from UTF-8 text;
    # other non-ASCII text needs a Unicode engine (lualatex, xelatex).
    "\u0394": r"$\Delta$",
    "\u03b4": r"$\delta$",
    "\u03bc": r"$\mu$",
    "\u00b5": r"$\mu$",
    "\u00b0": r"$^\circ$",
    "\u00b1": r"$\pm$",
    "\u00d7": r"$\times$",
    "\u2192": r"$\rightarrow$",
    "\u2248": r"$\approx$",
    "\u2264": r"$\leq$",
    "\u2265": r"$\geq$",
    "\u221e": r"$\infty$",
}


def escape_latex(text: object) -> str:
    r"""User text as LaTeX that typesets exactly that text and runs nothing.

    Every character LaTeX treats specially is replaced by the command that
    prints it, and line breaks become spaces, so the text can neither end a
    comment nor start a command (``\input``, ``\write18``).

    Examples
    --------
    >>> print(escape_latex("Tug #2: 5% margin\n\\input{x}"))
    Tug \#2: 5\% margin \textbackslash{}input\{x\}
    """
    return "".join(_LATEX_SPECIAL.get(ch, ch) for ch in one_line(text))


# What can start markup anywhere in a line: emphasis, code, links and images,
# table cells, headings, strikethrough. (Hyphens and dots only matter at the
# start of a line, and an escaped label never starts one on its own.)
_MARKDOWN_SPECIAL = re.compile(r"([\\`*_\[\]|#~])")


def escape_markdown(text: object) -> str:
    r"""User text as Markdown that renders as that text: no markup, no raw HTML.

    Markdown punctuation is backslash-escaped and ``<``, ``>`` and ``&`` become
    HTML entities (Markdown renderers pass raw HTML through), so the text
    stays one table cell or one heading.

    Examples
    --------
    >>> print(escape_markdown("a|b <script>"))
    a\|b &lt;script&gt;
    """
    escaped = html.escape(one_line(text), quote=False)
    return _MARKDOWN_SPECIAL.sub(r"\\\1", escaped)


def escape_html(text: object) -> str:
    """User text as HTML text content or attribute value: ``<>&"'`` become entities.

    Examples
    --------
    >>> escape_html('<img src=x onerror="alert(1)">')
    '&lt;img src=x onerror=&quot;alert(1)&quot;&gt;'
    """
    return html.escape(str(text), quote=True)


def escape_mathtext(text: object) -> str:
    r"""User text for a matplotlib label: shown as typed, never parsed as mathtext.

    matplotlib reads text between ``$`` signs as mathematics and raises on
    what it cannot parse (``$\frac{``); escaping the dollar signs keeps the
    label plain.

    Examples
    --------
    >>> escape_mathtext(r"$\frac{")
    '\\$\\frac{'
    """
    return one_line(text).replace("$", r"\$")
