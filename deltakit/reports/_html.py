"""A report as one self-contained HTML file: styles inline, figures and formulas embedded.

No script, no font, no stylesheet or image is fetched from anywhere: figures
are PNG data URIs, formulas SVG data URIs (matplotlib mathtext), and a
Content-Security-Policy forbids any other source, so the file opens the same
offline and cannot be made to call out. Every user string goes through
:func:`deltakit._text.escape_html`.
"""

from __future__ import annotations

import base64

from .._text import escape_html
from ..symbolic.derivation import _pieces, unit_tex
from ._content import Bullets, DerivationBlock, Document, FigureBlock, Heading, Paragraph, Table
from ._math import formula_svg, svg_data_uri

__all__ = ["GENERATOR", "render"]

#: Tells deltakit's own HTML reports from other files (in the first bytes of the file).
GENERATOR = '<meta name="generator" content="deltakit report">'

_STYLE = """
body { font-family: "DejaVu Sans", Helvetica, Arial, sans-serif; max-width: 1100px; margin: 2em auto;
       padding: 0 1em; color: #1f2328; line-height: 1.45; }
h1 { font-size: 1.6em; border-bottom: 2px solid #27476e; padding-bottom: .2em; }
h2 { font-size: 1.3em; margin-top: 1.6em; color: #27476e; }
h3 { font-size: 1.1em; margin-top: 1.3em; }
.caution { border-left: 4px solid #b3245c; background: #fbeff3; padding: .6em .9em; }
.note { color: #57606a; font-size: .92em; }
.verdict { font-weight: bold; }
table { border-collapse: collapse; margin: .6em 0 1.2em; font-size: .86em; }
caption { caption-side: top; text-align: left; font-weight: bold; padding-bottom: .3em; }
th, td { border: 1px solid #d0d7de; padding: .25em .5em; }
th { background: #f2f4f7; }
td.number { text-align: right; font-variant-numeric: tabular-nums; }
tr.total td { font-weight: bold; background: #f7f8fa; }
.scroll { overflow-x: auto; }
figure { margin: 1em 0; }
figure img { max-width: 100%; border: 1px solid #e4e8ec; }
figcaption { font-size: .9em; color: #57606a; }
img.formula { vertical-align: middle; }
div.display { margin: .4em 0 .8em 2em; }
div.result { margin: .6em 0 1em 2em; padding: .4em .6em; border: 1px solid #27476e; display: inline-block; }
"""

_POLICY = (
    "default-src 'none'; img-src data:; style-src 'unsafe-inline'; "
    "script-src 'none'; connect-src 'none'; font-src 'none'; form-action 'none'; base-uri 'none'"
)


def _formula(latex: str, display: bool = False, size: float = 15.0) -> str:
    uri = svg_data_uri(formula_svg(latex, size))
    img = f'<img class="formula" src="{uri}" alt="{escape_html(latex)}">'
    return f'<div class="display">{img}</div>' if display else img


def _sentence(text: str) -> str:
    """Plain words escaped; ``$...$`` pieces typeset (derivation sentences carry inline math)."""
    return "".join(
        escape_html(p) if i % 2 == 0 else _formula(p, size=13.0) for i, p in enumerate(_pieces(text))
    )


def _table(table: Table) -> str:
    out = ['<div class="scroll"><table>', f"<caption>{escape_html(table.caption)}</caption>"]
    out.append("<thead><tr>" + "".join(f"<th>{escape_html(h)}</th>" for h in table.headers) + "</tr></thead>")
    out.append("<tbody>")

    def row(cells: list[str], css: str = "") -> str:
        tds = [
            f'<td class="number">{escape_html(cell)}</td>'
            if i >= table.text_columns
            else f"<td>{escape_html(cell)}</td>"
            for i, cell in enumerate(cells)
        ]
        return f"<tr{css}>" + "".join(tds) + "</tr>"

    out += [row(cells) for cells in table.rows]
    if table.total is not None:
        out.append(row(table.total, ' class="total"'))
    out.append("</tbody></table></div>")
    return "\n".join(out)


def _derivation(d) -> str:
    out = [f"<h3>{escape_html(d.title)}</h3>"]
    out.append(
        f'<p class="note">Catalog entry <code>{escape_html(d.name)}</code>; numeric twin '
        f"<code>{escape_html(d.twin)}</code>.</p>"
    )
    out.append("<p><strong>Assumptions</strong></p><ul>")
    out += [f"<li>{_sentence(text)}</li>" for text in d.assumptions]
    out.append(
        "</ul><table><caption>Symbols</caption><thead><tr><th>symbol</th><th>meaning</th>"
        "<th>unit</th></tr></thead><tbody>"
    )
    for info in d.symbols.values():
        out.append(
            f"<tr><td>{_formula(info.latex, size=13.0)}</td><td>{_sentence(info.meaning)}</td>"
            f"<td>{_formula(unit_tex(info.unit), size=13.0)}</td></tr>"
        )
    out.append("</tbody></table><p><strong>Steps</strong></p><ol>")
    for sentence, relation in d.steps:
        out.append(f"<li>{_sentence(sentence)}{_formula(d.tex(relation), display=True)}</li>")
    out.append("</ol><p><strong>Result</strong></p>")
    out.append(f'<div class="result">{_formula(d.result_tex(), size=16.0)}</div>')
    if d.references:
        out.append(f'<p class="note">Literature: {escape_html("; ".join(d.references))}.</p>')
    return "\n".join(out)


def render(doc: Document) -> str:
    """The whole report as HTML text."""
    out = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        GENERATOR,
        f'<meta http-equiv="Content-Security-Policy" content="{_POLICY}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{escape_html(doc.title)}</title>",
        f"<style>{_STYLE}</style>",
        "</head><body>",
        f"<h1>{escape_html(doc.title)}</h1>",
    ]
    for block in doc.blocks:
        if isinstance(block, Heading):
            out.append(f"<h{block.level}>{escape_html(block.text)}</h{block.level}>")
        elif isinstance(block, Paragraph):
            css = f' class="{block.style}"' if block.style else ""
            out.append(f"<p{css}>{escape_html(block.text)}</p>")
        elif isinstance(block, Bullets):
            out.append("<ul>" + "".join(f"<li>{escape_html(item)}</li>" for item in block.items) + "</ul>")
        elif isinstance(block, Table):
            out.append(_table(block))
        elif isinstance(block, FigureBlock):
            uri = "data:image/png;base64," + base64.b64encode(block.png).decode("ascii")
            caption = escape_html(block.caption)
            out.append(
                f'<figure><img src="{uri}" alt="{caption}"><figcaption>{caption}</figcaption></figure>'
            )
        elif isinstance(block, DerivationBlock):
            out.append(_derivation(block.derivation))
    out.append("</body></html>")
    return "\n".join(out) + "\n"
