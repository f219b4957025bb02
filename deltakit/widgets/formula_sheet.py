"""FormulaSheet: the derivation behind a number, typeset, ready for a report.

Choose a catalog entry of :mod:`deltakit.symbolic`; the panel shows its
assumptions, its steps (each a sentence and the relation SymPy derived), the
boxed result and the symbols with their units, typeset with the notebook's
MathJax. Its LaTeX (an ``align*`` block) and Markdown sit in text boxes to copy
and behind download links.

SymPy loads when the first FormulaSheet is made.
"""

from __future__ import annotations

import base64
from collections.abc import Mapping
from typing import Any

import ipywidgets as widgets

from .._text import escape_html
from ._base import Computed, Panel

__all__ = ["FormulaSheet"]


def _text(sentence: str) -> str:
    """Sentence text as HTML, keeping its inline ``$...$`` math for MathJax."""
    return escape_html(sentence)


def sheet_html(derivation: Any, *, steps: bool = True) -> str:
    """The derivation as HTML with TeX for MathJax (used by :class:`FormulaSheet`).

    Examples
    --------
    >>> from deltakit.symbolic import derive
    >>> "\\\\boxed" in sheet_html(derive("oberth"))
    True
    """
    d = derivation
    parts = [f"<h4 style='margin:4px 0'>{escape_html(d.title)}</h4>", "<b>Assumptions</b><ul>"]
    parts += [f"<li>{_text(a)}</li>" for a in d.assumptions]
    parts.append("</ul>")
    if steps:
        parts.append("<b>Steps</b><ol>")
        for sentence, relation in d.steps:
            parts.append(f"<li>{_text(sentence)}<br>$${escape_html(d.tex(relation))}$$</li>")
        parts.append("</ol>")
    parts.append(f"<b>Result</b>$$\\boxed{{{escape_html(d.result_tex())}}}$$")
    parts.append("<b>Symbols</b><table>")
    for info in d.symbols.values():
        parts.append(
            f"<tr><td style='padding:0 10px 0 0'>${escape_html(info.latex)}$</td>"
            f"<td style='padding:0 10px 0 0'>{escape_html(info.meaning)}</td>"
            f"<td>{_unit(info.unit)}</td></tr>"
        )
    parts.append("</table>")
    if d.references:
        parts.append(
            "<p style='font-size:0.9em'><b>Literature:</b> " + escape_html("; ".join(d.references)) + ".</p>"
        )
    parts.append(f"<p style='font-size:0.9em'>Numeric twin: <code>{escape_html(d.twin)}</code></p>")
    return "".join(parts)


def _unit(unit: str) -> str:
    """A symbol's SI unit typeset like the steps (``m^3/s^2`` as upright TeX)."""
    if not unit:
        return "-"
    from ..symbolic.derivation import unit_tex

    return f"${escape_html(unit_tex(unit))}$"


def _download(text: str, filename: str, mime: str, label: str) -> str:
    data = base64.b64encode(text.encode("utf-8")).decode("ascii")
    return f'<a download="{escape_html(filename)}" href="data:{mime};base64,{data}">{escape_html(label)}</a>'


class FormulaSheet(Panel):
    """Choose a derivation and read, copy or download it.

    Parameters (keyword-only)
    -------------------------
    derivation : str
        Catalog name (see :func:`deltakit.symbolic.catalog`).
    steps : bool
        Show the steps, not only the result.

    ``figure`` is None: this panel shows typeset text, not a plot.

    Examples
    --------
    >>> from deltakit.widgets import FormulaSheet
    >>> sheet = FormulaSheet(derivation="rocket_equation")
    >>> sheet.results["title"]
    'Rocket equation (Tsiolkovsky)'
    """

    def __init__(self, *, derivation: str = "oberth", steps: bool = True) -> None:
        super().__init__()
        from ..symbolic import titles

        # titles are registered with the entries: the menu costs no derivation
        options = [(title, name) for name, title in titles().items()]
        self._control(
            "derivation",
            widgets.Dropdown(
                options=options,
                value=options[0][1],
                description="derivation",
                layout=widgets.Layout(width="420px"),
            ),
        )
        self._control("steps", widgets.Checkbox(value=True, description="show the steps"))
        self.sheet = widgets.HTMLMath(value="")
        self.sheet.add_class("deltakit-formula")
        self.latex_text = widgets.Textarea(
            value="",
            description="LaTeX",
            layout=widgets.Layout(width="auto", max_width="100%", height="120px"),
        )
        self.markdown_text = widgets.Textarea(
            value="",
            description="Markdown",
            layout=widgets.Layout(width="auto", max_width="100%", height="120px"),
        )
        self.downloads = widgets.HTML("")
        self.downloads.add_class("deltakit-download")
        copy = widgets.Accordion(children=[widgets.VBox([self.latex_text, self.markdown_text])])
        copy.set_title(0, "LaTeX and Markdown to copy")
        self._finish(
            "Formula sheet: the derivation behind each number",
            [["derivation", "steps"]],
            initial={"derivation": derivation, "steps": steps},
            extra=[self.sheet, copy, self.downloads],
        )

    @classmethod
    def compute(cls, values: Mapping[str, Any]) -> Computed:
        """The derivation ``values["derivation"]`` as HTML, LaTeX and Markdown."""
        from ..symbolic import derive

        name, steps = values["derivation"], bool(values["steps"])
        d = derive(name)
        latex = d.latex(steps=steps)
        markdown = d.markdown()
        results = {
            "name": name,
            "title": d.title,
            "result_latex": d.result_tex(),
            "latex": latex,
            "markdown": markdown,
        }
        return Computed(results, (), {"derivation": d, "sheet": sheet_html(d, steps=steps)})

    def draw(self, computed: Computed, changed: set[str]) -> None:
        r = computed.results
        name = r["name"]
        self.sheet.value = computed.drawing["sheet"]
        self.latex_text.value = r["latex"]
        self.markdown_text.value = r["markdown"]
        self.downloads.value = (
            _download(r["latex"], f"{name}.tex", "application/x-tex", "Download LaTeX")
            + " &nbsp; "
            + _download(r["markdown"], f"{name}.md", "text/markdown", "Download Markdown")
        )

    def _show_readouts(self, computed: Computed) -> None:
        r, d = computed.results, computed.drawing["derivation"]
        self.readouts.value = (
            f"<div>Showing <b>{escape_html(d.title)}</b> (<code>{escape_html(r['name'])}</code>), "
            f"{len(d.steps)} steps; numeric twin <code>{escape_html(d.twin)}</code>.</div>"
        )
