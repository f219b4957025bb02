"""A report as one Markdown file: tables as pipe tables, math in ``$$`` blocks, figures inline.

Figures are PNG data URIs, so the file stands alone (Jupyter, VS Code and
pandoc show them; some web hosts strip data URIs). Every user string goes
through :func:`deltakit._text.escape_markdown`: no label can become markup or
raw HTML.
"""

from __future__ import annotations

import base64

from .._text import escape_markdown
from ._content import Bullets, DerivationBlock, Document, FigureBlock, Heading, Paragraph, Table

__all__ = ["MARK", "render"]

#: First line of every Markdown report (invisible when rendered; how deltakit knows its own files).
MARK = "<!-- deltakit report -->"


def _table(table: Table) -> list[str]:
    def row(cells: list[str]) -> str:
        return "| " + " | ".join(escape_markdown(c) for c in cells) + " |"

    align = [":---" if i < table.text_columns else "---:" for i in range(len(table.headers))]
    out = [f"**{escape_markdown(table.caption)}**", "", row(table.headers), "|" + "|".join(align) + "|"]
    out += [row(cells) for cells in table.rows]
    if table.total is not None:
        out.append(row(table.total))
    return out + [""]


def render(doc: Document) -> str:
    out = [MARK, f"# {escape_markdown(doc.title)}", ""]
    for block in doc.blocks:
        if isinstance(block, Heading):
            out += ["#" * block.level + " " + escape_markdown(block.text), ""]
        elif isinstance(block, Paragraph):
            text = escape_markdown(block.text)
            text = {"caution": f"> **Caution.** {text}", "verdict": f"**{text}**", "note": f"*{text}*"}.get(
                block.style, text
            )
            out += [text, ""]
        elif isinstance(block, Bullets):
            out += [f"- {escape_markdown(item)}" for item in block.items] + [""]
        elif isinstance(block, Table):
            out += _table(block)
        elif isinstance(block, FigureBlock):
            uri = "data:image/png;base64," + base64.b64encode(block.png).decode("ascii")
            out += [
                f"![{escape_markdown(block.caption)}]({uri})",
                "",
                f"*{escape_markdown(block.caption)}*",
                "",
            ]
        elif isinstance(block, DerivationBlock):
            out += [block.derivation.markdown(level=3), ""]
    return "\n".join(out).rstrip() + "\n"
